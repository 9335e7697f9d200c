"""The Runs screen, driven by keys on a campaign in a temporary file."""

from __future__ import annotations

import io

import pytest
from rich.console import Console

from scaleup.tui.app import Settings, make_app
from scaleup.tui.widgets.form import RecordForm, split_problems
from scaleup.tui.widgets.run_table import RunTable

from .conftest import add_run

SETTINGS = Settings(page_size=40, detail_delay_s=0.0, plots=False)
KEYS = {" ": "space", "'": "apostrophe", "=": "equals_sign", ">": "greater_than_sign",
        "<": "less_than_sign", "-": "minus", ".": "full_stop", "/": "slash", ":": "colon"}


async def settle(pilot, rounds: int = 3) -> None:
    """Let workers finish and their messages land."""
    for _ in range(rounds):
        await pilot.pause()
        await pilot.app.workers.wait_for_complete()
    await pilot.pause()


async def type_text(pilot, text: str) -> None:
    for ch in text:
        await pilot.press(KEYS.get(ch, ch))


async def fill(pilot, form: RecordForm, field: str, text: str, *, keys: bool = False) -> None:
    """Put text in one field of the form: typed key by key, or set at once (faster)."""
    box = form.query_one(f"#in-{field}")
    box.focus()
    box.value = "" if keys else text
    if keys:
        await type_text(pilot, text)


def rendered(widget) -> str:
    """The text a Static shows, as a person would read it."""
    console = Console(width=200, file=io.StringIO(), record=True)
    console.print(widget.content)
    return console.export_text()


def status(app) -> str:
    return str(app.screen.query_one("#runs-status").render())


async def test_add_run_with_a_unit_error_then_the_fix(campaign):
    app = make_app(campaign, SETTINGS)
    async with app.run_test(size=(120, 36)) as pilot:
        await settle(pilot)
        assert "0 runs" in status(app)
        await pilot.press("a")
        form = app.screen
        assert isinstance(form, RecordForm)
        for field, text in [("vessel", "T-20"), ("medium", "tap water"),
                            ("date", "2026-03-02"), ("gas-flow", "1 vvm"),
                            ("temperature", "30 degC")]:
            await fill(pilot, form, field, text)
        await fill(pilot, form, "speed", "450 rmp", keys=True)
        await pilot.press("ctrl+s")
        await settle(pilot)
        assert app.screen is form, "a bad unit must keep the form open"
        error = form.query_one("#err-speed")
        assert error.display and "rmp" in str(error.render())
        assert campaign.count_runs() == 0, "nothing is stored while a field is wrong"
        await fill(pilot, form, "speed", "450 rpm", keys=True)
        await pilot.press("ctrl+s")
        await settle(pilot)
        assert not isinstance(app.screen, RecordForm)
        stored = campaign.runs()
        assert len(stored) == 1
        assert stored[0]["speed_rps"] == pytest.approx(7.5)  # 450 rpm / 60
        assert stored[0]["temperature_k"] == pytest.approx(303.15)
        assert "1 runs" in status(app)
        table = app.screen.query_one(RunTable)
        assert str(table.get_row_at(0)[3]) == "450"  # the speed column, in rpm


async def test_out_of_range_value_is_shown_under_its_field(campaign):
    app = make_app(campaign, SETTINGS)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        await pilot.press("a")
        form = app.screen
        await fill(pilot, form, "temperature", "900 degC")
        await pilot.press("tab")  # leaving the field checks it
        error = form.query_one("#err-temperature")
        assert error.display and "outside the accepted range" in str(error.render())


async def test_edit_then_undo(campaign):
    run_id = add_run(campaign)
    app = make_app(campaign, SETTINGS)
    async with app.run_test(size=(120, 36)) as pilot:
        await settle(pilot)
        await pilot.press("e")
        form = app.screen
        assert isinstance(form, RecordForm)
        assert form.query_one("#in-speed").value == "500 rpm"
        await fill(pilot, form, "temperature", "35 degC")
        await pilot.press("ctrl+s")
        await settle(pilot)
        assert campaign.run(run_id)["temperature_k"] == pytest.approx(308.15)
        assert str(app.screen.query_one(RunTable).get_row_at(0)[6]) == "35"
        await pilot.press("u")
        await settle(pilot)
        assert campaign.run(run_id)["temperature_k"] == pytest.approx(303.15)
        assert str(app.screen.query_one(RunTable).get_row_at(0)[6]) == "30"


async def test_delete_and_restore(campaign):
    first = add_run(campaign)
    add_run(campaign, speed="600 rpm")
    app = make_app(campaign, SETTINGS)
    async with app.run_test(size=(120, 36)) as pilot:
        await settle(pilot)
        await pilot.press("x")
        await settle(pilot)
        assert campaign.count_runs() == 1
        assert "1 runs" in status(app)
        await pilot.press("R")
        form = app.screen
        assert form.query_one("#in-run-number").value == str(first)
        await pilot.press("ctrl+s")
        await settle(pilot)
        assert campaign.count_runs() == 2


async def test_filter_with_units_and_a_bad_filter(campaign):
    for rpm in (300, 450, 600, 750):
        add_run(campaign, speed=f"{rpm} rpm")
    app = make_app(campaign, SETTINGS)
    async with app.run_test(size=(120, 36)) as pilot:
        await settle(pilot)
        await pilot.press("slash")
        await type_text(pilot, "speed > 400 rpm")
        await pilot.press("enter")
        await settle(pilot)
        assert "3 runs match" in status(app)
        assert app.screen.query_one(RunTable).row_count == 3
        await pilot.press("slash")
        app.screen.query_one("#filter").value = ""
        await type_text(pilot, "speed >> 3")
        await pilot.press("enter")
        await settle(pilot)
        assert "✗" in status(app)
        assert app.screen.query_one("#filter").has_class("-invalid")
        assert app.screen.query_one(RunTable).row_count == 3, "a bad filter keeps the rows"


async def test_a_large_campaign_is_read_a_page_at_a_time(campaign):
    with campaign.transaction():
        for i in range(130):
            campaign.add_run({"vessel": "T-20", "medium": "tap water", "run_at": "2026-01-05",
                              "speed_rps": 3.0 + i * 0.01, "gas_flow_mol_s": 0.005,
                              "temperature_k": 303.15})
    # the detail pane waits for the cursor to rest, which it never does here
    app = make_app(campaign, Settings(page_size=40, detail_delay_s=30.0, plots=False))
    async with app.run_test(size=(100, 30)) as pilot:
        await settle(pilot)
        table = app.screen.query_one(RunTable)
        assert table.row_count == SETTINGS.page_size
        await pilot.press("end")
        await settle(pilot)
        assert table.current_run()["id"] == 130
        assert table.row_count == SETTINGS.page_size
        await pilot.press("home")
        await settle(pilot)
        for _ in range(SETTINGS.page_size + 5):  # walk off the first page, one key at a time
            await pilot.press("down")
        await settle(pilot)
        assert table.current_run()["id"] == SETTINGS.page_size + 6
        assert table.row_count == SETTINGS.page_size


async def test_sort_by_speed_descending(campaign):
    for rpm in (300, 750, 450):
        add_run(campaign, speed=f"{rpm} rpm")
    app = make_app(campaign, SETTINGS)
    async with app.run_test(size=(120, 36)) as pilot:
        await settle(pilot)
        await pilot.press("s")
        options = app.screen.query_one("#pick-list")
        options.highlighted = [o.id for o in options.options].index("speed_rps")
        await pilot.press("enter")
        await settle(pilot)
        await pilot.press("r")
        await settle(pilot)
        table = app.screen.query_one(RunTable)
        assert [str(table.get_row_at(i)[3]) for i in range(3)] == ["750", "450", "300"]
        assert "N [rpm] ↓" in status(app)


async def test_detail_pane_shows_derived_hydrodynamics(campaign):
    add_run(campaign)
    app = make_app(campaign, SETTINGS)
    async with app.run_test(size=(140, 40)) as pilot:
        await settle(pilot, rounds=5)
        text = rendered(app.screen.query_one("#detail-text"))
        for label in ("P/V", "Pg/V", "us gas", "regime", "tip speed", "blend t95"):
            assert label in text
        assert "500 rpm" in text


def test_problems_are_shared_among_the_fields_they_name():
    by_field, rest = split_problems(
        'kla stderr: "-1 1/h" is outside; speed: is required; something else',
        ["kla", "kla stderr", "speed"])
    assert by_field == {"kla stderr": '"-1 1/h" is outside', "speed": "is required"}
    assert rest == ["something else"]
