"""The page's panel for materials that freeze over a range: lists them, adds one from a pasted enthalpy table.

Hooked into ``app.py`` with one line of its extra panels (:func:`panel`). A table is pasted as rows of
``temperature, enthalpy`` numbers in the units chosen beside it; it is checked by the engine
(:func:`heatbalance.problem.freezing_material`) before it is written into the worksheet through the
setter, so a refused table shows its message (with its address) and changes nothing.
"""
from __future__ import annotations

import re

import streamlit as st

from heatbalance.errors import HeatBalanceError, InputError
from heatbalance.present.text import display_unit, error_text
from heatbalance.problem import freezing_material
from heatbalance.results import Result
from heatbalance.worksheet import Worksheet, item_address, parse_worksheet

from .common import plain

__all__ = ["panel", "parse_table", "with_material", "material_rows", "TEMPERATURE_UNITS", "ENTHALPY_UNITS"]

TEMPERATURE_UNITS = ["degC", "degF", "K"]
ENTHALPY_UNITS = ["kJ/kg", "Btu/lb", "kcal/kg"]
_SEPARATORS = re.compile(r"[,;\t ]+")
_ADDED = "hb_freezing_added"  # session key: the name of the material the last run added


def parse_table(text: str, T_unit: str, h_unit: str, where: str) -> list[dict]:
    """Rows ``temperature, enthalpy`` (comma, semicolon, tab or space between) -> enthalpy-table rows.

    Refused (an :class:`InputError` at ``where``): no rows, a row that is not two numbers (named by its number).
    """
    rows = []
    for number, line in enumerate((ln for ln in (text or "").splitlines() if ln.strip()), start=1):
        cells = [c for c in _SEPARATORS.split(line.strip().replace("−", "-")) if c]
        try:
            T, h = (float(c) for c in cells)
        except ValueError:
            raise InputError(f"row {number} ('{line.strip()}') is not two numbers: a temperature and an enthalpy",
                             where) from None
        rows.append({"temperature": {"value": T, "unit": T_unit}, "enthalpy": {"value": h, "unit": h_unit}})
    if len(rows) < 2:
        raise InputError("paste at least two rows: a temperature and an enthalpy on each", where)
    return rows


def with_material(worksheet: Worksheet, material: dict) -> Worksheet:
    """A copy of the worksheet with the material added, checked by the loader and the engine (refusals at the
    material's address)."""
    document = worksheet.model_dump(mode="json")
    document["freezing_materials"] = [*document["freezing_materials"], material]
    updated = parse_worksheet(document)
    freezing_material(updated.freezing_materials[-1])
    return updated


def material_rows(worksheet: Worksheet) -> list[dict]:
    """The worksheet's freezing-range materials as rows of the panel's list."""
    def point(m) -> str:
        q = m.initial_freezing_point
        return "" if q is None else f"{q.value:g} {display_unit(q.unit)}"

    return [{"name": m.name, "given by": "composition" if m.composition else "enthalpy table",
             "initial freezing point": point(m), "source": m.source} for m in worksheet.freezing_materials]


def panel(set_worksheet):
    """The panel as the page hooks it in: a material added is written into the worksheet through the setter."""
    def draw(worksheet: Worksheet, result: Result | None, system: str) -> None:
        render_freezing_panel(worksheet, set_worksheet)
    return draw


def render_freezing_panel(worksheet: Worksheet, set_worksheet) -> None:
    with st.expander("Materials that freeze over a range (foods, wet solids)", expanded=False):
        if worksheet.freezing_materials:
            st.container(key="freezing_list").table(material_rows(worksheet))  # a table: text only, never Markdown
        added = st.session_state.pop(_ADDED, None)
        if added:
            st.success(plain(f"{added} added: a line can now use it as its material."))
        st.caption("Add one by its enthalpy table: one row per line, temperature and specific enthalpy (any "
                   "reference), both rising; the enthalpy is linear between rows and the table is the range.")
        with st.form("freezing_form", clear_on_submit=False):
            name = st.text_input("Name", key="freezing_name")
            source = st.text_input("Source of the data", key="freezing_source")
            left, right, point = st.columns(3)
            T_unit = left.selectbox("Temperature unit", TEMPERATURE_UNITS, key="freezing_T_unit")
            h_unit = right.selectbox("Enthalpy unit", ENTHALPY_UNITS, key="freezing_h_unit")
            freezing_point = point.text_input("Initial freezing point (optional)", key="freezing_point",
                                              help="e.g. -1 degC: names the phase shown (partly frozen / unfrozen)")
            rows = st.text_area("Rows: temperature, enthalpy", key="freezing_rows", height=150,
                                placeholder="-30, 0\n-5, 60\n-1, 220\n20, 280")
            submitted = st.form_submit_button("Add the material", key="freezing_add")
        if submitted:
            _add(worksheet, set_worksheet, name.strip(), source.strip(), T_unit, h_unit, freezing_point.strip(), rows)


def _add(worksheet, set_worksheet, name, source, T_unit, h_unit, freezing_point, rows) -> None:
    where = item_address("freezing_materials", name or "")
    try:
        material = {"name": name, "source": source or "", "initial_freezing_point": freezing_point or None,
                    "enthalpy_table": parse_table(rows, T_unit, h_unit, f"{where}.enthalpy_table")}
        if not source:
            raise InputError("give the source of the data (a handbook table, a measurement, …)", f"{where}.source")
        updated = with_material(worksheet, material)
    except HeatBalanceError as exc:
        st.error(plain(f"{exc.where}: {error_text(exc)}" if exc.where else error_text(exc)),
                 icon=":material/error:")
        return
    set_worksheet(updated)
    st.session_state[_ADDED] = name  # said on the next run, which draws the worksheet with the material
    st.rerun()
