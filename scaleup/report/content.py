"""What a report shows, fetched from the campaign: the study, its fit, the runs and curves.

Everything goes through the :class:`scaleup.campaign.Campaign` service layer; the report
never opens the store itself.
"""

from __future__ import annotations

import datetime as _dt
import json


def gather(campaign, key: str | int) -> dict:
    """The study (by name or id) with its fit, the fit's runs and their curves' warnings."""
    from scaleup import __version__
    from scaleup.store.exporters import study_name

    study = campaign.study(study_name(campaign, key))
    fit = None
    if study.get("fit_id") is not None:
        found = campaign.rows("SELECT * FROM fit WHERE id = ?", (study["fit_id"],))
        if found:
            fit = found[0]
            fit["model"] = json.loads(fit.pop("model_json"))
    run_ids = list(fit["model"].get("run_ids", [])) if fit and fit["kind"] == "kla" else []
    pilot = (study["inputs"].get("pilot_source") or {}).get("run_id")
    if pilot is not None and pilot not in run_ids:
        run_ids.append(pilot)
    live = {r["id"]: r for r in campaign.runs()}
    runs = [live[i] for i in run_ids if i in live]
    return {"study": study, "fit": fit, "runs": runs,
            "curve_warnings": curve_warnings(campaign, [r["id"] for r in runs]),
            "campaign": str(campaign.path), "package_version": __version__,
            "generated_at": _dt.datetime.now(_dt.UTC).isoformat(timespec="seconds")}


def curve_warnings(campaign, run_ids: list[int]) -> list[str]:
    """Warnings the curve analysis left on the runs' curves (probe lag, short windows)."""
    if not run_ids:
        return []
    marks = ", ".join("?" for _ in run_ids)
    rows = campaign.rows("SELECT id, run_id, analysis_json FROM curve WHERE deleted_at IS NULL "
                         f"AND analysis_json IS NOT NULL AND run_id IN ({marks}) ORDER BY id",
                         tuple(run_ids))
    return [f"curve {row['id']} (run {row['run_id']}): {w}" for row in rows
            for w in json.loads(row["analysis_json"]).get("warnings", [])]
