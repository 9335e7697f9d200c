"""The service layer: one open campaign and the operations people do with it.

The command line and the terminal app both call :class:`Campaign`, never the store, so both
validate the same way and write the same audit trail. Values come in as people type them
("600 rpm", "30 NL/min") or as SI numbers, and are validated against :mod:`scaleup.fields`
before anything is written; a record with several bad fields reports all of them at once.
"""

from __future__ import annotations

import getpass
import os
from collections.abc import Callable
from pathlib import Path
from typing import Any

from scaleup import fields as F
from scaleup.errors import InputError, MediumNotFound, RunNotFound, VesselNotFound
from scaleup.store import db, records
from scaleup.store.filters import compile_filter


def _actor() -> str:
    try:
        return os.environ.get("SCALEUP_USER") or getpass.getuser()
    except Exception:  # no user database in some containers
        return "unknown"


def validate(specs: tuple[F.Field, ...], values: dict[str, Any], *, partial: bool = False,
             known: dict | None = None, **context) -> dict[str, Any]:
    """Check every field of a record; return {column: SI value} or raise listing all errors.

    ``values`` may be keyed by column (``speed_rps``) or by label (``speed``); a number keyed
    by its column is taken as SI, text is read with its unit. Unknown keys are refused by
    name, so a typo is not silently dropped. ``known`` (kept by an importer for one file)
    holds the cells already read (:func:`scaleup.fields.read_known`).
    """
    by_key = _keys_of(specs)
    unknown = [k for k in values if k not in by_key]
    if unknown:
        raise InputError(f"unknown field(s) {', '.join(map(repr, unknown))}; known: "
                         f"{', '.join(s.label for s in specs)}")
    given, si_columns = {}, set()
    for k, v in values.items():
        column = by_key[k].column
        given[column] = v
        # a number keyed by its column name (tank_diameter_m) is already SI
        if k == column and isinstance(v, (int, float)) and not isinstance(v, bool):
            si_columns.add(k)
    clean, problems = {}, []
    for spec in specs:
        column = spec.column
        if column not in given:
            if partial:
                continue
            if spec.required:
                problems.append(f"{spec.label}: is required")
                continue
            if spec.default is not None:
                clean[column] = spec.default
            continue
        try:
            if known is None:
                clean[column] = F.read(spec, given[column], **context, si=column in si_columns)
            else:
                clean[column] = F.read_known(spec, given[column], known, context,
                                             column in si_columns)
        except InputError as exc:
            problems.append(str(exc))
    if problems:
        raise InputError("; ".join(problems))
    return clean


_KEYS: dict[int, tuple[tuple, dict]] = {}


def _keys_of(specs: tuple[F.Field, ...]) -> dict[str, F.Field]:
    """Every key a field may be given by (column, label, label with _ or -), built once per
    tuple of fields: an import validates each of its rows against the same tuple."""
    known = _KEYS.get(id(specs))
    if known is None or known[0] is not specs:
        if len(_KEYS) > 32:
            _KEYS.clear()
        known = _KEYS[id(specs)] = (specs, {s.column: s for s in specs} | {
            s.label: s for s in specs} | {s.label.replace(" ", "_"): s for s in specs} | {
            s.label.replace(" ", "-"): s for s in specs})
    return known[1]


def _basis(text: Any) -> str:
    s = str(text).strip().lower()
    if "vvm" in s:
        return "vvm"
    if "mol" in s:
        return "molar"
    if any(t in str(text) for t in ("NL", "Nm3", "Nm^3", "Nl")):
        return "normal"
    return "normal" if isinstance(text, (int, float)) else "actual"


def _looked_up(known: dict | None, kind: str, key: Any, look_up: Callable[[Any], Any]) -> Any:
    """``look_up(key)``, remembered in ``known`` when given (up to a bound); a failed look-up
    is not kept, so it is refused again with its message."""
    if known is None:
        return look_up(key)
    found = known.get((kind, key))
    if found is None:
        found = look_up(key)
        if len(known) < F.KNOWN_MAX:
            known[(kind, key)] = found
    return found


def liquid_volume(vessel: dict) -> float:
    """Liquid volume [m3] of a stored vessel: the stored one, or from height and bottom."""
    from scaleup.conditions import volume_for_height

    if vessel.get("working_volume_m3"):
        return vessel["working_volume_m3"]
    return volume_for_height(vessel["tank_diameter_m"], vessel["liquid_height_m"],
                             vessel.get("bottom_shape") or "flat")


def liquid_height(vessel: dict) -> float:
    """Liquid height [m] of a stored vessel: the stored one, or from volume and bottom."""
    from scaleup.conditions import height_for_volume

    if vessel.get("liquid_height_m"):
        return vessel["liquid_height_m"]
    return height_for_volume(vessel["tank_diameter_m"], vessel["working_volume_m3"],
                             vessel.get("bottom_shape") or "flat")


class Campaign:
    """An open campaign file.

    Use as a context manager, or call :meth:`close`.
    """

    def __init__(self, path: str | os.PathLike, *, create: bool = False,
                 actor: str | None = None):
        self.path = Path(path)
        self.conn = db.connect(self.path, create=create)
        self.actor = actor or _actor()

    @classmethod
    def create(cls, path: str | os.PathLike) -> Campaign:
        path = Path(path)
        if path.exists() and path.stat().st_size > 0:
            raise InputError(f"{path} already exists; choose another name", "path", str(path))
        return cls(path, create=True)

    def close(self) -> None:
        self.conn.close()

    def __enter__(self) -> Campaign:
        return self

    def __exit__(self, *exc) -> None:
        self.close()

    def transaction(self):
        return records.transaction(self.conn)

    def rows(self, sql: str, params: tuple | dict | list = ()) -> list[dict]:
        return records.rows(self.conn, sql, tuple(params) if isinstance(params, list)
                            else params)

    # ---- vessels -------------------------------------------------------------------------
    def add_vessel(self, values: dict[str, Any], impellers: list[dict] = (),
                   sparger: dict | None = None) -> int:
        """Add a vessel with its impellers (lowest first) and sparger; all or nothing."""
        clean = validate(F.VESSEL, values)
        if clean.get("liquid_height_m") is None and clean.get("working_volume_m3") is None:
            raise InputError("give the liquid height or the working volume", "vessel")
        clean = self._complete_geometry(clean)
        clean_impellers = [validate(F.IMPELLER, imp) for imp in impellers]
        self._check_impellers(clean, clean_impellers)
        clean_sparger = validate(F.SPARGER, sparger) if sparger else None
        with self.transaction():
            vessel_id = records.insert(self.conn, "vessel", clean, actor=self.actor)
            for position, imp in enumerate(clean_impellers, start=1):
                records.insert(self.conn, "impeller", {**imp, "vessel_id": vessel_id,
                                                       "position": position}, actor=self.actor)
            if clean_sparger:
                records.insert(self.conn, "sparger", {**clean_sparger, "vessel_id": vessel_id},
                               actor=self.actor)
        return vessel_id

    def _complete_geometry(self, clean: dict) -> dict:
        """Store both liquid height and volume so neither has to be recomputed on read."""
        if clean.get("liquid_height_m") is None:
            clean["liquid_height_m"] = liquid_height(clean)
        if clean.get("working_volume_m3") is None:
            clean["working_volume_m3"] = liquid_volume(clean)
        return clean

    @staticmethod
    def _check_impellers(vessel: dict, impellers: list[dict]) -> None:
        from scaleup.hydro.impellers import impeller_types

        known = impeller_types()
        for i, imp in enumerate(impellers, start=1):
            if imp["impeller_type"] not in known:
                raise InputError(f'"{imp["impeller_type"]}" is not a known impeller type; '
                                 f"known: {', '.join(known)}", f"impeller {i} type")
            if imp["impeller_diameter_m"] >= vessel["tank_diameter_m"]:
                raise InputError(f"{imp['impeller_diameter_m']:g} m is not smaller than the tank "
                                 f"diameter {vessel['tank_diameter_m']:g} m",
                                 f"impeller {i} diameter")
            if imp["clearance_m"] >= vessel["liquid_height_m"]:
                raise InputError(f"{imp['clearance_m']:g} m puts the impeller above the liquid "
                                 f"(liquid height {vessel['liquid_height_m']:.3g} m)",
                                 f"impeller {i} clearance")

    def _vessel_row(self, key: str | int, *, include_deleted: bool = False) -> dict:
        column = "id" if isinstance(key, int) or str(key).isdigit() else "name"
        found = self.rows(f"SELECT * FROM vessel WHERE {column} = ?", (key,))
        if not found or (found[0]["deleted_at"] and not include_deleted):
            names = [r["name"] for r in self.rows(
                "SELECT name FROM vessel WHERE deleted_at IS NULL ORDER BY name")]
            raise VesselNotFound(f"no vessel {key!r}" + (" (it is deleted)" if found else "")
                                 + f"; known vessels: {', '.join(names) or 'none'}")
        return found[0]

    def _vessel_and_volume(self, key: str | int) -> tuple[dict, float]:
        row = self._vessel_row(key)
        return row, liquid_volume(row)

    def vessel(self, key: str | int, *, include_deleted: bool = False) -> dict:
        """A vessel with its ``impellers`` (list, lowest first) and ``sparger`` (or None)."""
        row = self._vessel_row(key, include_deleted=include_deleted)
        row["impellers"] = self.rows("SELECT * FROM impeller WHERE vessel_id = ? ORDER BY "
                                     "position", (row["id"],))
        spargers = self.rows("SELECT * FROM sparger WHERE vessel_id = ?", (row["id"],))
        row["sparger"] = spargers[0] if spargers else None
        return row

    def vessels(self, *, include_deleted: bool = False) -> list[dict]:
        where = "" if include_deleted else "WHERE deleted_at IS NULL"
        return [self.vessel(r["id"], include_deleted=True)
                for r in self.rows(f"SELECT id FROM vessel {where} ORDER BY name")]

    def edit_vessel(self, key: str | int, changes: dict[str, Any], *,
                    expected_version: int | None = None) -> dict:
        row = self._vessel_row(key)
        clean = validate(F.VESSEL, changes, partial=True)
        merged = {**row, **clean}
        if "liquid_height_m" in clean and "working_volume_m3" not in clean:
            merged["working_volume_m3"] = None
            clean["working_volume_m3"] = liquid_volume(merged)
        elif "working_volume_m3" in clean and "liquid_height_m" not in clean:
            merged["liquid_height_m"] = None
            clean["liquid_height_m"] = liquid_height(merged)
        elif {"tank_diameter_m", "bottom_shape"} & set(clean):
            merged["working_volume_m3"] = None
            clean["working_volume_m3"] = liquid_volume(merged)
        return records.update(self.conn, "vessel", row["id"], clean,
                              expected_version=expected_version, actor=self.actor)

    def delete_vessel(self, key: str | int) -> dict:
        row = self._vessel_row(key)
        live = self.rows("SELECT count(*) AS n FROM run WHERE vessel_id = ? AND deleted_at IS "
                         "NULL", (row["id"],))[0]["n"]
        if live:
            raise InputError(f"vessel {row['name']} has {live} live run(s); delete them first",
                             "vessel")
        return records.soft_delete(self.conn, "vessel", row["id"], actor=self.actor)

    def restore_vessel(self, key: str | int) -> dict:
        row = self._vessel_row(key, include_deleted=True)
        return records.restore(self.conn, "vessel", row["id"], actor=self.actor)

    def set_impellers(self, key: str | int, impellers: list[dict], *,
                      expected_version: int | None = None) -> dict:
        """Replace the vessel's impellers (lowest first; an empty list leaves none); all or
        nothing. Returns the vessel as :meth:`vessel` does."""
        row = self._vessel_row(key)
        clean, problems = [], []
        for i, imp in enumerate(impellers, start=1):
            try:
                clean.append(validate(F.IMPELLER, imp))
            except InputError as exc:  # "clearance: ..." -> "impeller 2 clearance: ..."
                problems += [f"impeller {i} {p.removeprefix('impeller ')}"
                             for p in str(exc).split("; ")]
        if problems:
            raise InputError("; ".join(problems))
        self._check_impellers(row, clean)
        records.replace_children(
            self.conn, "impeller", row["id"],
            [{**imp, "position": i} for i, imp in enumerate(clean, start=1)],
            expected_version=expected_version, actor=self.actor)
        return self.vessel(row["id"])

    def set_sparger(self, key: str | int, sparger: dict | None, *,
                    expected_version: int | None = None) -> dict:
        """Replace the vessel's sparger (None removes it). Returns the vessel."""
        row = self._vessel_row(key)
        clean = [validate(F.SPARGER, sparger)] if sparger else []
        records.replace_children(self.conn, "sparger", row["id"], clean,
                                 expected_version=expected_version, actor=self.actor)
        return self.vessel(row["id"])

    def vessel_geometry(self, key: str | int):
        """The stored vessel as a hydro :class:`~scaleup.hydro.geometry.Vessel`."""
        from scaleup.conditions import vessel_from_row

        return vessel_from_row(self.vessel(key, include_deleted=True))

    # ---- media ---------------------------------------------------------------------------
    def add_medium(self, values: dict[str, Any], salts: dict[str, Any] | None = None) -> int:
        """Add a medium; ``salts`` maps a salt (e.g. NaCl) to its concentration ("0.5 mol/L")."""
        clean = validate(F.MEDIUM, values)
        clean_salts = self._clean_salts(salts or {})
        with self.transaction():
            medium_id = records.insert(self.conn, "medium", clean, actor=self.actor)
            for salt, value in clean_salts.items():
                records.insert(self.conn, "medium_salt", {"medium_id": medium_id, "salt": salt,
                                                          "concentration_mol_m3": value},
                               actor=self.actor)
        return medium_id

    @staticmethod
    def _clean_salts(salts: dict[str, Any]) -> dict[str, float]:
        """{salt: concentration as typed} -> {salt: mol/m3}, every problem named at once."""
        from scaleup import units

        clean, problems = {}, []
        for salt, conc in salts.items():
            try:
                value = units.parse(conc, "concentration", f"salt {salt}")
                if value < 0:
                    raise InputError(f'"{conc}" is negative', f"salt {salt}", conc)
                clean[salt.strip()] = value
            except InputError as exc:
                problems.append(str(exc))
        if problems:
            raise InputError("; ".join(problems))
        return clean

    def set_salts(self, key: str | int, salts: dict[str, Any], *,
                  expected_version: int | None = None) -> dict:
        """Replace the medium's dissolved salts ({"NaCl": "0.5 mol/L"}; {} leaves none).
        Returns the medium as :meth:`medium` does."""
        row = self._medium_row(key)
        clean = self._clean_salts(salts)
        records.replace_children(
            self.conn, "medium_salt", row["id"],
            [{"salt": salt, "concentration_mol_m3": value} for salt, value in clean.items()],
            expected_version=expected_version, actor=self.actor)
        return self.medium(row["id"])

    def _medium_row(self, key: str | int, *, include_deleted: bool = False) -> dict:
        column = "id" if isinstance(key, int) or str(key).isdigit() else "name"
        found = self.rows(f"SELECT * FROM medium WHERE {column} = ?", (key,))
        if not found or (found[0]["deleted_at"] and not include_deleted):
            names = [r["name"] for r in self.rows(
                "SELECT name FROM medium WHERE deleted_at IS NULL ORDER BY name")]
            raise MediumNotFound(f"no medium {key!r}" + (" (it is deleted)" if found else "")
                                 + f"; known media: {', '.join(names) or 'none'}")
        return found[0]

    def medium(self, key: str | int, *, include_deleted: bool = False) -> dict:
        row = self._medium_row(key, include_deleted=include_deleted)
        row["salts"] = {r["salt"]: r["concentration_mol_m3"] for r in self.rows(
            "SELECT salt, concentration_mol_m3 FROM medium_salt WHERE medium_id = ? ORDER BY salt",
            (row["id"],))}
        return row

    def media(self, *, include_deleted: bool = False) -> list[dict]:
        where = "" if include_deleted else "WHERE deleted_at IS NULL"
        return [self.medium(r["id"], include_deleted=True)
                for r in self.rows(f"SELECT id FROM medium {where} ORDER BY name")]

    def edit_medium(self, key: str | int, changes: dict[str, Any], *,
                    expected_version: int | None = None) -> dict:
        row = self._medium_row(key)
        clean = validate(F.MEDIUM, changes, partial=True)
        return records.update(self.conn, "medium", row["id"], clean,
                              expected_version=expected_version, actor=self.actor)

    def delete_medium(self, key: str | int) -> dict:
        row = self._medium_row(key)
        live = self.rows("SELECT count(*) AS n FROM run WHERE medium_id = ? AND deleted_at IS "
                         "NULL", (row["id"],))[0]["n"]
        if live:
            raise InputError(f"medium {row['name']} has {live} live run(s); delete them first",
                             "medium")
        return records.soft_delete(self.conn, "medium", row["id"], actor=self.actor)

    def restore_medium(self, key: str | int) -> dict:
        row = self._medium_row(key, include_deleted=True)
        return records.restore(self.conn, "medium", row["id"], actor=self.actor)

    # ---- runs ----------------------------------------------------------------------------
    def _clean_run(self, values: dict[str, Any], *, partial: bool = False,
                   current: dict | None = None, known: dict | None = None) -> dict:
        """A run's values checked and in SI. ``known`` (kept by an importer for one file)
        remembers the vessels, media and cells found, so each is looked up or read once."""
        values = dict(values)
        vessel_key = values.get("vessel", current["vessel_id"] if current else None)
        if vessel_key is None:
            raise InputError("is required", "vessel")
        vessel, volume = _looked_up(known, "vessel", vessel_key, self._vessel_and_volume)
        context = {"liquid_volume_m3": volume}
        gas_key = next((k for k in ("gas flow", "gas_flow", "gas-flow", "gas_flow_mol_s")
                        if k in values), None)
        temp_key = next((k for k in ("temperature", "temperature_k") if k in values), None)
        if temp_key is not None and gas_key is not None:
            from scaleup import units

            try:
                context["temperature_k"] = _looked_up(
                    known, "temperature", values[temp_key],
                    lambda text: units.parse(text, "temperature", "temperature"))
                context["pressure_pa"] = vessel["head_pressure_pa"]
            except InputError:
                pass  # reported with the other fields below
        clean = validate(F.RUN, values, partial=partial, known=known, **context)
        if "vessel" in clean:
            clean["vessel_id"] = vessel["id"]
            del clean["vessel"]
        if "medium" in clean:
            clean["medium_id"] = _looked_up(known, "medium", clean.pop("medium"),
                                            self._medium_row)["id"]
        if gas_key is not None:
            clean["gas_flow_basis"] = _basis(values[gas_key])
        kla = clean.get("kla_per_s", current.get("kla_per_s") if current else None)
        if kla is not None and not clean.get("kla_method") and not (current or {}).get(
                "kla_method"):
            clean["kla_method"] = "entered"
        return clean

    def add_run(self, values: dict[str, Any]) -> int:
        """Add one run (vessel and medium by name); returns its id."""
        clean = self._clean_run(values)
        return records.insert(self.conn, "run", clean, actor=self.actor)

    def run(self, run_id: int, *, include_deleted: bool = False) -> dict:
        found = self.rows("SELECT r.*, v.name AS vessel, m.name AS medium FROM run r JOIN vessel "
                          "v ON v.id = r.vessel_id JOIN medium m ON m.id = r.medium_id "
                          "WHERE r.id = ?", (run_id,))
        if not found or (found[0]["deleted_at"] and not include_deleted):
            raise RunNotFound(f"no run {run_id}" + (" (it is deleted; `run restore` brings it "
                                                    "back)" if found else ""))
        return found[0]

    def runs(self, where: str | None = None, *, order_by: str = "id", descending: bool = False,
             limit: int | None = None, offset: int = 0) -> list[dict]:
        """Live runs from the runs view, filtered by a safe filter expression."""
        sql, params = self._runs_sql(where, order_by, descending)
        if limit is not None:
            sql += " LIMIT ? OFFSET ?"
            params = [*params, int(limit), int(offset)]
        return records.read_rows(self.conn, sql, params)

    def count_runs(self, where: str | None = None) -> int:
        condition, params = compile_filter(where)
        return records.read_rows(self.conn, f"SELECT count(*) AS n FROM run_view WHERE "
                                 f"{condition}", params)[0]["n"]

    @staticmethod
    def _runs_sql(where, order_by, descending):
        from scaleup.store.filters import ALIASES, COLUMNS

        condition, params = compile_filter(where)
        column = ALIASES.get(order_by, order_by)
        if column not in COLUMNS:
            raise InputError(f'cannot sort by "{order_by}"; columns: {", ".join(COLUMNS)}',
                             "sort")
        direction = "DESC" if descending else "ASC"
        return (f"SELECT * FROM run_view WHERE {condition} ORDER BY {column} {direction}, id",
                params)

    def edit_run(self, run_id: int, changes: dict[str, Any], *,
                 expected_version: int | None = None) -> dict:
        current = self.run(run_id)
        clean = self._clean_run(changes, partial=True, current=current)
        return records.update(self.conn, "run", run_id, clean,
                              expected_version=expected_version, actor=self.actor)

    def delete_run(self, run_id: int) -> dict:
        self.run(run_id)
        return records.soft_delete(self.conn, "run", run_id, actor=self.actor)

    def restore_run(self, run_id: int) -> dict:
        self.run(run_id, include_deleted=True)
        return records.restore(self.conn, "run", run_id, actor=self.actor)

    def run_conditions(self, run_id: int, **options):
        """The run with its vessel, liquid properties and operating point (P/V, Pg/V, us,
        regime, blend time ...): a :class:`scaleup.conditions.RunConditions`."""
        from scaleup.conditions import run_conditions

        run = self.run(run_id, include_deleted=True)
        return run_conditions(run, self.vessel(run["vessel_id"], include_deleted=True),
                              self.medium(run["medium_id"], include_deleted=True), **options)

    @staticmethod
    def _selected_runs_sql(where: str | None, columns: str) -> tuple[str, list]:
        """SQL of ``columns`` of the live runs matching ``where`` (``r`` the run, ``v`` its
        vessel, ``m`` its medium), by id."""
        condition, params = compile_filter(where)
        return (f"SELECT {columns} FROM run r JOIN vessel v ON v.id = r.vessel_id JOIN medium m "
                f"ON m.id = r.medium_id WHERE r.id IN (SELECT id FROM run_view WHERE "
                f"{condition}) ORDER BY r.id", params)

    def run_records(self, where: str | None = None) -> list[dict]:
        """The stored records of the live runs matching ``where``, by id, each with its
        ``vessel`` and ``medium`` names and the medium's ``coalescence``: one query."""
        return records.read_rows(self.conn, *self._selected_runs_sql(
            where, "r.*, v.name AS vessel, m.name AS medium, m.coalescence AS coalescence"))

    def runs_derived_columns(self, where: str | None = None, **options) -> dict:
        """What a kLa fit reads of the runs matching ``where``, as columns (runs by id):
        :data:`scaleup.conditions.DERIVED_INPUTS`, ``kla_per_s``, ``kla_stderr_per_s``,
        ``vessel``, ``coalescence`` and the derived keys of :meth:`runs_derived`. No dict
        per run, so 100,000 runs take little memory."""
        from scaleup.conditions import DERIVED_INPUTS, derived_columns

        columns = records.read_columns(self.conn, *self._selected_runs_sql(
            where, ", ".join(f"r.{k}" for k in DERIVED_INPUTS) + ", r.kla_per_s, "
            "r.kla_stderr_per_s, v.name AS vessel, m.coalescence AS coalescence"))
        vessels = {v["id"]: v for v in self.vessels(include_deleted=True)}
        media = {m["id"]: m for m in self.media(include_deleted=True)}
        return {**columns, **derived_columns(columns, vessels, media, **options)}

    def runs_derived(self, where: str | None = None, **options) -> list[dict]:
        """Runs of the runs view with their derived hydrodynamics (``power_per_volume_w_m3``,
        ``gassed_power_per_volume_w_m3``, ``superficial_gas_velocity_m_s``, ``vvm``,
        ``flow_number``, ``regime``, ``tip_speed_m_s``, ``blend_time_95_s``, ...)."""
        from scaleup.conditions import derived_table

        runs = self.run_records(where)
        vessels = {v["id"]: v for v in self.vessels(include_deleted=True)}
        media = {m["id"]: m for m in self.media(include_deleted=True)}
        return derived_table(runs, vessels, media, **options)

    # ---- curves --------------------------------------------------------------------------
    def add_curve(self, run_id: int, time_s, do_values, do_unit: str, *,
                  kind: str = "gassing-out", probe_tau_s: float | None = None,
                  gas_on_s: float | None = None, notes: str = "") -> int:
        """Store a DO curve of a run as measured (samples as float64 arrays)."""
        import numpy as np

        self.run(run_id)
        t = np.ascontiguousarray(time_s, dtype="<f8")
        c = np.ascontiguousarray(do_values, dtype="<f8")
        if t.shape != c.shape or t.ndim != 1:
            raise InputError(f"time ({t.size}) and DO ({c.size}) need the same number of "
                             "samples", "curve")
        if do_unit not in ("mol/m3", "mg/L", "%"):
            raise InputError(f'"{do_unit}" is not one of mol/m3, mg/L, %', "DO unit")
        return records.insert(self.conn, "curve", {
            "run_id": run_id, "kind": kind, "n_samples": int(t.size), "time_s": t.tobytes(),
            "do_values": c.tobytes(), "do_unit": do_unit, "probe_tau_s": probe_tau_s,
            "gas_on_s": gas_on_s, "notes": notes}, actor=self.actor)

    def curve(self, curve_id: int) -> dict:
        """A stored curve with its samples as numpy arrays ``time_s`` and ``do_values``."""
        import numpy as np

        row = records.get(self.conn, "curve", curve_id)
        row["time_s"] = np.frombuffer(row["time_s"], dtype="<f8")
        row["do_values"] = np.frombuffer(row["do_values"], dtype="<f8")
        return row

    def curves(self, run_id: int | None = None) -> list[dict]:
        """Curves (without samples) of one run, or of the whole campaign."""
        sql = ("SELECT id, run_id, kind, n_samples, do_unit, probe_tau_s, gas_on_s, window_low, "
               "window_high, fit_method, kla_per_s, kla_stderr_per_s, analysed_at FROM curve "
               "WHERE deleted_at IS NULL")
        if run_id is not None:
            return self.rows(sql + " AND run_id = ? ORDER BY id", (run_id,))
        return self.rows(sql + " ORDER BY id")

    def preview_curve(self, curve_id: int, *, window: tuple[float, float] | None = None,
                      tau_p_s: float | None = None, method: str = "nonlinear"):
        """Analyse one stored gassing-out curve and store nothing: a
        :class:`scaleup.measure.curves.CurveAnalysis`, for trying windows before accepting
        one with :meth:`analyse_curves`. Raises ``CurveRejected`` when it gives no kLa."""
        from scaleup.measure.curves import DEFAULT_WINDOW, analyse_curve

        row = self.curve(curve_id)
        stored = (row["window_low"], row["window_high"])
        return analyse_curve(
            row["time_s"], row["do_values"],
            tau_p_s=tau_p_s if tau_p_s is not None else (row["probe_tau_s"] or 0.0),
            window=window or (stored if None not in stored else DEFAULT_WINDOW),
            start_s=row["gas_on_s"], method=method,
            c_star=100.0 if row["do_unit"] == "%" else None)

    def analyse_curves(self, curve_ids: list[int] | None = None, *,
                       run_ids: list[int] | None = None, **options) -> list[dict]:
        """Analyse stored curves (all live ones when no ids are given), keep each result with
        its curve and set each run's kLa from its curves; one transaction. ``options``:
        ``window``, ``tau_p_s``, ``method``, ``progress`` (see
        :func:`scaleup.measure.stored.analyse_stored`)."""
        from scaleup.measure.stored import analyse_stored, run_kla

        sql = ("SELECT id, run_id, kind, n_samples, time_s, do_values, do_unit, probe_tau_s, "
               "gas_on_s, window_low, window_high FROM curve WHERE deleted_at IS NULL")
        params: list = []
        for column, ids in (("id", curve_ids), ("run_id", run_ids)):
            if ids is not None:
                sql += f" AND {column} IN ({', '.join('?' for _ in ids)})"
                params += [int(i) for i in ids]
        stored = self.rows(sql + " ORDER BY id", params)
        if curve_ids is not None and len(stored) < len(set(curve_ids)):
            missing = sorted(set(map(int, curve_ids)) - {r["id"] for r in stored})
            raise InputError(f"no live curve {', '.join(map(str, missing))}", "curve")
        results, changes = analyse_stored(stored, **options)
        with self.transaction():
            for curve_id, values in changes.items():
                records.update(self.conn, "curve", curve_id, values, actor=self.actor)
            for run_id in sorted({r["run_id"] for r in stored}):
                live = self.rows("SELECT kind, kla_per_s, kla_stderr_per_s FROM curve WHERE "
                                 "run_id = ? AND deleted_at IS NULL", (run_id,))
                values = run_kla(live)
                if values:
                    records.update(self.conn, "run", run_id, values, actor=self.actor)
        return results

    # ---- flux measurements ---------------------------------------------------------------
    def add_flux(self, values: dict[str, Any], run_id: int | None = None) -> int:
        """Store one mass-flux measurement (solute, area, flux, concentrations, length, velocity)."""
        clean = validate(F.FLUX, values)
        if clean["c_interface_mol_m3"] == clean["c_bulk_mol_m3"]:
            raise InputError("the interface and bulk concentrations are equal: no driving "
                             "force, so no mass-transfer coefficient", "bulk concentration")
        if run_id is not None:
            self.run(run_id)
            clean["run_id"] = run_id
        return records.insert(self.conn, "flux", clean, actor=self.actor)

    def fluxes(self) -> list[dict]:
        return self.rows("SELECT * FROM flux WHERE deleted_at IS NULL ORDER BY id")

    # ---- correlations (fitting in scaleup.correlate) -------------------------------------
    def fit_kla(self, where: str | None = None, *, bootstrap: int = 0,
                bootstrap_kind: str = "runs", **options):
        """Fit kLa to the selected runs (options of :func:`scaleup.correlate.fit_kla`);
        returns a :class:`scaleup.correlate.FitReport` with leave-one-vessel-out."""
        from scaleup.correlate import fit_kla, kla_observations_from_columns, report_fit

        data, skipped = kla_observations_from_columns(self.runs_derived_columns(where))
        return report_fit(fit_kla(data, **options), data, bootstrap=bootstrap,
                          bootstrap_kind=bootstrap_kind, selection=where or "", skipped=skipped)

    def fit_sherwood(self, solute: str | None = None, *, bootstrap: int = 0,
                     bootstrap_kind: str = "runs", **options):
        """Fit a Sherwood correlation to the flux measurements (of one solute)."""
        from scaleup.correlate import fit_sherwood, report_fit, sherwood_observations_from_fluxes
        from scaleup.props.diffusivity import diffusivity
        from scaleup.props.water import liquid_properties

        rows = self.rows("SELECT f.*, v.name AS vessel FROM flux f LEFT JOIN run r ON r.id = "
                         "f.run_id LEFT JOIN vessel v ON v.id = r.vessel_id WHERE f.deleted_at "
                         "IS NULL AND (? IS NULL OR f.solute = ?) ORDER BY f.id", (solute, solute))
        filled = []
        for row in rows:  # properties not stored with a flux are those of water at its T
            water = liquid_properties(row["temperature_k"])
            gaps = [k for k in ("density_kg_m3", "viscosity_pa_s") if row[k] is None]
            for key in gaps:
                row[key] = getattr(water, key)
            if row["diffusivity_m2_s"] is None:
                row["diffusivity_m2_s"] = float(diffusivity(row["solute"], "water",
                                                            row["temperature_k"]))
                gaps.append(f"diffusivity of {row['solute']}")
            if gaps:
                filled.append(row["id"])
        notes = [f"flux {', '.join(map(str, filled))}: missing liquid properties taken as "
                 "water's at the measurement temperature"] if filled else []
        data, skipped = sherwood_observations_from_fluxes(rows)
        return report_fit(fit_sherwood(data, **options), data, bootstrap=bootstrap,
                          bootstrap_kind=bootstrap_kind, selection=solute or "",
                          skipped=skipped, notes=notes)

    def save_fit(self, name: str, report) -> int:
        """Store a :class:`scaleup.correlate.FitReport` under ``name``; returns its id."""
        import json

        name = (name or "").strip()
        if self.rows("SELECT id FROM fit WHERE name = ?", (name,)):
            raise InputError(f'a fit named "{name}" exists; choose another name', "name", name)
        result = report.result
        with self.transaction():
            fit_id = records.insert(self.conn, "fit", {
                "name": name, "kind": report.kind, "form": result.form.kind,
                "method": result.method if result.robust is None else f"robust-{result.robust}",
                "weights": result.weights, "selection": report.selection,
                "model_json": json.dumps(report.stored()),
                "package_version": result.package_version}, actor=self.actor)
            if report.kind == "kla":  # fit_run marks the fit stale when one of its runs changes
                self.conn.executemany("INSERT INTO fit_run (fit_id, run_id) VALUES (?, ?)",
                                      [(fit_id, int(r)) for r in result.run_ids])
        return fit_id

    def load_fit(self, name: str):
        """A saved fit: (:class:`scaleup.correlate.FitResult`, its row with ``stale``)."""
        import json

        from scaleup.correlate import FitResult
        from scaleup.errors import NotFound

        found = self.rows("SELECT * FROM fit WHERE name = ? AND deleted_at IS NULL", (name,))
        if not found:
            known = ", ".join(f["name"] for f in self.fits()) or "none saved yet"
            raise NotFound(f'no fit named "{name}" (saved fits: {known})')
        return FitResult.from_dict(json.loads(found[0]["model_json"])), found[0]

    def fits(self) -> list[dict]:
        """Saved fits (without their model), oldest first."""
        return self.rows("SELECT id, name, kind, form, method, weights, selection, stale, "
                         "package_version, created_at FROM fit WHERE deleted_at IS NULL "
                         "ORDER BY id")

    def compare(self, fits: dict, published: list[str], where: str | None = None):
        """Fitted (name -> FitResult) and published kLa correlations on the selected runs:
        (comparison rows, warnings)."""
        from scaleup.correlate import (
            compare_correlations,
            kla_observations_from_columns,
            published_correlation,
        )

        data, skipped = kla_observations_from_columns(self.runs_derived_columns(where))
        models = {**fits, **{key: published_correlation(key) for key in published}}
        warnings = [f"{len(skipped)} run(s) without kLa or operating point left out"] \
            if skipped else []
        return compare_correlations(models, data), warnings

    # ---- files ---------------------------------------------------------------------------
    def import_runs(self, path, **options) -> dict:
        from scaleup.store.importers import import_runs

        return import_runs(self, path, **options)

    def export_runs(self, path, where: str | None = None, *, si: bool = False) -> int:
        from scaleup.store.exporters import export_runs

        return export_runs(self, path, where, si=si)

    def import_file(self, entity: str, path, **options) -> dict:
        """Import runs, vessels, fluxes or curves from CSV, XLSX or JSON: every row checked,
        then all or nothing (see :mod:`scaleup.store.importers`)."""
        from scaleup.store.importers import import_file

        return import_file(self, entity, path, **options)

    def export_file(self, entity: str, path, **options) -> dict:
        """Export runs, vessels, fluxes, curves, fits or a study (see
        :mod:`scaleup.store.exporters`)."""
        from scaleup.store.exporters import export_file

        return export_file(self, entity, path, **options)

    def write_report(self, study: str | int, path, fmt: str | None = None) -> dict:
        """Write the design-review report of a saved study (HTML or Markdown)."""
        from scaleup.report import write_report

        return write_report(self, study, path, fmt)

    @staticmethod
    def write_template(entity: str, path, **options) -> list[Path]:
        """Write an empty import template (CSV or XLSX) with its column documentation."""
        from scaleup.store.templates import write_template

        return write_template(entity, path, **options)

    def load_demo(self) -> dict:
        """Fill an empty campaign with the invented demo campaign shipped with the package."""
        from scaleup.store.demo import load_demo

        return load_demo(self)

    # ---- history -------------------------------------------------------------------------
    def history(self, table: str | None = None, record_id: int | None = None,
                limit: int = 50) -> list[dict]:
        sql, params = "SELECT * FROM audit_log WHERE 1", []
        if table:
            sql += " AND table_name = ?"
            params.append(table)
        if record_id is not None:
            sql += " AND record_id = ?"
            params.append(record_id)
        return self.rows(sql + " ORDER BY id DESC LIMIT ?", [*params, limit])

    def undo(self) -> dict:
        """Undo the newest change made by this user: an edit, a delete, a restore or an add."""
        import json

        last = records.last_change(self.conn, self.actor)
        if last is None:
            raise InputError("there is nothing to undo")
        table, record_id, action = last["table_name"], last["record_id"], last["action"]
        with self.transaction():
            records.unchanged_since(self.conn, last)  # never undo over someone else's edit
            if action == "update":
                old = json.loads(last["old_json"])
                replaced = [t for t, (parent, _) in records.CHILDREN.items()
                            if parent == table and t in old]
                editable = {k: v for k, v in old.items()
                            if k not in ("id", "row_version", "created_at", "updated_at",
                                         "deleted_at", *records.CHILDREN)}
                if replaced:  # impellers, sparger or salts were replaced: put the old back
                    child = replaced[0]
                    key = records.CHILDREN[child][1]
                    records.replace_children(
                        self.conn, child, record_id,
                        [{k: v for k, v in r.items() if k not in ("id", key)}
                         for r in old[child]], actor=self.actor)
                else:
                    records.update(self.conn, table, record_id, editable, actor=self.actor)
            elif action == "delete":
                records.restore(self.conn, table, record_id, actor=self.actor)
            elif action == "restore":
                records.soft_delete(self.conn, table, record_id, actor=self.actor)
            elif action == "insert" and table in records.VERSIONED:
                records.soft_delete(self.conn, table, record_id, actor=self.actor)
            else:
                raise InputError(f"the last change ({action} of {table} {record_id}) cannot be "
                                 "undone here")
        return {"table": table, "record_id": record_id, "undid": action}

    # ---- scale-up studies (the engine is scaleup.scaling; here: names to objects) --------
    def kla_model(self, correlation: str | None, coalescence: str = "coalescing"):
        """(KlaModel, fit id): a saved fit by name, else a published key, else van't Riet."""
        from scaleup.errors import NotFound
        from scaleup.scaling.correlation import KlaModel, default_published

        if correlation is None:
            return KlaModel.from_published(default_published(coalescence)), None
        try:
            fit, row = self.load_fit(correlation)
        except NotFound:
            return KlaModel.from_published(correlation), None
        return KlaModel.from_fit(fit, correlation), row["id"]

    def scale_pilot(self, *, run_id: int | None = None, vessel: str | None = None,
                    speed: Any = None, gas_flow: Any = None, temperature: Any = "30 degC",
                    medium: str | None = None):
        """(PilotPoint, Liquid) of a stored run, or of a stored vessel at a speed and gas flow
        (text with units or SI), with water at the temperature unless a medium is named."""
        from scaleup import units
        from scaleup.conditions import liquid_for, vessel_from_row
        from scaleup.scaling.evaluate import Liquid
        from scaleup.scaling.rules import PilotPoint

        if run_id is not None:
            rc = self.run_conditions(run_id)
            med = self.medium(rc.run["medium_id"], include_deleted=True)
            liquid = Liquid(rc.run["temperature_k"], rc.liquid.density_kg_m3,
                            rc.liquid.viscosity_pa_s, rc.liquid.surface_tension_n_m,
                            med["coalescence"], tuple(med["salts"].items()))
            return PilotPoint(rc.vessel, rc.run["speed_rps"], rc.run["gas_flow_mol_s"],
                              rc.run.get("kla_per_s"), f"run {run_id}"), liquid
        if vessel is None or speed is None or gas_flow is None:
            raise InputError("give a run, or a vessel with a speed and a gas flow", "pilot")
        v = vessel_from_row(self.vessel(vessel))
        t = units.parse(temperature, "temperature", "temperature")
        med = self.medium(medium) if medium else {"coalescence": "coalescing", "salts": {}}
        props = liquid_for(med, t, v.head_pressure)
        liquid = Liquid(t, props.density_kg_m3, props.viscosity_pa_s, props.surface_tension_n_m,
                        med["coalescence"], tuple(med["salts"].items()))
        n = units.parse(speed, "speed", "speed")
        flow = units.parse(gas_flow, "gas_flow", "gas flow", liquid_volume_m3=v.volume,
                           temperature_k=t, pressure_pa=v.head_pressure)
        return PilotPoint(v, n, flow, None, f"vessel {vessel}"), liquid

    def scale_study(self, pilot: dict, *, to_volume: float | None = None,
                    to_vessel: str | None = None, correlation: str | None = None,
                    save: str | None = None, **options) -> dict:
        """Compare the scale-up rules from a pilot (:meth:`scale_pilot` arguments) to a
        volume (geometrically similar, m3) or a stored vessel; ``options`` go to
        :func:`scaleup.scaling.study.scale_study` (process, limits, rules, gas_rule)."""
        from scaleup.conditions import vessel_from_row
        from scaleup.hydro.geometry import scale_to_volume
        from scaleup.scaling import study

        point, liquid = self.scale_pilot(**pilot)
        if (to_volume is None) == (to_vessel is None):
            raise InputError("give exactly one of a target volume and a target vessel", "target")
        target = (scale_to_volume(point.vessel, to_volume) if to_vessel is None
                  else vessel_from_row(self.vessel(to_vessel)))
        model, fit_id = self.kla_model(correlation, liquid.coalescence)
        inputs, results = study.scale_study(point, target, liquid, model=model, **options)
        inputs["pilot_source"] = {k: v for k, v in pilot.items() if v is not None}
        if save:
            results["study_id"] = self.save_study(save, "scale", inputs, results, fit_id)
        return results

    def design_study(self, *, vessel: Any, liquid, correlation: str | None = None,
                     save: str | None = None, **options) -> dict:
        """Duty-driven design of a vessel (a stored name or a hydro Vessel) for a broth;
        ``options`` go to :func:`scaleup.scaling.study.design_study`."""
        from scaleup.conditions import vessel_from_row
        from scaleup.scaling import study

        v = vessel_from_row(self.vessel(vessel)) if isinstance(vessel, (str, int)) else vessel
        model, fit_id = self.kla_model(correlation, liquid.coalescence)
        inputs, results = study.design_study(v, liquid, model=model, **options)
        if save:
            results["study_id"] = self.save_study(save, "design", inputs, results, fit_id)
        return results

    def save_study(self, name: str, kind: str, inputs: dict, results: dict,
                   fit_id: int | None = None) -> int:
        """Save a study with all its inputs; returns its id."""
        import json

        from scaleup.scaling.study import package_version, plain

        if self.rows("SELECT id FROM study WHERE name = ? AND deleted_at IS NULL", (name,)):
            raise InputError(f"a study named {name!r} exists; choose another name", "name", name)
        values = {"name": name, "kind": kind,
                  "inputs_json": json.dumps(plain(inputs), allow_nan=False),
                  "results_json": json.dumps(plain(results), allow_nan=False),
                  "fit_id": fit_id, "package_version": package_version()}
        with self.transaction():
            return records.insert(self.conn, "study", values, actor=self.actor)

    def study(self, name: str) -> dict:
        """A saved study with its ``inputs`` and ``results`` decoded."""
        import json

        found = self.rows("SELECT * FROM study WHERE name = ? AND deleted_at IS NULL", (name,))
        if not found:
            raise InputError(f"no study {name!r}", "study", name)
        row = found[0]
        row["inputs"] = json.loads(row.pop("inputs_json"))
        row["results"] = json.loads(row.pop("results_json"))
        return row

    # ---- overview ------------------------------------------------------------------------
    def summary(self) -> dict:
        count = lambda t: self.rows(f"SELECT count(*) AS n FROM {t} WHERE deleted_at IS NULL")[0]["n"]  # noqa: E731
        return {"path": str(self.path), "schema_version": db.schema_version(),
                "vessels": count("vessel"), "media": count("medium"), "runs": count("run"),
                "curves": count("curve"), "fluxes": count("flux"), "fits": count("fit"),
                "studies": count("study")}

    def check(self) -> dict:
        return db.check(self.conn)

    def backup(self, target: str | os.PathLike) -> Path:
        target = Path(target)
        if target.exists():
            raise InputError(f"{target} already exists; choose a new file name", "backup")
        return db.backup(self.conn, target)
