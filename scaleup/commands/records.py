"""`scaleup vessel|medium|run add|list|show|edit|delete|restore`.

Options are built from :mod:`scaleup.fields`, so every stored field can be given in any unit
of the right kind ("--speed '600 rpm'", "--gas-flow '1 vvm'") and the help text shows the
accepted range in lab units.
"""

from __future__ import annotations

from collections.abc import Callable

import click

from scaleup import fields as F
from scaleup.cli import db_path
from scaleup.commands.common import emit_json, json_option, print_pairs, print_table


def _campaign(ctx: click.Context):
    from scaleup.campaign import Campaign

    return Campaign(db_path(ctx))


def _option_name(spec: F.Field) -> str:
    return spec.label.replace(" ", "_")


def field_options(specs: tuple[F.Field, ...], skip: tuple[str, ...] = ()) -> Callable:
    """Add one ``--label`` option per field, taking text with units."""
    def decorate(func):
        for spec in reversed([s for s in specs if s.column not in skip]):
            unit = f" [{spec.unit}]" if spec.unit else ""
            accepted = spec.range_text()
            text = " ".join(p for p in (spec.help, f"Accepted: {accepted}." if accepted else "")
                            if p)
            func = click.option(spec.option, _option_name(spec), default=None,
                                metavar="TEXT", help=f"{spec.label}{unit}. {text}".strip())(func)
        return func
    return decorate


def given(specs: tuple[F.Field, ...], kwargs: dict) -> dict:
    """The fields the user actually gave, keyed by label."""
    return {s.label: kwargs[_option_name(s)] for s in specs
            if kwargs.get(_option_name(s)) is not None}


def _fmt(value, kind: str) -> str:
    from scaleup import units

    return "-" if value is None else units.format_quantity(value, kind)


# ---------------------------------------------------------------------------------- vessels
@click.group("vessel")
def vessel_group() -> None:
    """Vessels: geometry, impellers, sparger, jacket.

    \b
    Example:
      scaleup vessel add --name V-300 --tank-diameter "0.6 m" --liquid-height "1.1 m" \\
          --impeller "disc-turbine:0.2 m:0.2 m" --sparger "ring:0.15 m:0.05 m"
    """


def _impeller(text: str) -> dict:
    parts = [p.strip() for p in text.split(":")]
    if len(parts) < 3:
        raise click.BadParameter('write TYPE:DIAMETER:CLEARANCE[:BLADES], e.g. '
                                 '"disc-turbine:0.2 m:0.2 m:6"', param_hint="--impeller")
    out = {"impeller type": parts[0], "impeller diameter": parts[1], "clearance": parts[2]}
    if len(parts) > 3 and parts[3]:
        out["blade count"] = parts[3]
    if len(parts) > 4 and parts[4]:
        out["power number"] = parts[4]
    return out


def _sparger(text: str) -> dict:
    parts = [p.strip() for p in text.split(":")]
    keys = ("sparger type", "sparger diameter", "sparger height", "orifice count",
            "orifice diameter")
    return {k: v for k, v in zip(keys, parts, strict=False) if v}


@vessel_group.command("add")
@field_options(F.VESSEL)
@click.option("--impeller", "impellers", multiple=True, metavar="TYPE:D:C[:BLADES[:NP]]",
              help='An impeller, lowest first; repeat for more. E.g. "disc-turbine:0.2 m:0.2 m".')
@click.option("--sparger", default=None, metavar="TYPE:DIAMETER:HEIGHT",
              help='The sparger, e.g. "ring:0.15 m:0.05 m".')
@json_option
@click.pass_context
def vessel_add(ctx, impellers, sparger, as_json, **kwargs):
    """Add a vessel. Example: scaleup vessel add --name V-20 --tank-diameter "0.25 m"
    --liquid-height "0.4 m" --impeller "disc-turbine:83 mm:83 mm"."""
    with _campaign(ctx) as c:
        vessel_id = c.add_vessel(given(F.VESSEL, kwargs), [_impeller(i) for i in impellers],
                                 _sparger(sparger) if sparger else None)
        _show_vessel(c.vessel(vessel_id), as_json)


def _show_vessel(v: dict, as_json: bool) -> None:
    if as_json:
        emit_json({"vessel": v, "warnings": []})
        return
    pairs = [("name", v["name"]), ("tank diameter", _fmt(v["tank_diameter_m"], "length")),
             ("liquid height", _fmt(v["liquid_height_m"], "length")),
             ("working volume", _fmt(v["working_volume_m3"], "volume")),
             ("bottom", v["bottom_shape"]), ("baffles", f"{v['baffle_count']}"
                                              + (f" x {_fmt(v['baffle_width_m'], 'length')}"
                                                 if v["baffle_width_m"] else "")),
             ("head pressure", _fmt(v["head_pressure_pa"], "pressure")),
             ("jacket", _fmt(v["jacket_area_m2"], "area") + (
                 f", U {_fmt(v['jacket_u_w_m2_k'], 'heat_transfer_coefficient')}"
                 if v["jacket_u_w_m2_k"] else "")),
             ("motor limit", _fmt(v["motor_power_limit_w"], "power"))]
    for imp in v["impellers"]:
        pairs.append((f"impeller {imp['position']}",
                      f"{imp['impeller_type']}, D {_fmt(imp['impeller_diameter_m'], 'length')}, "
                      f"C {_fmt(imp['clearance_m'], 'length')}"
                      + (f", Np {imp['power_number_measured']:g} (measured)"
                         if imp["power_number_measured"] else "")))
    if v["sparger"]:
        s = v["sparger"]
        pairs.append(("sparger", f"{s['sparger_type']}, D {_fmt(s['sparger_diameter_m'], 'length')}"
                      f", at {_fmt(s['sparger_height_m'], 'length')}"))
    if v.get("deleted_at"):
        pairs.append(("deleted", v["deleted_at"]))
    print_pairs(pairs, title=f"vessel {v['id']}")


@vessel_group.command("list")
@click.option("--deleted", is_flag=True, help="Include deleted vessels.")
@json_option
@click.pass_context
def vessel_list(ctx, deleted, as_json):
    """List vessels. Example: scaleup vessel list --json"""
    with _campaign(ctx) as c:
        vessels = c.vessels(include_deleted=deleted)
    if as_json:
        emit_json({"vessels": vessels, "warnings": []})
        return
    print_table([(v["id"], v["name"], _fmt(v["tank_diameter_m"], "length"),
                  _fmt(v["liquid_height_m"], "length"), _fmt(v["working_volume_m3"], "volume"),
                  ", ".join(i["impeller_type"] for i in v["impellers"]),
                  "deleted" if v["deleted_at"] else "") for v in vessels],
                ["id", "name", "T", "H", "volume", "impellers", ""], title="vessels")


@vessel_group.command("show")
@click.argument("vessel")
@json_option
@click.pass_context
def vessel_show(ctx, vessel, as_json):
    """Show one vessel by name or id. Example: scaleup vessel show V-300"""
    with _campaign(ctx) as c:
        _show_vessel(c.vessel(vessel, include_deleted=True), as_json)


@vessel_group.command("edit")
@click.argument("vessel")
@field_options(F.VESSEL)
@click.option("--impeller", "impellers", multiple=True, metavar="TYPE:D:C[:BLADES[:NP]]",
              help="Replace the impellers with these, lowest first; repeat for more.")
@click.option("--no-impellers", is_flag=True, help="Remove every impeller.")
@click.option("--sparger", default=None, metavar="TYPE:DIAMETER:HEIGHT",
              help="Replace the sparger with this one.")
@click.option("--no-sparger", is_flag=True, help="Remove the sparger.")
@click.option("--expected-version", type=int, default=None,
              help="Refuse the edit if the record's version is no longer this one.")
@json_option
@click.pass_context
def vessel_edit(ctx, vessel, impellers, no_impellers, sparger, no_sparger, expected_version,
                as_json, **kwargs):
    """Edit fields, impellers or sparger of a vessel; all or nothing.

    \b
    Examples:
      scaleup vessel edit V-300 --head-pressure "0.3 barg"
      scaleup vessel edit V-300 --impeller "disc-turbine:0.2 m:0.2 m" \\
          --impeller "pitched-blade-4:0.2 m:0.6 m" --sparger "ring:0.15 m:0.05 m"
    """
    changes = given(F.VESSEL, kwargs)
    if (impellers and no_impellers) or (sparger and no_sparger):
        raise click.UsageError("give --impeller or --no-impellers (--sparger or --no-sparger), "
                               "not both")
    new_impellers = [_impeller(i) for i in impellers] if impellers or no_impellers else None
    new_sparger = (_sparger(sparger) if sparger else None) if sparger or no_sparger else False
    if not changes and new_impellers is None and new_sparger is False:
        raise click.UsageError("give at least one field to change, e.g. --liquid-height '1 m'"
                               " or --impeller 'disc-turbine:0.2 m:0.2 m'")
    with _campaign(ctx) as c:
        # by id: a new name that looks like a number ("0") must not be read as an id
        key = c.vessel(vessel)["id"]
        with c.transaction():
            # the expected version guards the first write; the later ones see the raised one
            version = expected_version
            if changes:
                c.edit_vessel(key, changes, expected_version=version)
                version = None
            if new_impellers is not None:
                c.set_impellers(key, new_impellers, expected_version=version)
                version = None
            if new_sparger is not False:
                c.set_sparger(key, new_sparger, expected_version=version)
        _show_vessel(c.vessel(key), as_json)


# ------------------------------------------------------------------------------------ media
@click.group("medium")
def medium_group() -> None:
    """Media: coalescence class, measured properties, dissolved salts.

    \b
    Example:
      scaleup medium add --name "salt broth" --coalescence non-coalescing --salt "NaCl=0.2 mol/L"
    """


def _salts(items: tuple[str, ...]) -> dict:
    out = {}
    for item in items:
        if "=" not in item:
            raise click.BadParameter('write SALT=CONCENTRATION, e.g. "NaCl=0.5 mol/L"',
                                     param_hint="--salt")
        salt, conc = item.split("=", 1)
        out[salt.strip()] = conc.strip()
    return out


def _show_medium(m: dict, as_json: bool) -> None:
    if as_json:
        emit_json({"medium": m, "warnings": []})
        return
    pairs = [("name", m["name"]), ("coalescence", m["coalescence"]),
             ("density", _fmt(m["density_kg_m3"], "density")),
             ("viscosity", _fmt(m["viscosity_pa_s"], "viscosity")),
             ("surface tension", _fmt(m["surface_tension_n_m"], "surface_tension"))]
    pairs += [(f"salt {k}", _fmt(v, "concentration")) for k, v in m["salts"].items()]
    if m["notes"]:
        pairs.append(("notes", m["notes"]))
    print_pairs(pairs, title=f"medium {m['id']}")


@medium_group.command("add")
@field_options(F.MEDIUM)
@click.option("--salt", "salts", multiple=True, metavar="SALT=CONC",
              help='A dissolved salt and its concentration, e.g. "NaCl=0.5 mol/L"; repeatable.')
@json_option
@click.pass_context
def medium_add(ctx, salts, as_json, **kwargs):
    """Add a medium. Example: scaleup medium add --name water --coalescence coalescing"""
    with _campaign(ctx) as c:
        medium_id = c.add_medium(given(F.MEDIUM, kwargs), _salts(salts))
        _show_medium(c.medium(medium_id), as_json)


@medium_group.command("list")
@click.option("--deleted", is_flag=True, help="Include deleted media.")
@json_option
@click.pass_context
def medium_list(ctx, deleted, as_json):
    """List media. Example: scaleup medium list"""
    with _campaign(ctx) as c:
        media = c.media(include_deleted=deleted)
    if as_json:
        emit_json({"media": media, "warnings": []})
        return
    print_table([(m["id"], m["name"], m["coalescence"], _fmt(m["viscosity_pa_s"], "viscosity"),
                  ", ".join(f"{k} {_fmt(v, 'concentration')}" for k, v in m["salts"].items()),
                  "deleted" if m["deleted_at"] else "") for m in media],
                ["id", "name", "coalescence", "viscosity", "salts", ""], title="media")


@medium_group.command("show")
@click.argument("medium")
@json_option
@click.pass_context
def medium_show(ctx, medium, as_json):
    """Show one medium by name or id. Example: scaleup medium show water"""
    with _campaign(ctx) as c:
        _show_medium(c.medium(medium, include_deleted=True), as_json)


@medium_group.command("edit")
@click.argument("medium")
@field_options(F.MEDIUM)
@click.option("--salt", "salts", multiple=True, metavar="SALT=CONC",
              help='Replace the salts with these, e.g. "NaCl=0.5 mol/L"; repeatable.')
@click.option("--no-salts", is_flag=True, help="Remove every salt.")
@click.option("--expected-version", type=int, default=None,
              help="Refuse the edit if the record's version is no longer this one.")
@json_option
@click.pass_context
def medium_edit(ctx, medium, salts, no_salts, expected_version, as_json, **kwargs):
    """Edit a medium or replace its salts; all or nothing.

    \b
    Examples:
      scaleup medium edit water --viscosity "1.1 mPa s"
      scaleup medium edit brine --salt "NaCl=0.5 mol/L" --salt "Na2SO4=20 mmol/L"
    """
    changes = given(F.MEDIUM, kwargs)
    if salts and no_salts:
        raise click.UsageError("give --salt or --no-salts, not both")
    if not changes and not salts and not no_salts:
        raise click.UsageError("give at least one field to change, e.g. --viscosity '2 mPa s'"
                               " or --salt 'NaCl=0.5 mol/L'")
    new_salts = _salts(salts)
    with _campaign(ctx) as c:
        key = c.medium(medium)["id"]
        with c.transaction():
            version = expected_version
            if changes:
                c.edit_medium(key, changes, expected_version=version)
                version = None
            if salts or no_salts:
                c.set_salts(key, new_salts, expected_version=version)
        _show_medium(c.medium(key), as_json)


# ------------------------------------------------------------------------------------- runs
@click.group("run")
def run_group() -> None:
    """Pilot runs: one operating point of one vessel with one medium.

    \b
    Examples:
      scaleup run add --vessel V-300 --medium water --date 2026-03-14 --speed "300 rpm" \\
          --gas-flow "1 vvm" --temperature "30 degC" --kla "95 1/h"
      scaleup run list --where "vessel = 'V-300' and speed > 250 rpm"
    """


RUN_HEADERS = ["id", "vessel", "medium", "date", "speed [rpm]", "gas [NL/min]", "T [degC]",
               "kLa [1/h]", "+- [1/h]", "method", "curves"]


def run_cells(r: dict) -> list[str]:
    from scaleup import units

    def num(value, kind):
        return "-" if value is None else units.sig(units.convert(value, kind), 4)

    return [str(r["id"]), r["vessel"], r["medium"], r["run_at"], num(r["speed_rps"], "speed"),
            "-" if r["gas_flow_mol_s"] is None else
            units.sig(units.gas_flow_to(r["gas_flow_mol_s"], "NL/min"), 4),
            num(r["temperature_k"], "temperature"), num(r["kla_per_s"], "kla"),
            num(r["kla_stderr_per_s"], "kla"), r["kla_method"] or "-", str(r.get("n_curves", ""))]


@run_group.command("add")
@field_options(F.RUN)
@json_option
@click.pass_context
def run_add(ctx, as_json, **kwargs):
    """Add a run. Example: scaleup run add --vessel V-20 --medium water --date 2026-03-14
    --speed "600 rpm" --gas-flow "1 vvm" --temperature "30 degC"."""
    with _campaign(ctx) as c:
        run_id = c.add_run(given(F.RUN, kwargs))
        _show_run(c, run_id, as_json)


def _show_run(c, run_id: int, as_json: bool) -> None:
    from scaleup import units

    r = c.run(run_id, include_deleted=True)
    if as_json:
        emit_json({"run": r, "warnings": []})
        return
    volume = c.vessel(r["vessel_id"], include_deleted=True)["working_volume_m3"]
    pairs = [("vessel", r["vessel"]), ("medium", r["medium"]), ("date", r["run_at"]),
             ("speed", _fmt(r["speed_rps"], "speed")),
             ("gas flow", f"{units.sig(units.gas_flow_to(r['gas_flow_mol_s'], 'NL/min'))} NL/min"
                          f" ({units.sig(units.gas_flow_to(r['gas_flow_mol_s'], 'vvm', volume))}"
                          " vvm)"),
             ("inlet O2 fraction", units.sig(r["o2_fraction_in"])),
             ("temperature", _fmt(r["temperature_k"], "temperature")),
             ("head pressure", _fmt(r["head_pressure_pa"], "pressure") if r["head_pressure_pa"]
              else "vessel's"),
             ("measured power", _fmt(r["power_measured_w"], "power")),
             ("kLa", _fmt(r["kla_per_s"], "kla") + (
                 f" +- {_fmt(r['kla_stderr_per_s'], 'kla')}" if r["kla_stderr_per_s"] else "")
              + (f" ({r['kla_method']})" if r["kla_method"] else "")),
             ("gas hold-up", units.sig(r["gas_holdup"]) if r["gas_holdup"] is not None else "-"),
             ("version", str(r["row_version"]))]
    if r["notes"]:
        pairs.append(("notes", r["notes"]))
    if r["deleted_at"]:
        pairs.append(("deleted", r["deleted_at"]))
    print_pairs(pairs, title=f"run {r['id']}")


@run_group.command("list")
@click.option("--where", default=None,
              help="Filter, e.g. \"vessel = 'V-300' and speed > 250 rpm\".")
@click.option("--sort", default="id", help="Column to sort by (e.g. speed, kla, run_at).")
@click.option("--desc", is_flag=True, help="Sort descending.")
@click.option("--limit", type=click.IntRange(1, None), default=None, help="Show at most N runs.")
@click.option("--offset", type=click.IntRange(0, None), default=0, help="Skip the first N runs.")
@json_option
@click.pass_context
def run_list(ctx, where, sort, desc, limit, offset, as_json):
    """List runs. Example: scaleup run list --where "medium = 'salt broth'" --sort kla"""
    with _campaign(ctx) as c:
        runs = c.runs(where, order_by=sort, descending=desc, limit=limit, offset=offset)
        total = c.count_runs(where)
    if as_json:
        emit_json({"runs": runs, "n_runs": len(runs), "n_matching": total, "warnings": []})
        return
    print_table([run_cells(r) for r in runs], RUN_HEADERS, title="runs",
                footer=f"{len(runs)} of {total} matching run(s)")


@run_group.command("show")
@click.argument("run_id", type=int)
@json_option
@click.pass_context
def run_show(ctx, run_id, as_json):
    """Show one run. Example: scaleup run show 12"""
    with _campaign(ctx) as c:
        _show_run(c, run_id, as_json)


@run_group.command("edit")
@click.argument("run_id", type=int)
@field_options(F.RUN)
@click.option("--expected-version", type=int, default=None,
              help="Refuse the edit if the run's version is no longer this one.")
@json_option
@click.pass_context
def run_edit(ctx, run_id, expected_version, as_json, **kwargs):
    """Edit fields of a run. Example: scaleup run edit 12 --speed "450 rpm" --notes "re-run\""""
    changes = given(F.RUN, kwargs)
    if not changes:
        raise click.UsageError("give at least one field to change, e.g. --speed '450 rpm'")
    with _campaign(ctx) as c:
        c.edit_run(run_id, changes, expected_version=expected_version)
        _show_run(c, run_id, as_json)


@run_group.command("history")
@click.argument("run_id", type=int)
@json_option
@click.pass_context
def run_history(ctx, run_id, as_json):
    """Show the audited changes of a run. Example: scaleup run history 12"""
    import json

    with _campaign(ctx) as c:
        changes = c.history("run", run_id)
    if as_json:
        emit_json({"history": changes, "warnings": []})
        return
    rows = []
    for h in changes:
        old = json.loads(h["old_json"]) if h["old_json"] else {}
        new = json.loads(h["new_json"]) if h["new_json"] else {}
        diff = ", ".join(f"{k}: {old.get(k)!r} -> {new.get(k)!r}" for k in sorted(new)
                         if old and old.get(k) != new.get(k)
                         and k not in ("row_version", "updated_at"))
        rows.append((h["at"], h["actor"], h["action"], diff))
    print_table(rows, ["at", "by", "action", "changes"], title=f"history of run {run_id}")


from scaleup.commands.kla import run_analyse_command  # noqa: E402  (defined with the kla commands)

run_group.add_command(run_analyse_command)


def add_delete_and_restore(group: click.Group, noun: str, example: str,
                           argument: click.Argument) -> None:
    """Give a record group its soft `delete` and its `restore` (Campaign.delete_<noun>,
    Campaign.restore_<noun>)."""

    @group.command("delete", help=f"Delete a {noun} (soft; `{noun} restore` brings it back). "
                                  f"Example: scaleup {noun} delete {example}")
    @argument
    @click.pass_context
    def delete(ctx, key):
        with _campaign(ctx) as c:
            getattr(c, f"delete_{noun}")(key)
        click.echo(f"deleted {noun} {key} (restore with `scaleup {noun} restore {key}`)")

    @group.command("restore", help=f"Restore a deleted {noun}. "
                                   f"Example: scaleup {noun} restore {example}")
    @argument
    @click.pass_context
    def restore(ctx, key):
        with _campaign(ctx) as c:
            getattr(c, f"restore_{noun}")(key)
        click.echo(f"restored {noun} {key}")


add_delete_and_restore(vessel_group, "vessel", "V-1", click.argument("key", metavar="VESSEL"))
add_delete_and_restore(medium_group, "medium", "water", click.argument("key", metavar="MEDIUM"))
add_delete_and_restore(run_group, "run", "12", click.argument("key", type=int, metavar="RUN_ID"))
