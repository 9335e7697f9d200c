"""The ``scaleup`` command line: thin, lazy, and strict about input.

Each command lives in a module of :mod:`scaleup.commands` and is imported only when it is
run, so ``scaleup --help`` does not pay for numpy, scipy, pandas, pint or textual. The short
help shown in the command list is kept here next to the module path.

Errors a user can cause (:class:`scaleup.errors.ScaleupError`, ``ValueError``) become one
message on stderr and exit status 2, never a traceback.
"""

from __future__ import annotations

import importlib
import os
import sys

import click

# name -> (module:attribute, short help). Add a command by adding one line here.
COMMANDS: dict[str, tuple[str, str]] = {
    "init": ("scaleup.commands.store:init_command", "Create an empty campaign file."),
    "demo": ("scaleup.commands.store:demo_command", "Build the demo campaign and open it."),
    "vessel": ("scaleup.commands.records:vessel_group", "Add, list, show, edit vessels."),
    "medium": ("scaleup.commands.records:medium_group", "Add, list, show, edit media."),
    "run": ("scaleup.commands.records:run_group", "Add, list, show, edit pilot runs."),
    "import": ("scaleup.commands.transfer:import_command", "Import runs, vessels, fluxes, DO curves; templates."),
    "export": ("scaleup.commands.transfer:export_command", "Export records, fits, studies (CSV, XLSX, JSON)."),
    "check": ("scaleup.commands.store:check_command", "Check a campaign file's integrity."),
    "backup": ("scaleup.commands.store:backup_command", "Copy a campaign safely while in use."),
    "undo": ("scaleup.commands.store:undo_command", "Undo your last change."),
    "power": ("scaleup.commands.power:power_command", "Power, gassed power, regime, blend time."),
    "kla": ("scaleup.commands.kla:kla_group", "kLa from DO curves, off-gas balance, sulfite."),
    "scale": ("scaleup.commands.scale:scale_command", "Project a pilot point to full scale by rules."),
    "design": ("scaleup.commands.scale:design_command", "Meet an O2 duty at least total power."),
    "report": ("scaleup.commands.report:report_command", "Design-review report of a saved study."),
    "props": ("scaleup.commands.props:props_group", "Water properties, gas solubility, diffusivity."),
    "transport": ("scaleup.commands.transport:transport_group", "Fluxes, Fick's law, kL models."),
    "fit": ("scaleup.commands.fit:fit_group", "Fit kLa or Sherwood correlations to runs."),
    "compare": ("scaleup.commands.fit:compare_command", "Compare fitted and published correlations."),
    "predict": ("scaleup.commands.fit:predict_command", "Predict kLa with intervals from a fit."),
}


class LazyGroup(click.Group):
    """A click group whose subcommands are imported on first use."""

    def list_commands(self, ctx: click.Context) -> list[str]:
        return sorted(COMMANDS)

    def get_command(self, ctx: click.Context, name: str) -> click.Command | None:
        if name not in COMMANDS:
            return None
        target, _ = COMMANDS[name]
        module_name, attribute = target.split(":")
        return getattr(importlib.import_module(module_name), attribute)

    def format_commands(self, ctx: click.Context, formatter: click.HelpFormatter) -> None:
        rows = [(name, COMMANDS[name][1]) for name in self.list_commands(ctx)]
        with formatter.section("Commands"):
            formatter.write_dl(rows)


DEFAULT_DB = "scaleup.db"


def db_path(ctx: click.Context) -> str:
    """The campaign file chosen by --db, SCALEUP_DB or the default ./scaleup.db."""
    root = ctx.find_root()
    return root.params.get("db") or os.environ.get("SCALEUP_DB") or DEFAULT_DB


@click.group(cls=LazyGroup, invoke_without_command=True,
             context_settings={"help_option_names": ["-h", "--help"]})
@click.option("--db", type=click.Path(dir_okay=False), default=None,
              help="Campaign file (default: $SCALEUP_DB or ./scaleup.db).")
@click.version_option(package_name="scaleup", message="scaleup %(version)s")
@click.pass_context
def cli(ctx: click.Context, db: str | None) -> None:
    """Scale stirred gas-liquid vessels from pilot to production.

    With no command, opens the terminal workbench on the campaign file.

    \b
    Examples:
      scaleup demo                      build the demo campaign and open it
      scaleup --db pilot.db run list    list the runs of a campaign
      scaleup props water --temp "37 degC"
    """
    if ctx.invoked_subcommand is None:
        from scaleup.commands.store import open_workbench

        open_workbench(db_path(ctx))


def main(argv: list[str] | None = None) -> None:
    """Entry point: run the CLI, turning user errors into exit status 2."""
    from scaleup.errors import ScaleupError

    try:
        cli.main(args=argv, prog_name="scaleup", standalone_mode=False)
    except click.exceptions.Abort:
        click.echo("Interrupted; nothing partial was written.", err=True)
        sys.exit(130)
    except click.ClickException as exc:
        exc.show()
        sys.exit(2 if exc.exit_code in (1, 2) else exc.exit_code)
    except click.exceptions.Exit as exc:
        sys.exit(exc.exit_code)
    except KeyboardInterrupt:
        click.echo("Interrupted; nothing partial was written.", err=True)
        sys.exit(130)
    except (ScaleupError, ValueError) as exc:
        click.echo(f"error: {exc}", err=True)
        sys.exit(2)
    except OSError as exc:
        click.echo(f"error: {exc.strerror or exc}: {exc.filename or ''}".rstrip(": "), err=True)
        sys.exit(2)
    except Exception as exc:  # a bug of ours: say so plainly, keep the traceback on request
        from scaleup.store.db import failure_message

        if (message := failure_message(exc)) is not None:  # a damaged file or a full disk
            click.echo(f"error: {message}", err=True)
            sys.exit(2)
        if os.environ.get("SCALEUP_DEBUG"):
            raise
        click.echo(f"internal error ({type(exc).__name__}: {exc}); nothing partial was written."
                   " Set SCALEUP_DEBUG=1 to see the traceback and please report it.", err=True)
        sys.exit(1)
    sys.exit(0)
