"""Vessel and impeller geometry: liquid volume, heads, and geometric scaling.

All lengths are in m, areas in m2, volumes in m3, pressures in Pa (absolute). Heights are
measured upwards from the lowest point of the vessel bottom (the bottom of the head for dished
bottoms), so the liquid height ``H`` is the total depth of liquid and an impeller clearance
``C`` is the height of the impeller's mid-plane above that lowest point. This is the basis of
the ratios H/T and C/T used in every correlation of this package.

Bottom shapes and their standard head formulas:

* ``flat``: no head.
* ``elliptical``: 2:1 semi-ellipsoidal head, depth T/4, full volume pi T^3 / 24.
* ``torispherical``: dished head of crown radius ``f T`` and knuckle radius ``k T``; the default
  is the DIN 28011 form (f = 1, k = 0.1), depth 0.1938 T, volume 0.0990 T^3. The ASME
  flanged-and-dished form is f = 1, k = 0.06 (depth 0.1693 T, volume 0.0810 T^3).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, replace

import numpy as np

from scaleup.errors import InputError
from scaleup.units import P_ATM

BOTTOMS = ("flat", "elliptical", "torispherical")


@dataclass(frozen=True)
class Impeller:
    """One impeller on the shaft.

    Parameters
    ----------
    type : str
        Generic type id from :data:`scaleup.hydro.impellers.CATALOGUE` ("disc-turbine", ...).
    diameter : float
        Swept diameter D [m].
    clearance : float
        Height of the impeller mid-plane above the lowest point of the vessel [m].
    blades : int, optional
        Number of blades; the catalogue's standard when omitted.
    blade_width : float, optional
        Projected blade height W [m]; the catalogue's standard W/D times D when omitted.
    power_number : float, optional
        Measured turbulent power number [-]; overrides the catalogue value.
    """

    type: str
    diameter: float
    clearance: float
    blades: int | None = None
    blade_width: float | None = None
    power_number: float | None = None

    def __post_init__(self) -> None:
        from scaleup.hydro.impellers import impeller_type

        spec = impeller_type(self.type)  # raises InputError listing the known types
        _positive("impeller diameter", self.diameter, "m")
        if not (math.isfinite(self.clearance) and self.clearance > 0):
            raise InputError(f"{self.clearance:g} m: the impeller must sit above the vessel "
                             "bottom (clearance > 0 m)", "impeller clearance", self.clearance)
        if self.blades is not None and self.blades < 1:
            raise InputError(f"{self.blades}: an impeller needs at least one blade",
                             "impeller blades", self.blades)
        if self.blade_width is not None:
            _positive("blade width", self.blade_width, "m")
        if self.power_number is not None:
            _positive("measured power number", self.power_number, "")
        if self.blades is None:
            object.__setattr__(self, "blades", spec.blades)
        if self.blade_width is None:
            object.__setattr__(self, "blade_width", spec.blade_width_ratio * self.diameter)


@dataclass(frozen=True)
class Sparger:
    """The gas sparger.

    Parameters
    ----------
    kind : str
        "ring", "pipe", "porous" or "nozzle" (descriptive only).
    height : float
        Height of the gas outlet above the lowest point of the vessel [m].
    diameter : float, optional
        Ring diameter [m].
    """

    kind: str = "ring"
    height: float = 0.0
    diameter: float | None = None

    def __post_init__(self) -> None:
        if not (math.isfinite(self.height) and self.height >= 0):
            raise InputError(f"{self.height:g} m: the sparger height must be zero or more",
                             "sparger height", self.height)
        if self.diameter is not None:
            _positive("sparger diameter", self.diameter, "m")


@dataclass(frozen=True)
class Vessel:
    """A stirred vessel with its liquid fill.

    Parameters
    ----------
    tank_diameter : float
        Inside diameter T [m].
    liquid_height : float
        Ungassed liquid depth H from the lowest point of the bottom [m].
    impellers : tuple of Impeller
        Impellers on the shaft, any order (kept sorted bottom first).
    bottom : str
        "flat", "elliptical" (2:1) or "torispherical".
    crown_ratio, knuckle_ratio : float
        Torispherical head crown radius / T and knuckle radius / T [-].
    baffles : int
        Number of wall baffles (0 for an unbaffled vessel).
    baffle_width : float, optional
        Baffle width [m]; T/10 when omitted.
    head_pressure : float
        Absolute pressure of the head space [Pa].
    sparger : Sparger, optional
        The sparger; a ring at the vessel bottom when omitted.
    jacket_area, jacket_bottom, jacket_top : float
        Heat-transfer area of the jacket [m2] and the heights it spans [m].
    coil_area, coil_bottom, coil_top : float
        Outside area of internal coils [m2] and the heights they span [m].
    name : str
        A label.
    """

    tank_diameter: float
    liquid_height: float
    impellers: tuple[Impeller, ...] = ()
    bottom: str = "flat"
    crown_ratio: float = 1.0
    knuckle_ratio: float = 0.1
    baffles: int = 4
    baffle_width: float | None = None
    head_pressure: float = P_ATM
    sparger: Sparger = field(default_factory=Sparger)
    jacket_area: float = 0.0
    jacket_bottom: float = 0.0
    jacket_top: float = 0.0
    coil_area: float = 0.0
    coil_bottom: float = 0.0
    coil_top: float = 0.0
    name: str = ""

    def __post_init__(self) -> None:
        _positive("tank diameter", self.tank_diameter, "m")
        _positive("liquid height", self.liquid_height, "m")
        if self.bottom not in BOTTOMS:
            raise InputError(f"unknown bottom shape {self.bottom!r}; use one of "
                             f"{', '.join(BOTTOMS)}", "bottom", self.bottom)
        if self.bottom == "torispherical":
            if not 0 < self.knuckle_ratio < 0.5:
                raise InputError(f"{self.knuckle_ratio:g}: knuckle radius / T must lie "
                                 "between 0 and 0.5", "knuckle ratio", self.knuckle_ratio)
            if self.crown_ratio < 0.5:
                raise InputError(f"{self.crown_ratio:g}: crown radius / T must be at least "
                                 "0.5", "crown ratio", self.crown_ratio)
        if self.baffles < 0:
            raise InputError(f"{self.baffles}: the number of baffles cannot be negative",
                             "baffles", self.baffles)
        if self.baffle_width is None:
            object.__setattr__(self, "baffle_width", self.tank_diameter / 10.0)
        _positive("head-space pressure", self.head_pressure, "Pa")
        for area, lo, hi, what in ((self.jacket_area, self.jacket_bottom, self.jacket_top,
                                    "jacket"),
                                   (self.coil_area, self.coil_bottom, self.coil_top, "coil")):
            if area < 0:
                raise InputError(f"{area:g} m2: an area cannot be negative", f"{what} area",
                                 area)
            if area > 0 and not 0 <= lo < hi:
                raise InputError(f"{what} spans {lo:g} to {hi:g} m; the top must lie above "
                                 "the bottom, both at or above the vessel bottom",
                                 f"{what} height", (lo, hi))
        impellers = tuple(sorted(self.impellers, key=lambda i: i.clearance))
        object.__setattr__(self, "impellers", impellers)
        for imp in impellers:
            if imp.diameter >= self.tank_diameter:
                raise InputError(f"impeller diameter {imp.diameter:g} m is not smaller than "
                                 f"the tank diameter {self.tank_diameter:g} m (need D < T)",
                                 "impeller diameter", imp.diameter)
            if imp.clearance >= self.liquid_height:
                raise InputError(f"impeller at {imp.clearance:g} m is above the liquid "
                                 f"surface at {self.liquid_height:g} m", "impeller clearance",
                                 imp.clearance)
        if self.sparger.height >= self.liquid_height:
            raise InputError(f"sparger at {self.sparger.height:g} m is above the liquid "
                             f"surface at {self.liquid_height:g} m", "sparger height",
                             self.sparger.height)

    # -- shape ---------------------------------------------------------------------------
    @property
    def T(self) -> float:  # noqa: N802 - the trade's symbol
        """Tank diameter T [m]."""
        return self.tank_diameter

    @property
    def H(self) -> float:  # noqa: N802
        """Liquid height H [m]."""
        return self.liquid_height

    @property
    def cross_section(self) -> float:
        """Cross-sectional area of the cylinder, pi T^2 / 4 [m2]."""
        return math.pi * self.tank_diameter ** 2 / 4.0

    @property
    def head_depth(self) -> float:
        """Depth of the bottom head [m]."""
        return head_depth(self.tank_diameter, self.bottom, self.crown_ratio, self.knuckle_ratio)

    @property
    def volume(self) -> float:
        """Ungassed liquid volume [m3]."""
        return float(liquid_volume(self, self.liquid_height))

    @property
    def aspect_ratio(self) -> float:
        """H / T [-]."""
        return self.liquid_height / self.tank_diameter

    @property
    def spacings(self) -> tuple[float, ...]:
        """Vertical distances between neighbouring impellers, bottom first [m]."""
        c = [i.clearance for i in self.impellers]
        return tuple(b - a for a, b in zip(c, c[1:], strict=False))

    def wetted_jacket_area(self, liquid_height: float | None = None) -> float:
        """Jacket area below the liquid surface [m2], assuming the area spreads evenly over
        the height it spans."""
        return _wetted(self.jacket_area, self.jacket_bottom, self.jacket_top,
                       self.liquid_height if liquid_height is None else liquid_height)

    def wetted_coil_area(self, liquid_height: float | None = None) -> float:
        """Coil area below the liquid surface [m2], evenly spread over its span."""
        return _wetted(self.coil_area, self.coil_bottom, self.coil_top,
                       self.liquid_height if liquid_height is None else liquid_height)


def _wetted(area: float, bottom: float, top: float, level: float) -> float:
    if area <= 0:
        return 0.0
    fraction = min(max((level - bottom) / (top - bottom), 0.0), 1.0)
    return area * fraction


def _positive(field_name: str, value: float, unit: str) -> None:
    if value is None or not math.isfinite(value) or value <= 0:
        raise InputError(f"{value!r} {unit}".rstrip() + " must be a positive finite number",
                         field_name, value)


# -- heads -------------------------------------------------------------------------------
def _torispherical_parts(T: float, f: float, k: float) -> tuple[float, float, float, float,
                                                                float, float]:
    """Crown radius R, knuckle radius r, knuckle centre (x_c, y_c), junction height a1 and
    head depth for a torispherical head of diameter T (bottom at height 0)."""
    R, r = f * T, k * T
    x_c = T / 2.0 - r
    y_c = R - math.sqrt((R - r) ** 2 - x_c ** 2)  # the crown and knuckle circles touch
    a1 = R * (1.0 - (R - y_c) / (R - r))  # height of the crown-knuckle tangent point
    return R, r, x_c, y_c, a1, y_c


def head_depth(T: float, bottom: str = "flat", crown_ratio: float = 1.0,
               knuckle_ratio: float = 0.1) -> float:
    """Depth of a bottom head [m].

    Parameters
    ----------
    T : float
        Tank diameter [m].
    bottom : str
        "flat", "elliptical" (2:1) or "torispherical".
    crown_ratio, knuckle_ratio : float
        Crown and knuckle radius of a torispherical head, as fractions of T [-].

    Returns
    -------
    float
        Head depth [m].

    Examples
    --------
    >>> head_depth(2.0, "elliptical")
    0.5
    >>> round(head_depth(1.0, "torispherical"), 4)  # DIN 28011 head: 0.1938 T
    0.1938
    """
    if bottom == "flat":
        return 0.0
    if bottom == "elliptical":
        return T / 4.0
    return _torispherical_parts(T, crown_ratio, knuckle_ratio)[5]


def head_volume(T: float, z, bottom: str = "flat", crown_ratio: float = 1.0,
                knuckle_ratio: float = 0.1):
    """Liquid volume inside a bottom head filled to height z [m3].

    .. math::
        V_{ell}(z) = \\frac{\\pi T^2}{4}\\left(\\frac{z^2}{b} - \\frac{z^3}{3 b^2}\\right),
        \\quad b = T/4

    For the torispherical head the crown (sphere of radius R) and the knuckle (torus of tube
    radius r) are integrated exactly. Above the head the volume stays at the full head volume.

    Parameters
    ----------
    T : float
        Tank diameter [m].
    z : float or array
        Liquid height from the lowest point [m].
    bottom : str
        "flat", "elliptical" or "torispherical".
    crown_ratio, knuckle_ratio : float
        Torispherical crown and knuckle radius over T [-].

    Returns
    -------
    float or array
        Volume of liquid inside the head [m3].

    Notes
    -----
    The full 2:1 elliptical head holds pi T^3 / 24 = 0.1309 T^3; the DIN 28011
    torispherical head (f = 1, k = 0.1) holds 0.0990 T^3 and the ASME flanged-and-dished head
    (f = 1, k = 0.06) 0.0810 T^3 (standard head formulas).

    Examples
    --------
    >>> round(float(head_volume(1.0, 1.0, "elliptical")), 5)  # pi/24
    0.1309
    >>> round(float(head_volume(1.0, 1.0, "torispherical", 1.0, 0.06)), 4)
    0.081
    """
    z = np.asarray(z, dtype=float)
    if bottom == "flat":
        return np.zeros_like(z) if z.ndim else 0.0
    depth = head_depth(T, bottom, crown_ratio, knuckle_ratio)
    zz = np.clip(z, 0.0, depth)
    if bottom == "elliptical":
        a2, b = (T / 2.0) ** 2, T / 4.0
        out = math.pi * a2 * (zz ** 2 / b - zz ** 3 / (3.0 * b ** 2))
    else:
        R, r, x_c, y_c, a1, _ = _torispherical_parts(T, crown_ratio, knuckle_ratio)

        def crown(h):
            return math.pi * (R * h ** 2 - h ** 3 / 3.0)

        def knuckle_primitive(u):
            # integral of (x_c + sqrt(r^2 - u^2))^2 du, u = y_c - height
            root = np.sqrt(np.maximum(r ** 2 - u ** 2, 0.0))
            return ((x_c ** 2 + r ** 2) * u - u ** 3 / 3.0
                    + x_c * (u * root + r ** 2 * np.arcsin(np.clip(u / r, -1.0, 1.0))))

        in_crown = zz <= a1
        knuckle = math.pi * (knuckle_primitive(y_c - a1) - knuckle_primitive(y_c - zz))
        out = np.where(in_crown, crown(zz), crown(a1) + knuckle)
    return out if np.ndim(out) else float(out)


def liquid_volume(vessel: Vessel, liquid_height=None):
    """Liquid volume of a vessel filled to a height [m3].

    Parameters
    ----------
    vessel : Vessel
        The vessel.
    liquid_height : float or array, optional
        Liquid depth from the lowest point [m]; the vessel's own when omitted.

    Returns
    -------
    float or array
        Liquid volume [m3].

    Examples
    --------
    >>> v = Vessel(tank_diameter=1.0, liquid_height=1.0)
    >>> round(float(liquid_volume(v)), 5)  # pi/4
    0.7854
    """
    h = np.asarray(vessel.liquid_height if liquid_height is None else liquid_height, float)
    depth = vessel.head_depth
    out = (head_volume(vessel.tank_diameter, h, vessel.bottom, vessel.crown_ratio,
                       vessel.knuckle_ratio)
           + vessel.cross_section * np.maximum(h - depth, 0.0))
    return out if np.ndim(out) else float(out)


def liquid_height_for_volume(vessel: Vessel, volume):
    """Liquid depth that holds a given volume in this vessel's shell [m].

    Parameters
    ----------
    vessel : Vessel
        The vessel (its diameter and bottom are used; its own fill is ignored).
    volume : float or array
        Liquid volume [m3].

    Returns
    -------
    float or array
        Liquid height from the lowest point [m].

    Examples
    --------
    >>> v = Vessel(tank_diameter=1.0, liquid_height=1.0, bottom="elliptical")
    >>> round(float(liquid_height_for_volume(v, v.volume)), 9)
    1.0
    """
    vol = np.asarray(volume, dtype=float)
    if np.any(~np.isfinite(vol)) or np.any(vol <= 0):
        raise InputError("a liquid volume must be a positive finite number", "volume", volume)
    T = vessel.tank_diameter
    depth = vessel.head_depth
    full_head = head_volume(T, depth, vessel.bottom, vessel.crown_ratio, vessel.knuckle_ratio)
    above = depth + (vol - full_head) / vessel.cross_section
    if depth == 0.0:
        return above if np.ndim(above) else float(above)
    # inside the head the volume is monotonic in height: bisection, vectorised
    lo, hi = np.zeros_like(vol), np.full_like(vol, depth)
    for _ in range(60):
        mid = 0.5 * (lo + hi)
        low_side = head_volume(T, mid, vessel.bottom, vessel.crown_ratio,
                               vessel.knuckle_ratio) < vol
        lo, hi = np.where(low_side, mid, lo), np.where(low_side, hi, mid)
    out = np.where(vol >= full_head, above, 0.5 * (lo + hi))
    return out if np.ndim(out) else float(out)


# -- scaling -----------------------------------------------------------------------------
def scale_by_factor(vessel: Vessel, factor: float) -> Vessel:
    """The geometrically similar vessel with every length multiplied by ``factor``.

    Parameters
    ----------
    vessel : Vessel
        The vessel to scale.
    factor : float
        Linear scale factor [-].

    Returns
    -------
    Vessel
        Lengths times ``factor``, areas times ``factor``^2, pressures unchanged.

    Examples
    --------
    >>> v = Vessel(1.0, 1.0)
    >>> round(scale_by_factor(v, 2.0).volume / v.volume, 6)
    8.0
    """
    _positive("scale factor", factor, "")
    s = factor
    impellers = tuple(replace(i, diameter=i.diameter * s, clearance=i.clearance * s,
                              blade_width=i.blade_width * s) for i in vessel.impellers)
    sparger = replace(vessel.sparger, height=vessel.sparger.height * s,
                      diameter=None if vessel.sparger.diameter is None
                      else vessel.sparger.diameter * s)
    return replace(vessel, tank_diameter=vessel.tank_diameter * s,
                   liquid_height=vessel.liquid_height * s, impellers=impellers,
                   baffle_width=vessel.baffle_width * s, sparger=sparger,
                   jacket_area=vessel.jacket_area * s ** 2,
                   jacket_bottom=vessel.jacket_bottom * s, jacket_top=vessel.jacket_top * s,
                   coil_area=vessel.coil_area * s ** 2, coil_bottom=vessel.coil_bottom * s,
                   coil_top=vessel.coil_top * s)


def scale_to_volume(vessel: Vessel, volume_m3: float, *, aspect_ratio: float | None = None,
                    impeller_ratio: float | None = None) -> Vessel:
    """Scale a vessel to a target liquid volume, keeping its ratios unless told otherwise.

    With no options every ratio (H/T, D/T, C/T, W/D, spacing/D, sparger and coil heights)
    is kept: the linear factor is (V_target / V)^(1/3). A non-similar target is given
    explicitly: ``aspect_ratio`` sets H/T and ``impeller_ratio`` sets D/T of every impeller.
    Then the bottom impeller keeps its C/T, spacings keep their ratio to D, the sparger keeps
    its height over T, and jacket and coils keep their span as a fraction of H.

    Parameters
    ----------
    vessel : Vessel
        The vessel to scale.
    volume_m3 : float
        Target liquid volume [m3].
    aspect_ratio : float, optional
        Target H/T [-].
    impeller_ratio : float, optional
        Target D/T [-] for all impellers.

    Returns
    -------
    Vessel
        The scaled vessel.

    Raises
    ------
    InputError
        For a non-positive volume, an H/T that leaves the liquid inside the head, or a
        layout whose top impeller would end up above the liquid.

    Examples
    --------
    >>> from scaleup.hydro.geometry import Impeller, Vessel
    >>> pilot = Vessel(0.3, 0.3, (Impeller("disc-turbine", 0.1, 0.1),))
    >>> big = scale_to_volume(pilot, 20.0)
    >>> round(big.volume, 6), round(big.impellers[0].diameter / big.tank_diameter, 6)
    (20.0, 0.333333)
    """
    _positive("target volume", volume_m3, "m3")
    if aspect_ratio is None and impeller_ratio is None:
        return scale_by_factor(vessel, (volume_m3 / vessel.volume) ** (1.0 / 3.0))
    h_t = vessel.aspect_ratio if aspect_ratio is None else aspect_ratio
    _positive("H/T", h_t, "")
    if impeller_ratio is not None and not 0 < impeller_ratio < 1:
        raise InputError(f"{impeller_ratio:g}: D/T must lie between 0 and 1", "D/T",
                         impeller_ratio)
    depth_ratio = head_depth(1.0, vessel.bottom, vessel.crown_ratio, vessel.knuckle_ratio)
    if h_t <= depth_ratio:
        raise InputError(f"H/T = {h_t:g} leaves the liquid inside the bottom head "
                         f"(head depth {depth_ratio:.3g} T)", "H/T", h_t)
    head_coeff = head_volume(1.0, depth_ratio, vessel.bottom, vessel.crown_ratio,
                             vessel.knuckle_ratio)
    T = (volume_m3 / (head_coeff + math.pi / 4.0 * (h_t - depth_ratio))) ** (1.0 / 3.0)
    H = h_t * T
    s_t = T / vessel.tank_diameter
    s_h = H / vessel.liquid_height
    impellers = []
    old = vessel.impellers
    for n, imp in enumerate(old):
        d_t = imp.diameter / vessel.tank_diameter if impeller_ratio is None else impeller_ratio
        D = d_t * T
        if n == 0:
            clearance = imp.clearance / vessel.tank_diameter * T
        else:
            gap = (imp.clearance - old[n - 1].clearance) / old[n - 1].diameter
            clearance = impellers[-1].clearance + gap * impellers[-1].diameter
        impellers.append(replace(imp, diameter=D, clearance=clearance,
                                 blade_width=imp.blade_width / imp.diameter * D))
    if impellers and impellers[-1].clearance >= H:
        raise InputError(f"with H/T = {h_t:g} the top impeller would sit at "
                         f"{impellers[-1].clearance:.3g} m, above the liquid at {H:.3g} m; "
                         "give fewer impellers or a taller fill", "H/T", h_t)
    sp = vessel.sparger
    sparger = replace(sp, height=sp.height * s_t,
                      diameter=None if sp.diameter is None else sp.diameter * s_t)
    return replace(vessel, tank_diameter=T, liquid_height=H, impellers=tuple(impellers),
                   baffle_width=vessel.baffle_width * s_t, sparger=sparger,
                   jacket_area=vessel.jacket_area * s_t * s_h,
                   jacket_bottom=vessel.jacket_bottom * s_h, jacket_top=vessel.jacket_top * s_h,
                   coil_area=vessel.coil_area * s_t * s_h, coil_bottom=vessel.coil_bottom * s_h,
                   coil_top=vessel.coil_top * s_h)


def standard_vessel(tank_diameter: float, *, impeller_type: str = "disc-turbine",
                    count: int = 1, impeller_ratio: float = 1.0 / 3.0,
                    clearance_ratio: float = 1.0 / 3.0, spacing_ratio: float = 1.0,
                    aspect_ratio: float | None = None, bottom: str = "flat",
                    head_pressure: float = P_ATM) -> Vessel:
    """A vessel of the common standard layout (D = T/3, C = T/3, spacing = T, four baffles
    of T/10; common practice, no source), for quick estimates.

    Parameters
    ----------
    tank_diameter : float
        T [m].
    impeller_type : str
        Catalogue id used for every impeller.
    count : int
        Number of impellers.
    impeller_ratio, clearance_ratio, spacing_ratio : float
        D/T, C/T of the bottom impeller, spacing/T [-].
    aspect_ratio : float, optional
        H/T [-]; by default 1 for one impeller and ``count`` for several.
    bottom : str
        Bottom shape.
    head_pressure : float
        Head-space pressure [Pa].

    Returns
    -------
    Vessel
        The vessel.

    Examples
    --------
    >>> v = standard_vessel(0.3)
    >>> round(v.impellers[0].diameter, 3), round(v.volume * 1000, 2)
    (0.1, 21.21)
    """
    T = tank_diameter
    h_t = (1.0 if count == 1 else float(count)) if aspect_ratio is None else aspect_ratio
    impellers = tuple(Impeller(impeller_type, impeller_ratio * T,
                               (clearance_ratio + n * spacing_ratio) * T) for n in range(count))
    return Vessel(T, h_t * T, impellers, bottom=bottom, head_pressure=head_pressure)
