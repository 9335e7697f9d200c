"""DO curves and their analysis, and mass-flux measurements."""

from __future__ import annotations

from typing import Any

from scaleup import fields as F
from scaleup.errors import InputError
from scaleup.services.validation import validate
from scaleup.store import records


class MeasurementService:
    """Part of :class:`scaleup.campaign.Campaign` (see there); needs ``self.conn``, ``self.actor``."""

    CURVE_CHUNK = 1000  # curves whose samples are in memory at once during an analysis

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

        sql = "SELECT id, run_id FROM curve WHERE deleted_at IS NULL"
        params: list = []
        for column, ids in (("id", curve_ids), ("run_id", run_ids)):
            if ids is not None:
                sql += f" AND {column} IN ({', '.join('?' for _ in ids)})"
                params += [int(i) for i in ids]
        chosen = self.rows(sql + " ORDER BY id", params)
        if curve_ids is not None and len(chosen) < len(set(curve_ids)):
            missing = sorted(set(map(int, curve_ids)) - {r["id"] for r in chosen})
            raise InputError(f"no live curve {', '.join(map(str, missing))}", "curve")
        # samples are read a chunk of curves at a time, so a campaign of 10,000 long curves
        # does not sit in memory at once; the results are written in one transaction
        progress = options.pop("progress", None)
        results, changes, total = [], {}, len(chosen)
        for start in range(0, total, self.CURVE_CHUNK):
            ids = [r["id"] for r in chosen[start:start + self.CURVE_CHUNK]]
            stored = self.rows(
                "SELECT id, run_id, kind, n_samples, time_s, do_values, do_unit, probe_tau_s, "
                "gas_on_s, window_low, window_high FROM curve WHERE id IN "
                f"({', '.join('?' for _ in ids)}) ORDER BY id", ids)
            offset = start
            chunk_results, chunk_changes = analyse_stored(
                stored, **options,
                progress=None if progress is None else
                (lambda done, _n, offset=offset: progress(offset + done, total)))
            results += chunk_results
            changes.update(chunk_changes)
            del stored
        with self.transaction():
            records.update_many(self.conn, "curve", changes, actor=self.actor)
            run_ids = sorted({r["run_id"] for r in chosen if r["run_id"] is not None})
            by_run: dict[int, list[dict]] = {i: [] for i in run_ids}
            for start in range(0, len(run_ids), 500):
                part = run_ids[start:start + 500]
                for row in self.rows(
                        "SELECT run_id, kind, kla_per_s, kla_stderr_per_s FROM curve WHERE "
                        f"deleted_at IS NULL AND run_id IN ({', '.join('?' for _ in part)}) "
                        "ORDER BY run_id, id", part):
                    by_run[row["run_id"]].append(row)
            run_changes = {run_id: values for run_id, live in by_run.items()
                           if (values := run_kla(live))}
            records.update_many(self.conn, "run", run_changes, actor=self.actor)
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
