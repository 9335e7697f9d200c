"""scaleup: a terminal workbench for scaling stirred gas-liquid vessels from pilot to production."""

__version__ = "0.1.0"
