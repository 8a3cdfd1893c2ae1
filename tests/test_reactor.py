"""Batch-reactor thermal screening: ΔT_ad, φ, MTSR, criticality class, jacket time.

Every expected number is a hand calculation written out beside it (scenarios of our own), or an
independent implementation named in a comment (the ``iapws`` package for IAPWS-IF97, scipy's ODE solver).
"""
import json
import math
import re
from pathlib import Path

import pytest
from iapws import IAPWS97
from scipy.integrate import solve_ivp

from heatbalance.analyses import solve_and_analyse as solve  # the balance and its screening
from heatbalance.cli import main
from heatbalance.errors import InputError, NoSolutionError, UnitError, WorksheetFormatError
from heatbalance.reactor import (CAUTION, CLASS_MEANINGS, adiabatic_temperature_rise, criticality_class,
                                 jacket_temperature, jacket_time, mtsr, thermal_inertia_factor)
from heatbalance.present.screening import screening_figure, screening_report
from sheet_factory import build, constant_cp_material, q, temp

C = 273.15  # K at 0 °C (definition)


# --------------------------------------------------------------------------- pure functions
def test_thermal_inertia_factor_by_hand():
    # 8 t at 4.0 kJ/(kg·K) in 3.5 t of steel at 0.50 kJ/(kg·K): φ = 1 + 1750/32000 = 1.0546875
    assert thermal_inertia_factor(8000, 4000, 3500, 500) == pytest.approx(1.0546875, rel=1e-12)
    assert thermal_inertia_factor(8000, 4000, C_vessel=1.75e6) == pytest.approx(1.0546875, rel=1e-12)
    assert thermal_inertia_factor(8000, 4000) == 1.0  # no vessel: φ = 1 exactly


def test_adiabatic_temperature_rise_by_hand():
    # 85 kJ/mol × 4500 mol = 382.5 MJ into 8 t at 4.0 kJ/(kg·K): 382.5/32 = 11.953125 K
    assert adiabatic_temperature_rise(382.5e6, 8000, 4000) == pytest.approx(11.953125, rel=1e-12)
    # with φ = 1.0546875: 382.5 / (32 + 1.75) = 11.3333... K
    assert adiabatic_temperature_rise(382.5e6, 8000, 4000, 1.0546875) == pytest.approx(382.5 / 33.75, rel=1e-12)
    # endothermic: a negative rise (a fall), reported as such
    assert adiabatic_temperature_rise(-32e6, 8000, 4000) == pytest.approx(-1.0, rel=1e-12)


def test_mtsr_by_hand():
    # 60 °C + 30 % of 40 K = 72 °C
    assert mtsr(60 + C, 40.0, 0.30) == pytest.approx(72 + C, abs=1e-9)
    assert mtsr(60 + C, 40.0) == pytest.approx(100 + C, abs=1e-9)  # default: everything accumulated
    assert mtsr(60 + C, -5.0) == pytest.approx(60 + C, abs=1e-12)  # endothermic: no rise


# (T_process, MTSR, MTT, T_D24) in °C -> class; the orderings of Stoessel (2008), section 3.3.3
CLASSES = [
    pytest.param(60, 80, 100, 150, 1, id="class1-MTSR<MTT<TD24"),
    pytest.param(60, 80, 150, 100, 2, id="class2-MTSR<TD24<MTT"),
    pytest.param(60, 120, 100, 150, 3, id="class3-MTT<MTSR<TD24"),
    pytest.param(60, 160, 100, 150, 4, id="class4-MTT<TD24<MTSR"),
    pytest.param(60, 120, 150, 100, 5, id="class5-TD24<MTSR<MTT"),
    pytest.param(60, 160, 150, 100, 5, id="class5-TD24<MTT<MTSR"),
    # ties count against safety (documented in criticality_class)
    pytest.param(60, 100, 100, 150, 3, id="tie-MTSR=MTT-counts-as-reached"),
    pytest.param(60, 80, 100, 100, 2, id="tie-MTT=TD24-counts-as-TD24-first"),
    pytest.param(60, 150, 100, 150, 4, id="tie-MTSR=TD24-counts-as-reached"),
    pytest.param(60, 60, 100, 150, 1, id="no-rise"),
]


@pytest.mark.parametrize("T_p, T_mtsr, T_mtt, T_d24, expected", CLASSES)
def test_criticality_class(T_p, T_mtsr, T_mtt, T_d24, expected):
    assert criticality_class(T_p + C, T_mtsr + C, T_mtt + C, T_d24 + C) == expected
    assert CLASS_MEANINGS[expected].startswith(f"Class {expected}:")


def test_jacket_time_heating_by_hand():
    # 5 t at 4.0 kJ/(kg·K), 20 -> 80 °C, steam at 150 °C, UA = 4 kW/K:
    # t = m·cp/UA · ln((150-20)/(150-80)) = 5000 s × ln(130/70) = 5000 × 0.619039208 = 3095.196 s
    assert jacket_time(20 + C, 80 + C, 150 + C, 5000, 4000, UA=4000) == pytest.approx(3095.196, abs=1e-3)


def test_jacket_time_cooling_with_U_and_A_by_hand():
    # 5 t at 4.0 kJ/(kg·K), 80 -> 30 °C, coolant at 20 °C, U = 500 W/(m²·K), A = 6 m² (UA = 3 kW/K):
    # t = 20e6/3000 · ln(60/10) = 6666.667 × 1.791759 = 11945.06 s
    assert jacket_time(80 + C, 30 + C, 20 + C, 5000, 4000, U=500, A=6) == pytest.approx(11945.06, abs=0.01)
    assert jacket_time(30 + C, 30 + C, 20 + C, 5000, 4000, UA=3000) == 0.0  # already there


@pytest.mark.parametrize("T1, T2, Tu", [(20, 80, 150), (80, 30, 20), (25, 140, 141)])
def test_jacket_time_against_numerical_integration(T1, T2, Tu):
    """The same balance, m·cp·dT/dt = UA·(Tu − T), integrated step by step (scipy RK45 and explicit Euler)."""
    m, cp, UA = 5000.0, 4000.0, 4000.0
    closed = jacket_time(T1 + C, T2 + C, Tu + C, m, cp, UA=UA)

    def rate(t, T):
        return [UA * (Tu + C - T[0]) / (m * cp)]

    def arrived(t, T):
        return T[0] - (T2 + C)

    arrived.terminal = True
    run = solve_ivp(rate, (0, 50 * closed), [T1 + C], events=arrived, rtol=1e-10, atol=1e-10, max_step=closed / 50)
    assert run.t_events[0][0] == pytest.approx(closed, rel=1e-6)
    # explicit Euler with 1 s steps: first-order, so within a few seconds of the closed form
    T, t, dt = T1 + C, 0.0, 1.0
    while (T - (T2 + C)) * (T1 - T2) > 0:
        T += dt * UA * (Tu + C - T) / (m * cp)
        t += dt
    assert t == pytest.approx(closed, abs=5.0)
    # and the inverse relation gives back T2 at that time
    assert jacket_temperature(closed, T1 + C, Tu + C, m, cp, UA) == pytest.approx(T2 + C, abs=1e-9)


# --------------------------------------------------------------------------- refusals of the pure functions
@pytest.mark.parametrize("T1, T2, Tu, message", [
    pytest.param(20, 160, 150, r"a utility at 150.00 °C cannot heat the batch from 20.00 °C to 160.00 °C: the target "
                               r"must lie between the start and the utility temperature", id="target-above-utility"),
    pytest.param(20, 150, 150, r"cannot heat the batch from 20.00 °C to 150.00 °C", id="target-equals-utility"),
    pytest.param(80, 30, 90, r"a utility at 90.00 °C cannot cool the batch from 80.00 °C to 30.00 °C.*Use a colder "
                             r"utility", id="cooling-with-a-hotter-utility"),
    pytest.param(80, 10, 20, r"cannot cool the batch from 80.00 °C to 10.00 °C", id="target-below-coolant"),
])
def test_jacket_refuses_unreachable_targets(T1, T2, Tu, message):
    with pytest.raises(NoSolutionError, match=message):
        jacket_time(T1 + C, T2 + C, Tu + C, 5000, 4000, UA=4000)


@pytest.mark.parametrize("kwargs, message", [
    pytest.param({}, r"^UA: give UA, or U and A \(not both\)", id="no-UA"),
    pytest.param({"UA": 4000, "U": 500, "A": 8}, r"give UA, or U and A \(not both\)", id="both"),
    pytest.param({"U": 500}, r"^A: U needs the area A, and A needs U", id="U-without-A"),
    pytest.param({"UA": -4000}, r"^UA: UA must be a positive number of W/K, not -4000", id="negative-UA"),
    pytest.param({"UA": float("nan")}, r"UA must be a positive number of W/K, not nan", id="nan-UA"),
])
def test_jacket_refuses_bad_heat_transfer(kwargs, message):
    with pytest.raises(InputError, match=message):
        jacket_time(20 + C, 80 + C, 150 + C, 5000, 4000, **kwargs)


def test_pure_function_refusals():
    with pytest.raises(InputError, match=r"the mass of the reaction mass must be a positive number of kg, not 0"):
        adiabatic_temperature_rise(1e6, 0, 4000)
    with pytest.raises(InputError, match=r"the specific heat of the reaction mass must be a positive number"):
        thermal_inertia_factor(8000, -1)
    with pytest.raises(InputError, match=r"the vessel mass cannot be negative \(-5\)"):
        thermal_inertia_factor(8000, 4000, -5, 500)
    with pytest.raises(InputError, match=r"^phi: the thermal inertia factor φ must be at least 1, not 0.5"):
        adiabatic_temperature_rise(1e6, 8000, 4000, 0.5)
    with pytest.raises(InputError, match=r"^accumulation: the accumulation is a fraction from 0 to 1, not 1.5"):
        mtsr(330.0, 10.0, 1.5)
    with pytest.raises(InputError, match=r"the process temperature must be an absolute temperature above 0 K"):
        mtsr(-5.0, 10.0)
    with pytest.raises(InputError, match=r"^MTSR: MTSR \(320.00 K\) cannot be below the process temperature"):
        criticality_class(330.0, 320.0, 373.0, 400.0)
    with pytest.raises(InputError, match=r"^time: the time cannot be negative"):
        jacket_temperature(-1.0, 300.0, 400.0, 1000, 4000, 1000)
    with pytest.raises(InputError, match=r"the batch mass must be a positive number of kg"):
        jacket_time(300.0, 310.0, 400.0, 0, 4000, UA=1000)


# --------------------------------------------------------------------------- from a worksheet
# Scenario A (our own): 8 t of a liquid with constant cp 4.0 kJ/(kg·K) held at 60 °C; 4.5 kmol react with
# ΔH = -85 kJ/mol (382.5 MJ released); the vessel's heat capacity is 1750 kJ/K (3.5 t of steel at 0.50);
# the jacket duty is the unknown. Hand: ΔT_ad = 382.5/32 = 11.953125 K; φ = 1.0546875;
# ΔT_ad/φ = 382.5/33.75 = 11.333333 K; MTSR (100 %) = 71.953125 °C.
DT_AD = 382.5e6 / (8000 * 4000.0)
PHI = 1 + 1.75e6 / 32e6
DT_AD_PHI = 382.5e6 / (32e6 + 1.75e6)


def scenario(screening=None, pressure="0 barg", material="liquid A", **reaction):
    vessel = {"name": "R", "pressure": pressure,
              "charges": [{"name": "Mass", "material": material, "mass": q(8, "t"), "initial": temp(60)}],
              "final": temp(60), "equipment": {"heat_capacity": q(1750, "kJ/K")}}
    if screening is not None:
        vessel["screening"] = screening
    return build(basis={"kind": "batch"}, materials=[constant_cp_material("liquid A", cp=4.0, t_max=300)],
                 vessels=[vessel], duties=[{"name": "Jacket"}],
                 reactions=[{"name": "Rx", "enthalpy": q(-85, "kJ/mol"), "amount": q(4.5, "kmol"), **reaction}],
                 unknowns=[{"kind": "duty", "term": "Jacket"}])


def screening_of(ws):
    result = solve(ws)
    assert len(result.screening) == 1
    return result.screening[0]


def adiabatic_scenario(screening=None, jacket="0 kJ"):
    """The scenario with the batch's final temperature solved for and the jacket's duty given."""
    ws = scenario(screening).model_dump(mode="json")
    ws["duties"] = [{"name": "Jacket", "value": jacket}]
    ws["unknowns"] = [{"kind": "temperature", "line": "R", "end": "final"}]
    return build(**{k: v for k, v in ws.items() if k != "schema_version"})


def _counted_twice(result):
    return [w for w in result.warnings if "counts twice" in w.text]


def test_a_process_temperature_the_uncooled_balance_solved_for_is_warned_as_counted_twice():
    result = solve(adiabatic_scenario())
    (s,) = result.screening
    # hand: 382.5 MJ over 32 + 1.75 MJ/K: the batch ends 11.33 K up, at 71.33 °C; MTSR adds 11.95 K on top
    assert s.T_process - C == pytest.approx(60 + 382.5 / 33.75, abs=1e-3)
    (warning,) = _counted_twice(result)
    assert warning.address == "vessels[R].screening.process_temperature"
    # entered, or with a cooling duty, the process temperature is the cooling's: no warning
    assert _counted_twice(solve(adiabatic_scenario({"process_temperature": "60 degC"}))) == []
    assert _counted_twice(solve(adiabatic_scenario(jacket="-100 MJ"))) == []


def test_worksheet_screening_numbers_by_hand():
    s = screening_of(scenario({"MTT": "90 degC", "T_D24": "150 degC"}))
    assert s.vessel == "R" and s.reactions == ["Rx"]
    assert s.Q_reaction == pytest.approx(382.5e6, rel=1e-12)
    assert s.mass == pytest.approx(8000, rel=1e-12)
    assert s.cp == pytest.approx(4000, rel=1e-9)
    assert s.heat_capacity_vessel == pytest.approx(1.75e6, rel=1e-12)
    assert s.phi == pytest.approx(PHI, rel=1e-9)
    assert s.dT_ad == pytest.approx(11.953125, rel=1e-9)
    assert s.dT_ad_phi == pytest.approx(11.333333, rel=1e-6)
    assert s.T_process == pytest.approx(60 + C, abs=1e-9)
    assert s.MTSR == pytest.approx(71.953125 + C, abs=1e-6)
    assert s.criticality_class == 1 and s.alarms == []
    assert s.caution == CAUTION


def test_worksheet_accumulation_and_thermal_inertia():
    # 30 % accumulated: 60 + 0.3 × 11.953125 = 63.5859375 °C
    s = screening_of(scenario({"accumulation": 0.3}))
    assert s.MTSR == pytest.approx(63.5859375 + C, abs=1e-6)
    # with φ: 60 + 11.333333 = 71.333333 °C
    s = screening_of(scenario({"thermal_inertia": True}))
    assert s.MTSR == pytest.approx(60 + DT_AD_PHI + C, abs=1e-6)
    assert s.thermal_inertia_used


@pytest.mark.parametrize("MTT, T_D24, expected", [
    pytest.param(90, 150, 1, id="class1"),  # 71.95 < 90 < 150
    pytest.param(120, 100, 2, id="class2"),  # 71.95 < 100 <= 120
    pytest.param(70, 150, 3, id="class3"),  # 70 <= 71.95 < 150
    pytest.param(65, 70, 4, id="class4"),  # 65 < 70 <= 71.95
    pytest.param(100, 70, 5, id="class5"),  # 70 <= 71.95 and 70 <= 100
])
def test_worksheet_reaches_every_class(MTT, T_D24, expected):
    s = screening_of(scenario({"MTT": f"{MTT} degC", "T_D24": f"{T_D24} degC"}))
    assert s.criticality_class == expected
    assert s.class_meaning == CLASS_MEANINGS[expected]
    # alarms exactly when MTSR (71.95 °C) reaches MTT or T_D24
    assert any("reaches MTT" in a.text for a in s.alarms) == (MTT <= 71.953125)
    assert any("reaches T_D24" in a.text for a in s.alarms) == (T_D24 <= 71.953125)


def test_worksheet_MTT_is_the_boiling_point_at_the_vessel_pressure():
    # water at 2 barg = 3.01325 bar(a): IAPWS-IF97 saturation temperature from the independent iapws package
    expected = IAPWS97(P=0.301325, x=0).T
    s = screening_of(scenario(pressure="2 barg", material="water"))
    assert s.MTT == pytest.approx(expected, abs=1e-3)
    assert "boiling point of water at 3.013 bar(a)" in s.MTT_source.text
    assert "IAPWS-IF97" in s.MTT_source.text
    # liquid water at 60 °C: cp 4.184 kJ/(kg·K) (CRC Handbook, from memory, ±0.1 %)
    assert s.cp == pytest.approx(4184, rel=2e-3)
    assert s.criticality_class is None and "enter T_D24" in s.class_meaning


def test_worksheet_MTT_entered_overrides_and_missing_MTT_is_said():
    assert screening_of(scenario({"MTT": "80 degC"})).MTT == pytest.approx(80 + C)
    s = screening_of(scenario())  # liquid A has no boiling point in its data
    assert s.MTT is None and "enter MTT" in s.MTT_source.text
    assert s.class_meaning == "No criticality class: enter MTT and T_D24 (from calorimetry) to classify."


def test_worksheet_alarm_text_is_loud_and_in_the_report():
    s = screening_of(scenario({"MTT": "100 degC", "T_D24": "70 degC"}))
    assert s.alarm
    assert [a.text for a in s.alarms] == ["MTSR 72.0 °C reaches T_D24 70.0 °C: if cooling fails a decomposition can be triggered "
                        "(time to maximum rate under 24 h)."]
    text = "\n".join(screening_report([s]))
    assert "!!! ALARM: MTSR 72.0 °C reaches T_D24 70.0 °C" in text
    assert CAUTION in text
    assert "criticality class          5: Class 5:" in text


def test_worksheet_process_temperature_override():
    s = screening_of(scenario({"process_temperature": "50 degC"}))
    assert s.MTSR == pytest.approx(50 + DT_AD + C, abs=1e-6)  # hand: 61.953125 °C


def test_worksheet_jacket_time_by_hand():
    # cooling from the process temperature 60 °C to 40 °C with coolant at 15 °C and UA = 10 kW/K;
    # heat capacity = 32 MJ/K (contents) + 1.75 MJ/K (vessel) = 33.75 MJ/K:
    # t = 33.75e6/1e4 × ln(45/25) = 3375 s × 0.5877867 = 1983.780 s
    s = screening_of(scenario({"jacket": {"utility_temperature": "15 degC", "target_temperature": "40 degC",
                                          "UA": "10 kW/K"}}))
    assert s.jacket.direction == "cooling"
    assert s.jacket.time == pytest.approx(1983.780, abs=1e-3)
    # the same with U = 500 W/(m²·K) on 20 m²
    s = screening_of(scenario({"jacket": {"utility_temperature": "15 degC", "target_temperature": "40 degC",
                                          "U": "500 W/(m^2*K)", "area": "20 m^2"}}))
    assert s.jacket.time == pytest.approx(1983.780, abs=1e-3)


def test_worksheet_endothermic_reaction_has_no_rise():
    s = screening_of(scenario(enthalpy=q(40, "kJ/mol")))
    assert s.Q_reaction == 0  # an endothermic reaction is not credited (it may not run when cooling fails)
    assert s.MTSR == pytest.approx(60 + C, abs=1e-9)
    assert any("not exothermic" in n.text for n in s.notes)
    assert any("is endothermic" in n.text and "not credited" in n.text for n in s.notes)


def test_no_screening_without_reaction():
    ws = build(basis={"kind": "batch"}, materials=[constant_cp_material("liquid A", cp=4.0)],
               vessels=[{"name": "R", "charges": [{"name": "Mass", "material": "liquid A", "mass": q(8, "t"),
                                                   "initial": temp(20)}], "final": temp(60)}],
               duties=[{"name": "Heater"}], unknowns=[{"kind": "duty", "term": "Heater"}])
    assert solve(ws).screening == []


def test_screening_in_json_result():
    data = json.loads(json.dumps(solve(scenario({"T_D24": "70 degC", "MTT": "100 degC"})).to_dict()))
    record = data["screening"][0]
    assert record["MTSR"] == pytest.approx(71.953125 + C, abs=1e-6)
    assert record["criticality_class"] == 5
    assert record["caution"] == CAUTION
    assert record["alarms"] and record["dT_ad"] == pytest.approx(DT_AD)


def test_screening_in_cli_output(tmp_path, capsys):
    path = tmp_path / "reactor.json"
    path.write_text(scenario({"T_D24": "70 degC", "MTT": "100 degC"}).model_dump_json(), encoding="utf-8")
    assert main(["solve", str(path)]) == 0
    out = capsys.readouterr().out
    assert "THERMAL SCREENING  vessel R (Rx)" in out
    assert "!!! ALARM: MTSR 72.0 °C reaches T_D24 70.0 °C" in out
    assert CAUTION in out
    assert "MTSR (100% accumulation)   72.0 °C" in out


def test_the_reactor_sample_gets_a_screening():
    with open("sample_data/batch_reactor_exotherm.json", encoding="utf-8") as handle:
        from heatbalance.worksheet import load_worksheet
        result = solve(load_worksheet(handle.read()))
    s = result.screening[0]
    # hand: Q = 92 kJ/mol × 4200 mol = 386.4 MJ; m = 7500 + 1100 = 8600 kg
    assert s.Q_reaction == pytest.approx(386.4e6, rel=1e-12)
    assert s.mass == pytest.approx(8600, rel=1e-12)
    # hand: m·cp ≈ 7500 × 4.181 (water near 55 °C, IAPWS-IF97 via iapws) + 1100 × 3.2 = 34 878 kJ/K
    cp_water = IAPWS97(T=s.T_process, P=0.101325).cp * 1000
    assert s.dT_ad == pytest.approx(386.4e6 / (7500 * cp_water + 1100 * 3200), rel=1e-3)
    assert s.MTT == pytest.approx(IAPWS97(P=0.101325, x=0).T, abs=1e-3)  # 99.97 °C


# --------------------------------------------------------------------------- worksheet refusals
def test_worksheet_jacket_unreachable_target_is_refused():
    with pytest.raises(NoSolutionError, match=r"^vessels\[R\]\.screening\.jacket\.target_temperature: a utility at "
                                              r"15.00 °C cannot cool the batch from 60.00 °C to 10.00 °C"):
        solve(scenario({"jacket": {"utility_temperature": "15 degC", "target_temperature": "10 degC",
                                   "UA": "10 kW/K"}}))


def test_worksheet_jacket_bad_unit_is_refused():
    with pytest.raises(UnitError, match=r"^vessels\[R\]\.screening\.jacket\.UA: unit 'kg' is not a heat-transfer "
                                        r"coefficient times area"):
        solve(scenario({"jacket": {"utility_temperature": "15 degC", "target_temperature": "40 degC",
                                   "UA": "10 kg"}}))
    with pytest.raises(InputError, match=r"^vessels\[R\]\.screening\.jacket\.UA: UA must be positive"):
        solve(scenario({"jacket": {"utility_temperature": "15 degC", "target_temperature": "40 degC",
                                   "UA": "-10 kW/K"}}))


def test_worksheet_jacket_forms_are_checked():
    with pytest.raises(WorksheetFormatError, match=r"give the jacket's 'UA', or its 'U' and 'area'"):
        scenario({"jacket": {"utility_temperature": "15 degC", "target_temperature": "40 degC",
                             "UA": "10 kW/K", "U": "500 W/(m^2*K)"}})
    with pytest.raises(WorksheetFormatError, match=r"a jacket given by U also needs its heat-transfer 'area'"):
        scenario({"jacket": {"utility_temperature": "15 degC", "target_temperature": "40 degC",
                             "U": "500 W/(m^2*K)"}})


def test_worksheet_accumulation_out_of_range_is_refused():
    with pytest.raises(WorksheetFormatError, match=r"^vessels\[R\]\.screening\.accumulation: Input should be less "
                                                   r"than or equal to 1"):
        scenario({"accumulation": 1.2})


def test_worksheet_bad_T_D24_unit_is_refused():
    with pytest.raises(UnitError, match=r"^vessels\[R\]\.screening\.T_D24: unit 'kg' is not a temperature"):
        solve(scenario({"T_D24": "150 kg"}))


def test_reaction_naming_no_vessel_is_refused():
    with pytest.raises(InputError, match=r"^reactions\[Rx\]\.vessel: names vessel 'R-9', which is not a vessel of "
                                         r"this worksheet \(vessels: R\)"):
        solve(scenario(vessel="R-9"))


# --------------------------------------------------------------------------- figure
def test_screening_figure():
    s = screening_of(scenario({"MTT": "100 degC", "T_D24": "70 degC"}))
    figure = screening_figure(s)
    bar = figure.data[0]
    assert bar.type == "scatter" and bar.mode == "markers+text"  # points: no bar length read from a cut axis
    assert list(bar.x) == ["T_process", "MTSR", "MTT", "T_D24"]
    # hand: 60, 71.953125, 100, 70 °C
    assert list(bar.y) == pytest.approx([60, 71.953125, 100, 70], abs=1e-6)
    assert bar.marker.color[1] == "#c0392b"  # MTSR red: it reaches T_D24
    assert "ALARM" in figure.layout.title.text
    assert len(figure.layout.shapes) == 2  # dashed limits at MTT and T_D24
    calm = screening_figure(screening_of(scenario({"MTT": "100 degC", "T_D24": "150 degC"})), system="US")
    assert "ALARM" not in calm.layout.title.text
    # °F: 60 °C = 140 °F, 71.953125 °C = 161.515625 °F (× 9/5 + 32, by hand)
    assert list(calm.data[0].y)[:2] == pytest.approx([140, 161.515625], abs=1e-6)
    assert calm.layout.yaxis.title.text == "temperature [°F]"
    assert not math.isnan(calm.layout.yaxis.range[0])


# --------------------------------------------------------------------------- the page's panel
def _panel_page():
    """A page with only the screening panel, on the reactor sample (AppTest runs this function's body)."""
    from pathlib import Path

    import streamlit as st

    import heatbalance
    from heatbalance import load_worksheet, solve_and_analyse
    from webapp.screening_panel import render_screening_panel

    sample = Path(heatbalance.__file__).resolve().parent.parent / "sample_data" / "batch_reactor_exotherm.json"
    ws = load_worksheet(sample.read_bytes())
    system = st.session_state.get("test_system", "SI")
    render_screening_panel(ws, solve_and_analyse(ws), system, caution=True)


def _alarms(at):
    """The alarms shown, as plain text (user-facing words are escaped for Markdown on the page)."""
    return [re.sub(r"\\(.)", r"\1", e.value) for e in at.error if "ALARM" in e.value]


def test_panel_alone_alarm_follows_T_D24():
    from streamlit.testing.v1 import AppTest

    at = AppTest.from_function(_panel_page, default_timeout=60).run()
    assert not at.exception
    assert any(CAUTION in w.value for w in at.warning)
    assert _alarms(at) == []
    # the sample: MTSR = 55.0 + 11.1 = 66.1 °C (see test_the_reactor_sample_gets_a_screening)
    at.number_input(key="screening_0_T_D24").set_value(60.0).run()
    assert _alarms(at) == ["**ALARM:** MTSR 66.1 °C reaches T_D24 60.0 °C: if cooling fails a decomposition can "
                           "be triggered (time to maximum rate under 24 h)."]
    at.number_input(key="screening_0_T_D24").set_value(150.0).run()
    assert _alarms(at) == []
    assert any("Criticality class 1" in m.value for m in at.markdown)
    # MTT set below MTSR: the boiling alarm
    at.number_input(key="screening_0_MTT").set_value(65.0).run()
    assert any("reaches MTT 65.0 °C" in a for a in _alarms(at))


def test_what_if_worksheet_changes_only_the_screening_inputs():
    from webapp.screening_panel import what_if_worksheet

    ws = scenario({"jacket": {"utility_temperature": "15 degC", "target_temperature": "40 degC", "UA": "10 kW/K"}})
    copy = what_if_worksheet(ws, "R", 0.5, None, None)
    assert copy.vessels[0].screening.accumulation == 0.5
    assert copy.vessels[0].screening.jacket == ws.vessels[0].screening.jacket
    assert ws.vessels[0].screening.accumulation == 1.0  # the original is untouched
    assert copy.model_copy(update={"vessels": ws.vessels}) == ws


def test_figure_carries_the_caution():
    figure = screening_figure(screening_of(scenario()))
    texts = " ".join(a.text for a in figure.layout.annotations)
    assert CAUTION.replace("; defer", ";<br>defer") in texts


def test_reaction_without_vessel_among_several_is_warned():
    ws = scenario()
    doc = ws.model_dump(mode="json", exclude_none=True)
    second = json.loads(json.dumps(doc["vessels"][0]))
    second["name"] = "R2"
    doc["vessels"].append(second)
    doc["duties"].append({"name": "Jacket 2", "value": q(-382.5, "MJ")})
    from heatbalance.worksheet import parse_worksheet
    result = solve(parse_worksheet(doc))
    assert result.screening == []
    assert "Reaction Rx names no vessel and the worksheet has 2: it gets no thermal screening" in \
        " ".join(w.text for w in result.warnings)


# --------------------------------------------------------------------------- the real page (app.py, issue 3)
ROOT = Path(__file__).resolve().parent.parent
APP = ROOT / "app.py"
REACTOR_SAMPLE = ROOT / "sample_data" / "batch_reactor_exotherm.json"


def test_app_reactor_sample_shows_the_panel_and_the_alarm_follows_T_D24():
    from streamlit.testing.v1 import AppTest

    from heatbalance.worksheet import Quantity, load_worksheet

    from webapp.state import KEY, PageState

    at = AppTest.from_file(str(APP), default_timeout=60)
    at.session_state[KEY] = PageState.opened(load_worksheet(REACTOR_SAMPLE.read_bytes()))  # the page's one state
    at.run()
    assert not at.exception, [e.value for e in at.exception]
    assert any(h.value.startswith("Thermal screening") for h in at.header)
    assert any(CAUTION in w.value for w in at.warning)
    assert _alarms(at) == []
    # MTSR of the sample: 66.1 °C (test_the_reactor_sample_gets_a_screening); T_D24 below it -> alarm
    at.number_input(key="screening_0_T_D24").set_value(60.0).run()
    assert not at.exception
    assert any("MTSR 66.1 °C reaches T_D24 60.0 °C" in a for a in _alarms(at))
    # the input is written into the worksheet, so a saved or shared sheet carries it
    assert at.session_state[KEY].worksheet.vessels[0].screening.T_D24 == Quantity(value=60.0, unit="degC")
    # raised above MTSR and MTT -> no alarm, class 1
    at.number_input(key="screening_0_T_D24").set_value(150.0).run()
    assert _alarms(at) == []
    assert any("Criticality class 1" in m.value for m in at.markdown)
    # a refused input is shown on the panel and not written into the worksheet
    at.number_input(key="screening_0_T_D24").set_value(-300.0).run()
    assert not at.exception
    assert any("These screening inputs cannot be used" in e.value and "below absolute zero" in e.value
               for e in at.error)
    assert at.session_state[KEY].worksheet.vessels[0].screening.T_D24 == Quantity(value=150.0, unit="degC")


# --------------------------------------------------------------------------- unit slips a checker sees
def _reactor_with(change) -> object:
    import json

    from heatbalance.analyses import solve_and_analyse
    from heatbalance.worksheet import load_worksheet

    doc = json.loads(open("sample_data/batch_reactor_exotherm.json", "rb").read())
    change(doc)
    return solve_and_analyse(load_worksheet(json.dumps(doc).encode()))


@pytest.mark.parametrize("change, address, words", [
    # ΔH typed in J/mol for kJ/mol: 0.092 kJ/mol, below the 1 kJ/mol of any reaction worth a balance
    (lambda d: d["reactions"][0].update(enthalpy={"value": -92, "unit": "J/mol"}), "reactions[Main reaction].enthalpy",
     "ΔH -92 J/mol is 0.092 kJ/mol in magnitude, outside what reactions worth a balance release"),
    # cp in J for kJ (0.0032 kJ/(kg·K)) and in kcal for kJ (13.4 kJ/(kg·K)): a liquid has 0.1 to 5
    (lambda d: d["materials"][0]["phases"][0].update(cp={"value": 3.2, "unit": "J/(kg*K)"}),
     "materials[reagent solution].phases[liquid].cp", "cp 3.2 J/(kg*K) reaches 0.0032 kJ/(kg·K), outside what liquids"),
    (lambda d: d["materials"][0]["phases"][0].update(cp={"value": 3.2, "unit": "kcal/(kg*K)"}),
     "materials[reagent solution].phases[liquid].cp", "cp 3.2 kcal/(kg*K) reaches 13.4 kJ/(kg·K), outside what liquids"),
    # −110 mW over 40 min = −0.264 kJ beside the 386,400 kJ of reaction heat (hand calculation)
    (lambda d: d["duties"][0].update(value={"value": -110, "unit": "mW"}), "duties[Jacket cooling].value",
     "Duty Jacket cooling is -0.264 kJ, under a millionth of the balance's largest heat (386,400 kJ)"),
], ids=["dH-in-J", "cp-in-J", "cp-in-kcal", "duty-in-mW"])
def test_a_likely_unit_slip_is_warned_at_its_field(change, address, words):
    result = _reactor_with(change)
    (warning,) = [w for w in result.warnings if w.address == address]
    assert words in warning.text and "check" in warning.text and "unit" in warning.text


def test_the_reactor_as_typed_has_no_unit_slip_warning():
    assert not [w for w in _reactor_with(lambda d: None).warnings if "unit" in w.text]


def test_no_unit_slip_warning_for_a_fitted_cp_or_a_small_duty_beside_a_large_one():
    # cp = 0.05 + 0.006·T kJ/(kg·K) is 1.85-2.09 over 300-340 K (hand calculation): its constant term alone is no cp
    fitted = _reactor_with(lambda d: d["materials"][0]["phases"][0].update(
        cp={"value": 0.05, "unit": "kJ/(kg*K)"}, cp_per_kelvin=0.006))
    # −10 W over 40 min = −24 kJ beside 386,400 kJ: 6e-5 of it, a small heater, not a unit slip (hand calculation)
    small = _reactor_with(lambda d: d["duties"][0].update(value={"value": -10, "unit": "W"}))
    for result in (fitted, small):
        assert not [w for w in result.warnings if "unit" in w.text]


# --------------------------------------------------------------------------- a user material's data, checked
def _wax_sheet(material: dict) -> object:
    from heatbalance.balance import solve
    from sheet_factory import build, q, stream, temp

    return solve(build(materials=[material], streams=[stream("Wax", "wax", q(1, "t/h"), temp(20), temp(90))],
                       duties=[{"name": "Melter"}], unknowns=[{"kind": "duty", "term": "Melter"}]))


def test_a_fitted_cp_that_turns_negative_in_its_phase_is_refused_at_its_field():
    from heatbalance.errors import InputError
    from sheet_factory import melting_material

    wax = melting_material()
    # 2.3 − 0.01·T kJ/(kg·K) is negative above 230 K: everywhere in the liquid's 50-300 °C (hand calculation)
    wax["phases"][1]["cp_per_kelvin"] = -0.01
    with pytest.raises(InputError) as refused:
        _wax_sheet(wax)
    assert refused.value.where == "materials[wax].phases[liquid].cp"
    assert "it must stay positive from 50.0 °C to 300.0 °C" in refused.value.message


def test_a_latent_heat_in_J_per_kg_is_warned_and_two_phases_of_one_name_refused():
    from heatbalance.errors import InputError
    from sheet_factory import melting_material, q

    slip = melting_material()
    slip["phases"][0]["latent_heat"] = q(200, "J/kg")  # 0.2 kJ/kg: a J-for-kJ slip (waxes: about 200 kJ/kg)
    (warning,) = [w for w in _wax_sheet(slip).warnings if "check the unit" in w.text]
    assert warning.address == "materials[wax].phases[solid].latent_heat" and "check the unit" in warning.text
    twice = melting_material()
    twice["phases"][1]["name"] = "solid"
    with pytest.raises(InputError) as refused:
        _wax_sheet(twice)
    assert refused.value.where == "materials[wax].phases" and "two phases are called 'solid'" in refused.value.message


def test_phases_named_hot_before_cold_are_warned():
    from sheet_factory import melting_material

    backwards = melting_material()
    backwards["phases"][0]["name"], backwards["phases"][1]["name"] = "liquid", "solid"
    (warning,) = [w for w in _wax_sheet(backwards).warnings if "coldest first" in w.text]
    assert warning.address == "materials[wax].phases" and "'liquid' comes before 'solid'" in warning.text
    assert not [w for w in _wax_sheet(melting_material()).warnings if "coldest first" in w.text or "unit" in w.text]


# --------------------------------------------------------------------------- the screening on the safe side
def test_a_partial_conversion_still_screens_the_full_reaction_heat():
    def conversion(value):
        return lambda d: d["reactions"][0].update(conversion=value)

    full, half = _reactor_with(conversion(1.0)), _reactor_with(conversion(0.5))
    (s_full,), (s_half,) = full.screening, half.screening
    # hand: 92 kJ/mol × 4.2 kmol = 386,400 kJ whatever the balance's conversion: the 2.1 kmol left can still react
    assert s_half.Q_reaction == pytest.approx(386_400e3, rel=1e-9) == s_full.Q_reaction
    assert s_half.dT_ad == pytest.approx(s_full.dT_ad, rel=1e-3)  # cp differs only with the process temperature
    assert any("leaves 193,200 kJ unreacted" in n.text for n in s_half.notes)
    (term,) = [t for t in half.terms if t.kind == "reaction"]
    assert term.heat == pytest.approx(193_200e3, rel=1e-9)  # the balance releases what it converts


def test_an_endothermic_side_reaction_is_not_credited_in_the_screening():
    side = {"name": "Side (endo)", "enthalpy": {"value": 30, "unit": "kJ/mol"},
            "amount": {"value": 4.2, "unit": "kmol"}, "vessel": "R-2"}
    (s,) = _reactor_with(lambda d: d["reactions"].append(side)).screening
    # hand: only the main reaction's 386,400 kJ counts; crediting the side's −126,000 kJ put ΔT_ad 1/3 low
    assert s.Q_reaction == pytest.approx(386_400e3, rel=1e-9)
    assert any("Side (endo) is endothermic" in n.text and "not credited" in n.text for n in s.notes)


def test_a_typed_reaction_heat_of_the_opposite_sign_to_its_equation_is_warned():
    def typed(value):
        return lambda d: d["reactions"][0].update(enthalpy={"value": value, "unit": "kJ/mol"},
                                                  equation="ethylene oxide(l) + water(l) -> ethylene glycol(l)",
                                                  key_reactant="ethylene oxide")

    # ethylene oxide hydration: ΔH° = −460.0 − (−78.0 − 285.8) = −96.2 kJ/mol (Hess's law, by hand)
    (warning,) = [w for w in _reactor_with(typed(92)).warnings if "opposite sign" in w.text]
    assert warning.address == "reactions[Main reaction].enthalpy"
    assert not [w for w in _reactor_with(typed(-92)).warnings if "opposite sign" in w.text]


def test_a_jacket_that_cannot_remove_the_average_release_is_warned():
    def jacket(UA):
        return lambda d: d["vessels"][0]["screening"].update(
            jacket={"UA": UA, "utility_temperature": "15 degC", "target_temperature": "40 degC"})

    small = _reactor_with(jacket("0.5 kW/K"))
    (s,) = small.screening
    # hand: 0.5 kW/K × (54.98 − 15) K = 20.0 kW at most, against 386,400 kJ over the 40 min batch = 161 kW
    (warning,) = [w for w in small.warnings if w.text.startswith("Jacket of R-2 too small")]
    assert warning.address == "vessels[R-2].screening.jacket.UA"
    assert "removes at most 19.99 kW" in warning.text and "161 kW" in warning.text
    # 5 kW/K removes 200 kW there: enough on average (hand calculation)
    assert not [w for w in _reactor_with(jacket("5 kW/K")).warnings if "too small" in w.text]


def test_a_cp_only_charge_above_mtt_is_said_to_boil_as_charged():
    """A shift engineer's finding: the dissolved methanol (cp-only data) typed at 140 °C passed silently, though
    the mixture boils at MTT 87.6 °C (UNIFAC bubble point of the sample; Perry's gives 87.7 °C at x = 0.10)."""
    import json

    from heatbalance.analyses import solve_and_analyse
    from heatbalance.worksheet import load_worksheet

    doc = json.load(open("sample_data/dissolved_solvent_screening.json", encoding="utf-8"))
    charge = next(c for c in doc["vessels"][0]["charges"] if c["name"] == "Methanol")
    result = solve_and_analyse(load_worksheet(json.dumps(doc)))
    assert not [w for w in result.warnings if "above MTT" in w.text]  # as the sample has it, 20 °C
    charge["initial"]["temperature"] = {"value": 140, "unit": "degC"}
    result = solve_and_analyse(load_worksheet(json.dumps(doc)))
    (warning,) = [w for w in result.warnings if "above MTT" in w.text]
    assert "charged at 140.0 °C, above MTT 87.6 °C: it would boil as it is charged" in warning.text
    assert warning.address == "vessels[R-5].charges[Methanol].initial.temperature"


def test_the_process_temperature_typed_on_the_panel_moves_mtsr():
    """A shift engineer's finding: the double-count warning asked for a process temperature the page had no field
    for. Typed on the panel, MTSR follows it: 50.0 °C + 100 % × 11.1 K = 61.1 °C (ΔT_ad of the sample, see
    test_the_reactor_sample_gets_a_screening; hand calculation)."""
    from streamlit.testing.v1 import AppTest

    at = AppTest.from_function(_panel_page, default_timeout=60).run()
    at.number_input(key="screening_0_process_temperature").set_value(50.0).run()
    assert not at.exception
    table = next(m.value for m in at.markdown if m.value.startswith("| T_process"))
    assert "| 50.0 °C | **61.1 °C** (100% accumulated) |" in table


def test_a_process_temperature_above_the_batchs_boiling_point_is_said_to_take_the_vapours_cp():
    """A plant engineer's finding: T_process 150 °C at 0 barg took water's cp as steam's (about 2 instead of 4.2
    kJ/(kg·K), IAPWS-IF97), so ΔT_ad was about doubled, and the cp note did not say why."""
    import json

    from heatbalance.analyses import solve_and_analyse
    from heatbalance.worksheet import load_worksheet

    doc = json.load(open("sample_data/batch_reactor_exotherm.json", encoding="utf-8"))
    doc["vessels"][0].setdefault("screening", {})["process_temperature"] = {"value": 150, "unit": "degC"}
    result = solve_and_analyse(load_worksheet(json.dumps(doc)))
    (warning,) = [w for w in result.warnings if w.text.startswith("ΔT_ad takes")]
    assert "R-2 / Batch at the process temperature 150.0 °C, above its boiling point 100.0 °C" in warning.text
    assert warning.address == "vessels[R-2].screening.process_temperature"
    assert result.screening[0].cp < 2.5e3  # the vapour's, as the warning says (the liquid batch: 4.05 kJ/(kg·K))
