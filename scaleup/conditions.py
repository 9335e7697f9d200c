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


def derived_table(runs: list[dict], vessels: dict[int, dict], media: dict[int, dict],
                  **options) -> list[dict]:
    """P/V, Pg/V, us, vvm, Fl, regime ... for many runs, vectorised per vessel and state.

    Runs that share a vessel, medium, temperature and pressure (and have no measured power)
    are evaluated in one call over their speed and gas-flow arrays.
    """
    import numpy as np

    from scaleup.hydro.point import operating_point

    groups: dict[tuple, list[dict]] = {}
    out: dict[int, dict] = {}
    for r in runs:
        v = vessels[r["vessel_id"]]
        pressure = r.get("head_pressure_pa") or v["head_pressure_pa"]
        key = (r["vessel_id"], r["medium_id"], r["temperature_k"], pressure)
        if r.get("power_measured_w") is not None or r.get("torque_measured_n_m") is not None:
            rc = run_conditions(r, v, media[r["medium_id"]], **options)
            out[r["id"]] = _derived(rc.point, rc.liquid, None)
            continue
        groups.setdefault(key, []).append(r)
    for (vessel_id, medium_id, temperature, pressure), members in groups.items():
        from dataclasses import replace

        vessel = replace(vessel_from_row(vessels[vessel_id]), head_pressure=pressure)
        liquid = liquid_for(media[medium_id], temperature, pressure)
        speeds = np.array([m["speed_rps"] for m in members])
        flows = np.array([m["gas_flow_mol_s"] for m in members])
        point = operating_point(vessel, speeds, flows, temperature, liquid.density_kg_m3,
                                liquid.viscosity_pa_s, liquid.surface_tension_n_m, **options)
        for i, m in enumerate(members):
            out[m["id"]] = _derived(point, liquid, i)
    return [{**r, **out[r["id"]]} for r in runs]


def _derived(point, liquid, i: int | None) -> dict:
    import numpy as np

    def pick(value):
        a = np.asarray(value)
        return (a.item() if a.ndim == 0 else a[i].item()) if i is not None or a.ndim == 0 \
            else a.item()

    return {
        "power_w": pick(point.power), "gassed_power_w": pick(point.gassed_power),
        "power_per_volume_w_m3": pick(point.power_per_volume),
        "gassed_power_per_volume_w_m3": pick(point.gassed_power_per_volume),
        "superficial_gas_velocity_m_s": pick(point.superficial_gas_velocity),
        "vvm": pick(point.vvm), "flow_number": pick(point.flow_number),
        "froude": pick(point.froude), "reynolds": pick(point.reynolds),
        "regime": pick(point.regime), "tip_speed_m_s": pick(point.tip_speed),
        "blend_time_95_s": pick(point.blend_time_95),
        "flooding_margin": pick(point.flooding_margin),
        "liquid_volume_m3": float(point.liquid_volume),
        "density_kg_m3": liquid.density_kg_m3, "viscosity_pa_s": liquid.viscosity_pa_s,
        "surface_tension_n_m": liquid.surface_tension_n_m,
    }
