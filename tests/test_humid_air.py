"""Humid air (heatbalance.humid_air): heating and cooling with condensation against a textbook psychrometric
example and against psychrolib (ASHRAE Handbook Fundamentals equations, an implementation independent of
CoolProp), every humidity form, flows as dry air, humid air or volume, and every refusal by its address."""
import json

import psychrolib
import pytest

from heatbalance import address
from heatbalance.analyses import solve_and_analyse
from heatbalance.analyses.sweep import Axis, sweep
from heatbalance.balance import solve
from heatbalance.errors import InputError, WorksheetFormatError
from heatbalance.humid_air import humidity_ratio
from heatbalance.present.humid_air import humid_air_rows
from heatbalance.present.report import format_result, result_json
from heatbalance.worksheet import parse_worksheet

psychrolib.SetUnitSystem(psychrolib.SI)
P_ATM = 101325.0  # Pa


def air_sheet(inlet_C, outlet_C, humidity, flow="3600 kg/h", duty=None, **stream):
    """One humid-air stream through a heater/cooler whose duty is the unknown (or given)."""
    air = {"name": "Air", "material": "humid air", "pressure": "1.01325 bar", "flow": flow,
           "inlet": {"temperature": f"{inlet_C} degC", "humidity": humidity},
           "outlet": {"temperature": f"{outlet_C} degC"}, **stream}
    if air.get("flow") is None:
        air.pop("flow")
    sheet = {"streams": [air], "duties": [{"name": "Coil"}], "unknowns": [{"kind": "duty", "term": "Coil"}]}
    if duty is not None:
        sheet["duties"] = [{"name": "Coil", "value": duty}]
        sheet["unknowns"] = [{"kind": "temperature", "line": "Air", "end": "outlet"}]
    return sheet


def test_cooling_with_condensation_textbook_example():
    """Çengel & Boles, Thermodynamics: An Engineering Approach, Example 14-8 (from memory): air at 1 atm, 30 °C,
    80 % RH enters a cooling coil at 10 m³/min and leaves saturated at 14 °C; the water condenses and leaves at
    14 °C. Book: ω1 = 0.0216, ω2 = 0.0100, ṁ_air = 11.25 kg/min, condensate 0.131 kg/min, Q_out = 511 kJ/min."""
    sheet = air_sheet(30, 14, {"relative_humidity": 0.8}, flow=None, air_flow={"volume_flow": "10 m^3/min"})
    result = solve(parse_worksheet(sheet))
    line = result.humid_air[0]
    assert line.dry_air * 60 == pytest.approx(11.25, rel=0.005)
    assert line.W_in == pytest.approx(0.0216, abs=0.0001) and line.W_out == pytest.approx(0.0100, abs=0.0001)
    assert line.condensate * 60 == pytest.approx(0.131, rel=0.01)
    assert -result.answer.value_si * 60 / 1000 == pytest.approx(511, rel=0.005)
    assert result.lines[0].latent == pytest.approx(-line.condensate_heat)  # the condensate's heat is the latent part


def psychrolib_duty(T1, T2, W1, m_dry):
    """Coil duty [W] by psychrolib's ASHRAE equations (ideal gas): m·[(h2 + (W1 − W2)·h_w) − h1], condensate at
    T2 with h_w = 4186·t J/kg (ASHRAE Handbook Fundamentals 2017, ch. 1, eq. 41 and the liquid's 4.186 t)."""
    W2 = min(W1, psychrolib.GetSatHumRatio(T2, P_ATM))
    h1 = psychrolib.GetMoistAirEnthalpy(T1, W1)
    h2 = psychrolib.GetMoistAirEnthalpy(T2, W2)
    return m_dry * (h2 + (W1 - W2) * 4186.0 * T2 - h1), m_dry * (W1 - W2)


@pytest.mark.parametrize("T1, T2, rh", [
    pytest.param(10, 35, 0.6, id="heating-10C-60pc"),
    pytest.param(-10, 20, 0.9, id="heating-winter-air"),
    pytest.param(30, 12, 0.7, id="cooling-condensing"),
    pytest.param(35, 20, 0.5, id="cooling-condensing-dry-climate"),
    pytest.param(40, 25, 0.2, id="cooling-above-dew-point"),
])
def test_against_psychrolib(T1, T2, rh):
    result = solve(parse_worksheet(air_sheet(T1, T2, {"relative_humidity": rh})))  # 1 kg/s of dry air
    W1 = psychrolib.GetHumRatioFromRelHum(T1, rh, P_ATM)
    duty, condensate = psychrolib_duty(T1, T2, W1, 1.0)
    assert result.humid_air[0].W_in == pytest.approx(W1, rel=0.01)  # real gas vs ideal gas: < 1 %
    assert result.answer.value_si == pytest.approx(duty, rel=0.005, abs=50)
    assert result.humid_air[0].condensate == pytest.approx(condensate, rel=0.02, abs=1e-6)


@pytest.mark.parametrize("form, value", [
    ("dew_point", lambda: psychrolib.GetTDewPointFromRelHum(25, 0.5) + 273.15),
    ("wet_bulb", lambda: psychrolib.GetTWetBulbFromRelHum(25, 0.5, P_ATM) + 273.15),
    ("humidity_ratio", lambda: psychrolib.GetHumRatioFromRelHum(25, 0.5, P_ATM)),
])
def test_every_humidity_form_gives_the_same_water(form, value):
    """25 °C, 50 % RH expressed as its dew point, wet bulb and humidity ratio by psychrolib."""
    W = humidity_ratio(form, value(), 298.15, P_ATM)
    assert W == pytest.approx(humidity_ratio("relative_humidity", 0.5, 298.15, P_ATM), rel=0.01)
    assert W == pytest.approx(psychrolib.GetHumRatioFromRelHum(25, 0.5, P_ATM), rel=0.01)


def test_inlet_temperature_solved_with_a_dew_point():
    """A dew point fixes the water without the inlet's temperature: 1 kg/s of air with a 10 °C dew point cooled
    to 15 °C by a 10 kW cooler enters at about 25 °C (psychrolib: Δh = 10 kJ/kg dry air at W = 7.66 g/kg)."""
    sheet = air_sheet(30, 15, {"dew_point": "10 degC"}, duty="-10 kW")
    sheet["unknowns"] = [{"kind": "temperature", "line": "Air", "end": "inlet"}]
    result = solve(parse_worksheet(sheet))
    W = psychrolib.GetHumRatioFromTDewPoint(10, P_ATM)
    T1 = psychrolib.GetTDryBulbFromEnthalpyAndHumRatio(psychrolib.GetMoistAirEnthalpy(15, W) + 10e3, W)
    assert result.answer.value_si - 273.15 == pytest.approx(T1, abs=0.1)
    assert result.humid_air[0].dew_point_in - 273.15 == pytest.approx(10, abs=0.01)


def test_humid_air_mass_is_turned_into_dry_air():
    W = humidity_ratio("relative_humidity", 0.5, 303.15, P_ATM)
    dry = solve(parse_worksheet(air_sheet(30, 50, {"relative_humidity": 0.5}, flow="1000 kg/h")))
    humid = solve(parse_worksheet(air_sheet(30, 50, {"relative_humidity": 0.5}, flow="1000 kg/h",
                                            air_flow={"mass_of": "humid air"})))
    assert humid.humid_air[0].dry_air == pytest.approx(dry.humid_air[0].dry_air / (1 + W))
    assert humid.answer.value_si == pytest.approx(dry.answer.value_si / (1 + W))


def test_outlet_temperature_solved_into_the_condensing_range():
    """A 30 kW cooler on 1 kg/s of 30 °C, 70 % air: the answer lies below the 23.9 °C dew point, and the balance
    closes with the condensate's heat in it."""
    result = solve(parse_worksheet(air_sheet(30, 20, {"relative_humidity": 0.7}, duty="-30 kW")))
    T2 = result.answer.value_si - 273.15
    assert T2 < psychrolib.GetTDewPointFromRelHum(30, 0.7)
    W1 = psychrolib.GetHumRatioFromRelHum(30, 0.7, P_ATM)
    assert psychrolib_duty(30, T2, W1, 1.0)[0] == pytest.approx(-30e3, rel=0.01)
    assert result.humid_air[0].condensate > 0


def test_sample_air_heater_by_hand():
    """Our sample: 20,000 m³/h of −5 °C, 80 % air to 25 °C on 3 barg steam. Hand check with psychrolib:
    v = 0.7617 m³/kg dry air, 26,257 kg/h; Δh = 30.29 kJ/kg dry air; 220.9 kW; steam h_fg at 4.013 bar(a)
    = 2133 kJ/kg (IAPWS-IF97, from memory) -> 372.9 kg/h."""
    with open("sample_data/humid_air_heater_steam.json", encoding="utf-8") as handle:
        result = solve(parse_worksheet(json.load(handle)))
    W = psychrolib.GetHumRatioFromRelHum(-5, 0.8, P_ATM)
    dry = 20000 / 3600 / psychrolib.GetMoistAirVolume(-5, W, P_ATM)
    duty = dry * (psychrolib.GetMoistAirEnthalpy(25, W) - psychrolib.GetMoistAirEnthalpy(-5, W))
    assert result.humid_air[0].dry_air == pytest.approx(dry, rel=0.003)
    assert result.lines[0].total == pytest.approx(duty, rel=0.005)
    assert result.answer.value_si * 3600 == pytest.approx(372.9, rel=0.005)
    assert result.humid_air[0].condensate == 0


def test_report_json_and_table():
    result = solve(parse_worksheet(air_sheet(30, 14, {"relative_humidity": 0.8})))
    text = format_result(result)
    assert "HUMID AIR" in text and "below its dew point: condensate" in text
    assert "saturated air + condensate" in text
    data = result_json(result)
    assert data["humid_air"][0]["condensate"] == pytest.approx(result.humid_air[0].condensate)
    row = humid_air_rows(result, "US")[0]
    assert row["condensate"].endswith("lb/h") and row["RH out"] == "100%"


def test_humidity_has_an_address_and_can_be_set():
    ws = parse_worksheet(air_sheet(30, 14, {"relative_humidity": 0.8}))
    listed = {i.address: i for i in address.inputs(ws)}
    assert listed["streams[Air].inlet.humidity.relative_humidity"].value == 0.8
    drier = address.with_value(ws, "streams[Air].inlet.humidity.relative_humidity", 0.3)
    assert solve(drier).humid_air[0].condensate == 0  # 30 °C, 30 %: dew point 10.5 °C, below 14 °C
    as_dew = address.with_value(ws, "streams[Air].inlet.humidity.dew_point", "10 degC")
    assert as_dew.streams[0].inlet.humidity.relative_humidity is None


# --------------------------------------------------------------------------- refusals, by address
@pytest.mark.parametrize("humidity, where, message", [
    ({"relative_humidity": 1.2}, "streams[Air].inlet.humidity.relative_humidity",
     "a relative humidity lies between 0 and 1 (0 to 100 %), not 1.2"),
    ({"dew_point": "35 degC"}, "streams[Air].inlet.humidity.dew_point",
     "the dew point (35.00 °C) cannot be above the dry-bulb temperature (30.00 °C)"),
    ({"wet_bulb": "31 degC"}, "streams[Air].inlet.humidity.wet_bulb",
     "the wet bulb (31.00 °C) cannot be above the dry-bulb temperature (30.00 °C)"),
    ({"humidity_ratio": 0.05}, "streams[Air].inlet.humidity.humidity_ratio",
     "a humidity ratio lies between 0 and saturation (0.0273"),  # psychrolib: 0.02732
])
def test_refusals_of_the_humidity(humidity, where, message):
    with pytest.raises(InputError) as caught:
        solve(parse_worksheet(air_sheet(30, 14, humidity)))
    assert caught.value.where == where
    assert message in caught.value.message


def _refused(sheet) -> InputError:
    with pytest.raises(InputError) as caught:
        solve(parse_worksheet(sheet))
    return caught.value


def test_refusals_of_the_line():
    no_humidity = air_sheet(30, 14, None)
    no_humidity["streams"][0]["inlet"].pop("humidity")
    error = _refused(no_humidity)
    assert error.where == "streams[Air].inlet.humidity" and "humid air needs the inlet's humidity" in error.message

    outlet = air_sheet(30, 14, {"relative_humidity": 0.5})
    outlet["streams"][0]["outlet"]["humidity"] = {"relative_humidity": 1.0}
    error = _refused(outlet)
    assert error.where == "streams[Air].outlet.humidity" and "follows from the inlet's" in error.message

    both = air_sheet(30, 14, {"relative_humidity": 0.5}, air_flow={"volume_flow": "100 m^3/h"})
    error = _refused(both)
    assert error.where == "streams[Air].air_flow.volume_flow" and "give the flow one way" in error.message

    by_volume = air_sheet(30, 14, {"dew_point": "20 degC"}, flow=None, duty="-5 kW",
                          air_flow={"volume_flow": "1000 m^3/h"})
    by_volume["unknowns"] = [{"kind": "temperature", "line": "Air", "end": "inlet"}]
    error = _refused(by_volume)  # the inlet is solved for: the volume's temperature must be given
    assert error.where == "streams[Air].air_flow.volume_temperature"

    unknown_inlet = air_sheet(30, 14, {"relative_humidity": 0.5}, duty="-5 kW")
    unknown_inlet["unknowns"] = [{"kind": "temperature", "line": "Air", "end": "inlet"}]
    error = _refused(unknown_inlet)
    assert error.where == "streams[Air].inlet.humidity.relative_humidity"
    assert "needs the inlet's temperature" in error.message

    water = air_sheet(30, 14, {"relative_humidity": 0.5})
    water["streams"][0]["material"] = "water"
    error = _refused(water)
    assert error.where == "streams[Air].inlet.humidity" and "a humidity belongs to humid air" in error.message

    vessel = {"basis": {"kind": "batch"}, "vessels": [{"name": "Room", "final": {"temperature": "20 degC"},
              "charges": [{"name": "Air", "material": "humid air", "mass": "100 kg",
                           "initial": {"temperature": "10 degC"}}]}],
              "duties": [{"name": "Heat"}], "unknowns": [{"kind": "duty", "term": "Heat"}]}
    error = _refused(vessel)
    assert error.where == "vessels[Room].charges[Air].material" and "humid air is modelled for streams" in error.message


def test_two_humidity_forms_refused_in_the_document():
    with pytest.raises(WorksheetFormatError) as caught:
        parse_worksheet(air_sheet(30, 14, {"relative_humidity": 0.5, "dew_point": "10 degC"}))
    assert caught.value.where == "streams[Air].inlet.humidity"
    assert "give the humidity one way" in caught.value.message


@pytest.mark.parametrize("axis", [
    Axis("streams[Outdoor air].inlet.temperature", (-20.0, -5.0, 10.0), "degC"),
    Axis("streams[Outdoor air].pressure", (-0.05, 0.0, 0.2), "barg"),
    Axis("streams[Outdoor air].inlet.humidity.relative_humidity", (0.2, 1.0), ""),
], ids=lambda a: a.address)
def test_a_sweep_of_the_inlet_equals_solving_each_point(axis):
    """The inlet's temperature and pressure set its humidity ratio (from RH) and dry-air flow (from the volume):
    a sweep's point must be what the public solve gives at that value."""
    with open("sample_data/humid_air_heater_steam.json", encoding="utf-8") as handle:
        ws = parse_worksheet(json.load(handle))
    frame = sweep(ws, [axis], ["answer"])
    for value, answer in zip(frame[axis.column], frame["answer"]):
        typed = value if axis.unit == "" else (value, axis.unit)
        expected = solve_and_analyse(address.with_value(ws, axis.address, typed)).answer.value_si
        assert answer == pytest.approx(expected, rel=1e-9)


def test_calculation_sheet_carries_the_humid_air_table():
    """The filed PDF (read back with pypdf) shows the humid-air table with the condensate."""
    import io

    import pypdf

    from heatbalance.present.sheet import sheet_pdf_bytes

    ws = parse_worksheet(air_sheet(30, 14, {"relative_humidity": 0.8}))
    pdf = sheet_pdf_bytes(ws, solve_and_analyse(ws))
    text = " ".join(" ".join((p.extract_text() or "").split()) for p in pypdf.PdfReader(io.BytesIO(pdf)).pages)
    assert "Humid air (per kg of dry air)" in text and "condensate" in text
