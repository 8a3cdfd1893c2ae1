"""The mixture's bubble point as the MTT of a thermal screening (issue 12, item 2).

References: published VLE data at 1 atm (Perry's Chemical Engineers' Handbook tables of methanol-water and
ethanol-water, McCabe, Smith & Harriott's benzene-toluene table; all from memory), IAPWS-IF97 through `iapws`,
CoolProp's ethylene oxide for a Raoult's-law closure written out by hand.
"""
import json
from pathlib import Path

import pytest
from CoolProp.CoolProp import PropsSI
from iapws import IAPWS97

from heatbalance.analyses import solve_and_analyse
from heatbalance.analyses.bubble_point import RAOULT_NAME, UNIFAC_NAME, bubble_point
from heatbalance.errors import HeatBalanceError, InputError
from heatbalance.worksheet import WorksheetFormatError, parse_worksheet
from tests.sheet_factory import q, temp

C = 273.15
SAMPLES = Path(__file__).resolve().parent.parent / "sample_data"
M = {"methanol": 32.042, "ethanol": 46.069, "water": 18.015, "benzene": 78.11, "toluene": 92.14}  # g/mol


def binary(a: str, b: str, x_a: float, model="UNIFAC", P=101325.0):
    """The bubble point of a binary of mole fraction x_a, given as masses (1 mol in all)."""
    return bubble_point([(a, x_a * M[a], "a"), (b, (1 - x_a) * M[b], "b")], P, model)


@pytest.mark.parametrize("x, T_C", [  # Perry's Handbook, methanol-water VLE at 101.3 kPa, from memory
    pytest.param(0.02, 96.4, id="Perry-MeOH-0.02"), pytest.param(0.06, 91.2, id="Perry-MeOH-0.06"),
    pytest.param(0.10, 87.7, id="Perry-MeOH-0.10"), pytest.param(0.20, 81.7, id="Perry-MeOH-0.20"),
    pytest.param(0.40, 75.3, id="Perry-MeOH-0.40"), pytest.param(0.60, 71.2, id="Perry-MeOH-0.60"),
    pytest.param(0.80, 67.6, id="Perry-MeOH-0.80"),
])
def test_methanol_water_at_1_atm(x, T_C):
    bp = binary("methanol", "water", x)
    assert bp.model == UNIFAC_NAME
    assert bp.T - C == pytest.approx(T_C, abs=0.3)


@pytest.mark.parametrize("x, T_C", [  # Perry's Handbook, ethanol-water VLE at 101.3 kPa, from memory
    pytest.param(0.0966, 86.7, id="Perry-EtOH-0.0966"), pytest.param(0.2337, 82.7, id="Perry-EtOH-0.2337"),
    pytest.param(0.5079, 79.8, id="Perry-EtOH-0.5079"), pytest.param(0.8943, 78.15, id="Perry-EtOH-azeotrope"),
])
def test_ethanol_water_at_1_atm(x, T_C):
    # UNIFAC is about 0.7 K low in the dilute region against these data: the tolerance says so
    assert binary("ethanol", "water", x).T - C == pytest.approx(T_C, abs=1.0)


def test_ethanol_water_azeotrope_boils_below_both_pure_components():
    """A positive deviation Raoult's law cannot give: 78.15 °C below ethanol's 78.3 °C (Perry's, from memory)."""
    bp = binary("ethanol", "water", 0.8943)
    assert bp.T < bp.T_major and bp.T < binary("ethanol", "water", 1.0).T
    assert binary("ethanol", "water", 0.8943, model="ideal").T > bp.T + 1.0


@pytest.mark.parametrize("T_C, x", [  # McCabe, Smith & Harriott, benzene-toluene at 1 atm, from memory
    pytest.param(85, 0.780, id="MSH-BT-85C"), pytest.param(90, 0.581, id="MSH-BT-90C"),
    pytest.param(95, 0.411, id="MSH-BT-95C"), pytest.param(100, 0.258, id="MSH-BT-100C"),
    pytest.param(105, 0.130, id="MSH-BT-105C"),
])
@pytest.mark.parametrize("model", ["UNIFAC", "ideal"])
def test_benzene_toluene_at_1_atm_is_nearly_ideal(T_C, x, model):
    bp = binary("benzene", "toluene", x, model)
    assert bp.model == (UNIFAC_NAME if model == "UNIFAC" else RAOULT_NAME)
    assert bp.T - C == pytest.approx(T_C, abs=0.3)


def test_a_pure_liquid_boils_at_its_saturation_temperature():
    bp = bubble_point([("water", 100.0, "w")], 301325.0)
    assert bp.T == pytest.approx(IAPWS97(P=0.301325, x=0).T, abs=0.02)  # IAPWS-IF97 via iapws


@pytest.mark.parametrize("components, where, words", [
    pytest.param([("unobtainium", 1.0, "here")], "here", "not a chemical the `chemicals` databases know",
                 id="unknown-chemical"),
    pytest.param([("nitrogen", 1.0, "gas"), ("water", 50.0, "w")], "gas", "above its critical temperature (126.2 K)", id="supercritical"),
])
def test_bubble_point_refusals_name_the_address(components, where, words):
    with pytest.raises(InputError) as caught:
        bubble_point(components, 301325.0)
    assert caught.value.where == where and words in caught.value.message


# --------------------------------------------------------------------------- in the screening
def sample(name: str) -> dict:
    return json.loads((SAMPLES / name).read_text(encoding="utf-8"))


def screening(doc: dict):
    result = solve_and_analyse(parse_worksheet(doc))
    return result, result.screening[0]


def test_the_dissolved_solvent_sample_boils_lower_and_changes_class():
    doc = sample("dissolved_solvent_screening.json")
    result, s = screening(doc)
    # 1.2 t methanol in 6 t water: x = 37.45/(37.45 + 333.06) = 0.101 (hand); Perry's: 87.7 °C at x = 0.10
    assert s.MTT_composition["methanol"] == pytest.approx(0.1011, abs=1e-4)
    assert s.MTT - C == pytest.approx(87.6, abs=0.3)
    assert s.MTT_model == UNIFAC_NAME and "original UNIFAC" in s.MTT_source.text
    assert "mole fractions as charged: water 0.8989, methanol 0.1011" in s.MTT_source.text
    assert s.criticality_class == 3 and any("reaches MTT" in a.text for a in s.alarms)
    why = " ".join(n.text for n in s.notes)
    assert "The mixture boils 12.4 K below pure water (100.0 °C at the same pressure)" in why
    assert "more volatile components (methanol)" in why
    # the same batch screened against water's boiling point (what the MTT was before): class 1, no alarm
    doc["vessels"][0]["screening"]["MTT"] = q(IAPWS97(P=0.101325, x=0).T - C, "degC")  # iapws
    _, as_water = screening(doc)
    assert as_water.MTSR == pytest.approx(s.MTSR) and as_water.criticality_class == 1 and as_water.alarms == []


def test_a_solvent_the_balance_boils_off_stays_in_the_boiling_liquid():
    doc = sample("dissolved_solvent_screening.json")
    vessel = doc["vessels"][0]
    next(c for c in vessel["charges"] if c["name"] == "Methanol")["material"] = "methanol"  # the catalogue fluid
    vessel["screening"].pop("components")
    result, s = screening(doc)
    methanol = next(ln for ln in result.lines if ln.name.endswith("Methanol"))
    assert "vapour" in methanol.final_phase  # the balance boils it as a pure liquid at the vessel's pressure
    # it was liquid as charged: the same x = 0.101 in water and the same 87.6 °C as the sample (Perry's: 87.7 °C
    # at x = 0.10), not water's 100 °C, which left it out and gave class 1 (the unsafe side)
    assert s.MTT_composition["methanol"] == pytest.approx(0.1011, abs=1e-4)
    assert s.MTT - C == pytest.approx(87.6, abs=0.3)
    # and the balance's pure-liquid boiling of a dissolved solvent is said not to be modelled, at the charge
    (warning,) = [w for w in result.warnings if w.text.startswith("MIXTURE BOILING NOT MODELLED")]
    assert warning.address == "vessels[R-5].charges[Methanol]" and "mixed with water" in warning.text


def test_the_hydration_sample_uses_raoult_for_ethylene_oxide_and_says_so():
    result, s = screening(sample("glycol_hydration_screening.json"))
    assert s.MTT_model == RAOULT_NAME
    assert any("No UNIFAC groups for oxirane" in n.text for n in s.notes)
    # Raoult's law closes by hand at the MTT: x_w·P_sat,w (IAPWS-IF97 via iapws) + x_EO·P_sat,EO (CoolProp's
    # ethylene oxide) = 3.01325 bar; x_EO = (900/44.053)/(900/44.053 + 5500/18.015) = 0.0627 (hand)
    x_eo = (900 / 44.053) / (900 / 44.053 + 5500 / 18.015)
    total = (1 - x_eo) * IAPWS97(T=s.MTT, x=0).P * 1e6 + x_eo * PropsSI("P", "T", s.MTT, "Q", 0, "EthyleneOxide")
    assert total == pytest.approx(301325.0, rel=5e-3)
    assert s.MTT < IAPWS97(P=0.301325, x=0).T - 10  # more than 10 K below water's 133.7 °C
    # the class rests on Raoult's law and on the vessel venting at its pressure: both said beside it
    assert s.criticality_class is not None
    assert [c.text.split(" ", 3)[:3] for c in s.class_caveats] == [["MTT", "is", "the"], ["MTT", "comes", "from"]]
    assert "relief set pressure" in s.class_caveats[0].text and "may boil lower" in s.class_caveats[1].text


def test_an_entered_MTT_carries_no_caveat():
    doc = sample("glycol_hydration_screening.json")
    doc["vessels"][0]["screening"]["MTT"] = "110 degC"
    assert screening(doc)[1].class_caveats == []


def reactor(charges: list, screening_inputs: dict | None = None, materials: list | None = None):
    """A 0 barg vessel at 40 °C with a small exotherm and its charges (a scenario of our own)."""
    vessel = {"name": "R", "pressure": "0 barg", "charges": charges, "final": temp(40)}
    if screening_inputs is not None:
        vessel["screening"] = screening_inputs
    return {"schema_version": 1, "basis": {"kind": "batch"}, "materials": materials or [], "vessels": [vessel],
            "duties": [{"name": "Jacket"}], "reactions": [{"name": "Rx", "enthalpy": "-50 kJ/mol",
                                                           "amount": "1 kmol"}],
            "unknowns": [{"kind": "duty", "term": "Jacket"}]}


CP_ONLY = {"name": "solvent X", "source": "test material", "phases": [{"name": "liquid", "cp": "2 kJ/(kg*K)"}],
           "min_temperature": "-50 degC", "max_temperature": "200 degC"}


def charge(name, material, mass="1 t", **extra):
    return {"name": name, "material": material, "mass": mass, "initial": temp(40), **extra}


def test_a_charge_without_vapour_pressure_data_is_refused_loudly_and_an_entered_MTT_is_used():
    doc = reactor([charge("Water", "water"), charge("X", "solvent X")], materials=[CP_ONLY])
    result, s = screening(doc)
    assert s.MTT is None and s.criticality_class is None
    assert "no vapour-pressure data for 'solvent X'" in s.MTT_source.text
    assert s.MTT_source.address == "vessels[R].charges[X].material"
    warned = [w for w in result.warnings if w.address == "vessels[R].charges[X].material"]
    assert warned and "enter MTT (vessels[R].screening.MTT)" in warned[0].text
    doc["vessels"][0]["screening"] = {"MTT": "70 degC"}
    assert screening(doc)[1].MTT == pytest.approx(70 + C)


def test_a_salt_solution_is_refused_at_its_material():
    _, s = screening(reactor([charge("Brine", "sodium chloride brine", mass_fraction=0.2),
                              charge("Water", "water")]))
    assert s.MTT is None and s.MTT_source.address == "vessels[R].charges[Brine].material"
    assert "Raoult's law does not hold for dissolved electrolytes" in s.MTT_source.text


@pytest.mark.parametrize("material, fraction, words", [
    ("sulfuric acid (aq)", 0.25, "is an electrolyte solution: Raoult's law does not hold"),
    ("ammonia (aq)", 0.2, "is a solution of a dissolved gas (Henry's law, not Raoult's)")])
def test_an_acid_base_or_ammonia_solution_is_refused_at_its_material(material, fraction, words):
    doc = reactor([charge("Solution", material, mass_fraction=fraction, initial=temp(20)),
                   charge("Water", "water", initial=temp(20))])
    doc["vessels"][0]["final"] = temp(30)  # ammonia (aq)'s data end at 35 °C
    _, s = screening(doc)
    assert s.MTT is None and s.MTT_source.address == "vessels[R].charges[Solution].material"
    assert words in s.MTT_source.text and "enter MTT (vessels[R].screening.MTT)" in s.MTT_source.text


def test_an_unknown_chemical_is_refused_at_its_component():
    _, s = screening(reactor([charge("Water", "water"), charge("X", "solvent X")],
                             {"components": [{"charge": "X", "chemical": "unobtainium"}]}, [CP_ONLY]))
    assert s.MTT is None and s.MTT_source.address == "vessels[R].screening.components[X]"


def test_a_component_naming_no_charge_is_refused():
    doc = reactor([charge("Water", "water")], {"components": [{"charge": "Nothing", "chemical": "water"}]})
    with pytest.raises(HeatBalanceError) as caught:
        solve_and_analyse(parse_worksheet(doc))
    assert caught.value.where == "vessels[R].screening.components[Nothing]"
    assert "no charge called 'Nothing' in vessel R (charges: Water)" in caught.value.message
    doc["vessels"][0]["screening"] = {"components": [{"charge": "Water", "chemical": "water"}] * 2}
    with pytest.raises(WorksheetFormatError, match="named more than once: Water"):
        parse_worksheet(doc)


def test_an_aqueous_glycol_is_water_and_glycol_and_boils_above_water():
    _, s = screening(reactor([charge("Coolant", "ethylene glycol (aq)", mass_fraction=0.4)]))
    # 40 % by mass: x_glycol = (400/62.07)/(400/62.07 + 600/18.015) = 0.162 (hand)
    assert s.MTT_composition["ethylene glycol"] == pytest.approx(0.1621, abs=1e-3)
    assert IAPWS97(P=0.101325, x=0).T < s.MTT < IAPWS97(P=0.101325, x=0).T + 8  # glycol barely evaporates


def test_the_ideal_model_can_be_chosen():
    doc = sample("dissolved_solvent_screening.json")
    doc["vessels"][0]["screening"]["activity_model"] = "ideal"
    _, s = screening(doc)
    assert s.MTT_model == RAOULT_NAME and s.MTT - C == pytest.approx(93.7, abs=0.5)  # Raoult: hand-checked below
    x = s.MTT_composition["methanol"]
    total = (1 - x) * IAPWS97(T=s.MTT, x=0).P * 1e6 + x * PropsSI("P", "T", s.MTT, "Q", 0, "Methanol")  # iapws, CoolProp
    assert total == pytest.approx(101325.0, rel=5e-3)


def test_a_rename_of_the_charge_carries_its_chemical():
    from heatbalance.address import rename

    ws = parse_worksheet(sample("dissolved_solvent_screening.json"))
    renamed = rename(ws, "vessels[R-5].charges[Methanol]", "Carried-over methanol")
    assert renamed.vessels[0].screening.components[0].charge == "Carried-over methanol"
    assert solve_and_analyse(renamed).screening[0].MTT_composition["methanol"] == pytest.approx(0.1011, abs=1e-4)


CATALOGUE_LIQUIDS = ["water", "nitrogen", "oxygen", "argon", "ammonia", "methane", "ethane", "propane", "n-butane",
                     "n-hexane", "n-heptane", "cyclohexane", "benzene", "toluene", "methanol", "ethanol", "acetone",
                     "R-134a", "R-32", "R-1234yf"]


@pytest.mark.parametrize("name", CATALOGUE_LIQUIDS)
def test_each_catalogue_fluid_is_the_right_chemical(name):
    """Its bubble point alone (thermo's vapour pressure) is its boiling point in the property data (CoolProp):
    the catalogue's generic name resolved to the same chemical."""
    from heatbalance.analyses.bubble_point import catalogue_chemical
    from heatbalance.materials import get_material

    boiling = next(t.T for t in get_material(name).transitions(101325.0) if t.kind == "boiling")
    assert bubble_point([(catalogue_chemical(name), 1.0, "x")], 101325.0).T == pytest.approx(boiling, abs=0.1)


@pytest.mark.parametrize("gas", ["hydrogen", "helium"])
def test_a_gas_without_vapour_pressure_data_where_water_boils_is_refused(gas):
    with pytest.raises(InputError, match=f"no vapour pressure of {gas} at"):
        bubble_point([(gas, 1.0, "x"), ("water", 100.0, "w")], 101325.0)


def test_the_page_shows_the_mixtures_MTT_and_its_class():
    """The screening panel on the real page (AppTest): class 3 with the alarm, the MTT line names the model and
    the composition, and the note says why it is below water's boiling point."""
    import re

    from page_helpers import page
    from heatbalance.worksheet import load_worksheet

    at = page(load_worksheet((SAMPLES / "dissolved_solvent_screening.json").read_bytes()))
    assert not at.exception, [e.value for e in at.exception]
    shown = re.sub(r"\\(.)", r"\1", "\n".join(m.value for m in at.markdown)).replace("\u2060", "")
    assert "Criticality class 3" in shown
    assert "MTT: bubble point of the liquid mixture at 1.013 bar(a), original UNIFAC" in shown
    assert "mole fractions as charged: water 0.8989, methanol 0.1011" in shown
    assert "The mixture boils 12.4 K below pure water" in shown
    alarms = re.sub(r"\\(.)", r"\1", "\n".join(e.value for e in at.error))
    assert "reaches MTT 87.6 °C" in alarms


def test_one_liquid_carries_no_raoult_caveat():
    doc = sample("batch_reactor_exotherm.json")  # the reagent solution counts as water: one liquid
    doc["vessels"][0]["screening"]["T_D24"] = "120 degC"  # for a class
    _, s = screening(doc)
    assert s.MTT_composition == {"water": 1.0} and s.criticality_class is not None
    assert [c for c in s.class_caveats if "Raoult" in c.text] == []  # Raoult's law is exact for a pure liquid
    assert any("relief set pressure" in c.text for c in s.class_caveats)
