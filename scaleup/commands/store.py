"""`scaleup init`, `demo`, `check`, `backup`, `undo`, and opening the workbench."""

from __future__ import annotations

from pathlib import Path

import click

from scaleup.cli import db_path
from scaleup.commands.common import emit_json, json_option, print_pairs


def open_workbench(path: str) -> None:
    """Open the terminal workbench on a campaign (the TUI lives in scaleup.tui)."""
    from scaleup.campaign import Campaign

    try:
        from scaleup.tui.app import run_app
    except ImportError:
        with Campaign(path) as c:
            summary = c.summary()
        click.echo("The terminal workbench is not part of this build yet; campaign summary:")
        print_pairs(list(summary.items()), title="campaign")
        return
    run_app(path)


@click.command("init")
@click.argument("path", type=click.Path(dir_okay=False))
@json_option
def init_command(path, as_json):
    """Create an empty campaign file. Example: scaleup init pilot.db"""
    from scaleup.campaign import Campaign

    with Campaign.create(path) as c:
        summary = c.summary()
    if as_json:
        emit_json({"campaign": summary, "warnings": []})
    else:
        click.echo(f"created campaign {path} (schema version {summary['schema_version']})")


@click.command("demo")
@click.option("--no-tui", is_flag=True, help="Build the demo and print its summary only.")
@click.option("--force", is_flag=True, help="Replace an existing demo file at that path.")
@json_option
@click.pass_context
def demo_command(ctx, no_tui, force, as_json):
    """Build the invented demo campaign (two pilot vessels, two media, 60 runs, 40 DO curves)
    and open it. Example: scaleup demo --db demo.db --no-tui"""
    from scaleup.campaign import Campaign

    path = Path(ctx.find_root().params.get("db") or "scaleup-demo.db")
    if path.exists() and force:
        for suffix in ("", "-wal", "-shm"):
            Path(str(path) + suffix).unlink(missing_ok=True)
    if path.exists():
        with Campaign(path) as c:
            summary = c.summary()
        note = f"{path} already exists; opening it as it is (use --force to rebuild it)"
    else:
        with Campaign.create(path) as c:
            c.load_demo()
            summary = c.summary()
        note = f"built the demo campaign in {path}"
    if as_json:
        emit_json({"campaign": summary, "note": note, "warnings": []})
    elif no_tui:
        click.echo(note)
        print_pairs(list(summary.items()), title="demo campaign (invented data)")
    if not no_tui and not as_json:
        open_workbench(str(path))


@click.command("check")
@json_option
@click.pass_context
def check_command(ctx, as_json):
    """Check the campaign file's integrity and references. Example: scaleup check"""
    from scaleup.campaign import Campaign

    with Campaign(db_path(ctx)) as c:
        report = c.check()
    if as_json:
        emit_json({**report, "warnings": []})
    else:
        print_pairs([("integrity", ", ".join(report["integrity"])),
                     ("broken references", str(len(report["foreign_keys"]))),
                     ("schema version", str(report["schema_version"])),
                     ("verdict", "ok" if report["ok"] else "PROBLEMS FOUND")],
                    title=f"check of {db_path(ctx)}")
    if not report["ok"]:
        raise SystemExit(1)


@click.command("backup")
@click.argument("target", type=click.Path(dir_okay=False))
@click.pass_context
def backup_command(ctx, target):
    """Copy the open campaign safely (online backup), even while it is in use.
    Example: scaleup backup pilot-2026-03-14.db"""
    from scaleup.campaign import Campaign

    with Campaign(db_path(ctx)) as c:
        out = c.backup(target)
    click.echo(f"backed up {db_path(ctx)} to {out}")


@click.command("undo")
@click.pass_context
def undo_command(ctx):
    """Undo your last change (edit, delete, restore or add). Example: scaleup undo"""
    from scaleup.campaign import Campaign

    with Campaign(db_path(ctx)) as c:
        done = c.undo()
    click.echo(f"undid the {done['undid']} of {done['table']} {done['record_id']}")
