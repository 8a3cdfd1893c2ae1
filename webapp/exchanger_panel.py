"""The page's exchanger and utility panel: will the exchanger do it, and which utility at what cost?

Hooked into ``app.py`` as one of its extra panels, called as ``panel(worksheet, result, system)``. It shows what
the engine put in the result (:mod:`heatbalance.analyses.exchangers`, :mod:`heatbalance.analyses.utilities`):
each exchanger's loud warnings (a temperature cross, an approach below the minimum, a unit too small), its
numbers and zones, and its T–Q chart; each duty's utilities side by side with flow, cost and CO2, the ones that
cannot meet it with the reason. A sheet without a site utility list can take the demo list (our own invention)
through the setter it is given. The editor declares, changes or removes an exchanger (its hot and cold lines,
arrangement, minimum approach, U, area or UA, utility side, and the input its rating sets); an edit is written
into the worksheet only when the engine accepts it, else its refusal is shown with its address.
"""
from __future__ import annotations

import pandas as pd
import streamlit as st

from heatbalance.address import item
from heatbalance.analyses import solve_and_analyse
from heatbalance.analyses.exchangers import typical_U
from heatbalance.analyses.utilities import demo_utilities
from heatbalance.present.exchangers import (exchanger_rows, number_columns, tq_figure, typical_U_rows, utility_rows,
                                            zone_rows)
from heatbalance.errors import HeatBalanceError
from heatbalance.present.text import error_text, phrase_text
from heatbalance.results import Result
from heatbalance.worksheet import ARRANGEMENTS, Worksheet, parse_worksheet

from .common import built, plain

__all__ = ["panel", "render_exchanger_panel", "with_demo_utilities", "with_exchanger", "NEW", "NONE"]

NEW = "(new exchanger)"
NONE = "(none)"
_ERROR = "exchanger_edit_refused"
_QUANTITIES = ("minimum_approach", "U", "area", "UA")


def with_demo_utilities(worksheet: Worksheet) -> Worksheet:
    """A copy of the worksheet with the demo site utility list (kept as it is if it has one)."""
    if worksheet.utilities:
        return worksheet
    return Worksheet.model_validate({**worksheet.model_dump(), "utilities": [u.model_dump() for u in demo_utilities()],
                                     "operating_hours": worksheet.operating_hours or {"value": 8000, "unit": "h"}})


def render_exchanger_panel(worksheet: Worksheet, result: Result | None, system: str, set_worksheet=None) -> None:
    if not worksheet.exchangers and not worksheet.utilities and set_worksheet is None:
        return
    with st.container(key="exchanger_panel"):
        st.subheader("Will the exchanger do it? Which utility?")
        if result is None:
            st.info("Solve the balance first: the exchanger check and the utilities run on its answer.")
            return
        if not result.exchangers:
            st.caption("No exchanger in this worksheet: declare one below (its hot and cold lines, the arrangement, "
                       "optionally U, area or UA) to see its T–Q curves.")
        for i, check in enumerate(result.exchangers):
            st.markdown(f"**Exchanger {plain(check.name)}**: hot {plain(', '.join(check.hot))}; "
                        f"cold {plain(', '.join(check.cold))}")
            for warning in check.warnings:
                st.error(plain(phrase_text(warning, system)) + f" \\[{plain(warning.address)}\\]",
                         icon=":material/warning:")
            for note in check.notes:
                st.caption(plain(phrase_text(note, system)))
            st.plotly_chart(built(tq_figure, check, system), key=f"exchanger_tq_{i}", width="stretch")
            st.dataframe(pd.DataFrame(exchanger_rows(check, system)), hide_index=True, key=f"exchanger_rows_{i}")
            _numbers_table(zone_rows(check, system), f"exchanger_zones_{i}")
            if check.rating is not None:
                st.markdown(plain(phrase_text(check.rating.verdict, system)))
            st.caption(plain("; ".join(check.sources)))
        for j, table in enumerate(result.utilities):
            d = table.demand
            st.markdown(f"**Utilities for {plain(d.label)}** ({d.sense})")
            _numbers_table(utility_rows(table, system), f"utility_table_{j}")
        if not worksheet.utilities:
            st.caption("No site utility list in this worksheet.")
            if set_worksheet is not None and st.button("Add the demo site utilities (our own invention)",
                                                       key="exchanger_add_demo_utilities"):
                set_worksheet(with_demo_utilities(worksheet))
                st.rerun()
        if set_worksheet is not None:
            _editor(worksheet, system, set_worksheet)
        with st.expander("Typical overall coefficients U (guidance only)"):
            _numbers_table(typical_U_rows(typical_U(), system), "exchanger_typical_U")


def _numbers_table(rows: list[dict], key: str) -> None:
    """Rows written by the presentation (numbers as text in the view's units), their number columns right-aligned."""
    config = {c: st.column_config.TextColumn(c, alignment="right") for c in number_columns(rows)}
    st.dataframe(pd.DataFrame(rows), hide_index=True, key=key, column_config=config)


def panel(set_worksheet=None):
    """The panel as ``app.py`` calls it: ``panel(set_worksheet)(worksheet, result, system)``."""
    def draw(worksheet: Worksheet, result: Result | None, system: str) -> None:
        render_exchanger_panel(worksheet, result, system, set_worksheet)
    return draw


# --------------------------------------------------------------------------- the editor
def with_exchanger(worksheet: Worksheet, old_name: str | None, fields: dict | None) -> Worksheet:
    """A copy with the exchanger ``old_name`` replaced by ``fields`` (None: removed; ``old_name`` None: added).

    ``fields`` as the worksheet stores them (quantities as typed text such as ``"25 kW/K"``; empty ones left
    out). Refused by the loader (a :class:`~heatbalance.errors.WorksheetFormatError` at the field) when invalid."""
    doc = worksheet.model_dump(mode="json", exclude_none=True)
    exchangers = [e for e in doc.get("exchangers", []) if e["name"] != old_name]
    if fields is not None:
        entry = {k: v for k, v in fields.items() if v not in (None, "", [])}
        at = next((i for i, e in enumerate(doc.get("exchangers", [])) if e["name"] == old_name), len(exchangers))
        exchangers.insert(at, entry)
    doc["exchangers"] = exchangers
    return parse_worksheet(doc)


def _key(choice: str, field: str) -> str:
    return f"exchanger_edit_{choice}_{field}"


def _settable(worksheet: Worksheet) -> list[str]:
    """The inputs an exchanger's rating may set: each stream's temperatures (as typed) and flow."""
    out = []
    for s in worksheet.streams:
        for end in ("inlet", "outlet"):
            if getattr(s, end).temperature is not None:
                out.append(f"{item('streams', s.name)}.{end}.temperature")
        out.append(f"{item('streams', s.name)}.flow")
    return out


def _shells(typed: float | None) -> int | float:
    """The shell passes as typed: a whole number as an int, anything else as it is, for the loader to refuse at
    ``exchangers[E].shells`` (whole, 1 to 12); never rounded nor put back in range here."""
    if typed is None:
        return 1  # the field's default
    return int(typed) if float(typed).is_integer() else float(typed)


def _fields(worksheet: Worksheet, choice: str) -> dict:
    """The editor's widget values as worksheet fields."""
    def value(field):
        return st.session_state.get(_key(choice, field))

    fields = {"name": (value("name") or "").strip(), "hot": value("hot") or [], "cold": value("cold") or [],
              "arrangement": value("arrangement"), "shells": _shells(value("shells"))}
    for field in _QUANTITIES:
        fields[field] = (value(field) or "").strip() or None
    side, sets = value("utility_side"), value("sets")
    fields["utility_side"] = None if side in (None, NONE) else side
    fields["sets"] = None if sets in (None, NONE) else sets
    return fields


def _commit(worksheet: Worksheet, choice: str, remove: bool, system: str, set_worksheet) -> None:
    """Write the edit into the worksheet when the engine accepts it (it solves); else keep the refusal."""
    old = None if choice == NEW else choice
    try:
        changed = with_exchanger(worksheet, old, None if remove else _fields(worksheet, choice))
        solve_and_analyse(changed)
    except HeatBalanceError as exc:
        st.session_state[_ERROR] = f"{error_text(exc, system)} [{exc.where}]"
        return
    except Exception as exc:  # noqa: BLE001 - a refusal on the panel, never a traceback
        st.session_state[_ERROR] = f"the engine failed unexpectedly ({exc.__class__.__name__})"
        return
    st.session_state.pop(_ERROR, None)
    set_worksheet(changed)


def _editor(worksheet: Worksheet, system: str, set_worksheet) -> None:
    names = [e.name for e in worksheet.exchangers]
    with st.expander("Declare or edit an exchanger", expanded=bool(st.session_state.get(_ERROR))):
        choice = st.selectbox("Exchanger", [NEW] + names, key="exchanger_edit_choice")
        e = next((x for x in worksheet.exchangers if x.name == choice), None)
        streams = [s.name for s in worksheet.streams]
        typed = {f: ("" if e is None or getattr(e, f) is None else str(getattr(e, f))) for f in _QUANTITIES}
        settable = [NONE] + _settable(worksheet)
        with st.form(key=f"exchanger_edit_form_{choice}", border=False):
            c1, c2, c3 = st.columns(3)
            c1.text_input("Name", value="" if e is None else e.name, key=_key(choice, "name"))
            c2.multiselect("Hot side (gives heat)", streams, default=[] if e is None else
                           [n for n in e.hot if n in streams], key=_key(choice, "hot"))
            c3.multiselect("Cold side (takes heat)", streams, default=[] if e is None else
                           [n for n in e.cold if n in streams], key=_key(choice, "cold"))
            c1.selectbox("Arrangement", ARRANGEMENTS, index=0 if e is None else ARRANGEMENTS.index(e.arrangement),
                         key=_key(choice, "arrangement"))
            # a float field without bounds: the browser would keep the old value of 13 (hover tip only) and
            # truncate 2.5 to 2; the loader refuses both at exchangers[E].shells on Save
            c2.number_input("Shell passes (N shells)", value=float(1 if e is None else e.shells), step=1.0,
                            format="%.10g", key=_key(choice, "shells"))
            c3.text_input("Minimum approach", value=typed["minimum_approach"], key=_key(choice, "minimum_approach"),
                          placeholder="10 K (common practice)", help="A temperature difference, e.g. 10 K or 18 delta_degF")
            c1.text_input("U", value=typed["U"], key=_key(choice, "U"), placeholder="e.g. 850 W/(m^2*K)",
                          help="U alone: the area needed. U and area, or UA: the existing unit is rated.")
            c2.text_input("Area", value=typed["area"], key=_key(choice, "area"), placeholder="e.g. 40 m^2")
            c3.text_input("UA (instead of U and area)", value=typed["UA"], key=_key(choice, "UA"),
                          placeholder="e.g. 25 kW/K")
            sides = [NONE, "hot", "cold"]
            c1.selectbox("Utility side", sides, index=sides.index(e.utility_side if e and e.utility_side else NONE),
                         key=_key(choice, "utility_side"), help="The side that is a site utility: the utility table "
                                                                 "then offers each site utility for the other side's duty.")
            current = e.sets if e is not None and e.sets in settable else NONE
            c2.selectbox("Its rating sets", settable, index=settable.index(current), key=_key(choice, "sets"),
                         help="Rating as a way of solving: this input is set so that the duty the unit delivers with "
                              "its UA closes the balance (the unknown is still solved by the balance).")
            commit = {"args": (worksheet, choice, False, system, set_worksheet)}
            st.form_submit_button("Save exchanger", key="exchanger_edit_save", on_click=_commit, **commit)
        if e is not None:
            st.button("Remove this exchanger", key="exchanger_edit_remove", on_click=_commit,
                      args=(worksheet, choice, True, system, set_worksheet))
        if st.session_state.get(_ERROR):
            st.error("This exchanger cannot be used: " + plain(st.session_state[_ERROR]), icon=":material/error:")
