"""Heat of reaction from a balanced equation (Hess's law), against hand calculations from a named table.

Hand values use the CRC Handbook of Chemistry and Physics, section 5, "Standard Thermodynamic Properties
of Chemical Substances" (ΔfH° at 298.15 K, kJ/mol, printed to 0.1 kJ/mol), quoted from memory:

    H2O(l) −285.8   H2O(g) −241.8   CO2(g) −393.5   CH4(g) −74.6    propene(g) +20.0   propane(g) −103.8
    NaOH(s) −425.8  HCl(g) −92.3    NaCl(s) −411.2  NH3(g) −45.9    NH4Cl(s) −314.4
    benzene(l) +49.1  cyclohexane(l) −156.4  ethylene(g) +52.4  ethanol(g) −234.8  ethanol(l) −277.6
    ethylene oxide(l) −78.0  ethylene glycol(l) −460.0  CaO(s) −634.9  Ca(OH)2(s) −985.2
    elements in their reference states (H2(g), O2(g), N2(g), C graphite): 0 by definition.

The engine takes, for each species, the first measured table that ``chemicals`` ranks for it: often the
Active Thermochemical Tables (ATcT), which differ from the CRC by up to about 1 kJ/mol per species (propane:
ATcT −104.39, CRC −103.8). Hence two checks per reaction: the default tables within 1.5 kJ/mol of the CRC
hand value, and the CRC table (``prefer="CRC"``) within the CRC's printed precision.
"""
import json
import math

import pytest
from chemicals import reaction as chemicals_tables

from heatbalance.balance import solve
from heatbalance.errors import InputError, WorksheetFormatError
from heatbalance.reactions import (TABLES, element_balance, heat_of_formation, hess_law, parse_equation,
                                   reaction_enthalpy)
from heatbalance.worksheet import load_worksheet
from sheet_factory import build, constant_cp_material, q, temp

# CRC Handbook, section 5, from memory [kJ/mol]
CRC = {
    ("H2O", "l"): -285.8, ("water", "l"): -285.8, ("H2O", "g"): -241.8, ("CO2", "g"): -393.5,
    ("CH4", "g"): -74.6, ("propene", "g"): 20.0, ("propane", "g"): -103.8, ("NaOH", "s"): -425.8,
    ("HCl", "g"): -92.3, ("NaCl", "s"): -411.2, ("NH3", "g"): -45.9, ("NH4Cl", "s"): -314.4,
    ("benzene", "l"): 49.1, ("cyclohexane", "l"): -156.4, ("ethylene", "g"): 52.4, ("ethanol", "g"): -234.8,
    ("ethanol", "l"): -277.6, ("ethylene oxide", "l"): -78.0, ("ethylene glycol", "l"): -460.0,
    ("CaO", "s"): -634.9, ("Ca(OH)2", "s"): -985.2, ("O2", "g"): 0.0, ("H2", "g"): 0.0,
}

# (equation, key reactant, hand ΔH per mol key [kJ/mol] from the CRC values above, id)
REACTIONS = [
    pytest.param("CH4(g) + 2 O2(g) -> CO2(g) + 2 H2O(l)", "CH4",
                 -393.5 + 2 * -285.8 - (-74.6),  # hand: -890.5 (higher heating value)
                 id="combustion-methane-liquid-water"),
    pytest.param("CH4(g) + 2 O2(g) -> CO2(g) + 2 H2O(g)", "CH4",
                 -393.5 + 2 * -241.8 - (-74.6),  # hand: -802.5 (lower heating value)
                 id="combustion-methane-water-vapour"),
    pytest.param("NaOH(s) + HCl(g) -> NaCl(s) + H2O(l)", "NaOH",
                 -411.2 + -285.8 - (-425.8 + -92.3),  # hand: -178.9
                 id="neutralisation-NaOH-HCl"),
    pytest.param("NH3(g) + HCl(g) -> NH4Cl(s)", "NH3",
                 -314.4 - (-45.9 + -92.3),  # hand: -176.2
                 id="neutralisation-NH3-HCl"),
    pytest.param("propene(g) + H2(g) -> propane(g)", "propene",
                 -103.8 - 20.0,  # hand: -123.8
                 id="hydrogenation-propene"),
    pytest.param("benzene(l) + 3 H2(g) -> cyclohexane(l)", "benzene",
                 -156.4 - 49.1,  # hand: -205.5
                 id="hydrogenation-benzene"),
    pytest.param("ethylene oxide(l) + water(l) -> ethylene glycol(l)", "ethylene oxide",
                 -460.0 - (-78.0 + -285.8),  # hand: -96.2
                 id="hydration-ethylene-oxide"),
    pytest.param("ethylene(g) + H2O(g) -> ethanol(g)", "ethylene",
                 -234.8 - (52.4 + -241.8),  # hand: -45.4
                 id="hydration-ethylene-gas"),
    pytest.param("CaO(s) + H2O(l) -> Ca(OH)2(s)", "CaO",
                 -985.2 - (-634.9 + -285.8),  # hand: -64.5 (slaking of lime)
                 id="hydration-lime"),
]


@pytest.mark.parametrize("equation, key, hand", REACTIONS)
def test_hess_against_crc_hand_value_default_tables(equation, key, hand):
    heat = reaction_enthalpy(equation, key)
    # ATcT and CRC differ by up to ~1 kJ/mol per species (module docstring); 1.5 kJ/mol covers a reaction
    assert heat.dH_per_key / 1000 == pytest.approx(hand, abs=1.5)


@pytest.mark.parametrize("equation, key, hand", REACTIONS)
def test_hess_against_crc_hand_value_crc_table(equation, key, hand):
    heat = reaction_enthalpy(equation, key, prefer="CRC")
    assert all(s.table in ("CRC", "REFERENCE") for s in heat.species if s.Hf != 0.0)
    # printed to 0.1 kJ/mol per species: a few tenths on a sum of up to four terms
    assert heat.dH_per_key / 1000 == pytest.approx(hand, abs=0.15)


@pytest.mark.parametrize("equation, key, hand", REACTIONS)
def test_values_used_are_the_chemicals_tables(equation, key, hand):
    """Every ΔHf° reported is the value ``chemicals`` gives for that table, and ΔH is Σ ν·ΔHf° over them."""
    heat = reaction_enthalpy(equation, key)
    lookups = {"g": chemicals_tables.Hfg, "l": chemicals_tables.Hfl, "s": chemicals_tables.Hfs}
    for s in heat.species:
        assert s.table in TABLES
        assert s.source == TABLES[s.table]
        assert s.Hf == lookups[s.phase](s.CAS, method=s.table)
        # and each table value agrees with the CRC value written above (same species, same phase)
        crc = CRC.get((s.written, s.phase))
        assert crc is not None, f"no CRC hand value written for {s.written}({s.phase})"
        assert s.Hf / 1000 == pytest.approx(crc, abs=0.7)
    by_hand = sum(s.nu * s.Hf for s in heat.species)
    assert heat.dH == pytest.approx(by_hand, rel=1e-12)


def test_liquid_and_vapour_water_differ_by_twice_the_heat_of_vaporisation():
    liquid = reaction_enthalpy("CH4(g) + 2 O2(g) -> CO2(g) + 2 H2O(l)", "CH4").dH_per_key
    vapour = reaction_enthalpy("CH4(g) + 2 O2(g) -> CO2(g) + 2 H2O(g)", "CH4").dH_per_key
    # CRC Handbook (from memory): ΔvapH of water at 25 °C = 44.0 kJ/mol; two moles condense
    assert (vapour - liquid) / 1000 == pytest.approx(2 * 44.0, abs=0.1)


def test_per_mole_of_key_reactant():
    # 2 H2(g) + O2(g) -> 2 H2O(l): hand, CRC: 2 × -285.8 = -571.6 kJ per mol O2, -285.8 per mol H2
    per_O2 = reaction_enthalpy("2 H2(g) + O2(g) -> 2 H2O(l)", "O2", prefer="CRC")
    per_H2 = reaction_enthalpy("2 H2(g) + O2(g) -> 2 H2O(l)", "H2", prefer="CRC")
    assert per_O2.dH / 1000 == pytest.approx(-571.6, abs=0.05)
    assert per_O2.dH_per_key / 1000 == pytest.approx(-571.6, abs=0.05)
    assert per_H2.dH_per_key / 1000 == pytest.approx(-285.8, abs=0.05)


def test_fractional_coefficients_and_reference_state_carbon():
    # ½ N2 + 3/2 H2 -> NH3 is the formation reaction: ΔH = ΔHf°(NH3, g); CRC: -45.9 kJ/mol
    heat = reaction_enthalpy("1/2 N2(g) + 3/2 H2(g) -> NH3(g)", "N2", prefer="CRC")
    assert heat.dH / 1000 == pytest.approx(-45.9, abs=0.05)
    assert heat.dH_per_key / 1000 == pytest.approx(-45.9 / 0.5, abs=0.1)
    # C(graphite) has no row in the tables: zero by definition; ΔH = ΔHf°(CO2, g), CRC -393.5
    carbon = reaction_enthalpy("C(s) + O2(g) -> CO2(g)", "C", prefer="CRC")
    assert carbon.species[0].table == "REFERENCE" and carbon.species[0].Hf == 0.0
    assert carbon.dH / 1000 == pytest.approx(-393.5, abs=0.05)


def test_species_by_name_formula_or_CAS_agree():
    # CAS registry numbers: water 7732-18-5, calcium oxide 1305-78-8
    a = reaction_enthalpy("CaO(s) + H2O(l) -> Ca(OH)2(s)", "CaO").dH
    b = reaction_enthalpy("1305-78-8(s) + water(l) -> calcium hydroxide(s)", "1305-78-8").dH
    c = reaction_enthalpy("calcium oxide(s) + 7732-18-5(l) -> Ca(OH)2(s)", "calcium oxide").dH
    assert a == b == c


def test_key_reactant_named_differently_from_the_equation():
    heat = reaction_enthalpy("C2H4(g) + H2O(g) -> ethanol(g)", "ethylene")
    assert heat.key_reactant == "C2H4"


def test_hess_law_function():
    # hand: CRC, CH4 + 2 O2 -> CO2 + 2 H2O(l) = -890.5 kJ/mol
    assert hess_law([-1, -2, 1, 2], [-74.6e3, 0.0, -393.5e3, -285.8e3]) == pytest.approx(-890.5e3, abs=1e-6)


def test_element_balance_counts():
    # hand count: 2 H2 + O2 -> H2O leaves 2 H and 1 O unaccounted for on the right
    assert element_balance(parse_equation("2 H2(g) + O2(g) -> H2O(l)")) == {"H": -2.0, "O": -1.0}
    assert element_balance(parse_equation("2 H2(g) + O2(g) -> 2 H2O(l)")) == {"H": 0.0, "O": 0.0}


def test_parse_forms():
    eq = parse_equation("CH4(g) + 2O2(gas) => CO2(g) + 2 H2O(liquid)")
    assert [(t.coefficient, t.species, t.phase) for t in eq.reactants] == [(1.0, "CH4", "g"), (2.0, "O2", "g")]
    assert [(t.coefficient, t.species, t.phase) for t in eq.products] == [(1.0, "CO2", "g"), (2.0, "H2O", "l")]
    assert str(parse_equation("0.5 O2(g) + H2(g) → H2O(l)")) == "1/2 O2(g) + H2(g) -> H2O(l)"
    assert parse_equation("1-butene(g) -> 2-butene(g)").reactants[0].species == "1-butene"


# --------------------------------------------------------------------------- refusals
@pytest.mark.parametrize("equation, message", [
    pytest.param("2 H2(g) + O2(g) -> H2O(l)",
                 r"^equation: the equation is not balanced \(H: 4 on the left, 2 on the right; O: 2 on the left, "
                 r"1 on the right\); check the coefficients of H2, H2O, O2", id="unbalanced-H-and-O"),
    pytest.param("CH4(g) + O2(g) -> CO2(g) + 2 H2O(l)",
                 r"not balanced \(O: 2 on the left, 4 on the right\); check the coefficients of CO2, H2O, O2$",
                 id="unbalanced-O"),
    pytest.param("NaOH(s) + HCl(g) -> NaCl(s)", r"not balanced \(H: 2 on the left, 0 on the right; O: 1 on the "
                                                r"left, 0 on the right\)", id="product-missing"),
    pytest.param("unobtainium(s) + O2(g) -> CO2(g)", r"unknown species 'unobtainium': not found by formula, name "
                                                     r"or CAS number", id="unknown-species"),
    pytest.param("CH4 + 2 O2(g) -> CO2(g) + 2 H2O(l)", r"'CH4' has no phase: end every species with \(g\), "
                                                       r"\(l\) or \(s\)", id="missing-phase"),
    pytest.param("CH4(g) + 2 O2(x) -> CO2(g) + 2 H2O(l)", r"'2 O2\(x\)' has no phase", id="unknown-phase"),
    pytest.param("NaOH(aq) + HCl(aq) -> NaCl(aq) + H2O(l)", r"'NaOH\(aq\)': aqueous species are not in the "
                                                            r"heat-of-formation tables", id="aqueous"),
    pytest.param("CH4(l) + 2 O2(g) -> CO2(g) + 2 H2O(l)", r"no heat of formation for CH4 as liquid "
                                                          r"\(CH4\(l\)\); the tables have it as gas",
                 id="no-data-in-phase"),
    pytest.param("C3H6(g) + H2(g) -> C3H8(g)", r"'C3H6' is the formula of several compounds \(cyclopropane, "
                                               r"propene\): write the name or the CAS number", id="ambiguous-formula"),
    pytest.param("H2(g) + O2(g)", r"needs exactly one arrow '->'", id="no-arrow"),
    pytest.param("H2(g) -> H2(g) -> H2(g)", r"needs exactly one arrow", id="two-arrows"),
    pytest.param(" -> H2(g)", r"has no reactants", id="no-reactants"),
    pytest.param("H2(g) + -> H2(g)", r"needs exactly one arrow|an empty term|has no phase", id="dangling-plus"),
    pytest.param("0 H2(g) -> H2(g)", r"a coefficient must be positive, not '0'", id="zero-coefficient"),
    pytest.param("1/0 H2(g) -> H2(g)", r"'1/0' is not a coefficient", id="division-by-zero"),
    pytest.param("", r"the equation is empty", id="empty"),
])
def test_refusals(equation, message):
    with pytest.raises(InputError, match=message):
        reaction_enthalpy(equation, "H2")


def test_key_reactant_refusals():
    with pytest.raises(InputError, match=r"name the key reactant \(one of: CH4, O2\): ΔH is given per mole of it"):
        reaction_enthalpy("CH4(g) + 2 O2(g) -> CO2(g) + 2 H2O(l)")
    with pytest.raises(InputError, match=r"key reactant 'CO2' is not a reactant of the equation; choose one of: "
                                         r"CH4, O2"):
        reaction_enthalpy("CH4(g) + 2 O2(g) -> CO2(g) + 2 H2O(l)", "CO2")


def test_heat_of_formation_refuses_a_species_with_no_data():
    # helium: an element with no ΔHf° row and not given in its reference-state list as a liquid
    with pytest.raises(InputError, match=r"no heat of formation for He as liquid"):
        heat_of_formation("7440-59-7", "l", species="He", formula="He")


# --------------------------------------------------------------------------- in the worksheet
N_ACID = 2.0  # kmol of key reactant, scenario of our own


def _reactor(reaction: dict) -> dict:
    """20 t of a constant-cp liquid (2.0 kJ/(kg·K)) at 50 °C with one reaction; solve the final T."""
    return dict(basis={"kind": "batch"}, materials=[constant_cp_material("liquid A", cp=2.0, t_max=400)],
                vessels=[{"name": "R", "charges": [{"name": "Mass", "material": "liquid A",
                                                    "mass": q(20, "t"), "initial": temp(50)}],
                          "final": {}}],
                reactions=[{"name": "Rx", "amount": q(N_ACID, "kmol"), **reaction}],
                unknowns=[{"kind": "temperature", "line": "R", "end": "final"}])


def test_worksheet_reaction_heat_from_equation():
    result = solve(build(**_reactor({"equation": "NH3(g) + HCl(g) -> NH4Cl(s)", "key_reactant": "NH3"})))
    term = next(t for t in result.terms if t.kind == "reaction")
    # hand: 2000 mol × 176.2 kJ/mol (CRC) = 352.4 MJ released; default tables within 1.5 kJ/mol of CRC
    assert term.heat / 1e6 == pytest.approx(352.4, abs=2000 * 1.5e3 / 1e6)
    # hand: ΔT = 352.4e6 J / (20 000 kg × 2000 J/(kg·K)) = 8.81 K -> 58.81 °C
    assert result.answer.value_si - 273.15 == pytest.approx(50 + term.heat / (20000 * 2000.0), abs=1e-6)
    assert result.answer.value_si - 273.15 == pytest.approx(58.81, abs=0.08)
    assert "Hess's law" in term.detail.text
    assert any("NH4Cl(s) = ammonium chloride" in a and "CRC = CRC Handbook" in a for a in map(str, result.assumptions))


def test_worksheet_mass_amount_uses_the_key_reactants_molar_mass():
    # 34.06 kg NH3 / 17.031 g/mol (IUPAC atomic weights, hand) = 2.000 kmol: same heat as 2 kmol
    by_mass = solve(build(**_reactor({"equation": "NH3(g) + HCl(g) -> NH4Cl(s)", "key_reactant": "NH3",
                                      "amount": q(34.0610, "kg")})))
    by_moles = solve(build(**_reactor({"equation": "NH3(g) + HCl(g) -> NH4Cl(s)", "key_reactant": "NH3"})))
    heat = [next(t.heat for t in r.terms if t.kind == "reaction") for r in (by_mass, by_moles)]
    assert heat[0] == pytest.approx(heat[1], rel=1e-4)


def test_worksheet_entered_enthalpy_wins_and_equation_is_reported():
    result = solve(build(**_reactor({"enthalpy": q(-100, "kJ/mol"), "equation": "NH3(g) + HCl(g) -> NH4Cl(s)",
                                     "key_reactant": "NH3"})))
    term = next(t for t in result.terms if t.kind == "reaction")
    assert term.heat == pytest.approx(2000 * 100e3)  # hand: 2000 mol × 100 kJ/mol
    assert any("the entered ΔH is used; the equation gives" in a for a in map(str, result.assumptions))


def test_worksheet_refuses_reaction_without_heat():
    with pytest.raises(WorksheetFormatError, match=r"^reactions\[Rx\]: give the heat of reaction \('enthalpy'\) or a "
                                                   r"balanced 'equation'"):
        build(**_reactor({}))


def test_worksheet_equation_errors_name_the_reaction():
    with pytest.raises(InputError, match=r"^reactions\[Rx\]\.equation: the equation is not balanced"):
        solve(build(**_reactor({"equation": "NH3(g) + HCl(g) -> NH4Cl(s) + H2(g)", "key_reactant": "NH3"})))
    with pytest.raises(InputError, match=r"^reactions\[Rx\]\.equation: unknown species 'ammonium unobtainide'"):
        solve(build(**_reactor({"equation": "ammonium unobtainide(s) -> NH3(g)"})))


def test_existing_samples_still_load():
    # additive change: the entered-ΔH sample is unchanged and still solves
    with open("sample_data/batch_reactor_exotherm.json", encoding="utf-8") as handle:
        ws = load_worksheet(handle.read())
    assert ws.reactions[0].equation is None and ws.reactions[0].enthalpy is not None
    assert math.isfinite(solve(ws).answer.value_si)
    assert json.loads(ws.model_dump_json())["reactions"][0]["enthalpy"]["value"] == -92
