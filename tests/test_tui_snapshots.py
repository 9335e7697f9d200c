"""SVG snapshots of key screens at a fixed size (update with --snapshot-update after a
deliberate change of the design, and look at the new pictures before committing them)."""

from __future__ import annotations

import pytest

from scaleup.tui.app import Settings, make_app

from .conftest import add_run

# plots off: a plot adds nothing a test can judge and its tick labels shift with fonts
SETTINGS = Settings(page_size=40, detail_delay_s=0.0, plots=False)


async def _settled(pilot) -> None:
    for _ in range(4):
        await pilot.pause()
        await pilot.app.workers.wait_for_complete()
    await pilot.pause()


@pytest.fixture
def filled(campaign):
    for rpm, flow in ((300, "0.5 vvm"), (450, "1 vvm"), (600, "1.5 vvm")):
        add_run(campaign, speed=f"{rpm} rpm", **{"gas flow": flow})
    add_run(campaign, speed="750 rpm", kla="110 1/h", **{"kla stderr": "6 1/h"})
    return campaign


def test_runs_screen_wide(filled, snap_compare):
    assert snap_compare(make_app(filled, SETTINGS), terminal_size=(130, 32),
                        run_before=_settled)


def test_run_form_with_a_unit_error_narrow(filled, snap_compare):
    async def before(pilot):
        await _settled(pilot)
        await pilot.press("e")
        pilot.app.screen.query_one("#in-speed").value = "450 rmp"
        await pilot.press("ctrl+s")
        await _settled(pilot)

    assert snap_compare(make_app(filled, SETTINGS), terminal_size=(80, 24), run_before=before)


def test_vessels_screen_with_sketch(filled, snap_compare):
    async def before(pilot):
        await _settled(pilot)
        await pilot.press("2")
        await _settled(pilot)

    assert snap_compare(make_app(filled, SETTINGS), terminal_size=(100, 30), run_before=before)
