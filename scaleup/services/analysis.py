"""Correlation fits and scale-up studies: names in the campaign to the pure engines."""

from __future__ import annotations

from typing import Any

from scaleup.errors import InputError
from scaleup.store import records


class AnalysisService:
    """Part of :class:`scaleup.campaign.Campaign` (see there); needs ``self.conn``, ``self.actor``."""

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
