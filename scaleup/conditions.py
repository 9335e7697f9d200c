"""From stored records to the physics: a vessel row to a hydro ``Vessel``, a run to its
operating point with the liquid properties at its conditions.

This is the one place where stored columns meet the pure layers, so the service layer, the
fitting, the scale-up engine and the terminal app all derive P/V, Pg/V, us, regime and blend
time of a run the same way. Liquid properties are those of water at the run's temperature
(IAPWS) unless the medium has measured values, which take precedence.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from scaleup.units import P_ATM


def vessel_from_row(row: dict, *, liquid_height: float | None = None):
    """The hydro :class:`~scaleup.hydro.geometry.Vessel` of a stored vessel.

    ``row`` is a vessel record with ``impellers`` (list of impeller records) and ``sparger``
    (record or None), as :meth:`scaleup.campaign.Campaign.vessel` returns it; a row without
    impellers gives a vessel without impellers (geometry only).
    """
    from scaleup.hydro.geometry import Impeller, Sparger, Vessel

    impellers = tuple(
        Impeller(type=i["impeller_type"], diameter=i["impeller_diameter_m"],
                 clearance=max(i["clearance_m"], 1e-6), blades=i.get("blade_count"),
                 blade_width=i.get("blade_width_m"), power_number=i.get("power_number_measured"))
        for i in row.get("impellers") or ())
    s = row.get("sparger")
    sparger = Sparger(kind=s["sparger_type"], height=s.get("sparger_height_m") or 0.0,
                      diameter=s.get("sparger_diameter_m")) if s else Sparger()
    height = liquid_height if liquid_height is not None else row.get("liquid_height_m")
    if height is None:
        height = height_for_volume(row["tank_diameter_m"], row["working_volume_m3"],
                                   row.get("bottom_shape") or "flat")
    return Vessel(tank_diameter=row["tank_diameter_m"], liquid_height=height,
                  impellers=impellers, bottom=row.get("bottom_shape") or "flat",
                  baffles=row.get("baffle_count", 4) if row.get("baffle_count") is not None
                  else 4, baffle_width=row.get("baffle_width_m") or None,
                  head_pressure=row.get("head_pressure_pa") or P_ATM, sparger=sparger,
                  jacket_area=row.get("jacket_area_m2") or 0.0,
                  jacket_top=height if row.get("jacket_area_m2") else 0.0,
                  coil_area=row.get("coil_area_m2") or 0.0,
                  coil_top=height if row.get("coil_area_m2") else 0.0,
                  name=row.get("name") or "")


def volume_for_height(tank_diameter: float, liquid_height: float, bottom: str) -> float:
    """Liquid volume [m3] of a shell of diameter T [m] filled to H [m] over a given bottom."""
    from scaleup.hydro.geometry import Vessel, liquid_volume

    return float(liquid_volume(Vessel(tank_diameter, liquid_height, bottom=bottom)))


def height_for_volume(tank_diameter: float, volume: float, bottom: str) -> float:
    """Liquid height [m] that holds ``volume`` [m3] in a shell of diameter T [m]."""
    from scaleup.hydro.geometry import Vessel, liquid_height_for_volume

    return float(liquid_height_for_volume(Vessel(tank_diameter, 1.0, bottom=bottom), volume))


@dataclass(frozen=True)
class RunConditions:
    """A run with everything derived from it: the vessel, the liquid, the operating point."""

    run: dict
    vessel: Any  # scaleup.hydro.geometry.Vessel
    liquid: Any  # scaleup.props.water.LiquidProperties
    point: Any  # scaleup.hydro.point.OperatingPoint
    warnings: tuple[str, ...]


def liquid_for(medium: dict, temperature_k: float, pressure_pa: float):
    """Properties of the medium at a state: its measured values over water's (IAPWS)."""
    from scaleup.props.water import liquid_properties

    overrides = {name: medium[column] for name, column in (
        ("density", "density_kg_m3"), ("viscosity", "viscosity_pa_s"),
        ("surface_tension", "surface_tension_n_m")) if medium.get(column) is not None}
    return liquid_properties(temperature_k, pressure_pa, overrides=overrides)


def run_conditions(run: dict, vessel_row: dict, medium: dict, **options) -> RunConditions:
    """Evaluate one stored run: vessel geometry, liquid properties, operating point.

    ``options`` go to :func:`scaleup.hydro.point.operating_point` (``gassed_method``,
    ``pressure_basis``).
    """
    from scaleup.hydro.point import operating_point

    vessel = vessel_from_row(vessel_row)
    pressure = run.get("head_pressure_pa") or vessel.head_pressure
    if pressure != vessel.head_pressure:
        from dataclasses import replace

        vessel = replace(vessel, head_pressure=pressure)
    liquid = liquid_for(medium, run["temperature_k"], pressure)
    point = operating_point(vessel, run["speed_rps"], run["gas_flow_mol_s"], run["temperature_k"],
                            liquid.density_kg_m3, liquid.viscosity_pa_s,
                            liquid.surface_tension_n_m, measured_power=run.get("power_measured_w"),
                            measured_torque=run.get("torque_measured_n_m"), **options)
    return RunConditions(run=run, vessel=vessel, liquid=liquid, point=point,
                         warnings=tuple(point.warnings))


# what derived_columns reads of each run, and the keys it adds
DERIVED_INPUTS = ("id", "vessel_id", "medium_id", "temperature_k", "head_pressure_pa",
                  "speed_rps", "gas_flow_mol_s", "power_measured_w", "torque_measured_n_m")
# derived key -> attribute of the operating point (the liquid's three are added to these)
_POINT_ATTRIBUTES = {
    "power_w": "power", "gassed_power_w": "gassed_power",
    "power_per_volume_w_m3": "power_per_volume",
    "gassed_power_per_volume_w_m3": "gassed_power_per_volume",
    "superficial_gas_velocity_m_s": "superficial_gas_velocity", "vvm": "vvm",
    "flow_number": "flow_number", "froude": "froude", "reynolds": "reynolds",
    "regime": "regime", "tip_speed_m_s": "tip_speed", "blend_time_95_s": "blend_time_95",
    "flooding_margin": "flooding_margin"}
DERIVED_KEYS = (*_POINT_ATTRIBUTES, "liquid_volume_m3", "density_kg_m3", "viscosity_pa_s",
                "surface_tension_n_m")


def derived_table(runs: list[dict], vessels: dict[int, dict], media: dict[int, dict],
                  **options) -> list[dict]:
    """P/V, Pg/V, us, vvm, Fl, regime ... for many runs: each run with the keys of
    :data:`DERIVED_KEYS` added (see :func:`derived_columns`)."""
    columns = {key: [r.get(key) for r in runs] for key in DERIVED_INPUTS}
    derived = derived_columns(columns, vessels, media, **options)
    values = zip(*(derived[key].tolist() for key in DERIVED_KEYS), strict=True)
    return [{**r, **dict(zip(DERIVED_KEYS, v, strict=True))} for r, v in zip(runs, values,
                                                                              strict=True)]


def derived_columns(columns: dict[str, list], vessels: dict[int, dict], media: dict[int, dict],
                    **options) -> dict:
    """The derived hydrodynamics of many runs given as columns, vectorised per vessel and state.

    ``columns`` holds the lists of :data:`DERIVED_INPUTS` (one entry per run); returns one
    object array per key of :data:`DERIVED_KEYS`, in the runs' order, holding the Python
    values (float, or str for ``regime``). Runs that share a vessel, medium, temperature
    and pressure (and have no measured power or torque) are evaluated in one call of
    :func:`scaleup.hydro.point.operating_point` over their speed and gas-flow arrays; the
    others one by one with :func:`run_conditions`. ``options`` go to ``operating_point``.
    """
    import numpy as np

    from scaleup.hydro.point import operating_point

    n = len(columns["id"])
    out = {key: np.empty(n, dtype=object) for key in DERIVED_KEYS}
    groups: dict[tuple, list[int]] = {}
    head = {i: v["head_pressure_pa"] for i, v in vessels.items()}
    rows = zip(columns["vessel_id"], columns["medium_id"], columns["temperature_k"],
               columns["head_pressure_pa"], columns["power_measured_w"],
               columns["torque_measured_n_m"], strict=True)
    for i, (vessel_id, medium_id, temperature, pressure, power, torque) in enumerate(rows):
        if power is not None or torque is not None:
            run = {key: columns[key][i] for key in DERIVED_INPUTS}
            rc = run_conditions(run, vessels[vessel_id], media[medium_id], **options)
            for key, value in _derived(rc.point, rc.liquid).items():
                out[key][i] = np.asarray(value).item()
            continue
        groups.setdefault((vessel_id, medium_id, temperature, pressure or head[vessel_id]),
                          []).append(i)
    speeds = np.array(columns["speed_rps"], dtype=float)
    flows = np.array(columns["gas_flow_mol_s"], dtype=float)
    for (vessel_id, medium_id, temperature, pressure), members in groups.items():
        from dataclasses import replace

        vessel = replace(vessel_from_row(vessels[vessel_id]), head_pressure=pressure)
        liquid = liquid_for(media[medium_id], temperature, pressure)
        at = np.array(members)
        point = operating_point(vessel, speeds[at], flows[at], temperature,
                                liquid.density_kg_m3, liquid.viscosity_pa_s,
                                liquid.surface_tension_n_m, **options)
        for key, value in _derived(point, liquid).items():
            a = np.asarray(value)
            out[key][at] = a.item() if a.ndim == 0 else a.astype(object)
    return out


def _derived(point, liquid) -> dict:
    """The values of :data:`DERIVED_KEYS` of an operating point (scalars or arrays)."""
    return {**{key: getattr(point, name) for key, name in _POINT_ATTRIBUTES.items()},
            "liquid_volume_m3": float(point.liquid_volume),
            "density_kg_m3": liquid.density_kg_m3, "viscosity_pa_s": liquid.viscosity_pa_s,
            "surface_tension_n_m": liquid.surface_tension_n_m}
