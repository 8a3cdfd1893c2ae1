"""The heats-of-mixing panel on the page (AppTest): a stated mixing listed with its heat, a mixing stated from the
form (defaults from the lines) entering the worksheet, a refusal shown with its address and not written, removal."""
from __future__ import annotations

import json

import pytest

from heatbalance.worksheet import parse_worksheet
from page_helpers import ROOT, held, page, sample, unescaped
from webapp.common import plain
from webapp.mixing_panel import KEYS
from webapp.state import KEY, PageState

SAMPLE = "acid_dilution_jacketed_vessel.json"


def unstated():
    doc = json.loads((ROOT / "sample_data" / SAMPLE).read_text(encoding="utf-8"))
    doc.pop("mixings")
    return parse_worksheet(doc)


def test_stated_mixing_is_listed_with_its_heat():
    at = page(sample(SAMPLE))
    assert not at.exception
    assert "Heats of mixing" in [s.value for s in at.subheader]
    rows = next(d.value for d in at.dataframe if "heat into process" in d.value.columns)
    assert list(rows["name"]) == ["Dilution 98 % to 25 %"]
    # 666,013 kJ released at 40 °C (hand calculation in test_mixing.py)
    assert list(rows["heat into process"]) == ["666,013.05 kJ"]


def test_form_starts_from_the_lines_and_states_the_mixing():
    at = page(unstated())
    assert not at.exception
    # the lines imply 1000 kg of 98 % acid into 2920 kg of water: 25 % (mass balance)
    assert at.session_state[KEYS["from"]] == pytest.approx(98.0)
    assert at.session_state[KEYS["to"]] == pytest.approx(25.0)
    assert at.session_state[KEYS["unit"]] == "kg"
    at.button(key=KEYS["save"]).click().run()
    assert not at.exception
    (mixing,) = held(at).mixings
    assert (mixing.solute, mixing.from_fraction, mixing.to_fraction, mixing.vessel) == \
        ("sulfuric acid", 0.98, 0.25, "D-101")
    assert str(mixing.amount) == "1000 kg"


def test_a_refused_statement_names_its_address_and_is_not_written():
    at = page(unstated())
    at.number_input(key=KEYS["to"]).set_value(99.0)
    at.button(key=KEYS["save"]).click().run()
    assert not at.exception
    assert held(at).mixings == []
    errors = " ".join(e.value for e in at.error)
    assert "must lie strictly between" in errors and "mixings\\[Dilution\\]\\.to\\_fraction" in errors


def test_remove_a_stated_mixing():
    at = page(sample(SAMPLE))
    at.button(key=KEYS["remove"]).click().run()
    assert not at.exception
    assert held(at).mixings == []


def test_the_form_follows_another_worksheet():
    at = page(unstated())
    at.number_input(key=KEYS["to"]).set_value(30.0).run()
    assert at.session_state[KEYS["to"]] == pytest.approx(30.0)  # what is typed is kept while the sheet stays
    doc = json.loads((ROOT / "sample_data" / SAMPLE).read_text(encoding="utf-8"))
    doc.pop("mixings")
    doc["vessels"][0]["charges"][0]["mass"] = {"value": 3920, "unit": "kg"}
    at.session_state[KEY] = PageState.opened(parse_worksheet(doc))
    at.run()
    # 980 kg of H2SO4 in 4,920 kg: 19.92 % (mass balance)
    assert at.session_state[KEYS["to"]] == pytest.approx(19.9187, abs=1e-3)


def test_the_dilution_vessel_gets_its_thermal_screening():
    at = page(sample(SAMPLE))
    assert not at.exception
    assert "Thermal screening (loss of cooling)" in [h.value for h in at.header]
    assert f"Vessel {plain('D-101')}" in [s.value for s in at.subheader]
    # MTSR = 40 °C + 100 % × 51.4 K (hand calculation in test_mixing.py), the dilution's heat in ΔT_ad
    numbers = next(m.value for m in at.markdown if m.value.startswith("| T_process"))
    assert "**91.4 °C**" in numbers and "51.4 K" in numbers
    notes = next(m.value for m in at.markdown if "The stated heat of mixing" in m.value)
    assert plain("The stated heat of mixing (666,013 kJ) counts in ΔT_ad") in notes


def test_a_batch_duty_is_shown_with_its_average_power_as_on_the_sheet():
    at = page(sample(SAMPLE))
    assert not at.exception
    # hand: −360,182 kJ over the sample's 2 h batch = −50.03 kW (the CLI and sheet say the same, test_mixing.py)
    captions = [unescaped(c.value) for c in at.caption]
    assert "= -50.03 kW on average over the batch's 120 min (the peak, set by the dosing or heating rate, is " \
           "higher)" in captions


def test_a_temperature_answer_shows_hundredths_in_either_view():
    at = page(sample("batch_reactor_exotherm.json"))
    # 54.98 °C = 130.96 °F (× 9/5 + 32, hand calculation): "131 °F" read as if the batch did not cool below 55 °C
    assert unescaped(at.container(key="answer_value").markdown[0].value) == "54.98 °C"
    at.radio(key="unit_system").set_value("US customary (°F, lb, Btu)").run()
    assert unescaped(at.container(key="answer_value").markdown[0].value) == "130.96 °F"


def test_the_screening_numbers_are_explained_for_a_newcomer():
    at = page(sample("batch_reactor_exotherm.json"))
    legend = next(c.value for c in at.caption if c.value.startswith("T_process: the batch's temperature"))
    # each header of the numbers table says what it is, and which ΔT_ad MTSR used (φ = 1 by default: conservative)
    for words in ("MTSR: the highest temperature", "MTT: the highest the equipment allows", "T_D24: where a "
                  "decomposition takes 24 h", "φ: the vessel's thermal inertia factor", "with φ = 1"):
        assert words in legend
