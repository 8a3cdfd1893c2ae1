"""The page's surface-losses panel: a loss computed from geometry instead of a guessed number.

Hooked into ``app.py`` as one of its extra panels, called as ``panel(worksheet, result, system)``. It shows each
computed loss of the solved result (:mod:`heatbalance.losses`: the heat lost and its convection and radiation
parts, the outer surface temperature, the method, the insulation needed for personnel protection) and a form to
add or change one: shape, diameter, length, emissivity, insulation and its thickness, the air, the wind, and the
process side (a line's mean temperature, or a temperature). The form's values go into the worksheet as typed
(``losses[L].surface``); a value the engine refuses is shown with its address and not applied. The one safety
caution is shown by the answer block (``webapp.answer``), not repeated here.
"""
from __future__ import annotations

import pandas as pd
import streamlit as st

from heatbalance.errors import HeatBalanceError
from heatbalance.losses import SHAPES, insulation_names
from heatbalance.present.losses import protection_text, surface_loss_rows
from heatbalance.present.text import measure_text, phrase_text
from heatbalance.messages import Measure
from heatbalance.problem import build_problem
from heatbalance.results import Result
from heatbalance.worksheet import Worksheet, parse_worksheet

from . import grids
from .common import page_state, plain

__all__ = ["panel", "render_losses_panel", "with_surface_loss", "NEW_LOSS", "BY_TEMPERATURE", "NO_INSULATION"]

NEW_LOSS = "(a new computed loss)"
BY_TEMPERATURE = "(a temperature I give)"
NO_INSULATION = "(bare)"


def with_surface_loss(worksheet: Worksheet, name: str, fields: dict) -> Worksheet:
    """A copy of the worksheet with the loss ``name`` computed from the form's ``fields`` (text as typed).

    ``fields``: shape, diameter, length, emissivity (a number), insulation (a table name or
    :data:`NO_INSULATION`), thickness, ambient, wind, process (a line's name or :data:`BY_TEMPERATURE`),
    process_temperature. Refused (with the field's address) when the worksheet would not read or build.
    """
    name = (name or "").strip()
    surface: dict = {"shape": fields["shape"], "diameter": fields["diameter"], "emissivity": fields["emissivity"],
                     "ambient_temperature": fields["ambient"]}
    if fields["shape"] != "tank roof":
        surface["length"] = fields["length"]
    if fields.get("insulation") not in (None, NO_INSULATION):
        surface["insulation"] = {"material": fields["insulation"], "thickness": fields["thickness"]}
    if (fields.get("wind") or "").strip():
        surface["wind_speed"] = fields["wind"]
    if fields["process"] == BY_TEMPERATURE:
        surface["process_temperature"] = fields["process_temperature"]
    else:
        surface["line"] = fields["process"]
    data = worksheet.model_dump(mode="json", exclude_none=True)
    losses = [loss for loss in data.get("losses", []) if loss["name"] != name]
    position = next((i for i, loss in enumerate(data.get("losses", [])) if loss["name"] == name), len(losses))
    losses.insert(position, {"name": name, "surface": surface})
    data["losses"] = losses
    new = parse_worksheet(data)
    build_problem(new)  # units, signs, names: refused here with the address, before it reaches the sheet
    return new


def _defaults(worksheet: Worksheet, name: str) -> dict:
    loss = next((x for x in worksheet.losses if x.name == name and x.surface is not None), None)
    lines = [s.name for s in worksheet.streams] + [v.name for v in worksheet.vessels]
    if loss is None:
        return {"shape": SHAPES[0], "diameter": "114.3 mm", "length": "50 m", "emissivity": 0.9,
                "insulation": "mineral wool", "thickness": "50 mm", "ambient": "20 degC", "wind": "",
                "process": lines[0] if lines else BY_TEMPERATURE, "process_temperature": "150 degC"}
    s = loss.surface
    return {"shape": s.shape, "diameter": str(s.diameter), "length": str(s.length) if s.length else "",
            "emissivity": s.emissivity, "insulation": s.insulation.material if s.insulation else NO_INSULATION,
            "thickness": str(s.insulation.thickness) if s.insulation else "", "ambient": str(s.ambient_temperature),
            "wind": str(s.wind_speed) if s.wind_speed else "", "process": s.line or BY_TEMPERATURE,
            "process_temperature": str(s.process_temperature) if s.process_temperature else ""}


def _render_records(result: Result, system: str) -> None:
    for i, record in enumerate(result.surface_losses):
        st.markdown(f"**{plain(record.name)}**")
        heat, surface, protection = st.columns(3)  # text, as the answer is (no metric widgets)
        heat.markdown(f"Heat lost: **{plain(measure_text(Measure(record.loss, 'power'), system))}**")
        surface.markdown(f"Outer surface: **{plain(measure_text(Measure(record.surface_T, 'temperature', 1), system))}**")
        protection.caption(f"Personnel protection: {plain(protection_text(record, system))} (common practice; "
                           "follow local codes)")
        for note in record.notes:
            st.warning(plain(phrase_text(note, system)), icon=":material/warning:")
    st.dataframe(pd.DataFrame(surface_loss_rows(result, system)), hide_index=True, key="losses_table")


def _render_form(worksheet: Worksheet, set_worksheet) -> None:
    computed = [x.name for x in worksheet.losses if x.surface is not None]
    choices = [*computed, NEW_LOSS]
    pick = st.selectbox("Loss", choices, key="losses_pick")
    n = choices.index(pick)  # the form's widget keys (names may hold any character)
    d = _defaults(worksheet, pick)
    lines = [s.name for s in worksheet.streams] + [v.name for v in worksheet.vessels]
    insulations = [NO_INSULATION, *insulation_names()]
    with st.form(key=f"losses_form_{n}"):
        name = st.text_input("Name", value="" if pick == NEW_LOSS else pick, key=f"losses_name_{n}")
        left, middle, right = st.columns(3)
        fields = {
            "shape": left.selectbox("Shape", SHAPES, index=SHAPES.index(d["shape"]), key=f"losses_shape_{n}"),
            "diameter": left.text_input("Outside diameter (bare)", d["diameter"], key=f"losses_diameter_{n}"),
            "length": left.text_input("Length or wall height (not for a roof)", d["length"],
                                      key=f"losses_length_{n}"),
            # no bounds on the field: outside 0-1 the loader refuses it at losses[L].surface.emissivity on Apply
            "emissivity": left.number_input("Surface emissivity (0–1)", value=float(d["emissivity"]), step=0.05,
                                            key=f"losses_emissivity_{n}"),
            "insulation": middle.selectbox("Insulation", insulations, index=insulations.index(d["insulation"]),
                                           key=f"losses_insulation_{n}"),
            "thickness": middle.text_input("Insulation thickness", d["thickness"], key=f"losses_thickness_{n}"),
            "ambient": right.text_input("Air temperature", d["ambient"], key=f"losses_ambient_{n}"),
            "wind": right.text_input("Wind speed (empty: still air)", d["wind"], key=f"losses_wind_{n}"),
        }
        choices = [*lines, BY_TEMPERATURE]
        fields["process"] = right.selectbox("Process side: the mean temperature of", choices,
                                            index=choices.index(d["process"]) if d["process"] in choices else 0,
                                            key=f"losses_process_{n}")
        fields["process_temperature"] = right.text_input("Process temperature (when given)",
                                                         d["process_temperature"], key=f"losses_process_T_{n}")
        submitted = st.form_submit_button("Apply", key=f"losses_apply_{n}")
    if submitted:
        try:
            new = with_surface_loss(worksheet, name, fields)
        except HeatBalanceError as exc:
            st.error(plain(f"Not applied: {exc}"), icon=":material/error:")
            return
        set_worksheet(new)
        state = page_state()  # the losses grid shows the new line
        state.rows = {**state.rows, "losses": grids.worksheet_to_tables(new)["losses"]}
        st.rerun()


def render_losses_panel(worksheet: Worksheet, result: Result | None, system: str, set_worksheet=None) -> None:
    with st.container(key="losses_panel"):
        st.subheader("Surface losses (computed from geometry)")
        if result is not None and result.surface_losses:
            _render_records(result, system)
        elif any(x.surface is not None for x in worksheet.losses):
            st.info("The computed losses appear here once the balance solves.")
        else:
            st.caption("No computed loss yet: describe a pipe, a vessel wall or a tank roof below, and its loss "
                       "enters the balance (natural or wind convection plus radiation, through insulation).")
        if set_worksheet is not None:
            with st.expander("Add or change a computed loss", expanded=False):
                _render_form(worksheet, set_worksheet)


def panel(set_worksheet=None):
    """The panel as ``app.py`` calls it: ``panel(set_worksheet)(worksheet, result, system)``."""
    def draw(worksheet: Worksheet, result: Result | None, system: str) -> None:
        render_losses_panel(worksheet, result, system, set_worksheet)
    return draw
