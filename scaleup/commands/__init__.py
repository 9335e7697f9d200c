"""Command modules of the ``scaleup`` CLI, one per area, registered in :mod:`scaleup.cli`."""
