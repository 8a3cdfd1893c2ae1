"""Heat of reaction at the process temperature by Kirchhoff's law (issue 12, item 4).

References: NIST-JANAF Thermochemical Tables, 4th ed. (Chase 1998): the heat of formation of a species from its
elements in their reference states at T is exactly the Kirchhoff-corrected heat of that formation reaction
(values from memory). Hand calculations of our own scenario for the worksheet.
"""
import pytest

from heatbalance.balance import solve
from heatbalance.kirchhoff import T_STANDARD, correlation_source, reaction_enthalpy_at
from heatbalance.present.report import format_result
from heatbalance.present.text import phrase_text
from heatbalance.reactions import reaction_enthalpy
from tests.sheet_factory import build, constant_cp_material, q, temp

AMMONIA = "1/2 N2(g) + 3/2 H2(g) -> NH3(g)"
STEAM = "H2(g) + 1/2 O2(g) -> H2O(g)"


@pytest.mark.parametrize("equation, key, T, kJ", [
    # NIST-JANAF, ammonia: ΔfH° −45.898 kJ/mol at 298.15 K, from memory
    pytest.param(AMMONIA, "N2", 500.0, -49.857, id="JANAF-NH3-500K"),
    pytest.param(AMMONIA, "N2", 600.0, -51.438, id="JANAF-NH3-600K"),
    pytest.param(AMMONIA, "N2", 700.0, -52.719, id="JANAF-NH3-700K"),
    pytest.param(AMMONIA, "N2", 800.0, -53.723, id="JANAF-NH3-800K"),
    # NIST-JANAF, water (ideal gas): ΔfH° −241.826 kJ/mol at 298.15 K, from memory
    pytest.param(STEAM, "H2", 500.0, -243.826, id="JANAF-H2O(g)-500K"),
    pytest.param(STEAM, "H2", 1000.0, -247.857, id="JANAF-H2O(g)-1000K"),
])
def test_formation_enthalpies_at_temperature_against_janaf(equation, key, T, kJ):
    standard = reaction_enthalpy(equation, key, prefer="JANAF")  # the 298.15 K value from the same tables
    hot = reaction_enthalpy_at(standard, T)
    assert hot.corrected and not hot.missing
    # dH_T is per mole of reaction as written: one mole of product formed from its elements, JANAF's ΔfH°(T)
    assert hot.dH_T / 1000 == pytest.approx(kJ, abs=0.15)


def test_at_25_C_nothing_changes_and_the_correction_grows_with_temperature():
    standard = reaction_enthalpy(AMMONIA, "N2")
    assert reaction_enthalpy_at(standard, T_STANDARD).dH_T == pytest.approx(standard.dH, abs=1e-6)
    # ammonia at 500 °C: more than 10 % above its 25 °C value (the claim); JANAF, interpolated between
    # 700 K and 800 K (from memory): about −53.4 kJ/mol at 773 K vs −45.9 at 298 K
    at_500C = reaction_enthalpy_at(standard, 773.15)
    assert abs(at_500C.dH_T / standard.dH - 1) > 0.10


def test_a_species_without_cp_data_keeps_the_25_C_value_and_is_named():
    standard = reaction_enthalpy("sucrose(s) + 12 O2(g) -> 12 CO2(g) + 11 H2O(l)", "sucrose")
    hot = reaction_enthalpy_at(standard, 350.0)
    assert hot.missing == ("sucrose(s)",) and hot.dH_T == standard.dH and not hot.corrected


def test_correlations_are_named_with_their_sources():
    assert correlation_source("WEBBOOK_SHOMATE_1") == "NIST Chemistry WebBook, Shomate equation"
    assert correlation_source("TRCIG").startswith("TRC ideal-gas cp polynomials")
    assert correlation_source("SOMETHING_NEW") == "thermo, method as named"


# --------------------------------------------------------------------------- in the worksheet
def converter(reaction: dict, screening: dict | None = None):
    """A batch of 20 t of a constant-cp liquid held at 500 °C in which 2 kmol N2 react (our own scenario);
    the jacket duty is the unknown, so the reaction heat is the duty (hand: duty = −heat released)."""
    vessel = {"name": "R", "charges": [{"name": "Mass", "material": "liquid A", "mass": q(20, "t"),
                                        "initial": temp(500)}], "final": temp(500)}
    if screening:
        vessel["screening"] = screening
    return build(basis={"kind": "batch"}, materials=[constant_cp_material("liquid A", cp=2.0, t_max=900)],
                 vessels=[vessel], duties=[{"name": "Jacket"}],
                 reactions=[{"name": "Synthesis", "equation": AMMONIA, "key_reactant": "N2", "amount": q(2, "kmol"),
                             **reaction}],
                 unknowns=[{"kind": "duty", "term": "Jacket"}])


def reaction_term(result):
    return next(t for t in result.terms if t.kind == "reaction")


def test_the_reaction_temperature_applies_kirchhoff_and_shows_both_values():
    cold, hot = solve(converter({})), solve(converter({"temperature": q(500, "degC")}))
    standard = reaction_enthalpy(AMMONIA, "N2")
    at_T = reaction_enthalpy_at(standard, 773.15)
    # hand: heat released = −ΔH × 2000 mol N2 (ΔH per mol N2 = twice the per-NH3 value)
    assert reaction_term(cold).heat == pytest.approx(-standard.dH_per_key * 2000, rel=1e-9)
    assert reaction_term(hot).heat == pytest.approx(-at_T.dH_T / standard.key_coefficient * 2000, rel=1e-9)
    assert reaction_term(hot).heat / reaction_term(cold).heat > 1.10  # more than 10 % more heat at 500 °C
    detail = phrase_text(reaction_term(hot).detail)
    assert "at 500.0 °C (Kirchhoff; -91.12 kJ/mol at 25 °C by Hess's law)" in detail
    assert "at 932.0 °F (Kirchhoff" in phrase_text(reaction_term(hot).detail, "US")
    report = format_result(hot)
    assert "reactions[Synthesis]: ΔH at 500.0 °C (reactions[Synthesis].temperature) by Kirchhoff's law" in report
    assert "NH3(g) = TRCIG (TRC ideal-gas cp polynomials" in report
    assert "reactions[Synthesis]: ΔH at 25 °C (no Kirchhoff correction): no reaction temperature entered " \
           "(reactions[Synthesis].temperature)" in format_result(cold)


def test_the_vessels_process_temperature_is_used_when_the_reaction_has_none():
    by_vessel = solve(converter({}, {"process_temperature": q(500, "degC")}))
    by_reaction = solve(converter({"temperature": q(500, "degC")}))
    assert reaction_term(by_vessel).heat == pytest.approx(reaction_term(by_reaction).heat, rel=1e-12)
    assert "(vessels[R].screening.process_temperature) by Kirchhoff's law" in format_result(by_vessel)


def test_a_species_without_cp_data_falls_back_with_a_warning_naming_it():
    ws = build(basis={"kind": "batch"}, materials=[constant_cp_material("liquid A", cp=2.0, t_max=300)],
               vessels=[{"name": "R", "charges": [{"name": "Mass", "material": "liquid A", "mass": q(20, "t"),
                                                   "initial": temp(80)}], "final": temp(80)}],
               duties=[{"name": "Jacket"}],
               reactions=[{"name": "Burn", "equation": "sucrose(s) + 12 O2(g) -> 12 CO2(g) + 11 H2O(l)",
                           "key_reactant": "sucrose", "amount": q(1, "mol"), "temperature": q(80, "degC")}],
               unknowns=[{"kind": "duty", "term": "Jacket"}])
    result = solve(ws)
    warning = next(w for w in result.warnings if w.address == "reactions[Burn].equation")
    assert "no heat-capacity data for sucrose(s): ΔH is applied at its 25 °C value" in warning.text
    standard = reaction_enthalpy("sucrose(s) + 12 O2(g) -> 12 CO2(g) + 11 H2O(l)", "sucrose")
    assert reaction_term(result).heat == pytest.approx(-standard.dH_per_key, rel=1e-12)


def test_an_entered_enthalpy_is_never_corrected():
    result = solve(converter({"enthalpy": q(-100, "kJ/mol"), "temperature": q(500, "degC")}))
    assert reaction_term(result).heat == pytest.approx(2000 * 100e3)  # hand: 2000 mol × 100 kJ/mol


@pytest.mark.parametrize("typed", ["-200 degC", "5000 K"])
def test_a_reaction_temperature_out_of_range_is_refused_at_its_address(typed):
    from heatbalance.errors import InputError

    with pytest.raises(InputError) as caught:
        solve(converter({"temperature": typed}))
    assert caught.value.where == "reactions[Synthesis].temperature"
    assert "from 100 K to 3000 K" in caught.value.message


def _hot_reaction(equation: str, key: str, T_C: float):
    return build(basis={"kind": "batch"},
                 vessels=[{"name": "V", "charges": [{"name": "W", "material": "water", "mass": q(1000, "kg"),
                                                     "initial": temp(25)}], "final": temp(25)}],
                 reactions=[{"name": "R", "equation": equation, "key_reactant": key, "amount": q(1, "kmol"),
                             "temperature": q(T_C, "degC"), "vessel": "V"}],
                 duties=[{"name": "Q"}], unknowns=[{"kind": "duty", "term": "Q"}])


def test_a_liquid_written_beyond_its_liquid_data_is_refused_at_the_reaction_temperature():
    from heatbalance.errors import InputError

    # liquid ethanol cannot exist at 1000 °C (critical point 241 °C): its liquid cp stretched there made ΔH
    # −1629 kJ/mol against −1283 for ethanol(g), 27 % too much heat
    with pytest.raises(InputError) as refused:
        solve(_hot_reaction("ethanol(l) + 3 O2(g) -> 2 CO2(g) + 3 H2O(g)", "ethanol", 1000))
    assert refused.value.where == "reactions[R].temperature"
    assert "ethanol(l) is written as a liquid or a solid" in refused.value.message
    # written as a gas: ΔH(1000 °C) = −1283.0 kJ/mol (Kirchhoff from ideal-gas cp; a checker, CoolProp at 1 Pa)
    gas = solve(_hot_reaction("ethanol(g) + 3 O2(g) -> 2 CO2(g) + 3 H2O(g)", "ethanol", 1000))
    assert gas.answer.value_si == pytest.approx(-1283.0e6, rel=2e-3)


def test_a_species_whose_data_do_not_integrate_to_the_temperature_keeps_25_C_not_a_traceback():
    # NaOH(s) melts at 318 °C; its solid cp table ends there: the integral to 330 °C is none
    result = solve(_hot_reaction("NaOH(s) + HCl(g) -> NaCl(s) + H2O(g)", "NaOH", 330))
    (warning,) = [w for w in result.warnings if "NaOH(s)" in w.text]
    assert warning.address == "reactions[R].equation" and "25 °C value" in warning.text
