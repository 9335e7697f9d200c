"""Import, export, templates, the report and the demo campaign."""

from __future__ import annotations

from pathlib import Path


class FileService:
    """Part of :class:`scaleup.campaign.Campaign` (see there); needs ``self.conn``, ``self.actor``."""

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
