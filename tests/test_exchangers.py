"""Will the exchanger do it: T–Q curves, approach, required UA, F-correction, rating (issue 11).

References are named beside each value: textbook examples (from memory, where said), closed forms written out
here, and hand calculations of our own scenarios.
"""
from __future__ import annotations

import math

import ht
import pytest
from iapws import IAPWS97

from heatbalance.address import get, inputs, rename, with_value
from heatbalance.analyses import solve_and_analyse
from heatbalance.analyses.exchangers import correction_factor, typical_U
from heatbalance.errors import InputError, NoSolutionError, WorksheetFormatError
from heatbalance.links import canonical_json
from heatbalance.worksheet import dump_worksheet, load_worksheet, parse_worksheet

C0 = 273.15


def _liquid(name: str, cp: str, up_to: str | None = None, latent: str | None = None, vapour_cp: str | None = None):
    phases = [{"name": "liquid", "cp": cp}]
    if up_to:
        phases[0].update(up_to=up_to, latent_heat=latent)
        phases.append({"name": "vapour", "cp": vapour_cp})
    return {"name": name, "phases": phases, "min_temperature": "-50 degC", "max_temperature": "400 degC",
            "source": "constant cp of a test scenario"}


def _sheet(hot: dict, cold: dict, exchanger: dict, materials: list, **extra) -> dict:
    doc = {"materials": materials, "streams": [hot, cold],
           "exchangers": [{"name": "E-1", "hot": [hot["name"]], "cold": [cold["name"]], **exchanger}]}
    doc.update(extra)
    return doc


def _stream(name, material, flow, t_in, t_out, **more):
    s = {"name": name, "material": material, "flow": flow, "inlet": {"temperature": t_in},
         "outlet": {"temperature": t_out} if t_out else {"temperature": "0 degC"}}
    s.update(more)
    return s


# --------------------------------------------------------------------------- textbook: counter-flow LMTD and area
def test_counterflow_lmtd_and_area_incropera_oil_cooler():
    # Incropera & DeWitt, Fundamentals of Heat and Mass Transfer, Example 11.1 (from memory): engine oil
    # 0.1 kg/s, cp 2131 J/(kg·K), 100 -> 60 °C; water 0.2 kg/s, cp 4178 J/(kg·K), enters at 30 °C; U = 38.1
    # W/(m²·K). The book: q = 8524 W, T_c,o = 40.2 °C, ΔT_lm = 43.2 °C; L = 65.9 m of a 25 mm tube, i.e.
    # A = π·0.025·65.9 = 5.18 m².
    doc = _sheet(_stream("Oil", "oil", "0.1 kg/s", "100 degC", "60 degC"),
                 _stream("Water", "cw", "0.2 kg/s", "30 degC", "40 degC"),
                 {"U": "38.1 W/(m^2*K)"}, [_liquid("oil", "2131 J/(kg*K)"), _liquid("cw", "4178 J/(kg*K)")],
                 unknowns=[{"kind": "temperature", "line": "Water", "end": "outlet"}])
    result = solve_and_analyse(parse_worksheet(doc))
    assert result.answer.value_si - C0 == pytest.approx(40.2, abs=0.05)
    check = result.exchangers[0]
    assert check.duty == pytest.approx(8524, rel=1e-4)
    assert check.mean_dT == pytest.approx(43.2, abs=0.05)
    assert check.area_required == pytest.approx(math.pi * 0.025 * 65.9, rel=2e-3)
    assert check.zones[0].F == 1.0 and len(check.zones) == 1
    assert check.min_approach == pytest.approx(30.0, abs=1e-6)  # cold end: 60 - 30 °C
    assert not check.warnings


# --------------------------------------------------------------------------- F-corrected shell and tube
def _bowman_1_2(Thi, Tho, Tci, Tco):
    """F of a 1-2 exchanger, the closed form of Bowman, Mueller & Nagle (1940) as in Kern, Process Heat Transfer,
    eq. 7.41, written out here (independent of ht)."""
    R = (Thi - Tho) / (Tco - Tci)
    P = (Tco - Tci) / (Thi - Tci)
    s = math.sqrt(R * R + 1)
    return s / (R - 1) * math.log((1 - P) / (1 - P * R)) / math.log((2 - P * (R + 1 - s)) / (2 - P * (R + 1 + s)))


def test_F_corrected_one_two_shell_and_tube():
    # Our scenario: hot 2 kg/s, cp 2500 J/(kg·K), 150 -> 90 °C (300 kW); cold 3 kg/s, cp 4000, 40 °C in -> 65 °C.
    doc = _sheet(_stream("Hot oil", "oil", "2 kg/s", "150 degC", "90 degC"),
                 _stream("Water", "cw", "3 kg/s", "40 degC", "65 degC"),
                 {"arrangement": "shell-and-tube 1-2", "U": "400 W/(m^2*K)"},
                 [_liquid("oil", "2500 J/(kg*K)"), _liquid("cw", "4000 J/(kg*K)")],
                 unknowns=[{"kind": "temperature", "line": "Water", "end": "outlet"}])
    check = solve_and_analyse(parse_worksheet(doc)).exchangers[0]
    F = _bowman_1_2(150, 90, 40, 65)
    lmtd = ((150 - 65) - (90 - 40)) / math.log((150 - 65) / (90 - 40))  # hand calculation
    assert check.zones[0].F == pytest.approx(F, rel=1e-9)
    assert 0.9 < F < 1.0
    assert check.UA_required == pytest.approx(300e3 / (F * lmtd), rel=1e-6)
    assert check.area_required == pytest.approx(300e3 / (F * lmtd) / 400, rel=1e-6)


def test_F_of_ht_documentation_example():
    # ht's documentation example of F_LMTD_Fakheri (Hall, Rules of Thumb for Chemical Engineers): 0.9438
    assert correction_factor("shell-and-tube 1-2", 1, 130, 110, 15, 85) == pytest.approx(0.94383588, rel=1e-7)
    # and Bowman's closed form for the same temperatures
    assert correction_factor("shell-and-tube 1-2", 1, 130, 110, 15, 85) == pytest.approx(_bowman_1_2(130, 110, 15, 85))


def test_F_two_shells_higher_than_one_and_crossflow_between():
    one = correction_factor("shell-and-tube 1-2", 1, 150, 100, 40, 90)
    two = correction_factor("shell-and-tube N shells", 2, 150, 100, 40, 90)
    cross = correction_factor("cross-flow", 1, 150, 100, 40, 90)
    assert one < two < 1.0 and 0 < cross < 1.0


def test_one_two_shell_that_cannot_reach_is_refused_at_the_arrangement():
    # a deep temperature cross: 1-2 shell cannot do it (F has no value), counter-current can
    doc = _sheet(_stream("Hot", "oil", "1 kg/s", "150 degC", "50 degC"),
                 _stream("Cold", "cw", "1 kg/s", "30 degC", "130 degC"),
                 {"arrangement": "shell-and-tube 1-2"}, [_liquid("oil", "2000 J/(kg*K)"), _liquid("cw", "2000 J/(kg*K)")],
                 unknowns=[{"kind": "temperature", "line": "Cold", "end": "outlet"}])
    with pytest.raises(NoSolutionError) as info:
        solve_and_analyse(parse_worksheet(doc))
    assert info.value.where == "exchangers[E-1].arrangement"
    assert "more shell passes" in info.value.message


# --------------------------------------------------------------------------- rating by ε-NTU
def test_rating_counterflow_matches_effectiveness_ntu_hand_calculation():
    # Our scenario, by hand: C_hot = 1 kg/s × 1000 = 1000 W/K, C_cold = 1 kg/s × 2000 = 2000 W/K, UA = 2000 W/K:
    # NTU = 2, C_r = 0.5, counterflow ε = (1 − e^(−NTU(1−Cr))) / (1 − Cr·e^(−NTU(1−Cr))) (Incropera eq. 11.29a)
    NTU, Cr = 2.0, 0.5
    eps = (1 - math.exp(-NTU * (1 - Cr))) / (1 - Cr * math.exp(-NTU * (1 - Cr)))
    q = eps * 1000 * (150 - 30)
    assert eps == pytest.approx(ht.effectiveness_from_NTU(NTU, Cr, "counterflow"), rel=1e-12)
    doc = _sheet(_stream("Hot", "a", "1 kg/s", "150 degC", "60 degC"),
                 _stream("Cold", "b", "1 kg/s", "30 degC", "75 degC"),
                 {"UA": "2 kW/K"}, [_liquid("a", "1000 J/(kg*K)"), _liquid("b", "2000 J/(kg*K)")],
                 unknowns=[{"kind": "temperature", "line": "Cold", "end": "outlet"}])
    result = solve_and_analyse(parse_worksheet(doc))
    rating = result.exchangers[0].rating
    assert rating.duty == pytest.approx(q, rel=1e-6)  # 92.95 kW
    assert rating.hot_outlet_T - C0 == pytest.approx(150 - q / 1000, abs=1e-4)
    assert rating.cold_outlet_T - C0 == pytest.approx(30 + q / 2000, abs=1e-4)
    assert rating.duty > rating.balance_duty  # the balance asks 90 kW: the unit is big enough
    assert "TOO SMALL" not in rating.verdict.text


def test_rating_too_small_is_a_loud_warning_at_UA():
    doc = _sheet(_stream("Hot", "a", "1 kg/s", "150 degC", "60 degC"),
                 _stream("Cold", "b", "1 kg/s", "30 degC", "75 degC"),
                 {"UA": "1 kW/K"}, [_liquid("a", "1000 J/(kg*K)"), _liquid("b", "2000 J/(kg*K)")],
                 unknowns=[{"kind": "temperature", "line": "Cold", "end": "outlet"}])
    result = solve_and_analyse(parse_worksheet(doc))
    NTU, Cr = 1.0, 0.5  # hand calculation as above
    eps = (1 - math.exp(-NTU * (1 - Cr))) / (1 - Cr * math.exp(-NTU * (1 - Cr)))
    assert result.exchangers[0].rating.duty == pytest.approx(eps * 120e3, rel=1e-6)
    loud = [w for w in result.warnings if "TOO SMALL" in w.text]
    assert loud and loud[0].address == "exchangers[E-1].UA"


# --------------------------------------------------------------------------- zoned condenser, by hand
def test_zoned_condenser_hand_calculation():
    # Our scenario. Hot: 1 kg/s of a vapour (cp 1000 J/(kg·K)) condensing at 80 °C (latent 400 kJ/kg), liquid cp
    # 2000, from 120 °C vapour to 50 °C liquid: desuperheating 40 kW, condensing 400 kW, subcooling 60 kW.
    # Cold: 5 kg/s, cp 4000, from 20 °C: 20 W/K·… -> 45 °C. Counter-current, from the cold end:
    #   subcooling   0–60 kW:   hot 50 -> 80, cold 20 -> 23; ΔT 30, 57
    #   condensing  60–460 kW:  hot 80,       cold 23 -> 43; ΔT 57, 37
    #   desuperheat 460–500 kW: hot 80 -> 120, cold 43 -> 45; ΔT 37, 75
    lm = lambda a, b: (a - b) / math.log(a / b)  # noqa: E731
    UA = 60e3 / lm(57, 30) + 400e3 / lm(57, 37) + 40e3 / lm(75, 37)
    doc = _sheet(_stream("Vapour", "v", "1 kg/s", "120 degC", "50 degC"),
                 _stream("Water", "w", "5 kg/s", "20 degC", "45 degC"), {"U": "500 W/(m^2*K)"},
                 [_liquid("v", "2000 J/(kg*K)", "80 degC", "400 kJ/kg", "1000 J/(kg*K)"),
                  _liquid("w", "4000 J/(kg*K)")], unknowns=[{"kind": "temperature", "line": "Water", "end": "outlet"}])
    check = solve_and_analyse(parse_worksheet(doc)).exchangers[0]
    assert [z.hot_service for z in check.zones] == ["subcooling", "condensing", "desuperheating"]
    assert [z.duty for z in check.zones] == pytest.approx([60e3, 400e3, 40e3], rel=1e-9)
    assert [z.UA for z in check.zones] == pytest.approx([60e3 / lm(57, 30), 400e3 / lm(57, 37), 40e3 / lm(75, 37)],
                                                        rel=1e-9)
    assert check.UA_required == pytest.approx(UA, rel=1e-9)  # 10,812 W/K
    assert check.mean_dT == pytest.approx(500e3 / UA, rel=1e-9)
    assert check.min_approach == pytest.approx(30.0, abs=1e-9)
    assert check.area_required == pytest.approx(UA / 500, rel=1e-9)
    # the curves show every zone: the plateau is flat at 80 °C from 60 to 460 kW
    flat = [(x, T) for x, T in check.hot_curve if abs(T - (80 + C0)) < 1e-9]
    assert flat[0][0] == pytest.approx(60e3) and flat[-1][0] == pytest.approx(460e3)


def test_approach_below_minimum_is_a_loud_warning_with_location():
    doc = _sheet(_stream("Vapour", "v", "1 kg/s", "120 degC", "50 degC"),
                 _stream("Water", "w", "5 kg/s", "20 degC", "45 degC"), {"minimum_approach": "35 K"},
                 [_liquid("v", "2000 J/(kg*K)", "80 degC", "400 kJ/kg", "1000 J/(kg*K)"),
                  _liquid("w", "4000 J/(kg*K)")], unknowns=[{"kind": "temperature", "line": "Water", "end": "outlet"}])
    result = solve_and_analyse(parse_worksheet(doc))
    (warning,) = [w for w in result.warnings if "Approach below" in w.text]
    assert warning.address == "exchangers[E-1].minimum_approach"
    assert "30.0 K" in warning.text and "50.0 °C" in warning.text and "20.0 °C" in warning.text
    assert result.exchangers[0].UA_required is not None  # feasible, only too close


# --------------------------------------------------------------------------- the internal cross (the case)
def test_superheated_steam_against_water_near_saturation_crosses_inside():
    # Steam at 4 barg (T_sat 151.8 °C, IAPWS-IF97) superheated to 250 °C, fully condensed and subcooled to 140 °C,
    # heats pressurised water 100 -> 160 °C. Both terminal differences are fine (250 vs 160, 140 vs 100), and the
    # balance's own second-law check passes; inside, water leaving the condensing zone is above 151.8 °C.
    doc = {"streams": [
        {"name": "Steam", "material": "water", "flow": "1000 kg/h", "pressure": "4 barg",
         "inlet": {"temperature": "250 degC"}, "outlet": {"temperature": "140 degC"}},
        {"name": "Water", "material": "water", "flow": "8 t/h", "pressure": "10 barg",
         "inlet": {"temperature": "100 degC"}, "outlet": {"temperature": "160 degC"}}],
        "unknowns": [{"kind": "amount", "line": "Steam"}],
        "exchangers": [{"name": "E-1", "hot": ["Steam"], "cold": ["Water"]}]}
    result = solve_and_analyse(parse_worksheet(doc))
    check = result.exchangers[0]
    assert check.min_approach < 0
    assert check.UA_required is None and check.mean_dT is None  # no exchanger can: no number pretends it can
    (cross,) = [w for w in result.warnings if "TEMPERATURE CROSS" in w.text]
    assert cross.address == "exchangers[E-1]"
    T_sat = IAPWS97(P=(4e5 + 101325) / 1e6, x=1).T  # IAPWS-IF97 via iapws: 151.86 °C at 5.013 bar
    assert check.min_approach_hot_T == pytest.approx(T_sat, abs=0.01)  # the cross is on the condensing plateau
    assert f"{T_sat - C0:.1f} °C" in cross.text
    assert [z.hot_service for z in check.zones] == ["subcooling", "condensing", "desuperheating"]


# --------------------------------------------------------------------------- refusals
def _simple(**exchanger):
    return _sheet(_stream("Hot", "a", "1 kg/s", "150 degC", "60 degC"), _stream("Cold", "b", "1 kg/s", "30 degC", "75 degC"),
                  exchanger, [_liquid("a", "1000 J/(kg*K)"), _liquid("b", "2000 J/(kg*K)")],
                  unknowns=[{"kind": "temperature", "line": "Cold", "end": "outlet"}])


@pytest.mark.parametrize("field, value", [("UA", "0 kW/K"), ("UA", "-3 kW/K"), ("U", "0 W/(m^2*K)")])
def test_non_positive_UA_or_U_refused_at_its_address(field, value):
    with pytest.raises(InputError) as info:
        solve_and_analyse(parse_worksheet(_simple(**{field: value})))
    assert info.value.where == f"exchangers[E-1].{field}"
    assert "must be positive" in info.value.message


def test_hot_side_colder_than_cold_side_everywhere_refused():
    doc = _sheet(_stream("Hot", "a", "1 kg/s", "60 degC", "40 degC"), _stream("Cold", "b", "1 kg/s", "70 degC", "80 degC"),
                 {}, [_liquid("a", "1000 J/(kg*K)"), _liquid("b", "2000 J/(kg*K)")],
                 duties=[{"name": "Heater"}, {"name": "Cooler", "value": "-20 kW"}],
                 unknowns=[{"kind": "duty", "term": "Heater"}])
    with pytest.raises(NoSolutionError) as info:
        solve_and_analyse(parse_worksheet(doc))
    assert info.value.where == "exchangers[E-1].hot"
    assert "nowhere hotter" in info.value.message


def test_a_line_on_the_wrong_side_or_unknown_refused():
    doc = _simple()
    doc["exchangers"][0].update(hot=["Cold"], cold=["Hot"])
    with pytest.raises(NoSolutionError) as info:
        solve_and_analyse(parse_worksheet(doc))
    assert info.value.where == "exchangers[E-1].hot" and "takes up heat" in info.value.message
    doc["exchangers"][0].update(hot=["Nothing"], cold=["Hot"])
    with pytest.raises(InputError) as info:
        solve_and_analyse(parse_worksheet(doc))
    assert info.value.where == "exchangers[E-1].hot" and "no stream called 'Nothing'" in info.value.message


def test_UA_with_U_refused_by_the_loader():
    doc = _simple(UA="2 kW/K", U="400 W/(m^2*K)")
    with pytest.raises(WorksheetFormatError) as info:
        parse_worksheet(doc)
    assert info.value.where == "exchangers[E-1]"


# --------------------------------------------------------------------------- stored, addressed, renamed
def test_exchanger_is_stored_addressable_and_follows_renames():
    ws = parse_worksheet(_simple(UA="2 kW/K", minimum_approach="8 K"))
    assert load_worksheet(dump_worksheet(ws)) == ws
    addresses = {i.address for i in inputs(ws)}
    assert {"exchangers[E-1].UA", "exchangers[E-1].minimum_approach"} <= addresses
    assert str(get(ws, "exchangers[E-1].UA")) == "2 kW/K"
    assert str(get(with_value(ws, "exchangers[E-1].UA", "3000 W/K"), "exchangers[E-1].UA")) == "3000 W/K"
    renamed = rename(ws, "streams[Hot]", "Hot oil")
    assert renamed.exchangers[0].hot == ["Hot oil"]
    solve_and_analyse(renamed)
    assert '"exchangers"' in canonical_json(ws)


def test_a_sheet_without_exchangers_keeps_its_id():
    plain = {"streams": [_stream("Hot", "water", "1 kg/s", "50 degC", "40 degC")], "duties": [{"name": "C"}],
             "unknowns": [{"kind": "duty", "term": "C"}]}
    assert "exchangers" not in canonical_json(parse_worksheet(plain))


def test_typical_U_table_is_pinned_and_sourced():
    rows = typical_U()
    assert len(rows) == 15
    assert all(r["source"] and "guidance only" in r["source"] for r in rows)
    assert all(0 < r["U_low_W_m2K"] < r["U_high_W_m2K"] for r in rows)
    steam_water = next(r for r in rows if r["hot_side"] == "steam" and r["cold_side"] == "water")
    assert (steam_water["U_low_W_m2K"], steam_water["U_high_W_m2K"]) == (1500, 4000)  # Sinnott Table 12.1, from memory


# --------------------------------------------------------------------------- the two samples (own output, regression only)
SAMPLE_REGRESSION = {  # this engine's own output, kept as regression values (not references)
    "steam_heater_subcooled_condensate.json": dict(zones=["subcooling", "condensing"], duty_kW=1626.8, UA_kW_K=16.95,
                                                  area_m2=15.41, min_approach_K=66.94, rated_kW=1850.2),
    "methanol_condenser_cooling_water.json": dict(zones=["subcooling", "condensing"], duty_kW=475.4, UA_kW_K=12.92,
                                                 area_m2=None, min_approach_K=23.0, rated_kW=500.6),
}


@pytest.mark.parametrize("name", sorted(SAMPLE_REGRESSION))
def test_exchanger_samples(name):
    with open(f"sample_data/{name}", encoding="utf-8") as handle:
        result = solve_and_analyse(load_worksheet(handle.read()))
    expected = SAMPLE_REGRESSION[name]
    (check,) = result.exchangers
    assert [z.hot_service for z in check.zones] == expected["zones"]
    assert check.duty / 1e3 == pytest.approx(expected["duty_kW"], abs=0.05)
    assert check.UA_required / 1e3 == pytest.approx(expected["UA_kW_K"], abs=0.005)
    assert (check.area_required is None) == (expected["area_m2"] is None)
    if expected["area_m2"] is not None:
        assert check.area_required == pytest.approx(expected["area_m2"], abs=0.005)
    assert check.min_approach == pytest.approx(expected["min_approach_K"], abs=0.005)
    assert check.rating.duty / 1e3 == pytest.approx(expected["rated_kW"], abs=0.05)
    assert not [w for w in result.warnings if w.address.startswith("exchangers")]
    (table,) = result.utilities
    assert table.options and all(o.feasible for o in table.options)


# --------------------------------------------------------------------------- presentation: report, JSON, chart
def test_report_json_and_chart_carry_the_same_numbers():
    import json

    from heatbalance.present.exchangers import tq_figure, utility_rows, zone_rows
    from heatbalance.present.report import format_result, result_json

    with open("sample_data/methanol_condenser_cooling_water.json", encoding="utf-8") as handle:
        result = solve_and_analyse(load_worksheet(handle.read()))
    check = result.exchangers[0]
    text = format_result(result)
    assert "EXCHANGER E-301" in text and "UTILITIES for exchanger E-301" in text
    assert f"UA required: {check.UA_required / 1e3:,.4g} kW/K" in text
    data = json.loads(json.dumps(result_json(result)))
    assert data["exchangers"][0]["UA_required"] == check.UA_required
    assert data["utilities"][0]["options"][0]["flow"] == result.utilities[0].options[0].flow
    assert [r["hot side"] for r in zone_rows(check)] == ["subcooling", "condensing"]
    us = utility_rows(result.utilities[0], "US")[0]
    shown = us["flow [lb/h]"]  # written in lb/h, four significant figures, thousands separated
    assert "," in shown and float(shown.replace(",", "")) == pytest.approx(
        result.utilities[0].options[0].flow * 3600 / 0.45359237, rel=5e-4)
    fig = tq_figure(check)
    assert [t.name.split(":")[0] for t in fig.data] == ["hot side", "cold side", "pinch"]
    assert max(fig.data[0].y) == pytest.approx(check.hot_curve[-1][1] - C0)
    assert len(fig.layout.shapes) == len(check.zones)


# --------------------------------------------------------------------------- the methanol sample's temperatures
def test_methanol_sample_solves_for_its_temperatures_round_trip():
    # Methanol's data start at its melting line, not at its triple point: at 1.3 bar the melting temperature is above
    # T_triple = 175.61 K (CoolProp's HEOS data; CRC Handbook gives a melting point of -97.5 °C ≈ 175.6 K, from
    # memory), and the liquid's equation of state is refused below it. Before, the temperature search started at
    # T_triple and every temperature solve on the sample was refused.
    from heatbalance.address import with_unknown
    from heatbalance.materials import get_material

    methanol = get_material("methanol")
    assert methanol.lowest_temperature(1.3e5) > methanol.t_min == pytest.approx(175.61, abs=0.01)
    assert methanol.lowest_temperature(1e7) > methanol.lowest_temperature(1.3e5)  # the melting line rises with P
    with open("sample_data/methanol_condenser_cooling_water.json", encoding="utf-8") as handle:
        ws = load_worksheet(handle.read())
    flow = solve_and_analyse(ws).answer.value_si  # the cooling water the sample needs (kg/s)
    for address, typed in (("streams[Methanol overhead].outlet.temperature", 50.0),
                           ("streams[Cooling water].outlet.temperature", 40.0)):
        result = solve_and_analyse(with_unknown(ws, address, (flow, "kg/s")))
        assert result.answer.value_si - C0 == pytest.approx(typed, abs=1e-5)  # the sample's typed value, back
        assert abs(result.residual) <= 1e-6 * max(abs(ln.total) for ln in result.lines)


def test_methanol_cooled_below_its_melting_line_is_refused_with_the_range():
    doc = {"streams": [{"name": "Methanol", "material": "methanol", "flow": "1 kg/s", "pressure": "0.3 barg",
                        "inlet": {"temperature": "20 degC"}, "outlet": {"temperature": "0 degC"}}],
           "duties": [{"name": "Chiller", "value": "-400 kW"}],
           "unknowns": [{"kind": "temperature", "line": "Methanol", "end": "outlet"}]}
    with pytest.raises(NoSolutionError) as info:
        solve_and_analyse(parse_worksheet(doc))
    assert info.value.where == "streams[Methanol].outlet.temperature"
    assert "too much heat" not in info.value.message and "lower limit of the data for methanol" in info.value.message


# --------------------------------------------------------------------------- exchanger outputs in a sweep
STEAM_SAMPLE = "sample_data/steam_heater_subcooled_condensate.json"
AREA, FLOW = "exchangers[E-201].area_required", "exchangers[E-201].utilities[LP steam 4 barg].flow"
APPROACH, COST = "exchangers[E-201].min_approach", "exchangers[E-201].utilities[LP steam 4 barg].cost_per_hour"


def test_exchanger_and_utility_outputs_in_a_small_sweep():
    from heatbalance.address import with_value
    from heatbalance.analyses.sweep import Axis, sweep
    from heatbalance.present.whatif import sweep_table

    with open(STEAM_SAMPLE, encoding="utf-8") as handle:
        ws = load_worksheet(handle.read())
    outlets = (70.0, 85.0)
    frame = sweep(ws, [Axis("streams[Process water].outlet.temperature", outlets, "degC")],
                  ["answer", APPROACH, AREA, FLOW, COST])
    assert list(frame["refused at"]) == ["", ""]
    T_sat = IAPWS97(P=(4e5 + 101325) / 1e6, x=1).T  # IAPWS-IF97 via iapws: the steam condenses at 151.86 °C
    for T_out, row in zip(outlets, frame.itertuples(index=False)):
        values = dict(zip(frame.columns, row))
        # the pinch is at the hot end of the condensing zone: T_sat − the process outlet (hand calculation)
        assert values[APPROACH] == pytest.approx(T_sat - (T_out + C0), abs=1e-3)
        # the utility is the sheet's own steam (4 barg saturated, condensate at 100 °C): the same flow as the answer
        assert values[FLOW] == pytest.approx(values["answer"], rel=1e-6)
        assert values[COST] == pytest.approx(28.0 * values[FLOW] * 3.6, rel=1e-12)  # EUR 28 per t, by hand
        alone = solve_and_analyse(with_value(ws, "streams[Process water].outlet.temperature", (T_out, "degC")))
        assert values[AREA] == pytest.approx(alone.exchangers[0].area_required, rel=1e-9)
    table = sweep_table(frame)
    assert "E-201: area required [m²]" in table.columns and "E-201 / LP steam 4 barg: utility flow [kg/h]" in table.columns


def test_a_sweep_not_asking_for_exchanger_outputs_skips_the_check(monkeypatch):
    from heatbalance.analyses import exchangers
    from heatbalance.analyses.sweep import Axis, output_names, sweep
    from heatbalance.problem import build_problem

    with open(STEAM_SAMPLE, encoding="utf-8") as handle:
        ws = load_worksheet(handle.read())
    names = output_names(build_problem(ws))
    assert names[AREA] == "area" and names["exchangers[E-201].rated_duty"] == "power" and names[FLOW] == "mass_flow"
    calls = []
    real = exchangers.check_exchangers
    monkeypatch.setattr(exchangers, "check_exchangers", lambda p, r: calls.append(1) or real(p, r))
    axis = Axis("streams[Process water].outlet.temperature", (70.0, 80.0, 85.0), "degC")
    sweep(ws, [axis], ["answer"])
    assert calls == []  # the answer alone: no exchanger check at any point
    sweep(ws, [axis], ["answer", AREA])
    assert len(calls) == 3


@pytest.mark.parametrize("U, warned", [("1100 kW/(m^2*K)", True), ("1.1 W/(m^2*K)", True),
                                       ("1100 W/(m^2*K)", False), ("193.7 Btu/(h*ft^2*degF)", False)])
def test_a_U_outside_what_exchangers_have_is_warned_at_its_field(U, warned):
    import json

    from heatbalance.analyses import solve_and_analyse
    from heatbalance.worksheet import load_worksheet

    # 5 (gas to gas) to 15,000 W/(m²·K) (condensing steam, plate): common practice, no source; 1,100 kW/(m²·K) is
    # a kW-for-W slip (area 0.0154 m² for a 1.6 MW heater); 193.7 Btu/(h·ft²·°F) = 1,100 W/(m²·K) (× 5.678)
    doc = json.loads(open("sample_data/steam_heater_subcooled_condensate.json", "rb").read())
    doc["exchangers"][0]["U"] = U
    result = solve_and_analyse(load_worksheet(json.dumps(doc).encode()))
    found = [w for w in result.warnings if w.address == "exchangers[E-201].U" and "check its unit" in w.text]
    assert bool(found) == warned


def test_a_cross_flow_F_is_checked_and_quiet():
    import json
    import math
    import warnings

    from scipy.optimize import brentq

    from heatbalance.analyses import solve_and_analyse
    from heatbalance.worksheet import load_worksheet

    doc = json.loads(open("sample_data/glycol_cooler_rated.json", "rb").read())
    doc["exchangers"][0]["arrangement"] = "cross-flow"
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        (zone,) = solve_and_analyse(load_worksheet(json.dumps(doc).encode())).exchangers[0].zones
    assert not [w for w in caught if "Integration" in type(w.message).__name__]  # ht's quadrature said quietly
    # F = NTU_counter / NTU_cross at the zone's ε and C_r; cross-flow, both fluids unmixed, by Mason's exact series
    # ε = 1/(C_r·N) Σ_n [1 − e^−N Σ_{m≤n} N^m/m!]·[1 − e^−C_r·N Σ_{m≤n} (C_r·N)^m/m!] (Kays & London, from
    # memory; Incropera's closed form is an approximation, 2 % off in NTU here); counter-flow exact
    dh, dc = zone.hot_in - zone.hot_out, zone.cold_out - zone.cold_in
    C_min, C_max = sorted((1 / dh, 1 / dc))
    eps, Cr = 1 / (C_min * (zone.hot_in - zone.cold_in)), C_min / C_max

    def partial(x: float, n: int) -> float:
        return 1 - math.exp(-x) * sum(x ** m / math.factorial(m) for m in range(n + 1))

    def mason(N: float) -> float:
        return sum(partial(N, n) * partial(Cr * N, n) for n in range(80)) / (Cr * N)

    counter = math.log((1 - eps * Cr) / (1 - eps)) / (1 - Cr)
    assert zone.F == pytest.approx(counter / brentq(lambda N: mason(N) - eps, 1e-3, 20), rel=1e-4)
