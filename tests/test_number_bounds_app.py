"""Number fields of the panels out of their range, on the real page (AppTest): refused in words at the field's
address, never put back in range, and the worksheet (or the sweep, or the Monte Carlo check) does not take them.

The fields have no front-end bounds any more: with them, Streamlit 1.67's browser kept the old value behind a
red field whose message shows only on hover (a Save or Run click then used the old number), truncated a
fraction typed into a whole-number field (2.5 -> 2), and its server put the field's default in place of a value
outside the bounds (what AppTest sends). So every test here fails on the bounded fields: the refusal is missing
and the old or default number is used. The real browser is in test_number_bounds_browser.py.
"""
from __future__ import annotations

import json

import pytest

from heatbalance.worksheet import parse_worksheet
from page_helpers import ROOT, answer_value, errors, held, no_traceback, page, sample, unescaped
from webapp.mixing_panel import KEYS

SCREENING = "glycol_hydration_screening.json"  # vessel R-7, accumulation 0.3, its final temperature the unknown
ACID = "acid_dilution_jacketed_vessel.json"  # 98 % sulfuric acid into water, mixing stated
LOSSES = "insulated_hot_water_line.json"  # computed loss "Yard line", emissivity 0.3
RATED = "glycol_cooler_rated.json"  # exchanger E-401, counter-current
GLYCOL = "steam_heater_glycol.json"  # the page's default; the what-if's first input is the glycol flow
CONDENSER = "solvent_condenser_cooling_water.json"  # four tolerances: the Monte Carlo check is offered


def markdown(at) -> str:
    return unescaped("\n".join(m.value for m in at.markdown))


# --------------------------------------------------------------------------- screening: accumulation [%]
@pytest.mark.parametrize("typed", [150.0, -5.0])
def test_an_accumulation_outside_0_to_100_percent_is_refused_at_its_address(typed):
    at = page(sample(SCREENING))
    answer = answer_value(at)
    assert "(30% accumulated)" in markdown(at)  # the sample's own accumulation, 0.3
    at.number_input(key="screening_0_accumulation").set_value(typed).run()
    no_traceback(at)
    # product rule: a refusal names the field's address and what is wrong (no source)
    assert (f"These screening inputs cannot be used: vessels[R-7].screening.accumulation: {typed:g} % is not an "
            "accumulation: give 0 to 100 %") in errors(at)
    # the value does not reach the worksheet, nor a screening drawn as if it had (no source: product rule)
    assert held(at).vessels[0].screening.accumulation == 0.3
    assert "accumulated)" not in markdown(at)
    assert answer_value(at) == answer
    # a value in range is still written as before (behaviour kept; 50 % typed -> 0.5 in the worksheet)
    at.number_input(key="screening_0_accumulation").set_value(50.0).run()
    assert not errors(at)
    assert held(at).vessels[0].screening.accumulation == 0.5
    assert "(50% accumulated)" in markdown(at)


# --------------------------------------------------------------------------- mixing: amount and strengths
def unstated():
    """The acid sample without its stated mixing: the form is filled from the lines (1000 kg of 98 % to 25 %)."""
    doc = json.loads((ROOT / "sample_data" / ACID).read_text(encoding="utf-8"))
    doc.pop("mixings")
    return parse_worksheet(doc)


@pytest.mark.parametrize("field, typed, address", [
    pytest.param("from", 150.0, "from_fraction", id="A-strength-150"),
    pytest.param("with", -5.0, "with_fraction", id="B-strength-minus-5"),
    pytest.param("to", 101.0, "to_fraction", id="mixed-to-101"),
])
def test_a_strength_outside_0_to_100_percent_is_refused_beside_its_field_and_not_saved(field, typed, address):
    at = page(unstated())
    at.number_input(key=KEYS[field]).set_value(typed).run()
    no_traceback(at)
    refusal = f"{typed:g} % is not a solute mass fraction: give 0 to 100 % [mixings[Dilution].{address}]"
    assert refusal in errors(at)  # product rule: said as soon as it is typed, at the address (no source)
    at.button(key=KEYS["save"]).click().run()
    no_traceback(at)
    assert held(at).mixings == []  # product rule: a refused value is not written (no source)
    assert at.session_state[KEYS[field]] == typed  # kept as typed, not put back in range (product rule, no source)


def test_a_negative_amount_reaches_the_engine_and_its_refusal_is_shown():
    at = page(unstated())
    at.number_input(key=KEYS["amount"]).set_value(-5.0).run()
    at.button(key=KEYS["save"]).click().run()
    no_traceback(at)
    # the engine's own refusal (heatbalance/problem.py), with the address the panel adds (product rule)
    assert "a mass or flow cannot be negative (-5 kg) [mixings[Dilution].amount]" in errors(at)
    assert held(at).mixings == []  # not written (product rule, no source)


# --------------------------------------------------------------------------- losses: emissivity
def test_an_emissivity_above_1_reaches_the_loader_and_its_refusal_is_shown():
    at = page(sample(LOSSES))
    answer = answer_value(at)
    at.number_input(key="losses_emissivity_0").set_value(1.5)
    at.button(key="losses_apply_0").click().run()
    no_traceback(at)
    # the loader's range of emissivity (heatbalance/worksheet.py: 0 to 1), at the field's address
    assert "Not applied: losses[Yard line].surface.emissivity: Input should be less than or equal to 1" \
        in errors(at)
    assert held(at).losses[0].surface.emissivity == 0.3  # the sample's own value kept (product rule)
    assert answer_value(at) == answer


# --------------------------------------------------------------------------- what if: points
@pytest.mark.parametrize("typed", [0.0, 2.5, 100_001.0])
def test_a_number_of_points_that_cannot_be_used_is_refused_and_no_sweep_runs(typed):
    at = page(sample(GLYCOL))
    at.number_input(key="whatif_count_0").set_value(typed).run()
    no_traceback(at)
    # product rule: refused at the swept input's address (where a sweep's refusals are placed), never rounded
    assert (f"streams[Glycol].flow: {typed:g} is not a number of points: give a whole number of points from 1 to "
            "100,000") in errors(at)
    run = at.button(key="whatif_run")
    # nothing can run (AppTest, like a browser, cannot click a disabled button) and no count is claimed
    assert run.disabled and run.label == "Run the sweep (give the points first)"  # product rule, no source
    assert not [d for d in at.dataframe if "refused at" in d.value.columns]  # no sweep table (product rule)
    at.number_input(key="whatif_count_0").set_value(3.0).run()  # in range: as before (behaviour kept)
    assert at.button(key="whatif_run").label == "Run the sweep (3 points)"


# --------------------------------------------------------------------------- exchanger: shell passes
def _edit_shells(at, shells: float):
    choice = "E-401"
    at.selectbox(key="exchanger_edit_choice").set_value(choice).run()
    at.selectbox(key=f"exchanger_edit_{choice}_arrangement").set_value("shell-and-tube N shells")
    at.number_input(key=f"exchanger_edit_{choice}_shells").set_value(shells)
    return at.button(key="exchanger_edit_save").click().run()


@pytest.mark.parametrize("typed, why", [
    (13.0, "Input should be less than or equal to 12"),
    (0.0, "Input should be greater than or equal to 1"),
    (2.5, "Input should be a valid integer, got a number with a fractional part"),
])
def test_shell_passes_that_cannot_be_used_reach_the_loader_and_its_refusal_is_shown(typed, why):
    at = page(sample(RATED))
    before = held(at)
    _edit_shells(at, typed)
    no_traceback(at)
    # the loader's rule for shells (heatbalance/worksheet.py: a whole number, 1 to 12), at the field's address
    assert f"This exchanger cannot be used: {why} [exchangers[E-401].shells]" in errors(at)
    assert held(at) == before  # not written (product rule, no source)


def test_shell_passes_in_range_are_saved_as_typed():
    at = page(sample(RATED))
    _edit_shells(at, 2.0)
    no_traceback(at)
    (e,) = held(at).exchangers
    assert (e.arrangement, e.shells) == ("shell-and-tube N shells", 2)  # as typed (behaviour kept)


# --------------------------------------------------------------------------- uncertainty: Monte Carlo draws
@pytest.mark.parametrize("typed", [50.0, 30_000.0, 150.5])
def test_a_number_of_draws_that_cannot_be_used_is_refused_and_nothing_is_drawn(typed):
    at = page(sample(CONDENSER))
    at.number_input(key="uncert_mc_draws").set_value(typed).run()
    no_traceback(at)
    # product rule: named (the field is no worksheet input, so by its name), never put back in range
    refusal = f"Monte Carlo draws: {typed:g} is not a number of draws: give a whole number of draws from 100 to 20,000"
    assert refusal in errors(at)
    assert at.button(key="uncert_mc_run").disabled  # nothing can be drawn (product rule, no source)
    assert "Monte Carlo (" not in markdown(at)  # no check shown (product rule, no source)
