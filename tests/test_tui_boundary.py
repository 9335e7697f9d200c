"""The pure layers and the store never pull in the terminal toolkit."""

from __future__ import annotations

import subprocess
import sys

LAYERS = ["scaleup.units", "scaleup.fields", "scaleup.campaign", "scaleup.conditions",
          "scaleup.store.db", "scaleup.store.records", "scaleup.store.filters",
          "scaleup.store.importers", "scaleup.store.exporters", "scaleup.props.water",
          "scaleup.props.solubility", "scaleup.props.diffusivity", "scaleup.props.transport",
          "scaleup.hydro.point", "scaleup.measure.curves", "scaleup.measure.stored",
          "scaleup.correlate", "scaleup.scaling.study", "scaleup.scaling.design"]


def test_pure_layers_and_store_import_without_textual_or_rich():
    code = ("import sys, importlib\n"
            f"for name in {LAYERS!r}:\n"
            "    importlib.import_module(name)\n"
            "bad = sorted(m for m in sys.modules if m.split('.')[0] in ('textual', 'rich'))\n"
            "print(','.join(bad))\n")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         timeout=120, check=True)
    assert out.stdout.strip() == "", f"imported: {out.stdout.strip()}"


def test_workbench_module_imports_no_screen_until_shown():
    code = ("import sys\n"
            "import scaleup.tui.app\n"
            "print(','.join(sorted(m for m in sys.modules if m.startswith('scaleup.tui.screens.')"
            " or m.split('.')[0] in ('textual_plotext', 'scipy', 'pandas'))))\n")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         timeout=120, check=True)
    assert out.stdout.strip() == "", f"imported at start: {out.stdout.strip()}"
