"""Number keys switch screens; a focused field keeps its digits until esc leaves it."""

from __future__ import annotations

from scaleup.tui.app import Settings, make_app

from .test_tui_runs import settle

SETTINGS = Settings(page_size=40, detail_delay_s=0.0, plots=False)


async def test_number_keys_switch_screens_and_esc_leaves_a_field(campaign):
    app = make_app(campaign, SETTINGS)
    async with app.run_test(size=(120, 36)) as pilot:
        await settle(pilot)
        assert app.current_mode == "runs"
        await pilot.press("7")
        await settle(pilot)
        assert app.current_mode == "properties"
        box = app.screen.query_one("#prop-temperature")
        box.focus()
        box.value = ""
        await pilot.press("3", "5")
        await settle(pilot)
        assert box.value == "35" and app.current_mode == "properties"  # typed, not switched
        await pilot.press("escape")
        await pilot.press("1")
        await settle(pilot)
        assert app.current_mode == "runs"
        await pilot.press("6")
        await settle(pilot)
        assert app.current_mode == "scaleup"
        await pilot.press("2")  # the Scale-up screen opens with its results focused
        await settle(pilot)
        assert app.current_mode == "vessels"
