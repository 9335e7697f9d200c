"""Exceptions named after the condition they report.

Every error a user can cause is an :class:`InputError` (a ``ValueError``): the command line
turns it into one line on stderr and exit status 2, the terminal app shows it inline.
"""

from __future__ import annotations


class ScaleupError(Exception):
    """Base of every error this package raises on purpose."""


class InputError(ScaleupError, ValueError):
    """A value typed or imported by a person is not acceptable.

    ``field`` names what was being read, so the message can say where the problem is.
    """

    def __init__(self, message: str, field: str | None = None, value: object = None):
        self.field = field
        self.value = value
        super().__init__(f"{field}: {message}" if field else message)


class UnknownUnit(InputError):
    """The unit in a quantity is not one we know."""


class WrongDimension(InputError):
    """The quantity has a unit of another kind (a mass where a speed was asked for)."""


class MissingUnit(InputError):
    """A bare number was given where a unit is required."""


class OutOfRange(InputError):
    """A value is outside the range that is physically possible or that a method covers."""


class NotFound(InputError, LookupError):
    """A record asked for by id or name does not exist (or is deleted)."""


class RunNotFound(NotFound):
    pass


class VesselNotFound(NotFound):
    pass


class MediumNotFound(NotFound):
    pass


class StoreError(ScaleupError):
    """The campaign file cannot be used: not a campaign, a newer schema, read-only, ..."""


class ConflictError(ScaleupError):
    """A record changed since it was read; the edit was refused, nothing was written."""


class ImportRejected(InputError):
    """An import file had bad rows; nothing was written. ``problems`` lists every one."""

    def __init__(self, problems: list[dict], source: str = ""):
        self.problems = problems
        lines = [f"{source}: {len(problems)} problem(s); nothing was imported:" if source
                 else f"{len(problems)} problem(s); nothing was imported:"]
        for p in problems[:SHOWN_PROBLEMS]:
            where = f"row {p['row']}" if p.get("row") is not None else "file"
            col = f", column {p['column']!r}" if p.get("column") else ""
            value = p.get("value")
            if isinstance(value, str) and len(value) > 60:
                value = value[:57] + "..."
            val = f", value {value!r}" if value not in (None, "") else ""
            lines.append(f"  {where}{col}{val}: {p['reason']}")
        if len(problems) > SHOWN_PROBLEMS:  # the rest are in .problems (and --json)
            lines.append(f"  ... and {len(problems) - SHOWN_PROBLEMS} more; --json lists all")
        super().__init__("\n".join(lines))


SHOWN_PROBLEMS = 50  # lines of an import report in a message


def check_range(field: str, value: float, low: float | None, high: float | None,
                unit: str = "", *, low_inclusive: bool = True,
                high_inclusive: bool = True) -> float:
    """Return ``value`` if it lies in [low, high], else raise :class:`OutOfRange`.

    The message names the field, the value and the accepted range with its unit.
    """
    import math

    if value is None or (isinstance(value, float) and math.isnan(value)):
        raise OutOfRange(f"value is missing or not a number; expected {_span(low, high, unit)}",
                         field, value)
    ok_low = low is None or (value >= low if low_inclusive else value > low)
    ok_high = high is None or (value <= high if high_inclusive else value < high)
    if not (ok_low and ok_high):
        raise OutOfRange(f"{value:g} {unit}".rstrip() + f" is outside {_span(low, high, unit)}",
                         field, value)
    return value


def _span(low, high, unit):
    u = f" {unit}" if unit else ""
    if low is not None and high is not None:
        return f"the accepted range {low:g} to {high:g}{u}"
    if low is not None:
        return f"the accepted range: at least {low:g}{u}"
    return f"the accepted range: at most {high:g}{u}"
