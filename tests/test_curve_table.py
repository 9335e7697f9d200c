"""Reading curve tables: `name [unit]` headers, column choice, units, bad cells."""

from __future__ import annotations

import math

import numpy as np
import pytest

from scaleup.errors import ImportRejected, InputError
from scaleup.measure.curve_table import read_curve_rows, split_header
from scaleup.units import M_O2


def test_units_are_read_from_the_header():
    tab = read_curve_rows([["time [min]", "temp [degC]", "DO [mg/L]"],
                           ["0", "30", "0.5"], ["1.5", "30", "4.0"]])
    assert tab.time_s.tolist() == [0.0, 90.0]
    assert tab.unit == "mg/L" and tab.do_column == "DO [mg/L]"
    assert tab.to_mol_m3 == pytest.approx(1e-3 / M_O2)
    pct = read_curve_rows([["t [s]", "DO [%]"], ["0", "5"]])
    assert pct.is_percent and pct.to_mol_m3 is None


def test_columns_can_be_chosen_by_name_and_gaps_are_nan():
    tab = read_curve_rows([["t [s]", "probe A [%]", "probe B [%]"], ["0", "1", "2"],
                           ["1", "", "3"], ["2", "NaN", "n/a"]], do_col="probe B")
    assert tab.values[:2].tolist() == [2.0, 3.0] and math.isnan(tab.values[2])
    assert np.isnan(read_curve_rows([["t [s]", "probe A [%]"], ["0", ""]]).values).all()


def test_bad_cells_are_all_listed_with_rows():
    with pytest.raises(ImportRejected) as info:
        read_curve_rows([["t [s]", "DO [%]"], ["0", "1,5"], ["1", "abc"]], source="x.csv")
    rows = [p["row"] for p in info.value.problems]
    assert rows == [2, 3]
    assert "decimal separator" in info.value.problems[0]["reason"]


@pytest.mark.parametrize("rows,words", [
    ([], "empty"),
    ([["a", "b"], ["1", "2"]], "no time column"),
    ([["t [s]", "DO [kg]"], ["1", "2"]], "not a DO unit"),
    ([["t [s]", "x [kg]"], ["1", "2"]], "no DO column"),
    ([["t [s]", "DO [%]"]], None),
])
def test_unusable_tables_say_why(rows, words):
    if words is None:
        assert read_curve_rows(rows).time_s.size == 0
        return
    with pytest.raises(InputError, match=words):
        read_curve_rows(rows)


def test_header_cells_split_into_name_and_unit():
    assert split_header("DO [mg/L]") == ("DO", "mg/L")
    assert split_header("t") == ("t", "")
