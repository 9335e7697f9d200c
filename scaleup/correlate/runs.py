"""Per-run records (plain dicts with SI keys, as the service layer gives them) to arrays.

Pure: the rows come from the campaign's derived run table (runs joined with vessel,
medium and the operating point computed by :mod:`scaleup.hydro`) or its flux table, and
go out as :class:`~scaleup.correlate.models.Observations`. Rows that cannot be used are
skipped and listed with the reason, never silently dropped.
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping

import numpy as np

from scaleup.correlate.models import Observations, kla_observations, sherwood_observations
from scaleup.errors import InputError


def _positive(row: Mapping, key: str) -> bool:
    value = row.get(key)
    return value is not None and np.isfinite(value) and value > 0


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
    used, skipped = [], []
    for row in rows:
        missing = [k for k in ("kla_per_s", "gassed_power_per_volume_w_m3",
                               "superficial_gas_velocity_m_s") if not _positive(row, k)]
        if missing:
            skipped.append(f"run {row.get('id')}: no {' or '.join(missing)}")
        else:
            used.append(row)
    if not used:
        raise InputError("no selected run has a kLa, a gassed power and a gas velocity; "
                         + (f"{len(skipped)} run(s) were left out" if skipped
                            else "the selection is empty"), "runs")

    def column(key):
        return [row.get(key) for row in used]

    def optional(key):
        values = column(key)
        return values if all(_positive(r, key) for r in used) else None

    stderr = [r["kla_stderr_per_s"] if _positive(r, "kla_stderr_per_s") else 0.0 for r in used]
    coalescence = column("coalescence")
    obs = kla_observations(
        column("kla_per_s"), gassed_power_per_volume_w_m3=column("gassed_power_per_volume_w_m3"),
        ungassed_power_per_volume_w_m3=optional("power_per_volume_w_m3"),
        superficial_velocity_m_s=column("superficial_gas_velocity_m_s"),
        kla_stderr_per_s=stderr, viscosity_pa_s=optional("viscosity_pa_s"),
        density_kg_m3=optional("density_kg_m3"),
        coalescence=None if None in coalescence else coalescence,
        vessel=[str(v) for v in column("vessel")],
        vessel_volume_m3=optional("liquid_volume_m3"), run_id=column("id"))
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
