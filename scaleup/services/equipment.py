"""Vessels (geometry, impellers, sparger, jacket) and media (properties, salts)."""

from __future__ import annotations

from typing import Any

from scaleup import fields as F
from scaleup.errors import InputError, MediumNotFound, VesselNotFound
from scaleup.services.validation import liquid_height, liquid_volume, validate
from scaleup.store import records


class EquipmentService:
    """Part of :class:`scaleup.campaign.Campaign` (see there); needs ``self.conn``, ``self.actor``."""

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

    def _delete_unused(self, table: str, row: dict) -> dict:
        """Soft-delete a vessel or medium that no live run uses."""
        live = self.rows(f"SELECT count(*) AS n FROM run WHERE {table}_id = ? AND deleted_at IS "
                         "NULL", (row["id"],))[0]["n"]
        if live:
            raise InputError(f"{table} {row['name']} has {live} live run(s); delete them first",
                             table)
        return records.soft_delete(self.conn, table, row["id"], actor=self.actor)

    def delete_vessel(self, key: str | int) -> dict:
        return self._delete_unused("vessel", self._vessel_row(key))

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
        return self._delete_unused("medium", self._medium_row(key))

    def restore_medium(self, key: str | int) -> dict:
        row = self._medium_row(key, include_deleted=True)
        return records.restore(self.conn, "medium", row["id"], actor=self.actor)
