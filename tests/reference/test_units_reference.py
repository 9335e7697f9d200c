"""Unit conversions against their defining standards."""

from __future__ import annotations

import pytest

from scaleup import units


def test_molar_volume_at_normal_conditions():
    # CODATA 2018: molar volume of an ideal gas at 273.15 K and 101.325 kPa is
    # 22.41396954 L/mol (exact given the defined R, NIST reference on constants).
    assert 1000.0 / units.MOL_PER_NORMAL_M3 == pytest.approx(22.41396954, rel=1e-9)


def test_definitions():
    # SI Brochure (BIPM 2019): 1 bar = 1e5 Pa; standard atmosphere = 101325 Pa;
    # 0 degC = 273.15 K; standard gravity 9.80665 m/s2 (CGPM 1901).
    assert units.parse("1 bara", "pressure") == 1e5
    assert units.parse("1 atm", "pressure") == pytest.approx(101325.0)
    assert units.parse("0 degC", "temperature") == pytest.approx(273.15)
    assert units.G == 9.80665
    # 1 psi = 6894.757 Pa (NIST SP 811, appendix B.8), so 14.696 psia ~ 1 atm
    assert units.parse("14.696 psia", "pressure") == pytest.approx(101325.0, rel=1e-4)
