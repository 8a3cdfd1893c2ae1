"""The inputs: basis, and one editable grid per part of the worksheet, with bad cells marked.

Each grid's editor keeps its key while the worksheet stays loaded (see :mod:`webapp.state`), so the
cursor stays in the cell after an edit.
"""
from __future__ import annotations

import pandas as pd
import streamlit as st

from heatbalance.present.text import error_text
from heatbalance.worksheet import Worksheet

from . import grids
from .common import display_system, page_state, plain

__all__ = ["render_inputs", "table_frame", "check_marks"]

_STATE_HELP = ("a temperature (55 °C, 131 °F, 328 K), or 'saturated vapour', 'saturated liquid', "
               "'vapour fraction 0.3', 'solid fraction 0.5', 'shared: <name>'; ? = the unknown")
_FRACTION_HELP = "a number from 0 to 1 ({}) or a percentage ({})"
_PRESSURE_HELP = ("barg, psig, kPag = gauge (above the site's barometric pressure: 1.01325 bar unless set under "
                  "Site atmosphere); bar, bara, psia, kPa, MPa = absolute")


def _column_config(worksheet: Worksheet, rows: dict[str, list[dict]]) -> dict:
    """Every grid's column settings; the dropdowns offer the names as typed in the grids (``rows``), so a
    vessel or material typed a moment ago is offered before the worksheet reads."""
    text = st.column_config.TextColumn
    number = st.column_config.NumberColumn
    pick = st.column_config.SelectboxColumn
    return _sized({
        "check": text("check", width="small", disabled=True,
                      help="⚠ marks a cell that cannot be used; the message is above the table"),
        "name": text("name", help="a unique name for the line or term"),
        "material": pick("material", options=grids.material_names(worksheet, rows["materials"]),
                         help="from the property library, or defined below"),
        "own material": text("material", help="a name for your material; one row per phase"),
        "mass fraction": text("mass frac.", help="aqueous solutions only: " + _FRACTION_HELP.format(
                              *grids.FRACTION_COLUMNS["mass fraction"])),
        "flow": text("flow", help="mass flow with its unit: 12 t/h, 500 kg/h, 20000 lb/h; ? = the unknown"),
        "mass": text("mass", help="mass with its unit: 7.5 t, 400 kg, 2000 lb; ? = the unknown"),
        "pressure": text("pressure", help=_PRESSURE_HELP),
        "pressure is": text("gauge/abs.", disabled=True, help="read from the pressure unit"),
        "inlet": text("inlet state", help=_STATE_HELP), "outlet": text("outlet state", help=_STATE_HELP),
        "initial": text("initial state", help=_STATE_HELP), "final": text("final state", help=_STATE_HELP),
        "inlet pressure": text("inlet p", help="inlet pressure, only if not the line pressure. " + _PRESSURE_HELP),
        "outlet pressure": text("outlet p", help="outlet pressure, only if not the line pressure (a let-down, "
                                "a flash). " + _PRESSURE_HELP),
        "vessel": pick("vessel", options=grids.typed_names(rows["vessels"]),
                       help="one of the vessels named in the Vessels grid"),
        "heat": text("heat", help="a power (kW, MW, Btu/h) or, in batch, an energy (kJ, MJ, Btu); "
                                  "duties: heater +, cooler −; losses: positive heat leaving; ? = the unknown"),
        "heat of reaction": text("ΔH reaction", help="per mole of key reactant, negative when exothermic: -92 kJ/mol"),
        "amount": text("amount fed", help="moles of key reactant (4.2 kmol), or a mass with a molar mass"),
        "conversion": text("conversion", help="the part of the amount fed that reacts: " + _FRACTION_HELP.format(
                           *grids.FRACTION_COLUMNS["conversion"])),
        "molar mass": text("molar mass", help="only when the amount is a mass: 58 g/mol"),
        "heat capacity": text("heat capacity", help="instead of material and mass: 1600 kJ/K"),
        "initial temperature": text("initial temperature", help="default: the first charge's initial temperature"),
        "temperature": text("temperature", help="? = the unknown"),
        "phase": pick("phase", options=["solid", "liquid", "vapour"]),
        "from library": text("from library", help="instead of cp: a library material whose phase this is, e.g. water"),
        "cp": text("cp", help="2.1 kJ/(kg*K) or 0.5 Btu/(lb*degF)"),
        "cp per K": number("cp per K", help="b in cp = a + b·T + c·T² (T in K)"),
        "cp per K²": number("cp per K²", help="c in cp = a + b·T + c·T² (T in K)"),
        "up to": text("up to", help="the transition temperature to the next phase"),
        "latent heat": text("latent heat", help="to the next phase: 200 kJ/kg"),
        "min temperature": text("min T"), "max temperature": text("max T"), "source": text("data source"),
    })


#: column widths [px] that let the widest grid (streams) fit a 1400 px screen beside the answer panel
_WIDTHS = {"check": 80, "name": 100, "material": 130, "mass fraction": 70, "flow": 85, "mass": 85, "pressure": 80,
           "pressure is": 72, "inlet": 110, "outlet": 110, "initial": 110, "final": 110, "inlet pressure": 70,
           "outlet pressure": 70, "vessel": 90, "heat of reaction": 100, "equation": 185, "key reactant": 100,
           "amount": 90, "conversion": 80, "molar mass": 85, "phase": 70, "cp": 100, "cp per K": 75,
           "cp per K²": 75, "up to": 75, "latent heat": 95, "min temperature": 70, "max temperature": 70,
           "source": 150}


def _sized(config: dict) -> dict:
    return {c: ({**cfg, "width": _WIDTHS[c]} if c in _WIDTHS else cfg) for c, cfg in config.items()}


def _table_config(table: str, config: dict) -> dict:
    """The column settings of one grid: in the materials grid the material is a name to type, not a pick."""
    if table == "materials":
        return {**config, "material": {**config["own material"], "width": _WIDTHS["material"]}}
    return config


def _dropdown_options(config: dict, columns: list[str]) -> tuple:
    """The options of a grid's dropdowns (part of its editor's identity: see ``PageState.editor_rows``)."""
    return tuple(tuple(config[c].get("type_config", {}).get("options") or ()) for c in columns if c in config)


def check_marks(table: str, rows: list[dict], problems: list[grids.CellProblem]) -> list[str]:
    """The 'check' column: ⚠ and the bad column(s) on each row with a problem.

    A cell left empty gets no mark (the message above the table names it): a row being typed, name
    first, would otherwise redraw its grid and lose the cursor before its next cell is reached."""
    marks = [""] * len(rows)
    for p in problems:
        if p.table == table and p.row is not None and p.row < len(rows):
            if p.column is not None and grids.cell_values([rows[p.row]], [p.column])[0][0] is None:
                continue
            place = p.column or "row"
            marks[p.row] = f"{marks[p.row]}, {place}" if marks[p.row] else f"⚠ {place}"
    return marks


def table_frame(table: str, rows: list[dict], marks: list[str]) -> pd.DataFrame:
    """The rows of one grid as a frame, with a 'check' column marking bad cells."""
    marks = (list(marks) + [""] * len(rows))[:len(rows)]
    columns = grids.COLUMNS[table]
    cells = grids.cell_values(rows, columns)
    data = {"check": pd.Series(marks, dtype="object")}
    for i, column in enumerate(columns):
        dtype = "float64" if column in grids.NUMBER_COLUMNS else "object"
        data[column] = pd.Series([row[i] for row in cells], dtype=dtype)
    return pd.DataFrame(data)


def _on_table_edit(table: str) -> None:
    state = page_state()
    state.apply_table_edit(table, st.session_state.get(state.editor_key(table)) or {})


def _render_table(table: str, config: dict, problems: list[grids.CellProblem], caption: str,
                  title: bool = True) -> None:
    state = page_state()
    config = _table_config(table, config)
    if title:
        st.markdown(f"**{grids.TABLE_TITLES[table]}** — {caption}")
    else:
        st.caption(caption)
    for problem in (p for p in problems if p.table == table):
        st.error(plain(problem.text), icon=":material/error:")
    marks = check_marks(table, state.rows[table], problems)
    rows, given_marks = state.editor_rows(table, marks, st.session_state.get(state.editor_key(table)),
                                          display_system(),  # the unknown's '?' cell in the view's unit
                                          _dropdown_options(config, grids.COLUMNS[table]))
    key = state.editor_key(table)  # a new one when an undo had to redraw the grid
    frame = table_frame(table, rows, given_marks)
    # 'check' only when needed, and last: a mark appearing must not move the cells being typed into
    shown = grids.COLUMNS[table] + (["check"] if frame["check"].any() else [])
    st.data_editor(frame, key=key, on_change=_on_table_edit, args=(table,), num_rows="dynamic",
                   width="stretch", hide_index=True, placeholder="", column_order=shown,
                   column_config={c: config[c] for c in shown if c in config}, disabled=["check", *grids.DERIVED])


def _on_title_change() -> None:
    page_state().set_title(st.session_state.get("title_input"))


def _on_basis_change() -> None:
    page_state().set_basis(st.session_state["basis_kind"], st.session_state.get("basis_duration"))


def _on_notes_change() -> None:
    page_state().set_notes(st.session_state.get("notes_input"))


def _render_basis() -> None:
    st.subheader("Worksheet and basis")
    c1, c2, c3 = st.columns([3, 2, 2])
    c1.text_input("Worksheet title", key="title_input", on_change=_on_title_change, max_chars=200)
    c2.selectbox("Basis", ["continuous", "batch"], key="basis_kind", on_change=_on_basis_change,
                 help="continuous: flows (kg/h) and powers (kW). batch: masses (kg) and energies (kJ).")
    c3.text_input("Batch duration", key="basis_duration", on_change=_on_basis_change,
                  placeholder="e.g. 40 min",
                  help="batch only: a duty given as a power (kW) applies over this time")
    st.text_area("Notes", key="notes_input", on_change=_on_notes_change, height=68, max_chars=20_000,
                 placeholder="what this worksheet is for, where the numbers come from…",
                 help="Plain text, kept with the worksheet and printed on the calculation sheet. A sample's "
                      "description is its notes: change them as the worksheet changes.")
    if page_state().basis_problem:
        st.error(f"Batch duration: {plain(page_state().basis_problem)}", icon=":material/error:")


def render_inputs(worksheet: Worksheet, system: str) -> None:
    state = page_state()
    problems = state.cell_problems(lambda exc: error_text(exc, system))
    # the unknown's refusal is said once, in the answer panel beside "Solve for" (where it is fixed)
    problems = [p for p in problems if p.table != "unknown"]
    for problem in problems:
        if problem.table in ("worksheet", "basis"):
            st.error(plain(problem.text), icon=":material/error:")
    _render_basis()
    config = _column_config(worksheet, state.rows)
    batch = worksheet.basis.kind == "batch" or bool(worksheet.vessels)
    if batch:
        st.subheader("Vessels", help="batch basis: the charges of a vessel are mixed and end at its final state")
        _render_table("vessels", config, problems, "every charge of a vessel ends at the vessel's final state")
        _render_table("charges", config, problems, "what is put in each vessel, at its initial state")
    st.subheader("Streams", help="continuous lines: each flows from its inlet state to its outlet state")
    _render_table("streams", config, problems, "one row per flowing line, from its inlet state to its outlet state",
                  title=False)
    if not batch:
        st.caption("Vessels and batch charges: switch the basis to batch.")
    st.subheader("Heat terms", help="+ = heat into the process")
    left, right = st.columns(2)
    with left:
        _render_table("duties", config, problems, "heater +, cooler −")
    with right:
        _render_table("losses", config, problems, "heat lost to the surroundings, entered as positive")
    _render_table("reactions", config, problems, "heat released = −ΔH × amount fed × conversion")
    if batch:
        _render_table("equipment", config, problems,
                      "vessel wall, agitator and internals that warm with the contents (per vessel)")
    if any(p.table in ("shared", "materials") for p in problems):
        st.session_state["show_own_tables"] = True  # a marked cell is never hidden
    if st.toggle("Shared temperatures and materials of your own", key="show_own_tables"):
        _render_table("shared", config, problems, "one temperature for lines that end mixed; "
                      "refer to it in a state cell as 'shared: <name>'")
        _render_table("materials", config, problems, "one row per phase; cp = a + b·T + c·T² with T in K")
