"""Warnings a checker needs to see, and user-defined materials (polynomial cp, transitions)."""
import pytest

from heatbalance.balance import solve
from heatbalance.present.text import error_text, phrase_text
from heatbalance.errors import InputError, PropertyRangeError
from handbook import INCROPERA_A1, integrated_cp
from sheet_factory import build, constant_cp_material, q, stream, temp

A = constant_cp_material("liquid A", cp=2.0)


def test_phase_change_is_reported_with_its_latent_heat():
    ws = build(streams=[stream("Boiler feed", "water", q(1, "t/h"), temp(20), temp(150))],
               duties=[{"name": "Boiler"}], unknowns=[{"kind": "duty", "term": "Boiler"}])
    result = solve(ws)
    (warning,) = result.warnings
    # IAPWS-IF97 via iapws: h_fg at 1 atm = 2256.5 kJ/kg
    assert warning.text.startswith("Boiler feed changes phase (liquid → vapour) and takes up latent heat, 2,256.5 kJ/kg;")
    assert result.lines[0].latent == pytest.approx(1000 / 3600 * 2256.54e3, rel=1e-5)


def test_condensing_steam_gives_up_latent_heat():
    ws = build(materials=[A],
               streams=[stream("Feed", "liquid A", q(3600, "kg/h"), temp(20), temp(80)),
                        stream("Steam", "water", q(1, "kg/h"), {"vapour_fraction": 1}, {"vapour_fraction": 0},
                               pressure=q(4, "barg"))],
               unknowns=[{"kind": "amount", "line": "Steam"}])
    (warning,) = solve(ws).warnings
    # IAPWS-IF97 via iapws: h_fg at 0.501325 MPa = 2107.4 kJ/kg
    assert warning.text.startswith("Steam changes phase (saturated vapour → saturated liquid) and gives up latent heat, "
                              "2,107.")


def test_temperature_cross_with_a_heater_duty_is_a_warning_not_a_refusal():
    ws = build(materials=[A],
               streams=[stream("Feed", "liquid A", q(3600, "kg/h"), temp(20), temp(150)),
                        stream("Hot water", "water", q(1, "kg/s"), temp(90), temp(60), pressure=q(3, "barg"))],
               duties=[{"name": "Trim heater"}], unknowns=[{"kind": "duty", "term": "Trim heater"}])
    result = solve(ws)
    assert any(w.text.startswith("Temperature cross: Hot water enters at 90.00 °C, so it cannot heat Feed to 150.00 °C")
               for w in result.warnings)


def test_cooling_below_the_coolant_inlet_is_refused_without_a_cooler():
    ws = build(materials=[A],
               streams=[stream("Product", "liquid A", q(3600, "kg/h"), temp(80), temp(20)),
                        stream("Cooling water", "water", q(1, "kg/s"), temp(28), temp(35), pressure=q(3, "barg"))],
               unknowns=[{"kind": "amount", "line": "Cooling water"}])
    from heatbalance.errors import NoSolutionError
    with pytest.raises(NoSolutionError, match=r"Cooling water enters at 28\.00 °C, so it cannot cool Product to "
                                              r"20\.00 °C"):
        solve(ws)


def test_extrapolated_table_data_is_a_warning():
    ws = build(basis={"kind": "batch"},
               vessels=[{"name": "Oven", "charges": [{"name": "Parts", "material": "carbon steel", "mass": q(100, "kg"),
                                                      "initial": temp(20)}], "final": temp(550)}],
               duties=[{"name": "Heat"}], unknowns=[{"kind": "duty", "term": "Heat"}])
    result = solve(ws)
    # Since issue 13 carbon steel has cp(T), validated to 500 °C (it was a constant 0.434 kJ/(kg·K) validated to
    # 150 °C, so this test heated to 300 °C with 100 × 434 × 280 J). New reference: 100 kg × Incropera Table A.1
    # plain carbon steel integrated 20 -> 550 °C (tests/handbook.py, from memory); the engine's row is that table.
    reference = 100 * integrated_cp(INCROPERA_A1["carbon steel"], 293.15, 823.15)
    assert result.answer.value_si == pytest.approx(reference)
    assert any("550.0 °C is outside the validated range of the data for carbon steel (-70 °C to 500 °C)" in w.text
               for w in result.warnings)


def test_solution_above_the_boiling_point_of_water_is_flagged():
    ws = build(streams=[stream("Glycol", "ethylene glycol (aq)", q(1, "t/h"), temp(20), temp(99.99),
                               mass_fraction=0.3)],
               duties=[{"name": "Heat"}], unknowns=[{"kind": "duty", "term": "Heat"}])
    result = solve(ws)
    assert any("above the boiling point of water at 1.013 bar(a); boiling of the solution is not modelled" in w.text
               for w in result.warnings)


def test_polynomial_cp_material():
    # cp = 1.5 + 0.002·T kJ/(kg·K), T in K; hand calculation: ∫ from 300 to 400 K =
    # 1.5·100 + 0.001·(400² − 300²) = 150 + 70 = 220 kJ/kg
    poly = {"name": "poly", "source": "test", "phases": [{"name": "liquid", "cp": q(1.5, "kJ/(kg*K)"),
                                                          "cp_per_kelvin": 0.002}],
            "min_temperature": q(0, "K"), "max_temperature": q(1000, "K")}
    ws = build(materials=[poly], streams=[stream("P", "poly", q(1, "kg/s"), temp(300, "K"), temp(400, "K"))],
               duties=[{"name": "H"}], unknowns=[{"kind": "duty", "term": "H"}])
    assert solve(ws).answer.value_si == pytest.approx(220e3, rel=1e-12)


def test_user_material_transitions_must_rise():
    bad = {"name": "bad", "source": "test",
           "phases": [{"name": "solid", "cp": q(2, "kJ/(kg*K)"), "up_to": q(500, "degC"), "latent_heat": q(100, "kJ/kg")},
                      {"name": "liquid", "cp": q(3, "kJ/(kg*K)")}],
           "min_temperature": q(0, "degC"), "max_temperature": q(100, "degC")}
    ws = build(materials=[bad], streams=[stream("X", "bad", q(1, "kg/s"), temp(20), temp(30))],
               duties=[{"name": "H"}], unknowns=[{"kind": "duty", "term": "H"}])
    with pytest.raises(InputError, match=r"^materials\[bad\]\.max_temperature: temperatures must rise: min temperature < each transition"):
        solve(ws)


def test_user_material_phase_needs_its_transition():
    bad = {"name": "bad", "source": "test",
           "phases": [{"name": "solid", "cp": q(2, "kJ/(kg*K)")}, {"name": "liquid", "cp": q(3, "kJ/(kg*K)")}],
           "min_temperature": q(0, "degC"), "max_temperature": q(100, "degC")}
    ws = build(materials=[bad], streams=[stream("X", "bad", q(1, "kg/s"), temp(20), temp(30))],
               duties=[{"name": "H"}], unknowns=[{"kind": "duty", "term": "H"}])
    with pytest.raises(InputError, match=r"^materials\[bad\]\.phases\[solid\]\.up_to: every phase but the last needs 'up_to'"):
        solve(ws)


def test_pressure_above_the_property_data():
    ws = build(streams=[stream("HP water", "water", q(1, "t/h"), temp(20), temp(40), pressure=q(2000, "bar"))],
               duties=[{"name": "H"}], unknowns=[{"kind": "duty", "term": "H"}])
    with pytest.raises(PropertyRangeError, match=r"^streams\[HP water\]\.pressure: pressure 2,000 bar\(a\) is outside the "
                                                 r"property data of water \(0\.00611\d* bar\(a\) to 1,000 bar\(a\)\)"):
        solve(ws)


def test_mixed_vessel_cannot_end_on_a_fraction():
    ws = build(basis={"kind": "batch"}, materials=[A],
               vessels=[{"name": "V", "charges": [
                   {"name": "W", "material": "water", "mass": q(1, "t"), "initial": temp(20)},
                   {"name": "L", "material": "liquid A", "mass": q(1, "t"), "initial": temp(20)}],
                   "final": {"vapour_fraction": 0.5}}],
               duties=[{"name": "H"}], unknowns=[{"kind": "duty", "term": "H"}])
    with pytest.raises(InputError, match=r"^vessels\[V\]\.final: a final phase fraction needs all charges of one material"):
        solve(ws)


def test_warnings_follow_the_display_units():
    ws = build(streams=[stream("Boiler feed", "water", q(1, "t/h"), temp(20), temp(150))],
               duties=[{"name": "Boiler"}], unknowns=[{"kind": "duty", "term": "Boiler"}])
    (warning,) = solve(ws).warnings
    # IAPWS-IF97 h_fg at 1 atm 2256.5 kJ/kg = 970.1 Btu/lb (1 Btu/lb = 2.326 kJ/kg, exact)
    assert "takes up latent heat, 970.1 Btu/lb" in phrase_text(warning, "US")
    assert "takes up latent heat, 2,256.5 kJ/kg" in phrase_text(warning, "SI")
    assert warning.address == "streams[Boiler feed]"


def test_refusals_follow_the_display_units():
    from heatbalance.errors import NoSolutionError
    ws = build(materials=[A],
               streams=[stream("Product", "liquid A", q(3600, "kg/h"), temp(80), temp(20)),
                        stream("Cooling water", "water", q(1, "kg/s"), temp(28), temp(35), pressure=q(3, "barg"))],
               unknowns=[{"kind": "amount", "line": "Cooling water"}])
    # 28 °C = 82.40 °F, 20 °C = 68.00 °F (exact conversions)
    with pytest.raises(NoSolutionError) as refusal:
        solve(ws)
    assert error_text(refusal.value, "US").startswith("Cooling water enters at 82.40 °F, so it cannot cool Product to "
                                                      "68.00 °F")
    assert refusal.value.where == "streams[Cooling water].flow"  # the unknown's address
