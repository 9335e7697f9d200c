"""`scaleup fit kla|sherwood`, `scaleup compare`, `scaleup predict`.

Fitting reads runs from the campaign (through :class:`scaleup.campaign.Campaign`); `predict`
and `compare` also work without a campaign: on a fit saved to a JSON file (`fit kla --out`)
or on published correlations.
"""

from __future__ import annotations

import json
from pathlib import Path

import click

from scaleup.cli import db_path
from scaleup.commands.common import emit_json, json_option, print_notes, print_pairs, print_table

# Point options: CLI name -> (variable of the correlate layer, units kind or None for a plain
# number, help).
_POINT = {
    "pg_per_volume": ("gassed_power_per_volume_w_m3", "power_per_volume",
                      'Gassed power per volume Pg/V, e.g. "1.5 kW/m3".'),
    "p_per_volume": ("ungassed_power_per_volume_w_m3", "power_per_volume",
                     "Ungassed power per volume P/V (for fits on the ungassed basis)."),
    "superficial_velocity": ("superficial_velocity_m_s", "velocity",
                             'Superficial gas velocity us, e.g. "0.02 m/s".'),
    "viscosity": ("viscosity_pa_s", "viscosity", 'Liquid viscosity, e.g. "1.2 mPa s".'),
    "density": ("density_kg_m3", "density", 'Liquid density, e.g. "1010 kg/m3".'),
    "volume": ("vessel_volume_m3", "volume",
               'Liquid volume of the vessel, to check the scale, e.g. "30 m3".'),
    "reynolds": ("reynolds", None, "Reynolds number (Sherwood correlations)."),
    "schmidt": ("schmidt", None, "Schmidt number (Sherwood correlations)."),
}


def point_options(func):
    for name, (_, _, text) in reversed(list(_POINT.items())):
        func = click.option(f"--{name.replace('_', '-')}", name, metavar="TEXT", default=None,
                            help=text)(func)
    return click.option("--coalescence", type=click.Choice(["coalescing", "non-coalescing",
                                                            "viscous"]),
                        help="Coalescence class of the medium (fits with a medium factor).")(func)


def _points(options: dict) -> dict:
    from scaleup import units
    from scaleup.errors import InputError

    points = {}
    for name, (variable, kind, _) in _POINT.items():
        text = options.get(name)
        if text is None:
            continue
        if kind is None:
            try:
                value = float(text)
            except ValueError:
                raise InputError(f'"{text}" is not a number', name.replace("_", "-")) from None
        else:
            value = units.parse(text, kind, name.replace("_", "-"))
        points[variable] = [value]
    if options.get("coalescence"):
        points["coalescence"] = [options["coalescence"]]
    return points


def _predict(model, points: dict):
    """Evaluate, naming the missing command-line option when a variable is missing."""
    from scaleup.errors import InputError

    options = {variable: f"--{name.replace('_', '-')}" for name, (variable, _, _) in
               _POINT.items()}
    options["coalescence"] = "--coalescence"
    try:
        return model.predict(points)
    except InputError as exc:
        if exc.field in options and exc.field not in points:
            raise InputError(f"give {options[exc.field]}: {exc}") from None
        raise


def _percent(fraction: float, signed: bool = True) -> str:
    value = round(fraction * 100) + 0  # + 0 turns -0 into 0
    return f"{value:+d} %" if signed else f"{value:d} %"


def _open(ctx: click.Context):
    from scaleup.campaign import Campaign

    return Campaign(db_path(ctx))


def load_fit(ctx: click.Context, ref: str, campaign=None) -> tuple:
    """A fit by campaign name or JSON file: (FitResult, label, stale)."""
    from scaleup.correlate import FitResult

    path = Path(ref)
    if path.suffix.lower() == ".json" or path.is_file():
        if not path.is_file():
            raise click.UsageError(f"no fit file {ref}")
        return FitResult.from_dict(json.loads(path.read_text())), path.name, False
    if campaign is None:
        with _open(ctx) as opened:
            result, row = opened.load_fit(ref)
    else:
        result, row = campaign.load_fit(ref)
    return result, ref, bool(row["stale"])


def _interval(low, high) -> list[float]:
    return [float(low), float(high)]


def _extrapolation_json(extrapolation) -> dict:
    distance = extrapolation.mahalanobis[0]
    ratio = extrapolation.distance_ratio[0]
    return {"extrapolated": bool(extrapolation.extrapolated[0]),
            "mahalanobis_distance": None if distance != distance else float(distance),
            "distance_ratio": None if ratio != ratio else float(ratio),
            "range_factors": {k: float(v[0]) for k, v in extrapolation.range_factor.items()},
            "unchecked": list(extrapolation.unchecked),
            "messages": extrapolation.messages()[0]}


def _kla_text(value: float | None) -> str:
    from scaleup.units import format_quantity, sig

    return "-" if value is None else f"{format_quantity(value, 'kla')} ({sig(value)} 1/s)"


@click.command("predict")
@click.option("--fit", "fit_ref", metavar="NAME|FILE",
              help="A saved fit: its name in the campaign, or a JSON file from `fit --out`.")
@click.option("--published", metavar="KEY",
              help="A published correlation instead (see `scaleup compare`), e.g. "
                   "vant-riet-coalescing.")
@point_options
@json_option
@click.pass_context
def predict_command(ctx: click.Context, fit_ref: str | None, published: str | None,
                    as_json: bool, **options) -> None:
    """Predict kLa (or Sh) at one operating point, with 95 % intervals and an
    extrapolation check.

    \b
    Examples:
      scaleup predict --fit pilot-kla --pg-per-volume "1.5 kW/m3" \\
          --superficial-velocity "0.02 m/s" --volume "30 m3"
      scaleup predict --published vant-riet-coalescing --pg-per-volume "1 kW/m3" \\
          --superficial-velocity "0.01 m/s" --json
    """
    from scaleup.cautions import cautions_for

    if (fit_ref is None) == (published is None):
        raise click.UsageError("give either --fit NAME|FILE or --published KEY")
    points = _points(options)
    warnings: list[str] = []
    if fit_ref is not None:
        result, label, stale = load_fit(ctx, fit_ref)
        if stale:
            warnings.append(f"fit {label} is stale: a run it used was edited since; refit it")
        prediction = _predict(result, points)
        value, equation = float(prediction.value[0]), result.form.equation()
        ci = _interval(prediction.ci_low[0], prediction.ci_high[0])
        pi = _interval(prediction.pi_low[0], prediction.pi_high[0])
        extrapolation = prediction.extrapolation
        response = result.form.response_name
    else:
        from scaleup.correlate import published_correlation

        entry = published_correlation(published)
        label, equation = published, entry.equation
        value = float(_predict(entry, points)[0])
        ci = pi = None
        extrapolation = entry.domain.check(points)
        response = "sherwood" if "reynolds" in entry.variables else "kla_per_s"
        warnings.append(f"{published} carries no uncertainty of its own; its source states: "
                        f"{entry.note or 'no accuracy'}")
        if entry.from_memory:
            warnings.append(f"{published}: constants recorded from memory, check the source "
                            f"({entry.source})")
    extra = _extrapolation_json(extrapolation)
    warnings.extend(f"extrapolation: {m}" for m in extra["messages"])
    cautions = cautions_for(scale=False)
    if response == "kla_per_s":
        payload = {"kla_per_s": value, "ci95_per_s": ci, "pi95_per_s": pi}
    else:
        payload = {"sherwood": value, "ci95": ci, "pi95": pi}
    payload = {"source": label, "equation": equation, **payload, "extrapolation": extra,
               "inputs": {k: v[0] for k, v in points.items()}, "warnings": warnings,
               "cautions": cautions}
    if as_json:
        emit_json(payload)
        return
    fmt = _kla_text if response == "kla_per_s" else (lambda v: f"{v:.4g}")
    pairs = [("correlation", f"{label}: {equation}"), ("predicted", fmt(value))]
    if ci is not None:
        pairs += [("95 % confidence (curve)", f"{fmt(ci[0])} to {fmt(ci[1])}"),
                  ("95 % prediction (new run)", f"{fmt(pi[0])} to {fmt(pi[1])}")]
    pairs.append(("extrapolation", "yes" if extra["extrapolated"] else "no"))
    print_pairs(pairs, title="Prediction")
    print_notes(warnings, cautions)


def _selection(where: str | None, media: tuple[str, ...]) -> str | None:
    parts = [f"({where})"] if where else []
    if media:
        names = ", ".join("'" + m.replace("'", "''") + "'" for m in media)
        parts.append(f"medium IN ({names})")
    return " AND ".join(parts) or None


def _fixed(values: tuple[str, ...]) -> dict[str, float]:
    from scaleup.errors import InputError

    out = {}
    for item in values:
        name, _, number = item.partition("=")
        try:
            out[name.strip()] = float(number)
        except ValueError:
            raise InputError(f'"{item}" is not NAME=NUMBER (e.g. b_gas_velocity=0.5)',
                             "fix") from None
    return out


def _show_report(report, saved: str | None, out: str | None, as_json: bool) -> None:
    if out:
        Path(out).write_text(json.dumps(report.stored(), indent=1))
    summary = report.summary()
    if as_json:
        emit_json({"name": saved, "saved": saved is not None, "file": out, **summary})
        return
    rows = [(p["name"], f"{p['value']:.4g}", "fixed" if p["fixed"] else f"{p['stderr']:.2g}",
             f"{p['ci95'][0]:.4g} to {p['ci95'][1]:.4g}") for p in summary["parameters"]]
    print_table(rows, ["parameter", "value", "std. error", "95 % interval"],
                title=f"{summary['equation']}  ({summary['method']}, weights "
                      f"{summary['weights']}{', robust ' + summary['robust'] if summary['robust'] else ''})")
    stats = summary["statistics"]
    print_pairs([("runs", stats["n_runs"]), ("R2 (log)", f"{stats['r2_log']:.4f}"),
                 ("RMSE (log)", f"{stats['rmse_log']:.4f}"),
                 ("AIC", "-" if stats["aic"] is None else f"{stats['aic']:.2f}"),
                 ("within +-20 %", _percent(stats["within_20_fraction"], False))],
                title="Fit statistics")
    lovo = summary["loo_vessel"]
    if lovo and lovo["folds"]:
        rows = [(f["vessel"], "-" if f["volume_m3"] is None else f"{f['volume_m3']:.3g}",
                 f["n_runs"], f["error"] or _percent(f["mean_bias_fraction"]),
                 "-" if f["p_value"] is None else f"{f['p_value']:.2g}",
                 "-" if f["rmse_log"] is None else f"{f['rmse_log']:.3f}")
                for f in lovo["folds"]]
        print_table(rows, ["held-out vessel", "volume [m3]", "runs", "mean bias", "p",
                           "RMSE (log)"], title="Leave one vessel out")
    if saved:
        click.echo(f"saved as fit {saved!r}")
    print_notes(summary["warnings"])


_fit_common = [
    click.option("--method", type=click.Choice(["ols", "nls"]), default="ols",
                 show_default=True,
                 help="ols: least squares in log space; nls: nonlinear on the values."),
    click.option("--robust", is_flag=True,
                 help="Robust loss in log space; flags the runs it down-weights."),
    click.option("--loss", type=click.Choice(["soft_l1", "huber"]), default="soft_l1",
                 show_default=True, help="Robust loss (with --robust)."),
    click.option("--bootstrap", "n_bootstrap", type=click.IntRange(0, 100000), default=0,
                 show_default=True, help="Bootstrap resamples for percentile intervals."),
    click.option("--bootstrap-by", type=click.Choice(["runs", "vessels"]), default="runs",
                 show_default=True, help="Resample runs, or whole vessels."),
    click.option("--save", metavar="NAME", help="Save the fit in the campaign under NAME."),
    click.option("--out", metavar="FILE.json", help="Also write the fit to a JSON file."),
    json_option,
]


def fit_options(func):
    for option in reversed(_fit_common):
        func = option(func)
    return func


@click.group("fit")
def fit_group() -> None:
    """Fit correlations to the campaign's runs, with intervals and a scale check.

    \b
    Examples:
      scaleup fit kla --where "vessel = 'V-300'" --save pilot-kla
      scaleup fit kla --weights stderr --robust --json
      scaleup fit sherwood --fix-sc-exponent 0.333
    """


@fit_group.command("kla")
@click.option("--where", metavar="FILTER", help="""Runs to use, e.g. "vessel = 'V-300'".""")
@click.option("--medium", "media", multiple=True, metavar="NAME", help="Only runs in this medium "
              "(repeat for several).")
@click.option("--form", type=click.Choice(["power-law", "dimensionless"]), default="power-law",
              show_default=True, help="kLa = C (P/V)^a us^b, or the Zlokarnik-type groups.")
@click.option("--power", "power_basis", type=click.Choice(["gassed", "ungassed"]),
              default="gassed", show_default=True, help="Which P/V the correlation uses.")
@click.option("--viscosity-term", is_flag=True, help="Add mu^c (power-law form).")
@click.option("--medium-factor", is_flag=True, help="A factor per coalescence class.")
@click.option("--weights", type=click.Choice(["none", "stderr"]), default="none",
              show_default=True, help="Weight runs by their stated kLa standard error.")
@click.option("--fix", "fixes", multiple=True, metavar="NAME=VALUE",
              help="Hold a parameter, e.g. b_gas_velocity=0.5 (repeatable).")
@fit_options
@click.pass_context
def fit_kla_command(ctx: click.Context, where, media, form, power_basis, viscosity_term,
                    medium_factor, weights, fixes, method, robust, loss, n_bootstrap,
                    bootstrap_by, save, out, as_json) -> None:
    """Fit kLa = C (P/V)^a us^b [mu^c] [f_medium] to the selected runs.

    Reports parameters with standard errors and 95 % intervals, R2 and RMSE in log space,
    AIC, the fitted domain and leave-one-vessel-out predictions (does it scale?).

    \b
    Examples:
      scaleup fit kla --where "vessel = 'V-300'" --save pilot-kla
      scaleup fit kla --medium broth --weights stderr --robust --json
      scaleup fit kla --form dimensionless --bootstrap 2000 --bootstrap-by vessels
    """
    selection = _selection(where, media)
    with _open(ctx) as campaign:
        report = campaign.fit_kla(selection, form=form, power_basis=power_basis,
                                  viscosity=viscosity_term, medium_factor=medium_factor,
                                  fixed=_fixed(fixes), method=method, weights=weights,
                                  robust=loss if robust else None, bootstrap=n_bootstrap,
                                  bootstrap_kind=bootstrap_by)
        if save:
            campaign.save_fit(save, report)
    _show_report(report, save, out, as_json)


@fit_group.command("sherwood")
@click.option("--solute", metavar="NAME", help="Only flux measurements of this solute.")
@click.option("--plus-two", is_flag=True, help="Fit Sh = 2 + A Re^b Sc^c.")
@click.option("--fix-sc-exponent", type=float, metavar="NUMBER",
              help="Hold the Schmidt exponent, e.g. 0.333.")
@click.option("--fix-re-exponent", type=float, metavar="NUMBER",
              help="Hold the Reynolds exponent, e.g. 0.5.")
@fit_options
@click.pass_context
def fit_sherwood_command(ctx: click.Context, solute, plus_two, fix_sc_exponent,
                         fix_re_exponent, method, robust, loss, n_bootstrap, bootstrap_by,
                         save, out, as_json) -> None:
    """Fit Sh = A Re^b Sc^c (or 2 + A Re^b Sc^c) to the campaign's flux measurements.

    \b
    Examples:
      scaleup fit sherwood --fix-sc-exponent 0.333
      scaleup fit sherwood --plus-two --fix-sc-exponent 0.333 --save spheres --json
    """
    fixed = {name: value for name, value in (("c_schmidt", fix_sc_exponent),
                                             ("b_reynolds", fix_re_exponent))
             if value is not None}
    with _open(ctx) as campaign:
        report = campaign.fit_sherwood(solute, plus_two=plus_two, fixed=fixed, method=method,
                                       robust=loss if robust else None, bootstrap=n_bootstrap,
                                       bootstrap_kind=bootstrap_by)
        if save:
            campaign.save_fit(save, report)
    _show_report(report, save, out, as_json)


def _catalogue(keys: list[str], as_json: bool) -> None:
    from scaleup.correlate import published_correlation

    entries = [published_correlation(k) for k in keys]
    if as_json:
        emit_json({"published": [e.describe() for e in entries], "warnings": []})
        return

    def span(domain):
        return "; ".join(f"{k} {'' if lo is None else f'{lo:g}'}..{'' if hi is None else f'{hi:g}'}"
                         for k, (lo, hi) in domain.ranges.items()) or "-"

    print_table([(e.key, e.equation, e.source, span(e.domain),
                  e.note) for e in entries], ["key", "equation", "source", "stated range", "note"],
                title="Published correlations")


@click.command("compare")
@click.option("--fit", "fits", multiple=True, metavar="NAME|FILE",
              help="A saved fit (name or JSON file); repeatable.")
@click.option("--published", "keys", multiple=True, metavar="KEY",
              help="A published correlation, e.g. vant-riet-coalescing; repeatable.")
@click.option("--where", metavar="FILTER", help="Runs to compare on (default: all with a kLa).")
@click.option("--list", "list_only", is_flag=True, help="Only list the published catalogue.")
@point_options
@json_option
@click.pass_context
def compare_command(ctx: click.Context, fits, keys, where, list_only, as_json,
                    **options) -> None:
    """Compare fitted and published correlations on the campaign's runs or at a point.

    On runs: RMSE (log), mean bias, largest error and the share within +-20 %. At a point
    (--pg-per-volume, --superficial-velocity): each correlation's kLa and whether the point
    is inside its range. Without a campaign or a point: the catalogue with sources.

    \b
    Examples:
      scaleup compare --fit pilot-kla --published vant-riet-coalescing
      scaleup compare --published vant-riet-coalescing --published linek-1987 \\
          --pg-per-volume "2 kW/m3" --superficial-velocity "0.01 m/s"
      scaleup compare --list
    """
    from scaleup.correlate import kla_correlations

    points = _points(options)
    if list_only or (not points and not fits and not Path(db_path(ctx)).exists()):
        from scaleup.correlate import kl_correlations, sherwood_correlations

        _catalogue(list(keys) or [*kla_correlations, *sherwood_correlations,
                                  *kl_correlations], as_json)
        return
    if points:
        _compare_at_point(ctx, fits, list(keys) or list(kla_correlations), points, as_json)
        return
    with _open(ctx) as campaign:
        names = list(fits) if fits else ([] if keys else
                                         [f["name"] for f in campaign.fits() if f["kind"] == "kla"])
        models = {name: load_fit(ctx, name, campaign)[0] for name in names}
        rows, warnings = campaign.compare(models, list(keys) or (
            [] if fits else list(kla_correlations)), where)
    if as_json:
        emit_json({"where": where, "comparison": rows, "warnings": warnings})
        return
    print_table([(r["name"], r["equation"], f"{r['n_in_domain']}/{r['n_runs']}",
                  f"{r['rmse_log']:.3f}", _percent(r["mean_bias_fraction"]),
                  _percent(r["max_abs_error_fraction"], False),
                  _percent(r["within_20_fraction"], False)) for r in rows],
                ["correlation", "equation", "runs in range", "RMSE (log)", "mean bias",
                 "max error", "within +-20 %"], title="Correlations on the same runs")
    print_notes(warnings)


def _compare_at_point(ctx, fits, keys, points, as_json) -> None:
    from scaleup.cautions import cautions_for
    from scaleup.correlate import published_correlation

    rows, warnings = [], []
    for ref in fits:
        result, label, stale = load_fit(ctx, ref)
        p = _predict(result, points)
        rows.append({"name": label, "equation": result.form.equation(), "source": "fitted",
                     "kla_per_s": float(p.value[0]),
                     "ci95_per_s": _interval(p.ci_low[0], p.ci_high[0]),
                     "in_range": not bool(p.extrapolation.extrapolated[0])})
        if stale:
            warnings.append(f"fit {label} is stale: a run it used was edited since")
    for key in keys:
        entry = published_correlation(key)
        rows.append({"name": key, "equation": entry.equation, "source": entry.source,
                     "kla_per_s": float(_predict(entry, points)[0]), "ci95_per_s": None,
                     "in_range": not bool(entry.domain.check(points).extrapolated[0])})
    cautions = cautions_for(scale=False)
    if as_json:
        emit_json({"inputs": {k: v[0] for k, v in points.items()}, "predictions": rows,
                   "warnings": warnings, "cautions": cautions})
        return
    print_table([(r["name"], r["equation"], _kla_text(r["kla_per_s"]),
                  "yes" if r["in_range"] else "NO") for r in rows],
                ["correlation", "equation", "kLa", "in range"], title="kLa at the given point")
    print_notes(warnings, cautions)
