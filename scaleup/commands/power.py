"""`scaleup power`: power, gassed power, regime, blend time and dispersion at one point."""

from __future__ import annotations

import click

from scaleup.commands.common import emit_json, json_option, print_notes, print_pairs, print_table


def _impeller_table(as_json: bool) -> None:
    from scaleup.hydro.impellers import CATALOGUE

    if as_json:
        emit_json({"impellers": [
            {"id": t.id, "description": t.description, "flow": t.flow, "blades": t.blades,
             "blade_width_ratio": t.blade_width_ratio, "power_number": t.power_number,
             "power_number_range": list(t.power_number_range), "kp": t.kp,
             "flow_number": t.flow_number, "gassed_model": t.gassed, "sources": t.sources}
            for t in CATALOGUE.values()], "warnings": []})
        return
    rows = [(t.id, t.description, f"{t.power_number:g}",
             f"{t.power_number_range[0]:g}-{t.power_number_range[1]:g}", f"{t.kp:g}",
             "-" if t.flow_number is None else f"{t.flow_number:g}",
             t.sources.get("power_number", "")) for t in CATALOGUE.values()]
    print_table(rows, ["type", "description", "Np", "Np range", "Kp", "Nq", "Np source"],
                title="Impeller catalogue (turbulent Np, baffled vessel)")


@click.command("power")
@click.option("--impeller", "impeller_types", multiple=True, metavar="TYPE",
              help="Impeller type from the catalogue (see --list-impellers); repeat for "
                   "several impellers on the shaft, bottom first. Default: disc-turbine.")
@click.option("--diameter", metavar="TEXT", help='Impeller diameter D, e.g. "0.1 m".')
@click.option("--tank-diameter", metavar="TEXT", help='Tank diameter T, e.g. "0.3 m".')
@click.option("--liquid-height", metavar="TEXT",
              help='Liquid height H from the lowest point of the bottom, e.g. "0.3 m".')
@click.option("--volume", metavar="TEXT",
              help='Liquid volume instead of --liquid-height, e.g. "20 L".')
@click.option("--bottom", type=click.Choice(["flat", "elliptical", "torispherical"]),
              default="flat", show_default=True, help="Bottom head shape.")
@click.option("--clearance", metavar="TEXT",
              help="Height of the bottom impeller above the vessel bottom (default T/3).")
@click.option("--spacing", metavar="TEXT",
              help="Distance between impellers (default T).")
@click.option("--baffles", type=int, default=4, show_default=True, help="Number of baffles.")
@click.option("--speed", required=False, metavar="TEXT", help='Agitator speed, e.g. "600 rpm".')
@click.option("--gas-flow", metavar="TEXT", default="0 mol/s", show_default=True,
              help='Gas flow: "5 NL/min", "1 vvm", "0.02 mol/s".')
@click.option("--temp", "temperature", metavar="TEXT", default="25 degC", show_default=True,
              help="Liquid temperature.")
@click.option("--head-pressure", metavar="TEXT", default="1.01325 bara", show_default=True,
              help='Head-space pressure, e.g. "0.5 barg".')
@click.option("--density", metavar="TEXT", help="Liquid density (default: water at --temp).")
@click.option("--viscosity", metavar="TEXT", help="Liquid viscosity (default: water at --temp).")
@click.option("--surface-tension", metavar="TEXT",
              help="Surface tension (default: water at --temp).")
@click.option("--power-number", metavar="NUMBER", type=float,
              help="Measured turbulent power number; overrides the catalogue for every "
                   "impeller.")
@click.option("--gassed-method", default="type", show_default=True,
              type=click.Choice(["type", "Cui", "Hughmark", "Michel_Miller"]),
              help="Gassed-power method ('type' = Cui for disc turbines, catalogue ratio "
                   "otherwise).")
@click.option("--pressure-basis", default="mid-height", show_default=True,
              type=click.Choice(["mid-height", "sparger", "head"]),
              help="Pressure at which the superficial gas velocity is evaluated.")
@click.option("--measured-power", metavar="TEXT",
              help="Measured power drawn by the liquid in this run; overrides the estimate.")
@click.option("--list-impellers", is_flag=True, help="List the impeller catalogue and exit.")
@json_option
def power_command(impeller_types, diameter, tank_diameter, liquid_height, volume, bottom,
                  clearance, spacing, baffles, speed, gas_flow, temperature, head_pressure,
                  density, viscosity, surface_tension, power_number, gassed_method,
                  pressure_basis, measured_power, list_impellers, as_json) -> None:
    """Power, gassed power, flow regime, blend time and dispersion at one operating point.

    Liquid properties default to water at --temp. Heights are measured from the lowest
    point of the vessel. JSON values are SI (W, m, s, rev/s, Pa, mol/s).

    \b
    Examples:
      scaleup power --impeller disc-turbine --diameter "0.1 m" --tank-diameter "0.3 m" \\
          --liquid-height "0.3 m" --speed "600 rpm" --gas-flow "5 NL/min" --temp "30 degC"
      scaleup power --impeller disc-turbine --impeller pitched-blade-6 --diameter "1.333 m" \\
          --tank-diameter "4 m" --liquid-height "12 m" --spacing "4 m" --speed "120 rpm"
      scaleup power --list-impellers
    """
    if list_impellers:
        _impeller_table(as_json)
        return
    from scaleup import units
    from scaleup.cautions import ROTATING, cautions_for
    from scaleup.errors import InputError
    from scaleup.hydro.geometry import Impeller, Vessel, liquid_height_for_volume
    from scaleup.hydro.point import operating_point

    for name, value in (("--diameter", diameter), ("--tank-diameter", tank_diameter),
                        ("--speed", speed)):
        if value is None:
            raise InputError(f"{name} is required (or use --list-impellers)", name)
    if (liquid_height is None) == (volume is None):
        raise InputError("give exactly one of --liquid-height and --volume", "--liquid-height")
    types = impeller_types or ("disc-turbine",)
    D = units.parse(diameter, "length", "--diameter")
    T = units.parse(tank_diameter, "length", "--tank-diameter")
    C = T / 3.0 if clearance is None else units.parse(clearance, "length", "--clearance")
    S = T if spacing is None else units.parse(spacing, "length", "--spacing")
    N = units.parse(speed, "speed", "--speed")
    temp_k = units.parse(temperature, "temperature", "--temp")
    p_head = units.parse(head_pressure, "pressure", "--head-pressure")
    impellers = tuple(Impeller(t, D, C + n * S, power_number=power_number)
                      for n, t in enumerate(types))
    if volume is not None:
        shell = Vessel(T, 1.0e6, bottom=bottom)  # a very tall shell, to place the volume
        H = float(liquid_height_for_volume(shell, units.parse(volume, "volume", "--volume")))
    else:
        H = units.parse(liquid_height, "length", "--liquid-height")
    vessel = Vessel(T, H, impellers, bottom=bottom, baffles=baffles, head_pressure=p_head)
    from scaleup.props import water

    liquid, sources = {}, {}
    for name, text, flag, default in (
            ("density", density, "--density", water.density),
            ("viscosity", viscosity, "--viscosity", water.viscosity),
            ("surface_tension", surface_tension, "--surface-tension",
             lambda t, p: water.surface_tension(t))):
        if text is not None:
            liquid[name] = units.parse(text, name, flag)
            sources[name] = "given"
        else:
            liquid[name] = float(default(temp_k, p_head))
            sources[name] = "water at --temp (scaleup.props.water)"
    n_dot = units.parse(gas_flow, "gas_flow", "--gas-flow", liquid_volume_m3=vessel.volume,
                        temperature_k=temp_k, pressure_pa=p_head)
    measured = (None if measured_power is None
                else units.parse(measured_power, "power", "--measured-power"))
    op = operating_point(vessel, N, n_dot, temp_k, liquid["density"], liquid["viscosity"],
                         liquid["surface_tension"],
                         gassed_method=gassed_method, pressure_basis=pressure_basis,
                         measured_power=measured)
    cautions = cautions_for(pressure_pa=p_head, scale=False) + [ROTATING]
    payload = op.to_dict()
    payload["impellers"] = [{"type": i.type, "diameter_m": i.diameter,
                             "clearance_m": i.clearance} for i in vessel.impellers]
    payload["tank_diameter_m"] = T
    payload["liquid_height_m"] = H
    payload["surface_tension_n_m"] = liquid["surface_tension"]
    payload["property_sources"] = sources
    payload["cautions"] = cautions
    if as_json:
        emit_json(payload)
        return
    fq = units.format_quantity
    sig = units.sig
    pairs = [
        ("liquid volume", fq(op.liquid_volume, "volume")),
        ("power (ungassed)", fq(op.power, "power", "W")),
        ("gassed power", f"{fq(op.gassed_power, 'power', 'W')}  (Pg/P {sig(op.gassed_power_ratio, 3)}, "
                         f"{op.gassed_method})"),
        ("P/V, Pg/V", f"{fq(op.power_per_volume, 'power_per_volume', 'W/m3')}, "
                      f"{fq(op.gassed_power_per_volume, 'power_per_volume', 'W/m3')}"),
        ("Reynolds", sig(op.reynolds)),
        ("power number", sig(op.power_number)),
        ("flow number Fl", sig(op.flow_number)),
        ("Froude", sig(op.froude)),
        ("regime", op.regime),
        ("N flood, N cd", f"{fq(op.flooding_speed, 'speed')}, "
                          f"{fq(op.complete_dispersion_speed, 'speed')}"),
        ("tip speed", fq(op.tip_speed, "velocity")),
        ("blend time (95 %)", f"{fq(op.blend_time_95, 'time')}  ({op.blend_method})"),
        (f"superficial gas velocity ({op.pressure_basis})",
         fq(op.superficial_gas_velocity, "velocity")),
        ("vvm (normal)", sig(op.vvm)),
        ("gas hold-up", sig(op.gas_holdup, 3)),
        ("Sauter diameter", "-" if op.gas_flow == 0 else fq(op.sauter_diameter, "length", "mm")),
        ("mean dissipation", f"{sig(op.energy_dissipation)} W/kg"),
        ("Kolmogorov length", fq(op.kolmogorov_length, "length", "um")),
    ]
    print_pairs(pairs, title="Operating point (estimates)")
    print_notes(op.warnings, cautions)
