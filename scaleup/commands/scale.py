"""`scaleup scale` (compare scale-up rules) and `scaleup design` (meet a duty at least power)."""

from __future__ import annotations

import click

from scaleup.commands.common import emit_json, json_option, print_notes, print_pairs, print_table

RULE_CHOICES = ["p-per-v", "pg-per-v", "tip-speed", "speed", "reynolds", "kla", "otr", "all"]
GAS_RULE_CHOICES = ["vvm", "superficial", "flow-number"]

# --limits keys -> (Limits field, unit kind or None for a plain number)
LIMIT_KEYS = {
    "tip-speed": ("max_tip_speed", "velocity"),
    "us": ("max_superficial_velocity", "velocity"),
    "superficial-velocity": ("max_superficial_velocity", "velocity"),
    "flooding-margin": ("min_flooding_margin", None),
    "motor": ("motor_rating", "power"),
    "p-per-v": ("max_power_per_volume", "power_per_volume"),
    "heat": ("max_heat_removal", "power"),
    "critical-do": ("critical_do", "do"),
    "speed": ("max_speed", "speed"),
    "vvm": ("max_vvm", None),
}
LIMITS_HELP = ('Limits as KEY=VALUE, comma separated: tip-speed="6 m/s", us="0.1 m/s", '
               'flooding-margin=0.2, motor="250 kW", p-per-v="3 kW/m3", heat="500 kW", '
               'critical-do="10 %", speed="150 rpm", vvm=1.5.')


def parse_limits(texts):
    """Limits from ``KEY=VALUE`` texts (several, or one comma-separated)."""
    from scaleup import units
    from scaleup.errors import InputError
    from scaleup.scaling.evaluate import Limits

    values: dict = {}
    for text in texts:
        for item in filter(None, (p.strip() for p in text.replace(";", ",").split(","))):
            key, sep, value = item.partition("=")
            key, value = key.strip().lower(), value.strip().strip('"')
            if not sep or key not in LIMIT_KEYS:
                raise InputError(f"unknown limit {item!r}; use KEY=VALUE with KEY one of "
                                 f"{', '.join(LIMIT_KEYS)}", "--limits", item)
            name, kind = LIMIT_KEYS[key]
            if kind is None:
                try:
                    values[name] = float(value)
                except ValueError as exc:
                    raise InputError(f"{key}={value!r} needs a plain number", "--limits",
                                     item) from exc
            elif kind == "do":
                percent = value.endswith("%")
                values[name] = (float(value.rstrip("% ")) if percent
                                else units.parse_dissolved_oxygen(value, "--limits critical-do"))
                values["critical_do_percent"] = percent
            else:
                values[name] = units.parse(value, kind, f"--limits {key}")
    return Limits(**values)


def _do(text: str, field: str) -> tuple[float, bool]:
    from scaleup import units

    if text.strip().endswith("%"):
        return float(text.strip().rstrip("% ")), True
    return units.parse_dissolved_oxygen(text, field), False


def _process(*, do_setpoint, our, o2_fraction, rq, driving_force, gassed_method,
             drive_efficiency, compressor_efficiency, line_loss, jacket_u, coil_u, coolant_in,
             coolant_out, confidence):
    from scaleup import units
    from scaleup.scaling.evaluate import Process
    from scaleup.scaling.heat import Cooling

    value, percent = _do(do_setpoint, "--do-setpoint")
    cooling = None
    if jacket_u or coil_u:
        cooling = Cooling(jacket_u=None if jacket_u is None else float(jacket_u),
                          coil_u=None if coil_u is None else float(coil_u),
                          coolant_in=units.parse(coolant_in, "temperature", "--coolant-in"),
                          coolant_out=units.parse(coolant_out, "temperature", "--coolant-out"))
    return Process(do_setpoint=value, do_percent=percent,
                   our=None if our is None else units.parse(our, "rate", "--our"),
                   o2_fraction=o2_fraction, respiratory_quotient=rq,
                   driving_force=driving_force, gassed_method=gassed_method,
                   drive_efficiency=drive_efficiency,
                   compressor_efficiency=compressor_efficiency,
                   line_loss=units.parse(line_loss, "pressure", "--line-loss"),
                   cooling=cooling, confidence=confidence)


def process_options(f):
    """Options shared by `scale` and `design` (oxygen, power, cooling)."""
    options = [
        click.option("--do-setpoint", default="20 %", show_default=True, metavar="TEXT",
                     help='DO held: "20 %" of air saturation at the head pressure, or '
                          '"1.5 mg/L".'),
        click.option("--o2-fraction", type=float, default=0.20946, show_default=True,
                     help="O2 mole fraction of the inlet gas (enriched air or pure O2 above "
                          "0.2095)."),
        click.option("--rq", type=float, default=1.0, show_default=True,
                     help="Respiratory quotient (CO2 out per O2 taken up) for the exit gas."),
        click.option("--driving-force", default="log-mean", show_default=True,
                     type=click.Choice(["log-mean", "mid-depth", "arithmetic", "backmixed"]),
                     help="Mean O2 driving force over the liquid height (backmixed: exit "
                          "gas everywhere, C* at mid-height)."),
        click.option("--gassed-method", default=None,
                     type=click.Choice(["type", "Cui", "Hughmark", "Michel_Miller"]),
                     help="Gassed-power method (default: per impeller type)."),
        click.option("--drive-efficiency", type=float, default=0.92, show_default=True,
                     help="Motor and gearbox efficiency."),
        click.option("--compressor-efficiency", type=float, default=0.70, show_default=True,
                     help="Isentropic efficiency of the air compressor."),
        click.option("--line-loss", default="0.3 bar", show_default=True, metavar="TEXT",
                     help="Pressure lost in filters, piping and sparger."),
        click.option("--jacket-u", type=float, default=None, metavar="W/(m2 K)",
                     help="Jacket U (typical 300-700 W/(m2 K), common practice)."),
        click.option("--coil-u", type=float, default=None, metavar="W/(m2 K)",
                     help="Coil U (typical 500-1500 W/(m2 K), common practice)."),
        click.option("--coolant-in", default="15 degC", show_default=True, metavar="TEXT",
                     help="Cooling-water inlet temperature."),
        click.option("--coolant-out", default="25 degC", show_default=True, metavar="TEXT",
                     help="Cooling-water outlet temperature."),
        click.option("--limits", "limits", multiple=True, metavar="KEY=VALUE,...",
                     help=LIMITS_HELP),
        click.option("--correlation", default=None, metavar="FIT|PUBLISHED",
                     help="A saved fit's name or a published kLa correlation (default: "
                          "van't Riet for the medium's coalescence)."),
        click.option("--save", default=None, metavar="NAME",
                     help="Save the study with all its inputs in the campaign."),
    ]
    for option in reversed(options):
        f = option(f)
    return f


def _collect(kw: dict, confidence: float = 0.5):
    keys = ("do_setpoint", "our", "o2_fraction", "rq", "driving_force", "gassed_method",
            "drive_efficiency", "compressor_efficiency", "line_loss", "jacket_u", "coil_u",
            "coolant_in", "coolant_out")
    return _process(**{k: kw[k] for k in keys}, confidence=confidence), parse_limits(kw["limits"])


def _print_scale(results: dict) -> None:
    import click

    from scaleup import units

    fq, sig = units.format_quantity, units.sig
    rows = [["pilot"] + _cells(results["pilot"], fq, sig)]
    notes = []
    for r in results["rules"]:
        if r.get("speed_rps") is None:
            rows.append([r["rule"]] + ["-"] * 10)
            notes += [f"{r['rule']}: {v}" for v in r["violations"]]
            continue
        rows.append([r["rule"]] + _cells(r, fq, sig))
        notes += [f"{r['rule']}: {v}" for v in r["violations"]]
        notes += [f"{r['rule']}: extrapolated: {m}" for m in r["extrapolation"]["messages"]]
    print_table(rows, ["rule", "speed", "gas [NL/min]", "P/V", "Pg/V", "tip speed", "regime",
                       "kLa [1/h] (95 % PI)", "OTR cap. [mmol/(L h)]", "heat load", "motor"],
                title=(f"Scale-up x{sig(results['scale_factor'], 3)} on diameter "
                       f"({sig(results['pilot_volume_m3'] * 1000, 3)} L -> "
                       f"{sig(results['target_volume_m3'], 3)} m3), gas rule "
                       f"{results['gas_rule']} (estimates)"))
    for line in notes or ["no limit broken"]:
        click.echo(line)
    print_notes(results["warnings"], results["cautions"])


def _cells(r: dict, fq, sig) -> list[str]:
    lo, hi = r["kla_pi95_per_s"]
    return [fq(r["speed_rps"], "speed"), sig(r["gas_flow_nl_min"], 4),
            fq(r["power_per_volume_w_m3"], "power_per_volume"),
            fq(r["gassed_power_per_volume_w_m3"], "power_per_volume"),
            fq(r["tip_speed_m_s"], "velocity"), r["regime"],
            f"{sig(r['kla_per_s'] * 3600, 3)} ({sig(lo * 3600, 3)}-{sig(hi * 3600, 3)})",
            sig(r["otr_capacity_mol_m3_s"] * 3600, 3), fq(r["heat_load_w"], "power"),
            fq(r["motor_power_w"], "power")]


@click.command("scale")
@click.option("--from-run", "run_id", type=int, default=None, help="Pilot run id to scale from.")
@click.option("--vessel", default=None, metavar="NAME", help="Pilot vessel (with --speed and "
              "--gas-flow) instead of a run.")
@click.option("--speed", default=None, metavar="TEXT", help='Pilot speed, e.g. "600 rpm".')
@click.option("--gas-flow", default=None, metavar="TEXT",
              help='Pilot gas flow, e.g. "1 vvm" or "20 NL/min".')
@click.option("--temp", "temperature", default="30 degC", show_default=True, metavar="TEXT",
              help="Liquid temperature (with --vessel).")
@click.option("--medium", default=None, metavar="NAME",
              help="Medium (with --vessel): its properties and coalescence class.")
@click.option("--to-volume", default=None, metavar="TEXT",
              help='Full-scale liquid volume, geometrically similar, e.g. "40 m3".')
@click.option("--to-vessel", default=None, metavar="NAME", help="Full-scale vessel by name.")
@click.option("--rule", default="all", show_default=True, type=click.Choice(RULE_CHOICES),
              help="Speed rule (pg-per-v: gassed P/V).")
@click.option("--gas-rule", default="vvm", show_default=True, type=click.Choice(GAS_RULE_CHOICES),
              help="How the gas flow scales.")
@click.option("--our", default=None, metavar="TEXT",
              help='Duty to check, e.g. "60 mmol/L/h" (also sets the metabolic heat).')
@process_options
@json_option
@click.pass_context
def scale_command(ctx, run_id, vessel, speed, gas_flow, temperature, medium, to_volume,
                  to_vessel, rule, gas_rule, as_json, **kw) -> None:
    """Project a pilot point to full scale under each scale-up rule, side by side.

    Per rule: speed, power, gassed power, P/V, tip speed, Reynolds, flow number, regime and
    flooding margin, blend time, us, vvm, kLa with its 95 % prediction interval, OTR
    capacity at the DO set-point (exit-gas depletion and the log-mean driving force over
    the height), heat load, motor power, and the limits each rule breaks. JSON values SI.

    \b
    Examples:
      scaleup scale --from-run 12 --to-volume "40 m3" --rule all --gas-rule vvm
      scaleup scale --vessel P-300 --speed "300 rpm" --gas-flow "1 vvm" \\
          --to-vessel F-40 --rule otr --our "60 mmol/L/h" --limits "tip-speed=6 m/s"
    """
    from scaleup import units
    from scaleup.campaign import Campaign
    from scaleup.cli import db_path
    from scaleup.errors import InputError
    from scaleup.scaling.rules import RULES

    if (run_id is None) == (vessel is None):
        raise InputError("give either --from-run ID or --vessel NAME (with --speed and "
                         "--gas-flow)", "--from-run")
    if (to_volume is None) == (to_vessel is None):
        raise InputError("give exactly one of --to-volume and --to-vessel", "--to-volume")
    process, limits = _collect(kw)
    rules = tuple(RULES) if rule == "all" else (rule,)
    pilot = {"run_id": run_id, "vessel": vessel, "speed": speed, "gas_flow": gas_flow,
             "temperature": temperature, "medium": medium}
    volume = None if to_volume is None else units.parse(to_volume, "volume", "--to-volume")
    with Campaign(db_path(ctx)) as campaign:
        results = campaign.scale_study(pilot, to_volume=volume, to_vessel=to_vessel,
                                       correlation=kw["correlation"], save=kw["save"],
                                       process=process, limits=limits, rules=rules,
                                       gas_rule=gas_rule)
    if as_json:
        emit_json(results)
    else:
        _print_scale(results)


@click.command("design")
@click.option("--vessel", default=None, metavar="NAME", help="Full-scale vessel by name.")
@click.option("--volume", default=None, metavar="TEXT",
              help='Full-scale liquid volume instead, e.g. "40 m3" (standard layout, or '
                   "--like NAME scaled to it).")
@click.option("--like", default=None, metavar="NAME",
              help="With --volume: a stored vessel scaled geometrically to the volume.")
@click.option("--aspect-ratio", type=float, default=2.0, show_default=True,
              help="With --volume and no --like: H/T of the standard layout.")
@click.option("--impellers", type=int, default=2, show_default=True,
              help="With --volume and no --like: number of impellers.")
@click.option("--impeller-type", default="disc-turbine", show_default=True,
              help="With --volume and no --like: impeller type.")
@click.option("--head-pressure", default=None, metavar="TEXT",
              help='Head-space pressure, e.g. "0.5 barg" (default: the vessel\'s or 1 atm).')
@click.option("--our", required=True, metavar="TEXT", help='The duty, e.g. "60 mmol/L/h".')
@click.option("--temp", "temperature", default="30 degC", show_default=True, metavar="TEXT",
              help="Liquid temperature.")
@click.option("--medium", default=None, metavar="NAME",
              help="Medium (campaign): properties and coalescence class.")
@click.option("--coalescence", default="coalescing", show_default=True,
              type=click.Choice(["coalescing", "non-coalescing"]),
              help="Coalescence class when no --medium is named.")
@click.option("--confidence", type=float, default=0.9, show_default=True,
              help="Probability with which the vessel must reach the kLa the duty needs "
                   "(0.5: the correlation's median).")
@click.option("--grid", default="30x30", show_default=True, metavar="NSxNG",
              help="Operating-window grid, speeds x gas rates.")
@process_options
@json_option
@click.pass_context
def design_command(ctx, vessel, volume, like, aspect_ratio, impellers, impeller_type,
                   head_pressure, temperature, medium, coalescence, confidence, grid, as_json,
                   **kw) -> None:
    """Find the speed and gas rate that meet an oxygen duty at least total power.

    Total power = gassed agitator power / drive efficiency + adiabatic compression of the
    gas from ambient to the sparger (head space + liquid head + line losses). Returns the
    optimum, the binding limits, the probability that the vessel meets the duty (Monte
    Carlo over the correlation's uncertainty) and the operating window (speed x gas rate:
    feasibility, total power, probability). JSON values SI.

    \b
    Examples:
      scaleup design --volume "40 m3" --our "60 mmol/L/h" --do-setpoint "20 %" \\
          --limits "tip-speed=6 m/s,flooding-margin=0.2,motor=250 kW"
      scaleup design --vessel F-40 --our "45 mmol/L/h" --correlation my-fit --save F40-design
    """
    import os
    from dataclasses import replace

    from scaleup import units
    from scaleup.campaign import Campaign
    from scaleup.cli import db_path
    from scaleup.errors import InputError
    from scaleup.hydro.geometry import scale_to_volume
    from scaleup.props.water import liquid_properties
    from scaleup.scaling import study
    from scaleup.scaling.evaluate import Liquid

    if (vessel is None) == (volume is None):
        raise InputError("give exactly one of --vessel NAME and --volume", "--vessel")
    try:
        ns, ng = (int(x) for x in grid.lower().split("x"))
    except ValueError as exc:
        raise InputError(f"--grid {grid!r}: use NSxNG, e.g. 30x30", "--grid", grid) from exc
    if not (2 <= ns <= 400 and 2 <= ng <= 400):
        raise InputError("--grid sizes lie between 2 and 400", "--grid", grid)
    process, limits = _collect(kw, confidence)
    t = units.parse(temperature, "temperature", "--temp")
    p_head = None if head_pressure is None else units.parse(head_pressure, "pressure",
                                                            "--head-pressure")
    path = db_path(ctx)
    needs_campaign = vessel or like or medium or kw["save"] or (
        kw["correlation"] and os.path.exists(path))
    options = {"process": process, "limits": limits, "grid": (ns, ng)}
    if needs_campaign:
        with Campaign(path) as campaign:
            from scaleup.conditions import liquid_for, vessel_from_row

            if vessel:
                v = vessel_from_row(campaign.vessel(vessel))
            else:
                v = scale_to_volume(vessel_from_row(campaign.vessel(like)),
                                    units.parse(volume, "volume", "--volume")) if like else \
                    _standard(units.parse(volume, "volume", "--volume"), aspect_ratio,
                              impellers, impeller_type)
            v = replace(v, head_pressure=p_head) if p_head else v
            med = campaign.medium(medium) if medium else {"coalescence": coalescence,
                                                          "salts": {}}
            props = liquid_for(med, t, v.head_pressure)
            liquid = Liquid(t, props.density_kg_m3, props.viscosity_pa_s,
                            props.surface_tension_n_m, med["coalescence"],
                            tuple(med["salts"].items()))
            results = campaign.design_study(vessel=v, liquid=liquid,
                                            correlation=kw["correlation"], save=kw["save"],
                                            **options)
    else:
        from scaleup.scaling.correlation import KlaModel, default_published

        v = _standard(units.parse(volume, "volume", "--volume"), aspect_ratio, impellers,
                      impeller_type)
        v = replace(v, head_pressure=p_head) if p_head else v
        props = liquid_properties(t, v.head_pressure)
        liquid = Liquid(t, props.density_kg_m3, props.viscosity_pa_s, props.surface_tension_n_m,
                        coalescence)
        model = KlaModel.from_published(kw["correlation"] or default_published(coalescence))
        results = study.design_study(v, liquid, process, model, limits, grid=(ns, ng))[1]
    if as_json:
        emit_json(results)
    else:
        _print_design(results)


def _standard(volume: float, aspect_ratio: float, count: int, impeller_type: str):
    from scaleup.hydro.geometry import scale_to_volume, standard_vessel

    if count < 1:
        from scaleup.errors import InputError

        raise InputError("--impellers must be at least 1", "--impellers", count)
    return scale_to_volume(standard_vessel(1.0, impeller_type=impeller_type, count=count,
                                           aspect_ratio=aspect_ratio), volume)


def _print_design(r: dict) -> None:
    from scaleup import units

    fq, sig = units.format_quantity, units.sig
    if not r["feasible"]:
        print_pairs([("feasible", "no")] + [("why", w) for w in r["infeasibility"]],
                    title="Design (estimates): no operating point meets the duty within the "
                          "limits")
        print_notes(r["warnings"], r["cautions"])
        return
    lo, hi = r["kla_pi95_per_s"]
    pairs = [
        ("speed", f"{fq(r['speed_rps'], 'speed')}  (tip speed {fq(r['tip_speed_m_s'], 'velocity')})"),
        ("gas flow", f"{sig(r['gas_flow_nl_min'], 4)} NL/min  ({sig(r['vvm'], 3)} vvm, us "
                     f"{fq(r['superficial_gas_velocity_m_s'], 'velocity')})"),
        ("total power", fq(r["total_power_w"], "power")),
        ("  agitator (gassed / drive eff.)", fq(r["agitator_power_w"], "power")),
        ("  compressor", fq(r["compressor_power_w"], "power")),
        ("motor (ungassed / drive eff.)", fq(r["motor_power_w"], "power")),
        ("kLa median (95 % PI)", f"{sig(r['kla_per_s'] * 3600, 3)} 1/h ({sig(lo * 3600, 3)}-"
                                 f"{sig(hi * 3600, 3)})"),
        ("kLa needed", f"{sig(r['kla_required_per_s'] * 3600, 3)} 1/h"),
        ("OTR capacity at set-point", f"{sig(r['otr_capacity_mol_m3_s'] * 3600, 3)} mmol/(L h)"),
        ("exit O2 / fraction used", f"{sig(r['exit_o2_fraction'], 3)} / "
                                    f"{sig(r['fraction_o2_used'], 3)}"),
        ("P(meets duty)", f"{sig(r['probability_meets_duty'], 3)} (+- "
                          f"{sig(r['probability_standard_error'], 2)})"),
        ("heat load", fq(r["heat_load_w"], "power")),
        ("regime, flooding margin", f"{r['regime']}, {sig(r['flooding_margin'], 3)}"),
        ("binding", ", ".join(r["binding_constraints"]) or "none"),
    ]
    pairs += [("extrapolated", m) for m in (r["extrapolation"] or {}).get("messages", [])]
    print_pairs(pairs, title="Design at least total power (estimates)")
    print_notes(list(dict.fromkeys(r["warnings"] + r["heat"]["notes"])), r["cautions"])
