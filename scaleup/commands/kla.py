"""`scaleup kla curve|dynamic|gas-balance|sulfite` and `scaleup run analyse`.

The ``kla`` commands are stateless: they read a file or options and print a result.
Analysing stored curves goes through :meth:`scaleup.campaign.Campaign.analyse_curves`.
"""

from __future__ import annotations

import csv
from pathlib import Path

import click

from scaleup.commands.common import emit_json, json_option, print_notes, print_pairs

_PERCENT_C_STAR = 100.0  # a curve in % saturation is saturated at 100 %


def _window(text: str) -> tuple[float, float]:
    from scaleup.errors import InputError

    try:
        lo, hi = (float(v) for v in text.replace(",", ":").split(":"))
    except ValueError:
        raise InputError(f'"{text}" is not a window; write two fractions of the rise such as '
                         '"0.2:0.98"', "--window", text) from None
    return lo, hi


def _quantity(text: str | None, kind: str, field: str, **context) -> float | None:
    if text is None:
        return None
    from scaleup import units

    return units.parse(text, kind, field, **context)


def _fraction(text: str, field: str) -> float:
    from scaleup import units

    return units.parse(text, "fraction", field)


def _progress(total: int, label: str):
    """A rich progress bar on stderr for batches, silent when stderr is not a terminal."""
    from rich.console import Console
    from rich.progress import BarColumn, MofNCompleteColumn, Progress, TimeRemainingColumn

    console = Console(stderr=True)
    bar = Progress("[progress.description]{task.description}", BarColumn(),
                   MofNCompleteColumn(), TimeRemainingColumn(), console=console,
                   transient=True, disable=not console.is_terminal or total < 2)
    task = bar.add_task(label, total=total)
    return bar, (lambda done, _total: bar.update(task, completed=done))


def _read_csv_rows(path: str) -> list[list[str]]:
    text = Path(path).read_text(encoding="utf-8-sig")
    try:
        dialect = csv.Sniffer().sniff(text[:4096], delimiters=",;\t")
    except csv.Error:
        dialect = csv.excel
    return [row for row in csv.reader(text.splitlines(), dialect)]


def _c_star_in_unit(text: str, table) -> float:
    """A saturation DO typed by a person, in the unit of the curve's DO column."""
    from scaleup import units
    from scaleup.errors import InputError

    value, unit = units.split_number(text, "--c-star")
    if table.is_percent:
        if unit.strip() not in ("%", ""):
            raise InputError(f'"{text}": the curve is in % saturation; give C* in % too, '
                             'e.g. "100 %"', "--c-star", text)
        return value
    return units.parse(text, "dissolved_oxygen", "--c-star") / table.to_mol_m3


def _curve_payload(file: str, table, analysis, temperature_k: float | None) -> dict:
    from scaleup.measure.temperature import kla_20_ASCE

    out = {"file": file, **analysis.summary(), "concentration_unit": table.unit,
           "time_column": table.time_column, "do_column": table.do_column}
    if table.to_mol_m3 is not None:
        out["c_inf_mol_m3"] = out["c_inf"] * table.to_mol_m3
        out["c0_mol_m3"] = out["c0"] * table.to_mol_m3
    if temperature_k is not None:
        out["temperature_k"] = temperature_k
        out["kla_20_per_s"] = kla_20_ASCE(out["kla_per_s"], temperature_k)
    out["warnings"] = list(table.warnings) + out["warnings"]
    return out


def _print_curve(p: dict) -> None:
    from scaleup.units import sig

    unit = p["concentration_unit"]
    per_h = 3600.0
    lo, hi = p["kla_ci95_per_s"]
    rows = [("file", p["file"]), ("method", p["method"]),
            ("kLa", f"{sig(p['kla_per_s'] * per_h)} 1/h  "
                    f"(+- {sig(p['kla_stderr_per_s'] * per_h, 2)})"),
            ("95 % interval", f"{sig(lo * per_h)} to {sig(hi * per_h)} 1/h"),
            ("C_inf", f"{sig(p['c_inf'])} {unit}"), ("C0", f"{sig(p['c0'])} {unit}"),
            ("samples fitted", str(p["n_points"])),
            ("window", f"{p['window'][0]:g} to {p['window'][1]:g} of the rise, "
                       f"{sig(p['window_s'][0])} to {sig(p['window_s'][1])} s"),
            ("start", f"{sig(p['start_s'])} s" + (" (detected)" if p["start_detected"] else "")),
            ("probe tau_p", f"{sig(p['tau_p_s'])} s"),
            ("residual std. error", f"{sig(p['rmse'], 3)} {unit}")]
    other = "log_linear_kla_per_s" if p["method"] == "nonlinear" else "nonlinear_kla_per_s"
    if p[other] is not None:
        rows.append((other.replace("_kla_per_s", "").replace("_", "-") + " kLa",
                     f"{sig(p[other] * per_h)} 1/h"))
    if p["lag_bias"] is not None:
        bias = p["lag_bias"]
        rows.append(("uncorrected-fit bias", f"{100 * bias:+.1f} %" if abs(bias) >= 0.0005
                     else "under 0.1 %"))
    if "kla_20_per_s" in p:
        rows.append(("kLa at 20 degC (theta 1.024)", f"{sig(p['kla_20_per_s'] * per_h)} 1/h"))
    print_pairs(rows, title="Gassing-out curve")
    print_notes(p["warnings"])


@click.group("kla")
def kla_group() -> None:
    """kLa from measurements: DO curves, off-gas balance, sulfite oxidation.

    \b
    Examples:
      scaleup kla curve run12.csv --probe-tau "8 s"
      scaleup kla gas-balance --gas-flow "25 NL/min" --y-o2-in 0.2095 --y-o2-out 0.19 \\
          --y-co2-in 0.0004 --y-co2-out 0.015 --volume "200 L"
      scaleup kla sulfite --rate "0.2 mol/L/h" --c-star "1.0 mg/L"
    """


_curve_options = [
    click.option("--probe-tau", default=None,
                 help='Probe time constant, e.g. "8 s" (default: an ideal probe).'),
    click.option("--window", default="0.2:0.98", show_default=True,
                 help="Fractions of the rise to fit, low:high."),
    click.option("--time-col", default=None,
                 help="Time column (default: the one with a time unit)."),
    click.option("--do-col", default=None, help="DO column (default: the one with a DO unit)."),
]


def _with_curve_options(func):
    for option in reversed(_curve_options):
        func = option(func)
    return func


@kla_group.command("curve")
@click.argument("files", nargs=-1, required=True, type=click.Path(dir_okay=False, exists=True))
@_with_curve_options
@click.option("--method", type=click.Choice(["nonlinear", "log-linear"]), default="nonlinear",
              show_default=True, help="Which estimate is primary (the other is shown beside).")
@click.option("--start", default=None, help='Gas-on time on the file\'s clock, e.g. "30 s" '
              "(default: detected).")
@click.option("--c-star", default=None, help='Saturation DO in the file\'s unit for the '
              'log-linear method, e.g. "7.9 mg/L" (default: 100 % for % files, else the '
              "final plateau).")
@click.option("--temperature", default=None,
              help='Liquid temperature, e.g. "25 degC", to add kLa at 20 degC (ASCE 2-06).')
@json_option
def kla_curve(files, probe_tau, window, time_col, do_col, method, start, c_star, temperature,
              as_json):
    """kLa from gassing-out curves (CSV with `t [s]` and `DO [%]`-style headers).

    Fits C = C_inf - (C_inf - C0) exp(-kLa t) by nonlinear least squares, with a
    first-order probe lag when --probe-tau is given, and reports the log-linear method
    beside it. Several files are analysed as one batch with a progress bar.

    \b
    Examples:
      scaleup kla curve run12.csv
      scaleup kla curve run12.csv --probe-tau "8 s" --window 0.1:0.95 --json
      scaleup kla curve logs/*.csv --json
    """
    from scaleup.errors import InputError
    from scaleup.measure.curve_table import read_curve_rows
    from scaleup.measure.curves import analyse_curves

    tau = _quantity(probe_tau, "time", "--probe-tau") or 0.0
    start_s = _quantity(start, "time", "--start")
    temperature_k = _quantity(temperature, "temperature", "--temperature")
    tables = [read_curve_rows(_read_csv_rows(f), time_col=time_col, do_col=do_col, source=f)
              for f in files]
    stars = [(_PERCENT_C_STAR if tab.is_percent else None) if c_star is None
             else _c_star_in_unit(c_star, tab) for tab in tables]
    bar, progress = _progress(len(tables), "fitting curves")
    with bar:
        results = analyse_curves([(t.time_s, t.values) for t in tables], tau_p_s=tau,
                                 window=_window(window), start_s=start_s, method=method,
                                 c_star=stars, progress=progress)
    payloads = []
    for f, tab, res in zip(files, tables, results, strict=True):
        if hasattr(res, "code"):
            if len(files) == 1:
                raise InputError(res.reason, f)
            payloads.append({"file": f, "rejected": res.reason, "code": res.code})
        else:
            payloads.append(_curve_payload(f, tab, res, temperature_k))
    if len(files) == 1:
        if as_json:
            emit_json(payloads[0])
        else:
            _print_curve(payloads[0])
        return
    if as_json:
        emit_json({"curves": payloads, "n_curves": len(payloads),
                   "n_rejected": sum("rejected" in p for p in payloads), "warnings": []})
        return
    _print_batch(payloads)


def _print_batch(payloads: list[dict]) -> None:
    from scaleup.commands.common import print_table
    from scaleup.units import sig

    rows = []
    for p in payloads:
        if "rejected" in p:
            rows.append([p["file"], "-", "-", "-", p["rejected"]])
            continue
        rows.append([p["file"], sig(p["kla_per_s"] * 3600), sig(p["kla_stderr_per_s"] * 3600, 2),
                     str(p["n_points"]), "; ".join(p["warnings"])])
    print_table(rows, ["file", "kLa [1/h]", "+- [1/h]", "n", "notes"], title="Curves")


@kla_group.command("dynamic")
@click.argument("file", type=click.Path(dir_okay=False, exists=True))
@_with_curve_options
@click.option("--gas-off", default=None, help='When the gas was switched off, e.g. "120 s".')
@click.option("--gas-on", default=None, help='When it was switched back on (default: the minimum).')
@click.option("--c-star", default=None, help="Known saturation DO in the file's unit, for a "
              "second OUR estimate.")
@json_option
def kla_dynamic(file, probe_tau, window, time_col, do_col, gas_off, gas_on, c_star, as_json):
    """kLa and OUR from one dynamic test in a culture: gas off, then back on.

    \b
    Example:
      scaleup kla dynamic broth-run7.csv --probe-tau "6 s" --json
    """
    from scaleup.measure.curve_table import read_curve_rows
    from scaleup.measure.dynamic import fit_dynamic
    from scaleup.units import sig

    tab = read_curve_rows(_read_csv_rows(file), time_col=time_col, do_col=do_col, source=file)
    star = None if c_star is None else _c_star_in_unit(c_star, tab)
    d = fit_dynamic(tab.time_s, tab.values, gas_off_s=_quantity(gas_off, "time", "--gas-off"),
                    gas_on_s=_quantity(gas_on, "time", "--gas-on"),
                    tau_p_s=_quantity(probe_tau, "time", "--probe-tau") or 0.0,
                    window=_window(window), c_star=star)
    payload = {"file": file, "kla_per_s": d.kla_per_s, "kla_stderr_per_s": d.kla_stderr_per_s,
               "kla_ci95_per_s": list(d.kla_ci95_per_s), "concentration_unit": tab.unit,
               "our_per_s": d.our_per_s, "our_stderr_per_s": d.our_stderr_per_s,
               "c_steady": d.c_steady, "c_star": d.c_star, "c_star_stderr": d.c_star_stderr,
               "gas_off_s": d.gas_off_s, "gas_on_s": d.gas_on_s,
               "warnings": list(tab.warnings) + list(d.warnings)}
    if tab.to_mol_m3 is not None:
        payload["our_mol_m3_s"] = d.our_per_s * tab.to_mol_m3
    if as_json:
        emit_json(payload)
        return
    u = tab.unit
    print_pairs([("kLa", f"{sig(d.kla_per_s * 3600)} 1/h (+- {sig(d.kla_stderr_per_s * 3600, 2)})"),
                 ("OUR", f"{sig(d.our_per_s * 3600)} {u}/h "
                         f"(+- {sig(d.our_stderr_per_s * 3600, 2)})"),
                 ("DO with gas on", f"{sig(d.c_steady)} {u}"),
                 ("C* = C_ss + OUR/kLa", f"{sig(d.c_star)} {u}"),
                 ("gas off / on", f"{sig(d.gas_off_s)} s / {sig(d.gas_on_s)} s")],
                title="Dynamic method")
    print_notes(payload["warnings"])


@kla_group.command("gas-balance")
@click.option("--gas-flow", required=True, help='Dry inlet gas flow, e.g. "25 NL/min" or "1 vvm".')
@click.option("--y-o2-in", required=True,
              help="O2 mole fraction of the dry inlet gas, e.g. 0.2095.")
@click.option("--y-o2-out", required=True, help="O2 mole fraction of the dry exit gas.")
@click.option("--y-co2-in", default="0.0004", show_default=True,
              help="CO2 mole fraction of the dry inlet gas.")
@click.option("--y-co2-out", required=True, help="CO2 mole fraction of the dry exit gas.")
@click.option("--volume", required=True, help='Liquid volume, e.g. "200 L".')
@click.option("--c-star", default=None, help='Saturation DO with the exit gas, e.g. "0.21 mol/m3"'
              ' or "6.8 mg/L" (gives kLa with --c-liquid).')
@click.option("--c-star-bottom", default=None, help="Saturation DO with the inlet gas at the "
              "sparger, for the log-mean driving force of a tall vessel.")
@click.option("--c-liquid", default=None, help='DO in the liquid, e.g. "40 %" (of --c-star), '
              '"2.5 mg/L".')
@json_option
def kla_gas_balance(gas_flow, y_o2_in, y_o2_out, y_co2_in, y_co2_out, volume, c_star,
                    c_star_bottom, c_liquid, as_json):
    """OTR, CER and RQ by the inert-gas balance (dry basis); kLa = OTR / (C* - C).

    \b
    Example:
      scaleup kla gas-balance --gas-flow "25 NL/min" --y-o2-in 0.2095 --y-o2-out 0.19 \\
          --y-co2-in 0.0004 --y-co2-out 0.015 --volume "200 L" \\
          --c-star "6.8 mg/L" --c-liquid "40 %"
    """
    from scaleup.cautions import cautions_for
    from scaleup.errors import InputError
    from scaleup.measure import gas_balance as gb
    from scaleup.units import sig

    v = _quantity(volume, "volume", "--volume")
    flow = _quantity(gas_flow, "gas_flow", "--gas-flow", liquid_volume_m3=v)
    y_in = _fraction(y_o2_in, "--y-o2-in")
    b = gb.gas_balance_inert(flow, y_in, _fraction(y_o2_out, "--y-o2-out"),
                             _fraction(y_co2_in, "--y-co2-in"),
                             _fraction(y_co2_out, "--y-co2-out"), v)
    payload = {"basis": gb.BASIS, "inlet_flow_mol_s": b.inlet_flow_mol_s,
               "outlet_flow_mol_s": b.outlet_flow_mol_s, "outlet_to_inlet": b.outlet_to_inlet,
               "o2_per_mol_feed": b.o2_per_mol_feed, "co2_per_mol_feed": b.co2_per_mol_feed,
               "otr_mol_m3_s": b.otr_mol_m3_s, "cer_mol_m3_s": b.cer_mol_m3_s, "rq": b.rq}
    warnings = list(b.warnings)
    if (c_star is None) != (c_liquid is None):
        raise InputError("kLa needs both --c-star and --c-liquid", "--c-star")
    if c_star is not None:
        star = _quantity(c_star, "dissolved_oxygen", "--c-star")
        liquid = _quantity(c_liquid, "dissolved_oxygen", "--c-liquid", c_star_mol_m3=star)
        if c_star_bottom is not None:
            bottom = _quantity(c_star_bottom, "dissolved_oxygen", "--c-star-bottom")
            driving = gb.log_mean_driving_force(bottom, star, liquid)
            payload["driving_force_mol_m3"] = driving
            payload["driving_force"] = "log-mean of bottom (inlet gas) and top (exit gas)"
            payload["kla_per_s"] = b.otr_mol_m3_s / driving
        else:
            payload["driving_force_mol_m3"] = star - liquid
            payload["driving_force"] = "C* with the exit gas (well-mixed liquid)"
            payload["kla_per_s"] = gb.kla_from_otr(b.otr_mol_m3_s, star, liquid)
        payload["c_star_mol_m3"], payload["c_liquid_mol_m3"] = star, liquid
    payload["warnings"] = warnings
    payload["cautions"] = cautions_for(o2_fraction=y_in, scale=False)
    if as_json:
        emit_json(payload)
        return
    mmol_l_h = 3600.0  # mol/(m3 s) to mmol/(L h)
    rows = [("basis", gb.BASIS), ("exit / inlet dry flow", sig(b.outlet_to_inlet, 5)),
            ("O2 taken up per mol feed", sig(b.o2_per_mol_feed, 4)),
            ("OTR", f"{sig(b.otr_mol_m3_s * mmol_l_h)} mmol/(L h)"),
            ("CER", f"{sig(b.cer_mol_m3_s * mmol_l_h)} mmol/(L h)"), ("RQ", sig(b.rq, 3))]
    if "kla_per_s" in payload:
        rows.append(("kLa", f"{sig(payload['kla_per_s'] * 3600)} 1/h"))
    print_pairs(rows, title="Off-gas balance")
    print_notes(warnings, payload["cautions"])


@kla_group.command("sulfite")
@click.option("--rate", default=None, help='Sulfite consumption rate, e.g. "0.2 mol/L/h".')
@click.option("--samples", type=click.Path(dir_okay=False, exists=True), default=None,
              help="CSV of titrated samples with `t [min]` and `sulfite [mol/L]` columns.")
@click.option("--c-star", default=None, help='O2 solubility in the sulfite solution, e.g. '
              '"1.0 mg/L" (gives kLa).')
@json_option
def kla_sulfite(rate, samples, c_star, as_json):
    """OTR from sulfite oxidation (2 SO3-- + O2 -> 2 SO4--), with the method's caveats.

    \b
    Examples:
      scaleup kla sulfite --rate "0.2 mol/L/h" --c-star "1.0 mg/L"
      scaleup kla sulfite --samples titration.csv --json
    """
    from scaleup.errors import InputError
    from scaleup.measure.sulfite import sulfite_oxidation
    from scaleup.units import sig

    if (rate is None) == (samples is None):
        raise InputError("give either --rate or --samples", "--rate")
    star = _quantity(c_star, "dissolved_oxygen", "--c-star")
    if rate is not None:
        r = sulfite_oxidation(sulfite_rate=_quantity(rate, "rate", "--rate"), c_star=star)
    else:
        t, conc = _read_samples(samples)
        r = sulfite_oxidation(t_s=t, sulfite=conc, c_star=star)
    payload = {"sulfite_rate_mol_m3_s": r.sulfite_rate_mol_m3_s,
               "sulfite_rate_stderr_mol_m3_s": r.sulfite_rate_stderr_mol_m3_s,
               "otr_mol_m3_s": r.otr_mol_m3_s, "otr_stderr_mol_m3_s": r.otr_stderr_mol_m3_s,
               "kla_per_s": r.kla_per_s, "n_samples": r.n_samples,
               "caveats": list(r.caveats), "warnings": list(r.warnings)}
    if as_json:
        emit_json(payload)
        return
    rows = [("sulfite consumed", f"{sig(r.sulfite_rate_mol_m3_s * 3600)} mmol/(L h)"),
            ("OTR", f"{sig(r.otr_mol_m3_s * 3600)} mmol/(L h)")]
    if r.kla_per_s is not None:
        rows.append(("kLa (C = 0 in the liquid)", f"{sig(r.kla_per_s * 3600)} 1/h"))
    print_pairs(rows, title="Sulfite oxidation")
    print_notes(list(r.warnings) + [f"caveat: {c}" for c in r.caveats])


def _read_samples(path: str):
    import numpy as np

    from scaleup import units
    from scaleup.errors import InputError
    from scaleup.measure.curve_table import split_header

    rows = _read_csv_rows(path)
    if not rows:
        raise InputError("the file is empty", path)
    heads = [split_header(c) for c in rows[0]]
    if len(heads) < 2 or not heads[0][1] or not heads[1][1]:
        raise InputError("expected two columns with units, e.g. `t [min]` and "
                         "`sulfite [mol/L]`", path)
    to_s = units.parse(f"1 {heads[0][1]}", "time", heads[0][0])
    to_mol_m3 = units.parse(f"1 {heads[1][1]}", "concentration", heads[1][0])
    data = []
    for n, row in enumerate(rows[1:], start=2):
        try:
            data.append((float(row[0]) * to_s, float(row[1]) * to_mol_m3))
        except (ValueError, IndexError):
            raise InputError(f"row {n} is not two numbers: {row!r}", path) from None
    arr = np.array(data, dtype=float).reshape(-1, 2)
    return arr[:, 0], arr[:, 1]


def _print_stored(results: list[dict], title: str) -> None:
    from scaleup.commands.common import print_table
    from scaleup.units import sig

    rows = []
    for r in results:
        k, se = r.get("kla_per_s"), r.get("kla_stderr_per_s")
        note = r["rejected"] or "; ".join(r.get("warnings", []))
        if r["kind"] == "probe-step" and not r["rejected"]:
            note = f"probe tau_p = {sig(r['tau_p_s'])} s"
        rows.append([str(r["curve_id"]), str(r["run_id"]), r["kind"],
                     "-" if k is None else sig(k * 3600), "-" if se is None else sig(se * 3600, 2),
                     note])
    print_table(rows, ["curve", "run", "kind", "kLa [1/h]", "+- [1/h]", "notes"], title=title)


def _analysis_options(window: str | None, probe_tau: str | None, method: str) -> dict:
    return {"window": None if window is None else _window(window),
            "tau_p_s": _quantity(probe_tau, "time", "--probe-tau"), "method": method}


_analysis_option_list = [
    click.option("--window", default=None,
                 help="Fractions of the rise to fit, low:high (default: stored, else 0.2:0.98)."),
    click.option("--probe-tau", default=None,
                 help='Probe time constant for every curve, e.g. "8 s" (default: the curve\'s '
                      "own, else the run's probe-step curve, else none)."),
    click.option("--method", type=click.Choice(["nonlinear", "log-linear"]),
                 default="nonlinear", show_default=True, help="Which estimate is stored."),
]


def _with_analysis_options(func):
    for option in reversed(_analysis_option_list):
        func = option(func)
    return func


@click.command("analyse")
@click.argument("run_id", type=int, required=False)
@click.option("--all", "all_runs", is_flag=True, help="Analyse every curve of the campaign.")
@_with_analysis_options
@json_option
@click.pass_context
def run_analyse_command(ctx, run_id, all_runs, window, probe_tau, method, as_json):
    """Analyse the stored DO curves of a run (or of all runs) and keep the run's kLa.

    \b
    Examples:
      scaleup run analyse 12
      scaleup run analyse --all --probe-tau "8 s" --json
    """
    from scaleup.campaign import Campaign
    from scaleup.cli import db_path
    from scaleup.errors import InputError

    if (run_id is None) == (not all_runs):
        raise InputError("give a run id or --all", "run")
    options = _analysis_options(window, probe_tau, method)
    with Campaign(db_path(ctx)) as c:
        if run_id is not None:
            c.run(run_id)
        n = len(c.curves(run_id))
        bar, progress = _progress(n, "analysing curves")
        with bar:
            results = c.analyse_curves(run_ids=None if all_runs else [run_id],
                                       progress=progress, **options)
    if as_json:
        emit_json({"curves": results, "n_curves": len(results),
                   "n_rejected": sum(bool(r["rejected"]) for r in results), "warnings": []})
        return
    if not results:
        click.echo("no curves to analyse")
        return
    _print_stored(results, "curve analysis" if all_runs else f"curves of run {run_id}")
