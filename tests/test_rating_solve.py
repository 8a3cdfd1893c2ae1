"""Rating as a way of solving (issue 11 item 4): an exchanger's UA sets one more input so that the duty it delivers
(ε-NTU per zone) closes the balance. References are named beside each value.
"""
from __future__ import annotations

import math

import pytest
from sheet_factory import constant_cp_material

from heatbalance.address import rename, with_unknown
from heatbalance.analyses import solve_and_analyse
from heatbalance.analyses.sweep import Axis, sweep
from heatbalance.errors import InputError, NoSolutionError
from heatbalance.present.report import format_result, result_json
from heatbalance.worksheet import parse_worksheet

C0 = 273.15
INCROPERA_AREA = math.pi * 0.025 * 65.9  # m²: Incropera Example 11.1's 65.9 m of 25 mm tube (from memory)


def _counterflow_effectiveness(NTU: float, Cr: float) -> float:
    """Counter-flow ε(NTU, C_r), Incropera eq. 11.29a (Kays & London), written out here (independent of ht)."""
    if abs(1 - Cr) < 1e-12:
        return NTU / (1 + NTU)
    return (1 - math.exp(-NTU * (1 - Cr))) / (1 - Cr * math.exp(-NTU * (1 - Cr)))


def _oil_cooler(**exchanger) -> dict:
    """Incropera & DeWitt, Fundamentals of Heat and Mass Transfer, Example 11.1 (from memory): engine oil 0.1 kg/s,
    cp 2131 J/(kg·K), enters at 100 °C; water 0.2 kg/s, cp 4178 J/(kg·K), enters at 30 °C; U = 38.1 W/(m²·K);
    counter-flow. The book designs it for an oil outlet of 60 °C: q = 8524 W, water out 40.2 °C, L = 65.9 m."""
    return {"materials": [constant_cp_material("oil", 2131, "J/(kg*K)", t_max=400), constant_cp_material("cw", 4178, "J/(kg*K)", t_max=400)],
            "streams": [{"name": "Oil", "material": "oil", "flow": "0.1 kg/s", "inlet": {"temperature": "100 degC"},
                         "outlet": {"temperature": "80 degC"}},  # a wrong guess: the rating sets it
                        {"name": "Water", "material": "cw", "flow": "0.2 kg/s", "inlet": {"temperature": "30 degC"},
                         "outlet": {"temperature": "35 degC"}}],
            "exchangers": [{"name": "E-1", "hot": ["Oil"], "cold": ["Water"], "U": "38.1 W/(m^2*K)",
                            "area": f"{INCROPERA_AREA} m^2", "sets": "streams[Oil].outlet.temperature", **exchanger}],
            "unknowns": [{"kind": "temperature", "line": "Water", "end": "outlet"}]}


def test_rating_the_incropera_oil_cooler_gives_back_its_design_outlets():
    # Rating the unit the book designed (UA = 38.1 × π·0.025·65.9) must give back the book's outlets.
    result = solve_and_analyse(parse_worksheet(_oil_cooler()))
    closure = result.rating_closure
    assert closure.address == "streams[Oil].outlet.temperature" and closure.kind == "temperature"
    assert closure.value - C0 == pytest.approx(60.0, abs=0.1)  # Incropera Ex. 11.1: oil designed to leave at 60 °C
    assert result.answer.value_si - C0 == pytest.approx(40.2, abs=0.05)  # Incropera Ex. 11.1: water out 40.2 °C
    assert closure.rated_duty == pytest.approx(8524, rel=2e-3)  # Incropera Ex. 11.1: q = 8524 W (L rounded)
    # and exactly the closed form: C_min = 213.1 W/K (oil), C_r = 213.1 / 835.6, NTU = UA / C_min
    UA, C_oil, C_water = 38.1 * INCROPERA_AREA, 0.1 * 2131, 0.2 * 4178
    q = _counterflow_effectiveness(UA / C_oil, C_oil / C_water) * C_oil * (100 - 30)  # hand calculation
    assert closure.rated_duty == pytest.approx(q, rel=1e-7)
    assert closure.balance_duty == pytest.approx(q, rel=1e-7)
    assert closure.value - C0 == pytest.approx(100 - q / C_oil, abs=1e-5)
    assert result.answer.value_si - C0 == pytest.approx(30 + q / C_water, abs=1e-5)
    assert abs(result.residual) <= 1e-6 * q  # the result is an ordinary closed balance
    check = result.exchangers[0]
    assert check.closure is closure and check.rating.duty == pytest.approx(q, rel=1e-6)
    assert "TOO SMALL" not in check.rating.verdict.text  # it delivers exactly the balance's duty
    assert "set by the rating of E-1" in check.notes[0].text and f"{closure.value - C0:.2f} °C" in check.notes[0].text
    text = format_result(result)
    assert "set by the rating: streams[Oil].outlet.temperature = 60.0" in text
    assert result_json(result)["rating_closure"]["value"] == closure.value


def test_rating_sets_a_flow_the_exchanger_needs_for_a_target():
    # Our scenario: hot 1 kg/s, cp 1000 J/(kg·K), 150 -> 90 °C (60 kW, fixed by its typed outlet); cold cp 2000 from
    # 30 °C; UA 2 kW/K. The rating sets the cold flow, the balance solves the cold outlet.
    doc = {"materials": [constant_cp_material("a", 1000, "J/(kg*K)", t_max=400), constant_cp_material("b", 2000, "J/(kg*K)", t_max=400)],
           "streams": [{"name": "Hot", "material": "a", "flow": "1 kg/s", "inlet": {"temperature": "150 degC"},
                        "outlet": {"temperature": "90 degC"}},
                       {"name": "Cold", "material": "b", "flow": "1 kg/s", "inlet": {"temperature": "30 degC"},
                        "outlet": {"temperature": "60 degC"}}],
           "exchangers": [{"name": "E-1", "hot": ["Hot"], "cold": ["Cold"], "UA": "2 kW/K",
                           "sets": "streams[Cold].flow"}],
           "unknowns": [{"kind": "temperature", "line": "Cold", "end": "outlet"}]}
    result = solve_and_analyse(parse_worksheet(doc))
    m = result.rating_closure.value
    C_cold = m * 2000
    C_min, C_max = min(1000, C_cold), max(1000, C_cold)
    q = _counterflow_effectiveness(2000 / C_min, C_min / C_max) * C_min * 120  # hand calculation at the flow found
    assert q == pytest.approx(60e3, rel=1e-7)  # the exchanger delivers what the hot side's target needs
    assert result.answer.value_si - C0 == pytest.approx(30 + 60e3 / C_cold, abs=1e-5)
    assert result.answer.value_si - C0 < 150  # the cold outlet (≈ 138 °C at ≈ 0.28 kg/s) stays below the hot inlet


def test_rating_ending_on_a_condensing_plateau_is_refused_at_sets():
    # Our scenario: a vapour (1 kg/s, condensing at 80 °C, latent 400 kJ/kg; liquid cp 2000, vapour cp 1000 J/(kg·K))
    # enters at 120 °C against water 5 kg/s (cp 4000) from 20 °C, UA 3 kW/K: the unit delivers more than the
    # 40 kW of desuperheating and far less than the 440 kW to condense it all, so its outlet would be part
    # condensed at 80 °C: no outlet temperature says that.
    vapour = {"name": "v", "source": "constant cp of a test scenario", "min_temperature": "-50 degC",
              "max_temperature": "400 degC", "phases": [
                  {"name": "liquid", "cp": "2000 J/(kg*K)", "up_to": "80 degC", "latent_heat": "400 kJ/kg"},
                  {"name": "vapour", "cp": "1000 J/(kg*K)"}]}
    doc = {"materials": [vapour, constant_cp_material("w", 4000, "J/(kg*K)", t_max=400)],
           "streams": [{"name": "Vapour", "material": "v", "flow": "1 kg/s", "inlet": {"temperature": "120 degC"},
                        "outlet": {"temperature": "50 degC"}},
                       {"name": "Water", "material": "w", "flow": "5 kg/s", "inlet": {"temperature": "20 degC"},
                        "outlet": {"temperature": "45 degC"}}],
           "exchangers": [{"name": "E-1", "hot": ["Vapour"], "cold": ["Water"], "UA": "3 kW/K",
                           "sets": "streams[Vapour].outlet.temperature"}],
           "unknowns": [{"kind": "temperature", "line": "Water", "end": "outlet"}]}
    with pytest.raises(NoSolutionError) as info:
        solve_and_analyse(parse_worksheet(doc))
    assert info.value.where == "exchangers[E-1].sets"
    assert "changes phase" in info.value.message and "80.0 °C" in info.value.message


@pytest.mark.parametrize("change, where, words", [
    ({"UA": "0 kW/K", "U": None, "area": None}, "exchangers[E-1].UA", "must be positive"),
    ({"UA": "-5 W/K", "U": None, "area": None}, "exchangers[E-1].UA", "must be positive"),
    ({"area": None}, "exchangers[E-1].UA", "give its UA"),
    ({"sets": "streams[Water].outlet.temperature"}, "exchangers[E-1].sets", "is the worksheet's unknown"),
    ({"sets": "streams[Oil].pressure"}, "exchangers[E-1].sets", "is not a temperature or a flow"),
])
def test_bad_rating_inputs_refused_at_their_address(change, where, words):
    doc = _oil_cooler()
    exchanger = {k: v for k, v in {**doc["exchangers"][0], **change}.items() if v is not None}
    doc["exchangers"] = [exchanger]
    with pytest.raises(InputError) as info:
        solve_and_analyse(parse_worksheet(doc))
    assert info.value.where == where and words in info.value.message


def test_hot_side_colder_than_cold_side_refused_at_hot():
    doc = _oil_cooler()
    doc["streams"][0]["inlet"] = {"temperature": "25 degC"}  # the oil now enters colder than the water
    doc["streams"][0]["outlet"] = {"temperature": "20 degC"}
    with pytest.raises(NoSolutionError) as info:
        solve_and_analyse(parse_worksheet(doc))
    assert info.value.where == "exchangers[E-1].hot" and "not hotter than its cold inlet" in info.value.message


def test_a_second_closing_exchanger_and_the_unknown_moved_onto_sets_are_refused():
    doc = _oil_cooler()
    doc["exchangers"].append({**doc["exchangers"][0], "name": "E-2", "sets": "streams[Water].flow"})
    with pytest.raises(InputError) as info:
        solve_and_analyse(parse_worksheet(doc))
    assert info.value.where == "exchangers[E-2].sets"
    ws = with_unknown(parse_worksheet(_oil_cooler()), "streams[Oil].outlet.temperature", ("40", "degC"))
    with pytest.raises(InputError) as info:
        solve_and_analyse(ws)
    assert info.value.where == "exchangers[E-1].sets"


def test_sets_follows_a_rename_and_a_sweep_closes_every_point():
    ws = rename(parse_worksheet(_oil_cooler()), "streams[Oil]", "Engine oil")
    assert ws.exchangers[0].sets == "streams[Engine oil].outlet.temperature"
    frame = sweep(ws, [Axis("streams[Engine oil].inlet.temperature", (90.0, 100.0), "degC")],
                  ["answer", "residual"])
    assert list(frame["refused at"]) == ["", ""]
    UA, C_oil, C_water = 38.1 * INCROPERA_AREA, 0.1 * 2131, 0.2 * 4178
    eps = _counterflow_effectiveness(UA / C_oil, C_oil / C_water)  # hand calculation, as above
    for T_in, T_out in zip((90.0, 100.0), frame["answer"]):
        assert T_out - C0 == pytest.approx(30 + eps * C_oil * (T_in - 30) / C_water, abs=1e-5)


def test_an_input_that_cannot_reach_the_rated_duty_is_refused_at_sets():
    # The water's heat is fixed by its typed states (0.2 kg/s × 4178 × 5 K = 4.178 kW, hand calculation) and a cooler
    # duty is the unknown: no oil outlet temperature changes what the exchanger must pass, while with its UA it
    # delivers 8.52 kW (test above). Setting the oil outlet cannot close it.
    doc = _oil_cooler()
    doc.update(duties=[{"name": "Cooler"}], unknowns=[{"kind": "duty", "term": "Cooler"}])
    with pytest.raises(NoSolutionError) as info:
        solve_and_analyse(parse_worksheet(doc))
    assert info.value.where == "exchangers[E-1].sets"
    assert "always delivers more" in info.value.message
    UA, C_oil, C_water = 38.1 * INCROPERA_AREA, 0.1 * 2131, 0.2 * 4178
    gap = _counterflow_effectiveness(UA / C_oil, C_oil / C_water) * C_oil * 70 - C_water * 5  # hand calculation
    assert f"{gap / 1e3:.4g} kW" in info.value.message


def test_glycol_cooler_sample_is_closed_by_its_rating():
    # The sample of our own invention: the cooler's UA (40 kW/K) sets the glycol outlet, the balance the cooling-water
    # flow that returns it at 40 °C. Check against the
    # counter-flow ε-NTU closed form with the mean heat-capacity flows the result implies (cp varies a little with
    # T, so to 0.5 %): C = Q / ΔT of each side, NTU = UA / C_min, q = ε·C_min·(60 − 27 K), hand calculation.
    from heatbalance.worksheet import load_worksheet

    with open("sample_data/glycol_cooler_rated.json", encoding="utf-8") as handle:
        result = solve_and_analyse(load_worksheet(handle.read()))
    closure = result.rating_closure
    assert closure.address == "streams[Glycol].outlet.temperature"
    glycol, water = result.lines
    Q = water.total
    C_hot, C_cold = Q / (glycol.initial_T - glycol.final_T), Q / (water.final_T - water.initial_T)
    C_min, C_max = min(C_hot, C_cold), max(C_hot, C_cold)
    q = _counterflow_effectiveness(40e3 / C_min, C_min / C_max) * C_min * (60 - 27)
    assert Q == pytest.approx(q, rel=5e-3)
    assert closure.rated_duty == pytest.approx(Q, rel=1e-6) and glycol.final_T == pytest.approx(closure.value)
    assert water.final_T - C0 == pytest.approx(40.0) and closure.cold_outlet_T - C0 == pytest.approx(40.0, abs=1e-6)
    assert not [w for w in result.warnings if "RETURN LIMIT" in w.text]  # the flow holds the 40 °C limit
    # the grid shows the outlet as typed (45 °C): beside the answer, a warning says the rating's value is used
    (said,) = [w for w in result.warnings if w.address == "exchangers[E-401].sets"]
    assert "is set by the rating of E-401" in said.text and "not as typed (45.00 °C)" in said.text


def test_return_limit_passed_when_the_rating_closes_is_said_once():
    import json

    with open("sample_data/glycol_cooler_rated.json", encoding="utf-8") as handle:
        doc = json.load(handle)
    doc["unknowns"] = [{"kind": "temperature", "line": "Cooling water", "end": "outlet"}]  # 30 t/h as typed
    result = solve_and_analyse(parse_worksheet(doc))
    (warning,) = [w for w in result.warnings if "RETURN LIMIT PASSED" in w.text]  # rated outlet = the balance's
    assert warning.address == "utilities[Cooling water].return_limit"
    assert "in the balance, as the exchanger's UA rates it" in warning.text and "40.0 °C" in warning.text


def test_a_flow_near_where_the_balance_refuses_is_found_by_bisecting_the_edge():
    # The methanol condenser sample (1.5 t/h condensed and subcooled to 50 °C: 475.4 kW, its own regression value)
    # with the cooling-water flow set by the rating: below about 10.9 t/h the balance refuses (the water would leave
    # hotter than the methanol enters), and the answer lies just above that edge, between the factor-of-two
    # trials. The water leaves below the methanol's condensing temperature (iapws/CoolProp not needed: the rating
    # never passes the hot inlet) and the balance closes at the rated duty.
    import json

    with open("sample_data/methanol_condenser_cooling_water.json", encoding="utf-8") as handle:
        doc = json.load(handle)
    doc["unknowns"] = [{"kind": "temperature", "line": "Cooling water", "end": "outlet"}]
    doc["streams"][1]["flow"] = {"value": 31.5, "unit": "t/h"}
    doc["exchangers"][0]["sets"] = "streams[Cooling water].flow"
    result = solve_and_analyse(parse_worksheet(doc))
    closure = result.rating_closure
    methanol, water = result.lines
    assert closure.rated_duty == pytest.approx(-methanol.total, rel=1e-6)  # the methanol's duty, as the balance has it
    assert 2.5 < closure.value < 3.4  # kg/s: between the refused 7.9 t/h and the solved 15.75 t/h trials
    assert water.final_T < methanol.initial_T
    (warning,) = [w for w in result.warnings if "RETURN LIMIT PASSED" in w.text]
    assert warning.address == "utilities[Cooling water].return_limit"


def test_sweeping_the_input_the_rating_sets_is_refused_at_it():
    from heatbalance.errors import AddressError

    with pytest.raises(AddressError) as info:
        sweep(parse_worksheet(_oil_cooler()), [Axis("streams[Oil].outlet.temperature", (50.0, 60.0), "degC")])
    assert info.value.where == "streams[Oil].outlet.temperature" and "rating sets this input" in info.value.message


def test_a_tolerance_on_the_set_input_is_not_used_and_said_so():
    from heatbalance.analyses.uncertainty import suggested_tolerances

    doc = _oil_cooler()
    doc["tolerances"] = [{"address": "streams[Oil].outlet.temperature", "plus_minus": "0.5 K"}]
    result = solve_and_analyse(parse_worksheet(doc))
    assert result.uncertainty is None and result.uncertainty_error.where == "streams[Oil].outlet.temperature"
    assert any("rating sets this input" in w.text for w in result.warnings)
    offered = {t.address for t in suggested_tolerances(parse_worksheet(_oil_cooler()))}
    assert "streams[Oil].outlet.temperature" not in offered and "streams[Oil].inlet.temperature" in offered


def test_cases_close_by_the_rating_and_refuse_overriding_the_set_input():
    from heatbalance.analyses.cases import run_cases

    doc = _oil_cooler()
    doc["cases"] = [{"name": "hot oil", "overrides": [{"address": "streams[Oil].inlet.temperature",
                                                       "value": {"value": 110, "unit": "degC"}}]},
                    {"name": "forced", "overrides": [{"address": "streams[Oil].outlet.temperature",
                                                      "value": {"value": 55, "unit": "degC"}}]}]
    frame = run_cases(parse_worksheet(doc), outputs=["answer"])
    UA, C_oil, C_water = 38.1 * INCROPERA_AREA, 0.1 * 2131, 0.2 * 4178
    eps = _counterflow_effectiveness(UA / C_oil, C_oil / C_water)  # hand calculation, as above
    assert frame.loc["answer", "hot oil"] - C0 == pytest.approx(30 + eps * C_oil * 80 / C_water, abs=1e-5)
    refusal = frame.attrs["refusals"]["forced"]
    assert refusal.where == "cases[forced]" and "rating sets this input" in refusal.message
