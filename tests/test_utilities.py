"""Which utility, and what does it cost (issue 11): flows cross-checked with IAPWS-IF97 (iapws, independent of
CoolProp), feasibility refused with the reason and the address, cost and CO2 arithmetic by hand."""
from __future__ import annotations

import pytest
from iapws import IAPWS97

from heatbalance.address import inputs, rename
from heatbalance.analyses import solve_and_analyse
from heatbalance.analyses.utilities import DEMO_UTILITIES, Demand, demo_utilities, utility_option
from heatbalance.errors import InputError, WorksheetFormatError
from heatbalance.problem import build_problem
from heatbalance.worksheet import dump_worksheet, load_worksheet, parse_worksheet

C0 = 273.15
ATM = 0.101325  # MPa


def _heater(utilities, hours="8000 h", **more):
    """Our scenario: 36 t/h of water heated 20 -> 80 °C by a heater duty (the unknown)."""
    doc = {"streams": [{"name": "Water", "material": "water", "flow": "36 t/h", "pressure": "3 barg",
                        "inlet": {"temperature": "20 degC"}, "outlet": {"temperature": "80 degC"}}],
           "duties": [{"name": "Heater"}], "unknowns": [{"kind": "duty", "term": "Heater"}],
           "utilities": utilities, "operating_hours": hours}
    doc.update(more)
    return doc


def _cooler(utilities, outlet="45 degC", hours="8000 h"):
    """Our scenario: 10 t/h of water cooled 90 °C -> outlet by a cooler duty."""
    return {"streams": [{"name": "Hot water", "material": "water", "flow": "10 t/h", "pressure": "3 barg",
                         "inlet": {"temperature": "90 degC"}, "outlet": {"temperature": outlet}}],
            "duties": [{"name": "Cooler"}], "unknowns": [{"kind": "duty", "term": "Cooler"}],
            "utilities": utilities, "operating_hours": hours}


def test_steam_flow_with_subcooled_condensate_matches_iapws():
    steam = {"name": "LP", "kind": "steam", "pressure": "4 barg", "condensate_temperature": "120 degC",
             "price": 28, "per": "t", "co2_kg_per_GJ": 70}
    result = solve_and_analyse(parse_worksheet(_heater([steam])))
    (table,) = result.utilities
    (option,) = table.options
    assert option.feasible
    P = 0.4 + ATM  # MPa absolute
    per_kg = (IAPWS97(P=P, x=1).h - IAPWS97(P=P, T=120 + C0).h) * 1e3  # IAPWS-IF97 via iapws, J/kg
    assert option.per_kg == pytest.approx(per_kg, rel=2e-5)
    duty = result.answer.value_si
    assert option.flow == pytest.approx(duty / per_kg, rel=2e-5)
    assert option.supply_T == pytest.approx(IAPWS97(P=P, x=0).T, abs=0.01)
    # flash of the 120 °C condensate let down to the atmosphere: (h - h_f) / h_fg at 1.01325 bar, iapws
    h_f, h_g = IAPWS97(P=ATM, x=0).h, IAPWS97(P=ATM, x=1).h
    flash = (IAPWS97(P=P, T=120 + C0).h - h_f) / (h_g - h_f)
    assert option.flash_fraction == pytest.approx(flash, rel=1e-3)
    # cost by hand: t/h × price; per year × 8000 h; CO2 = 70 kg/GJ × GJ/h × 8000 h
    t_per_h = option.flow * 3.6
    assert option.cost_per_hour == pytest.approx(t_per_h * 28, rel=1e-12)
    assert option.cost_per_year == pytest.approx(t_per_h * 28 * 8000, rel=1e-12)
    assert option.co2_per_year == pytest.approx(70 * duty * 3600 / 1e9 * 8000, rel=1e-12)


def test_superheated_steam_adds_its_superheat():
    steam = {"name": "MP", "kind": "steam", "pressure": "12 barg", "superheat": "20 K"}
    option = solve_and_analyse(parse_worksheet(_heater([steam]))).utilities[0].options[0]
    P = 1.2 + ATM
    T_sat = IAPWS97(P=P, x=1).T
    per_kg = (IAPWS97(P=P, T=T_sat + 20).h - IAPWS97(P=P, x=0).h) * 1e3  # saturated condensate, iapws
    assert option.per_kg == pytest.approx(per_kg, rel=5e-5)


def test_cooling_water_flow_from_if97_between_supply_and_return_limit():
    cw = {"name": "CW", "kind": "cooling water", "supply_temperature": "27 degC", "return_limit": "40 degC",
          "price": 0.05, "per": "t", "co2_kg_per_GJ": 1.5}
    result = solve_and_analyse(parse_worksheet(_cooler([cw])))
    option = result.utilities[0].options[0]
    P = 0.3 + ATM  # the coolant's loop pressure, 3 barg (stated in problem.py)
    per_kg = (IAPWS97(P=P, T=40 + C0).h - IAPWS97(P=P, T=27 + C0).h) * 1e3
    duty = -result.answer.value_si
    assert option.return_T == pytest.approx(40 + C0)
    assert option.flow == pytest.approx(duty / per_kg, rel=2e-5)
    assert option.cost_per_hour == pytest.approx(option.flow * 3.6 * 0.05, rel=1e-12)  # by hand: t/h × price


def test_cooling_water_cannot_cool_below_supply_plus_approach():
    cw = {"name": "CW", "kind": "cooling water", "supply_temperature": "27 degC", "return_limit": "40 degC"}
    option = solve_and_analyse(parse_worksheet(_cooler([cw], outlet="30 degC"))).utilities[0].options[0]
    assert not option.feasible and option.flow is None and option.cost_per_hour is None
    assert option.refusal.where == "utilities[CW].supply_temperature"
    assert "cannot cool the process below 37.0 °C" in option.refusal.message


def test_steam_too_cold_for_the_target_refused_with_the_pressure():
    steam = {"name": "Low", "kind": "steam", "pressure": "0.2 barg"}  # condenses near 105 °C
    doc = _heater([steam])
    doc["streams"][0]["outlet"] = {"temperature": "100 degC"}
    option = solve_and_analyse(parse_worksheet(doc)).utilities[0].options[0]
    assert not option.feasible
    assert option.refusal.where == "utilities[Low].pressure"
    assert "higher steam pressure" in option.refusal.message
    with pytest.raises(InputError) as info:  # called directly, the refusal is raised
        problem = build_problem(parse_worksheet(doc))
        utility_option(problem.utilities[0], Demand("duty", "duties[Heater].value", "heating", 1e5, 293.15, 373.15))
    assert info.value.where == "utilities[Low].pressure"


def test_per_GJ_and_per_MWh_prices_by_hand():
    electric = {"name": "E", "kind": "electric", "price": 120, "per": "MWh", "co2_kg_per_GJ": 65}
    chilled = {"name": "CHW", "kind": "chilled water", "supply_temperature": "6 degC", "return_limit": "14 degC",
               "price": 12, "per": "GJ"}
    heat = solve_and_analyse(parse_worksheet(_heater([electric])))
    duty = heat.answer.value_si  # W
    option = heat.utilities[0].options[0]
    assert option.flow is None and option.cost_per_hour == pytest.approx(duty / 1e6 * 120, rel=1e-12)  # MW × €/MWh
    assert option.co2_per_year == pytest.approx(65 * duty * 3600e-9 * 8000, rel=1e-12)
    cool = solve_and_analyse(parse_worksheet(_cooler([chilled])))
    assert cool.utilities[0].options[0].cost_per_hour == pytest.approx(-cool.answer.value_si * 3600e-9 * 12, rel=1e-12)


def test_without_operating_hours_no_annual_figures():
    cw = {"name": "CW", "kind": "cooling water", "supply_temperature": "27 degC", "return_limit": "40 degC"}
    doc = _cooler([cw])
    del doc["operating_hours"]
    option = solve_and_analyse(parse_worksheet(doc)).utilities[0].options[0]
    assert option.cost_per_hour is not None and option.cost_per_year is None and option.co2_per_year is None


def test_hot_utilities_for_heating_cold_for_cooling():
    result = solve_and_analyse(parse_worksheet(_heater(DEMO_UTILITIES)))
    assert [o.kind for o in result.utilities[0].options] == ["steam", "steam", "hot oil", "electric"]
    result = solve_and_analyse(parse_worksheet(_cooler(DEMO_UTILITIES)))
    assert [o.kind for o in result.utilities[0].options] == ["cooling water", "chilled water", "brine"]
    assert all(o.feasible for o in result.utilities[0].options)


@pytest.mark.parametrize("utility, where", [
    ({"name": "CW", "kind": "cooling water", "supply_temperature": "40 degC", "return_limit": "30 degC"},
     "utilities[CW].return_limit"),
    ({"name": "S", "kind": "steam", "pressure": "4 barg", "superheat": "-5 K"}, "utilities[S].superheat"),
    ({"name": "S", "kind": "steam", "pressure": "4 barg", "condensate_temperature": "160 degC"},
     "utilities[S].condensate_temperature"),
])
def test_bad_utility_inputs_refused_at_their_address(utility, where):
    try:
        result = solve_and_analyse(parse_worksheet(_heater([utility])))
    except InputError as exc:
        assert exc.where == where
        return
    (option,) = result.utilities[0].options
    assert not option.feasible and option.refusal.where == where


def test_utilities_stored_addressable_and_material_renames_follow():
    doc = _cooler(DEMO_UTILITIES)
    ws = parse_worksheet(doc)
    assert load_worksheet(dump_worksheet(ws)) == ws
    assert [u.name for u in demo_utilities()] == [u.name for u in ws.utilities]
    addresses = {i.address for i in inputs(ws)}
    assert {"utilities[Cooling water].supply_temperature", "utilities[LP steam 4 barg].pressure",
            "operating_hours"} <= addresses
    doc["materials"] = [{"name": "my brine", "phases": [{"name": "liquid", "cp": "3 kJ/(kg*K)"}],
                         "min_temperature": "-40 degC", "max_temperature": "60 degC", "source": "test"}]
    doc["utilities"] = [{"name": "B", "kind": "brine", "material": "my brine", "supply_temperature": "-10 degC",
                         "return_limit": "0 degC"}]
    renamed = rename(parse_worksheet(doc), "materials[my brine]", "glycol brine")
    assert renamed.utilities[0].material == "glycol brine"


def test_operating_hours_beyond_a_year_refused():
    with pytest.raises(InputError) as info:
        solve_and_analyse(parse_worksheet(_cooler([], hours="9000 h")))
    assert info.value.where == "operating_hours"


# --------------------------------------------------------------------------- a coolant's return limit
def _methanol_sample() -> dict:
    import json

    with open("sample_data/methanol_condenser_cooling_water.json", encoding="utf-8") as handle:
        return json.load(handle)


def test_rated_cooling_water_return_above_its_limit_is_loud():
    # The sample's condenser (UA 25 kW/K) over-delivers with the balance's 31.5 t/h of cooling water: the rating's
    # cooling-water outlet is the inlet plus the rated duty over the water's heat flow, above the 40 °C limit.
    result = solve_and_analyse(parse_worksheet(_methanol_sample()))
    (warning,) = [w for w in result.warnings if "RETURN LIMIT PASSED" in w.text]
    assert warning.address == "utilities[Cooling water].return_limit"
    rating = result.exchangers[0].rating
    cw = next(ln for ln in result.lines if ln.name == "Cooling water")
    P = cw.initial_P / 1e6  # MPa
    # IAPWS-IF97 via iapws: the water's enthalpy rise from 27 °C by the rated duty, solved for its temperature
    h_out = IAPWS97(P=P, T=27 + C0).h + rating.duty / cw.amount_si / 1e3
    T_out = IAPWS97(P=P, h=h_out).T
    assert rating.cold_outlet_T == pytest.approx(T_out, abs=0.01)
    assert 40.5 < T_out - C0 < 41.0  # about 40.7 °C
    assert f"{T_out - C0:.1f} °C" in warning.text and "40.0 °C" in warning.text
    assert "as the exchanger's UA rates it" in warning.text
    assert warning in result.exchangers[0].warnings  # shown with the exchanger (page, CLI) too


def test_balance_return_above_its_limit_is_loud_and_within_it_silent():
    doc = _methanol_sample()
    doc["exchangers"][0].pop("UA")  # no rating: only the balance's outlet is checked
    doc["streams"][1]["outlet"] = {"temperature": {"value": 44, "unit": "degC"}}
    result = solve_and_analyse(parse_worksheet(doc))
    (warning,) = [w for w in result.warnings if "RETURN LIMIT PASSED" in w.text]
    assert warning.address == "utilities[Cooling water].return_limit"
    assert "44.0 °C in the balance" in warning.text and "by 4.0 K" in warning.text  # hand: 44 − 40
    doc["streams"][1]["outlet"] = {"temperature": {"value": 38, "unit": "degC"}}
    result = solve_and_analyse(parse_worksheet(doc))
    assert not [w for w in result.warnings if "RETURN LIMIT" in w.text]


# --------------------------------------------------------------------------- a generic hot oil, cp(T) by Cragoe
def _cragoe_btu(t_F: float, s: float = 0.87) -> float:
    """Cragoe (1929), US Bureau of Standards Misc. Publ. 97, as in Kern, Process Heat Transfer (from memory):
    cp = (0.388 + 0.00045·t[°F]) / √s in Btu/(lb·°F), written out here in its own units."""
    return (0.388 + 0.00045 * t_F) / s ** 0.5


HOT_OIL = {"name": "Hot oil", "kind": "hot oil", "material": "mineral heat-transfer oil (generic)",
           "supply_temperature": "250 degC", "return_limit": "180 degC", "price": 16, "per": "GJ",
           "co2_kg_per_GJ": 68}


def test_hot_oil_flow_from_cragoes_correlation_by_hand():
    # 36 t/h of water 20 -> 80 °C (the heater scenario); the oil returns at its 180 °C limit (the process's coldest
    # 20 °C + 10 K is colder). cp is linear in T, so ∫cp dT = cp at the mid temperature 215 °C × 70 K (exact).
    result = solve_and_analyse(parse_worksheet(_heater([HOT_OIL])))
    (option,) = result.utilities[0].options
    assert option.feasible and option.kind == "hot oil"
    per_kg = _cragoe_btu(215 * 1.8 + 32) * 4186.8 * 70  # J/kg, hand calculation (1 Btu/(lb·°F) = 4186.8 J/(kg·K))
    assert option.per_kg == pytest.approx(per_kg, rel=1e-9)
    assert option.flow == pytest.approx(result.answer.value_si / per_kg, rel=1e-9)
    assert option.return_T - C0 == pytest.approx(180.0)
    assert option.cost_per_hour == pytest.approx(16 * result.answer.value_si * 3600 / 1e9, rel=1e-12)


def test_hot_oil_material_is_generic_sourced_and_refused_outside_its_range():
    from heatbalance.materials import catalogue, get_material

    oil = get_material("mineral heat-transfer oil (generic)")
    assert "Cragoe" in oil.source and "from memory" in oil.source
    info = next(m for m in catalogue() if m.name == oil.name)
    assert info.group == "generic correlation"
    # cp at 100 °C: (0.388 + 0.00045 × 212) / √0.87 = 0.5183 Btu/(lb·°F) = 2.170 kJ/(kg·K), hand calculation
    cp_100 = (oil.enthalpy(373.15 + 0.5, 1e5) - oil.enthalpy(373.15 - 0.5, 1e5))
    assert cp_100 == pytest.approx(_cragoe_btu(212) * 4186.8, rel=1e-9)
    assert oil.extrapolated(250 + C0) and not oil.extrapolated(150 + C0)  # published to 205 °C (from memory)
    too_hot = dict(HOT_OIL, supply_temperature="350 degC")  # beyond its 320 °C limit
    (option,) = solve_and_analyse(parse_worksheet(_heater([too_hot]))).utilities[0].options
    assert not option.feasible
    assert option.refusal.where == "utilities[Hot oil].supply_temperature"
    assert "320" in option.refusal.message


def test_hot_oil_too_cold_for_the_target_refused_with_its_supply():
    cool = dict(HOT_OIL, supply_temperature="85 degC", return_limit="60 degC")  # 85 °C < 80 °C + 10 K
    (option,) = solve_and_analyse(parse_worksheet(_heater([cool]))).utilities[0].options
    assert not option.feasible and option.refusal.where == "utilities[Hot oil].supply_temperature"


# --------------------------------------------------------------------------- condensate: flash recovered or lost
@pytest.mark.parametrize("condensate, flash_barg", [("flash recovered", None), ("flash lost", None),
                                                    ("flash recovered", 1.0)])
def test_flash_steam_recovered_or_lost_in_flow_and_cost_against_iapws(condensate, flash_barg):
    steam = {"name": "LP", "kind": "steam", "pressure": "4 barg", "price": 28, "per": "t", "co2_kg_per_GJ": 70,
             "condensate": condensate}
    if flash_barg is not None:
        steam["flash_pressure"] = f"{flash_barg} barg"
    result = solve_and_analyse(parse_worksheet(_heater([steam])))
    (option,) = result.utilities[0].options
    duty = result.answer.value_si
    # hand calculation with IAPWS-IF97 via iapws: saturated steam at 5.013 bar(a) condensing to saturated liquid,
    # the condensate let down to the flash pressure: x = (h_f(P) − h_f(P_flash)) / h_fg(P_flash)
    P, P_flash = 0.4 + ATM, (flash_barg or 0.0) / 10 + ATM  # MPa
    h_f, h_g = IAPWS97(P=P, x=0).h, IAPWS97(P=P, x=1).h
    h_f_flash, h_g_flash = IAPWS97(P=P_flash, x=0).h, IAPWS97(P=P_flash, x=1).h
    flow = duty / ((h_g - h_f) * 1e3)  # kg/s
    x = (h_f - h_f_flash) / (h_g_flash - h_f_flash)
    assert option.flow == pytest.approx(flow, rel=2e-5)  # the steam drawn is the same either way
    assert option.flash_fraction == pytest.approx(x, rel=1e-3)
    assert option.flash_flow == pytest.approx(flow * x, rel=1e-3)
    if condensate == "flash recovered":
        credit = flow * x * (h_g_flash - h_f_flash) * 1e3  # W of latent heat recovered
        assert option.flash_credit == pytest.approx(credit, rel=1e-3)
        share = 1 - credit / duty
    else:
        assert option.flash_credit is None
        share = 1.0
    assert option.cost_per_hour == pytest.approx(28 * flow * 3.6 * share, rel=1e-3)
    assert option.co2_per_year == pytest.approx(70 * duty * 3600 / 1e9 * 8000 * share, rel=1e-3)
    if flash_barg is None:
        assert 0.09 < x < 0.11  # about 10 % of 4 barg condensate flashes at the atmosphere (common practice)


def test_flash_pressure_not_below_the_steam_refused_and_flash_fields_only_for_steam():
    steam = {"name": "LP", "kind": "steam", "pressure": "4 barg", "condensate": "flash recovered",
             "flash_pressure": "5 barg"}
    (option,) = solve_and_analyse(parse_worksheet(_heater([steam]))).utilities[0].options
    assert not option.feasible and option.refusal.where == "utilities[LP].flash_pressure"
    assert "not below the steam's" in option.refusal.message
    cw = {"name": "CW", "kind": "cooling water", "supply_temperature": "27 degC", "return_limit": "40 degC",
          "condensate": "flash lost"}
    with pytest.raises(WorksheetFormatError) as info:  # the loader's refusal, at the utility
        parse_worksheet(_cooler([cw]))
    assert info.value.where.startswith("utilities[CW]") and "belong to a steam utility" in info.value.message
    assert "flash_pressure" in {i.address.rpartition(".")[2] for i in inputs(parse_worksheet(_heater([steam])))}


def test_steam_below_the_atmosphere_has_no_flash_and_an_impossible_credit_is_refused():
    vacuum = {"name": "VS", "kind": "steam", "pressure": "-0.5 barg", "condensate": "flash recovered"}
    doc = _heater([vacuum])
    doc["streams"][0]["outlet"] = {"temperature": "60 degC"}  # 81 °C steam heats to 60 °C with a 10 K approach
    (option,) = solve_and_analyse(parse_worksheet(doc)).utilities[0].options
    assert option.feasible and option.flash_fraction == 0.0 and option.flash_credit == 0.0
    # near the critical point the saturated condensate holds more heat above 100 °C than the steam gives on
    # condensing (IAPWS-IF97 via iapws at 210 bar: h_f − h_f,atm ≈ 1,480 kJ/kg > h_fg ≈ 450 kJ/kg)
    P = 21.0
    assert IAPWS97(P=P, x=0).h - IAPWS97(P=ATM, x=0).h > IAPWS97(P=P, x=1).h - IAPWS97(P=P, x=0).h
    high = {"name": "HP", "kind": "steam", "pressure": "209 barg", "condensate": "flash recovered"}
    (option,) = solve_and_analyse(parse_worksheet(_heater([high]))).utilities[0].options
    assert not option.feasible and option.refusal.where == "utilities[HP].condensate"


# --------------------------------------------------------------------------- the approach inside the process's range
def test_cooling_water_for_a_condensing_duty_keeps_the_approach_where_condensing_starts():
    from CoolProp.CoolProp import PropsSI

    doc = _methanol_sample()
    doc["streams"] = [doc["streams"][0]]  # methanol 1.5 t/h at 0.3 barg, superheated at 120 °C, to 50 °C liquid
    doc["streams"][0]["inlet"] = {"temperature": "120 degC"}
    doc.pop("exchangers")
    doc["duties"], doc["unknowns"] = [{"name": "Condenser"}], [{"kind": "duty", "term": "Condenser"}]
    doc["utilities"][0]["return_limit"] = "80 degC"
    result = solve_and_analyse(parse_worksheet(doc))
    (table,) = result.utilities
    water = next(o for o in table.options if o.utility == "Cooling water")
    # hand (CoolProp HEOS methanol, IAPWS-IF97 water via iapws): condensing starts at T_sat(1.313 bar) = 71.27 °C
    # with 91 % of the duty removed below it (from the 50 °C end); the water must stay 10 K under it there:
    # m = q(50 °C -> saturated vapour) / (h_w(61.27 °C) - h_w(27 °C)). The return limit alone (80 °C) gave
    # 8,479 kg/h, the water then at 75 °C where the methanol condenses at 71 °C: a temperature cross.
    P = 0.3e5 + 101325.0
    T_sat = PropsSI("T", "P", P, "Q", 1, "Methanol")
    q = 1500 / 3600 * (PropsSI("H", "P", P, "Q", 1, "Methanol") - PropsSI("H", "P", P, "T", 323.15, "Methanol"))
    w = (IAPWS97(T=T_sat - 10, P=0.101325).h - IAPWS97(T=300.15, P=0.101325).h) * 1e3
    assert water.feasible and water.flow == pytest.approx(q / w, rel=2e-3)
    assert water.flow * 3600 == pytest.approx(11_950, rel=2e-3)
    assert any("inside its range" in n.text and "71.3 °C" in n.text for n in water.notes)
    assert water.return_T < 273.15 + 80  # below its limit: the pinch, not the limit, sets the flow


def test_hot_oil_for_a_boiling_duty_keeps_the_approach_where_boiling_starts():
    oil = {**next(u for u in DEMO_UTILITIES if u["kind"] == "hot oil"), "return_limit": "60 degC"}
    doc = {"title": "boiler on hot oil", "streams": [
        {"name": "Water", "material": "water", "flow": "1 t/h", "pressure": "1 barg",
         "inlet": {"temperature": "20 degC"}, "outlet": {"vapour_fraction": 1.0}}],
        "duties": [{"name": "Boiler"}], "unknowns": [{"kind": "duty", "term": "Boiler"}], "utilities": [oil]}
    result = solve_and_analyse(parse_worksheet(doc))
    (option,) = [o for t in result.utilities for o in t.options if o.kind == "hot oil"]
    # the oil, 250 °C in, must stay 10 K above the water where it starts to boil (120.2 °C at 2.013 bar,
    # IAPWS-IF97): its flow is set there, above what its 60 °C return limit alone would give
    problem = build_problem(parse_worksheet(doc))
    water, hot_oil = problem.lines[0].material, problem.utilities[0].material
    T_boil = water.transitions(problem.lines[0].initial.P)[0]
    q_boil = 1000 / 3600 * (T_boil.h_upper - T_boil.h_lower)  # the heat from the start of boiling to the hot end
    P_oil = problem.utilities[0].P
    m_pinch = q_boil / (hot_oil.enthalpy(523.15, P_oil) - hot_oil.enthalpy(T_boil.T + 10, P_oil))  # hand calculation
    m_limit = result.answer.value_si / (hot_oil.enthalpy(523.15, P_oil) - hot_oil.enthalpy(333.15, P_oil))
    assert m_pinch > m_limit and option.flow == pytest.approx(m_pinch, rel=1e-6)


def test_a_utility_stream_outside_an_exchanger_is_held_to_its_return_limit():
    doc = _methanol_sample()
    doc.pop("exchangers")  # no exchanger, no utility side: the stream named like the site's cooling water
    doc["streams"][1]["outlet"] = {"temperature": "60 degC"}
    result = solve_and_analyse(parse_worksheet(doc))
    (warning,) = [w for w in result.warnings if w.text.startswith("RETURN LIMIT PASSED")]
    # 60 °C against the sample's 40 °C limit: 20 K above it (hand calculation)
    assert warning.address == "utilities[Cooling water].return_limit"
    assert "Cooling water leaves at 60.0 °C in the balance, above Cooling water's return limit of 40.0 °C (by 20.0 K)" \
        in warning.text
    doc["streams"][1]["outlet"] = {"temperature": "38 degC"}
    assert not [w for w in solve_and_analyse(parse_worksheet(doc)).warnings if "RETURN LIMIT" in w.text]
