"""`scaleup import runs FILE` and `scaleup export runs FILE` (CSV, or XLSX by extension)."""

from __future__ import annotations

import click

from scaleup.cli import db_path
from scaleup.commands.common import emit_json, json_option


@click.group("import")
def import_command() -> None:
    """Import records from CSV or XLSX files with `name [unit]` headers.

    \b
    Example:
      scaleup import runs pilot-week-11.csv --dry-run
    """


@import_command.command("runs")
@click.argument("file", type=click.Path(dir_okay=False))
@click.option("--sheet", default=None, help="Sheet of an XLSX workbook (default: the first).")
@click.option("--dry-run", is_flag=True, help="Check the file and show what would be stored.")
@click.option("--on-duplicate", type=click.Choice(["refuse", "skip", "replace"]),
              default="refuse", show_default=True,
              help="What to do with a run already stored (same vessel, medium, speed, gas flow,"
                   " date and time).")
@json_option
@click.pass_context
def import_runs_command(ctx, file, sheet, dry_run, on_duplicate, as_json):
    """Import runs; a file with any bad row is rejected whole, every bad row listed.
    Example: scaleup import runs runs.xlsx --sheet week11"""
    from scaleup.campaign import Campaign

    with Campaign(db_path(ctx)) as c:
        result = c.import_runs(file, sheet=sheet, dry_run=dry_run, on_duplicate=on_duplicate)
    if as_json:
        emit_json({**result, "warnings": []})
        return
    verb = "would add" if dry_run else "added"
    click.echo(f"{result['source']}: {verb} {result['added']} run(s), skipped "
               f"{result['skipped']}, replaced {result['replaced']}"
               + (" (dry run: nothing was written)" if dry_run else ""))


@click.group("export")
def export_command() -> None:
    """Export records to CSV or XLSX (by the file's extension).

    \b
    Example:
      scaleup export runs all-runs.xlsx
    """


@export_command.command("runs")
@click.argument("file", type=click.Path(dir_okay=False))
@click.option("--where", default=None, help="Filter, e.g. \"vessel = 'P-300'\".")
@click.option("--si", is_flag=True, help="Write SI units instead of lab units.")
@click.pass_context
def export_runs_command(ctx, file, where, si):
    """Export runs with `name [unit]` headers that `import runs` reads back.
    Example: scaleup export runs p300.csv --where "vessel = 'P-300'\""""
    from scaleup.campaign import Campaign

    with Campaign(db_path(ctx)) as c:
        n = c.export_runs(file, where, si=si)
    click.echo(f"wrote {n} run(s) to {file}")
