"""`scaleup transport convective|fick|film|convert-kl`: stateless transport sums.

Every option takes lab units (read by :func:`scaleup.units.parse`); ``--json`` prints SI
values under keys that end in their unit.
"""

from __future__ import annotations

import click

from scaleup.commands.common import emit_json, json_option, print_notes, print_table
from scaleup.commands.props import GAS_NAMES, gas_name, parse_option, sig_text


@click.group("transport")
def transport_group() -> None:
    """Transport basics: convective fluxes, Fick's law, film/penetration kL, kL between solutes.

    \b
    Examples:
      scaleup transport convective --velocity "0.02 m/s" --temp "37 degC" --ref-temp "25 degC"
      scaleup transport fick --solute O2 --temp "30 degC" --c1 "0.24 mol/m3" --c2 "0 mol/m3" \\
          --thickness "20 um"
      scaleup transport film --solute O2 --temp "30 degC" --kl "2e-4 m/s"
      scaleup transport convert-kl --kla "120 1/h" --from O2 --to H2 --temp "50 degC"
    """


def _solute_options(func):
    for option in reversed([
        click.option("--diffusivity", default=None, help='Diffusivity, e.g. "2.1e-9 m2/s" '
                                                         "(or give --solute)."),
        click.option("--solute", default=None, help="Gas whose diffusivity to use, e.g. O2."),
        click.option("--solvent", default="water", show_default=True, help="Its solvent."),
        click.option("--temp", "temperature", default="25 degC", show_default=True,
                     help="Temperature for the diffusivity and water properties."),
    ]):
        func = option(func)
    return func


def _resolve_diffusivity(text, solute, solvent, temperature_k) -> tuple[float, str, list]:
    """A diffusivity given directly, or that of a solute by the default method, with notes."""
    from scaleup.errors import InputError
    from scaleup.props import diffusivity as dif

    if (text is None) == (solute is None):
        raise InputError("give exactly one of --diffusivity and --solute", "--diffusivity")
    if text is not None:
        return parse_option(text, "diffusivity", "--diffusivity"), "given", []
    found = dif.estimate(gas_name(solute, "--solute") if solute.upper() in GAS_NAMES else solute,
                         solvent, temperature_k)
    return found.diffusivity_m2_s, f"{found.method}: {found.source}", list(found.warnings)


@transport_group.command("convective")
@click.option("--velocity", required=True, help='Velocity normal to the area, "0.02 m/s".')
@click.option("--density", default=None, help="Fluid density (default: water at --temp).")
@click.option("--concentration", default=None, help='Species concentration, "0.25 mol/m3".')
@click.option("--cp", default=None, help="Heat capacity (default: water at --temp).")
@click.option("--temp", "temperature", default="25 degC", show_default=True,
              help="Stream temperature.")
@click.option("--ref-temp", default=None, help="Reference temperature of the enthalpy flux.")
@json_option
def convective_command(velocity, density, concentration, cp, temperature, ref_temp,
                       as_json) -> None:
    """Convective mass flux W/A = rho v, molar flux N = c v, enthalpy flux (W/A) cp (T - Tref).

    \b
    Examples:
      scaleup transport convective --velocity "0.5 m/s"
      scaleup transport convective --velocity "2 cm/s" --concentration "0.2 mmol/L" \\
          --temp "37 degC" --ref-temp "25 degC" --json
    """
    from scaleup.props import transport, water

    T = parse_option(temperature, "temperature", "--temp")
    v = parse_option(velocity, "velocity", "--velocity")
    rho = parse_option(density, "density", "--density") if density else water.density(T)
    W = transport.mass_flux_convective(rho, v)
    payload = {"velocity_m_s": v, "density_kg_m3": rho, "temperature_k": T,
               "mass_flux_kg_m2_s": W, "warnings": []}
    if concentration is not None:
        c = parse_option(concentration, "concentration", "--concentration")
        payload.update({"concentration_mol_m3": c,
                        "molar_flux_mol_m2_s": transport.molar_flux_convective(c, v)})
    if ref_temp is not None:
        heat = parse_option(cp, "specific_heat", "--cp") if cp else water.heat_capacity(T)
        T_ref = parse_option(ref_temp, "temperature", "--ref-temp")
        payload.update({"heat_capacity_j_kg_k": heat, "reference_temperature_k": T_ref,
                        "heat_flux_w_m2": transport.heat_flux_convective(W, heat, T, T_ref)})
    if as_json:
        emit_json(payload)
        return
    rows = [("mass flux W/A", sig_text(W, "kg/(m2 s)"))]
    if "molar_flux_mol_m2_s" in payload:
        rows.append(("molar flux N", sig_text(payload["molar_flux_mol_m2_s"], "mol/(m2 s)")))
    if "heat_flux_w_m2" in payload:
        rows.append(("enthalpy flux q", sig_text(payload["heat_flux_w_m2"], "W/m2")))
    print_table(rows, ["quantity", "value"], title="convective fluxes")


def _read_profile(path: str):
    """Two columns, z [m] and c [mol/m3], with a header line; comma, semicolon or tab."""
    import csv

    import numpy as np

    from scaleup.errors import InputError

    with open(path, encoding="utf-8-sig", newline="") as handle:
        text = handle.read()
    dialect = csv.Sniffer().sniff(text[:2048], delimiters=",;\t")
    rows = list(csv.reader(text.splitlines(), dialect))
    try:
        data = np.array([[float(a), float(b)] for a, b, *_ in rows[1:] if a.strip()])
    except ValueError as exc:
        raise InputError(f"{path}: every row after the header needs two numbers, z [m] and "
                         "c [mol/m3]", "--profile", path) from exc
    if data.ndim != 2 or len(data) < 3:
        raise InputError(f"{path}: a profile needs at least 3 points", "--profile", path)
    return data[:, 0], data[:, 1]


@transport_group.command("fick")
@_solute_options
@click.option("--c1", default=None, help='Concentration at z = 0, e.g. "0.24 mol/m3".')
@click.option("--c2", default=None, help="Concentration at z = thickness.")
@click.option("--thickness", default=None, help='Film thickness, e.g. "20 um".')
@click.option("--gradient", default=None, help='Gradient dc/dz, e.g. "-1e4 mol/m4".')
@click.option("--profile", type=click.Path(dir_okay=False, exists=True), default=None,
              help="CSV with header and columns z [m], c [mol/m3].")
@json_option
def fick_command(diffusivity, solute, solvent, temperature, c1, c2, thickness, gradient,
                 profile, as_json) -> None:
    """Fick's first law J = -D dc/dz: a linear film, a gradient, or a sampled profile.

    \b
    Examples:
      scaleup transport fick --solute O2 --temp "30 degC" --c1 "0.24 mol/m3" --c2 "0 mol/m3" \\
          --thickness "20 um"
      scaleup transport fick --diffusivity "2e-9 m2/s" --gradient "-1e4 mol/m4" --json
      scaleup transport fick --solute CO2 --profile profile.csv
    """
    from scaleup.errors import InputError
    from scaleup.props import transport

    T = parse_option(temperature, "temperature", "--temp")
    D, source, notes = _resolve_diffusivity(diffusivity, solute, solvent, T)
    payload = {"diffusivity_m2_s": D, "diffusivity_source": source, "temperature_k": T,
               "warnings": notes}
    given = [c1 is not None and c2 is not None and thickness is not None,
             gradient is not None, profile is not None]
    if sum(given) != 1:
        raise InputError("give one of: --c1, --c2 and --thickness; --gradient; --profile",
                         "--c1")
    if given[0]:
        c_0, c_d = (parse_option(c1, "concentration", "--c1"), parse_option(c2, "concentration", "--c2"))
        delta = parse_option(thickness, "length", "--thickness")
        payload.update({"c1_mol_m3": c_0, "c2_mol_m3": c_d, "thickness_m": delta,
                        "gradient_mol_m4": (c_d - c_0) / delta,
                        "flux_mol_m2_s": transport.flux_Fick_film(D, c_0, c_d, delta),
                        "kl_m_s": transport.kl_film_Lewis_Whitman(D, delta)})
    elif given[1]:
        g = parse_option(gradient, "concentration_gradient", "--gradient")
        payload.update({"gradient_mol_m4": g, "flux_mol_m2_s": transport.flux_Fick(D, g)})
    else:
        z, c = _read_profile(profile)
        flux = transport.flux_Fick_profile(D, z, c)
        payload["profile"] = [{"z_m": a, "c_mol_m3": b, "flux_mol_m2_s": f}
                              for a, b, f in zip(z, c, flux, strict=True)]
    if as_json:
        emit_json(payload)
        return
    if "profile" in payload:
        rows = [(sig_text(p["z_m"], "m"), sig_text(p["c_mol_m3"], "mol/m3"),
                 sig_text(p["flux_mol_m2_s"], "mol/(m2 s)")) for p in payload["profile"]]
        print_table(rows, ["z", "c", "J"], title=f"Fick flux, D = {sig_text(D, 'm2/s')}")
        print_notes(notes)
        return
    rows = [("D", f"{sig_text(D, 'm2/s')} ({source})"),
            ("gradient dc/dz", sig_text(payload["gradient_mol_m4"], "mol/m4")),
            ("flux J", sig_text(payload["flux_mol_m2_s"], "mol/(m2 s)"))]
    if "kl_m_s" in payload:
        rows.append(("film kL = D/delta", sig_text(payload["kl_m_s"], "m/s")))
    print_table(rows, ["quantity", "value"], title="Fick's first law")
    print_notes(notes)


@transport_group.command("film")
@_solute_options
@click.option("--thickness", default=None, help='Film thickness delta, e.g. "20 um".')
@click.option("--kl", default=None, help='A measured kL, e.g. "2e-4 m/s".')
@click.option("--contact-time", default=None, help='Higbie contact time, e.g. "10 ms".')
@click.option("--renewal-rate", default=None, help='Danckwerts renewal rate, e.g. "20 1/s".')
@click.option("--flux", default=None, help='Measured flux N (with --delta-c), "1e-4 mol/(m2 s)".')
@click.option("--delta-c", default=None, help='Driving force for --flux, e.g. "0.2 mol/m3".')
@json_option
def film_command(diffusivity, solute, solvent, temperature, thickness, kl, contact_time,
                 renewal_rate, flux, delta_c, as_json) -> None:
    """kL from one model parameter (or from a flux), and what it means in each model.

    Give one of --thickness (film, kL = D/delta), --contact-time (penetration,
    kL = 2 sqrt(D/(pi t))), --renewal-rate (surface renewal, kL = sqrt(D s)), --kl, or
    --flux with --delta-c (k = N/dC); the other model parameters for that kL follow.

    \b
    Examples:
      scaleup transport film --solute O2 --temp "30 degC" --kl "2e-4 m/s"
      scaleup transport film --diffusivity "2e-9 m2/s" --thickness "20 um" --json
      scaleup transport film --solute O2 --flux "2.4e-5 mol/(m2 s)" --delta-c "0.24 mol/m3"
    """
    from scaleup.errors import InputError
    from scaleup.props import transport

    T = parse_option(temperature, "temperature", "--temp")
    D, source, notes = _resolve_diffusivity(diffusivity, solute, solvent, T)
    choices = {"film": thickness, "kl": kl, "penetration": contact_time,
               "renewal": renewal_rate, "flux": flux}
    given = [name for name, value in choices.items() if value is not None]
    if len(given) != 1 or (given == ["flux"]) != (delta_c is not None):
        raise InputError("give one of --thickness, --kl, --contact-time, --renewal-rate, or "
                         "--flux with --delta-c", "--kl")
    model = given[0]
    if model == "film":
        k = transport.kl_film_Lewis_Whitman(D, parse_option(thickness, "length", "--thickness"))
    elif model == "penetration":
        k = transport.kl_penetration_Higbie(D, parse_option(contact_time, "time",
                                                            "--contact-time"))
    elif model == "renewal":
        k = transport.kl_renewal_Danckwerts(D, parse_option(renewal_rate, "frequency",
                                                            "--renewal-rate"))
    elif model == "flux":
        k = transport.mass_transfer_coefficient(
            parse_option(flux, "molar_flux", "--flux"),
            parse_option(delta_c, "concentration", "--delta-c"))
    else:
        k = parse_option(kl, "mass_transfer_coefficient", "--kl")
    payload = {"from": model, "diffusivity_m2_s": D, "diffusivity_source": source,
               "temperature_k": T, "kl_m_s": k,
               "film_thickness_m": transport.film_thickness(D, k),
               "contact_time_s": transport.contact_time_Higbie(D, k),
               "renewal_rate_per_s": transport.renewal_rate_Danckwerts(D, k), "warnings": notes}
    if as_json:
        emit_json(payload)
        return
    rows = [("D", f"{sig_text(D, 'm2/s')} ({source})"), ("kL", sig_text(k, "m/s")),
            ("film thickness D/kL", sig_text(payload["film_thickness_m"] * 1e6, "um")),
            ("Higbie contact time", sig_text(payload["contact_time_s"] * 1e3, "ms")),
            ("Danckwerts renewal rate", sig_text(payload["renewal_rate_per_s"], "1/s"))]
    print_table(rows, ["quantity", "value"], title=f"kL models (from {model})")
    print_notes(notes)


@transport_group.command("convert-kl")
@click.option("--kl", default=None, help='kL measured with --from, e.g. "2e-4 m/s".')
@click.option("--kla", default=None, help='kLa measured with --from, e.g. "120 1/h".')
@click.option("--from", "from_solute", default=None, help="Measured solute, e.g. O2.")
@click.option("--to", "to_solute", default=None, help="Target solute, e.g. H2.")
@click.option("--solvent", default="water", show_default=True, help="Solvent of both.")
@click.option("--temp", "temperature", default="25 degC", show_default=True,
              help="Temperature of the diffusivities.")
@click.option("--d-from", default=None, help="Diffusivity of the measured solute (instead "
                                             "of --from).")
@click.option("--d-to", default=None, help="Diffusivity of the target solute (instead of --to).")
@click.option("--exponent", type=float, default=0.5, show_default=True,
              help="Exponent n of the central estimate, 0.5 (penetration) to 1 (film).")
@json_option
def convert_kl_command(kl, kla, from_solute, to_solute, solvent, temperature, d_from, d_to,
                       exponent, as_json) -> None:
    """Carry a kL or kLa measured for one solute to another: (D2/D1)^n, n = 1/2 to 1.

    The film model (n = 1) and the penetration/renewal models (n = 1/2) bound the result;
    the range between them is the uncertainty of the conversion.

    \b
    Examples:
      scaleup transport convert-kl --kla "120 1/h" --from O2 --to H2 --temp "50 degC"
      scaleup transport convert-kl --kl "2e-4 m/s" --d-from "2.1e-9 m2/s" \\
          --d-to "4.5e-9 m2/s" --json
    """
    from scaleup.cautions import cautions_for
    from scaleup.errors import InputError
    from scaleup.props import transport

    if (kl is None) == (kla is None):
        raise InputError("give exactly one of --kl and --kla", "--kl")
    T = parse_option(temperature, "temperature", "--temp")
    D1, source1, notes1 = _side(d_from, from_solute, "--d-from", "--from", solvent, T)
    D2, source2, notes2 = _side(d_to, to_solute, "--d-to", "--to", solvent, T)
    value = (parse_option(kl, "mass_transfer_coefficient", "--kl") if kl is not None
             else parse_option(kla, "kla", "--kla"))
    r = transport.convert_kl(value, D1, D2, exponent)
    prefix, unit = ("kl", "m_s") if kl is not None else ("kla", "per_s")
    payload = {f"{prefix}_from_{unit}": value, f"{prefix}_estimate_{unit}": r.estimate,
               f"{prefix}_film_{unit}": r.film, f"{prefix}_penetration_{unit}": r.penetration,
               f"{prefix}_low_{unit}": r.low, f"{prefix}_high_{unit}": r.high,
               "exponent": r.exponent, "diffusivity_from_m2_s": D1, "diffusivity_to_m2_s": D2,
               "diffusivity_ratio": r.diffusivity_ratio, "diffusivity_from_source": source1,
               "diffusivity_to_source": source2, "temperature_k": T,
               "warnings": notes1 + notes2,
               "cautions": list(dict.fromkeys(
                   c for gas in (from_solute, to_solute) for c in cautions_for(gas=gas,
                                                                              scale=False)))}
    if as_json:
        emit_json(payload)
        return
    show = (lambda v: sig_text(v, "m/s")) if kl is not None else (
        lambda v: sig_text(v * 3600.0, "1/h"))
    rows = [("D ratio D2/D1", f"{sig_text(r.diffusivity_ratio)} ({sig_text(D2, 'm2/s')} / "
                              f"{sig_text(D1, 'm2/s')})"),
            (f"estimate (n = {sig_text(exponent)})", show(r.estimate)),
            ("film (n = 1)", show(r.film)), ("penetration/renewal (n = 1/2)",
                                             show(r.penetration)),
            ("range", f"{show(r.low)} to {show(r.high)}")]
    print_table(rows, ["quantity", "value"], title=f"{prefix} converted")
    print_notes(payload["warnings"], payload["cautions"])


def _side(text, solute, d_flag, solute_flag, solvent, T) -> tuple[float, str, list]:
    from scaleup.errors import InputError

    if (text is None) == (solute is None):
        raise InputError(f"give exactly one of {d_flag} and {solute_flag}", solute_flag)
    if text is not None:
        return parse_option(text, "diffusivity", d_flag), "given", []
    return _resolve_diffusivity(None, solute, solvent, T)
