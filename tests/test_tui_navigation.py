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


async def test_correlation_plots_survive_a_redraw(demo_path, tmp_path):
    """The parity and residual plots are drawn again on every resize; a log axis that
    transformed its data in place failed on the second draw."""
    import shutil

    from scaleup.campaign import Campaign

    path = tmp_path / "demo.db"
    shutil.copy(demo_path, path)
    with Campaign(path) as c:
        app = make_app(c, Settings(page_size=40, detail_delay_s=0.0, plots=True))
        async with app.run_test(size=(100, 30)) as pilot:
            await settle(pilot)
            await pilot.press("5")
            await settle(pilot)
            await pilot.press("F")
            await settle(pilot, rounds=20)
            assert app.screen.report is not None
            for size in ((120, 36), (100, 30), (160, 50)):
                await pilot.resize_terminal(*size)
                await settle(pilot, rounds=3)
            assert app.is_running
