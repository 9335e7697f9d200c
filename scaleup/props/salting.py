"""Salting-out of sparingly soluble gases in electrolyte media (Weisenberger and Schumpe).

Public API:

* :func:`salting_out_Weisenberger_Schumpe` ``(gas, T, ions)`` -> c/c0 [-], the factor by
  which dissolved ions lower a gas solubility.
* :func:`ions_from_salts` ``(salts)`` -> ion concentrations [mol/m3] from salts or ions.
* :func:`salt_from_text` ``("NaCl=0.5 mol/L")`` -> (name, concentration [mol/m3]).
* :func:`normalise_ion` ``("SO4 2-")`` -> ``"SO4^2-"``.

Concentrations are SI (mol/m3) here; the model is written in kmol/m3 (= mol/L) and
converts inside.
"""

from __future__ import annotations

import re

import numpy as np

from scaleup.errors import InputError
from scaleup.props._common import as_array, check_positive, check_range, is_scalar, out
from scaleup.props.data import GASES, SALTS, SCHUMPE_IONS

_DIGIT_SIGN = re.compile(r"^(?P<base>.+?)\^?(?P<n>\d)(?P<sign>[+-])$")  # Mg2+, Mg^2+
_SIGN_DIGIT = re.compile(r"^(?P<base>.+?)(?P<sign>[+-])(?P<n>\d)$")  # Mg+2
_SIGNS = re.compile(r"^(?P<base>.+?)(?P<signs>[+]+|[-]+)$")  # Ca++, Cl-


def _charged(base: str, charge: int, sign: str) -> str:
    return f"{base}{sign}" if charge == 1 else f"{base}^{charge}{sign}"


def normalise_ion(name: str) -> str:
    """Write an ion the way :data:`scaleup.props.data.SCHUMPE_IONS` does.

    ``"Mg++"``, ``"Mg2+"``, ``"Mg+2"`` and ``"Mg^2+"`` all become ``"Mg^2+"``; singly
    charged ions keep a bare sign (``"Na+"``). A digit before the sign is read as part of
    the formula when that names a known ion (``"NH4+"``, ``"H2PO4-"``), else as the charge.
    Spaces are ignored.

    Parameters
    ----------
    name : str
        An ion as people write it [-].

    Returns
    -------
    str
        The canonical spelling [-].

    Examples
    --------
    >>> normalise_ion("SO4 2-"), normalise_ion("Ca++"), normalise_ion("NH4+")
    ('SO4^2-', 'Ca^2+', 'NH4+')
    """
    text = name.replace(" ", "").replace("\u2212", "-")
    if text in SCHUMPE_IONS:
        return text
    candidates = []
    for pattern in (_DIGIT_SIGN, _SIGN_DIGIT):
        m = pattern.match(text)
        if m:
            candidates.append(_charged(m.group("base"), int(m.group("n")), m.group("sign")))
    m = _SIGNS.match(text)
    if m:
        candidates.append(_charged(m.group("base"), len(m.group("signs")),
                                   m.group("signs")[0]))
    known = [c for c in candidates if c in SCHUMPE_IONS]
    return known[0] if known else (candidates[0] if candidates else text)


def ions_from_salts(salts: dict[str, float]) -> dict[str, float]:
    """Ion concentrations from salts (fully dissociated) and ions given directly.

    Parameters
    ----------
    salts : dict
        Salt or ion name -> concentration [mol/m3]; salts from
        :data:`scaleup.props.data.SALTS` (``"NaCl"``, ``"(NH4)2SO4"``, ``"MgSO4.7H2O"``),
        ions in any spelling :func:`normalise_ion` reads.

    Returns
    -------
    dict
        Ion -> concentration [mol/m3], summed over all sources.

    Examples
    --------
    >>> ions_from_salts({"Na2SO4": 100.0, "NaCl": 50.0})
    {'Na+': 250.0, 'SO4^2-': 100.0, 'Cl-': 50.0}
    """
    ions: dict[str, float] = {}
    for name, concentration in salts.items():
        c = float(check_positive(f"salt {name}", concentration, "mol/m3", allow_zero=True))
        if name in SALTS:
            parts = SALTS[name][0]
        else:
            ion = normalise_ion(name)
            if ion not in SCHUMPE_IONS:
                raise InputError(
                    f"unknown salt or ion {name!r}; salts: {', '.join(SALTS)}; ions: "
                    f"{', '.join(SCHUMPE_IONS)}", "salt", name)
            parts = {ion: 1}
        for ion, count in parts.items():
            ions[ion] = ions.get(ion, 0.0) + count * c
    return ions


def salt_from_text(text: str) -> tuple[str, float]:
    """Read ``"NaCl=0.5 mol/L"`` or ``"MgSO4.7H2O=0.25 g/L"`` into (name, mol/m3).

    Mass concentrations need a salt from the table (its molar mass); ions take molar units.

    Parameters
    ----------
    text : str
        ``name=quantity`` as typed [-].

    Returns
    -------
    tuple
        The name as given and its concentration [mol/m3].

    Examples
    --------
    >>> salt_from_text("NaCl=0.5 mol/L")
    ('NaCl', 500.0)
    >>> name, c = salt_from_text("NaCl=5.844 g/L"); round(c, 6)
    100.0
    """
    from scaleup.units import parse

    if "=" not in text:
        raise InputError(f'"{text}" should read name=concentration, e.g. "NaCl=0.5 mol/L"',
                         "salt", text)
    name, quantity = (part.strip() for part in text.split("=", 1))
    molar_mass = SALTS[name][1] if name in SALTS else None
    value = parse(quantity, "concentration", f"salt {name}", molar_mass_kg_mol=molar_mass)
    ions_from_salts({name: value})  # refuses unknown names and negative values here
    return name, value


def salting_out_Weisenberger_Schumpe(gas: str, T, ions: dict[str, float]):
    r"""Ratio of gas solubility in an electrolyte solution to that in water [1]_.

    .. math::
        \log_{10}\frac{c_{G,0}}{c_G} = \sum_i (h_i + h_G)\,c_i,\qquad
        h_G = h_{G,0} + h_T\,(T - 298.15\ \mathrm{K})

    with the ion concentrations :math:`c_i` in kmol/m3 and the ion- and gas-specific
    parameters :math:`h_i`, :math:`h_{G,0}`, :math:`h_T` [m3/kmol] of the paper.

    Parameters
    ----------
    gas : str
        ``O2``, ``N2``, ``CO2``, ``H2`` or ``CH4`` [-].
    T : float or array
        Temperature [K], 273 to 363 fitted; 273.15 to 373.15 accepted.
    ions : dict
        Ion -> concentration [mol/m3], e.g. from :func:`ions_from_salts`.

    Returns
    -------
    float or array
        :math:`c_G / c_{G,0}` [-], below 1 for salting-out.

    Notes
    -----
    Fitted to solubilities of 20 gases in salt solutions at 273 to 363 K; the authors report
    a mean deviation of about 2 % in log10 terms at up to several kmol/m3. Outside 273 to
    363 K the linear temperature term is extrapolated (the dispatcher in
    :mod:`scaleup.props.solubility` says so in its warnings).

    Examples
    --------
    O2 in 1 mol/L NaCl at 25 degC: c/c0 = 10**-(0.1143 + 0.0318) = 0.714:

    >>> round(salting_out_Weisenberger_Schumpe("O2", 298.15, {"Na+": 1000, "Cl-": 1000}), 3)
    0.714

    References
    ----------
    .. [1] Weisenberger, S., and Schumpe, A. (1996). Estimation of gas solubilities in salt
       solutions at temperatures from 273 K to 363 K. AIChE J. 42, 298-300.
    """
    if gas not in GASES:
        raise InputError(f"no salting-out parameters for gas {gas!r}; known: "
                         f"{', '.join(GASES)}", "gas", gas)
    scalar = is_scalar(T)
    T = check_range("temperature", T, 273.15, 373.15, "K", "the Schumpe model")
    g = GASES[gas]
    h_gas = g.schumpe_h0 + g.schumpe_ht * (T - 298.15)
    total = np.zeros_like(T)
    for name, concentration in ions.items():
        ion = normalise_ion(name)
        if ion not in SCHUMPE_IONS:
            raise InputError(f"no Weisenberger-Schumpe parameter for ion {name!r}; known: "
                             f"{', '.join(SCHUMPE_IONS)}", "ion", name)
        c = as_array(check_positive(f"ion {name}", concentration, "mol/m3", allow_zero=True),
                     "ion") / 1000.0  # mol/m3 to kmol/m3
        total = total + (SCHUMPE_IONS[ion] + h_gas) * c
    return out(10.0 ** (-total), scalar)

