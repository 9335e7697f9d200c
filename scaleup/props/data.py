"""Published constants the property modules use, each with its source.

Values marked "(from memory)" were transcribed from the cited table without the table at
hand; the test suite checks them against an independent reference where one exists.
Units are SI unless the name says otherwise.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

from scaleup.units import M_O2


@dataclass(frozen=True)
class Gas:
    """A sparingly soluble gas: what solubility and diffusivity need to know about it."""

    name: str
    molar_mass: float  # kg/mol
    molar_volume_nbp: float  # m3/mol, liquid molar volume at the normal boiling point
    diffusion_volume: float  # Fuller diffusion volume, dimensionless sum (cm3 basis)
    henry_hcp_298: float  # mol/(m3 Pa), Henry solubility at 298.15 K
    henry_slope: float  # K, d ln(Hcp) / d(1/T)
    schumpe_h0: float  # m3/kmol, Weisenberger-Schumpe gas parameter at 298.15 K
    schumpe_ht: float  # m3/(kmol K), its temperature coefficient


# Henry constants: Sander (2015), Atmos. Chem. Phys. 15:4399, the rows it quotes from the
# review of Wilhelm, Battino and Wilcock (1977), Chem. Rev. 77:219 (one review for all five
# gases, so they are mutually consistent).
# Salting-out: Weisenberger and Schumpe (1996), AIChE J. 42:298, Table 2.
# Molar volumes at the normal boiling point: Welty, Wicks, Wilson and Rorrer,
# Fundamentals of Momentum, Heat and Mass Transfer, Table 24.5 (O2, N2, CO2, H2; from
# memory); CH4 from Reid, Prausnitz and Poling (1987), Appendix A (from memory).
# Diffusion volumes: Poling, Prausnitz and O'Connell (2001), 5th ed., Table 11-1; CH4 as the
# atomic sum C + 4 H = 15.9 + 4 x 2.31.
GASES: dict[str, Gas] = {
    "O2": Gas("O2", M_O2, 25.6e-6, 16.3, 1.3e-5, 1500.0, 0.0, -0.334e-3),
    "N2": Gas("N2", 28.014e-3, 31.2e-6, 18.5, 6.4e-6, 1300.0, -0.0010, -0.605e-3),
    "CO2": Gas("CO2", 44.009e-3, 34.0e-6, 26.9, 3.3e-4, 2400.0, -0.0172, -0.338e-3),
    "H2": Gas("H2", 2.016e-3, 14.3e-6, 6.12, 7.7e-6, 490.0, -0.0218, -0.299e-3),
    "CH4": Gas("CH4", 16.043e-3, 37.7e-6, 25.14, 1.4e-5, 1700.0, 0.0022, -0.524e-3),
}

# IAPWS G7-04 (2004), Table 2: A, B, C of ln(kH/p1*) = A/Tr + B tau^0.355/Tr + C Tr^-0.41 e^tau,
# and the temperature range [K] of the data each fit was made on.
IAPWS_HENRY: dict[str, tuple[float, float, float, float, float]] = {
    "O2": (-9.44833, 4.43822, 11.42005, 274.15, 616.52),
    "N2": (-9.67578, 4.72162, 11.70585, 278.12, 636.46),
    "CO2": (-8.55445, 4.01195, 9.52345, 274.19, 642.66),
    "H2": (-4.73284, 6.08954, 6.06066, 273.15, 636.09),
    "CH4": (-10.44708, 4.66491, 12.12986, 275.46, 633.11),
}

# Fuller diffusion volumes of gases that may be the continuous (solvent) phase, Poling et
# al. (2001) Table 11-1, with their molar masses [kg/mol].
GAS_SOLVENTS: dict[str, tuple[float, float]] = {
    "air": (19.7, 28.965e-3),
    "N2": (18.5, 28.014e-3),
    "O2": (16.3, M_O2),
    "H2": (6.12, 2.016e-3),
    "CO2": (26.9, 44.009e-3),
    "CH4": (25.14, 16.043e-3),
    "H2O": (13.1, 18.015e-3),
    "He": (2.67, 4.0026e-3),
    "Ar": (16.2, 39.948e-3),
}

# Weisenberger and Schumpe (1996) Table 1, ion-specific parameters h_i [m3/kmol]. A
# secondary copy of the table reads K+ as 0.0992; 0.0922 is used here (from memory).
SCHUMPE_IONS: dict[str, float] = {
    "H+": 0.0, "Li+": 0.0754, "Na+": 0.1143, "K+": 0.0922, "NH4+": 0.0556,
    "Mg^2+": 0.1694, "Ca^2+": 0.1762, "Mn^2+": 0.1463, "Fe^2+": 0.1523, "Cu^2+": 0.1675,
    "Zn^2+": 0.1537, "Fe^3+": 0.1161, "Al^3+": 0.2174,
    "OH-": 0.0839, "F-": 0.0920, "Cl-": 0.0318, "Br-": 0.0269, "I-": 0.0039,
    "NO3-": 0.0128, "HCO3-": 0.0967, "H2PO4-": 0.0906, "HSO3-": 0.0549,
    "CO3^2-": 0.1423, "HPO4^2-": 0.1499, "SO3^2-": 0.1270, "SO4^2-": 0.1117,
    "PO4^3-": 0.2119,
}
SCHUMPE_T_RANGE = (273.0, 363.0)  # K, the range the 1996 parameters were fitted on

# Salts fully dissociated into ions (ion: count per formula unit) and molar mass [kg/mol],
# from the IUPAC standard atomic weights.
SALTS: dict[str, tuple[dict[str, int], float]] = {
    "NaCl": ({"Na+": 1, "Cl-": 1}, 58.44e-3),
    "KCl": ({"K+": 1, "Cl-": 1}, 74.55e-3),
    "NH4Cl": ({"NH4+": 1, "Cl-": 1}, 53.49e-3),
    "CaCl2": ({"Ca^2+": 1, "Cl-": 2}, 110.98e-3),
    "CaCl2.2H2O": ({"Ca^2+": 1, "Cl-": 2}, 147.01e-3),
    "MgCl2": ({"Mg^2+": 1, "Cl-": 2}, 95.21e-3),
    "Na2SO4": ({"Na+": 2, "SO4^2-": 1}, 142.04e-3),
    "K2SO4": ({"K+": 2, "SO4^2-": 1}, 174.25e-3),
    "(NH4)2SO4": ({"NH4+": 2, "SO4^2-": 1}, 132.13e-3),
    "MgSO4": ({"Mg^2+": 1, "SO4^2-": 1}, 120.36e-3),
    "MgSO4.7H2O": ({"Mg^2+": 1, "SO4^2-": 1}, 246.47e-3),
    "KH2PO4": ({"K+": 1, "H2PO4-": 1}, 136.08e-3),
    "K2HPO4": ({"K+": 2, "HPO4^2-": 1}, 174.17e-3),
    "NaH2PO4": ({"Na+": 1, "H2PO4-": 1}, 119.98e-3),
    "Na2HPO4": ({"Na+": 2, "HPO4^2-": 1}, 141.96e-3),
    "NaHCO3": ({"Na+": 1, "HCO3-": 1}, 84.01e-3),
    "Na2CO3": ({"Na+": 2, "CO3^2-": 1}, 105.99e-3),
    "NaNO3": ({"Na+": 1, "NO3-": 1}, 84.99e-3),
    "KNO3": ({"K+": 1, "NO3-": 1}, 101.10e-3),
    "NaOH": ({"Na+": 1, "OH-": 1}, 40.00e-3),
    "KOH": ({"K+": 1, "OH-": 1}, 56.11e-3),
    "HCl": ({"H+": 1, "Cl-": 1}, 36.46e-3),
}


@dataclass(frozen=True)
class Solvent:
    """A liquid solvent for the liquid-diffusivity estimates."""

    name: str
    molar_mass: float  # kg/mol
    association: float  # Wilke-Chang association factor phi
    kind: str  # "aqueous", "paraffin" or "other": which Hayduk-Minhas form applies


# Association factors of Wilke and Chang (1955): water 2.6, methanol 1.9, ethanol 1.5,
# unassociated solvents 1.0. Hayduk and Laudie (1974) revised water to 2.26.
SOLVENTS: dict[str, Solvent] = {
    "water": Solvent("water", 18.015e-3, 2.6, "aqueous"),
    "methanol": Solvent("methanol", 32.042e-3, 1.9, "other"),
    "ethanol": Solvent("ethanol", 46.069e-3, 1.5, "other"),
    "n-hexane": Solvent("n-hexane", 86.178e-3, 1.0, "paraffin"),
    "n-heptane": Solvent("n-heptane", 100.205e-3, 1.0, "paraffin"),
    "n-octane": Solvent("n-octane", 114.232e-3, 1.0, "paraffin"),
    "n-decane": Solvent("n-decane", 142.286e-3, 1.0, "paraffin"),
    "toluene": Solvent("toluene", 92.141e-3, 1.0, "other"),
}
WILKE_CHANG_WATER_REVISED = 2.26  # Hayduk and Laudie (1974)


@dataclass(frozen=True)
class MeasuredSeries:
    """Measured diffusivities of one solute in water over temperature [K] -> [m2/s].

    Either a table (``temperatures``, ``values``) or, where the authors give one, their
    interpolation ``formula`` over [``temperatures[0]``, ``temperatures[-1]``].
    """

    solute: str
    temperatures: tuple[float, ...]
    values: tuple[float, ...]
    source: str
    formula: Callable | None = None  # vectorised: array of K -> array of m2/s


def _series(solute: str, celsius: tuple[float, ...], cm2_s_e5: tuple[float, ...],
            source: str) -> MeasuredSeries:
    return MeasuredSeries(solute, tuple(t + 273.15 for t in celsius),
                          tuple(v * 1e-9 for v in cm2_s_e5), source)  # 1e-5 cm2/s = 1e-9 m2/s


def _han_bartels(T):
    """Han and Bartels (1996) interpolation formula for O2 in H2O [m2/s], T in K."""
    return 10.0 ** (-4.410 + 773.8 / T - (506.4 / T) ** 2) * 1e-4  # cm2/s to m2/s


_HAN_BARTELS_T = (272.65, 368.15)  # K, -0.5 to 95 degC
_JAHNE = "Jahne, Heinz and Dietrich (1987), J. Geophys. Res. 92:10767, via CRC Handbook"

# Measured diffusivities in water. The CRC Handbook table "Diffusion of gases in water"
# lists Jahne et al. at 10 to 35 degC; N2 there is one value at 25 degC from Himmelblau
# (1964). O2 is the interpolation formula Han and Bartels fitted to their Taylor-dispersion
# measurements (-0.5 to 95 degC).
MEASURED: dict[str, MeasuredSeries] = {
    "O2": MeasuredSeries("O2", _HAN_BARTELS_T, tuple(_han_bartels(t) for t in _HAN_BARTELS_T),
                         "Han and Bartels (1996), J. Phys. Chem. 100:5597", _han_bartels),
    "N2": _series("N2", (25.0,), (2.0,), "Himmelblau (1964), Chem. Rev. 64:527, via CRC "
                                          "Handbook"),
    "CO2": _series("CO2", (10, 15, 20, 25, 30, 35), (1.26, 1.45, 1.67, 1.91, 2.17, 2.47),
                   _JAHNE),
    "H2": _series("H2", (10, 15, 20, 25, 30, 35), (3.62, 4.08, 4.58, 5.11, 5.69, 6.31),
                  _JAHNE),
    "CH4": _series("CH4", (10, 15, 20, 25, 30, 35), (1.24, 1.43, 1.62, 1.84, 2.08, 2.35),
                   _JAHNE),
}
