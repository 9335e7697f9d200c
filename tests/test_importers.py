"""Importers: every bad row reported with its reason, nothing written unless all is good."""

from __future__ import annotations

import datetime as dt
import os
import zoneinfo

import numpy as np
import pytest

from scaleup import units
from scaleup.campaign import Campaign
from scaleup.errors import ImportRejected, InputError

from .conftest import add_run

RUNS_HEADER = "vessel,medium,date,speed [rpm],gas flow [NL/min],temperature [degC]"
GOOD_ROW = "T-20,tap water,2026-02-03T09:00,400,10,30"


def write(path, text: str | bytes):
    if isinstance(text, bytes):
        path.write_bytes(text)
    else:
        path.write_text(text, encoding="utf-8")
    return path


def rejected(campaign, entity, path, **options) -> list[dict]:
    with pytest.raises(ImportRejected) as info:
        campaign.import_file(entity, path, **options)
    return info.value.problems


def reasons(problems) -> str:
    return " | ".join(p["reason"] for p in problems)


# --------------------------------------------------------------------------- the bad-row zoo
ZOO = [
    ("missing column", "runs", "vessel,medium,date,gas flow [NL/min],temperature [degC]\n"
     "T-20,tap water,2026-02-03,10,30\n", 1, "speed", "required column is missing; expected "
     "columns: ref, vessel, medium, date, speed [rpm], gas flow [NL/min]"),
    ("unknown column", "runs", RUNS_HEADER + ",colour\n" + GOOD_ROW + ",red\n", 1, "colour",
     "unknown column; expected columns: ref, vessel"),
    ("wrong unit dimension", "runs", RUNS_HEADER.replace("speed [rpm]", "speed [kg]") + "\n"
     + GOOD_ROW + "\n", 1, "speed [kg]", 'wrong unit for this column: "1 kg" is a mass; '
     'expected a rotational speed such as "600 rpm"'),
    ("unit on a text column", "runs", RUNS_HEADER.replace("vessel", "vessel [m]") + "\n"
     + GOOD_ROW + "\n", 1, "vessel [m]", '"vessel" takes no unit'),
    ("negative diameter", "vessels", "name,tank diameter [m],liquid height [m],impeller type,"
     "impeller diameter [m],clearance [m]\nV-1,-0.3,0.3,disc-turbine,0.1,0.1\n", 2,
     "tank diameter", '"-0.3 m" is outside the accepted range 0.05 m to 20 m'),
    ("unknown vessel", "runs", RUNS_HEADER + "\n" + GOOD_ROW.replace("T-20", "V-9") + "\n", 2,
     "vessel", "no vessel 'V-9'; known vessels: T-20"),
    ("unknown medium", "runs", RUNS_HEADER + "\n" + GOOD_ROW.replace("tap water", "broth")
     + "\n", 2, "medium", "no medium 'broth'; known media: tap water"),
    ("text in a number column", "runs", RUNS_HEADER + "\n" + GOOD_ROW.replace(",400,", ",fast,")
     + "\n", 2, "speed", '"fast" is not a number (text in a number column in rpm)'),
    ("number with its own unit", "runs", RUNS_HEADER + "\n"
     + GOOD_ROW.replace(",400,", ",400 rpm,") + "\n", 2, "speed",
     '"400 rpm" is not a plain number; the column is in rpm'),
    ("decimal comma", "runs", RUNS_HEADER + "\n" + GOOD_ROW.replace(",10,", ',"10,5",') + "\n",
     2, "gas flow", '"10,5" uses a decimal comma; write "10.5"'),
    ("thousands separator", "runs", RUNS_HEADER + "\n"
     + GOOD_ROW.replace(",400,", ',"1,200",') + "\n", 2, "speed",
     '"1,200" has thousands separators; write the plain number "1200"'),
    ("comma splits a number", "runs", RUNS_HEADER + "\n" + GOOD_ROW.replace(",10,", ",10,5,")
     + "\n", 2, None, "the row has 7 cells but the header 6; a decimal comma"),
    ("duplicate row", "runs", RUNS_HEADER + "\n" + GOOD_ROW + "\n" + GOOD_ROW + "\n", 3, None,
     "duplicate of row 2 (same vessel, medium, speed, gas flow, date and time)"),
    ("out of range", "runs", RUNS_HEADER + "\n" + GOOD_ROW.replace(",30", ",200") + "\n", 2,
     "temperature", '"200 degC" is outside the accepted range'),
    ("not a date", "runs", RUNS_HEADER + "\n" + GOOD_ROW.replace("2026-02-03T09:00", "3/2/26")
     + "\n", 2, "date", '"3/2/26" is not an ISO 8601 date'),
    ("header only", "runs", RUNS_HEADER + "\n", None, None,
     "the file has a header row but no data rows"),
    ("empty file", "runs", "", None, None, "the file is empty"),
    ("blank lines only", "runs", "\n\n,,\n", None, None, "the file has no header row"),
    ("binary garbage", "runs", bytes(range(256)) * 8, None, None,
     "this is not a text (CSV) file: it holds binary data"),
    ("not UTF-8", "runs", RUNS_HEADER.encode() + b"\nT-20,caf\xe9,2026-02-03,400,10,30\n",
     None, None, "not UTF-8 text (byte"),
    ("a workbook named .csv", "runs", b"PK\x03\x04" + bytes(200), None, None,
     "this is a zip archive (an XLSX workbook?)"),
    ("duplicate header", "runs", RUNS_HEADER + ",Speed [rpm]\n" + GOOD_ROW + ",400\n", 1,
     "Speed", 'the column appears twice (also as "speed")'),
]


@pytest.mark.parametrize("name,entity,text,row,column,message", ZOO, ids=[z[0] for z in ZOO])
def test_bad_row_zoo(campaign, tmp_path, name, entity, text, row, column, message):
    path = write(tmp_path / "bad.csv", text)
    before = campaign.summary()
    problems = rejected(campaign, entity, path)
    assert message in reasons(problems)
    hit = next(p for p in problems if message in p["reason"])
    assert hit["row"] == row
    if column is not None:
        assert hit["column"] == column
    assert campaign.summary() == before


def test_binary_garbage_as_xlsx_and_json(campaign, tmp_path):
    garbage = bytes(np.random.default_rng(7).integers(0, 256, 5000, dtype=np.uint8))
    problems = rejected(campaign, "runs", write(tmp_path / "x.xlsx", garbage))
    assert "cannot read as an XLSX workbook" in reasons(problems)
    problems = rejected(campaign, "runs", write(tmp_path / "x.json", "[1, 2"))
    assert "not valid JSON" in reasons(problems)
    problems = rejected(campaign, "runs", write(tmp_path / "y.json", "[1, 2]"))
    assert 'a JSON table is an object with "columns"' in reasons(problems)


def test_every_bad_row_is_listed_with_row_column_value(campaign, tmp_path):
    path = write(tmp_path / "runs.csv", "\n".join([
        RUNS_HEADER, GOOD_ROW,
        GOOD_ROW.replace(",400,", ",fast,"),                          # row 3
        "",                                                          # row 4: blank, skipped
        GOOD_ROW.replace("T-20", "V-9"),                             # row 5
        GOOD_ROW.replace(",10,", ',"10,5",').replace(",30", ",x"),   # row 6: two problems
        GOOD_ROW.replace("09:00", "10:00")]) + "\n")
    problems = rejected(campaign, "runs", path)
    assert [p["row"] for p in problems] == [3, 5, 6, 6]
    by_row = {(p["row"], p["column"]): p for p in problems}
    assert by_row[(3, "speed")]["value"] == "fast"
    assert by_row[(6, "gas flow")]["value"] == "10,5"
    assert by_row[(6, "temperature")]["value"] == "x"
    assert campaign.summary()["runs"] == 0


def test_a_repeated_cell_is_read_once_but_refused_on_every_row(campaign, tmp_path):
    # each distinct cell of a column is read once per file: a refusal is not remembered
    out_of_range = GOOD_ROW.replace(",400,", ",9000,")
    path = write(tmp_path / "runs.csv", "\n".join([
        RUNS_HEADER, out_of_range, GOOD_ROW, out_of_range.replace("09:00", "09:01")]) + "\n")
    problems = rejected(campaign, "runs", path)
    assert [(p["row"], p["column"]) for p in problems] == [(2, "speed"), (4, "speed")]
    assert problems[0]["reason"] == problems[1]["reason"]
    assert "outside the accepted range" in problems[0]["reason"]


def test_the_same_vvm_or_actual_flow_reads_per_vessel_and_temperature(campaign, tmp_path):
    campaign.add_vessel({"name": "T-300", "tank diameter": "0.7 m", "liquid height": "0.8 m"},
                        [{"impeller type": "disc-turbine", "impeller diameter": "0.23 m",
                          "clearance": "0.23 m"}])
    path = write(tmp_path / "runs.csv", "\n".join([
        "vessel,medium,date,speed [rpm],gas flow,temperature [degC]",
        "T-20,tap water,2026-02-03T09:00,400,1 vvm,30",
        "T-300,tap water,2026-02-03T09:00,400,1 vvm,30",
        "T-20,tap water,2026-02-03T10:00,400,10 L/min,20",
        "T-20,tap water,2026-02-03T11:00,400,10 L/min,40"]) + "\n")
    campaign.import_file("runs", path)
    flows = [r["gas_flow_mol_s"] for r in campaign.runs()]
    small, large = (campaign.run_conditions(r["id"]).point.liquid_volume
                    for r in campaign.runs()[:2])
    # 1 vvm: one normal liquid volume per minute (normal state 0 degC, 101.325 kPa)
    assert flows[0] == pytest.approx(small / 60 * units.MOL_PER_NORMAL_M3, rel=1e-12)
    assert flows[1] == pytest.approx(large / 60 * units.MOL_PER_NORMAL_M3, rel=1e-12)
    # actual flow at the head pressure (0.2 barg) and each run's temperature: ideal gas
    pressure = 0.2e5 + units.P_ATM
    assert flows[2] == pytest.approx(0.010 / 60 * pressure / (units.R * 293.15), rel=1e-12)
    assert flows[3] == pytest.approx(0.010 / 60 * pressure / (units.R * 313.15), rel=1e-12)


def test_a_file_of_bad_rows_gets_a_bounded_report(campaign, tmp_path):
    from scaleup.store.tables import MAX_PROBLEMS

    path = write(tmp_path / "bad.csv", RUNS_HEADER + "\n"
                 + "\n".join([GOOD_ROW.replace(",400,", ",fast,")] * 3000) + "\n")
    with pytest.raises(ImportRejected) as info:
        campaign.import_file("runs", path)
    problems = info.value.problems
    assert len(problems) == MAX_PROBLEMS + 1
    assert "checking stopped after 1000 problems" in problems[0]["reason"]
    assert [p["row"] for p in problems[1:]] == list(range(2, 2 + MAX_PROBLEMS))
    text = str(info.value)
    assert text.count("\n") < 60 and "and 951 more; --json lists all" in text


def test_decimal_comma_files_are_read_when_asked(campaign, tmp_path):
    path = write(tmp_path / "eu.csv", RUNS_HEADER.replace(",", ";") + "\n"
                 "T-20;tap water;2026-02-03T09:00;400;10,5;30,25\n")
    assert "decimal comma" in reasons(rejected(campaign, "runs", path))
    campaign.import_file("runs", path, decimal_comma=True)
    run = campaign.runs()[0]
    assert run["temperature_k"] == pytest.approx(303.4)
    # 10.5 NL/min at DIN 1343 normal conditions, 22.414 L/mol (CODATA 2018 molar volume of an
    # ideal gas at 273.15 K and 101.325 kPa: 22.41396954 L/mol)
    assert run["gas_flow_mol_s"] == pytest.approx(10.5 / 22.41396954 / 60, rel=1e-9)
    ambiguous = write(tmp_path / "eu2.csv", RUNS_HEADER.replace(",", ";") + "\n"
                      "T-20;tap water;2026-02-03T10:00;1.200;10;30\n")
    assert "a point is ambiguous" in reasons(rejected(campaign, "runs", ambiguous,
                                                      decimal_comma=True))


def test_columns_match_case_and_space_insensitively_in_any_unit(campaign, tmp_path):
    path = write(tmp_path / "runs.csv", "VESSEL,Medium,Date,SPEED [rev/s],Gas_Flow [Nm3/h],"
                 "temperature [K],KLA [1/s],o2-fraction [%]\n"
                 "T-20,tap water,2026-02-03,7.5,0.6,303.15,0.02,21\n")
    campaign.import_file("runs", path)
    run = campaign.run(campaign.runs()[0]["id"])
    assert run["speed_rps"] == pytest.approx(7.5)
    assert run["gas_flow_mol_s"] == pytest.approx(0.6 / 3600 * units.MOL_PER_NORMAL_M3)
    assert run["kla_per_s"] == pytest.approx(0.02)
    assert run["o2_fraction_in"] == pytest.approx(0.21)


def test_units_row_instead_of_bracketed_headers(campaign, tmp_path):
    path = write(tmp_path / "runs.csv", "vessel,medium,date,speed,gas flow,temperature\n"
                 ",,,[rpm],[NL/min],[degC]\n" + GOOD_ROW + "\n")
    result = campaign.import_file("runs", path)
    assert result["rows"][0]["row"] == 3  # the file's own row numbers
    assert campaign.runs()[0]["speed_rps"] == pytest.approx(400 / 60)


def test_rejected_import_leaves_the_file_byte_identical(campaign, tmp_path):
    add_run(campaign)
    campaign.close()
    db_path = tmp_path / "test.db"
    before = db_path.read_bytes()
    bad_runs = write(tmp_path / "runs.csv", RUNS_HEADER + "\n" + GOOD_ROW + "\n"
                     + GOOD_ROW.replace("T-20", "V-9") + "\n")
    bad_vessels = write(tmp_path / "vessels.csv", "name,tank diameter [m],liquid height [m],"
                        "impeller type,impeller diameter [m],clearance [m]\n"
                        "V-1,0.3,0.3,disc-turbine,0.1,0.1\n"
                        "V-2,0.3,0.3,disc-turbine,0.4,0.1\n")  # impeller wider than tank
    with Campaign(db_path) as c:
        rejected(c, "runs", bad_runs)
        problems = rejected(c, "vessels", bad_vessels)
        assert problems[0]["row"] == 3 and "not smaller than the tank" in problems[0]["reason"]
        assert [v["name"] for v in c.vessels()] == ["T-20"]  # V-1 went in and came out again
    assert db_path.read_bytes() == before


def test_ctrl_c_during_an_import_keeps_nothing(campaign, tmp_path):
    rows = [GOOD_ROW.replace("09:00", f"{9 + i // 60:02d}:{i % 60:02d}") for i in range(450)]
    path = write(tmp_path / "runs.csv", RUNS_HEADER + "\n" + "\n".join(rows) + "\n")
    campaign.close()
    db_path = tmp_path / "test.db"
    before = db_path.read_bytes()
    seen = []

    def interrupt(stage, done, total):
        seen.append((stage, done))
        if stage == "writing runs" and done >= 400:
            raise KeyboardInterrupt
    with Campaign(db_path) as c:
        with pytest.raises(KeyboardInterrupt):
            c.import_file("runs", path, progress=interrupt)
        assert c.summary()["runs"] == 0
    assert ("writing runs", 400) in seen  # it was stopped in the middle of writing
    assert db_path.read_bytes() == before


def test_runs_workbook_with_a_vessels_sheet_goes_in_whole(campaign, tmp_path):
    import openpyxl

    book = openpyxl.Workbook()
    runs = book.active
    runs.title = "runs"
    runs.append(["ref", "vessel", "medium", "date", "speed [rpm]", "gas flow [vvm]",
                 "temperature [degC]"])
    runs.append(["N-1", "V-300", "tap water", "2026-02-03T09:00", 300, 1.0, 30])
    vessels = book.create_sheet("vessels")
    vessels.append(["name", "tank diameter [m]", "working volume [L]", "impeller type",
                    "impeller diameter [m]", "clearance [m]", "sparger type"])
    vessels.append(["V-300", 0.7, 300, "disc-turbine", 0.23, 0.23, "ring"])
    vessels.append(["V-300", None, None, "disc-turbine", 0.23, 0.6, None])
    book.save(tmp_path / "week.xlsx")
    result = campaign.import_file("runs", tmp_path / "week.xlsx", dry_run=True)
    assert result["vessels"]["added"] == 1 and result["added"] == 1
    assert [v["name"] for v in campaign.vessels()] == ["T-20"]  # dry run kept nothing
    campaign.import_file("runs", tmp_path / "week.xlsx")
    vessel = campaign.vessel("V-300")
    assert [i["clearance_m"] for i in vessel["impellers"]] == pytest.approx([0.23, 0.6])
    run = campaign.run(campaign.runs("vessel = 'V-300'")[0]["id"])
    # 1 vvm of a 300 L working volume: 0.3 m3/min at normal conditions
    assert run["gas_flow_mol_s"] == pytest.approx(0.3 / 60 * units.MOL_PER_NORMAL_M3)
    runs["C2"] = "no such medium"
    book.save(tmp_path / "bad.xlsx")
    with Campaign.create(tmp_path / "fresh.db") as fresh:
        fresh.add_medium({"name": "tap water"})
        problems = rejected(fresh, "runs", tmp_path / "bad.xlsx")
        assert problems[0]["column"] == "medium"
        assert fresh.summary()["vessels"] == 0  # the vessels sheet was rolled back with it


def test_refs_are_unique(campaign, tmp_path):
    header = "ref," + RUNS_HEADER
    path = write(tmp_path / "runs.csv", f"{header}\nA,{GOOD_ROW}\n"
                 f"A,{GOOD_ROW.replace('09:00', '10:00')}\n")
    assert "also used on row 2; a ref is unique" in reasons(rejected(campaign, "runs", path))
    add_run(campaign, ref="B")
    path = write(tmp_path / "runs2.csv", f"{header}\nB,{GOOD_ROW}\n")
    assert "is already used by stored run 1, a different run" in reasons(
        rejected(campaign, "runs", path))


def test_vessel_and_flux_duplicates(campaign, tmp_path):
    vessels = write(tmp_path / "v.csv", "name,tank diameter [m],liquid height [m],impeller type,"
                    "impeller diameter [m],clearance [m],baffle count\n"
                    "T-20,0.29,0.29,disc-turbine,0.097,0.097,6\n")
    assert "vessel T-20 is already stored (vessel 1); use --on-duplicate" in reasons(
        rejected(campaign, "vessels", vessels))
    assert campaign.import_file("vessels", vessels, on_duplicate="skip")["skipped"] == 1
    assert campaign.vessel("T-20")["baffle_count"] == 4
    campaign.import_file("vessels", vessels, on_duplicate="replace")
    assert campaign.vessel("T-20")["baffle_count"] == 6
    fluxes = write(tmp_path / "f.csv", "solute,interfacial area [cm2],flux [mol/(m2 s)],"
                   "interface concentration [mol/m3],bulk concentration [mol/m3],length [mm],"
                   "velocity [m/s],temperature [degC]\n"
                   "O2,25,1.1e-5,1.16,0,50,0.04,30\nO2,25,1.5e-5,1.16,0,50,0.08,30\n")
    assert campaign.import_file("fluxes", fluxes)["added"] == 2
    assert campaign.fluxes()[0]["interfacial_area_m2"] == pytest.approx(25e-4)
    assert "duplicate of stored flux test 1" in reasons(rejected(campaign, "fluxes", fluxes))
    same_place = write(tmp_path / "f2.csv", fluxes.read_text().replace("1.1e-5", "1.2e-5"))
    assert campaign.import_file("fluxes", same_place, on_duplicate="replace")["replaced"] == 2
    assert campaign.fluxes()[0]["flux_mol_m2_s"] == pytest.approx(1.2e-5)
    assert len(campaign.fluxes()) == 2


def test_flux_run_column(campaign, tmp_path):
    add_run(campaign, ref="R-1")
    path = write(tmp_path / "f.csv", "run,solute,interfacial area [m2],flux [mol/(m2 s)],"
                 "interface concentration [mol/m3],bulk concentration [mol/m3],length [m],"
                 "velocity [m/s],temperature [K]\n"
                 "R-1,O2,0.0025,1e-5,1.16,0,0.05,0.04,303\n"
                 "R-9,O2,0.0025,1e-5,1.16,0,0.05,0.04,303\n"
                 "R-1,O2,0.0025,1e-5,1.16,1.16,0.05,0.04,303\n")
    problems = rejected(campaign, "fluxes", path)
    assert [(p["row"], p["column"]) for p in problems] == [(3, "run"),
                                                          (4, "bulk concentration")]
    assert 'no run with ref or id "R-9"' in problems[0]["reason"]


# ----------------------------------------------------------------------------------- curves
def _curve_rows(kla=0.02, n=60, step=2.0, t0=0.0):
    t = t0 + step * np.arange(n)
    return t, 100 * (1 - np.exp(-kla * (t - t0)))


def test_curves_in_minutes_split_by_run_and_marker(campaign, tmp_path):
    add_run(campaign, ref="A")
    add_run(campaign, ref="B", speed="700 rpm")
    t, c = _curve_rows()
    t2, c2 = _curve_rows(kla=0.03)
    lines = ["run,curve,time [min],DO [%],probe tau [s]"]
    lines += [f"A,1,{float(ti) / 60!r},{float(ci)!r},6" for ti, ci in zip(t, c, strict=True)]
    lines += [f"A,2,{float(ti) / 60!r},{float(ci)!r},6" for ti, ci in zip(t2, c2, strict=True)]
    lines += [f"B,1,{float(ti) / 60!r},{float(ci)!r},7" for ti, ci in zip(t, c, strict=True)]
    path = write(tmp_path / "c.csv", "\n".join(lines))
    result = campaign.import_file("curves", path, start="0.5")
    assert result["added"] == 3
    stored = campaign.curves()
    assert [s["run_id"] for s in stored] == [1, 1, 2]
    assert campaign.import_file("curves", path, on_duplicate="skip")["skipped"] == 3
    lines += [f"A,3,{float(ti) / 60!r},{float(ci)!r},6" for ti, ci in zip(t, c, strict=True)]
    problems = rejected(campaign, "curves", write(tmp_path / "d.csv", "\n".join(lines)),
                        on_duplicate="skip")
    assert reasons(problems) == "the curve of rows 182-241 duplicates the curve of rows 2-61"
    curve = campaign.curve(stored[0]["id"])
    np.testing.assert_allclose(curve["time_s"], t, rtol=1e-12)  # minutes became seconds
    np.testing.assert_allclose(curve["do_values"], c, rtol=1e-15)
    assert curve["probe_tau_s"] == 6 and curve["do_unit"] == "%"
    assert curve["gas_on_s"] == pytest.approx(30.0)  # --start 0.5 in the file's minutes


def test_iso_date_times_across_a_clock_change(campaign, tmp_path):
    """Logger clocks write local time with its offset; the samples must stay evenly spaced
    across the spring-forward change (checked against the IANA zone database, zoneinfo)."""
    add_run(campaign, ref="A")
    zone = zoneinfo.ZoneInfo("Europe/Berlin")
    first = dt.datetime(2026, 3, 29, 1, 58, 0, tzinfo=zone)  # 02:00 CET -> 03:00 CEST
    moments = [(first.astimezone(dt.UTC) + dt.timedelta(seconds=5 * i)).astimezone(zone)
               for i in range(60)]
    assert moments[0].utcoffset() != moments[-1].utcoffset()
    lines = ["time,DO [mg/L]"] + [f"{m.isoformat()},{float(8 * (1 - np.exp(-0.01 * 5 * i)))!r}"
                                  for i, m in enumerate(moments)]
    result = campaign.import_file("curves", write(tmp_path / "c.csv", "\n".join(lines)),
                                  run="A", start=moments[3].astimezone(dt.UTC).isoformat())
    curve = campaign.curve(result["rows"][0]["curve_id"])
    np.testing.assert_allclose(curve["time_s"], 5.0 * np.arange(60), atol=1e-6)
    assert curve["gas_on_s"] == pytest.approx(15.0)
    assert moments[0].isoformat() in curve["notes"]
    assert result["warnings"] == []


def test_date_times_without_zone_warn_and_mixed_zones_are_refused(campaign, tmp_path):
    add_run(campaign, ref="A")
    naive = ["time,DO [%]"] + [f"2026-03-04T09:00:{s:02d},{s}" for s in range(0, 60, 5)]
    result = campaign.import_file("curves", write(tmp_path / "n.csv", "\n".join(naive)),
                                  run="A")
    assert "no time zone" in result["warnings"][0]
    mixed = naive[:4] + ["2026-03-04T09:00:20+01:00,20"]
    problems = rejected(campaign, "curves", write(tmp_path / "m.csv", "\n".join(mixed)), run="A")
    assert problems[0]["row"] == 5 and "some date-times have a time zone" in problems[0]["reason"]


def test_curves_split_at_gaps_and_problems_of_curve_files(campaign, tmp_path):
    add_run(campaign, ref="A")
    t, c = _curve_rows(n=40)
    t2 = t + t[-1] + 600  # ten minutes later: a second test
    lines = ["time [s],DO [%]"] + [f"{float(a)!r},{float(b)!r}" for a, b in zip(np.r_[t, t2], np.r_[c, c],
                                                                 strict=True)]
    path = write(tmp_path / "g.csv", "\n".join(lines))
    result = campaign.import_file("curves", path, run="A", dry_run=True)
    assert [r["n_samples"] for r in result["rows"]] == [40, 40]
    assert campaign.import_file("curves", path, run="A", gap="none", dry_run=True)["added"] == 1
    cases = [
        ("time [s],DO [%]\n0,1\n2,2\n1,3\n3,4\n", {"run": "A"}, 4, "time goes backwards"),
        ("time [s],DO [%]\n0,1\n2,2\n2,3\n3,4\n", {"run": "A"}, 4, "time does not increase"),
        ("time [s],DO [%]\n0,1\n2,2\n", {"run": "A"}, 2, "a curve needs at least 3 samples"),
        ("time [s],DO [%]\n0,1\n2,2\n4,3000\n6,4\n", {"run": "A"}, 4,
         "outside the plausible range -10 to 2500 %"),
        ("time [s],DO [ppm]\n0,1\n", {"run": "A"}, 1, '"ppm" is not a DO unit'),
        ("time [kg],DO [%]\n0,1\n", {"run": "A"}, 1, "wrong unit for the time column"),
        ("time,DO [%]\n0,1\n1,2\n2,3\n", {"run": "A"}, 2, "the time column has no unit"),
        ("time [s],DO [%]\n0,1\n1,2\n2,3\n", {}, None, "which run do these curves belong to"),
        ("run,time [s],DO [%]\nZ,0,1\nZ,1,2\nZ,2,3\n", {}, 2, 'no run with ref or id "Z"'),
        ("time [s],DO [%]\n0,1\n1,2\n2,3\n", {"run": "A", "start": "5 min"}, None,
         "--start is outside every curve"),
        ("time [s],DO [%],probe tau [s]\n0,1,5\n1,2,5\n2,3,6\n", {"run": "A"}, 4,
         "changes within a curve"),
        ("time [s],DO\n0,1\n", {"run": "A"}, 1, "the DO column needs a unit"),
    ]
    for text, options, row, message in cases:
        problems = rejected(campaign, "curves", write(tmp_path / "bad.csv", text), **options)
        assert message in reasons(problems), (text, reasons(problems))
        assert problems[0]["row"] == row, (text, problems)
    assert campaign.summary()["curves"] == 0


def test_curves_with_a_do_unit_column_and_duplicates(campaign, tmp_path):
    add_run(campaign, ref="A")
    lines = ["run,curve,time [s],DO,DO unit"] + [f"A,1,{i},{i / 10},mg/L" for i in range(5)] \
        + [f"A,2,{i},{i},%" for i in range(5)]
    path = write(tmp_path / "u.csv", "\n".join(lines))
    result = campaign.import_file("curves", path)
    assert [r["do_unit"] for r in result["rows"]] == ["mg/L", "%"]
    assert "duplicates stored curve 1" in reasons(rejected(campaign, "curves", path))
    replaced = campaign.import_file("curves", path, on_duplicate="replace")
    assert replaced["replaced"] == 2 and campaign.summary()["curves"] == 2


# -------------------------------------------------------------------------------- templates
@pytest.mark.parametrize("entity", ["runs", "vessels", "fluxes", "curves"])
def test_templates_document_every_column(tmp_path, entity):
    import openpyxl

    from scaleup import fields as F

    written = Campaign.write_template(entity, tmp_path / f"{entity}.xlsx")
    book = openpyxl.load_workbook(written[0])
    assert book.sheetnames == [entity, "columns"]
    header = [c.value for c in book[entity][1]]
    docs = list(book["columns"].iter_rows(values_only=True))
    assert docs[2][:4] == ("column", "unit", "required", "valid range")
    assert [d[0] for d in docs[3:]] == header
    if entity == "runs":
        speed = next(d for d in docs if d[0] == "speed [rpm]")
        assert speed[2] == "yes" and speed[3] == next(
            f for f in F.RUN if f.label == "speed").range_text()
    csv_files = Campaign.write_template(entity, tmp_path / f"{entity}.csv")
    assert [p.name for p in csv_files] == [f"{entity}.csv", f"{entity}-columns.csv"]
    assert csv_files[0].read_text(encoding="utf-8").strip() == ",".join(header)


def test_a_filled_template_imports_and_an_empty_one_says_so(campaign, tmp_path):
    import openpyxl

    path = Campaign.write_template("runs", tmp_path / "t.xlsx", with_vessels=True)[0]
    assert "no data rows" in reasons(rejected(campaign, "runs", path))
    book = openpyxl.load_workbook(path)
    header = [c.value for c in book["runs"][1]]
    values = {"ref": "T1", "vessel": "T-20", "medium": "tap water", "date": "2026-02-03",
              "speed [rpm]": 450, "gas flow [NL/min]": 12, "temperature [degC]": 31}
    book["runs"].append([values.get(h) for h in header])
    book.save(path)
    assert campaign.import_file("runs", path)["added"] == 1  # the empty vessels sheet is fine
    assert campaign.run(1)["ref"] == "T1"


def test_no_partial_template_is_left_on_error(tmp_path, monkeypatch):
    import openpyxl

    def broken(self, filename):
        open(filename, "wb").write(b"half")
        raise OSError("disk full")
    monkeypatch.setattr(openpyxl.Workbook, "save", broken)
    with pytest.raises(OSError):
        Campaign.write_template("runs", tmp_path / "t.xlsx")
    assert os.listdir(tmp_path) == []


def test_unknown_entity_and_missing_file(campaign, tmp_path):
    with pytest.raises(InputError, match="choose one of runs, vessels, fluxes, curves"):
        campaign.import_file("media", tmp_path / "x.csv")
    with pytest.raises(InputError, match="does not exist"):
        campaign.import_file("runs", tmp_path / "nothing.csv")
    with pytest.raises(InputError, match='no sheet "week9"'):
        Campaign.write_template("runs", tmp_path / "t.xlsx")
        campaign.import_file("runs", tmp_path / "t.xlsx", sheet="week9")
