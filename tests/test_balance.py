"""Hand-calculated scenarios of our own, one per unknown kind and per feature.

Each test writes its hand calculation out. Constant-cp test materials make the
hand calculation exact; water and steam use IAPWS-IF97 via the `iapws` package.
"""
import pytest
from iapws import IAPWS97

from heatbalance.balance import solve
from heatbalance.present.text import answer_text, answer_unit, answer_value
from handbook import INCROPERA_A1, integrated_cp
from sheet_factory import build, constant_cp_material, melting_material, q, stream, temp

A = constant_cp_material("liquid A", cp=2.0)
B = constant_cp_material("liquid B", cp=4.0)


def heater_sheet(duty, unknown, inlet=temp(20), outlet=temp(80)):
    return build(materials=[A], streams=[stream("Feed", "liquid A", q(3600, "kg/h"), inlet, outlet)],
                 duties=[{"name": "Heater", "value": duty}], unknowns=[unknown])


def test_duty_of_a_heater():
    # hand calculation: Q = m·cp·ΔT = 1 kg/s × 2.0 kJ/(kg·K) × 60 K = 120 kW
    result = solve(heater_sheet(q(0, "kW"), {"kind": "duty", "term": "Heater"}))
    assert answer_value(result.answer) == pytest.approx(120.0, rel=1e-9)
    assert answer_unit(result.answer) == "kW"
    assert result.residual == pytest.approx(0.0, abs=1e-6)


def test_outlet_temperature_from_a_duty():
    # hand calculation: T_out = 20 °C + 90 kW / (1 kg/s × 2.0 kJ/(kg·K)) = 65 °C
    result = solve(heater_sheet(q(90, "kW"), {"kind": "temperature", "line": "Feed", "end": "outlet"}))
    assert answer_value(result.answer) == pytest.approx(65.0, abs=1e-6)
    assert answer_unit(result.answer) == "degC"


def test_inlet_temperature_from_a_duty():
    # hand calculation: T_in = 80 °C − 120 kW / (1 kg/s × 2.0 kJ/(kg·K)) = 20 °C
    result = solve(heater_sheet(q(120, "kW"), {"kind": "temperature", "line": "Feed", "end": "inlet"}))
    assert answer_value(result.answer) == pytest.approx(20.0, abs=1e-6)


def test_common_outlet_temperature_of_two_streams_mixing():
    # hand calculation: T = Σ m·cp·T / Σ m·cp = (2·2·80 + 1·4·20) / (2·2 + 1·4) = 50 °C
    ws = build(materials=[A, B], common_temperatures=[{"name": "Mixed"}],
               streams=[stream("Hot", "liquid A", q(2, "kg/s"), temp(80), {"common": "Mixed"}),
                        stream("Cold", "liquid B", q(1, "kg/s"), temp(20), {"common": "Mixed"})],
               unknowns=[{"kind": "temperature", "common": "Mixed"}])
    result = solve(ws)
    assert answer_value(result.answer) == pytest.approx(50.0, abs=1e-6)
    assert [ln.final_T - 273.15 for ln in result.lines] == pytest.approx([50.0, 50.0], abs=1e-6)


def test_cooling_flow_for_a_cooler():
    # hand calculation: hot side 5000 kg/h × 2.0 × (120 − 60) = 600 000 kJ/h;
    # cold flow = 600 000 kJ/h / (4.0 kJ/(kg·K) × 20 K) = 7500 kg/h
    ws = build(materials=[A, B],
               streams=[stream("Product", "liquid A", q(5000, "kg/h"), temp(120), temp(60)),
                        stream("Coolant", "liquid B", q(1, "kg/h"), temp(25), temp(45))],
               unknowns=[{"kind": "amount", "line": "Coolant"}])
    result = solve(ws)
    assert answer_value(result.answer) == pytest.approx(7500.0, rel=1e-9)
    assert answer_unit(result.answer) == "kg/h"


def test_melting_ends_on_the_plateau_with_the_fraction_still_solid():
    # hand calculation: 1000 kg wax from 20 °C: 1000·2.0·30 = 60 MJ to reach 50 °C; the remaining
    # 40 MJ melts 40 000 / 200 = 200 kg -> 50 °C with 80 % still solid
    ws = build(basis={"kind": "batch"}, materials=[melting_material()],
               vessels=[{"name": "Melter", "charges": [{"name": "Wax", "material": "wax", "mass": q(1000, "kg"),
                                                        "initial": temp(20)}], "final": temp(60)}],
               duties=[{"name": "Heating", "value": q(100, "MJ")}],
               unknowns=[{"kind": "temperature", "line": "Melter", "end": "final"}])
    result = solve(ws)
    assert answer_value(result.answer) == pytest.approx(50.0, abs=1e-6)
    assert result.answer.plateau == "melting"
    assert result.answer.phase_fraction == pytest.approx(0.2, abs=1e-9)
    assert answer_text(result.answer) == "50 °C, 80.0% still solid"
    (wax,) = result.lines
    assert wax.latent == pytest.approx(40e6, rel=1e-9) and wax.sensible == pytest.approx(60e6, rel=1e-9)


def test_batch_vessel_with_reaction_losses_and_calibrated_equipment():
    # hand calculation: reaction heat = 100 kJ/mol × 2000 mol × 0.9 = 180 MJ; loss 5 kW × 1 h = 18 MJ;
    # heat capacity = 2000 kg × 2.0 kJ/(kg·K) + 1000 kJ/K = 5000 kJ/K; ΔT = 162 000 / 5000 = 32.4 K -> 62.4 °C
    ws = build(basis={"kind": "batch", "duration": q(1, "h")}, materials=[A],
               vessels=[{"name": "R1", "charges": [{"name": "Batch", "material": "liquid A", "mass": q(2, "t"),
                                                    "initial": temp(30)}],
                         "final": temp(30), "equipment": {"heat_capacity": q(1000, "kJ/K")}}],
               reactions=[{"name": "Rxn", "enthalpy": q(-100, "kJ/mol"), "amount": q(2, "kmol"),
                           "conversion": 0.9}],
               losses=[{"name": "Ambient", "value": q(5, "kW")}],
               unknowns=[{"kind": "temperature", "line": "R1", "end": "final"}])
    result = solve(ws)
    assert answer_value(result.answer) == pytest.approx(62.4, abs=1e-6)
    terms = {t.name: t.heat for t in result.terms}
    assert terms["Rxn"] == pytest.approx(180e6) and terms["Ambient"] == pytest.approx(-18e6)
    assert terms["R1 equipment"] == pytest.approx(-1000e3 * 32.4, rel=1e-6)


def test_batch_power_duty_over_a_duration_with_steel_equipment():
    # hand calculation: 10 kW × 30 min = 18 MJ = 500 kg·4.0 kJ/(kg·K)·ΔT + 200 kg·∫cp_steel dT.
    # Since issue 13 carbon steel has cp(T) (it was a constant 0.434 kJ/(kg·K), giving ΔT = 18 000 / 2086.8 K);
    # the reference now integrates Incropera Table A.1 plain carbon steel (tests/handbook.py, from memory).
    from scipy.optimize import brentq

    def heat(T):
        return 500 * 4000.0 * (T - 293.15) + 200 * integrated_cp(INCROPERA_A1["carbon steel"], 293.15, T) - 18e6

    ws = build(basis={"kind": "batch", "duration": q(30, "min")}, materials=[B],
               vessels=[{"name": "Tank", "charges": [{"name": "Water-like", "material": "liquid B",
                                                      "mass": q(500, "kg"), "initial": temp(20)}],
                         "final": temp(20), "equipment": {"material": "carbon steel", "mass": q(200, "kg")}}],
               duties=[{"name": "Coil", "value": q(10, "kW")}],
               unknowns=[{"kind": "temperature", "line": "Tank", "end": "final"}])
    assert answer_value(solve(ws).answer) == pytest.approx(brentq(heat, 293.15, 320.0) - 273.15, abs=1e-6)


def _two_charge_vessel(order, equipment_start=None):
    charges = {"hot": {"name": "Hot", "material": "liquid B", "mass": q(500, "kg"), "initial": temp(60)},
               "cold": {"name": "Cold", "material": "liquid B", "mass": q(500, "kg"), "initial": temp(20)}}
    equipment = {"heat_capacity": q(1000, "kJ/K")}
    if equipment_start is not None:
        equipment["initial_temperature"] = q(equipment_start, "degC")
    return build(basis={"kind": "batch"}, materials=[B],
                 vessels=[{"name": "Tank", "charges": [charges[c] for c in order], "final": temp(40),
                           "equipment": equipment}],
                 unknowns=[{"kind": "temperature", "line": "Tank", "end": "final"}])


def test_equipment_that_starts_at_the_first_charge_warns_when_the_order_of_the_charges_matters():
    # hand calculation: 500·4·(T − 60) + 500·4·(T − 20) + 1000·(T − T_eq) = 0 → T = (160,000 + 1000·T_eq) / 5000
    # kJ: T_eq = 60 °C (hot first) gives 44.0 °C, T_eq = 20 °C (cold first) gives 36.0 °C
    hot_first, cold_first = solve(_two_charge_vessel(["hot", "cold"])), solve(_two_charge_vessel(["cold", "hot"]))
    assert answer_value(hot_first.answer) == pytest.approx(44.0, abs=1e-6)
    assert answer_value(cold_first.answer) == pytest.approx(36.0, abs=1e-6)
    (warning,) = [w for w in cold_first.warnings if "equipment is taken" in w.text]
    assert warning.address == "vessels[Tank].equipment.initial_temperature"
    assert "first charge's temperature (Cold, 20.0 °C), but the charges start between 20.0 °C and 60.0 °C" in \
        warning.text
    assert "vessels[Tank].equipment: starts at the temperature of the vessel's first charge, Cold" in \
        " ".join(map(str, cold_first.assumptions))
    # given, the equipment's start ends the dependence on order and the warning: 40 °C → (160,000 + 40,000) / 5000
    for order in (["hot", "cold"], ["cold", "hot"]):
        given = solve(_two_charge_vessel(order, equipment_start=40))
        assert answer_value(given.answer) == pytest.approx(40.0, abs=1e-6)
        assert not [w for w in given.warnings if "equipment is taken" in w.text]


def test_us_customary_worksheet():
    # hand calculation: Q = 10 000 lb/h × 0.5 Btu/(lb·°F) × (250 − 70) °F = 900 000 Btu/h
    oil = constant_cp_material("oil", cp=0.5, unit="Btu/(lb*degF)")
    ws = build(materials=[oil],
               streams=[stream("Oil", "oil", q(10000, "lb/h"), temp(70, "degF"), temp(250, "degF"),
                               pressure=q(30, "psig"))],
               duties=[{"name": "Heater", "value": q(1, "Btu/h")}], unknowns=[{"kind": "duty", "term": "Heater"}])
    result = solve(ws)
    assert answer_value(result.answer, "US") == pytest.approx(900_000, rel=1e-6)
    assert answer_unit(result.answer, "US") == "Btu/h"


def test_steam_flow_for_a_heater():
    # hand calculation: Q = 10 000 kg/h × 2.0 kJ/(kg·K) × 80 K = 1 600 000 kJ/h;
    # saturated steam at 3 barg (0.401325 MPa) condensing: h_fg from IAPWS-IF97 via iapws
    h_fg = IAPWS97(P=0.401325, x=1).h - IAPWS97(P=0.401325, x=0).h
    ws = build(materials=[A],
               streams=[stream("Feed", "liquid A", q(10000, "kg/h"), temp(20), temp(100)),
                        stream("Steam", "water", q(1, "kg/h"), {"vapour_fraction": 1}, {"vapour_fraction": 0},
                               pressure=q(3, "barg"))],
               unknowns=[{"kind": "amount", "line": "Steam"}])
    result = solve(ws)
    assert answer_value(result.answer) == pytest.approx(1_600_000 / h_fg, rel=1e-6)
    steam = result.lines[1]
    assert steam.sensible == pytest.approx(0.0, abs=1e-6) and steam.latent == pytest.approx(-1_600_000 / 3.6, rel=1e-6)


def test_flash_of_hot_condensate_ends_on_the_boiling_plateau():
    # hand calculation with IAPWS-IF97 via iapws: isenthalpic let-down from 11.01325 bar(a), 175 °C
    # to 1.51325 bar(a): x = (h_in − h_f) / (h_g − h_f)
    h_in = IAPWS97(P=1.101325, T=448.15).h
    liquid, vapour = IAPWS97(P=0.151325, x=0), IAPWS97(P=0.151325, x=1)
    ws = build(streams=[stream("Condensate", "water", q(1.8, "t/h"), temp(175),
                               {"temperature": q(110, "degC"), "pressure": q(0.5, "barg")}, pressure=q(10, "barg"))],
               unknowns=[{"kind": "temperature", "line": "Condensate", "end": "outlet"}])
    result = solve(ws)
    assert result.answer.value_si == pytest.approx(liquid.T, abs=1e-6)
    assert result.answer.phase_fraction == pytest.approx((h_in - liquid.h) / (vapour.h - liquid.h), rel=1e-6)
    assert answer_text(result.answer).endswith("% vapour")


def test_quench_water_mass():
    # hand calculation with IAPWS-IF97 via iapws at 1.01325 bar:
    # m_cold = 3000 kg × (h(95 °C) − h(40 °C)) / (h(40 °C) − h(12 °C))
    h = {t: IAPWS97(P=0.101325, T=273.15 + t).h for t in (95, 40, 12)}
    ws = build(basis={"kind": "batch"},
               vessels=[{"name": "Pit", "charges": [
                   {"name": "Hot", "material": "water", "mass": q(3, "t"), "initial": temp(95)},
                   {"name": "Cold", "material": "water", "mass": q(1, "t"), "initial": temp(12)}],
                   "final": temp(40)}],
               unknowns=[{"kind": "amount", "line": "Pit", "charge": "Cold"}])
    result = solve(ws)
    assert answer_value(result.answer) == pytest.approx(3.0 * (h[95] - h[40]) / (h[40] - h[12]), rel=1e-6)
    assert answer_unit(result.answer) == "t"


def test_reaction_amount_from_a_mass_and_molar_mass():
    # hand calculation: 180 kg / 60 g/mol = 3 kmol; 3000 mol × 80 kJ/mol = 240 MJ released;
    # 4000 kg × 2.0 kJ/(kg·K) -> ΔT = 240 000 / 8000 = 30 K
    ws = build(basis={"kind": "batch"}, materials=[A],
               vessels=[{"name": "R", "charges": [{"name": "Mass", "material": "liquid A", "mass": q(4000, "kg"),
                                                   "initial": temp(25)}], "final": temp(25)}],
               reactions=[{"name": "Rxn", "enthalpy": q(-80, "kJ/mol"), "amount": q(180, "kg"),
                           "molar_mass": q(60, "g/mol")}],
               unknowns=[{"kind": "temperature", "line": "R", "end": "final"}])
    assert answer_value(solve(ws).answer) == pytest.approx(55.0, abs=1e-6)


def test_ice_melting_sample_against_iapws():
    # hand calculation: 1000 kg water 20 -> 0 °C releases 1000·(h(20 °C) − h(0 °C)) [IAPWS-IF97 via iapws];
    # 400 kg ice takes 400·2.05·10 kJ to reach 0 °C; the rest melts m = rest / 333.55 kJ/kg
    # (ice data: CRC Handbook, from memory)
    released = 1000 * (IAPWS97(P=0.101325, T=293.15).h - IAPWS97(P=0.101325, T=273.15).h)
    melted = (released - 400 * 2.05 * 10) / 333.55
    from heatbalance.worksheet import load_worksheet
    with open("sample_data/ice_melting_tank.json", encoding="utf-8") as handle:
        result = solve(load_worksheet(handle.read()))
    assert answer_value(result.answer) == pytest.approx(0.0, abs=1e-6)
    assert 1 - result.answer.phase_fraction == pytest.approx((400 - melted) / 400, rel=1e-6)


def test_contributions_close_the_balance():
    result = solve(heater_sheet(q(90, "kW"), {"kind": "temperature", "line": "Feed", "end": "outlet"}))
    absorbed = sum(ln.total for ln in result.lines)
    supplied = sum(t.heat for t in result.terms)
    assert absorbed == pytest.approx(90e3, rel=1e-9) and supplied == pytest.approx(90e3)
    assert result.residual == pytest.approx(0.0, abs=1e-3)


def test_a_charge_above_its_boiling_point_is_said_to_be_vapour_as_charged():
    import json

    from heatbalance.worksheet import load_worksheet

    doc = json.loads(open("sample_data/hot_condensate_quench.json", "rb").read())
    doc["vessels"][0]["charges"][0]["initial"]["temperature"]["value"] = 150  # "hot condensate" typed at 150 °C
    result = solve(load_worksheet(json.dumps(doc).encode()))
    # at the pit's 0 barg water boils at 99.97 °C (IAPWS-IF97 via iapws): the charge is steam, counted so; 3 t of
    # steam condensing and cooling to 40 °C need about 3 × (2,776 − 167) / (167 − 50) ≈ 66.9 t of 12 °C water
    h_steam, h_40, h_12 = (IAPWS97(T=T + 273.15, P=0.101325).h for T in (150, 40, 12))
    assert result.answer.value_si == pytest.approx(3000 * (h_steam - h_40) / (h_40 - h_12), rel=1e-3)
    (warning,) = [w for w in result.warnings if "vapour as charged" in w.text]
    assert warning.address == "vessels[Quench pit].charges[Hot condensate].initial.temperature"
    assert "150.00 °C is above its boiling point 99.97 °C at 1.013 bar(a)" in warning.text
    assert "within 1 K of boiling" not in warning.text
    doc["vessels"][0]["charges"][0]["initial"]["pressure"] = {"value": 5, "unit": "barg"}  # a liquid under pressure
    assert not [w for w in solve(load_worksheet(json.dumps(doc).encode())).warnings if "vapour as charged" in w.text]
    doc["vessels"][0]["charges"][0]["initial"]["pressure"] = {"value": 3, "unit": "barg"}  # steam at its own 3 barg,
    doc["vessels"][0]["charges"][0]["initial"]["temperature"]["value"] = 160  # charged on purpose: not said
    assert not [w for w in solve(load_worksheet(json.dumps(doc).encode())).warnings if "vapour as charged" in w.text]


def test_a_charge_typed_at_100_c_for_boiling_water_is_told_how_to_give_boiling_liquid():
    """A shift engineer's finding: '100 °C' typed for boiling water at 0 barg is 0.03 K above its boiling point
    (99.97 °C at 1.01325 bar, IAPWS-IF97 via iapws) and counted as steam; the warning says how to give boiling
    liquid (vapour fraction 0)."""
    result = solve(_one_charge_duty("Batch", "water", 100, 100, 60))
    (warning,) = [w for w in result.warnings if "vapour as charged" in w.text]
    assert "100.00 °C is above its boiling point 99.97 °C" in warning.text
    assert "within 1 K of boiling: for a liquid at its boiling point, give its state as vapour fraction 0" in \
        warning.text


def _one_charge_duty(charge: str, material: str, kg: float, initial_C: float, final_C: float):
    """A 0 barg batch vessel V of one charge taken from one temperature to another; its duty is the unknown."""
    return build(basis={"kind": "batch"},
                 vessels=[{"name": "V", "charges": [{"name": charge, "material": material, "mass": q(kg, "kg"),
                                                     "initial": temp(initial_C)}], "final": temp(final_C)}],
                 duties=[{"name": "Duty"}], unknowns=[{"kind": "duty", "term": "Duty"}])


def test_a_gas_charged_above_its_boiling_point_that_stays_a_gas_is_not_said_to_condense():
    # a nitrogen blanket: 50 kg at 20 °C in a 0 barg vessel, far above its −195.8 °C boiling point, ends a gas
    result = solve(_one_charge_duty("Blanket", "nitrogen", 50, 20, 60))
    # hand: 50 kg × 1.04 kJ/(kg·K) (N2 near 1 atm, Incropera Table A.4, from memory) × 40 K ≈ 2,080 kJ
    assert result.answer.value_si == pytest.approx(2.08e6, rel=0.01)
    assert not [w for w in result.warnings if "vapour as charged" in w.text]


def test_a_liquid_at_ambient_charged_above_its_boiling_point_is_said_even_if_it_stays_vapour():
    # water at 150 °C in a 0 barg vessel, cooled to 120 °C: steam throughout (IAPWS-IF97: boils at 99.97 °C)
    result = solve(_one_charge_duty("Hot water", "water", 100, 150, 120))
    steam = IAPWS97(T=393.15, P=0.101325).h - IAPWS97(T=423.15, P=0.101325).h  # kJ/kg, superheated steam
    assert result.answer.value_si == pytest.approx(100 * steam * 1e3, rel=1e-3)
    (warning,) = [w for w in result.warnings if "vapour as charged" in w.text]
    assert warning.address == "vessels[V].charges[Hot water].initial.temperature"


def test_ice_charged_above_its_melting_point_is_said_to_be_water():
    import json

    from heatbalance.worksheet import load_worksheet

    doc = json.loads(open("sample_data/ice_melting_tank.json", "rb").read())
    ice = doc["vessels"][0]["charges"][1]
    ice["initial"]["temperature"]["value"] = 5  # typed +5 °C for −5 °C
    result = solve(load_worksheet(json.dumps(doc).encode()))
    # the 400 kg then hold no latent heat: 1 t at 20 °C and 400 kg at 5 °C mix to about 15.7 °C (hand, cp equal)
    assert answer_value(result.answer) == pytest.approx((1000 * 20 + 400 * 5) / 1400, abs=0.1)
    (warning,) = [w for w in result.warnings if "is ice charged at" in w.text]
    assert warning.address == "vessels[Tank T-5].charges[Ice].initial.temperature"
    assert not [w for w in solve(load_worksheet(open("sample_data/ice_melting_tank.json", "rb").read())).warnings
                if "is ice charged at" in w.text]
