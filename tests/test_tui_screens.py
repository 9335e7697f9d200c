"""Curves, Correlations, Scale-up, Vessels, Media and Properties, driven by keys."""

from __future__ import annotations

import shutil

import numpy as np
import pytest

from scaleup.campaign import Campaign
from scaleup.tui.app import Settings, make_app

from .conftest import add_run
from .test_tui_runs import fill, rendered, settle, type_text

SETTINGS = Settings(page_size=40, detail_delay_s=0.0, plots=True)


async def retype(pilot, screen, widget_id: str, text: str) -> None:
    box = screen.query_one(f"#{widget_id}")
    box.focus()
    box.value = ""
    await type_text(pilot, text)


@pytest.fixture
def demo_copy(demo_path, tmp_path):
    """A writable copy of the demo campaign (used for behaviour, never as check values)."""
    path = tmp_path / "demo.db"
    shutil.copy(demo_path, path)
    with Campaign(path) as c:
        yield c


def synthetic_curve(kla: float, tau: float = 0.0, n: int = 600):
    """A gassing-out curve in % saturation with a known kLa [1/s] and a first-order probe
    of time constant tau [s] (analytic response of the two first-order steps in series)."""
    t = np.arange(n, dtype=float)
    if tau:
        c = 100 * (1 - (np.exp(-kla * t) - kla * tau * np.exp(-t / tau)) / (1 - kla * tau))
    else:
        c = 100 * (1 - np.exp(-kla * t))
    c[0] = 0.0
    rng = np.random.default_rng(4)
    return t, c + rng.normal(0, 0.2, n)


async def test_curve_window_keys_probe_toggle_and_accept(campaign):
    run_id = add_run(campaign)
    t, c = synthetic_curve(0.012, tau=6.0)
    campaign.add_curve(run_id, t, c, "%", probe_tau_s=6.0)
    app = make_app(campaign, SETTINGS)
    async with app.run_test(size=(120, 36)) as pilot:
        await settle(pilot)
        await pilot.press("4")
        await settle(pilot, rounds=5)
        screen = app.screen
        assert screen.analysis is not None
        for _ in range(2):
            await pilot.press("right_square_bracket")  # low cut-off up
        await pilot.press("less_than_sign")  # high cut-off down
        await settle(pilot, rounds=4)
        assert screen.window == pytest.approx((0.24, 0.97))
        text = rendered(screen.query_one("#curve-result"))
        assert "window 24% to 97%" in text and "probe lag on" in text
        with_lag = screen.analysis.primary.kla_per_s
        # synthetic recovery: the lag model gives back the kLa the curve was made with
        assert with_lag == pytest.approx(0.012, rel=0.02)
        await pilot.press("p")
        await settle(pilot, rounds=4)
        assert "probe lag off" in rendered(screen.query_one("#curve-result"))
        assert screen.analysis.primary.tau_p_s == 0.0
        await pilot.press("p")
        await settle(pilot, rounds=4)
        await pilot.press("A")
        await settle(pilot)
        stored = campaign.curves(run_id)[0]
        assert stored["kla_per_s"] == pytest.approx(with_lag, rel=1e-9)
        assert (stored["window_low"], stored["window_high"]) == pytest.approx((0.24, 0.97))
        assert campaign.run(run_id)["kla_per_s"] == pytest.approx(with_lag, rel=1e-6)


async def test_batch_analysis_runs_in_a_worker(campaign):
    for kla in (0.008, 0.015):
        run_id = add_run(campaign)
        campaign.add_curve(run_id, *synthetic_curve(kla), "%")
    app = make_app(campaign, SETTINGS)
    async with app.run_test(size=(120, 36)) as pilot:
        await settle(pilot)
        await pilot.press("4")
        await settle(pilot, rounds=4)
        await pilot.press("B")
        await settle(pilot, rounds=6)
        assert all(c["kla_per_s"] for c in campaign.curves())
        assert [r["kla_per_s"] for r in campaign.runs()] == pytest.approx([0.008, 0.015],
                                                                         rel=0.03)


async def test_fit_a_correlation_compare_and_save(demo_copy):
    app = make_app(demo_copy, SETTINGS)
    async with app.run_test(size=(140, 44)) as pilot:
        await settle(pilot)
        await pilot.press("5")
        await settle(pilot)
        await pilot.press("F")
        await settle(pilot, rounds=6)
        screen = app.screen
        params = rendered(screen.query_one("#fit-params"))
        assert "a_power" in params and "b_gas_velocity" in params and "95 % interval" in params
        lovo = rendered(screen.query_one("#fit-lovo"))
        assert "leave one vessel out" in lovo
        assert sum(name in lovo for name in {r["vessel"] for r in demo_copy.runs()}) >= 2
        compared = rendered(screen.query_one("#fit-compare"))
        assert "this fit" in compared and "vant-riet-coalescing" in compared
        assert screen.query_one("#parity-plot") is not None
        await pilot.press("S")
        await pilot.press("ctrl+s")
        await settle(pilot)
        assert [f["name"] for f in demo_copy.fits()] == ["pilot-kla"]


async def test_project_to_production_and_save_the_study(demo_copy):
    run_id = demo_copy.runs("kla is not null", limit=1)[0]["id"]
    app = make_app(demo_copy, SETTINGS)
    async with app.run_test(size=(140, 44)) as pilot:
        await settle(pilot)
        await pilot.press("6")
        await settle(pilot)
        screen = app.screen
        await retype(pilot, screen, "proj-run", str(run_id))
        await pilot.press("f5")
        await settle(pilot, rounds=8)
        rules = rendered(screen.query_one("#proj-rules"))
        for rule in ("p-per-v", "tip-speed", "kla"):
            assert rule in rules
        assert "✗" in rules or "✓ every rule" in rules  # broken limits said in words
        design = rendered(screen.query_one("#proj-design"))
        assert "design for the duty" in design
        assert "caution" in rendered(screen.query_one("#proj-notes"))
        await pilot.press("ctrl+s")
        await pilot.press("ctrl+s")
        await settle(pilot, rounds=6)
        assert demo_copy.study("production-30m3")["kind"] == "scale"


async def test_projection_input_problems_are_shown_by_field(demo_copy):
    app = make_app(demo_copy, SETTINGS)
    async with app.run_test(size=(120, 36)) as pilot:
        await settle(pilot)
        await pilot.press("6")
        await settle(pilot)
        screen = app.screen
        await retype(pilot, screen, "proj-volume", "30 kg")
        await pilot.press("f5")
        await settle(pilot)
        error = screen.query_one("#proj-err-volume")
        assert error.display and "kg" in str(error.render())


async def test_vessel_add_form_and_sketch(campaign):
    app = make_app(campaign, SETTINGS)
    async with app.run_test(size=(120, 36)) as pilot:
        await settle(pilot)
        await pilot.press("2")
        await settle(pilot)
        screen = app.screen
        assert "T-20 to scale" in rendered(screen.query_one("#vessel-sketch"))
        await pilot.press("a")
        form = app.screen
        for field, text in [("name", "V-3000"), ("tank-diameter", "1.5 m"),
                            ("working-volume", "3000 L"), ("impeller-type", "disc-turbine"),
                            ("impeller-diameter", "0.5 m"), ("clearance", "0.5 m")]:
            await fill(pilot, form, field, text)
        await pilot.press("ctrl+s")
        await settle(pilot)
        v = campaign.vessel("V-3000")
        assert v["working_volume_m3"] == pytest.approx(3.0)
        assert v["impellers"][0]["impeller_diameter_m"] == pytest.approx(0.5)
        assert "V-3000" in rendered(screen.query_one("#vessel-facts-text"))


async def test_media_and_properties_screens(campaign):
    app = make_app(campaign, SETTINGS)
    async with app.run_test(size=(120, 36)) as pilot:
        await settle(pilot)
        await pilot.press("3")
        await settle(pilot)
        assert "tap water" in rendered(app.screen.query_one("#medium-facts"))
        await pilot.press("7")
        await settle(pilot, rounds=5)
        results = rendered(app.screen.query_one("#prop-results"))
        assert "C* of O2" in results and "benson-krause" in results
        assert "Wilke-Chang" in results and "Schmidt number" in results
        box = app.screen.query_one("#prop-temperature")
        box.value = ""
        await type_text(pilot, "30 kg")
        await settle(pilot)
        error = app.screen.query_one("#prop-err-temperature")
        assert error.display and "kg" in str(error.render())


async def test_keys_sheet_and_palette_commands(campaign):
    app = make_app(campaign, SETTINGS)
    async with app.run_test(size=(100, 30)) as pilot:
        await settle(pilot)
        await pilot.press("question_mark")
        sheet = rendered(app.screen.query_one("#keys-body"))
        assert "keys of Runs" in sheet and "add run" in sheet and "Scale-up" in sheet
        await pilot.press("escape")
        titles = [c.title for c in app.get_system_commands(app.screen)]
        assert "6  Scale-up" in titles and "Undo last change" in titles
