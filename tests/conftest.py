"""Shared fixtures: a fresh campaign in a temporary file, and a built demo campaign."""

from __future__ import annotations

import os

import pytest
from hypothesis import settings

from scaleup.campaign import Campaign

# CI runs once on a clean clone: the same examples every time, so a pass is repeatable;
# developers keep random examples, which find new edge cases.
settings.register_profile("ci", derandomize=True, print_blob=True)
if os.environ.get("CI"):
    settings.load_profile("ci")

P20 = {"name": "T-20", "tank diameter": "0.29 m", "liquid height": "0.29 m",
       "head pressure": "0.2 barg", "baffle width": "29 mm"}
DISC = [{"impeller type": "disc-turbine", "impeller diameter": "97 mm", "clearance": "97 mm"}]


@pytest.fixture
def campaign(tmp_path):
    """An empty campaign with one vessel (T-20) and one medium (tap water)."""
    c = Campaign.create(tmp_path / "test.db")
    c.add_vessel(P20, DISC, {"sparger type": "ring", "sparger diameter": "70 mm",
                             "sparger height": "40 mm"})
    c.add_medium({"name": "tap water", "coalescence": "coalescing"})
    yield c
    c.close()


def add_run(c: Campaign, **overrides) -> int:
    values = {"vessel": "T-20", "medium": "tap water", "date": "2026-02-02T10:00",
              "speed": "500 rpm", "gas flow": "1 vvm", "temperature": "30 degC"}
    values.update(overrides)
    return c.add_run(values)


@pytest.fixture(scope="session")
def demo_path(tmp_path_factory):
    """A demo campaign file, built once per test session (read-only use, please)."""
    path = tmp_path_factory.mktemp("demo") / "demo.db"
    with Campaign.create(path) as c:
        c.load_demo()
    return path


@pytest.fixture(autouse=True)
def _work_in_a_temporary_folder(tmp_path_factory, monkeypatch):
    """Every test runs in a folder of its own, so a command given a random value as a file
    name (the bad-input tests do that) never writes into the repository."""
    monkeypatch.chdir(tmp_path_factory.mktemp("cwd"))
