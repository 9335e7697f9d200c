"""The sections of a design-review report, built from a saved study and what it rests on.

``build(data)`` takes the dict :func:`scaleup.report.content.gather` returns (the study with
its inputs and results as :mod:`scaleup.scaling.study` saves them, the fit with its model as
:meth:`scaleup.correlate.FitReport.stored` saves it, the runs the fit used, warnings from
their curves) and returns the sections in reading order. Each section says plainly when the
study does not hold what it would show (a rule comparison has no operating window).
"""

from __future__ import annotations

import json

from scaleup.cautions import GENERAL
from scaleup.report import plots
from scaleup.report.document import (
    Cell,
    Code,
    Figure,
    Items,
    Paragraph,
    Section,
    Table,
    label,
    number,
    shown,
    unit_of,
)
from scaleup.store.keyunits import lab_value, unit_label

TITLES = {
    "job": "The job and the decision asked for",
    "data": "Campaign data used",
    "correlation": "The kLa correlation",
    "fit-plots": "Parity and residuals",
    "lovo": "Leave-one-vessel-out: does the correlation scale?",
    "rules": "Scale-up rules compared",
    "window": "Operating window",
    "risk": "Probability of meeting the duty",
    "heat": "Heat balance",
    "warnings": "Warnings",
    "cautions": "Cautions",
    "provenance": "Provenance",
}
# rows of the rule comparison and the design point, in reading order
POINT_KEYS = (
    "speed_rps", "gas_flow_mol_s", "vvm", "superficial_gas_velocity_m_s", "power_w",
    "gassed_power_w", "power_per_volume_w_m3", "gassed_power_per_volume_w_m3",
    "tip_speed_m_s", "reynolds", "flow_number", "froude", "regime", "flooding_margin",
    "blend_time_95_s", "kla_per_s", "kla_pi95_per_s", "kla_design_per_s",
    "kla_required_per_s", "otr_capacity_mol_m3_s", "fraction_o2_used", "exit_o2_fraction",
    "heat_load_w", "heat_removal_w", "agitator_power_w", "compressor_power_w",
    "total_power_w", "motor_power_w",
)
# inputs saved as dataclass fields (no unit ending) and the kind each holds
_INPUT_KINDS = {"our": "rate", "temperature": "temperature", "ambient_temperature": "temperature",
                "ambient_pressure": "pressure", "density": "density", "viscosity": "viscosity",
                "surface_tension": "surface_tension", "head_pressure": "pressure",
                "volume": "volume"}


def _volume(volume_m3) -> str:
    if volume_m3 is None:
        return "-"
    return f"{number(volume_m3 * 1e3)} L" if volume_m3 < 1 else f"{number(volume_m3)} m3"


def _input_cell(key: str, value) -> Cell:
    if key == "line_loss" and isinstance(value, (int, float)):
        return Cell(f"{number(value / 1e3)} kPa", key, float(value))  # a pressure drop
    kind = _INPUT_KINDS.get(key)
    if kind and isinstance(value, (int, float)) and not isinstance(value, bool):
        return Cell(f"{number(lab_value(value, kind))} {unit_label(kind)}", key, float(value))
    return shown(key, value, with_unit=True)


def _pairs(title: str, data: dict, caption: str = "") -> Table:
    rows = [[Cell(label(k)), _input_cell(k, v)] for k, v in data.items()
            if v is not None and not isinstance(v, dict)]
    return Table([title, "value"], rows, caption)


def job(study: dict) -> Section:
    s = Section("job", TITLES["job"])
    inputs, results = study["inputs"], study["results"]
    s.add(Paragraph(f'Study "{study["name"]}" ({study["kind"]}), saved {study["created_at"]}.'))
    process = inputs.get("process", {})
    if inputs.get("job"):
        s.add(Paragraph(inputs["job"]))
    elif study["kind"] == "scale":
        pilot = results.get("pilot", {})
        s.add(Paragraph(
            f"Scale the pilot point {pilot.get('label', '')} ({_volume(results.get('pilot_volume_m3'))}, "
            f"{number(lab_value(pilot.get('speed_rps'), 'speed'))} rpm) to a "
            f"{_volume(results.get('target_volume_m3'))} vessel (scale factor "
            f"{number(results.get('scale_factor'))}), comparing {len(results.get('rules', []))} "
            f"scale-up rules with {results.get('gas_rule_description', 'the chosen gas rule')}."))
    else:
        our = process.get("our")
        duty = f"an oxygen uptake rate of {number(lab_value(our, 'rate'))} mmol/(L h)" \
            if our else "the oxygen duty"
        s.add(Paragraph(f"Find the agitator speed and gas rate at which the "
                        f"{_volume(results.get('liquid_volume_m3'))} vessel meets {duty} at "
                        "the DO set-point, at the least total power (agitator and gas "
                        "compression), within the limits."))
    s.add(Paragraph("Decision asked for: " + (inputs.get("decision") or (
        "which rule gives a full-scale speed and gas rate that transfer the oxygen the "
        "process needs within the equipment limits, and with what margin."
        if study["kind"] == "scale" else
        "the operating point, motor and cooling of the full-scale vessel, and how sure we "
        "are that it meets the duty."))))
    if results.get("kla_target_per_s") is not None:
        s.add(Paragraph(f"kLa target {number(results['kla_target_per_s'] * 3600)} 1/h "
                        f"({results.get('kla_target_source', '')})."))
    if process:
        shown_process = dict(process)
        if shown_process.pop("do_percent", None) and "do_setpoint" in shown_process:
            shown_process["do_setpoint"] = f"{number(process['do_setpoint'])} % of saturation"
        elif process.get("do_setpoint") is not None:
            shown_process["do_setpoint"] = f"{number(process['do_setpoint'])} mol/m3"
        s.add(_pairs("process", shown_process, "Values without a unit are dimensionless."))
    limits = {k: v for k, v in inputs.get("limits", {}).items() if v is not None}
    s.add(_pairs("limit", limits) if limits else Paragraph("No limits were set."))
    return s


RUN_COLUMNS = (("id", "id", None), ("ref", "ref", None), ("vessel", "vessel", None),
               ("medium", "medium", None), ("date", "run_at", None),
               ("speed [rpm]", "speed_rps", "speed"),
               ("gas flow [NL/min]", "gas_flow_mol_s", "gas_flow"),
               ("temperature [degC]", "temperature_k", "temperature"),
               ("kLa [1/h]", "kla_per_s", "kla"), ("kLa stderr [1/h]", "kla_stderr_per_s", "kla"),
               ("kLa method", "kla_method", None))


def campaign_data(data: dict) -> Section:
    s = Section("data", TITLES["data"])
    runs = data.get("runs") or []
    fit = data.get("fit")
    if fit is None:
        s.add(Paragraph("The study uses a published correlation, so no campaign runs were "
                        "fitted; the pilot run (if any) is listed."))
    else:
        s.add(Paragraph(f'{len(runs)} run(s) of fit "{fit["name"]}"'
                        + (f' selected by "{fit["selection"]}"' if fit.get("selection") else "")
                        + "."))
    if runs:
        rows = [[Cell(number(r.get(key)) if kind is None else number(lab_value(r.get(key),
                                                                           kind)),
                      key, r.get(key) if kind else None) for _, key, kind in RUN_COLUMNS]
                for r in runs]
        s.add(Table([c[0] for c in RUN_COLUMNS], rows))
    return s


def correlation(study: dict, fit: dict | None) -> Section:
    s = Section("correlation", TITLES["correlation"])
    described = study["results"].get("correlation") or study["inputs"].get("correlation") or {}
    s.add(Paragraph(f"{described.get('name', '')}: {described.get('equation', '')}"
                    + (f" ({described['source']})" if described.get("source") else "")))
    if fit is None:
        s.add(Paragraph("A published correlation: its stated constants are used, with the "
                        f"scatter of its source (log standard deviation "
                        f"{number(described.get('scatter_sd'))})."))
        return s
    model = fit["model"]
    rows = []
    for p in model.get("parameters", []):
        low, high = (p.get("ci95") or [None, None])[:2]
        rows.append([Cell(p["name"]), Cell(number(p["value"]), p["name"], p["value"]),
                     Cell(number(p.get("stderr")), None, p.get("stderr")),
                     Cell(f"{number(low)} to {number(high)}"),
                     Cell("fixed" if p.get("fixed") else "")])
    s.add(Table(["parameter", "value", "standard error", "95 % interval", ""], rows,
                "Parameters in SI (kLa in 1/s, P/V in W/m3, us in m/s)."))
    stats = model.get("statistics", {})
    s.add(_pairs("statistic", {k: stats.get(k) for k in ("n_runs", "df_resid", "r2_log",
                                                          "rmse_log", "residual_std", "aic",
                                                          "within_20_fraction")}))
    ranges = model.get("domain", {}).get("ranges", {})
    if ranges:
        s.add(Table(["variable", "lowest fitted", "highest fitted"],
                    [[Cell(label(k)), shown(k, lo, with_unit=True), shown(k, hi, with_unit=True)]
                     for k, (lo, hi) in ranges.items()], "The domain the fit covers."))
    if fit.get("stale"):
        s.add(Items(["A run this fit used was edited after it was saved: refit before relying "
                     "on it."], "warning"))
    return s


def fit_plots(data: dict) -> Section:
    s = Section("fit-plots", TITLES["fit-plots"])
    fit = data.get("fit")
    if fit is None or not fit["model"].get("diagnostics", {}).get("fitted"):
        s.add(Paragraph("No fitted correlation: nothing to compare with measurements."))
        return s
    model = fit["model"]
    measured, predicted, residual, groups = fit_points(model, data.get("runs") or [])
    s.add(Figure(plots.parity_svg(measured, predicted, groups),
                 "Measured against predicted kLa, by vessel; band +-20 %.", "parity"))
    s.add(Figure(plots.residual_svg(predicted, residual, groups,
                                    model.get("statistics", {}).get("residual_std")),
                 "Log residuals against the prediction; dashed lines +-2 s.", "residuals"))
    return s


def fit_points(model: dict, runs: list[dict]) -> tuple[list, list, list, list]:
    """(measured, predicted, log residual, vessel) per fitted run; measured is the stored kLa
    where the run is at hand, else rebuilt from the fit's log residual."""
    import math

    diagnostics = model["diagnostics"]
    by_id = {r["id"]: r for r in runs}
    measured, groups = [], []
    for run_id, fitted, residual in zip(model.get("run_ids", []), diagnostics["fitted"],
                                        diagnostics["residual_log"], strict=False):
        run = by_id.get(run_id, {})
        measured.append(run.get("kla_per_s") or fitted * math.exp(residual))
        groups.append(run.get("vessel", "run"))
    n = len(measured)
    return measured, diagnostics["fitted"][:n], diagnostics["residual_log"][:n], groups


def lovo(fit: dict | None) -> Section:
    s = Section("lovo", TITLES["lovo"])
    result = (fit or {}).get("model", {}).get("loo_vessel")
    if not result:
        s.add(Paragraph("Not available: the correlation was not fitted to this campaign, or "
                        "its runs come from one vessel."))
        return s
    rows = []
    for f in result.get("folds", []):
        rows.append([Cell(f["vessel"]), Cell(_volume(f.get("volume_m3")), "volume_m3",
                                             f.get("volume_m3")),
                     Cell(number(f.get("n_runs"))),
                     Cell(number(f.get("mean_log_ratio")), "mean_log_ratio",
                          f.get("mean_log_ratio")),
                     Cell(number(f.get("p_value")), "p_value", f.get("p_value")),
                     Cell(number(f.get("rmse_log")), "rmse_log", f.get("rmse_log")),
                     Cell(number(f.get("within_20_fraction"))),
                     Cell(number(f.get("extrapolated_fraction"))),
                     Cell(f.get("error") or "")])
    s.add(Table(["held-out vessel", "volume", "runs", "mean ln(pred/meas)", "p", "RMSE (log)",
                 "share within +-20 %", "share outside the training domain", "note"], rows,
                "Each vessel predicted from a fit on all the others."))
    bias = result.get("scale_bias")
    if bias:
        s.add(Paragraph(bias["message"]))
    return s


def _point_rows(points: list[dict]) -> list[list[Cell]]:
    keys = [k for k in POINT_KEYS if any(k in p for p in points)]
    return [[Cell(label(k)), Cell(unit_of(k))] + [shown(k, p.get(k)) for p in points]
            for k in keys]


def rules(study: dict) -> Section:
    s = Section("rules", TITLES["rules"])
    results = study["results"]
    if study["kind"] != "scale":
        s.add(Paragraph("A design study solves for one point rather than comparing rules; "
                        "the design point:"))
        s.add(Table(["quantity", "unit", "design point"], _point_rows([results])))
        if results.get("binding_constraints"):
            s.add(Paragraph("Binding at the optimum: "
                            + ", ".join(results["binding_constraints"]) + "."))
        return s
    rows = results.get("rules", [])
    pilot = results.get("pilot")
    points = ([pilot] if pilot else []) + rows
    headers = ["quantity", "unit"] + (["pilot"] if pilot else []) + [
        f"{r['rule']} ({r.get('gas_rule', '')})" for r in rows]
    table = _point_rows(points)
    table.append([Cell("limits broken"), Cell("")] + ([Cell("")] if pilot else [])
                 + [Cell("; ".join(r.get("violations") or []) or "none") for r in rows])
    table.append([Cell("outside the fitted domain"), Cell("")] + ([Cell("")] if pilot else [])
                 + [Cell(number((r.get("extrapolation") or {}).get("extrapolated")))
                    for r in rows])
    s.add(Table(headers, table, "Each rule's full-scale point; values in lab units."))
    return s


def window(study: dict) -> Section:
    s = Section("window", TITLES["window"])
    results = study["results"]
    grid = results.get("window")
    if not grid:
        s.add(Paragraph("A rule comparison has no operating window; a design study of the "
                        "full-scale vessel maps one."))
        return s
    s.add(Figure(plots.window_svg(grid, (results.get("speed_rps"),
                                         results.get("gas_flow_mol_s"))),
                 "Total power of the feasible points over speed and gas rate; the star is the "
                 "chosen point, red dashes the probability of meeting the duty.", "window"))
    if not results.get("feasible", True):
        s.add(Items(list(results.get("infeasibility") or ["no feasible point"]), "warning"))
    return s


def risk(study: dict) -> Section:
    s = Section("risk", TITLES["risk"])
    results = study["results"]
    if results.get("probability_meets_duty") is None:
        if study["kind"] == "scale":
            s.add(Paragraph("A rule comparison gives each rule's 95 % prediction interval of "
                            "kLa (in the rules table) against the kLa target; the probability "
                            "of meeting the duty comes from a design study."))
        else:
            s.add(Paragraph("No probability: no feasible design point."))
        return s
    pairs = {k: results.get(k) for k in ("probability_meets_duty", "probability_standard_error",
                                         "n_draws", "confidence", "kla_required_per_s")}
    s.add(Table(["quantity", "value"], [[Cell(label(k)), shown(k, v, with_unit=True)]
                                        for k, v in pairs.items() if v is not None]))
    for key in ("kla_percentiles_per_s", "otr_capacity_percentiles_mol_m3_s"):
        bands = results.get(key)
        if bands:
            s.add(Table(["percentile", label(key)],
                        [[Cell(p), shown(key, v, with_unit=True)] for p, v in bands.items()]))
    return s


def heat(study: dict) -> Section:
    s = Section("heat", TITLES["heat"])
    results = study["results"]
    balance = results.get("heat")
    if balance:
        s.add(_pairs("quantity", {k: v for k, v in balance.items()
                                  if k not in ("typical_u_w_m2_k", "notes")}))
        if balance.get("notes"):
            s.add(Items(list(balance["notes"])))
    elif study["kind"] == "scale":
        rows = [[Cell(r["rule"]), shown("heat_load_w", r.get("heat_load_w")),
                 shown("heat_removal_w", r.get("heat_removal_w"))]
                for r in results.get("rules", [])]
        s.add(Table(["rule", "heat load [kW]", "heat removal [kW]"], rows,
                    "Heat load (metabolic and agitation) against the vessel's removal."))
    else:
        s.add(Paragraph("No heat balance in this study."))
    return s


def collect_warnings(data: dict) -> list[str]:
    """Every warning the study and what it rests on carry, each once, with its source."""
    study, fit = data["study"], data.get("fit")
    results = study["results"]
    out = [f"study: {w}" for w in results.get("warnings", [])]
    for r in results.get("rules", []):
        out += [f"rule {r['rule']}: limit broken: {v}" for v in r.get("violations") or []]
        out += [f"rule {r['rule']}: extrapolation: {m}"
                for m in (r.get("extrapolation") or {}).get("messages") or []]
    out += [f"design point: extrapolation: {m}"
            for m in (results.get("extrapolation") or {}).get("messages") or []]
    if fit is not None:
        model = fit["model"]
        out += [f"fit {fit['name']}: {w}" for w in model.get("warnings", [])]
        out += [f"fit {fit['name']}: {m}"
                for m in (model.get("loo_vessel") or {}).get("messages", [])]
        if fit.get("stale"):
            out.append(f"fit {fit['name']}: stale (a run it used was edited)")
    out += data.get("curve_warnings", [])
    return list(dict.fromkeys(" ".join(str(w).split()) for w in out))


def warnings(data: dict) -> Section:
    s = Section("warnings", TITLES["warnings"])
    found = collect_warnings(data)
    s.add(Items(found, "warning") if found else Paragraph("No warnings."))
    return s


def cautions(study: dict) -> Section:
    s = Section("cautions", TITLES["cautions"])
    listed = list(study["results"].get("cautions") or [])
    if GENERAL not in listed:
        listed.insert(0, GENERAL)
    return s.add(Items(listed, "caution"))


def provenance(data: dict) -> Section:
    study, fit = data["study"], data.get("fit")
    s = Section("provenance", TITLES["provenance"])
    rows = [["report made by scaleup", data["package_version"]],
            ["report made at", data["generated_at"]], ["campaign file", data["campaign"]],
            ["study id", study["id"]], ["study name", study["name"]],
            ["study saved at", study["created_at"]],
            ["study saved by scaleup", study["package_version"]],
            ["fit id", fit["id"] if fit else "none (published correlation)"]]
    if fit:
        rows += [["fit name", fit["name"]], ["fit saved at", fit["created_at"]],
                 ["fit saved by scaleup", fit["package_version"]],
                 ["fit method", f"{fit['method']}, weights {fit['weights']}"],
                 ["fit runs", ", ".join(str(i) for i in fit["model"].get("run_ids", []))]]
    s.add(Table(["item", "value"], [[Cell(str(a)), Cell(str(b))] for a, b in rows]))
    s.add(Code(json.dumps(study["inputs"], indent=2, sort_keys=True),
               "The study's inputs, complete enough to recompute it (SI)"))
    return s


def build(data: dict) -> list[Section]:
    """All sections of the report, in reading order."""
    study, fit = data["study"], data.get("fit")
    return [job(study), campaign_data(data), correlation(study, fit), fit_plots(data),
            lovo(fit), rules(study), window(study), risk(study), heat(study), warnings(data),
            cautions(study), provenance(data)]
