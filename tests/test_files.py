"""Opening something that is not a usable campaign: a clear message, and nothing changes.

Each case is tried through the service layer and through the command line; before and after,
every file in the folder (campaign, journal, lock files) is compared byte for byte, with its
size, time stamp and permission bits.
"""

from __future__ import annotations

import hashlib
import sqlite3
import stat
from pathlib import Path

import pytest

from scaleup.campaign import Campaign
from scaleup.errors import StoreError
from scaleup.store import db

from .cli_helpers import scaleup
from .cli_inprocess import invoke
from .conftest import add_run


def snapshot(folder: Path) -> dict:
    out = {}
    for p in sorted(folder.iterdir()):
        st = p.stat()
        digest = hashlib.sha256(p.read_bytes()).hexdigest() if p.is_file() else "dir"
        out[p.name] = (st.st_size, st.st_mtime_ns, stat.S_IMODE(st.st_mode), digest)
    return out


def _text_file(folder: Path) -> Path:
    path = folder / "notes.db"
    path.write_text("speed 300 rpm, kLa 80 1/h\nthis is a lab notebook, not a campaign\n")
    return path


def _empty_file(folder: Path) -> Path:
    path = folder / "empty.db"
    path.touch()
    return path


def _binary_file(folder: Path) -> Path:
    path = folder / "photo.db"
    path.write_bytes(bytes(range(256)) * 64)
    return path


def _newer_schema(folder: Path) -> Path:
    path = folder / "newer.db"
    Campaign.create(path).close()
    with sqlite3.connect(path) as raw:
        raw.execute(f"PRAGMA user_version = {db.schema_version() + 1}")
    raw.close()
    return path


def _other_programs_sqlite(folder: Path) -> Path:
    path = folder / "other.db"
    with sqlite3.connect(path) as raw:
        raw.execute("CREATE TABLE sample (id INTEGER PRIMARY KEY, value REAL)")
        raw.execute("INSERT INTO sample (value) VALUES (1.5)")
    raw.close()
    return path


def _other_application_id(folder: Path) -> Path:
    path = folder / "foreign.db"
    with sqlite3.connect(path) as raw:
        raw.execute("PRAGMA application_id = 1234")
    raw.close()
    return path


def _sqlite_without_campaign(folder: Path) -> Path:
    """What an `init` killed before its first commit leaves: an SQLite header and no tables."""
    path = folder / "interrupted.db"
    with sqlite3.connect(path) as raw:
        raw.execute("PRAGMA page_size = 4096")
        raw.execute("VACUUM")
    raw.close()
    return path


def _header_only(folder: Path) -> Path:
    path = folder / "torn.db"
    path.write_bytes(b"SQLite format 3\x00" + b"\xff" * 84)
    return path


def _read_only_file(folder: Path) -> Path:
    path = folder / "archived.db"
    with Campaign.create(path) as c:
        c.add_medium({"name": "water"})
    path.chmod(0o444)
    return path


def _read_only_folder(folder: Path) -> Path:
    inner = folder / "locked"
    inner.mkdir()
    path = inner / "campaign.db"
    with Campaign.create(path) as c:
        c.add_medium({"name": "water"})
    inner.chmod(0o555)
    return path


def _folder(folder: Path) -> Path:
    path = folder / "a-folder.db"
    path.mkdir()
    return path


CASES = {
    "text file": (_text_file, "not an SQLite database"),
    "binary file": (_binary_file, "not an SQLite database"),
    "empty file": (_empty_file, "empty file"),
    "newer schema": (_newer_schema, "newer scaleup"),
    "another program's SQLite file": (_other_programs_sqlite, "not a scaleup campaign"),
    "another application id": (_other_application_id, "not a scaleup campaign"),
    "SQLite file with no campaign": (_sqlite_without_campaign, "holds no campaign"),
    "header only": (_header_only, "not a usable campaign"),
    "read-only file": (_read_only_file, "read-only"),
    "read-only folder": (_read_only_folder, "folder"),
    "a folder": (_folder, "is a folder"),
}


@pytest.fixture
def folder(tmp_path):
    yield tmp_path
    for p in tmp_path.rglob("*"):  # let pytest clean up what the test made read-only
        p.chmod(0o755 if p.is_dir() else 0o644)


@pytest.mark.parametrize("case", list(CASES))
def test_service_layer_refuses_and_changes_nothing(folder, case):
    make, message = CASES[case]
    path = make(folder)
    before = snapshot(path.parent)
    with pytest.raises(StoreError, match=message):
        Campaign(path)
    assert snapshot(path.parent) == before


@pytest.mark.parametrize("case", list(CASES))
@pytest.mark.parametrize("command", [["run", "list"], ["check"],
                                     ["run", "add", "--vessel", "V", "--speed", "300 rpm"],
                                     ["import", "runs", "missing.csv"], ["undo"]])
def test_command_line_refuses_with_status_2_and_changes_nothing(folder, case, command):
    make, message = CASES[case]
    path = make(folder)
    before = snapshot(path.parent)
    outcome = invoke(["--db", str(path), *command])
    assert outcome.code == 2, outcome
    # click itself refuses a folder given to --db, in its own words
    expected = (message, "is a directory") if case == "a folder" else (message,)
    assert any(m in outcome.err for m in expected) and not outcome.crashed, outcome
    assert outcome.err.count("\n") <= 5  # a clear message, not a dump
    assert snapshot(path.parent) == before


def test_entry_point_refuses_a_text_file(folder):
    """The same through a real process, as a user types it."""
    path = _text_file(folder)
    before = snapshot(folder)
    out = scaleup("run", "list", db=path)
    assert out.returncode == 2 and "not an SQLite database" in out.stderr
    assert "Traceback" not in out.stderr and snapshot(folder) == before


def test_init_refuses_to_overwrite_anything(folder):
    path = _text_file(folder)
    before = snapshot(folder)
    outcome = invoke(["init", str(path)])
    assert outcome.code == 2 and "already exists" in outcome.err
    assert snapshot(folder) == before


def test_init_into_a_read_only_folder_is_refused(folder):
    inner = folder / "ro"
    inner.mkdir()
    inner.chmod(0o555)
    outcome = invoke(["init", str(inner / "new.db")])
    assert outcome.code == 2 and "read-only" in outcome.err
    assert list(inner.iterdir()) == []


def test_init_into_a_missing_folder_is_refused(folder):
    outcome = invoke(["init", str(folder / "no" / "such" / "new.db")])
    assert outcome.code == 2 and "does not exist" in outcome.err
    assert list(folder.iterdir()) == []


def test_damaged_campaign_is_reported_not_crashed(folder):
    """Pages overwritten in the middle of a real campaign: a clear error, never a traceback."""
    path = folder / "damaged.db"
    with Campaign.create(path) as c:
        c.add_vessel({"name": "T-20", "tank diameter": "0.29 m", "liquid height": "0.29 m"})
        c.add_medium({"name": "tap water"})
        for i in range(300):
            add_run(c, date=f"2026-02-02T10:{i // 60:02d}:{i % 60:02d}", notes="x" * 200)
    size = path.stat().st_size
    with open(path, "r+b") as fh:
        fh.seek(size // 2)
        fh.write(b"\xde\xad\xbe\xef" * 4096)
    for command in (["run", "list"], ["check"], ["export", "runs", str(folder / "out.csv")]):
        outcome = invoke(["--db", str(path), *command])
        assert not outcome.crashed, outcome
        assert outcome.code in (1, 2), outcome
    check = invoke(["--db", str(path), "check"])
    assert "ok" not in check.out.split("verdict")[-1] or check.code != 0
    assert not (folder / "out.csv").exists() and not (folder / "out.csv.part").exists()


def test_a_file_is_left_readable_by_the_owner_only_as_it_was(folder):
    """Opening a campaign never widens its permissions (a private file stays private)."""
    path = folder / "private.db"
    Campaign.create(path).close()
    path.chmod(0o600)
    with Campaign(path) as c:
        c.add_medium({"name": "water"})
    assert stat.S_IMODE(path.stat().st_mode) == 0o600
    assert not any(p.name.endswith(("-wal", "-shm")) for p in folder.iterdir())


@pytest.mark.parametrize("where,message", [("missing/copy.db", "does not exist"),
                                           ("ro/copy.db", "read-only"),
                                           ("a-folder.db", "is a directory")])
def test_backup_to_a_bad_place_is_refused_clearly(folder, where, message):
    path = folder / "c.db"
    Campaign.create(path).close()
    (folder / "ro").mkdir()
    (folder / "ro").chmod(0o555)
    (folder / "a-folder.db").mkdir()
    before = snapshot(folder)
    outcome = invoke(["--db", str(path), "backup", str(folder / where)])
    assert outcome.code == 2 and message in outcome.err and not outcome.crashed, outcome
    assert snapshot(folder) == before
