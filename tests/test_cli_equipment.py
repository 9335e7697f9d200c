"""`scaleup vessel edit --impeller/--sparger` and `scaleup medium edit --salt`."""

from __future__ import annotations

import json

import pytest

from .cli_inprocess import invoke


@pytest.fixture
def db(tmp_path):
    path = tmp_path / "c.db"
    for args in (["init", str(path)],
                 ["vessel", "add", "--name", "V-1", "--tank-diameter", "0.3 m",
                  "--liquid-height", "0.3 m", "--impeller", "disc-turbine:0.1 m:0.1 m:6",
                  "--sparger", "ring:70 mm:40 mm"],
                 ["medium", "add", "--name", "brine", "--salt", "NaCl=0.1 mol/L"]):
        outcome = invoke(["--db", str(path), *args] if args[0] != "init" else args)
        assert outcome.code == 0, outcome.err
    return path


def run(db, *args):
    return invoke(["--db", str(db), *args])


def shown(db, entity, name):
    outcome = run(db, entity, "show", name, "--json")
    assert outcome.code == 0, outcome.err
    return json.loads(outcome.out)[entity]


def test_impellers_are_replaced_lowest_first(db):
    outcome = run(db, "vessel", "edit", "V-1", "--impeller", "pitched-blade-4:90 mm:60 mm",
                  "--impeller", "hydrofoil-wide:110 mm:200 mm", "--json")
    assert outcome.code == 0, outcome.err
    v = json.loads(outcome.out)["vessel"]
    assert [(i["position"], i["impeller_type"]) for i in v["impellers"]] == [
        (1, "pitched-blade-4"), (2, "hydrofoil-wide")]
    assert v["impellers"][1]["impeller_diameter_m"] == pytest.approx(0.110)
    assert v["sparger"]["sparger_type"] == "ring", "a sparger not named is kept"
    text = run(db, "vessel", "show", "V-1").out
    assert "hydrofoil-wide" in text and "disc-turbine" not in text


def test_fields_impellers_and_sparger_in_one_edit(db):
    outcome = run(db, "vessel", "edit", "V-1", "--notes", "rebuilt", "--impeller",
                  "disc-turbine:0.12 m:0.1 m", "--sparger", "pipe:20 mm:30 mm", "--json")
    assert outcome.code == 0, outcome.err
    v = json.loads(outcome.out)["vessel"]
    assert v["notes"] == "rebuilt" and v["sparger"]["sparger_type"] == "pipe"
    assert v["impellers"][0]["impeller_diameter_m"] == pytest.approx(0.12)
    assert run(db, "vessel", "edit", "V-1", "--no-sparger").code == 0
    assert shown(db, "vessel", "V-1")["sparger"] is None
    assert run(db, "vessel", "edit", "V-1", "--no-impellers").code == 0
    assert shown(db, "vessel", "V-1")["impellers"] == []


def test_a_bad_impeller_writes_nothing_not_even_the_other_fields(db):
    before = shown(db, "vessel", "V-1")
    outcome = run(db, "vessel", "edit", "V-1", "--notes", "changed", "--impeller",
                  "disc-turbine:0.1 m:0.1 m", "--impeller", "disc-turbine:0.4 m:0.2 m")
    assert outcome.code == 2 and not outcome.crashed
    assert "impeller 2 diameter" in outcome.err
    assert shown(db, "vessel", "V-1") == before


def test_the_expected_version_guards_an_impeller_edit(db):
    version = shown(db, "vessel", "V-1")["row_version"]
    assert run(db, "vessel", "edit", "V-1", "--sparger", "porous:50 mm:20 mm").code == 0
    outcome = run(db, "vessel", "edit", "V-1", "--impeller", "anchor:0.28 m:0.01 m",
                  "--expected-version", str(version))
    assert outcome.code == 2 and "changed elsewhere" in outcome.err
    assert shown(db, "vessel", "V-1")["impellers"][0]["impeller_type"] == "disc-turbine"


def test_salts_are_replaced_and_undone(db):
    outcome = run(db, "medium", "edit", "brine", "--salt", "NaCl=0.5 mol/L", "--salt",
                  "Na2SO4=20 mmol/L", "--json")
    assert outcome.code == 0, outcome.err
    assert json.loads(outcome.out)["medium"]["salts"] == pytest.approx(
        {"NaCl": 500.0, "Na2SO4": 20.0})  # mol/m3
    bad = run(db, "medium", "edit", "brine", "--salt", "KCl=3 degC")
    assert bad.code == 2 and "salt KCl" in bad.err
    assert run(db, "undo").code == 0
    assert shown(db, "medium", "brine")["salts"] == pytest.approx({"NaCl": 100.0})
    assert run(db, "medium", "edit", "brine", "--no-salts").code == 0
    assert shown(db, "medium", "brine")["salts"] == {}


@pytest.mark.parametrize("args", [
    ["vessel", "edit", "V-1"],
    ["vessel", "edit", "V-1", "--impeller", "anchor:0.2 m:0.01 m", "--no-impellers"],
    ["medium", "edit", "brine", "--salt", "NaCl=1 mol/L", "--no-salts"],
    ["vessel", "edit", "V-1", "--impeller", "disc-turbine"],
])
def test_usage_errors(db, args):
    outcome = run(db, *args)
    assert outcome.code == 2 and not outcome.crashed
