"""A vessel drawn to scale with box characters, so a wrong geometry shows at a glance.

A terminal cell is about twice as tall as it is wide, so one metre takes twice as many
columns as rows. The drawing holds the shell (its bottom shape), the liquid level, the
baffles, the shaft, each impeller at its clearance and with its diameter, and the sparger.
"""

from __future__ import annotations

from dataclasses import dataclass

from rich.text import Text

CELL_ASPECT = 2.0  # columns per row for the same length on screen
HEADSPACE = 1.25  # the shell is not stored: it is drawn 25 % taller than the liquid
LIQUID = "on #1f4e66"
BAFFLE = "#8a96a3"
_BLADE = {"disc-turbine": "▆", "pitched-blade": "╱", "hydrofoil": "◢", "propeller": "◢",
          "anchor": "█"}


@dataclass(frozen=True)
class Layout:
    """Where things land: the rows (0 = top) and columns of the scaled drawing."""

    rows_per_m: float
    cols_per_m: float
    left: int  # column of the left wall
    right: int  # column of the right wall
    bottom_row: int  # row of the lowest point of the bottom
    liquid_row: int  # row of the liquid surface

    def row(self, height_m: float) -> int:
        """The row of a height above the lowest point of the vessel."""
        return self.bottom_row - round(height_m * self.rows_per_m)

    def half_cols(self, diameter_m: float) -> int:
        return max(1, round(diameter_m * self.cols_per_m / 2))


def _head_depth(tank_diameter: float, bottom: str) -> float:
    # 2:1 elliptical head: T/4; torispherical (crown = T, knuckle = 0.1 T): about 0.194 T
    return {"elliptical": 0.25, "torispherical": 0.194}.get(bottom, 0.0) * tank_diameter


def layout(vessel: dict, width: int, height: int) -> Layout:
    """Scale a stored vessel into ``width`` x ``height`` cells (labels need 2 rows)."""
    T = vessel["tank_diameter_m"]
    H = vessel["liquid_height_m"]
    shell = max(H * HEADSPACE, H + 0.05 * T)
    rows_per_m = min((height - 3) / shell, (width - 2) / (T * CELL_ASPECT))
    cols_per_m = rows_per_m * CELL_ASPECT
    centre = width // 2
    half = round(T * cols_per_m / 2)
    bottom_row = height - 2
    return Layout(rows_per_m, cols_per_m, centre - half, centre + half, bottom_row,
                  bottom_row - round(H * rows_per_m))


def sketch(vessel: dict, width: int = 40, height: int = 20) -> list[Text]:
    """The drawing as lines of styled text, ``height`` lines of ``width`` cells."""
    T = vessel["tank_diameter_m"]
    H = vessel["liquid_height_m"]
    geo = layout(vessel, width, height)
    grid = [[" "] * width for _ in range(height)]
    style = [[""] * width for _ in range(height)]

    def put(r: int, c: int, ch: str, st: str = "") -> None:
        if 0 <= r < height and 0 <= c < width:
            grid[r][c] = ch
            # internals keep the liquid behind them, so the level stays readable
            under = LIQUID if style[r][c].endswith(LIQUID) and st else ""
            style[r][c] = f"{st} {under}".strip() if st else st

    centre = (geo.left + geo.right) // 2
    top_row = geo.row(max(H * HEADSPACE, H + 0.05 * T))
    head_rows = round(_head_depth(T, vessel.get("bottom_shape") or "flat") * geo.rows_per_m)
    # liquid first, so walls and internals are drawn over it
    for r in range(geo.liquid_row, geo.bottom_row + 1):
        inset = _inset(r, geo, head_rows)
        for c in range(geo.left + 1 + inset, geo.right - inset):
            put(r, c, "≈" if r == geo.liquid_row else " ", LIQUID)
    for r in range(top_row, geo.bottom_row + 1):
        inset = _inset(r, geo, head_rows)
        if r > geo.bottom_row - head_rows:
            put(r, geo.left + inset, "╲", "bold")
            put(r, geo.right - inset, "╱", "bold")
        else:
            put(r, geo.left, "│", "bold")
            put(r, geo.right, "│", "bold")
    bottom_inset = _inset(geo.bottom_row, geo, head_rows)
    for c in range(geo.left + bottom_inset + (1 if head_rows else 0),
                   geo.right - bottom_inset + (0 if head_rows else 1)):
        put(geo.bottom_row, c, "─", "bold")
    if not head_rows:
        put(geo.bottom_row, geo.left, "└", "bold")
        put(geo.bottom_row, geo.right, "┘", "bold")
    for c in range(geo.left, geo.right + 1):
        put(top_row, c, "─", "bold")
    put(top_row, geo.left, "┌", "bold")
    put(top_row, geo.right, "┐", "bold")
    if vessel.get("baffle_count"):
        width_cols = max(1, round((vessel.get("baffle_width_m") or T / 10) * geo.cols_per_m))
        for r in range(geo.liquid_row, geo.bottom_row - max(head_rows, 1) + 1):
            for k in range(width_cols):
                put(r, geo.left + 1 + k, "█", BAFFLE)
                put(r, geo.right - 1 - k, "█", BAFFLE)
    impellers = vessel.get("impellers") or []
    if impellers:
        lowest = min(i["clearance_m"] for i in impellers)
        for r in range(top_row - 1, geo.row(lowest) + 1):
            put(r, centre, "┃", "bold #d08c45")
    for imp in impellers:
        r = geo.row(imp["clearance_m"])
        half = geo.half_cols(imp["impeller_diameter_m"])
        blade = _BLADE.get(imp["impeller_type"], "━")
        for c in range(centre - half, centre + half + 1):
            put(r, c, blade if abs(c - centre) > half // 2 else "━", "bold #d08c45")
        put(r, centre, "╋", "bold #d08c45")
    sparger = vessel.get("sparger")
    if sparger:
        r = geo.row(sparger.get("sparger_height_m") or 0.0)
        half = geo.half_cols(sparger.get("sparger_diameter_m") or T / 4)
        for c in range(centre - half, centre + half + 1):
            put(r, c, "∘" if (c - centre) % 2 == 0 else "┄", "#9fd3e6")
    lines = []
    for r in range(height):
        line = Text(no_wrap=True)
        for c in range(width):
            line.append(grid[r][c], style=style[r][c] or None)
        lines.append(line)
    return lines


def _inset(r: int, geo: Layout, head_rows: int) -> int:
    """How far the bottom head pulls the wall in at row ``r`` (0 on the straight side)."""
    if not head_rows or r <= geo.bottom_row - head_rows:
        return 0
    depth = (r - (geo.bottom_row - head_rows)) / head_rows  # 0 at the seam, 1 at the bottom
    half = (geo.right - geo.left) / 2
    # an ellipse: the half-width at a depth d below the seam is half * sqrt(1 - d^2)
    return round(half * (1 - (1 - min(depth, 1.0) ** 2) ** 0.5))


def legend() -> Text:
    text = Text()
    text.append("≈", style=LIQUID)
    text.append(" liquid  ")
    text.append("█", style=BAFFLE)
    text.append(" baffle  ")
    text.append("┃╋", style="bold #d08c45")
    text.append(" shaft, impeller  ")
    text.append("∘┄", style="#9fd3e6")
    text.append(" sparger")
    return text
