"""`scaleup report STUDY --out FILE.html`: a design-review report of a saved study."""

from __future__ import annotations

import click

from scaleup.cli import db_path
from scaleup.commands.common import emit_json, json_option


@click.command("report")
@click.argument("study")
@click.option("--out", "out", required=True, type=click.Path(dir_okay=False),
              help="The report file (.html, or .md for Markdown).")
@click.option("--format", "fmt", type=click.Choice(["html", "md"]), default=None,
              help="html (self-contained page, inline SVG plots) or md; default by the "
                   "file's extension.")
@json_option
@click.pass_context
def report_command(ctx, study, out, fmt, as_json):
    """Write a design-review report of a saved study (by name or id): the job, the campaign
    data used, the correlation with its intervals, parity and residual plots,
    leave-one-vessel-out, the rule comparison, the operating window, the probability of
    meeting the duty, the heat balance, every warning, the cautions and the provenance.

    \b
    Examples:
      scaleup report full-scale-40m3 --out review.html
      scaleup report 3 --out review.md"""
    from scaleup.campaign import Campaign

    with Campaign(db_path(ctx)) as c:
        result = c.write_report(study, out, fmt)
    if as_json:
        emit_json(result)
        return
    click.echo(f"wrote the {result['format']} report of study {result['study_id']} to "
               f"{result['path']} ({len(result['warnings'])} warning(s))")
