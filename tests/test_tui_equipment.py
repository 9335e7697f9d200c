"""Impellers, sparger and salts edited on their screens; the runs sorted by vvm; a Sherwood
fit on the Correlations screen. Driven by keys, checked on what is stored and shown."""

from __future__ import annotations

import pytest

from scaleup import units
from scaleup.tui.app import Settings, make_app
from scaleup.tui.widgets.form import RecordForm
from scaleup.tui.widgets.run_table import RunTable

from .conftest import add_run
from .test_tui_runs import fill, rendered, settle, status
from .test_tui_screens import demo_copy  # noqa: F401  (a fixture)

SETTINGS = Settings(page_size=40, detail_delay_s=0.0, plots=True)


async def go(pilot, *keys: str) -> None:
    """Press keys (a screen's number, a form's key), letting each land."""
    for key in keys:
        await pilot.press(key)
        await settle(pilot)


async def save(pilot) -> None:
    await go(pilot, "ctrl+s")


async def test_impellers_are_edited_in_their_own_form(campaign):
    app = make_app(campaign, SETTINGS)
    async with app.run_test(size=(120, 36)) as pilot:
        await go(pilot, "2")
        screen = app.screen
        await pilot.press("i")
        form = app.screen
        assert isinstance(form, RecordForm)
        assert form.query_one("#in-impeller-1-type").value == "disc-turbine"
        assert form.query_one("#in-impeller-1-diameter").value == "97 mm"
        # a second impeller in the spare row, first with a diameter wider than the tank
        for field, text in [("impeller-2-type", "pitched-blade-4"),
                            ("impeller-2-diameter", "0.4 m"),
                            ("impeller-2-clearance", "200 mm")]:
            await fill(pilot, form, field, text)
        await save(pilot)
        assert app.screen is form, "a refused impeller keeps the form open"
        error = form.query_one("#err-impeller-2-diameter")
        assert error.display and "tank diameter" in rendered(error)
        assert len(campaign.vessel("T-20")["impellers"]) == 1
        await fill(pilot, form, "impeller-2-diameter", "100 mm")
        await save(pilot)
        assert not isinstance(app.screen, RecordForm)
        stored = campaign.vessel("T-20")["impellers"]
        assert [i["impeller_type"] for i in stored] == ["disc-turbine", "pitched-blade-4"]
        assert stored[1]["clearance_m"] == pytest.approx(0.2)
        facts = rendered(screen.query_one("#vessel-facts-text"))
        assert "impeller 2" in facts and "pitched-blade-4" in facts
        # emptying every field of the lower one removes it; undo brings it back
        await pilot.press("i")
        form = app.screen
        for spec in ("type", "diameter", "clearance", "blade-count"):
            await fill(pilot, form, f"impeller-1-{spec}", "")
        await save(pilot)
        assert [i["impeller_type"] for i in campaign.vessel("T-20")["impellers"]] == [
            "pitched-blade-4"]
        await pilot.press("u")
        await settle(pilot)
        assert len(campaign.vessel("T-20")["impellers"]) == 2
        assert "disc-turbine" in rendered(screen.query_one("#vessel-facts-text"))


async def test_sparger_form_replaces_and_removes(campaign):
    app = make_app(campaign, SETTINGS)
    async with app.run_test(size=(120, 36)) as pilot:
        await go(pilot, "2")
        await pilot.press("s")
        form = app.screen
        assert form.query_one("#in-sparger-diameter").value == "70 mm"
        await fill(pilot, form, "sparger-type", "pipe")
        await fill(pilot, form, "orifice-count", "12")
        await save(pilot)
        sparger = campaign.vessel("T-20")["sparger"]
        assert sparger["sparger_type"] == "pipe" and sparger["orifice_count"] == 12
        assert sparger["sparger_diameter_m"] == pytest.approx(0.070)
        assert "12 holes" in rendered(app.screen.query_one("#vessel-facts-text"))
        await pilot.press("s")
        form = app.screen
        for spec in ("sparger-type", "sparger-diameter", "sparger-height", "orifice-count"):
            await fill(pilot, form, spec, "")
        await save(pilot)
        assert campaign.vessel("T-20")["sparger"] is None


async def test_salts_are_edited_one_a_line(campaign):
    campaign.set_salts("tap water", {"NaCl": "0.1 mol/L"})
    app = make_app(campaign, SETTINGS)
    async with app.run_test(size=(120, 36)) as pilot:
        await go(pilot, "3")
        await pilot.press("s")
        form = app.screen
        assert form.query_one("#in-salt-1").value == "NaCl 0.1 mol/L"
        await fill(pilot, form, "salt-1", "NaCl 0.5 mol/L")
        await fill(pilot, form, "salt-2", "Na2SO4 20 g/L")
        await save(pilot)
        assert app.screen is form
        error = form.query_one("#err-salt-2")
        assert error.display and "molar concentration" in rendered(error)
        assert campaign.medium("tap water")["salts"] == pytest.approx({"NaCl": 100.0})
        await fill(pilot, form, "salt-2", "Na2SO4 20 mmol/L")
        await save(pilot)
        assert campaign.medium("tap water")["salts"] == pytest.approx(
            {"NaCl": 500.0, "Na2SO4": 20.0})  # mol/m3
        facts = rendered(app.screen.query_one("#medium-facts"))
        assert "salt Na2SO4" in facts and "0.5 mol/L" in facts


async def test_runs_sort_by_vvm_not_by_volume(campaign):
    campaign.add_vessel({"name": "T-300", "tank diameter": "0.7 m", "liquid height": "0.8 m"})
    add_run(campaign, **{"gas flow": "1 vvm"})
    add_run(campaign, vessel="T-300", **{"gas flow": "0.5 vvm"})
    add_run(campaign, vessel="T-300", **{"gas flow": "2 vvm"})
    # the view's vvm is the units module's (normal basis), so sorting and showing agree
    for run in campaign.runs():
        assert run["gas_flow_vvm"] == pytest.approx(units.gas_flow_to(
            run["gas_flow_mol_s"], "vvm", run["working_volume_m3"]), rel=1e-12)
    app = make_app(campaign, SETTINGS)
    async with app.run_test(size=(120, 36)) as pilot:
        await settle(pilot)
        await pilot.press("s")
        options = app.screen.query_one("#pick-list")
        options.highlighted = [o.id for o in options.options].index("gas_flow_vvm")
        await pilot.press("enter")
        await settle(pilot)
        table = app.screen.query_one(RunTable)
        assert [str(table.get_row_at(i)[5]) for i in range(3)] == ["0.5", "1", "2"]
        assert "Qg/V [vvm] ↑" in status(app)
    assert [r["ref"] or r["id"] for r in campaign.runs("vvm > 0.8", order_by="vvm",
                                                       descending=True)] == [3, 1]


async def test_fit_a_sherwood_correlation_to_the_fluxes(demo_copy):  # noqa: F811
    app = make_app(demo_copy, SETTINGS)
    async with app.run_test(size=(140, 44)) as pilot:
        await go(pilot, "5")
        screen = app.screen
        await pilot.press("k")
        assert "Sherwood of fluxes" in rendered(screen.query_one("#fit-choice"))
        await pilot.press("F")
        await settle(pilot, rounds=6)
        params = rendered(screen.query_one("#fit-params"))
        assert "Sh = A Re^b Sc^c" in params and "b_reynolds" in params
        assert "95 % interval" in params and "fluxes" in params
        assert screen.report.kind == "sherwood"
        n = len(demo_copy.fluxes())
        assert screen.report.result.n_runs == n
        held = [p for p in screen.report.summary()["parameters"] if p["name"] == "c_schmidt"]
        assert held[0]["fixed"] and held[0]["value"] == pytest.approx(1 / 3)
        compared = rendered(screen.query_one("#fit-compare"))
        assert "this fit" in compared and "ranz-marshall" in compared
        assert "frossling" in compared
        parity = screen.query_one("#parity-plot")
        assert parity.display and len(screen.fit_data["observed"]) == n
        await pilot.press("c")  # a published one over the parity plot
        await settle(pilot)
        await pilot.press("S")
        assert app.screen.query_one("#in-fit-name").value == "flux-sherwood"
        await save(pilot)
        assert [(f["name"], f["kind"]) for f in demo_copy.fits()] == [("flux-sherwood",
                                                                       "sherwood")]
        # back to kLa: the Sherwood result is not left on screen
        await pilot.press("k")
        assert "press F" in rendered(screen.query_one("#fit-params"))
        await pilot.press("t")  # a Sherwood toggle refuses politely in kLa mode
        assert screen.choice.plus_two is False
