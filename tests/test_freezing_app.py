"""The freezing-range materials panel on the page (AppTest): a pasted enthalpy table is added through the
setter; a refused table shows its message with its address and changes nothing."""
from __future__ import annotations

from pathlib import Path

import pytest
from streamlit.testing.v1 import AppTest

from heatbalance.errors import InputError
from webapp.common import plain
from webapp.freezing_panel import parse_table

APP = str(Path(__file__).resolve().parent.parent / "app.py")
ROWS = "-30, 0\n-5; 60\n-1\t220\n20 280"


def _fill(at: AppTest, name: str, rows: str) -> AppTest:
    at.text_input(key="freezing_name").input(name)
    at.text_input(key="freezing_source").input("test table of our own")
    at.text_input(key="freezing_point").input("-1 degC")
    at.text_area(key="freezing_rows").input(rows)
    return at.button(key="freezing_add").click().run()


def test_a_pasted_table_becomes_a_material_of_the_worksheet():
    at = AppTest.from_file(APP, default_timeout=120)
    at.run()
    _fill(at, "dough", ROWS)
    assert not at.exception
    (material,) = at.session_state["hb_page"].worksheet.freezing_materials
    assert material.name == "dough" and str(material.initial_freezing_point) == "-1 degC"
    assert [(str(r.temperature), str(r.enthalpy)) for r in material.enthalpy_table] == [
        ("-30 degC", "0 kJ/kg"), ("-5 degC", "60 kJ/kg"), ("-1 degC", "220 kJ/kg"), ("20 degC", "280 kJ/kg")]
    assert [s.value for s in at.success] == [plain("dough added: a line can now use it as its material.")]


def test_a_falling_table_is_refused_with_its_address():
    at = AppTest.from_file(APP, default_timeout=120)
    at.run()
    _fill(at, "dough", "-30, 0\n-5, 60\n-1, 50")
    assert not at.exception
    assert at.session_state["hb_page"].worksheet.freezing_materials == []
    assert [e.value for e in at.error] == [plain(
        "freezing_materials[dough].enthalpy_table: rows 2 and 3: temperature and enthalpy must both rise "
        "from row to row (-5 degC, 60 kJ/kg then -1 degC, 50 kJ/kg)")]


def test_rows_that_are_not_two_numbers():
    with pytest.raises(InputError, match=r"row 2 \('-5 60 7'\) is not two numbers") as caught:
        parse_table("-30, 0\n-5 60 7", "degC", "kJ/kg", "freezing_materials[x].enthalpy_table")
    assert caught.value.where == "freezing_materials[x].enthalpy_table"
    with pytest.raises(InputError, match="paste at least two rows"):
        parse_table("-30, 0\n", "degC", "kJ/kg", "x")
