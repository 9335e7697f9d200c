"""Run the installed ``scaleup`` entry point in a subprocess, as a user would."""

from __future__ import annotations

import json
import os
import subprocess
import sys
from pathlib import Path

SCRIPT = Path(sys.executable).parent / "scaleup"


def scaleup(*args: str, db: Path | None = None, check: bool = False,
            timeout: float = 120) -> subprocess.CompletedProcess:
    command = [str(SCRIPT)] if SCRIPT.exists() else [sys.executable, "-m", "scaleup"]
    if db is not None:
        command += ["--db", str(db)]
    env = {**os.environ, "COLUMNS": "200"}
    env.pop("SCALEUP_DB", None)
    out = subprocess.run(command + list(args), capture_output=True, text=True, timeout=timeout,
                         env=env)
    if check and out.returncode != 0:
        raise AssertionError(f"scaleup {' '.join(args)} failed ({out.returncode}):\n"
                             f"{out.stdout}\n{out.stderr}")
    return out


def scaleup_json(*args: str, db: Path | None = None) -> dict:
    out = scaleup(*args, "--json", db=db, check=True)
    return json.loads(out.stdout)
