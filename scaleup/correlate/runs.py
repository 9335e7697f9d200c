"""Per-run records (plain dicts with SI keys, as the service layer gives them) to arrays.

Pure: the rows come from the campaign's derived run table (runs joined with vessel,
medium and the operating point computed by :mod:`scaleup.hydro`) or its flux table, and
go out as :class:`~scaleup.correlate.models.Observations`. Rows that cannot be used are
skipped and listed with the reason, never silently dropped.
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping, Sequence

import numpy as np

from scaleup.correlate.models import Observations, kla_observations, sherwood_observations
from scaleup.errors import InputError


def _positive(row: Mapping, key: str) -> bool:
    value = row.get(key)
    return value is not None and np.isfinite(value) and value > 0


_KLA_KEYS = ("id", "kla_per_s", "kla_stderr_per_s", "gassed_power_per_volume_w_m3",
             "power_per_volume_w_m3", "superficial_gas_velocity_m_s", "viscosity_pa_s",
             "density_kg_m3", "coalescence", "vessel", "liquid_volume_m3")
_KLA_NEEDED = ("kla_per_s", "gassed_power_per_volume_w_m3", "superficial_gas_velocity_m_s")


def kla_observations_from_runs(rows: Iterable[Mapping]) -> tuple[Observations, list[str]]:
    """Runs with a measured kLa as fitting data, and why the others were left out.

    Parameters
    ----------
    rows : iterable of mapping
        Run records with ``id``, ``kla_per_s`` [1/s], ``kla_stderr_per_s`` [1/s],
        ``gassed_power_per_volume_w_m3`` and ``power_per_volume_w_m3`` [W/m3],
        ``superficial_gas_velocity_m_s`` [m/s], ``viscosity_pa_s`` [Pa s],
        ``density_kg_m3`` [kg/m3], ``coalescence``, ``vessel`` and ``liquid_volume_m3``
        [m3] (missing optional keys are allowed).

    Returns
    -------
    Observations
        The usable runs.
    list of str
        One line per run left out, naming it and the reason.
    """
    rows = list(rows)
    return kla_observations_from_columns({k: [row.get(k) for row in rows] for k in _KLA_KEYS})


def kla_observations_from_columns(columns: Mapping[str, Sequence]
                                  ) -> tuple[Observations, list[str]]:
    """:func:`kla_observations_from_runs` for runs given as columns (one sequence per key,
    equally long; a missing key is a column of None), checked a column at a time.

    Parameters
    ----------
    columns : mapping of str to sequence
        The keys of :func:`kla_observations_from_runs`: ``id``, ``kla_per_s`` [1/s],
        ``kla_stderr_per_s`` [1/s], ``gassed_power_per_volume_w_m3`` and
        ``power_per_volume_w_m3`` [W/m3], ``superficial_gas_velocity_m_s`` [m/s],
        ``viscosity_pa_s`` [Pa s], ``density_kg_m3`` [kg/m3], ``coalescence``, ``vessel``,
        ``liquid_volume_m3`` [m3].

    Returns
    -------
    tuple of (Observations, list of str)
        The usable runs, and why each other run was left out (as from runs).

    Examples
    --------
    >>> obs, skipped = kla_observations_from_columns({
    ...     "id": [1, 2], "kla_per_s": [0.02, None], "vessel": ["V-20", "V-20"],
    ...     "gassed_power_per_volume_w_m3": [500.0, 800.0],
    ...     "superficial_gas_velocity_m_s": [0.005, 0.006]})
    >>> obs.n, skipped
    (1, ['run 2: no kla_per_s'])
    """
    n = max((len(v) for v in columns.values()), default=0)

    def values(key):
        found = columns.get(key)
        return [None] * n if found is None else found

    def positive(key):
        a = np.array(values(key), dtype=float)  # None -> NaN
        with np.errstate(invalid="ignore"):
            return np.isfinite(a) & (a > 0), a

    masks = {key: positive(key)[0] for key in _KLA_NEEDED}
    usable = np.logical_and.reduce([masks[k] for k in _KLA_NEEDED]) if n else np.zeros(0, bool)
    ids = values("id")
    skipped = [f"run {ids[i]}: no {' or '.join(k for k in _KLA_NEEDED if not masks[k][i])}"
               for i in np.flatnonzero(~usable)]
    if not usable.any():
        raise InputError("no selected run has a kLa, a gassed power and a gas velocity; "
                         + (f"{len(skipped)} run(s) were left out" if skipped
                            else "the selection is empty"), "runs")
    used = np.flatnonzero(usable)

    def column(key):
        return positive(key)[1][used]

    def optional(key):
        ok, a = positive(key)
        return a[used] if ok[used].all() else None

    def labels(key):
        found = values(key)
        return [found[i] for i in used]

    stderr_ok, stderr = positive("kla_stderr_per_s")
    coalescence = labels("coalescence")
    obs = kla_observations(
        column("kla_per_s"), gassed_power_per_volume_w_m3=column("gassed_power_per_volume_w_m3"),
        ungassed_power_per_volume_w_m3=optional("power_per_volume_w_m3"),
        superficial_velocity_m_s=column("superficial_gas_velocity_m_s"),
        kla_stderr_per_s=np.where(stderr_ok, stderr, 0.0)[used],
        viscosity_pa_s=optional("viscosity_pa_s"), density_kg_m3=optional("density_kg_m3"),
        coalescence=None if None in coalescence else coalescence,
        vessel=[str(v) for v in labels("vessel")],
        vessel_volume_m3=optional("liquid_volume_m3"), run_id=labels("id"))
    return obs, skipped


def sherwood_observations_from_fluxes(rows: Iterable[Mapping]) -> tuple[Observations, list[str]]:
    """Flux measurements as Sherwood, Reynolds and Schmidt numbers.

    With ``kL = flux / (c_interface - c_bulk)``: ``Sh = kL L / D``, ``Re = rho u L / mu``,
    ``Sc = mu / (rho D)``.

    Parameters
    ----------
    rows : iterable of mapping
        Flux records with ``id``, ``flux_mol_m2_s`` [mol/(m2 s)], ``c_interface_mol_m3`` and
        ``c_bulk_mol_m3`` [mol/m3], ``characteristic_length_m`` [m], ``velocity_m_s`` [m/s],
        ``diffusivity_m2_s`` [m2/s], ``density_kg_m3`` [kg/m3], ``viscosity_pa_s`` [Pa s],
        optionally ``vessel``.

    Returns
    -------
    Observations
        The usable measurements.
    list of str
        One line per measurement left out, with the reason.
    """
    sh, re, sc, ids, vessels, skipped = [], [], [], [], [], []
    for row in rows:
        missing = [k for k in ("diffusivity_m2_s", "density_kg_m3", "viscosity_pa_s",
                               "velocity_m_s") if not _positive(row, k)]
        if missing:
            skipped.append(f"flux {row.get('id')}: no {', '.join(missing)}")
            continue
        kl = row["flux_mol_m2_s"] / (row["c_interface_mol_m3"] - row["c_bulk_mol_m3"])
        if not kl > 0:
            skipped.append(f"flux {row.get('id')}: the flux runs against the concentration "
                           "difference (kL would be negative)")
            continue
        length, d = row["characteristic_length_m"], row["diffusivity_m2_s"]
        rho, mu = row["density_kg_m3"], row["viscosity_pa_s"]
        sh.append(kl * length / d)
        re.append(rho * row["velocity_m_s"] * length / mu)
        sc.append(mu / (rho * d))
        ids.append(row.get("id"))
        vessels.append(str(row.get("vessel") or "flux cell"))
    if not sh:
        raise InputError("no flux measurement can give a Sherwood number"
                         + (f"; {len(skipped)} were left out" if skipped else ""), "fluxes")
    obs = sherwood_observations(sh, reynolds=re, schmidt=sc, vessel=vessels, run_id=ids)
    return obs, skipped
