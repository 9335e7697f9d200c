"""The detail pane of a run: what was set, what the hydrodynamics make of it, its DO curve."""

from __future__ import annotations

import math

from rich.console import Group
from rich.table import Table
from rich.text import Text
from textual.containers import VerticalScroll
from textual.widgets import Static

from scaleup.tui import format as fmt


def _pick(value):
    """A float from a scalar or a one-element array; None for NaN."""
    try:
        number = float(value)
    except (TypeError, ValueError):
        return None
    return None if math.isnan(number) else number


def _grid() -> Table:
    table = Table.grid(padding=(0, 1))
    table.add_column(style="dim", no_wrap=True, min_width=12)
    table.add_column(no_wrap=True)
    table.add_column(style="dim", no_wrap=True, overflow="ellipsis")
    return table


def inputs_table(run: dict, liquid_volume_m3: float | None) -> Table:
    """The run as it was set up, in lab units."""
    table = _grid()
    table.add_row("vessel", Text(run.get("vessel") or "-"), Text(run.get("medium") or ""))
    table.add_row("N speed", Text(fmt.quantity(run.get("speed_rps"), "speed")),
                  Text(fmt.quantity(run.get("speed_rps"), "speed", "revolution/second")
                       .replace("revolution/second", "rev/s")))
    table.add_row("Qg gas flow", Text(fmt.quantity(run.get("gas_flow_mol_s"), "gas_flow")),
                  Text(f"{fmt.vvm(run.get('gas_flow_mol_s'), liquid_volume_m3)} vvm"))
    table.add_row("O2 in gas", Text(fmt.lab(run.get("o2_fraction_in"), "fraction", digits=4)),
                  Text("mole fraction"))
    table.add_row("T", Text(fmt.quantity(run.get("temperature_k"), "temperature", digits=3)),
                  "")
    if run.get("head_pressure_pa"):
        table.add_row("p head", Text(fmt.quantity(run["head_pressure_pa"], "pressure",
                                                  digits=3)), "absolute")
    if run.get("power_measured_w") is not None:
        table.add_row("P measured", Text(fmt.quantity(run["power_measured_w"], "power")), "")
    if run.get("kla_per_s"):
        ci = run.get("kla_stderr_per_s")
        kla = fmt.quantity(run["kla_per_s"], "kla")
        if ci:
            kla = f"{fmt.lab(run['kla_per_s'], 'kla')} ± {fmt.quantity(ci, 'kla', digits=2)}"
        table.add_row("kLa", Text(kla, style="bold"), Text(run.get("kla_method") or ""))
    else:
        table.add_row("kLa", Text("not yet", style="italic"),
                      Text("4 Curves to analyse" if run.get("n_curves") else "enter it with e"))
    if run.get("notes"):
        table.add_row("notes", Text(run["notes"]), "")
    return table


def derived_table(point, liquid) -> Table:
    """P/V, Pg/V, us, vvm, Fl, regime, tip speed, blend time and friends, in lab units."""
    table = _grid()
    rows = [
        ("P/V", fmt.quantity(_pick(point.power_per_volume), "power_per_volume"),
         fmt.quantity(_pick(point.power), "power", "W")),
        ("Pg/V gassed", fmt.quantity(_pick(point.gassed_power_per_volume), "power_per_volume"),
         f"Pg/P {fmt.lab(_pick(point.gassed_power_ratio), 'fraction', digits=3)}"),
        ("us gas", fmt.quantity(_pick(point.superficial_gas_velocity), "velocity",
                                        "mm/s"), point.pressure_basis),
        ("vvm", fmt.lab(_pick(point.vvm), "fraction", digits=3), "normal"),
        ("Fl", fmt.lab(_pick(point.flow_number), "fraction", digits=3), ""),
        ("regime", str(point.regime), ""),
        ("N flooding", fmt.quantity(_pick(point.flooding_speed), "speed", digits=3),
         f"margin {fmt.lab(_pick(point.flooding_margin), 'fraction', digits=2)}"),
        ("tip speed", fmt.quantity(_pick(point.tip_speed), "velocity", digits=3), ""),
        ("blend t95", fmt.quantity(_pick(point.blend_time_95), "time", digits=3),
         point.blend_method),
        ("Re", fmt.lab(_pick(point.reynolds), "fraction", digits=3),
         f"Fr {fmt.lab(_pick(point.froude), 'fraction', digits=3)}"),
        ("Np", fmt.lab(_pick(point.power_number), "fraction", digits=3), "all impellers"),
    ]
    for name, value, note in rows:
        style = "bold" if name.startswith("regime") and str(point.regime) == "flooded" else ""
        table.add_row(name, Text(value, style=style), Text(str(note or "")))
    table.add_row("liquid", Text(fmt.quantity(liquid.density_kg_m3, "density", digits=4)),
                  Text(fmt.quantity(liquid.viscosity_pa_s, "viscosity", digits=3)))
    return table


class RunDetail(VerticalScroll):
    """The right-hand pane of the Runs screen (below the table on a narrow terminal)."""

    def compose(self):
        yield Static(Text("move to a run to see it here", style="dim"), id="detail-text")

    def show(self, run: dict, conditions, problem: str | None) -> None:
        header = Text()
        header.append(f"run {run['id']}", style="bold")
        header.append(" · " + (run.get("ref") or "no ref"), style="dim")
        header.append(f"\n{(run.get('run_at') or '').replace('T', ' ')}", style="dim")
        parts = [header, Text("set", style="bold underline"),
                 inputs_table(run, run.get("working_volume_m3"))]
        if conditions is not None:
            parts += [Text("derived", style="bold underline"),
                      derived_table(conditions.point, conditions.liquid)]
            for warning in conditions.warnings:
                parts.append(Text(f"! {warning}", style="bold"))
        elif problem:
            parts.append(Text(f"derived values unavailable: {problem}", style="italic"))
        self.query_one("#detail-text", Static).update(Group(*parts))

    def show_nothing(self, note: str) -> None:
        self.query_one("#detail-text", Static).update(Text(note, style="dim"))
