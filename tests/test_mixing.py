"""Heats of solution, dilution and neutralisation (heatbalance.mixing), the stated mixing in the balance, and the
loud warning when a tabled solute meets water with no heat stated (heatbalance.mixing_check)."""
import csv
import hashlib
import json
from importlib import resources

import pytest

from heatbalance.address import inputs, rename, with_value
from heatbalance.balance import solve
from heatbalance.errors import HeatBalanceError, InputError, WorksheetFormatError
from heatbalance.materials import get_material
from heatbalance.mixing import (NEUTRALISATION_J_PER_MOL, SOLUTES, TABLE_FILE, integral_heat, mixing_heat,
                                solute_named)
from heatbalance.present.report import format_result, result_json
from heatbalance.worksheet import parse_worksheet
from sheet_factory import build, constant_cp_material, q, sheet, stream, temp

M_WATER = 18.015  # g/mol


def fraction(M: float, n: float) -> float:
    """Solute mass fraction of n mol water per mol solute of molar mass M [g/mol]."""
    return M / (M + n * M_WATER)


# --------------------------------------------------------------------------- the shipped table
def test_table_is_pinned_and_every_row_names_its_source():
    """A silent edit of the shipped table fails here: update the checksum only with a reviewed change."""
    with resources.files("heatbalance").joinpath("data", TABLE_FILE).open(encoding="utf-8") as handle:
        rows = list(csv.DictReader(handle))
    assert len(rows) == 66 and len(rows[0]) == 7
    assert all(row["source"].strip() for row in rows)
    assert {row["formula"] for row in rows} == {"H2SO4", "NaOH", "HCl", "HNO3", "NH3", "KOH"}
    column = ",".join(row["integral_heat_kJ_mol"] for row in rows)
    assert hashlib.sha256(column.encode()).hexdigest()[:16] == "30594757ec24c507", TABLE_FILE


@pytest.mark.parametrize("solute, M, n, expected", [
    # Felder & Rousseau, Elementary Principles of Chemical Processes, 3rd ed., Table B.11, 25 °C (from memory)
    ("sulfuric acid", 98.079, 1, -28.07),
    ("sulfuric acid", 98.079, 5, -58.03),
    ("sulfuric acid", 98.079, 10, -67.03),
    ("sulfuric acid", 98.079, 100, -73.97),
    ("sodium hydroxide", 39.997, 5, -37.74),
    ("sodium hydroxide", 39.997, 10, -42.51),
    # CRC Handbook, Enthalpy of Dilution of Acids (Parker 1965): ΔsolH∞(HCl, g) −74.84 + (−ΔdilH) at the molality
    ("hydrogen chloride", 36.461, 55.51, -74.84 + 1.695),  # 1 mol/kg
    ("hydrogen chloride", 36.461, 5.551, -74.84 + 10.24),  # 10 mol/kg
    ("hydrogen chloride", 36.461, 1.0, -74.84 + 45.61),  # 55.506 mol/kg
    # same table, nitric acid: ΔsolH∞(HNO3, l) −33.28 (CRC Enthalpy of Solution of Electrolytes)
    ("nitric acid", 63.013, 2.775, -33.28 + 9.498),  # 20 mol/kg
    ("nitric acid", 63.013, 13.88, -33.28 + 0.958),  # 4 mol/kg
])
def test_integral_heats_at_tabulated_concentrations(solute, M, n, expected):
    assert integral_heat(solute, fraction(M, n)) / 1e3 == pytest.approx(expected, abs=0.005)


@pytest.mark.parametrize("solute, expected, rel", [
    ("sulfuric acid", -96.19, 0.01),  # Table B.11 ∞; NBS 1982 ΔfH H2SO4(l) −813.99, SO4²⁻(aq) −909.27: −95.28 (from memory)
    ("hydrogen chloride", -74.85, 0.001),  # NBS 1982 ΔfH HCl(g) −92.31, Cl⁻(aq) −167.16 (from memory)
    # CRC (Parker 1965) −44.51; the table's Felder/NBS Circular 500 (1952) value −42.89 is 3.6 % smaller
    ("sodium hydroxide", -44.51, 0.04),
    ("nitric acid", -33.28, 0.001),  # CRC Enthalpy of Solution of Electrolytes (Parker 1965)
    ("potassium hydroxide", -57.61, 0.001),  # same CRC table
    ("ammonia", -35.35, 0.001),  # Vanderzee & King 1972: −8448 cal_th/mol (non-ionised)
])
def test_infinite_dilution_against_independent_values(solute, expected, rel):
    assert integral_heat(solute, 0.0) / 1e3 == pytest.approx(expected, rel=rel)


def test_between_rows_the_table_is_interpolated_in_mole_fraction():
    # hand calculation: 25 % H2SO4 is n = (75/18.015)/(25/98.079) = 16.33, z = 1/17.33 = 0.05770; between
    # n = 10 (z = 0.09091, −67.03) and n = 25 (z = 0.03846, −72.31): −67.03 − 0.633 × 5.28 = −70.37 kJ/mol
    assert integral_heat("sulfuric acid", 0.25) / 1e3 == pytest.approx(-70.37, abs=0.01)


def test_neutralisation_heat_from_heats_of_formation():
    from chemicals.reaction import Hfl

    # H+(aq) + OH−(aq) -> H2O(l): ΔfH° OH−(aq) = −229.99 kJ/mol (NBS 1982, from memory), H+(aq) = 0 by convention,
    # H2O(l) from the chemicals package's table
    assert NEUTRALISATION_J_PER_MOL == pytest.approx(Hfl("7732-18-5") - (-229.99e3), abs=60)
    assert -57.3e3 <= NEUTRALISATION_J_PER_MOL <= -55.8e3  # measured 55.8–57.3 kJ/mol (the brief's range)


def test_mixing_heat_of_a_dilution_by_hand():
    # hand calculation: 1000 kg of 98 % H2SO4 = 9,991.9 mol; 98 % is n = 0.1112, z = 0.9, 30 % of the way from the
    # pure acid (0) to n = 0.5 (−15.73): −4.719 kJ/mol; 25 %: −70.37 kJ/mol; released 9,991.9 × 65.655 = 656.0 MJ;
    # water by mass balance 1000 × (0.98 − 0.25)/0.25 = 2,920 kg
    heat = mixing_heat("sulfuric acid", 1000.0, 0.98, 0.0, 0.25)
    assert heat.released == pytest.approx(656.0e6, rel=1e-3)
    assert heat.mass_b == pytest.approx(2920.0)


def test_solution_heat_capacity_is_laliberte_and_meets_water_at_zero():
    # IAPWS-95 via the iapws package (independent of the Laliberté water term): cp(25 °C, 1 atm) = 4.1813 kJ/(kg·K)
    from iapws import IAPWS95

    water = IAPWS95(T=298.15, P=0.101325)
    dilute = get_material("sulfuric acid (aq)", 0.0)
    assert (dilute.enthalpy(298.65, 1e5) - dilute.enthalpy(297.65, 1e5)) / 1e3 == pytest.approx(water.cp, rel=2e-3)
    # 20 % H2SO4 at 20-25 °C: 3.52 kJ/(kg·K) (Perry's, heat capacities of aqueous sulfuric acid, from memory)
    acid = get_material("sulfuric acid (aq)", 0.20)
    assert acid.cp(298.15) / 1e3 == pytest.approx(3.52, rel=0.03)


# --------------------------------------------------------------------------- in the balance
SAMPLE = "sample_data/acid_dilution_jacketed_vessel.json"


def sample(**changes) -> dict:
    with open(SAMPLE, encoding="utf-8") as handle:
        doc = json.load(handle)
    doc.update(changes)
    return doc


def adiabatic(doc: dict) -> dict:
    doc = dict(doc, duties=[], unknowns=[{"kind": "temperature", "line": "D-101", "end": "final"}])
    return doc


def test_dilution_solved_to_its_final_temperature():
    result = solve(parse_worksheet(adiabatic(sample())))
    # hand calculation by the enthalpy-table method for solutions (Felder & Rousseau ch. 8: reference states at
    # 25 °C; mix there, heat the mixed solution with its own cp): in, water 2920 kg × 4.18 kJ/(kg·K) × (20 − 25 K)
    # = −61,030 kJ and steel 4500 × 0.434 = 1,953 kJ/K (Incropera A.1) × (−5 K) = −9,765 kJ; out, −656,021 kJ
    # + (3920 kg × 3.30 kJ/(kg·K), 25 % acid, Laliberté + 1,953 kJ/K) × (T − 25 K):
    # T = 25 + (656,021 − 70,795) / 14,889 = 64.3 °C. (Heating the parts with their own cps instead, the earlier
    # model, gave 62.4 °C: 2 K low, the unsafe side.)
    assert result.answer.value_si - 273.15 == pytest.approx(64.3, abs=0.3)
    (mixing,) = [t for t in result.terms if t.kind == "mixing"]
    # at 64.4 °C: 656,021 kJ − Δ(m·cp) × 39.4 K, Δ(m·cp) = 3920 × 3.284 − 2920 × 4.179 − 1000 × 1.490 = −819 kJ/K
    # (cp at the mean, 45 °C): 688,300 kJ
    assert mixing.heat / 1e3 == pytest.approx(688_300, rel=2e-3)
    assert "at 25 °C: 656,021 kJ" in mixing.detail.text
    assert not any("HEAT OF MIXING" in w.text for w in result.warnings)


def test_jacket_duty_of_the_sample():
    result = solve(parse_worksheet(sample()))
    # hand calculation with the heat capacities above (98 % acid 1000 × 1.50 kJ/K from 25 °C) and the heat of
    # mixing at 40 °C: 656,021 − Δ(m·cp) × 15 K, Δ(m·cp) = 3920 × 3.329 − 2920 × 4.179 − 1000 × 1.500 = −653 kJ/K
    # (Laliberté's cps at the mean, 32.5 °C) → 665,816 kJ; 12,206×20 + 1,500×15 + 1,953×20 − 665,816 = −360,136 kJ
    assert result.answer.value_si / 1e3 == pytest.approx(-360_136, rel=1e-3)


def test_warning_fires_with_an_estimate_when_no_mixing_is_stated():
    doc = adiabatic(sample())
    doc.pop("mixings")
    result = solve(parse_worksheet(doc))
    # without the heat of dilution the classic wrong answer: the mixture barely warms (20.5 °C)
    assert result.answer.value_si - 273.15 == pytest.approx(20.5, abs=0.2)
    (warning,) = [w for w in result.warnings if "HEAT OF MIXING NOT IN THE BALANCE" in w.text]
    assert warning.address == "vessels[D-101]"
    assert warning.values["Q"].value / 1e3 == pytest.approx(656_021, rel=1e-3)  # the hand calculation above
    # 656,021 kJ over the lines' 12,206 + 1,500 kJ/K (no vessel): about 47.9 K
    assert warning.values["rise"].value == pytest.approx(47.9, abs=0.5)
    assert "(to about 25.0%)" in warning.text


def test_no_warning_for_solutions_without_a_tabled_solute():
    ws = build(basis={"kind": "batch"},
               vessels=[{"name": "T-1", "charges": [
                   {"name": "Water", "material": "water", "mass": q(100, "kg"), "initial": temp(20)},
                   {"name": "Glycol", "material": "ethylene glycol (aq)", "mass_fraction": 0.5, "mass": q(100, "kg"),
                    "initial": temp(30)}], "final": temp(25)}],
               duties=[{"name": "Q"}], unknowns=[{"kind": "duty", "term": "Q"}])
    assert not any("NOT IN THE BALANCE" in w.text for w in solve(ws).warnings)


def test_streams_to_a_shared_outlet_warn_too():
    ws = build(common_temperatures=[{"name": "Mix"}],
               streams=[stream("Caustic", "sodium hydroxide (aq)", q(1, "t/h"), temp(25), {"common": "Mix"},
                               mass_fraction=0.30),
                        stream("Dilution water", "water", q(2, "t/h"), temp(25), {"common": "Mix"})],
               unknowns=[{"kind": "temperature", "common": "Mix"}])
    (warning,) = [w for w in solve(ws).warnings if "HEAT OF MIXING" in w.text]
    # hand calculation: 30 % NaOH is n = 5.185, 10 % is n = 19.98 (x3 = 300/3000); from Table B.11 rows
    # n = 5 (−37.74), 10 (−42.51), 20 (−42.84): ΔH_s(30 %) = −38.04, ΔH_s(10 %) = −42.84 kJ/mol;
    # 300 kg/h / 39.997 = 7,500 mol/h × 4.80 kJ/mol = 36.0 MJ/h = 10.0 kW
    assert warning.values["Q"].value == pytest.approx(10.0e3, rel=0.02)
    assert warning.address == "streams[Caustic]"


def test_a_worksheet_material_named_for_a_solute_warns_without_an_estimate():
    acid = constant_cp_material("sulfuric acid 98 %", cp=1.47)
    ws = build(basis={"kind": "batch"}, materials=[acid],
               vessels=[{"name": "D-1", "charges": [
                   {"name": "Water", "material": "water", "mass": q(300, "kg"), "initial": temp(20)},
                   {"name": "Acid", "material": "sulfuric acid 98 %", "mass": q(100, "kg"), "initial": temp(20)}],
                   "final": temp(30)}],
               duties=[{"name": "Q"}], unknowns=[{"kind": "duty", "term": "Q"}])
    (warning,) = [w for w in solve(ws).warnings if "HEAT OF MIXING" in w.text]
    assert "could not be estimated" in warning.text and "strength of a worksheet material" in warning.text


def neutralisation_sheet(**extra) -> dict:
    return sheet(basis={"kind": "batch"},
                 vessels=[{"name": "N-1", "charges": [
                     {"name": "Acid", "material": "sulfuric acid (aq)", "mass_fraction": 0.10, "mass": q(100, "kg"),
                      "initial": temp(20)},
                     {"name": "Caustic", "material": "sodium hydroxide (aq)", "mass_fraction": 0.10,
                      "mass": q(100, "kg"), "initial": temp(20)}], "final": temp(30)}],
                 duties=[{"name": "Q"}], unknowns=[{"kind": "duty", "term": "Q"}], **extra)


def test_acid_meeting_base_warns_of_the_heat_of_neutralisation():
    result = solve(parse_worksheet(neutralisation_sheet()))
    (warning,) = [w for w in result.warnings if "NEUTRALISATION" in w.text]
    # hand calculation: H+ 10 kg / 98.079 × 2 = 203.9 mol; OH− 10 kg / 39.997 = 250.0 mol; 203.9 × 55.84 = 11.39 MJ
    assert warning.values["Q"].value == pytest.approx(11.39e6, rel=1e-3)


def test_a_stated_reaction_silences_the_neutralisation_warning():
    doc = neutralisation_sheet(reactions=[{"name": "Neutralisation", "enthalpy": q(-55.84, "kJ/mol"),
                                           "amount": q(203.9, "mol"), "vessel": "N-1"}])
    assert not any("NEUTRALISATION" in w.text for w in solve(parse_worksheet(doc)).warnings)


def test_report_and_json_carry_the_mixing_line_and_its_source():
    result = solve(parse_worksheet(sample()))
    report = format_result(result)
    assert "Dilution 98 % to 25 %  mixing" in report
    assert "Table B.11" in report  # the table's source, in the assumptions
    data = result_json(result)
    (term,) = [t for t in data["terms"] if t["kind"] == "mixing"]
    assert term["detail"].startswith("H2SO4: 98.0% mixed with 2,920 kg at 0.0% to 25.0%")
    assert any("Felder & Rousseau" in a for a in data["assumptions"])


# --------------------------------------------------------------------------- addresses and refusals
def test_mixing_inputs_have_addresses_and_follow_a_vessel_rename():
    ws = parse_worksheet(sample())
    addresses = {i.address for i in inputs(ws)}
    base = "mixings[Dilution 98 % to 25 %]"
    assert {f"{base}.amount", f"{base}.from_fraction", f"{base}.with_fraction", f"{base}.to_fraction"} <= addresses
    changed = with_value(ws, f"{base}.to_fraction", 0.30)
    assert changed.mixings[0].to_fraction == 0.30
    assert rename(ws, "vessels[D-101]", "D-102").mixings[0].vessel == "D-102"


def refusal(mixing: dict) -> HeatBalanceError:
    doc = sample()
    doc["mixings"] = [dict(doc["mixings"][0], **mixing)]
    with pytest.raises(HeatBalanceError) as caught:
        solve(parse_worksheet(doc))
    return caught.value


BASE = "mixings[Dilution 98 % to 25 %]"


@pytest.mark.parametrize("change, where, words", [
    ({"to_fraction": 0.99}, f"{BASE}.to_fraction", "must lie strictly between those of A (0.98) and B (0)"),
    ({"to_fraction": 0.0}, f"{BASE}.to_fraction", "must lie strictly between"),
    ({"solute": "unobtainium"}, f"{BASE}.solute", "no heats of solution for 'unobtainium'; the table has: sulfuric"),
    ({"solute": "NaOH", "from_fraction": 0.5}, f"{BASE}.from_fraction",
     "50.0% sodium hydroxide is more concentrated than the heats-of-solution table reaches (42.5%, 3 mol water"),
    ({"amount": q(-5, "kg")}, f"{BASE}.amount", "cannot be negative"),
    ({"amount": q(5, "kW")}, f"{BASE}.amount", ""),
    ({"vessel": "D-999"}, f"{BASE}.vessel", "no vessel called 'D-999' (there are: D-101)"),
])
def test_every_refusal_names_the_address(change, where, words):
    error = refusal(change)
    assert isinstance(error, InputError)
    assert error.where == where
    assert words in error.message


def test_a_fraction_outside_zero_to_one_is_refused_by_the_loader():
    doc = sample()
    doc["mixings"][0]["from_fraction"] = 1.5
    with pytest.raises(WorksheetFormatError) as caught:
        parse_worksheet(doc)
    assert caught.value.where == f"{BASE}.from_fraction"


def test_a_catalogue_solution_beyond_its_heat_capacity_data_is_refused_at_the_line():
    doc = sample()
    doc["vessels"][0]["charges"][1].update(material="hydrochloric acid (aq)", mass_fraction=0.36)
    with pytest.raises(InputError) as caught:
        solve(parse_worksheet(doc))
    assert caught.value.where == "vessels[D-101].charges[Acid 98 %].material"
    assert "hydrochloric acid (aq) is modelled from 0 to 0.065 mass fraction" in caught.value.message


def test_solute_names_and_formulas():
    assert solute_named("H2SO4") is SOLUTES["sulfuric acid"]
    assert solute_named("caustic") is SOLUTES["sodium hydroxide"]
    with pytest.raises(InputError, match="the table has"):
        solute_named("salt", "mixings[X].solute")


def test_a_sweep_over_the_mixed_amount_rebuilds_each_point():
    from heatbalance.analyses.sweep import Axis, sweep

    ws = parse_worksheet(sample())
    table = sweep(ws, [Axis(f"{BASE}.amount", [500.0, 1000.0], "kg")], ["answer", "terms[Dilution 98 % to 25 %].heat"])
    heats = table["terms[Dilution 98 % to 25 %].heat"].tolist()
    assert heats[1] == pytest.approx(2 * heats[0])  # linear in the amount of A (same strengths)


def test_a_stated_mixing_that_the_lines_do_not_make_is_warned():
    doc = sample()
    doc["vessels"][0]["charges"][0]["mass"] = q(2000, "kg")
    result = solve(parse_worksheet(doc))
    (warning,) = [w for w in result.warnings if w.template.startswith("The stated mixing")]
    # hand calculation: 980 kg of H2SO4 in 1000 + 2000 kg: 32.7 %, not the stated 25.0 %
    assert "ends at 25.0%, but the lines mixed here make 32.7%" in warning.text
    assert warning.address == f"{BASE}"
    assert not any(w.template.startswith("The stated mixing") for w in solve(parse_worksheet(sample())).warnings)


def test_a_stated_amount_that_the_lines_do_not_hold_is_warned():
    doc = sample()
    doc["vessels"][0]["charges"][0]["mass"] = q(5840, "kg")  # twice the water and twice the acid: still 25 %
    doc["vessels"][0]["charges"][1]["mass"] = q(2000, "kg")
    (warning,) = [w for w in solve(parse_worksheet(doc)).warnings if w.template.startswith("The stated mixing")]
    assert warning.address == f"{BASE}.amount"
    assert "mixes 1,000 kg of A, but the lines here hold 2,000 kg at that strength" in warning.text


def test_a_cp_beyond_the_fitted_strength_is_warned():
    # Laliberté's H2SO4 fit reaches w = 0.9389 (thermo's coefficient table): 98 % is interpolated to the pure acid
    warnings = solve(parse_worksheet(sample())).warnings
    (warning,) = [w for w in warnings if "beyond Laliberté's fitted strength" in w.text]
    assert warning.address == "vessels[D-101].charges[Acid 98 %]"
    assert "sulfuric acid (aq) at 98.0%" in warning.text


def test_the_calculation_sheet_carries_the_mixing():
    import io

    import pypdf

    from heatbalance.present.sheet import sheet_pdf_bytes

    ws = parse_worksheet(sample())
    reader = pypdf.PdfReader(io.BytesIO(sheet_pdf_bytes(ws, solve(ws))))
    text = " ".join(page.extract_text() for page in reader.pages)
    assert "solute sulfuric acid, in D-101" in text
    assert f"{BASE}.to_fraction" in text and "Table B.11" in text


def test_a_stated_mixing_on_a_continuous_basis_is_a_power_and_silences_the_warning():
    ws = build(common_temperatures=[{"name": "Mix"}],
               streams=[stream("Caustic", "sodium hydroxide (aq)", q(1, "t/h"), temp(25), {"common": "Mix"},
                               mass_fraction=0.30),
                        stream("Dilution water", "water", q(2, "t/h"), temp(25), {"common": "Mix"})],
               mixings=[{"name": "Caustic dilution", "solute": "NaOH", "amount": q(1, "t/h"), "from_fraction": 0.30,
                         "to_fraction": 0.10}],
               unknowns=[{"kind": "temperature", "common": "Mix"}])
    result = solve(ws)
    (term,) = [t for t in result.terms if t.kind == "mixing"]
    # 10.0 kW at 25 °C (the hand calculation of the warning test above), at the mixture's 27.8 °C by Kirchhoff:
    # Δ(m·cp) = 0.833 kg/s × 3.79 − 0.278 × 3.54 − 0.556 × 4.18 kJ/(kg·K) = −0.145 kW/K (Laliberté's cps, NaOH
    # 10 % and 30 %, at 26 °C, and water): +0.145 × 2.8 K = +0.41 kW
    assert term.heat == pytest.approx(10.45e3, rel=0.02)
    assert not any("NOT IN THE BALANCE" in w.text or w.template.startswith("The stated") for w in result.warnings)
    # 10 kW into 3 t/h of about 3.9 kJ/(kg·K): a rise of about 3 K above 25 °C
    assert 27.0 < result.answer.value_si - 273.15 < 29.0


def test_a_mixing_named_like_a_duty_is_refused():
    doc = sample()
    doc["mixings"][0]["name"] = "Jacket cooling"
    with pytest.raises(WorksheetFormatError, match="heat term names must be unique; repeated: Jacket cooling"):
        parse_worksheet(doc)


# --------------------------------------------------------------------------- thermal screening of a dilution
def screened(doc: dict):
    from heatbalance.analyses import solve_and_analyse

    return solve_and_analyse(parse_worksheet(doc))


def test_a_dilution_vessel_is_screened_with_its_heat_of_mixing():
    from thermo.electrochem import Laliberte_heat_capacity

    result = screened(sample())
    (s,) = result.screening
    (mixing,) = [t for t in result.terms if t.kind == "mixing"]
    assert s.vessel == "D-101" and s.reactions == ["Dilution 98 % to 25 %"]
    assert s.Q_mixing == s.Q_reaction == mixing.heat
    # the mixed 25 % acid counts with its own cp: Laliberté (2009) as computed by thermo.electrochem directly
    # (1e-4: the water it replaces is counted at IAPWS-IF97's cp, 0.23 J/(kg·K) above Laliberté's water term)
    assert s.cp == pytest.approx(Laliberte_heat_capacity(313.15, [0.25], ["7664-93-9"]), rel=1e-4)
    # hand calculation: 666,013 kJ at 40 °C (test_jacket_duty_of_the_sample) / (3,920 kg × 3.3057 kJ/(kg·K))
    # = 51.40 K; MTSR = 40 °C + 51.40 K (100 %)
    assert s.dT_ad == pytest.approx(51.40, abs=0.01)
    assert s.MTSR - 273.15 == pytest.approx(91.40, abs=0.01)
    assert any("counts in ΔT_ad" in n.text for n in s.notes)
    # an electrolyte's boiling point is not computed by Raoult's law: MTT is left to be entered, at its address
    assert s.MTT is None and "electrolyte solution" in s.MTT_source.text
    assert "vessels[D-101].screening.MTT" in s.MTT_source.text
    from heatbalance.present.screening import screening_report

    report = screening_report(result.screening)
    assert "  heat of mixing released    666,013.0 kJ" in report
    assert not any(line.startswith("  reaction heat released") for line in report)


def test_the_accumulation_applies_to_the_heat_of_mixing():
    doc = sample()
    doc["vessels"][0]["screening"] = {"accumulation": 0.4, "MTT": q(105, "degC"), "T_D24": q(200, "degC")}
    (s,) = screened(doc).screening
    # hand calculation: 40 °C + 0.4 × 51.40 K = 60.56 °C, below MTT 105 °C and T_D24 200 °C: class 1 (Stoessel)
    assert s.MTSR - 273.15 == pytest.approx(60.56, abs=0.01)
    assert s.criticality_class == 1


def test_reaction_and_mixing_heat_add_up_in_one_vessel():
    doc = sample()
    doc["reactions"] = [{"name": "Side reaction", "enthalpy": q(-100, "kJ/mol"), "amount": q(1000, "mol"),
                         "vessel": "D-101"}]
    (s,) = screened(doc).screening
    # 100 kJ/mol × 1000 mol = 100,000 kJ on top of the 666,013 kJ of dilution at 40 °C
    assert (s.Q_reaction - s.Q_mixing) / 1e3 == pytest.approx(100_000, rel=1e-9)
    assert s.Q_mixing / 1e3 == pytest.approx(666_013, rel=1e-4)
    assert sorted(s.reactions) == ["Dilution 98 % to 25 %", "Side reaction"]


def test_a_solid_solute_beyond_the_solution_data_keeps_the_charges_cps_and_says_so():
    ws = build(basis={"kind": "batch"},
               vessels=[{"name": "T-1", "charges": [
                   {"name": "Water", "material": "water", "mass": q(1000, "kg"), "initial": temp(20)},
                   {"name": "Lye 40 %", "material": "lye 40 %",
                    "mass": q(100, "kg"), "initial": temp(20)}],
                   "final": temp(30)}],
               materials=[constant_cp_material("lye 40 %", cp=3.2)],
               mixings=[{"name": "Lye dilution", "solute": "sodium hydroxide", "amount": q(100, "kg"),
                         "from_fraction": 0.4, "with_fraction": 0.0, "to_fraction": 0.0364, "vessel": "T-1"}],
               duties=[{"name": "Cooling"}], unknowns=[{"kind": "duty", "term": "Cooling"}])
    from heatbalance.analyses import solve_and_analyse

    (s,) = solve_and_analyse(ws).screening
    # 40 % NaOH lies beyond Laliberté's fitted 30 %: the mixed solution's cp cannot replace its parts'
    assert any("the charges' own cps are used" in n.text for n in s.notes)
    assert s.Q_mixing > 0


def test_a_mixing_naming_no_vessel_on_a_two_vessel_sheet_is_warned_at_its_address():
    doc = sample()
    second = json.loads(json.dumps(doc["vessels"][0]))
    second["name"] = "D-102"
    doc["vessels"].append(second)
    doc["mixings"][0].pop("vessel")
    result = screened(doc)
    assert result.screening == []
    (warning,) = [w for w in result.warnings if w.text.startswith("Mixing")]
    assert warning.address == f"{BASE}.vessel" and "gets no thermal screening" in warning.text


def test_a_sweep_collects_the_dilution_screening():
    from heatbalance.analyses.sweep import Axis, sweep

    ws = parse_worksheet(sample())
    frame = sweep(ws, [Axis(f"{BASE}.amount", (500.0, 1000.0), "kg")],
                  ["screening[D-101].MTSR", "screening[D-101].dT_ad"])
    for amount, dT_ad, MTSR in zip(frame[f"{BASE}.amount"], frame["screening[D-101].dT_ad"],
                                   frame["screening[D-101].MTSR"]):
        (alone,) = screened(with_value(ws, f"{BASE}.amount", (amount, "kg")).model_dump(mode="json")).screening
        assert (dT_ad, MTSR) == pytest.approx((alone.dT_ad, alone.MTSR), rel=1e-9)
    assert frame["screening[D-101].dT_ad"].iloc[1] == pytest.approx(51.40, abs=0.01)  # the sample, above


# --------------------------------------------------------------------------- the heat of mixing at temperature
def test_at_25_c_the_heat_of_mixing_is_the_tables():
    from heatbalance.mixing import released_at

    heat = mixing_heat("sulfuric acid", 1000.0, 0.98, 0.0, 0.25)
    assert released_at(heat, 298.15) == heat.released  # Kirchhoff's correction vanishes at the table's temperature


def test_a_heat_of_mixing_the_cp_data_cannot_carry_stays_at_25_c_with_a_warning():
    ws = build(basis={"kind": "batch"},
               vessels=[{"name": "T-1", "charges": [
                   {"name": "Water", "material": "water", "mass": q(1000, "kg"), "initial": temp(20)},
                   {"name": "Lye 40 %", "material": "lye 40 %", "mass": q(100, "kg"), "initial": temp(20)}],
                   "final": temp(40)}],
               materials=[constant_cp_material("lye 40 %", cp=3.2)],
               mixings=[{"name": "Lye dilution", "solute": "sodium hydroxide", "amount": q(100, "kg"),
                         "from_fraction": 0.4, "with_fraction": 0.0, "to_fraction": 0.0364, "vessel": "T-1"}],
               duties=[{"name": "Cooling"}], unknowns=[{"kind": "duty", "term": "Cooling"}])
    result = solve(ws)
    (term,) = [t for t in result.terms if t.kind == "mixing"]
    # 40 % NaOH is beyond Laliberté's fitted 30 %: the table's 25 °C heat, said at the mixing's address
    assert term.heat == mixing_heat("sodium hydroxide", 100.0, 0.4, 0.0, 0.0364).released
    (warning,) = [w for w in result.warnings if w.template.startswith("Heat of mixing")]
    assert warning.address == "mixings[Lye dilution]"
    assert "taken at 25 °C although the mixture ends at 40.0 °C" in warning.text and "40.0%" in warning.text


def test_a_heat_of_mixing_no_line_carries_stays_at_25_c_with_a_warning():
    # two streams leaving at their own (equal, typed) outlets: neither a vessel nor a common outlet is the mixture
    ws = build(streams=[stream("Caustic", "sodium hydroxide (aq)", q(1, "t/h"), temp(25), temp(60), mass_fraction=0.30),
                        stream("Dilution water", "water", q(2, "t/h"), temp(25), temp(60))],
               mixings=[{"name": "Caustic dilution", "solute": "NaOH", "amount": q(1, "t/h"), "from_fraction": 0.30,
                         "to_fraction": 0.10}],
               duties=[{"name": "Heater"}], unknowns=[{"kind": "duty", "term": "Heater"}])
    result = solve(ws)
    (term,) = [t for t in result.terms if t.kind == "mixing"]
    # the table's 25 °C heat (about 10.0 kW: the continuous-basis test below, by hand), said at its address
    assert term.heat == mixing_heat("sodium hydroxide", 1000 / 3600, 0.30, 0.0, 0.10).released
    (warning,) = [w for w in result.warnings if w.template.startswith("Heat of mixing")]
    assert warning.address == "mixings[Caustic dilution]"
    assert "taken at 25 °C: no vessel's charges and no streams ending at one common temperature" in warning.text


def test_a_sweep_of_the_final_temperature_matches_single_solves():
    from heatbalance.analyses import solve_and_analyse
    from heatbalance.analyses.sweep import Axis, sweep

    ws = parse_worksheet(sample())
    address = "vessels[D-101].final.temperature"
    frame = sweep(ws, [Axis(address, (30.0, 50.0), "degC")], ["answer", f"terms[{BASE[8:-1]}].heat"])
    for T, answer, heat in zip(frame[address], frame["answer"], frame[f"terms[{BASE[8:-1]}].heat"]):
        alone = solve_and_analyse(with_value(ws, address, (T, "degC")))
        (mixing,) = [t for t in alone.terms if t.kind == "mixing"]
        assert (answer, heat) == pytest.approx((alone.answer.value_si, mixing.heat), rel=1e-9)
    # the mixing releases more the hotter it ends (Δ(m·cp) < 0 for this dilution)
    assert frame[f"terms[{BASE[8:-1]}].heat"].is_monotonic_increasing


def test_a_batch_jacket_duty_is_also_given_as_its_average_power():
    from heatbalance.present.report import format_result
    from heatbalance.present.text import average_power_text

    result = solve(parse_worksheet(sample()))
    # hand: −360,182 kJ over the sample's 2 h batch = −50.03 kW (−170,700 Btu/h at 3.412 Btu/h per W)
    assert average_power_text(result) == "-50.03 kW on average over the batch's 120 min"
    assert average_power_text(result, "US") == "-170,700 Btu/h on average over the batch's 120 min"
    assert "ANSWER  duty Jacket cooling = -360,182 kJ  (-50.03 kW on average" in format_result(result)
    assert average_power_text(solve(parse_worksheet(adiabatic(sample())))) is None  # a temperature answer
