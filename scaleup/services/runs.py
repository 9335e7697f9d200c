"""Pilot runs: add, read, filter, edit, delete, and their derived hydrodynamics."""

from __future__ import annotations

from typing import Any

from scaleup import fields as F
from scaleup.errors import InputError, RunNotFound
from scaleup.services.validation import _basis, _looked_up, validate
from scaleup.store import records
from scaleup.store.filters import compile_filter


class RunService:
    """Part of :class:`scaleup.campaign.Campaign` (see there); needs ``self.conn``, ``self.actor``."""

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
