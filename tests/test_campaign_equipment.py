"""Impellers and sparger of a stored vessel, salts of a stored medium: replaced whole,
validated, audited, seen by other editors, and undone."""

from __future__ import annotations

import json

import pytest

from scaleup.errors import ConflictError, InputError

from .conftest import add_run

TWO = [{"impeller type": "disc-turbine", "impeller diameter": "97 mm", "clearance": "60 mm",
        "blade count": "6"},
       {"impeller type": "pitched-blade-4", "impeller diameter": "97 mm",
        "clearance": "180 mm", "power number": "1.3"}]


def _state(campaign):
    """What the equipment tables hold, for comparing before and after a refused change."""
    return [campaign.rows(f"SELECT * FROM {t} ORDER BY id")
            for t in ("impeller", "sparger", "medium_salt")]


def test_set_impellers_replaces_the_set_lowest_first(campaign):
    before = campaign.vessel("T-20")
    after = campaign.set_impellers("T-20", TWO)
    assert [i["impeller_type"] for i in after["impellers"]] == ["disc-turbine",
                                                                "pitched-blade-4"]
    assert [i["position"] for i in after["impellers"]] == [1, 2]
    assert after["impellers"][0]["clearance_m"] == pytest.approx(0.060)
    assert after["impellers"][0]["blade_count"] == 6
    assert after["impellers"][1]["power_number_measured"] == pytest.approx(1.3)
    assert after["row_version"] == before["row_version"] + 1
    assert after["sparger"] == before["sparger"], "the sparger is left alone"
    # the old rows are kept in the audit log, beside the new ones
    entry = campaign.history("vessel", after["id"], limit=1)[0]
    assert entry["action"] == "update"
    old, new = json.loads(entry["old_json"]), json.loads(entry["new_json"])
    assert [i["impeller_diameter_m"] for i in old["impeller"]] == pytest.approx([0.097])
    assert len(new["impeller"]) == 2
    deleted = [h for h in campaign.history("impeller") if h["action"] == "delete"]
    assert [json.loads(h["old_json"]) for h in deleted] == [before["impellers"][0]]
    assert all(h["new_json"] is None for h in deleted)


def test_the_operating_point_follows_the_new_impellers(campaign):
    run_id = add_run(campaign, speed="600 rpm")
    one = [{"impeller type": "disc-turbine", "impeller diameter": "97 mm",
            "clearance": "97 mm", "power number": "5"}]
    campaign.set_impellers("T-20", one)
    p_one = campaign.run_conditions(run_id).point.power
    campaign.set_impellers("T-20", [*one, {**one[0], "clearance": "200 mm"}])
    p_two = campaign.run_conditions(run_id).point.power
    # two impellers of the same measured power number spaced well apart draw twice the power
    # of one (P = Np rho N^3 D^5 per impeller; common practice, no source for the spacing)
    assert p_two == pytest.approx(2 * p_one, rel=0.05)


def test_a_bad_impeller_changes_nothing_and_is_named_by_position(campaign):
    before = _state(campaign)
    version = campaign.vessel("T-20")["row_version"]
    with pytest.raises(InputError) as caught:
        campaign.set_impellers("T-20", [TWO[0], {**TWO[1], "clearance": "2 km",
                                                 "impeller diameter": "97 rpm"}])
    message = str(caught.value)
    assert "impeller 2 diameter:" in message and "impeller 2 clearance:" in message
    with pytest.raises(InputError, match="impeller 2 diameter"):
        campaign.set_impellers("T-20", [TWO[0], {**TWO[1], "impeller diameter": "0.3 m"}])
    with pytest.raises(InputError, match="not a known impeller type"):
        campaign.set_impellers("T-20", [{**TWO[0], "impeller type": "egg-beater"}])
    with pytest.raises(InputError, match="above the liquid"):
        campaign.set_impellers("T-20", [{**TWO[0], "clearance": "0.5 m"}])
    assert _state(campaign) == before
    assert campaign.vessel("T-20")["row_version"] == version


def test_an_editor_holding_the_old_version_is_refused(campaign):
    seen = campaign.vessel("T-20")
    campaign.set_impellers("T-20", TWO)
    with pytest.raises(ConflictError, match="changed elsewhere"):
        campaign.edit_vessel("T-20", {"notes": "mine"}, expected_version=seen["row_version"])
    with pytest.raises(ConflictError):
        campaign.set_sparger("T-20", None, expected_version=seen["row_version"])
    assert campaign.vessel("T-20")["sparger"] is not None


def test_undo_puts_the_old_impellers_back_and_undo_again_redoes(campaign):
    old = campaign.vessel("T-20")["impellers"]
    campaign.set_impellers("T-20", TWO)
    done = campaign.undo()
    assert done == {"table": "vessel", "record_id": old[0]["vessel_id"], "undid": "update"}
    back = campaign.vessel("T-20")["impellers"]
    keep = ("impeller_type", "impeller_diameter_m", "clearance_m", "position", "blade_count")
    assert [{k: i[k] for k in keep} for i in back] == [{k: i[k] for k in keep} for i in old]
    campaign.undo()
    assert len(campaign.vessel("T-20")["impellers"]) == 2


def test_set_sparger_replace_remove_and_undo(campaign):
    v = campaign.set_sparger("T-20", {"sparger type": "pipe", "sparger height": "30 mm",
                                      "orifice count": "8", "orifice diameter": "1 mm"})
    assert v["sparger"]["sparger_type"] == "pipe"
    assert v["sparger"]["orifice_diameter_m"] == pytest.approx(0.001)
    assert v["sparger"]["sparger_diameter_m"] is None, "a replaced sparger keeps nothing old"
    with pytest.raises(InputError, match="sparger type"):
        campaign.set_sparger("T-20", {"sparger type": "showerhead"})
    assert campaign.set_sparger("T-20", None)["sparger"] is None
    campaign.undo()
    assert campaign.vessel("T-20")["sparger"]["sparger_type"] == "pipe"


def test_set_salts_replace_validate_and_undo(campaign):
    m = campaign.set_salts("tap water", {"NaCl": "0.5 mol/L", "Na2SO4": "20 mmol/L"})
    assert m["salts"] == pytest.approx({"NaCl": 500.0, "Na2SO4": 20.0})  # mol/m3
    before = _state(campaign)
    with pytest.raises(InputError) as caught:
        campaign.set_salts("tap water", {"NaCl": "0.5 rpm", "KCl": "-1 mol/L"})
    assert "salt NaCl" in str(caught.value) and "salt KCl" in str(caught.value)
    assert _state(campaign) == before
    assert campaign.set_salts("tap water", {})["salts"] == {}
    campaign.undo()
    assert campaign.medium("tap water")["salts"] == pytest.approx({"NaCl": 500.0,
                                                                   "Na2SO4": 20.0})


def test_undo_of_an_added_vessel_with_impellers_deletes_the_vessel(campaign):
    campaign.add_vessel({"name": "T-300", "tank diameter": "0.7 m", "liquid height": "0.8 m"},
                        TWO, {"sparger type": "ring"})
    assert campaign.undo()["undid"] == "insert"
    assert [v["name"] for v in campaign.vessels()] == ["T-20"]


def test_equipment_of_a_deleted_vessel_cannot_be_set(campaign):
    campaign.add_vessel({"name": "spare", "tank diameter": "0.3 m", "liquid height": "0.3 m"})
    campaign.delete_vessel("spare")
    with pytest.raises(InputError, match="deleted"):
        campaign.set_impellers("spare", TWO)
