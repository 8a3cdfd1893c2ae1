"""The page's humid-air panel: the inlet humidity of each humid-air stream, and the water it carries.

Hooked into ``app.py`` as one of its extra panels, called as ``panel(worksheet, result, system)``. For every
stream of ``humid air`` (:mod:`heatbalance.humid_air`) it shows the solved water side (humidity ratios, dew point,
relative humidity, condensate and its heat) and a form for what the grids do not hold: the inlet's humidity (one of
relative humidity, humidity ratio, dew point, wet bulb) and how the flow is given (dry air, humid air, or a volume
flow). A value the engine refuses is shown with its address and not applied.
"""
from __future__ import annotations

import pandas as pd
import streamlit as st

from heatbalance.errors import HeatBalanceError
from heatbalance.humid_air import HUMID_AIR, HUMIDITY_FORMS
from heatbalance.present.humid_air import humid_air_rows
from heatbalance.problem import build_problem
from heatbalance.results import Result
from heatbalance.worksheet import Worksheet, parse_worksheet

from . import grids
from .common import page_state, plain

__all__ = ["panel", "render_humid_air_panel", "with_air_inputs", "FLOW_FORMS"]

FLOW_FORMS = ("dry air", "humid air", "volume flow")
_WORDS = {"relative_humidity": "relative humidity (0–1)", "humidity_ratio": "humidity ratio (kg/kg dry air)",
          "dew_point": "dew point", "wet_bulb": "wet bulb"}


def with_air_inputs(worksheet: Worksheet, stream: str, form: str, value: str, flow_form: str,
                    volume: str = "", volume_temperature: str = "", mass: str = "") -> Worksheet:
    """A copy with the humid-air stream's inlet humidity (``form``, ``value`` as typed: a number or a temperature)
    and its flow (``mass`` of dry or humid air, or a ``volume`` at ``volume_temperature``) set; refused with the
    field's address when the worksheet would not read or build."""
    data = worksheet.model_dump(mode="json", exclude_none=True)
    target = next(s for s in data["streams"] if s["name"] == stream)
    text = (value or "").strip()
    try:
        number = float(text) if form in ("relative_humidity", "humidity_ratio") else text
    except ValueError:
        raise HeatBalanceError(f"{text!r} is not a number", f"streams[{stream}].inlet.humidity.{form}") from None
    target["inlet"]["humidity"] = {form: number}
    target.pop("air_flow", None)
    if flow_form != "volume flow" and (mass or "").strip():
        target["flow"] = mass.strip()
    if flow_form == "humid air":
        target["air_flow"] = {"mass_of": "humid air"}
    elif flow_form == "volume flow":
        target.pop("flow", None)
        target["air_flow"] = {"volume_flow": volume.strip()}
        if (volume_temperature or "").strip():
            target["air_flow"]["volume_temperature"] = volume_temperature.strip()
    new = parse_worksheet(data)
    build_problem(new)
    return new


def _form(worksheet: Worksheet, stream, index: int, set_worksheet) -> None:
    humidity = stream.inlet.humidity
    form = next((k for k in HUMIDITY_FORMS if humidity is not None and getattr(humidity, k) is not None),
                "relative_humidity")
    current = getattr(humidity, form) if humidity is not None else None
    air = stream.air_flow
    flow_form = "volume flow" if air and air.volume_flow else (air.mass_of if air else "dry air")
    key = f"air_{index}"  # widget keys by position (names may hold any character)
    with st.form(key=f"{key}_form"):
        left, right = st.columns(2)
        chosen = left.selectbox("Inlet humidity given as", HUMIDITY_FORMS, index=HUMIDITY_FORMS.index(form),
                                format_func=_WORDS.get, key=f"{key}_form_kind")
        value = left.text_input("Value (a number, or a temperature such as 12 degC)",
                                "" if current is None else str(current), key=f"{key}_value")
        flow = right.selectbox("The flow is", FLOW_FORMS, index=FLOW_FORMS.index(flow_form),
                               key=f"{key}_flow_form")
        mass = right.text_input("Mass flow (dry or humid air, when chosen)",
                                str(stream.flow) if stream.flow else "", key=f"{key}_mass")
        volume = right.text_input("Volume flow (when chosen)", str(air.volume_flow) if air and air.volume_flow else "",
                                  key=f"{key}_volume")
        at = right.text_input("Measured at (empty: the inlet's temperature)",
                              str(air.volume_temperature) if air and air.volume_temperature else "",
                              key=f"{key}_volume_T")
        submitted = st.form_submit_button("Apply", key=f"{key}_apply")
    if submitted:
        try:
            new = with_air_inputs(worksheet, stream.name, chosen, value, flow, volume, at, mass)
        except HeatBalanceError as exc:
            st.error(plain(f"Not applied: {exc}"), icon=":material/error:")
            return
        set_worksheet(new)
        state = page_state()  # the streams grid shows the flow cell as it now is
        state.rows = {**state.rows, "streams": grids.worksheet_to_tables(new)["streams"]}
        st.rerun()


def render_humid_air_panel(worksheet: Worksheet, result: Result | None, system: str, set_worksheet=None) -> None:
    streams = [s for s in worksheet.streams if s.material == HUMID_AIR]
    if not streams:
        return
    with st.container(key="humid_air_panel"):
        st.subheader("Humid air")
        st.caption("Counted per kg of dry air; the water it cannot hold condenses and leaves at the air's "
                   "temperature (its heat is in the balance).")
        if result is not None and result.humid_air:
            st.dataframe(pd.DataFrame(humid_air_rows(result, system)), hide_index=True, key="humid_air_table")
        if set_worksheet is not None:
            for index, stream in enumerate(streams):
                with st.expander(f"Inlet humidity and flow of {plain(stream.name)}", expanded=stream.inlet.humidity is None):
                    _form(worksheet, stream, index, set_worksheet)


def panel(set_worksheet=None):
    """The panel as ``app.py`` calls it: ``panel(set_worksheet)(worksheet, result, system)``."""
    def draw(worksheet: Worksheet, result: Result | None, system: str) -> None:
        render_humid_air_panel(worksheet, result, system, set_worksheet)
    return draw
