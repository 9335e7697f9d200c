"""Run ``scaleup.cli.main`` inside the test process (fast), as the entry point would.

Used where a test makes hundreds of calls; ``cli_helpers.scaleup`` runs a real subprocess
and stays the check that the installed entry point behaves the same.
"""

from __future__ import annotations

import contextlib
import io
import os
import signal
from dataclasses import dataclass


@dataclass(frozen=True)
class Outcome:
    code: int
    out: str
    err: str

    @property
    def crashed(self) -> bool:
        """A traceback or an 'internal error' (a bug), rather than a result or a clear refusal."""
        return ("Traceback" in self.err or "internal error" in self.err
                or self.code not in (0, 1, 2))


class Hang(BaseException):
    """Raised by the alarm; a BaseException so that the CLI's error handler lets it through."""


def _alarm(signum, frame):
    raise Hang


def invoke(args: list[str], *, timeout_s: int = 30, env: dict | None = None) -> Outcome:
    """Call the CLI with ``args``; exit status, stdout and stderr. Raises :class:`Hang`."""
    from scaleup.cli import main

    out, err = io.StringIO(), io.StringIO()
    saved_env = {k: os.environ.get(k) for k in (env or {})}
    os.environ.update(env or {})
    os.environ.pop("SCALEUP_DEBUG", None)
    previous = signal.signal(signal.SIGALRM, _alarm)
    signal.alarm(timeout_s)
    code = 0
    try:
        with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
            try:
                main(args)
            except SystemExit as exc:
                code = exc.code if isinstance(exc.code, int) else (0 if exc.code is None else 1)
    finally:
        signal.alarm(0)
        signal.signal(signal.SIGALRM, previous)
        for k, v in saved_env.items():
            if v is None:
                os.environ.pop(k, None)
            else:
                os.environ[k] = v
    return Outcome(code, out.getvalue(), err.getvalue())
