"""Humid air cooled below its dew point (heatbalance.humid_air): the saturated outlet is solved, never refused by the
round-off of its relative humidity, with condensate and duty checked against CoolProp's HAPropsSI called directly;
air truly above saturation is still refused, at the field's address."""
import math

import pytest
from CoolProp.CoolProp import PropsSI
from CoolProp.HumidAirProp import HAPropsSI

from heatbalance.analyses.sweep import Axis, axis_values, sweep
from heatbalance.balance import solve
from heatbalance.errors import InputError
from heatbalance.humid_air import RH_ROUND_OFF, HumidAir, humid_air_line, relative_humidity, saturation_ratio
from heatbalance.worksheet import parse_worksheet

P_ATM = 101325.0  # Pa, 1 atm
T_IN, RH_IN = 303.15, 0.6  # 30 °C, 60 % RH
DRY_AIR = 5000.0 / 3600.0  # kg/s of dry air
T_TRIPLE = 273.16  # K (IAPWS)


def coil_sheet(outlet_C):
    """A cooling coil: 5,000 kg/h of dry air at 30 °C / 60 % RH, 1 atm, cooled to ``outlet_C``; its duty unknown."""
    return {"schema_version": 1, "title": "Cooling coil below the dew point", "basis": {"kind": "continuous"},
            "streams": [{"name": "Air", "material": "humid air", "pressure": {"value": 0, "unit": "barg"},
                         "flow": {"value": 5000, "unit": "kg/h"},
                         "inlet": {"temperature": {"value": 30, "unit": "degC"},
                                   "humidity": {"relative_humidity": RH_IN}},
                         "outlet": {"temperature": {"value": outlet_C, "unit": "degC"}}}],
            "duties": [{"name": "Coil"}], "unknowns": [{"kind": "duty", "term": "Coil"}]}


def condensate_enthalpy(T):
    """Enthalpy of the condensate [J/kg], IAPWS-IF97 liquid (zero at the triple point) via CoolProp PropsSI; below
    0 °C ice: h_ice = −333.4 + 2.1·t kJ/kg relative to the liquid at 0 °C (ASHRAE psychrometrics, from memory)."""
    if T >= T_TRIPLE:
        return PropsSI("H", "T", T, "Q", 0, "IF97::Water")
    return PropsSI("H", "T", T_TRIPLE, "Q", 0, "IF97::Water") + (-333.4e3 + 2.1e3 * (T - 273.15))


def reference(T_out):
    """Condensate [kg/s] and coil duty [W, cooling < 0] from HAPropsSI directly: W1 at the inlet, W2 saturated at the
    outlet, h per kg of dry air; duty = m·[h2 + (W1 − W2)·h_condensate(T2) − h1] (hand calculation)."""
    W1 = HAPropsSI("W", "T", T_IN, "P", P_ATM, "R", RH_IN)
    W2 = HAPropsSI("W", "T", T_out, "P", P_ATM, "R", 1.0)
    h1 = HAPropsSI("H", "T", T_IN, "P", P_ATM, "W", W1)
    h2 = HAPropsSI("H", "T", T_out, "P", P_ATM, "W", W2)
    return DRY_AIR * (W1 - W2), DRY_AIR * (h2 + (W1 - W2) * condensate_enthalpy(T_out) - h1)


@pytest.mark.parametrize("outlet_C", [
    pytest.param(13.0, id="coil-13C"),
    pytest.param(14.5, id="coil-14.5C"),
    pytest.param(5.0, id="coil-5C"),
    pytest.param(-1.0, id="frost-minus1C"),
    pytest.param(-2.0, id="frost-minus2C"),
    pytest.param(-3.0, id="frost-minus3C"),
    pytest.param(-4.0, id="frost-minus4C"),
    pytest.param(-10.0, id="frost-minus10C"),
])
def test_coil_below_the_dew_point_solves(outlet_C):
    T_out = outlet_C + 273.15
    result = solve(parse_worksheet(coil_sheet(outlet_C)))
    line = result.humid_air[0]
    condensate, duty = reference(T_out)
    assert line.W_in == pytest.approx(HAPropsSI("W", "T", T_IN, "P", P_ATM, "R", RH_IN), rel=1e-6)
    assert line.W_out == pytest.approx(HAPropsSI("W", "T", T_out, "P", P_ATM, "R", 1.0), rel=1e-6)
    assert line.rh_out == 1.0  # saturated
    assert line.condensate == pytest.approx(condensate, rel=0.005)
    assert result.answer.value_si == pytest.approx(duty, rel=0.005)
    assert result.answer.value_si < 0
    assert result.lines[0].final_phase.startswith("saturated air + " + ("frost" if outlet_C < 0 else "condensate"))


def test_a_sweep_of_the_outlet_through_the_dew_point_has_no_refused_point():
    """5 → 25 °C in 0.5 K steps crosses the inlet's dew point (≈ 21.4 °C, HAPropsSI): every point solves, and each
    point below it matches the HAPropsSI hand calculation."""
    ws = parse_worksheet(coil_sheet(20.0))
    axis = Axis("streams[Air].outlet.temperature", axis_values(5.0, 25.0, count=41), "degC")
    frame = sweep(ws, [axis], ["answer"])
    assert len(frame) == 41
    refused = frame[frame["refused at"].astype(str).str.len() > 0]
    assert refused.empty, refused[["refused at", "reason"]].to_string()
    dew = HAPropsSI("D", "T", T_IN, "P", P_ATM, "R", RH_IN)
    for value, answer in zip(frame[axis.column], frame["answer"]):
        T_out = value + 273.15
        if T_out < dew - 0.01:
            assert answer == pytest.approx(reference(T_out)[1], rel=0.005)
        else:  # no condensate: sensible cooling at constant W (hand calculation from HAPropsSI)
            W1 = HAPropsSI("W", "T", T_IN, "P", P_ATM, "R", RH_IN)
            sensible = DRY_AIR * (HAPropsSI("H", "T", T_out, "P", P_ATM, "W", W1)
                                  - HAPropsSI("H", "T", T_IN, "P", P_ATM, "W", W1))
            assert answer == pytest.approx(sensible, rel=0.005)


@pytest.mark.parametrize("T", [268.15, 271.15, 273.15, 278.15, 286.15, 287.65, 303.15])
def test_relative_humidity_at_saturation_is_one(T):
    """HAPropsSI refuses R a round-off above 1 even at its own saturation ratio: such air is saturated, 1."""
    W_s = HAPropsSI("W", "T", T, "P", P_ATM, "R", 1.0)
    for W in (W_s, W_s * (1 + 1e-12), W_s * (1 + 1e-9), W_s * (1 - 1e-12)):
        assert relative_humidity(T, P_ATM, W) == 1.0
    assert relative_humidity(T, P_ATM, HAPropsSI("W", "T", T, "P", P_ATM, "R", 0.5)) == pytest.approx(0.5, rel=1e-9)


def test_air_beyond_saturation_is_still_refused_at_its_address():
    T = 286.15
    W_s = saturation_ratio(T, P_ATM)
    too_wet = W_s * (1 + 100 * RH_ROUND_OFF)
    with pytest.raises(InputError, match=r"more than at saturation") as caught:
        relative_humidity(T, P_ATM, too_wet, "streams[Air].outlet.temperature")
    assert caught.value.address == "streams[Air].outlet.temperature"
    assert "relative humidity 1.0001" in caught.value.message


def test_a_refusal_of_the_water_side_names_the_line_end_not_the_command():
    """A humid-air line's water side is worked out after the solve: a refusal there names the end's temperature."""
    with pytest.raises(InputError) as caught:
        humid_air_line("Air", "streams[Air]", HumidAir(0.01), 1.0, 303.15, P_ATM, 303.15, 1.0)  # 1 Pa: no data
    assert caught.value.address == "streams[Air].outlet.temperature"
    with pytest.raises(InputError) as caught:
        humid_air_line("Air", "streams[Air]", HumidAir(0.01), 1.0, 303.15, 1.0, 303.15, P_ATM)
    assert caught.value.address == "streams[Air].inlet.temperature"


def test_dew_point_of_saturated_inlet_is_its_temperature():
    """Saturated inlet air (RH 1): its dew point is its dry bulb (HAPropsSI's D at W_s comes out a round-off above)."""
    sheet = coil_sheet(10.0)
    sheet["streams"][0]["inlet"]["humidity"] = {"relative_humidity": 1.0}
    line = solve(parse_worksheet(sheet)).humid_air[0]
    assert line.dew_point_in <= T_IN and math.isclose(line.dew_point_in, T_IN, abs_tol=1e-6)
    assert line.rh_in == 1.0
