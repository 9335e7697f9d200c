"""`scaleup props water|solubility|diffusivity|diaphragm-cell`: stateless property sums.

The ``transport`` group is in :mod:`scaleup.commands.transport`.

Every option takes lab units (read by :func:`scaleup.units.parse`); ``--json`` prints SI
values under keys that end in their unit.
"""

from __future__ import annotations

import click

from scaleup.commands.common import emit_json, json_option, print_notes, print_table

GAS_NAMES = ("O2", "N2", "CO2", "H2", "CH4")
SOLUBILITY_METHODS = ("benson-krause", "garcia-gordon", "henry", "henry-iapws")
DIFFUSIVITY_METHODS = ("measured", "stokes-einstein", "wilke-chang", "wilke-chang-2.26",
                       "hayduk-laudie", "hayduk-minhas", "fuller")


def parse_option(text: str | None, kind: str, flag: str, **context) -> float | None:
    if text is None:
        return None
    from scaleup import units

    return units.parse(text, kind, flag, **context)


def gas_name(name: str, flag: str) -> str:
    """Gas names typed in any case (o2, Co2) in the spelling of the property tables."""
    from scaleup.errors import InputError

    for known in GAS_NAMES:
        if name.upper() == known.upper():
            return known
    raise InputError(f"unknown gas {name!r}; known: {', '.join(GAS_NAMES)}", flag, name)


def lab(value_si: float | None, kind: str, unit: str | None = None) -> str:
    from scaleup import units

    return units.format_quantity(value_si, kind, unit)


def sig_text(value: float | None, unit: str = "") -> str:
    from scaleup.units import sig

    return f"{sig(value)} {unit}".strip() if value is not None else "-"


@click.group("props")
def props_group() -> None:
    """Physical properties: water, gas solubility (C*), diffusivity.

    \b
    Examples:
      scaleup props water --temp "37 degC"
      scaleup props solubility --gas O2 --temp "30 degC" --salt "NaCl=0.5 mol/L"
      scaleup props diffusivity --solute O2 --solvent water --temp "25 degC" --all
    """


@props_group.command("water")
@click.option("--temp", "temperature", required=True, help='Temperature, e.g. "37 degC".')
@click.option("--pressure", default="1 atm", show_default=True, help="Absolute pressure.")
@click.option("--salinity", default=None, help='Sea-salt salinity, e.g. "35 g/kg".')
@click.option("--density", default=None, help='Measured density, e.g. "1010 kg/m3".')
@click.option("--viscosity", default=None, help='Measured viscosity, e.g. "1.2 mPa s".')
@click.option("--surface-tension", default=None, help='Measured value, e.g. "55 mN/m".')
@json_option
def water_command(temperature, pressure, salinity, density, viscosity, surface_tension,
                  as_json) -> None:
    """Density, viscosity, surface tension and vapour pressure of water or a medium.

    IAPWS formulations for liquid water, 0 to 100 degC; a salinity switches density and
    viscosity to the sea-salt correlation of Sharqawy et al. (2010); a measured value
    overrides the computed one.

    \b
    Examples:
      scaleup props water --temp "37 degC"
      scaleup props water --temp "30 degC" --viscosity "1.4 mPa s" --json
    """
    from scaleup.props.water import liquid_properties

    T = parse_option(temperature, "temperature", "--temp")
    P = parse_option(pressure, "pressure", "--pressure")
    S = parse_option(salinity, "salinity", "--salinity") or 0.0
    overrides = {name: parse_option(text, name, flag) for name, text, flag in (
        ("density", density, "--density"), ("viscosity", viscosity, "--viscosity"),
        ("surface_tension", surface_tension, "--surface-tension")) if text is not None}
    props = liquid_properties(T, P, S, overrides)
    if as_json:
        emit_json({
            "temperature_k": T, "pressure_pa": P, "salinity_kg_kg": S,
            "density_kg_m3": props.density_kg_m3, "viscosity_pa_s": props.viscosity_pa_s,
            "kinematic_viscosity_m2_s": props.kinematic_viscosity_m2_s,
            "surface_tension_n_m": props.surface_tension_n_m,
            "vapour_pressure_pa": props.vapour_pressure_pa,
            "heat_capacity_j_kg_k": props.heat_capacity_j_kg_k,
            "sources": props.sources, "warnings": []})
        return
    rows = [
        ("density", lab(props.density_kg_m3, "density"), props.sources["density"]),
        ("viscosity", lab(props.viscosity_pa_s, "viscosity"), props.sources["viscosity"]),
        ("kinematic viscosity", sig_text(props.kinematic_viscosity_m2_s, "m2/s"), ""),
        ("surface tension", lab(props.surface_tension_n_m, "surface_tension"),
         props.sources["surface_tension"]),
        ("vapour pressure", lab(props.vapour_pressure_pa, "pressure", "kPa"),
         props.sources["vapour_pressure"]),
        ("heat capacity", lab(props.heat_capacity_j_kg_k, "specific_heat"),
         props.sources["heat_capacity"]),
    ]
    title = f"water at {lab(T, 'temperature')}, {lab(P, 'pressure')}" + (
        f", salinity {sig_text(S * 1000, 'g/kg')}" if S else "")
    print_table(rows, ["quantity", "value", "source"], title=title)


@props_group.command("solubility")
@click.option("--gas", required=True, help="O2, N2, CO2, H2 or CH4.")
@click.option("--temp", "temperature", required=True, help='Liquid temperature, "30 degC".')
@click.option("--pressure", default="1 atm", show_default=True,
              help='Total absolute pressure of the gas (head space), e.g. "1.5 bara".')
@click.option("--o2-fraction", default=None,
              help="O2 mole fraction of the dry gas (default 0.20946, air).")
@click.option("--fraction", default=None,
              help="Mole fraction of --gas in the dry gas (default: air for O2, else pure).")
@click.option("--salinity", default=None, help='Sea-salt salinity, e.g. "10 g/kg".')
@click.option("--salt", "salts", multiple=True,
              help='A dissolved salt or ion, e.g. "NaCl=0.5 mol/L" or "K2HPO4=2 g/L"; repeat.')
@click.option("--method", type=click.Choice(SOLUBILITY_METHODS), default=None,
              help="C* method (default: benson-krause for O2, henry for other gases, "
                   "henry-iapws where those do not cover the temperature).")
@click.option("--depth", default=None, help='Depth below the surface, e.g. "3 m".')
@click.option("--liquid-height", default=None,
              help="Liquid height above the sparger: also gives the log-mean C*.")
@click.option("--exit-fraction", default=None,
              help="Mole fraction in the exit gas, for the log-mean C* (default: inlet).")
@json_option
def solubility_command(gas, temperature, pressure, o2_fraction, fraction, salinity, salts,
                       method, depth, liquid_height, exit_fraction, as_json) -> None:
    """Saturation concentration C* of a gas in water, sea water or a salt medium.

    \b
    Examples:
      scaleup props solubility --gas O2 --temp "30 degC"
      scaleup props solubility --gas O2 --temp "37 degC" --o2-fraction 0.4 --pressure "0.5 barg"
      scaleup props solubility --gas O2 --temp "30 degC" --salt "NaCl=0.5 mol/L" --json
      scaleup props solubility --gas H2 --temp "60 degC" --pressure "5 bara" --method henry-iapws
      scaleup props solubility --gas O2 --temp "30 degC" --liquid-height "10 m" --exit-fraction 0.17
    """
    from scaleup.cautions import cautions_for
    from scaleup.errors import InputError
    from scaleup.props import solubility as sol
    from scaleup.props.salting import salt_from_text

    gas = gas_name(gas, "--gas")
    if o2_fraction is not None and (gas != "O2" or fraction is not None):
        raise InputError("--o2-fraction is for --gas O2 alone; use --fraction for other gases",
                         "--o2-fraction", o2_fraction)
    y = parse_option(fraction if fraction is not None else o2_fraction, "fraction",
               "--fraction" if fraction is not None else "--o2-fraction")
    T = parse_option(temperature, "temperature", "--temp")
    head = parse_option(pressure, "pressure", "--pressure")
    S = parse_option(salinity, "salinity", "--salinity") or 0.0
    salt_mol_m3: dict[str, float] = {}
    for text in salts:
        name, value = salt_from_text(text)
        salt_mol_m3[name] = salt_mol_m3.get(name, 0.0) + value
    P = head
    if depth is not None:
        P = sol.pressure_at_depth(head, parse_option(depth, "length", "--depth"), T=T)
    result = sol.saturation(gas, T, P, y, salt_mol_m3 or None, S, method)
    payload = {
        "gas": gas, "method": result.method, "temperature_k": T, "pressure_pa": P,
        "head_pressure_pa": head, "mole_fraction": result.mole_fraction,
        "partial_pressure_pa": result.partial_pressure_pa,
        "c_star_mol_m3": result.c_star_mol_m3, "c_star_mg_l": result.c_star_mg_l,
        "salting_out_factor": result.salting_out_factor, "salinity_kg_kg": S,
        "salts_mol_m3": salt_mol_m3, "warnings": list(result.warnings)}
    if liquid_height is not None:
        lm = sol.log_mean_saturation(gas, T, head, parse_option(liquid_height, "length",
                                                          "--liquid-height"),
                                     y, parse_option(exit_fraction, "fraction", "--exit-fraction"),
                                     salt_mol_m3 or None, S, result.method)
        payload.update({"bottom_pressure_pa": lm.bottom_pressure_pa,
                        "c_star_bottom_mol_m3": lm.bottom.c_star_mol_m3,
                        "c_star_top_mol_m3": lm.top.c_star_mol_m3,
                        "c_star_log_mean_mol_m3": lm.c_star_log_mean_mol_m3})
        payload["warnings"] = list(dict.fromkeys(payload["warnings"] + list(lm.warnings)))
    payload["cautions"] = cautions_for(o2_fraction=result.mole_fraction if gas == "O2" else None,
                                       gas=gas, pressure_pa=payload.get("bottom_pressure_pa", P),
                                       scale=False)
    if as_json:
        emit_json(payload)
        return
    rows = [("C*", f"{sig_text(result.c_star_mg_l, 'mg/L')} = "
                   f"{lab(result.c_star_mol_m3, 'concentration')}"),
            ("method", result.method), ("pressure", lab(P, "pressure")),
            ("mole fraction (dry gas)", sig_text(result.mole_fraction)),
            ("partial pressure", lab(result.partial_pressure_pa, "pressure", "kPa"))]
    if salt_mol_m3:
        rows.append(("salting-out factor c/c0", sig_text(result.salting_out_factor)))
    if "c_star_log_mean_mol_m3" in payload:
        rows += [("C* bottom", lab(payload["c_star_bottom_mol_m3"], "concentration")),
                 ("C* top", lab(payload["c_star_top_mol_m3"], "concentration")),
                 ("C* log-mean", lab(payload["c_star_log_mean_mol_m3"], "concentration"))]
    print_table(rows, ["quantity", "value"], title=f"{gas} at {lab(T, 'temperature')}")
    print_notes(payload["warnings"], payload["cautions"])


@props_group.command("diffusivity")
@click.option("--solute", required=True, help="O2, N2, CO2, H2, CH4 (others need "
                                              "--molar-volume).")
@click.option("--solvent", default="water", show_default=True,
              help="water, methanol, ethanol, n-hexane ... or a gas: air, N2, ...")
@click.option("--temp", "temperature", required=True, help='Temperature, e.g. "25 degC".')
@click.option("--method", type=click.Choice(DIFFUSIVITY_METHODS), default=None,
              help="One method (default: measured, then Stokes-Einstein from measured values, "
                   "then Wilke-Chang; Fuller for gases).")
@click.option("--all", "show_all", is_flag=True, help="Every applicable method side by side.")
@click.option("--viscosity", default=None,
              help="Viscosity of the solvent or medium (default: water at --temp).")
@click.option("--density", default=None, help="Liquid density for the Schmidt number "
                                              "(default: water at --temp).")
@click.option("--molar-volume", default=None,
              help='Solute molar volume at its boiling point, e.g. "25.6 cm3/mol".')
@click.option("--pressure", default="1 atm", show_default=True, help="Pressure (gas phase).")
@json_option
def diffusivity_command(solute, solvent, temperature, method, show_all, viscosity, density,
                        molar_volume, pressure, as_json) -> None:
    """Diffusivity of a dissolved gas: measured, estimated, or all methods compared.

    \b
    Examples:
      scaleup props diffusivity --solute O2 --solvent water --temp "25 degC"
      scaleup props diffusivity --solute H2 --temp "37 degC" --all
      scaleup props diffusivity --solute O2 --temp "30 degC" --viscosity "2 mPa s"
      scaleup props diffusivity --solute CO2 --solvent air --temp "20 degC" --json
    """
    from scaleup.errors import InputError
    from scaleup.props import diffusivity as dif
    from scaleup.props import water

    if show_all and method is not None:
        raise InputError("give --method or --all, not both", "--all", method)
    solute = gas_name(solute, "--solute") if solute.upper() in GAS_NAMES else solute
    T = parse_option(temperature, "temperature", "--temp")
    options = {"viscosity": parse_option(viscosity, "viscosity", "--viscosity"),
               "molar_volume": parse_option(molar_volume, "molar_volume", "--molar-volume"),
               "pressure": parse_option(pressure, "pressure", "--pressure")}
    mu, rho = options["viscosity"], parse_option(density, "density", "--density")
    if solvent == "water":
        mu = water.viscosity(T) if mu is None else mu
        rho = water.density(T) if rho is None else rho

    def schmidt(D: float) -> float | None:
        return None if mu is None or rho is None else dif.schmidt_number(mu, rho, D)

    chosen = dif.estimate(solute, solvent, T, method, **options)
    payload = {"solute": solute, "solvent": solvent, "temperature_k": T,
               "method": chosen.method, "diffusivity_m2_s": chosen.diffusivity_m2_s,
               "schmidt": schmidt(chosen.diffusivity_m2_s), "source": chosen.source,
               "warnings": list(chosen.warnings)}
    if show_all:
        c = dif.compare(solute, solvent, T, **options)
        payload["methods"] = [{"method": e.method, "label": e.label,
                               "diffusivity_m2_s": e.diffusivity_m2_s,
                               "schmidt": schmidt(e.diffusivity_m2_s), "source": e.source,
                               "warnings": list(e.warnings)} for e in c.estimates]
        payload.update({"mean_diffusivity_m2_s": c.mean_m2_s,
                        "min_diffusivity_m2_s": c.minimum_m2_s,
                        "max_diffusivity_m2_s": c.maximum_m2_s,
                        "spread_fraction": c.spread_fraction})
        payload["warnings"] = list(dict.fromkeys(
            w for e in c.estimates for w in e.warnings))
        if solute == "H2" and solvent == "water":
            payload["warnings"].append("the estimators fall well below measured H2 "
                                       "diffusivities in water; prefer the measured value")
    if as_json:
        emit_json(payload)
        return
    entries = payload.get("methods") or [payload | {"label": chosen.label}]
    rows = [(e["method"], sig_text(e["diffusivity_m2_s"], "m2/s"), sig_text(e["schmidt"]),
             e["source"]) for e in entries]
    footer = None
    if show_all:
        footer = (f"mean {sig_text(payload['mean_diffusivity_m2_s'], 'm2/s')}, spread "
                  f"{sig_text(100 * payload['spread_fraction'], '%')} of the mean "
                  f"(max - min); default: {chosen.method}")
    print_table(rows, ["method", "D", "Sc", "source"], footer=footer,
                title=f"{solute} in {solvent} at {lab(T, 'temperature')}")
    print_notes(payload["warnings"])


@props_group.command("diaphragm-cell")
@click.option("--cell-constant", default=None, help='Known cell constant, e.g. "3000 1/m2".')
@click.option("--ref-diffusivity", default=None,
              help='Calibration: diffusivity of the reference solute, e.g. "1.87e-9 m2/s".')
@click.option("--ref-time", default=None, help='Calibration: run time, e.g. "24 h".')
@click.option("--ref-dc0", default=None, help="Calibration: concentration difference at start.")
@click.option("--ref-dc", default=None, help="Calibration: concentration difference at end.")
@click.option("--time", "run_time", required=True, help='Run time, e.g. "20 h".')
@click.option("--dc0", required=True, help='Concentration difference at start, "0.2 mol/L".')
@click.option("--dc", required=True, help="Concentration difference at the end.")
@json_option
def diaphragm_command(cell_constant, ref_diffusivity, ref_time, ref_dc0, ref_dc, run_time,
                      dc0, dc, as_json) -> None:
    """Diffusivity from a diaphragm-cell run: ln(dC0/dC) = beta D t.

    The cell constant beta comes from --cell-constant or from a calibration run with a
    solute of known diffusivity (--ref-*).

    \b
    Examples:
      scaleup props diaphragm-cell --ref-diffusivity "1.87e-9 m2/s" --ref-time "24 h" \\
          --ref-dc0 "0.1 mol/L" --ref-dc "0.06 mol/L" --time "20 h" --dc0 "0.2 mmol/L" \\
          --dc "0.125 mmol/L"
    """
    from scaleup.errors import InputError
    from scaleup.props import diffusivity as dif

    calibration = (ref_diffusivity, ref_time, ref_dc0, ref_dc)
    if cell_constant is not None:
        if any(v is not None for v in calibration):
            raise InputError("give --cell-constant or the calibration (--ref-*), not both",
                             "--cell-constant", cell_constant)
        beta = parse_option(cell_constant, "per_area", "--cell-constant")
    elif all(v is not None for v in calibration):
        beta = dif.diaphragm_cell_constant(
            parse_option(ref_diffusivity, "diffusivity", "--ref-diffusivity"),
            parse_option(ref_time, "time", "--ref-time"),
            parse_option(ref_dc0, "concentration", "--ref-dc0"),
            parse_option(ref_dc, "concentration", "--ref-dc"))
    else:
        raise InputError("give --cell-constant, or all of --ref-diffusivity, --ref-time, "
                         "--ref-dc0 and --ref-dc", "--cell-constant")
    D = dif.diffusivity_diaphragm_cell(beta, parse_option(run_time, "time", "--time"),
                                       parse_option(dc0, "concentration", "--dc0"),
                                       parse_option(dc, "concentration", "--dc"))
    if as_json:
        emit_json({"cell_constant_per_m2": beta, "diffusivity_m2_s": D, "warnings": []})
        return
    print_table([("cell constant", sig_text(beta, "1/m2")), ("diffusivity", sig_text(D, "m2/s"))],
                ["quantity", "value"], title="diaphragm cell")
