"""The impeller catalogue: generic impeller types and their published characteristics.

Data, not code. Each entry holds, for the standard geometry of its type in a vessel with four
wall baffles of T/10 (unbaffled for the close-clearance types):

* ``power_number``: turbulent power number Np = P / (rho N^3 D^5) and the published range;
* ``kp``: laminar constant, Np = Kp / Re for Re below ``re_laminar``;
* ``re_turbulent``: Reynolds number above which Np is taken as constant;
* ``np_transitional``: a published (Re, Np) point inside the transition, where one was found;
  the power curve then passes through it (see :func:`scaleup.hydro.power.power_number_curve`);
* ``flow_number``: pumping number Nq = Q_pumped / (N D^3), where published;
* ``gassed``: which gassed-power model applies, and for the per-type linear model
  Pg/P = max(floor, 1 - slope Fl) its slope and floor;
* ``flooding``: whether the disc-turbine flooding correlation of Nienow et al. (1985) was
  established for this type ("valid"), is conservative for it ("conservative"), or does not
  apply ("outside").

``sources`` names the origin of every number. Values marked "from memory" were recalled from
the cited handbook or paper and were not found again in the sources searched (the range of
values that were seen is given beside them); "common practice, no source" marks a rule of
thumb. Values without that mark were checked against the source named (the checks are in
``tests/reference/test_hydro_catalogue.py``). A power number measured for a particular
impeller (``Impeller.power_number``) always overrides the catalogue.

Types are named generically (rule 1 of the project): no brand or model names.
"""

from __future__ import annotations

from dataclasses import dataclass

from scaleup.errors import InputError

HANDBOOK = ("Paul, Atiemo-Obeng & Kresta (eds.), Handbook of Industrial Mixing, Wiley 2004, "
            "ch. 6 (Hemrajani & Tatterson), typical values")
# Rushton, Costich & Everett (1950) tabulated points of their power curves (D/T = 1/3,
# C/D = 1, H/T = 1, baffles J/T = 0.083 rather than the T/10 assumed above) at Re = 5, 200
# and 1e5, as reproduced by Hendricks to two or three figures.
RUSHTON_TABLE = ("Rushton, Costich & Everett (1950), Chem. Eng. Prog. 46, 395 and 467, as "
                 "tabulated in Hendricks (2011), Fundamentals of Water Treatment Unit "
                 "Processes, CRC Press, Table 10.3, p. 258")
PBT_PAGE = ("Chapple, Kresta, Wall & Afacan (2002), Chem. Eng. Res. Des. 80, 364 (Np of 4-blade "
            "45-degree turbines, W/D = 0.2, about 1.2-1.35; from memory); the values 1.27 and "
            "Nq 0.79 also appear on an undated mixing-forum web page")


@dataclass(frozen=True)
class ImpellerType:
    """Characteristics of one generic impeller type (see the module docstring)."""

    id: str
    description: str
    flow: str  # "radial", "axial", "mixed" or "close-clearance"
    blades: int
    blade_width_ratio: float  # W / D [-]
    power_number: float  # turbulent Np [-]
    power_number_range: tuple[float, float]
    kp: float  # laminar Np * Re [-]
    re_laminar: float  # [-]
    re_turbulent: float  # [-]
    flow_number: float | None  # Nq [-]
    gassed: str  # "Cui" or "linear" or "none"
    gassed_slope: float  # per-type linear model: Pg/P = max(floor, 1 - slope * Fl)
    gassed_floor: float
    flooding: str  # "valid", "conservative" or "outside"
    sources: dict
    np_transitional: tuple[float, float] | None = None  # published (Re, Np) in the transition


# An undated process-engineering reference sheet (web calculator, names no primary source)
# lists Np / Nq: disc turbine 5.0 / 0.72, pitched blade 1.3 / 0.60, hydrofoil 0.35 / 0.40,
# high-solidity hydrofoil 0.70 / 0.55, marine propeller 0.50 / 0.50, and Kp = 200 +- 25 % for
# anchors. It is quoted below only as "values seen", never as a source.
SEEN = "values seen on an undated reference sheet that names no source: "

CATALOGUE: dict[str, ImpellerType] = {t.id: t for t in (
    ImpellerType(
        id="disc-turbine",
        description="six-blade flat-blade disc turbine, W/D = 0.2",
        flow="radial", blades=6, blade_width_ratio=0.2,
        power_number=5.0, power_number_range=(4.6, 6.3), kp=70.0,
        re_laminar=10.0, re_turbulent=1.0e4, flow_number=0.72,
        gassed="Cui", gassed_slope=0.0, gassed_floor=0.0, flooding="valid",
        np_transitional=(200.0, 3.7),
        sources={
            "power_number": "Bujalski, Nienow, Chatwin & Cooke (1987), Chem. Eng. Sci. 42, "
                            "317: Np 4.6-6.3 with disc thickness and scale; 5.0 typical. The "
                            "range holds " + RUSHTON_TABLE + " (6.0) and Harriott (2003), "
                            "Chemical Reactor Design, Ex. 7.6 (6)",
            "kp": RUSHTON_TABLE + ": Np = 14.2 at Re = 5, so Kp = 71 (70 kept, 1.4 % low)",
            "np_transitional": RUSHTON_TABLE + ": Np = 3.7 at Re = 200",
            "flow_number": HANDBOOK + " (from memory; not found again; " + SEEN + "0.72)",
            "gassed": "Cui, van der Lans & Luyben (1996), Chem. Eng. Sci. 51, 2631",
            "flooding": "Nienow, Warmoeskerken, Smith & Konno (1985), Proc. 5th Eur. Conf. "
                        "Mixing, 143",
            "re_limits": "common practice, no source",
        }),
    ImpellerType(
        id="concave-disc-turbine",
        description="six-blade concave (hollow-blade) disc turbine",
        flow="radial", blades=6, blade_width_ratio=0.2,
        power_number=3.2, power_number_range=(2.8, 4.4), kp=70.0,
        re_laminar=10.0, re_turbulent=1.0e4, flow_number=None,
        gassed="linear", gassed_slope=2.5, gassed_floor=0.70, flooding="conservative",
        sources={
            "power_number": "Warmoeskerken & Smith (1989), Chem. Eng. Res. Des. 67, 193; "
                            "Nienow (1998), Appl. Mech. Rev. 51, 3 (from memory; not found "
                            "again in the sources searched)",
            "kp": "assumed equal to the flat-blade disc turbine (no source)",
            "gassed": "Nienow (1998), Appl. Mech. Rev. 51, 3: Pg/P stays about 0.7-0.9 up to "
                      "high flow numbers (from memory, not found again; linear fit is ours)",
            "flooding": "concave blades flood at a higher gas flow than flat blades; the "
                        "disc-turbine limit is conservative (Nienow 1998, from memory)",
            "re_limits": "common practice, no source",
        }),
    ImpellerType(
        id="pitched-blade-4",
        description="four-blade 45-degree pitched-blade turbine, down-pumping, W/D = 0.2",
        flow="mixed", blades=4, blade_width_ratio=0.2,
        power_number=1.27, power_number_range=(1.1, 1.5), kp=44.0,
        re_laminar=10.0, re_turbulent=1.0e4, flow_number=0.79,
        gassed="linear", gassed_slope=8.0, gassed_floor=0.55, flooding="outside",
        sources={
            "power_number": PBT_PAGE + ": Np = 1.27 (the range is from memory; " + SEEN
                            + "1.3)",
            "flow_number": PBT_PAGE + ": Nq = 0.79 (" + SEEN + "0.60)",
            "kp": HANDBOOK + " (from memory; not found again)",
            "gassed": "Bujalski, Konno & Nienow (1988), Proc. 6th Eur. Conf. Mixing, 389: "
                      "down-pumping pitched blades fall to about 0.5-0.6 of ungassed power "
                      "(from memory, not found again; linear fit is ours)",
            "re_limits": "common practice, no source",
        }),
    ImpellerType(
        id="pitched-blade-6",
        description="six-blade 45-degree pitched-blade turbine, down-pumping, W/D = 0.2",
        flow="mixed", blades=6, blade_width_ratio=0.2,
        power_number=1.7, power_number_range=(1.5, 1.9), kp=50.0,
        re_laminar=10.0, re_turbulent=1.0e4, flow_number=0.85,
        gassed="linear", gassed_slope=8.0, gassed_floor=0.55, flooding="outside",
        sources={
            "power_number": "Harriott (2003), Chemical Reactor Design, Ex. 7.6 (p. 300): "
                            "Np = 1.7 for a pitched-blade turbine (the range is from memory)",
            "flow_number": HANDBOOK + " (from memory; not found again)",
            "kp": HANDBOOK + " (from memory; not found again)",
            "gassed": "as pitched-blade-4 (Bujalski, Konno & Nienow 1988, from memory). "
                      "Harriott (2003), Ex. 7.6 takes Pg/P = 0.8 for upper pitched blades "
                      "in an already aerated liquid",
            "re_limits": "common practice, no source",
        }),
    ImpellerType(
        id="hydrofoil-narrow",
        description="three-blade narrow-blade hydrofoil, down-pumping",
        flow="axial", blades=3, blade_width_ratio=0.15,
        power_number=0.30, power_number_range=(0.27, 0.34), kp=40.0,
        re_laminar=10.0, re_turbulent=1.0e4, flow_number=0.56,
        gassed="linear", gassed_slope=10.0, gassed_floor=0.50, flooding="outside",
        sources={
            "power_number": HANDBOOK + " (from memory; not found again; " + SEEN + "0.35)",
            "flow_number": HANDBOOK + " (from memory; not found again; " + SEEN + "0.40)",
            "kp": "approximate, hydrofoils are not used for viscous work (no source)",
            "gassed": "narrow hydrofoils are poor gas dispersers; Nienow (1998), Appl. Mech. "
                      "Rev. 51, 3 (from memory, not found again; linear fit is ours)",
            "re_limits": "common practice, no source",
        }),
    ImpellerType(
        id="hydrofoil-wide",
        description="four-blade wide-blade (high-solidity) hydrofoil, down-pumping",
        flow="axial", blades=4, blade_width_ratio=0.35,
        power_number=0.85, power_number_range=(0.75, 1.1), kp=60.0,
        re_laminar=10.0, re_turbulent=1.0e4, flow_number=0.73,
        gassed="linear", gassed_slope=6.0, gassed_floor=0.60, flooding="outside",
        sources={
            "power_number": HANDBOOK + " (from memory; not found again; " + SEEN + "0.70)",
            "flow_number": HANDBOOK + " (from memory; not found again; " + SEEN + "0.55)",
            "kp": "approximate (no source)",
            "gassed": "Nienow (1998), Appl. Mech. Rev. 51, 3: down-pumping wide hydrofoils "
                      "lose about 40 % of their power when gassed (from memory, not found "
                      "again; linear fit is ours)",
            "re_limits": "common practice, no source",
        }),
    ImpellerType(
        id="marine-propeller",
        description="three-blade marine propeller, pitch = D",
        flow="axial", blades=3, blade_width_ratio=0.2,
        power_number=0.26, power_number_range=(0.22, 0.32), kp=41.0,
        re_laminar=10.0, re_turbulent=1.0e4, flow_number=0.5,
        gassed="linear", gassed_slope=10.0, gassed_floor=0.50, flooding="outside",
        np_transitional=(200.0, 0.77),
        sources={
            "power_number": RUSHTON_TABLE + ": pitch 1.03 D, baffled, Np = 0.26 at Re = 1e5 "
                            "(unbaffled 0.22, off-centre 0.32). Was 0.35 from memory",
            "kp": RUSHTON_TABLE + ": Np = 8.3 at Re = 5, so Kp = 41.5",
            "np_transitional": RUSHTON_TABLE + ": Np = 0.77 at Re = 200",
            "flow_number": HANDBOOK + " (from memory; not found again; " + SEEN + "0.50)",
            "gassed": "no published set found; treated like the narrow hydrofoil (no source)",
            "re_limits": "common practice, no source",
        }),
    ImpellerType(
        id="anchor",
        description="anchor, close wall clearance, for viscous media (unbaffled)",
        flow="close-clearance", blades=2, blade_width_ratio=0.1,
        power_number=0.35, power_number_range=(0.3, 0.5), kp=300.0,
        re_laminar=30.0, re_turbulent=1.0e4, flow_number=None,
        gassed="none", gassed_slope=0.0, gassed_floor=1.0, flooding="outside",
        sources={
            "kp": "Beckner & Smith (1966), Trans. Inst. Chem. Eng. 44, T224: Kp about 300 "
                  "for a wall gap of about 0.05 D (from memory; not found again; " + SEEN
                  + "Kp = 200 +- 25 %)",
            "power_number": "approximate unbaffled plateau; close-clearance impellers are not "
                            "run turbulent (common practice, no source)",
            "gassed": "no published set: Pg = P assumed",
            "re_limits": "common practice, no source",
        }),
    ImpellerType(
        id="helical-ribbon",
        description="double helical ribbon, D/T = 0.95, pitch = D, W/D = 0.1 (unbaffled)",
        flow="close-clearance", blades=2, blade_width_ratio=0.1,
        power_number=0.35, power_number_range=(0.3, 0.5), kp=357.4,
        re_laminar=30.0, re_turbulent=1.0e4, flow_number=None,
        gassed="none", gassed_slope=0.0, gassed_floor=1.0, flooding="outside",
        sources={
            "kp": "Rieger, Novak & Havelkova (1988), Int. Chem. Eng. 28, 376: "
                  "Kp = 82.8 (h/D)(c/D)^-0.38 (s/D)^-0.35 (w/D)^0.2 nb^0.78 for the "
                  "standard geometry",
            "power_number": "approximate unbaffled plateau; close-clearance impellers are not "
                            "run turbulent (common practice, no source)",
            "gassed": "no published set: Pg = P assumed",
            "re_limits": "common practice, no source",
        }),
)}


def impeller_types() -> list[str]:
    """The catalogue's type ids, in catalogue order."""
    return list(CATALOGUE)


def impeller_type(type_id: str) -> ImpellerType:
    """The catalogue entry for a type id; an :class:`InputError` lists the known ids.

    Examples
    --------
    >>> impeller_type("disc-turbine").power_number
    5.0
    """
    try:
        return CATALOGUE[type_id]
    except (KeyError, TypeError):
        raise InputError(f"unknown impeller type {type_id!r}; known types: "
                         f"{', '.join(CATALOGUE)}", "impeller", type_id) from None
