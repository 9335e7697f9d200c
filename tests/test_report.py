"""The design-review report: every section there, every number the study's, readable alone."""

from __future__ import annotations

import base64
import json
import shutil
import subprocess
from html.parser import HTMLParser

import numpy as np
import pytest

from scaleup import units
from scaleup.campaign import Campaign
from scaleup.cautions import GENERAL
from scaleup.report import render
from scaleup.report.sections import TITLES, fit_points

from .cli_helpers import scaleup_json


class Page(HTMLParser):
    """The parts of a report page the tests read, per section."""

    def __init__(self, text: str):
        super().__init__()
        self.sections: dict[str, dict] = {}
        self.order: list[str] = []
        self._section = None
        self._capture = None
        self._attrs: dict = {}
        self._text = ""
        self.raw = text
        self.feed(text)

    def handle_starttag(self, tag, attrs):
        attrs = dict(attrs)
        if tag == "section":
            self._section = {"h2": "", "cells": [], "items": [], "pre": "", "figures": [],
                             "text": ""}
            self.sections[attrs["id"]] = self._section
            self.order.append(attrs["id"])
        elif self._section is not None:
            if tag in ("h2", "td", "li", "pre"):
                self._capture, self._attrs, self._text = tag, attrs, ""
            elif tag == "figure":
                self._section["figures"].append({"id": attrs["id"], "svg": False})
            elif tag == "svg" and self._section["figures"]:
                self._section["figures"][-1]["svg"] = True

    def handle_endtag(self, tag):
        if tag == "section":
            self._section = None
        elif self._section is not None and tag == self._capture:
            text = self._text.strip()
            if tag == "h2":
                self._section["h2"] = text
            elif tag == "td":
                self._section["cells"].append((self._attrs.get("data-key"),
                                               self._attrs.get("data-si"), text))
            elif tag == "li":
                self._section["items"].append(text)
            else:
                self._section["pre"] = text
            self._capture = None

    def handle_data(self, data):
        if self._capture:
            self._text += data
        if self._section is not None:
            self._section["text"] += data

    def points(self, figure: str) -> int:
        """Data markers drawn in a figure: the <use> marks of its points-* groups (ticks and
        legend entries are drawn with <use> too, outside those groups)."""
        svg = self.raw.split(f'<figure id="{figure}">', 1)[1].split("</figure>", 1)[0]
        chunks = svg.split('<g id="points-')[1:]
        return sum(chunk.split('<g id="', 1)[0].count("<use") for chunk in chunks)

    def values(self, section: str, key: str) -> list[tuple[float, str]]:
        return [(float(si), text) for k, si, text in self.sections[section]["cells"]
                if k == key and si is not None]


@pytest.fixture(scope="session")
def studies(tmp_path_factory):
    """A demo campaign with analysed curves, a saved kLa fit, a rule comparison and a design
    study on it (the demo data are invented; the tests compare the report with the study,
    not with the numbers)."""
    from scaleup.hydro.geometry import scale_to_volume
    from scaleup.scaling.evaluate import Limits, Process

    path = tmp_path_factory.mktemp("report") / "studies.db"
    with Campaign.create(path) as c:
        c.load_demo()
        c.analyse_curves()
        c.save_fit("pilot-kla", c.fit_kla(power_basis="gassed"))
        process, limits = Process(our=50 / 3.6e6 * 1e3, do_setpoint=20.0), Limits(max_tip_speed=6.0)
        c.scale_study({"run_id": 12}, to_volume=40.0, correlation="pilot-kla", save="rules-40",
                      process=process, limits=limits,
                      rules=("p-per-v", "tip-speed", "speed", "kla"))
        point, liquid = c.scale_pilot(run_id=12)
        c.design_study(vessel=scale_to_volume(point.vessel, 40.0), liquid=liquid,
                       correlation="pilot-kla", save="design-40", process=process,
                       limits=limits, grid=(14, 12), risk_draws=4000, map_draws=300)
        c.scale_study({"run_id": 12}, to_volume=5.0, save="published-5", process=process,
                      rules=("p-per-v", "tip-speed"))
        reports = {}
        for name in ("rules-40", "design-40", "published-5"):
            out = path.parent / f"{name}.html"
            c.write_report(name, out)
            reports[name] = (c.study(name), Page(out.read_text(encoding="utf-8")))
        c.write_report("design-40", path.parent / "design-40.md")
    return path, reports


def test_every_section_is_there_in_order(studies):
    _, reports = studies
    for _, page in reports.values():
        assert page.order == list(TITLES)
        assert [page.sections[s]["h2"] for s in page.order] == list(TITLES.values())


def test_rule_table_shows_the_studys_numbers(studies):
    _, reports = studies
    study, page = reports["rules-40"]
    results = study["results"]
    points = [results["pilot"], *results["rules"]]
    for key, scale in (("speed_rps", 60.0), ("kla_per_s", 3600.0), ("power_w", 1e-3),
                       ("otr_capacity_mol_m3_s", 3600.0), ("tip_speed_m_s", 1.0)):
        shown = page.values("rules", key)
        expected = [p[key] for p in points if p.get(key) is not None]
        assert [si for si, _ in shown] == expected, key  # the very numbers, all digits
        # mol/(m3 s) to mmol/(L h): 1 mol/m3 = 1 mmol/L, 3600 s in an hour (exact)
        assert [text for _, text in shown] == [units.sig(v * scale) for v in expected], key
    broken = [text for k, si, text in page.sections["rules"]["cells"] if k is None]
    for r in results["rules"]:
        for violation in r["violations"]:
            assert any(violation in text for text in broken)


def test_design_point_risk_window_and_heat(studies):
    _, reports = studies
    study, page = reports["design-40"]
    results = study["results"]
    assert results["feasible"]
    assert page.values("risk", "probability_meets_duty")[0][0] == results[
        "probability_meets_duty"]
    assert page.values("rules", "total_power_w")[0][0] == results["total_power_w"]
    assert page.values("heat", "heat_load_w")[0][0] == results["heat"]["heat_load_w"]
    bands = page.values("risk", "kla_percentiles_per_s")
    assert [si for si, _ in bands] == list(results["kla_percentiles_per_s"].values())
    window = page.sections["window"]["figures"]
    assert [f["id"] for f in window] == ["figure-window"] and window[0]["svg"]


def test_correlation_parameters_lovo_and_parity(studies):
    path, reports = studies
    study, page = reports["rules-40"]
    with Campaign(path) as c:
        fit = c.rows("SELECT * FROM fit WHERE id = ?", (study["fit_id"],))[0]
        model = json.loads(fit["model_json"])
        runs = c.runs()
    for p in model["parameters"]:
        assert page.values("correlation", p["name"])[0][0] == p["value"]
    folds = model["loo_vessel"]["folds"]
    assert [si for si, _ in page.values("lovo", "mean_log_ratio")] == [
        f["mean_log_ratio"] for f in folds]
    assert model["loo_vessel"]["scale_bias"]["message"] in page.sections["lovo"]["text"]
    measured, predicted, residual, groups = fit_points(model, runs)
    by_id = {r["id"]: r for r in runs}
    assert measured == [by_id[i]["kla_per_s"] for i in model["run_ids"]]
    assert predicted == model["diagnostics"]["fitted"]
    assert page.points("figure-parity") == len(measured)  # one marker per run
    assert page.points("figure-residuals") == len(measured)
    assert len(page.values("data", "speed_rps")) == model["n_runs"]


def test_every_warning_and_caution_is_listed(studies):
    _, reports = studies
    for study, page in reports.values():
        items = " ".join(page.sections["warnings"]["items"])
        for warning in study["results"]["warnings"]:
            assert " ".join(warning.split()) in items
        for rule in study["results"].get("rules", []):
            for message in rule["extrapolation"]["messages"]:
                assert message in items
        cautions = page.sections["cautions"]["items"]
        assert GENERAL in cautions
        assert set(study["results"]["cautions"]) <= set(cautions)
    assert "probe lag" in " ".join(reports["rules-40"][1].sections["warnings"]["items"])


def test_provenance(studies):
    from scaleup import __version__

    _, reports = studies
    study, page = reports["design-40"]
    text = page.sections["provenance"]["text"]
    assert __version__ in text and study["package_version"] in text
    assert f"study id{study['id']}" in text.replace(" ", "").replace("studyid", "study id")
    assert json.loads(page.sections["provenance"]["pre"]) == study["inputs"]
    assert str(study["fit_id"]) in text and study["created_at"] in text


def test_a_published_correlation_study_says_what_it_lacks(studies):
    _, reports = studies
    study, page = reports["published-5"]
    assert study["fit_id"] is None
    assert "published correlation" in page.sections["correlation"]["text"]
    assert page.sections["fit-plots"]["figures"] == []
    assert "Not available" in page.sections["lovo"]["text"]
    assert "no operating window" in page.sections["window"]["text"]
    assert len(page.values("data", "speed_rps")) == 1  # the pilot run


def test_markdown_has_the_same_sections_and_plots(studies):
    path, reports = studies
    text = (path.parent / "design-40.md").read_text(encoding="utf-8")
    for title in TITLES.values():
        assert f"\n## {title}\n" in text
    images = [chunk.split(")", 1)[0] for chunk in text.split("data:image/svg+xml;base64,")[1:]]
    assert len(images) == 3  # parity, residuals, window
    assert all(base64.b64decode(i).startswith(b"<svg") for i in images)
    study = reports["design-40"][0]
    assert f"| total power | kW | {units.sig(study['results']['total_power_w'] / 1e3)} |" in text


def _infeasible_design() -> dict:
    """A design study that found no feasible point, with the keys the scaling layer saves."""
    speeds, gas = np.geomspace(0.5, 3, 5), np.geomspace(1, 20, 4)
    results = {"kind": "design", "feasible": False, "binding_constraints": [],
               "infeasibility": ["OTR capacity below the duty everywhere (by 35 %)"],
               "speed_rps": None, "gas_flow_mol_s": None, "total_power_w": None,
               "probability_meets_duty": None, "extrapolation": None,
               "window": {"speeds_rps": speeds.tolist(), "gas_flows_mol_s": gas.tolist(),
                          "feasible": np.zeros((5, 4), bool).tolist(),
                          "total_power_w": np.full((5, 4), 1e5).tolist(),
                          "probability_meets_duty": None},
               "warnings": [], "cautions": [GENERAL],
               "correlation": {"name": "vant_Riet_coalescing", "equation": "kLa = ...",
                               "source": "van't Riet (1979)", "scatter_sd": 0.3}}
    study = {"id": 7, "name": "too-small", "kind": "design", "fit_id": None,
             "package_version": "0.1.0", "created_at": "2026-03-20T10:00:00Z",
             "inputs": {"process": {"our": 0.03}, "limits": {"max_tip_speed_m_s": 5.0}},
             "results": results}
    return {"study": study, "fit": None, "runs": [], "curve_warnings": [],
            "campaign": "c.db", "package_version": "0.1.0",
            "generated_at": "2026-03-20T10:05:00+00:00"}


def test_an_infeasible_design_is_reported_not_hidden():
    data = _infeasible_design()
    page = Page(render(data))
    assert page.order == list(TITLES)
    assert "OTR capacity below the duty everywhere" in " ".join(
        page.sections["window"]["items"])
    assert page.sections["window"]["figures"][0]["svg"]
    assert "No probability" in page.sections["risk"]["text"]
    assert render(data) == render(data)  # the same study gives the same page, byte for byte


def _browser() -> str | None:
    return next((b for b in ("chromium", "chromium-browser", "google-chrome", "chrome")
                 if shutil.which(b)), None)


@pytest.mark.skipif(_browser() is None, reason="no Chromium or Chrome installed")
def test_the_page_renders_in_a_headless_browser(studies, tmp_path):
    path, _ = studies
    png = tmp_path / "page.png"
    subprocess.run([_browser(), "--headless", "--disable-gpu", "--no-sandbox",
                    f"--screenshot={png}", "--window-size=1200,2400",
                    (path.parent / "design-40.html").as_uri()], check=True, timeout=120,
                   capture_output=True)
    data = png.read_bytes()
    assert data.startswith(b"\x89PNG") and len(data) > 20_000


def test_report_command(studies, tmp_path):
    path, reports = studies
    out = scaleup_json("report", "rules-40", "--out", str(tmp_path / "r.txt"), "--format", "md",
                       db=path)
    assert out["sections"] == list(TITLES) and out["study_id"] == reports["rules-40"][0]["id"]
    assert out["format"] == "md" and out["cautions"] == reports["rules-40"][0]["results"][
        "cautions"]
    assert (tmp_path / "r.txt").read_text(encoding="utf-8").startswith("# Scale-up design")
