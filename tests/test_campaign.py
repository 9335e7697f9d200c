"""The service layer: validation before writing, units, undo, filters, import and export."""

from __future__ import annotations

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from scaleup import units
from scaleup.campaign import Campaign
from scaleup.errors import ImportRejected, InputError, VesselNotFound

from .conftest import add_run


def test_run_values_are_stored_in_si(campaign):
    run_id = add_run(campaign, speed="450 rpm", **{"gas flow": "20 NL/min"},
                     temperature="35 degC", kla="90 1/h")
    r = campaign.run(run_id)
    assert r["speed_rps"] == pytest.approx(7.5)
    assert r["gas_flow_mol_s"] == pytest.approx(0.020 / 60 * units.MOL_PER_NORMAL_M3)
    assert r["gas_flow_basis"] == "normal"
    assert r["temperature_k"] == pytest.approx(308.15)
    assert r["kla_per_s"] == pytest.approx(0.025)
    assert r["kla_method"] == "entered"


def test_vvm_uses_the_vessels_volume(campaign):
    v = campaign.vessel("T-20")
    run_id = add_run(campaign, **{"gas flow": "1.5 vvm"})
    expected = 1.5 * v["working_volume_m3"] / 60 * units.MOL_PER_NORMAL_M3
    assert campaign.run(run_id)["gas_flow_mol_s"] == pytest.approx(expected)


def test_every_bad_field_is_reported_and_nothing_written(campaign):
    before = campaign.summary()
    with pytest.raises(InputError) as info:
        add_run(campaign, speed="600 kg", temperature="30", **{"o2 fraction": "1.5"})
    text = str(info.value)
    assert 'speed: "600 kg" is a mass' in text
    assert 'temperature: "30" has no unit' in text
    assert "o2 fraction" in text and "accepted range" in text
    assert campaign.summary() == before


def test_unknown_field_and_vessel(campaign):
    with pytest.raises(InputError, match="unknown field"):
        add_run(campaign, sped="500 rpm")
    with pytest.raises(VesselNotFound, match="known vessels: T-20"):
        add_run(campaign, vessel="V-9")


def test_vessel_geometry_is_checked(campaign):
    with pytest.raises(InputError, match="not smaller than the tank"):
        campaign.add_vessel({"name": "bad", "tank diameter": "0.3 m", "liquid height": "0.3 m"},
                            [{"impeller type": "disc-turbine", "impeller diameter": "0.3 m",
                              "clearance": "0.1 m"}])
    with pytest.raises(InputError, match="above the liquid"):
        campaign.add_vessel({"name": "bad", "tank diameter": "0.3 m", "liquid height": "0.3 m"},
                            [{"impeller type": "disc-turbine", "impeller diameter": "0.1 m",
                              "clearance": "0.5 m"}])
    with pytest.raises(InputError, match="not a known impeller type"):
        campaign.add_vessel({"name": "bad", "tank diameter": "0.3 m", "liquid height": "0.3 m"},
                            [{"impeller type": "egg-beater", "impeller diameter": "0.1 m",
                              "clearance": "0.1 m"}])
    assert [v["name"] for v in campaign.vessels()] == ["T-20"]


def test_undo_edit_delete_and_add(campaign):
    run_id = add_run(campaign)
    campaign.edit_run(run_id, {"speed": "700 rpm"})
    campaign.undo()
    assert campaign.run(run_id)["speed_rps"] == pytest.approx(500 / 60)
    campaign.delete_run(run_id)
    campaign.undo()
    assert campaign.run(run_id)["id"] == run_id
    new_id = add_run(campaign, speed="800 rpm")
    campaign.undo()
    assert [r["id"] for r in campaign.runs()] == [run_id, new_id][:1]


def test_filters_and_sorting(campaign):
    for rpm in (300, 500, 700):
        add_run(campaign, speed=f"{rpm} rpm")
    assert len(campaign.runs("speed > 400 rpm")) == 2
    assert len(campaign.runs("speed_rps >= 5 and vessel = 'T-20'")) == 3
    fast = campaign.runs(order_by="speed", descending=True)
    assert fast[0]["speed_rps"] == pytest.approx(700 / 60)
    assert campaign.count_runs("speed between 400 rpm and 600 rpm") == 1


def test_duplicate_vessel_name_is_refused(campaign):
    with pytest.raises(InputError, match="already exists"):
        campaign.add_vessel({"name": "T-20", "tank diameter": "0.3 m", "liquid height": "0.3 m"})


def _write(path, text):
    path.write_text(text, encoding="utf-8")
    return path


GOOD = ("vessel,medium,date,speed [rpm],gas flow [NL/min],temperature [degC],kla [1/h]\n"
        "T-20,tap water,2026-02-03T09:00,400,10,30,60\n"
        "T-20,tap water,2026-02-03T10:00,600,10,30,95\n")


def test_import_then_export_round_trip(campaign, tmp_path):
    result = campaign.import_runs(_write(tmp_path / "runs.csv", GOOD))
    assert result["added"] == 2
    stored = campaign.runs()
    for suffix in (".csv", ".xlsx"):
        out = tmp_path / f"back{suffix}"
        assert campaign.export_runs(out) == 2
        with Campaign.create(tmp_path / f"other{suffix}.db") as other:
            other.add_vessel({"name": "T-20", "tank diameter": "0.29 m",
                              "liquid height": "0.29 m", "head pressure": "0.2 barg"})
            other.add_medium({"name": "tap water"})
            other.import_runs(out)
            again = other.runs()
        for a, b in zip(stored, again, strict=True):
            for key in ("speed_rps", "gas_flow_mol_s", "temperature_k", "kla_per_s"):
                assert b[key] == pytest.approx(a[key], rel=1e-12)
            assert a["run_at"] == b["run_at"]


def test_bad_import_is_rejected_whole_and_file_unchanged(campaign, tmp_path):
    add_run(campaign)
    campaign.close()
    before = (tmp_path / "test.db").read_bytes()
    bad = _write(tmp_path / "bad.csv",
                 "vessel,medium,date,speed [rpm],gas flow [NL/min],temperature [degC]\n"
                 "T-20,tap water,2026-02-03,400,10,30\n"
                 "T-20,tap water,2026-02-03,fast,10,30\n"
                 "V-9,tap water,2026-02-03,400,10,30\n"
                 "T-20,tap water,2026-02-03,400,\"10,5\",30\n")
    with Campaign(tmp_path / "test.db") as c:
        with pytest.raises(ImportRejected) as info:
            c.import_runs(bad)
        rows = {p["row"] for p in info.value.problems}
        assert rows == {3, 4, 5}
        assert "decimal comma" in str(info.value)
        assert c.summary()["runs"] == 1
    assert (tmp_path / "test.db").read_bytes() == before


def test_import_duplicates_refused_skipped_replaced(campaign, tmp_path):
    path = _write(tmp_path / "runs.csv", GOOD)
    campaign.import_runs(path)
    with pytest.raises(ImportRejected, match="duplicate of stored run"):
        campaign.import_runs(path)
    assert campaign.import_runs(path, on_duplicate="skip")["skipped"] == 2
    assert campaign.import_runs(path, on_duplicate="replace")["replaced"] == 2
    assert campaign.summary()["runs"] == 2


def test_import_dry_run_writes_nothing(campaign, tmp_path):
    result = campaign.import_runs(_write(tmp_path / "runs.csv", GOOD), dry_run=True)
    assert result["added"] == 2 and result["dry_run"]
    assert campaign.summary()["runs"] == 0


def test_import_unknown_and_missing_columns(campaign, tmp_path):
    with pytest.raises(ImportRejected) as info:
        campaign.import_runs(_write(tmp_path / "x.csv", "vessel,medium,colour\nT-20,tap water,red\n"))
    reasons = " ".join(p["reason"] for p in info.value.problems)
    assert "unknown column" in reasons and "required column is missing" in reasons
    assert "expected columns: ref, vessel, medium, date, speed" in reasons


def test_demo_campaign_builds(demo_path):
    with Campaign(demo_path) as c:
        s = c.summary()
        assert s["vessels"] == 2 and s["media"] == 2 and 40 <= s["runs"] <= 80
        assert s["curves"] > 0 and s["fluxes"] > 0
        curve = c.curve(c.curves()[0]["id"])
        assert curve["time_s"].size == curve["n_samples"] > 50


@settings(max_examples=40, suppress_health_check=[HealthCheck.function_scoped_fixture],
          deadline=None)
@given(rpm=st.floats(min_value=3, max_value=6000), celsius=st.floats(min_value=0, max_value=150))
def test_stored_values_survive_the_round_trip(campaign, rpm, celsius):
    run_id = add_run(campaign, speed=f"{rpm!r} rpm", temperature=f"{celsius!r} degC")
    r = campaign.run(run_id)
    assert units.convert(r["speed_rps"], "speed", "rpm") == pytest.approx(rpm, rel=1e-12)
    assert units.convert(r["temperature_k"], "temperature", "degC") == pytest.approx(celsius,
                                                                                    abs=1e-9)


def test_curve_analysis_in_chunks_equals_one_batch(demo_path, tmp_path, monkeypatch):
    """Curves are read a chunk at a time; the stored results do not depend on the chunk."""
    import shutil

    from scaleup.services.measurements import MeasurementService

    results = {}
    for chunk in (1000, 7):
        path = tmp_path / f"chunk{chunk}.db"
        shutil.copy(demo_path, path)
        monkeypatch.setattr(MeasurementService, "CURVE_CHUNK", chunk)
        seen = []
        with Campaign(path) as c:
            out = c.analyse_curves(progress=lambda done, total, seen=seen: seen.append(
                (done, total)))
            results[chunk] = [(r.get("curve_id"), r.get("kla_per_s")) for r in out]
            assert seen[-1][0] == seen[-1][1] == len(out)
            assert all(b[0] >= a[0] for a, b in zip(seen, seen[1:], strict=False))
    assert [r[0] for r in results[7]] == [r[0] for r in results[1000]]
    # the same estimates; only the last bits of vectorised sums depend on the batch
    assert [r[1] for r in results[7]] == pytest.approx([r[1] for r in results[1000]],
                                                       rel=1e-9)
