"""Messages of the workbench, each named as the event that has already happened.

Workers never touch widgets: they post one of these and the screen updates itself.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

from textual.message import Message


@dataclass
class RunsPageLoaded(Message):
    """A window of the runs table was read from the campaign."""

    rows: list[dict]
    total: int
    offset: int
    request: int  # which request this answers, so a late page cannot overwrite a newer one


@dataclass
class RunsQueryFailed(Message):
    """The filter or sort could not be used; ``error`` says why in the user's words."""

    error: str


@dataclass
class RunDetailLoaded(Message):
    """What the hydrodynamics say about one run, and its DO curve if it has one."""

    run_id: int
    run: dict
    conditions: Any | None  # scaleup.conditions.RunConditions, or None when it failed
    problem: str | None
    curve: dict | None


@dataclass
class RecordSaved(Message):
    """A record was added or edited through a form."""

    table: str
    record_id: int
    added: bool


@dataclass
class ChangeUndone(Message):
    """The user's last change was undone."""

    table: str
    record_id: int
    action: str


@dataclass
class ResultComputed(Message):
    """A worker finished a computation for a screen; ``tag`` says which one."""

    tag: str
    result: Any = None
    problem: str | None = None
    extra: dict = field(default_factory=dict)


@dataclass
class ProgressMade(Message):
    """A batch worker has done ``done`` of ``total`` items."""

    tag: str
    done: int
    total: int
