"""Write runs, vessels, flux tests, curves, fits and studies to CSV, XLSX or JSON.

Tables of records carry ``name [unit]`` headers (or, with ``units_row``, a row of names and
a row of ``[unit]`` cells) in lab units or SI, and read back through ``scaleup import``
unchanged: CSV and JSON write every float with all its digits, XLSX with 16 significant
digits (the writer's limit; a relative difference below 1e-15). JSON tables are
``{"columns": [...], "rows": [[...]]}`` with the same header cells, which the importers read
too. Fits and studies are results, not inputs: their JSON is the saved record whole; their
CSV and XLSX are flat tables for reading and pasting.
"""

from __future__ import annotations

import datetime as _dt
import json
from collections.abc import Callable
from pathlib import Path

from scaleup import fields as F
from scaleup import units
from scaleup.errors import InputError, NotFound
from scaleup.store.files import file_format, write_csv, write_json, write_xlsx
from scaleup.store.keyunits import base_name, kind_of, lab_value, unit_label

SI_LABELS = {"speed": "rev/s", "gas_flow": "mol/s", "temperature": "K", "pressure": "Pa"}
ENTITIES = ("runs", "vessels", "fluxes", "curves", "fits", "study")
Progress = Callable[[str, int, int], None]


def _quiet(stage: str, done: int, total: int) -> None:
    """No progress display."""


def _header_unit(spec: F.Field, si: bool) -> str:
    if spec.kind in ("text", "choice", "date", "int", "fraction"):
        return ""
    if si:
        return SI_LABELS.get(spec.kind) or units.KINDS[spec.kind].label
    return spec.unit


def _cell(spec: F.Field, value, si: bool, volume_m3: float | None = None):
    if value is None:
        return ""
    if spec.kind in ("text", "choice", "date"):
        return str(value)
    if spec.kind in ("int", "fraction") or si:
        return value
    if spec.kind == "gas_flow":
        return units.gas_flow_to(value, "NL/min", volume_m3)
    return units.convert(value, spec.kind)


def _column(spec: F.Field, values: list, si: bool) -> list:
    """:func:`_cell` over a whole column: quantities converted at once."""
    if spec.kind in ("text", "choice", "date", "int", "fraction", "gas_flow") or si:
        return [_cell(spec, v, si) for v in values]
    return ["" if v is None else v for v in units.convert_many(values, spec.kind)]


def _names_units(specs, si: bool) -> tuple[list[str], list[str]]:
    return [s.label for s in specs], [_header_unit(s, si) for s in specs]


def run_table(campaign, where: str | None = None, *, si: bool = False
              ) -> tuple[list[str], list[str], list[list]]:
    """Column names, units and rows of the runs, in lab units (or SI): one query, each
    column converted at once."""
    names, units_ = _names_units(F.RUN, si)
    found = campaign.run_records(where)
    columns = [_column(s, [r.get(s.column) for r in found], si) for s in F.RUN]
    return names, units_, [list(row) for row in zip(*columns, strict=True)]


def vessel_table(campaign, where: str | None = None, *, si: bool = False):
    """One row per impeller; the vessel's fields and sparger on its first row."""
    specs = F.VESSEL + F.IMPELLER + F.SPARGER
    names, units_ = _names_units(specs, si)
    rows = []
    for v in campaign.vessels():
        sparger = v["sparger"] or {}
        impellers = v["impellers"] or [{}]
        for position, imp in enumerate(impellers):
            row = []
            for s in specs:
                if s in F.IMPELLER:
                    row.append(_cell(s, imp.get(s.column), si))
                elif position == 0 or s.column == "name":
                    source = sparger if s in F.SPARGER else v
                    row.append(_cell(s, source.get(s.column), si))
                else:
                    row.append("")
            rows.append(row)
    return names, units_, rows


def _run_refs(campaign) -> dict[int, str]:
    return {r["id"]: (r["ref"] or str(r["id"])) for r in campaign.rows(
        "SELECT id, ref FROM run")}


def flux_table(campaign, where: str | None = None, *, si: bool = False):
    names, units_ = _names_units(F.FLUX, si)
    refs = _run_refs(campaign)
    rows = [[refs.get(f["run_id"], "") if f["run_id"] else "",
             *[_cell(s, f.get(s.column), si) for s in F.FLUX]] for f in campaign.fluxes()]
    return ["run", *names], ["", *units_], rows


def curve_table(campaign, where: str | None = None, *, si: bool = False,
                progress: Progress = _quiet):
    """One row per sample: run ref, curve id, kind, time, DO and the curve's settings."""
    import numpy as np

    run_ids = {r["id"] for r in campaign.runs(where)}
    curves = [c for c in campaign.curves() if c["run_id"] in run_ids]
    refs = _run_refs(campaign)

    def unit_of(c):
        return "mol/m3" if si and c["do_unit"] == "mg/L" else c["do_unit"]
    shown = {unit_of(c) for c in curves}
    single = shown.pop() if len(shown) == 1 else None
    names = ["run", "curve", "kind", "time", "DO", "probe tau", "gas on", "notes"]
    units_ = ["", "", "", "s", single or "", "s", "s", ""]
    if single is None:
        names.insert(5, "DO unit")
        units_.insert(5, "")
    rows = []
    for done, c in enumerate(curves, start=1):
        full = campaign.curve(c["id"])
        do = full["do_values"]
        if si and full["do_unit"] == "mg/L":
            do = do * 1e-3 / units.M_O2  # mg/L -> kg/m3 -> mol/m3
        common = [refs[c["run_id"]], c["id"], full["kind"]]
        tail = [full["probe_tau_s"], full["gas_on_s"], full["notes"]]
        for t, value in zip(full["time_s"].tolist(), do.tolist(), strict=True):
            v = "" if np.isnan(value) else value
            rows.append(common + [t, v] + ([] if single else [unit_of(c)]) + tail)
        progress("exporting curves", done, len(curves))
    return names, units_, rows


TABLES = {"runs": run_table, "vessels": vessel_table, "fluxes": flux_table,
          "curves": curve_table}


def _headers(names: list[str], units_: list[str], units_row: bool) -> list[list[str]]:
    if units_row:
        return [names, [f"[{u}]" if u else "" for u in units_]]
    return [[f"{n} [{u}]" if u else n for n, u in zip(names, units_, strict=True)]]


def _stamp() -> dict:
    from scaleup import __version__

    return {"package_version": __version__,
            "exported_at": _dt.datetime.now(_dt.UTC).isoformat(timespec="seconds")}


def export_table(campaign, entity: str, path: str | Path, where: str | None = None, *,
                 si: bool = False, units_row: bool = False, progress: Progress | None = None
                 ) -> dict:
    """Write one entity's records; returns ``{"entity", "path", "n_rows", "format"}``."""
    fmt = file_format(path)
    if where is not None and entity not in ("runs", "curves"):
        raise InputError(f"--where filters runs (and their curves), not {entity}", "where",
                         where)
    build = TABLES[entity]
    if entity == "curves":
        names, units_, rows = build(campaign, where, si=si, progress=progress or _quiet)
    else:
        names, units_, rows = build(campaign, where, si=si)
    if fmt == "json":
        write_json(path, {"table": entity, "units": "SI" if si else "lab",
                          "columns": _headers(names, units_, False)[0], "rows": rows,
                          **_stamp()})
    elif fmt == "csv":
        write_csv(path, _headers(names, units_, units_row) + rows)
    else:
        write_xlsx(path, [(entity, _headers(names, units_, units_row) + rows)],
                   header_rows=2 if units_row else 1)
    warnings = []
    if entity == "curves" and si and _has_percent(names, units_, rows):
        warnings.append("DO in % saturation stays in %: converting it to mol/m3 needs the "
                        "saturation concentration of each run")
    return {"entity": entity, "path": str(path), "n_rows": len(rows), "format": fmt,
            "warnings": warnings}


def _has_percent(names: list[str], units_: list[str], rows: list[list]) -> bool:
    if units_[names.index("DO")] == "%":
        return True
    column = names.index("DO unit") if "DO unit" in names else None
    return column is not None and any(r[column] == "%" for r in rows)


def export_runs(campaign, path: str | Path, where: str | None = None, *, si: bool = False) -> int:
    """Write the runs to ``path`` (.csv, .xlsx or .json); returns the number of runs written."""
    return export_table(campaign, "runs", path, where, si=si)["n_rows"]


# ---------------------------------------------------------------------------- fits, studies
def saved_fits(campaign, name: str | None = None) -> list[dict]:
    """Live saved fits (or the one named), each with its model and the ids of its runs."""
    sql, params = "SELECT * FROM fit WHERE deleted_at IS NULL", ()
    if name is not None:
        column = "id" if str(name).isdigit() else "name"
        sql, params = sql + f" AND {column} = ?", (name,)
    fits = campaign.rows(sql + " ORDER BY id", params)
    if name is not None and not fits:
        known = [r["name"] for r in campaign.rows("SELECT name FROM fit WHERE deleted_at IS "
                                                  "NULL ORDER BY name")]
        raise NotFound(f"no saved fit {name!r}; saved fits: {', '.join(known) or 'none'}",
                       "fit", name)
    for f in fits:
        f["model"] = json.loads(f.pop("model_json"))
        f["run_ids"] = [r["run_id"] for r in campaign.rows(
            "SELECT run_id FROM fit_run WHERE fit_id = ? ORDER BY run_id", (f["id"],))]
    return fits


def study_name(campaign, key: str | int) -> str:
    """The name of a saved study given by name or id; refuse an unknown one by listing."""
    column = "id" if isinstance(key, int) or str(key).isdigit() else "name"
    found = campaign.rows(f"SELECT name FROM study WHERE deleted_at IS NULL AND {column} = ?",
                          (key,))
    if not found:
        known = [r["name"] for r in campaign.rows("SELECT name FROM study WHERE deleted_at IS "
                                                  "NULL ORDER BY name")]
        raise NotFound(f"no saved study {key!r}; saved studies: {', '.join(known) or 'none'}",
                       "study", key)
    return found[0]["name"]


def export_fits(campaign, path: str | Path, name: str | None = None) -> dict:
    """Saved fits: JSON whole; CSV one row per parameter; XLSX fits, parameters, runs sheets."""
    fmt = file_format(path)
    fits = saved_fits(campaign, name)
    if fmt == "json":
        write_json(path, {"fits": fits, **_stamp()})
        return {"entity": "fits", "path": str(path), "n_rows": len(fits), "format": fmt,
                "warnings": []}
    stats = sorted({k for f in fits for k, v in f["model"].get("statistics", {}).items()
                    if isinstance(v, (int, float))})
    summary = [["fit id", "name", "kind", "form", "equation", "method", "weights", "stale",
                "created at", "package version", *stats]]
    parameters = [["fit id", "fit name", "parameter", "value", "stderr", "ci95 low",
                   "ci95 high", "fixed"]]
    used = [["fit id", "run id"]]
    for f in fits:
        model = f["model"]
        summary.append([f["id"], f["name"], f["kind"], f["form"], model.get("equation", ""),
                        f["method"], f["weights"], bool(f["stale"]), f["created_at"],
                        f["package_version"], *[model.get("statistics", {}).get(k)
                                                for k in stats]])
        for p in model.get("parameters", []):
            low, high = (p.get("ci95") or [None, None])[:2]
            parameters.append([f["id"], f["name"], p["name"], p["value"], p.get("stderr"),
                               low, high, bool(p.get("fixed"))])
        used.extend([f["id"], r] for r in f["run_ids"])
    if fmt == "csv":
        write_csv(path, parameters)
    else:
        write_xlsx(path, [("fits", summary), ("parameters", parameters), ("runs", used)])
    return {"entity": "fits", "path": str(path), "n_rows": len(parameters) - 1, "format": fmt,
            "warnings": []}


def flatten(value, prefix: str = "") -> list[tuple[str, object]]:
    """Nested dicts and lists as (dotted key, scalar) pairs: ``rules.0.speed_rps``."""
    if isinstance(value, dict):
        return [p for k, v in value.items() for p in flatten(v, f"{prefix}{k}.")]
    if isinstance(value, list) and value and not all(isinstance(v, (int, float)) for v in value):
        return [p for i, v in enumerate(value) for p in flatten(v, f"{prefix}{i}.")]
    return [(prefix[:-1], value)]


def _shown(key: str, value, si: bool) -> tuple[object, str]:
    kind = kind_of(key.rsplit(".", 1)[-1])
    if isinstance(value, bool) or not isinstance(value, (int, float, list)) or kind is None:
        return value, ""
    if si:
        return value, unit_label(kind, si=True)
    if isinstance(value, list):
        return [lab_value(v, kind) for v in value], unit_label(kind)
    return lab_value(value, kind), unit_label(kind)


def export_study(campaign, path: str | Path, key: str | int, *, si: bool = False) -> dict:
    """A saved study: JSON whole (SI, as saved); CSV key/value/unit rows in lab units or SI;
    XLSX those rows plus one sheet per table of the results (the rule comparison)."""
    fmt = file_format(path)
    study = campaign.study(study_name(campaign, key))
    if fmt == "json":
        write_json(path, {"study": study, **_stamp()})
        return {"entity": "study", "path": str(path), "n_rows": 1, "format": fmt,
                "warnings": []}
    head = {k: study[k] for k in ("id", "name", "kind", "fit_id", "package_version",
                                  "created_at")}
    pairs = [["key", "value", "unit"]]
    for section, data in (("study", head), ("inputs", study["inputs"]),
                          ("results", study["results"])):
        for k, v in flatten(data, f"{section}."):
            shown, unit = _shown(k, v, si)
            pairs.append([k, json.dumps(shown) if isinstance(shown, list) else shown, unit])
    if fmt == "csv":
        write_csv(path, pairs)
        return {"entity": "study", "path": str(path), "n_rows": len(pairs) - 1, "format": fmt,
                "warnings": []}
    sheets = [("study", pairs)]
    for name, table in study["results"].items():
        if isinstance(table, list) and table and all(isinstance(r, dict) for r in table):
            keys = list(dict.fromkeys(k for r in table for k in r))
            header = []
            for k in keys:
                unit = unit_label(kind_of(k), si)
                header.append(f"{base_name(k) if unit else k} [{unit}]" if unit else k)
            body = []
            for r in table:
                row = []
                for k in keys:
                    shown, _ = _shown(k, r.get(k), si)
                    row.append(json.dumps(shown) if isinstance(shown, (list, dict)) else shown)
                body.append(row)
            sheets.append((name, [header, *body]))
    write_xlsx(path, sheets)
    return {"entity": "study", "path": str(path), "n_rows": len(pairs) - 1, "format": fmt,
            "warnings": []}


def export_file(campaign, entity: str, path: str | Path, *, where: str | None = None,
                name: str | None = None, si: bool = False, units_row: bool = False,
                progress: Progress | None = None) -> dict:
    """Export ``entity`` (runs, vessels, fluxes, curves, fits, study) to ``path``."""
    if entity in TABLES:
        return export_table(campaign, entity, path, where, si=si, units_row=units_row,
                            progress=progress)
    if entity == "fits":
        return export_fits(campaign, path, name)
    if entity == "study":
        if name is None:
            raise InputError("which study? give its name or id", "study")
        return export_study(campaign, path, name, si=si)
    raise InputError(f'cannot export "{entity}"; choose one of {", ".join(ENTITIES)}',
                     "entity", entity)
