"""Correlation forms that can be fitted, and the per-run data they are fitted to.

Every form here is linear in its parameters after taking logarithms:

* dimensional kLa:  ``ln kLa = ln C + a ln(P/V) + b ln us [+ c ln mu] [+ ln f_k]``;
* dimensionless kLa (Zlokarnik type): ``ln kLa* = ln C + a ln (P/V)* + b ln us* [+ ln f_k]``
  with ``kLa* = kLa (nu/g^2)^(1/3)``, ``(P/V)* = (P/V) / (rho (nu g^4)^(1/3))`` and
  ``us* = us / (nu g)^(1/3)``;
* Sherwood: ``ln Sh = ln A + b ln Re + c ln Sc``, or ``ln(Sh - 2) = ...`` for
  ``Sh = 2 + A Re^b Sc^c``.

So a form is a response transform ``z = g(y, x)``, a design matrix ``X(x)`` and its inverse
``y = g^-1(z, x)``. A parameter can be fixed (e.g. the Schmidt exponent at 1/3): its column
then moves into a known offset. ``f_k`` is a medium factor per coalescence class, relative to
the first class (the reference).

Variable names carry their SI unit, like the store's columns.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field

import numpy as np

from scaleup.errors import InputError, OutOfRange
from scaleup.units import G

KLA_POWER_LAW = "kla-power-law"
KLA_DIMENSIONLESS = "kla-dimensionless"
SHERWOOD = "sherwood"
FORMS = (KLA_POWER_LAW, KLA_DIMENSIONLESS, SHERWOOD)
POWER_BASES = ("gassed", "ungassed")

GASSED_PV = "gassed_power_per_volume_w_m3"
UNGASSED_PV = "ungassed_power_per_volume_w_m3"
GAS_VELOCITY = "superficial_velocity_m_s"
VISCOSITY = "viscosity_pa_s"
DENSITY = "density_kg_m3"
COALESCENCE = "coalescence"
VESSEL_VOLUME = "vessel_volume_m3"
REYNOLDS = "reynolds"
SCHMIDT = "schmidt"

# Physically possible bounds per variable [SI] (not validity ranges of any correlation):
# a value outside is a typing or unit mistake, refused with the run named.
_BOUNDS = {
    "kla_per_s": (0.0, 10.0, "1/s"),
    "kla_stderr_per_s": (0.0, 10.0, "1/s"),
    GASSED_PV: (0.0, 1e5, "W/m3"),
    UNGASSED_PV: (0.0, 1e5, "W/m3"),
    GAS_VELOCITY: (0.0, 2.0, "m/s"),
    VISCOSITY: (1e-4, 1e3, "Pa s"),
    DENSITY: (400.0, 3000.0, "kg/m3"),
    VESSEL_VOLUME: (1e-6, 1e4, "m3"),
    "sherwood": (0.0, 1e9, "-"),
    "sherwood_stderr": (0.0, 1e9, "-"),
    REYNOLDS: (0.0, 1e9, "-"),
    SCHMIDT: (0.0, 1e9, "-"),
}


@dataclass(frozen=True)
class Observations:
    """Per-run data a correlation is fitted to (all arrays of one length ``n``).

    Attributes
    ----------
    response : numpy.ndarray
        kLa [1/s] or Sherwood number [-] per run.
    response_stderr : numpy.ndarray or None
        Stated standard error of each response, same unit (None: not stated).
    variables : dict of str to numpy.ndarray
        Continuous explanatory variables [SI], keyed by name with unit.
    categories : dict of str to numpy.ndarray
        Categorical variables (``coalescence``) as string arrays.
    vessel : numpy.ndarray of str or None
        Vessel label per run, for cluster bootstrap and leave-one-vessel-out.
    run_id : numpy.ndarray or None
        Run identifiers (stored with a fit).
    response_name : str
        ``"kla_per_s"`` or ``"sherwood"``.
    """

    response: np.ndarray
    response_stderr: np.ndarray | None
    variables: dict[str, np.ndarray]
    categories: dict[str, np.ndarray] = field(default_factory=dict)
    vessel: np.ndarray | None = None
    run_id: np.ndarray | None = None
    response_name: str = "kla_per_s"

    @property
    def n(self) -> int:
        return int(self.response.size)

    def points(self) -> dict[str, np.ndarray]:
        """Continuous and categorical variables in one mapping (what a form reads)."""
        return {**self.variables, **self.categories}

    def subset(self, mask: np.ndarray) -> Observations:
        """The runs where ``mask`` is true (a boolean or index array)."""
        def pick(a):
            return None if a is None else a[mask]
        return Observations(self.response[mask], pick(self.response_stderr),
                            {k: v[mask] for k, v in self.variables.items()},
                            {k: v[mask] for k, v in self.categories.items()},
                            pick(self.vessel), pick(self.run_id), self.response_name)


def _array(name: str, values, n: int | None, run_id) -> np.ndarray:
    a = np.atleast_1d(np.asarray(values, dtype=float))
    if a.ndim != 1:
        raise InputError(f"expected a one-dimensional array, got shape {a.shape}", name)
    if n is not None and a.size != n:
        raise InputError(f"has {a.size} values but there are {n} runs", name)
    low, high, unit = _BOUNDS[name]
    positive = name not in ("kla_stderr_per_s", "sherwood_stderr")
    bad = ~np.isfinite(a) | (a > high) | ((a <= low) if positive else (a < low))
    if bad.any():
        i = int(np.flatnonzero(bad)[0])
        who = f"run {run_id[i]}" if run_id is not None else f"run #{i}"
        relation = "greater than" if positive else "at least"
        raise OutOfRange(f"{who}: {a[i]:g} {unit} is outside the accepted range "
                         f"({relation} {low:g}, at most {high:g} {unit}); "
                         f"{int(bad.sum())} run(s) affected", name, float(a[i]))
    return a


def _labels(name: str, values, n: int) -> np.ndarray:
    a = np.atleast_1d(np.asarray(values, dtype=str))
    if a.size != n:
        raise InputError(f"has {a.size} values but there are {n} runs", name)
    return a


def kla_observations(kla_per_s: Sequence[float], *,
                     gassed_power_per_volume_w_m3: Sequence[float] | None = None,
                     ungassed_power_per_volume_w_m3: Sequence[float] | None = None,
                     superficial_velocity_m_s: Sequence[float],
                     kla_stderr_per_s: Sequence[float] | None = None,
                     viscosity_pa_s: Sequence[float] | None = None,
                     density_kg_m3: Sequence[float] | None = None,
                     coalescence: Sequence[str] | None = None,
                     vessel: Sequence[str] | None = None,
                     vessel_volume_m3: Sequence[float] | None = None,
                     run_id: Sequence | None = None) -> Observations:
    """Check and bundle per-run kLa data for fitting.

    Parameters
    ----------
    kla_per_s : array_like
        Measured kLa of each run [1/s].
    gassed_power_per_volume_w_m3, ungassed_power_per_volume_w_m3 : array_like, optional
        Gassed (Pg/V) or ungassed (P/V) power per liquid volume [W/m3]; at least one.
    superficial_velocity_m_s : array_like
        Superficial gas velocity [m/s].
    kla_stderr_per_s : array_like, optional
        Standard error of each kLa [1/s] (for weighted fits).
    viscosity_pa_s : array_like, optional
        Liquid dynamic viscosity [Pa s].
    density_kg_m3 : array_like, optional
        Liquid density [kg/m3] (the dimensionless form needs it).
    coalescence : array_like of str, optional
        Coalescence class of the medium per run (``coalescing``, ``non-coalescing``).
    vessel : array_like of str, optional
        Vessel label per run.
    vessel_volume_m3 : array_like, optional
        Liquid volume of the run's vessel [m3].
    run_id : array_like, optional
        Run identifiers.

    Returns
    -------
    Observations

    Examples
    --------
    >>> obs = kla_observations([0.02, 0.05], gassed_power_per_volume_w_m3=[500, 2000],
    ...                        superficial_velocity_m_s=[0.005, 0.01])
    >>> obs.n
    2
    """
    ids = None if run_id is None else np.asarray(run_id)
    y = _array("kla_per_s", kla_per_s, None, ids)
    n = y.size
    if ids is not None and ids.size != n:
        raise InputError(f"has {ids.size} values but there are {n} runs", "run_id")
    if gassed_power_per_volume_w_m3 is None and ungassed_power_per_volume_w_m3 is None:
        raise InputError("give the gassed or the ungassed power per volume of each run",
                         "power_per_volume")
    variables = {GAS_VELOCITY: _array(GAS_VELOCITY, superficial_velocity_m_s, n, ids)}
    optional = {GASSED_PV: gassed_power_per_volume_w_m3,
                UNGASSED_PV: ungassed_power_per_volume_w_m3,
                VISCOSITY: viscosity_pa_s, DENSITY: density_kg_m3,
                VESSEL_VOLUME: vessel_volume_m3}
    for name, values in optional.items():
        if values is not None:
            variables[name] = _array(name, values, n, ids)
    stderr = (None if kla_stderr_per_s is None
              else _array("kla_stderr_per_s", kla_stderr_per_s, n, ids))
    cats = {} if coalescence is None else {COALESCENCE: _labels(COALESCENCE, coalescence, n)}
    vessels = None if vessel is None else _labels("vessel", vessel, n)
    return Observations(y, stderr, variables, cats, vessels, ids, "kla_per_s")


def sherwood_observations(sherwood: Sequence[float], *, reynolds: Sequence[float],
                          schmidt: Sequence[float],
                          sherwood_stderr: Sequence[float] | None = None,
                          vessel: Sequence[str] | None = None,
                          vessel_volume_m3: Sequence[float] | None = None,
                          run_id: Sequence | None = None) -> Observations:
    """Check and bundle Sherwood, Reynolds and Schmidt numbers of flux measurements.

    Parameters
    ----------
    sherwood : array_like
        Sherwood number ``kL d / D`` of each measurement [-].
    reynolds : array_like
        Reynolds number [-].
    schmidt : array_like
        Schmidt number ``nu / D`` [-].
    sherwood_stderr : array_like, optional
        Standard error of each Sherwood number [-].
    vessel : array_like of str, optional
        Vessel or apparatus label per measurement.
    vessel_volume_m3 : array_like, optional
        Liquid volume of the vessel [m3].
    run_id : array_like, optional
        Measurement identifiers.

    Returns
    -------
    Observations
    """
    ids = None if run_id is None else np.asarray(run_id)
    y = _array("sherwood", sherwood, None, ids)
    n = y.size
    variables = {REYNOLDS: _array(REYNOLDS, reynolds, n, ids),
                 SCHMIDT: _array(SCHMIDT, schmidt, n, ids)}
    if vessel_volume_m3 is not None:
        variables[VESSEL_VOLUME] = _array(VESSEL_VOLUME, vessel_volume_m3, n, ids)
    stderr = (None if sherwood_stderr is None
              else _array("sherwood_stderr", sherwood_stderr, n, ids))
    vessels = None if vessel is None else _labels("vessel", vessel, n)
    return Observations(y, stderr, variables, {}, vessels, ids, "sherwood")


@dataclass(frozen=True)
class ModelForm:
    """A fittable correlation form (linear in its parameters in log space).

    Attributes
    ----------
    kind : str
        One of :data:`FORMS`.
    power_basis : str
        ``"gassed"`` (Pg/V) or ``"ungassed"`` (P/V); kLa forms only.
    viscosity_term : bool
        Add ``mu^c`` (dimensional kLa form only).
    medium_classes : tuple of str
        Coalescence classes with a medium factor; the first is the reference (factor 1).
        Empty: no medium factor.
    plus_two : bool
        Sherwood form ``Sh = 2 + A Re^b Sc^c``.
    fixed : tuple of (str, float)
        Parameters held at a value instead of fitted.
    """

    kind: str
    power_basis: str = "gassed"
    viscosity_term: bool = False
    medium_classes: tuple[str, ...] = ()
    plus_two: bool = False
    fixed: tuple[tuple[str, float], ...] = ()

    def __post_init__(self):
        if self.kind not in FORMS:
            raise InputError(f"unknown form {self.kind!r}; choose one of {', '.join(FORMS)}",
                             "form", self.kind)
        if self.power_basis not in POWER_BASES:
            raise InputError(f"unknown power basis {self.power_basis!r}; choose gassed or "
                             "ungassed", "power_basis", self.power_basis)
        names = self.all_parameter_names
        for name, _ in self.fixed:
            if name not in names:
                raise InputError(f"{name!r} is not a parameter of this form; its parameters "
                                 f"are {', '.join(names)}", "fixed", name)
        if len(self.fixed) >= len(names):
            raise InputError("every parameter is fixed; nothing is left to fit", "fixed")

    @property
    def power_variable(self) -> str:
        return GASSED_PV if self.power_basis == "gassed" else UNGASSED_PV

    @property
    def all_parameter_names(self) -> tuple[str, ...]:
        if self.kind == SHERWOOD:
            return ("ln_A", "b_reynolds", "c_schmidt")
        names = ["ln_C", "a_power", "b_gas_velocity"]
        if self.viscosity_term and self.kind == KLA_POWER_LAW:
            names.append("c_viscosity")
        names += [f"ln_factor_{c}" for c in self.medium_classes[1:]]
        return tuple(names)

    @property
    def parameter_names(self) -> tuple[str, ...]:
        """Names of the fitted (free) parameters, in the order of the parameter vector."""
        fixed = dict(self.fixed)
        return tuple(n for n in self.all_parameter_names if n not in fixed)

    @property
    def continuous_variables(self) -> tuple[str, ...]:
        """The continuous variables a point must give (SI names)."""
        if self.kind == SHERWOOD:
            return (REYNOLDS, SCHMIDT)
        names = [self.power_variable, GAS_VELOCITY]
        if self.kind == KLA_DIMENSIONLESS:
            names += [VISCOSITY, DENSITY]
        elif self.viscosity_term:
            names.append(VISCOSITY)
        return tuple(names)

    @property
    def required_variables(self) -> tuple[str, ...]:
        return self.continuous_variables + ((COALESCENCE,) if self.medium_classes else ())

    @property
    def response_name(self) -> str:
        return "sherwood" if self.kind == SHERWOOD else "kla_per_s"

    def equation(self) -> str:
        """The form written out for people."""
        if self.kind == SHERWOOD:
            return ("Sh = 2 + A Re^b Sc^c" if self.plus_two else "Sh = A Re^b Sc^c")
        power = "Pg/V" if self.power_basis == "gassed" else "P/V"
        factor = " f_medium" if self.medium_classes else ""
        if self.kind == KLA_DIMENSIONLESS:
            return (f"kLa (nu/g^2)^(1/3) = C [({power}) / (rho (nu g^4)^(1/3))]^a "
                    f"[us / (nu g)^(1/3)]^b{factor}")
        mu = " mu^c" if self.viscosity_term else ""
        return f"kLa = C ({power})^a us^b{mu}{factor}"

    def _get(self, points: Mapping[str, np.ndarray], name: str) -> np.ndarray:
        if name not in points:
            raise InputError(f"this form ({self.equation()}) needs {name}", name)
        return np.atleast_1d(np.asarray(points[name], dtype=float))

    def _kinematic(self, points) -> np.ndarray:
        return self._get(points, VISCOSITY) / self._get(points, DENSITY)

    def full_design(self, points: Mapping[str, np.ndarray]) -> np.ndarray:
        """Design matrix over all parameters, fixed ones included, shape (m, p_all)."""
        if self.kind == SHERWOOD:
            re, sc = self._get(points, REYNOLDS), self._get(points, SCHMIDT)
            re, sc = np.broadcast_arrays(re, sc)
            return np.column_stack([np.ones(re.size), np.log(re), np.log(sc)])
        pv = self._get(points, self.power_variable)
        us = self._get(points, GAS_VELOCITY)
        if self.kind == KLA_DIMENSIONLESS:
            nu = self._kinematic(points)
            rho = self._get(points, DENSITY)
            pv = pv / (rho * np.cbrt(nu * G**4))
            us = us / np.cbrt(nu * G)
        pv, us = np.broadcast_arrays(pv, us)
        columns = [np.ones(pv.size), np.log(pv), np.log(us)]
        if self.viscosity_term and self.kind == KLA_POWER_LAW:
            columns.append(np.broadcast_to(np.log(self._get(points, VISCOSITY)), pv.shape))
        if len(self.medium_classes) > 1:
            if COALESCENCE not in points:
                raise InputError("this fit has a medium factor: give the coalescence class "
                                 f"({', '.join(self.medium_classes)})", COALESCENCE)
            labels = np.broadcast_to(np.asarray(points[COALESCENCE], dtype=str), pv.shape)
            unknown = sorted(set(labels.tolist()) - set(self.medium_classes))
            if unknown:
                raise InputError(f"class {unknown[0]!r} was not in the fitted data; fitted "
                                 f"classes: {', '.join(self.medium_classes)}", COALESCENCE,
                                 unknown[0])
            columns += [(labels == c).astype(float) for c in self.medium_classes[1:]]
        return np.column_stack(columns)

    def design(self, points: Mapping[str, np.ndarray]) -> tuple[np.ndarray, np.ndarray]:
        """Design rows of the free parameters and the offset from fixed ones.

        The linear predictor in transformed space is ``z = X @ params + offset``.

        Returns
        -------
        X : numpy.ndarray, shape (m, p)
        offset : numpy.ndarray, shape (m,)
        """
        full = self.full_design(points)
        names = self.all_parameter_names
        fixed = dict(self.fixed)
        free = [i for i, n in enumerate(names) if n not in fixed]
        offset = np.zeros(full.shape[0])
        for i, n in enumerate(names):
            if n in fixed:
                offset = offset + full[:, i] * fixed[n]
        return full[:, free], offset

    def transform(self, response: np.ndarray, points: Mapping[str, np.ndarray]) -> np.ndarray:
        """Measured response to the space the form is linear in (``z``)."""
        y = np.asarray(response, dtype=float)
        if self.kind == SHERWOOD:
            if self.plus_two:
                if np.any(y <= 2.0):
                    raise OutOfRange("Sh = 2 + A Re^b Sc^c needs every Sherwood number above "
                                     f"2; the smallest is {float(y.min()):.4g}", "sherwood")
                return np.log(y - 2.0)
            return np.log(y)
        z = np.log(y)
        if self.kind == KLA_DIMENSIONLESS:
            z = z + np.log(self._kinematic(points) / G**2) / 3.0
        return z

    def scale(self, points: Mapping[str, np.ndarray]) -> np.ndarray:
        """Positive factor ``s`` with response = shift + s exp(z) (1 except dimensionless)."""
        if self.kind == KLA_DIMENSIONLESS:
            return np.cbrt(G**2 / self._kinematic(points))
        return np.ones(1)

    @property
    def shift(self) -> float:
        return 2.0 if (self.kind == SHERWOOD and self.plus_two) else 0.0

    def untransform(self, z: np.ndarray, points: Mapping[str, np.ndarray]) -> np.ndarray:
        """``z`` back to the response (kLa [1/s] or Sh [-]); increasing in ``z``."""
        return self.shift + self.scale(points) * np.exp(z)

    def with_classes(self, labels: np.ndarray) -> ModelForm:
        """This form with its medium classes taken from the data (reference first)."""
        seen = sorted(set(np.asarray(labels, dtype=str).tolist()))
        if "coalescing" in seen:
            seen.remove("coalescing")
            seen.insert(0, "coalescing")
        return ModelForm(self.kind, self.power_basis, self.viscosity_term, tuple(seen),
                         self.plus_two, self.fixed)

    def to_dict(self) -> dict:
        return {"kind": self.kind, "power_basis": self.power_basis,
                "viscosity_term": self.viscosity_term,
                "medium_classes": list(self.medium_classes), "plus_two": self.plus_two,
                "fixed": {k: v for k, v in self.fixed}}

    @classmethod
    def from_dict(cls, data: Mapping) -> ModelForm:
        return cls(data["kind"], data.get("power_basis", "gassed"),
                   bool(data.get("viscosity_term", False)),
                   tuple(data.get("medium_classes", ())), bool(data.get("plus_two", False)),
                   tuple((k, float(v)) for k, v in data.get("fixed", {}).items()))
