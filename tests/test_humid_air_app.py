"""The humid-air panel on the page (AppTest): the sample's water side drawn, the inlet humidity changed through the
form (and a bad value refused with its address); the form's pure function is tested directly."""
from __future__ import annotations

import pytest
from streamlit.testing.v1 import AppTest

from heatbalance.errors import HeatBalanceError
from page_helpers import page, sample
from webapp.humid_air_panel import with_air_inputs

SAMPLE = "humid_air_heater_steam.json"
KEY = "air_0"


def _sample():
    return sample(SAMPLE)


def _open() -> AppTest:
    return page(_sample())


def test_with_air_inputs_sets_humidity_and_flow_form():
    ws = with_air_inputs(_sample(), "Outdoor air", "dew_point", "-10 degC", "dry air", mass="25 t/h")
    stream = ws.streams[0]
    assert str(stream.inlet.humidity.dew_point) == "-10 degC" and stream.inlet.humidity.relative_humidity is None
    assert stream.air_flow is None and str(stream.flow) == "25 t/h"
    with pytest.raises(HeatBalanceError) as caught:  # a mass flow is needed once the volume flow is gone
        with_air_inputs(_sample(), "Outdoor air", "dew_point", "-10 degC", "humid air")
    assert caught.value.where == "streams[Outdoor air].flow"
    by_volume = with_air_inputs(_sample(), "Outdoor air", "relative_humidity", "0.5", "volume flow", "18000 m^3/h",
                                "0 degC")
    assert str(by_volume.streams[0].air_flow.volume_temperature) == "0 degC"
    with pytest.raises(HeatBalanceError) as caught:
        with_air_inputs(_sample(), "Outdoor air", "relative_humidity", "1.5", "volume flow", "18000 m^3/h")
    assert caught.value.where == "streams[Outdoor air].inlet.humidity.relative_humidity"


def test_panel_shows_the_water_side():
    at = _open()
    assert not at.exception
    assert "Humid air" in [s.value for s in at.subheader]
    table = next(d.value for d in at.dataframe if "dew point in" in d.value.columns)
    assert list(table["line"]) == ["Outdoor air"] and list(table["RH in"]) == ["80%"]


def test_form_changes_the_humidity_and_refuses_a_wet_bulb_above_the_dry_bulb():
    at = _open()
    at.selectbox(key=f"{KEY}_form_kind").set_value("wet_bulb")
    at.text_input(key=f"{KEY}_value").set_value("5 degC")
    at.button(key=f"{KEY}_apply").click().run()
    assert not at.exception
    assert any("wet bulb" in e.value and "humidity\\.wet\\_bulb" in e.value for e in at.error)
    at.text_input(key=f"{KEY}_value").set_value("-6 degC")
    at.button(key=f"{KEY}_apply").click().run()
    assert not at.exception
    state = at.session_state["hb_page"]
    assert str(state.worksheet.streams[0].inlet.humidity.wet_bulb) == "-6 degC"
    assert state.result is not None and state.result.humid_air[0].W_in < 0.0025
