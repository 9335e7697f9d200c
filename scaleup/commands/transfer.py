"""`scaleup import runs|vessels|fluxes|curves FILE`, `scaleup import template ENTITY FILE` and
`scaleup export runs|vessels|fluxes|curves|fits|study FILE` (CSV, XLSX or JSON by extension).

An import checks the whole file first and writes all of it or nothing; a rejected file is
reported row by row. Long imports and exports show a progress bar on a terminal; Ctrl-C
stops them with nothing partial kept (the transaction rolls back, a half-written export is
removed).
"""

from __future__ import annotations

import contextlib
import sys

import click

from scaleup.cli import db_path
from scaleup.commands.common import emit_json, json_option, print_table


@contextlib.contextmanager
def progress_bar(enabled: bool = True):
    """A rich progress display on stderr, one bar per stage; silent when not on a terminal.

    Yields ``progress(stage, done, total)`` for the store's importers and exporters.
    """
    from rich.console import Console
    from rich.progress import BarColumn, MofNCompleteColumn, Progress, TimeRemainingColumn

    console = Console(stderr=True)
    bars = Progress("[progress.description]{task.description}", BarColumn(),
                    MofNCompleteColumn(), TimeRemainingColumn(), console=console,
                    transient=True, disable=not (enabled and console.is_terminal))
    tasks: dict[str, int] = {}

    def progress(stage: str, done: int, total: int) -> None:
        if stage not in tasks:
            tasks[stage] = bars.add_task(stage, total=max(total, 1))
        bars.update(tasks[stage], completed=done, total=max(total, 1))
    with bars:
        yield progress


def _describe(record: dict | None) -> str:
    """A short lab-unit summary of a record that would be stored."""
    from scaleup import units
    from scaleup.store.keyunits import base_name, kind_of, lab_value, unit_label

    if not record:
        return ""
    parts = []
    for key, value in record.items():
        if value is None or key.endswith("_id") or key in ("notes", "gas_flow_basis"):
            continue
        kind = kind_of(key)
        if isinstance(value, float) and kind is not None:
            parts.append(f"{base_name(key)} {units.sig(lab_value(value, kind))} "
                         f"{unit_label(kind)}")
        elif not isinstance(value, float):
            parts.append(f"{key} {value}")
    return ", ".join(parts)


def _report(result: dict, as_json: bool, noun: str) -> None:
    if as_json:
        emit_json({**result, "warnings": result.get("warnings", [])})
        return
    dry = result["dry_run"]
    for inner in [result.get("vessels")] if result.get("vessels") else []:
        _report({**inner, "dry_run": dry}, False, "vessel(s)")
    if dry:
        ident = next((k for k in ("run_id", "vessel_id", "flux_id", "curve_id")
                      if result["rows"] and k in result["rows"][0]), None)
        print_table([(r["row"] if "row" in r else "-".join(map(str, r["rows"])),
                      r["action"], r.get(ident) if r["action"] != "add" else "(new)",
                      r.get("name") or _describe(r.get("record")) or _curve_text(r))
                     for r in result["rows"]], ["row", "action", "id", "what"],
                    title=f"what {result['source']} would store")
    verb = "would add" if dry else "added"
    click.echo(f"{result['source']}: {verb} {result['added']} {noun}, skipped "
               f"{result['skipped']}, replaced {result['replaced']}"
               + (" (dry run: nothing was written)" if dry else ""))
    for warning in result.get("warnings", []):
        click.echo(f"warning: {warning}", err=True)


def _curve_text(row: dict) -> str:
    if "n_samples" not in row:
        return ""
    text = f"run {row['run']}: {row['n_samples']} samples in {row['do_unit']}"
    if row.get("gas_on_s") is not None:
        text += f", gas on at {row['gas_on_s']:g} s"
    if row.get("analysis") and row["analysis"].get("kla_per_s"):
        text += f", kLa {row['analysis']['kla_per_s'] * 3600:.4g} 1/h"
    return text


def _run_import(ctx, entity: str, file: str, as_json: bool, noun: str, **options) -> None:
    from scaleup.campaign import Campaign
    from scaleup.errors import ImportRejected

    with Campaign(db_path(ctx)) as c:
        try:
            with progress_bar(not as_json) as progress:
                result = c.import_file(entity, file, progress=progress, **options)
        except ImportRejected as exc:
            if not as_json:
                raise
            emit_json({"rejected": True, "source": file, "problems": exc.problems,
                       "warnings": []})
            sys.exit(2)
    _report(result, as_json, noun)


def _common_import_options(func):
    options = [
        click.option("--sheet", default=None,
                     help="Sheet of an XLSX workbook (default: the one named after what is "
                          "imported, else the first)."),
        click.option("--dry-run", is_flag=True,
                     help="Check the file and show what would be stored; write nothing."),
        click.option("--on-duplicate", type=click.Choice(["refuse", "skip", "replace"]),
                     default="refuse", show_default=True,
                     help="What to do with a record already stored."),
        click.option("--decimal-comma", is_flag=True,
                     help="The file writes 0,5 for 0.5 (a point is then refused as "
                          "ambiguous)."),
        json_option,
    ]
    for option in reversed(options):
        func = option(func)
    return func


@click.group("import")
def import_command() -> None:
    """Import records from CSV, XLSX or JSON files with `name [unit]` headers.

    Any unit of the right kind is accepted; column names match case- and
    space-insensitively. The whole file is checked first: one bad row rejects it, and every
    bad row is listed (row, column, value, reason).

    \b
    Examples:
      scaleup import template runs runs.xlsx
      scaleup import runs pilot-week-11.csv --dry-run
      scaleup import curves logger.csv --run P20-0311-a --start "30 s"
    """


def _table_import(entity: str, noun: str, text: str, example: str) -> None:
    @click.argument("file", type=click.Path(dir_okay=False))
    @_common_import_options
    @click.pass_context
    def command(ctx, file, sheet, dry_run, on_duplicate, decimal_comma, as_json):
        _run_import(ctx, entity, file, as_json, noun, sheet=sheet, dry_run=dry_run,
                    on_duplicate=on_duplicate, decimal_comma=decimal_comma)
    command.__doc__ = f"{text}\n\nExample: {example}"
    import_command.command(entity)(command)


_table_import("runs", "run(s)", "Import runs (one per row). A duplicate has the same vessel, "
              "medium, speed, gas flow, date and time. A workbook's vessels sheet is imported "
              "first, in the same transaction.",
              "scaleup import runs runs.xlsx --sheet week11 --on-duplicate skip")
_table_import("vessels", "vessel(s)", "Import vessels: one row per impeller (lowest first), "
              "the vessel's fields on its first row. A duplicate has the same name.",
              "scaleup import vessels vessels.xlsx --dry-run")
_table_import("fluxes", "flux test(s)", "Import mass-flux tests; an optional run column names "
              "each test's run (ref or id).", "scaleup import fluxes stirred-cell.csv")


@import_command.command("curves")
@click.argument("file", type=click.Path(dir_okay=False))
@click.option("--run", "run", default=None, metavar="REF",
              help="The run (ref or id) of every curve in the file; else a run column.")
@click.option("--start", default=None, metavar="TIME",
              help='When the gas was switched on, on the file\'s clock: "30 s", "2 min", a '
                   "number in the time column's unit, or an ISO 8601 date-time.")
@click.option("--probe-tau", default=None, metavar="TIME",
              help='Probe time constant for every curve, e.g. "8 s".')
@click.option("--gap", default=None, metavar="TIME",
              help='Split curves at gaps longer than this ("60 s"), or "none"; default: '
                   "ten times the typical step, unless a curve column marks them.")
@click.option("--analyse/--no-analyse", default=True, show_default=True,
              help="Analyse the new curves for kLa in the same transaction.")
@click.option("--window", default=None, metavar="LOW:HIGH",
              help="Fractions of the rise used by the analysis, e.g. 0.2:0.98.")
@click.option("--method", type=click.Choice(["nonlinear", "log-linear"]), default=None,
              help="Analysis method (default nonlinear).")
@_common_import_options
@click.pass_context
def import_curves_command(ctx, file, run, start, probe_tau, gap, analyse, window, method,
                          sheet, dry_run, on_duplicate, decimal_comma, as_json):
    """Import DO logger curves: time in s, min or ISO 8601 date-times with zone; several
    curves per file, split by a run or curve column or by gaps. A duplicate is a curve of
    the same run with the same samples.

    Example: scaleup import curves logger.xlsx --run P20-0311-a --start 2026-03-11T09:02:00+01:00"""
    analysis = {}
    if window:
        low, _, high = window.partition(":")
        try:
            analysis["window"] = (float(low), float(high))
        except ValueError:
            raise click.BadParameter('write the window as LOW:HIGH, e.g. "0.2:0.98"',
                                     param_hint="--window") from None
    if method:
        analysis["method"] = method
    _run_import(ctx, "curves", file, as_json, "curve(s)", run=run, start=start,
                probe_tau=probe_tau, gap=gap, sheet=sheet, dry_run=dry_run,
                on_duplicate=on_duplicate, decimal_comma=decimal_comma, analyse=analyse,
                analysis=analysis)


@import_command.command("template")
@click.argument("entity", type=click.Choice(["runs", "vessels", "fluxes", "curves"]))
@click.argument("file", type=click.Path(dir_okay=False))
@click.option("--with-vessels", is_flag=True,
              help="Add an empty vessels sheet to an XLSX runs template.")
def import_template_command(entity, file, with_vessels):
    """Write an empty import template with a sheet (or, for CSV, a NAME-columns.csv file)
    documenting each column: its unit, whether it is required, and its valid range.

    Example: scaleup import template runs runs.xlsx --with-vessels"""
    from scaleup.campaign import Campaign

    written = Campaign.write_template(entity, file, with_vessels=with_vessels)
    click.echo("wrote " + " and ".join(str(p) for p in written))


@click.group("export")
def export_command() -> None:
    """Export records and results to CSV, XLSX or JSON (by the file's extension).

    Tables have `name [unit]` headers in lab units (or SI with --si) that `scaleup import`
    reads back unchanged.

    \b
    Examples:
      scaleup export runs all-runs.xlsx
      scaleup export curves p300-curves.csv --where "vessel = 'P-300'"
      scaleup export study design.json --study full-scale-40m3
    """


def _export(ctx, entity: str, file: str, as_json: bool, **options) -> None:
    from scaleup.campaign import Campaign

    with Campaign(db_path(ctx)) as c, progress_bar(not as_json) as progress:
        result = c.export_file(entity, file, progress=progress, **options) \
            if entity in ("runs", "vessels", "fluxes", "curves") else \
            c.export_file(entity, file, **options)
    if as_json:
        emit_json(result)
        return
    click.echo(f"wrote {result['n_rows']} row(s) of {entity} to {file}")
    for warning in result["warnings"]:
        click.echo(f"warning: {warning}", err=True)


def _table_export(entity: str, noun: str, example: str) -> None:
    @click.argument("file", type=click.Path(dir_okay=False))
    @click.option("--si", is_flag=True, help="Write SI units instead of lab units.")
    @click.option("--units-row", is_flag=True,
                  help="Names in the first row and [unit] cells in the second, instead of "
                       "`name [unit]` headers (CSV and XLSX).")
    @json_option
    @click.pass_context
    def command(ctx, file, si, units_row, as_json, **where):
        _export(ctx, entity, file, as_json, si=si, units_row=units_row, **where)
    command.__doc__ = f"Export {noun} that `scaleup import {entity}` reads back.\n\n" \
                      f"Example: {example}"
    if entity in ("runs", "curves"):
        command = click.option("--where", default=None,
                               help="Filter on runs, e.g. \"vessel = 'P-300'\".")(command)
    export_command.command(entity)(command)


_table_export("runs", "runs", "scaleup export runs p300.csv --where \"vessel = 'P-300'\"")
_table_export("vessels", "vessels with impellers and spargers",
              "scaleup export vessels vessels.xlsx")
_table_export("fluxes", "flux tests", "scaleup export fluxes fluxes.csv --si")
_table_export("curves", "DO curves, one row per sample,",
              "scaleup export curves curves.xlsx --where \"vessel = 'P-20'\"")


@export_command.command("fits")
@click.argument("file", type=click.Path(dir_okay=False))
@click.option("--fit", "name", default=None, help="Only this saved fit (name or id).")
@json_option
@click.pass_context
def export_fits_command(ctx, file, name, as_json):
    """Export saved fits: JSON whole (reloadable), CSV one row per parameter with its 95 %
    interval, XLSX with fits, parameters and runs sheets.

    Example: scaleup export fits fits.xlsx"""
    _export(ctx, "fits", file, as_json, name=name)


@export_command.command("study")
@click.argument("file", type=click.Path(dir_okay=False))
@click.option("--study", "name", default=None,
              help="The saved study (name or id); default the newest.")
@click.option("--si", is_flag=True, help="SI units in CSV and XLSX (JSON is always SI).")
@json_option
@click.pass_context
def export_study_command(ctx, file, name, si, as_json):
    """Export a saved study with all its inputs and results: JSON whole, CSV as key, value,
    unit rows, XLSX with a sheet per results table (the rule comparison).

    Example: scaleup export study design.xlsx --study full-scale-40m3"""
    if name is None:
        from scaleup.campaign import Campaign

        with Campaign(db_path(ctx)) as c:
            newest = c.rows("SELECT id FROM study WHERE deleted_at IS NULL ORDER BY id DESC "
                            "LIMIT 1")
        if not newest:
            from scaleup.errors import InputError

            raise InputError("the campaign has no saved study; save one with --save NAME",
                             "study")
        name = newest[0]["id"]
    _export(ctx, "study", file, as_json, name=name, si=si)
