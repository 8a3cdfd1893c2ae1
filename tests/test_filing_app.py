"""How sure is the answer, and filing it, on the page (Streamlit's AppTest: the real app.py, no browser).

The answer's ± U and the contributors equal the engine's propagation; suggested and typed tolerances land in
the page's worksheet; bad tolerances are refused at their address; a saved revision is signed through the
page into the store; the PDF the download button offers (its deferred maker, kept under
``webapp.filing_panel.OFFER``) holds the revision id, the answer and the signer.
"""
from __future__ import annotations

import io
import re

import pypdf
import pytest
from page_helpers import errors, held, page, sample, unescaped
from streamlit.testing.v1 import AppTest

from heatbalance.analyses.uncertainty import propagate, suggested_tolerances
from heatbalance.errors import InputError
from heatbalance.links import revision_id
from heatbalance.present.uncertainty import monte_carlo_text, uncertainty_text
from heatbalance.store import WorksheetStore
from heatbalance.units import from_si
from heatbalance.worksheet import Quantity, Tolerance
from webapp.filing_panel import OFFER
from webapp.state import KEY
from webapp.uncertainty_panel import checked_tolerance, parse_tolerance, with_suggested

CONDENSER = "solvent_condenser_cooling_water.json"  # answer: cooling-water flow in t/h, four tolerances
HEATER = "steam_heater_glycol.json"  # no tolerances
FLOW = "streams[Toluene overhead].flow"
CW_OUT = "streams[Cooling water].outlet.temperature"
CW_IN = "streams[Cooling water].inlet.temperature"
UNKNOWN = "streams[Cooling water].flow"


def no_exception(at) -> None:
    assert not at.exception, [e.value for e in at.exception]


def successes(at) -> str:
    return "\n".join(unescaped(s.value) for s in at.success)


def captions(at) -> str:
    return "\n".join(unescaped(c.value) for c in at.caption)


def answer_uncertainty(at) -> str:
    """The ± line under the answer ("" when there is none)."""
    lines = [unescaped(m.value).strip("*") for m in at.get("markdown")
             if "(k = " in unescaped(m.value) and unescaped(m.value).startswith("**") and "Answer with" not in unescaped(m.value)]
    assert len(lines) <= 1, lines
    return lines[0] if lines else ""


def set_tolerance(at, where: str, size: str, distribution: str = "rectangular", source: str = "") -> AppTest:
    at.selectbox(key="uncert_address").set_value(where).run()
    at.text_input(key="uncert_size").input(size)
    at.selectbox(key="uncert_distribution").set_value(distribution)
    at.text_input(key="uncert_source").input(source)
    return at.button(key="uncert_set").click().run()


def table_with(at, column: str):
    """The one table on the page with this column (AppTest does not keep a plain table's key)."""
    tables = [d.value for d in at.dataframe if column in d.value.columns]
    assert len(tables) == 1, [list(d.value.columns) for d in at.dataframe]
    return tables[0]


def pdf_text(data: bytes) -> str:
    return "\n".join(page.extract_text() for page in pypdf.PdfReader(io.BytesIO(data)).pages)


# =========================================================================== the answer ± U
def test_the_answer_shows_value_plus_minus_U_equal_to_the_propagation():
    ws = sample(CONDENSER)
    at = page(ws)
    no_exception(at)
    u = propagate(ws)
    answer = at.session_state[KEY].result.answer
    line = answer_uncertainty(at)
    assert line == uncertainty_text(u, "SI", answer)
    value, expanded, unit = re.fullmatch(r"([\d.,]+) ± ([\d.,]+) (\S+) \(k = 2, about 95 %\)", line).groups()
    assert unit == "t/h"
    # the page's numbers are the propagation's (SI kg/s) in t/h: U to two significant figures, the value to
    # the same decimal place (GUM 7.2.6), each within half that place
    half_place = 0.5 * 10 ** -len(expanded.partition(".")[2])
    assert float(value) == pytest.approx(from_si(u.value, "t/h", "mass_flow"), abs=half_place)
    assert float(expanded) == pytest.approx(from_si(u.expanded, "t/h", "mass_flow"), abs=half_place)
    # hand check of the order of magnitude: two ±0.5 K thermometers over a 10 K rise, rectangular:
    # u_rel ≈ √2 · (0.5/√3) / 10 ≈ 4.1 %, so U (k = 2) ≈ 8 % of the flow
    assert 0.07 < float(expanded) / float(value) < 0.095


def test_the_contributors_are_ranked_as_the_engine_ranks_them_with_shares_adding_to_one():
    ws = sample(CONDENSER)
    at = page(ws)
    u = propagate(ws)
    table = table_with(at, "input (largest first)")
    from heatbalance.address import label
    assert list(table["input (largest first)"]) == [label(c.address) for c in u.contributions]
    shares = [float(s.rstrip("%")) for s in table["share"]]
    assert shares == pytest.approx([100 * c.share for c in u.contributions], abs=0.051)
    assert sum(shares) == pytest.approx(100.0, abs=0.3)
    assert list(table["contribution [t/h]"]) == pytest.approx(
        [from_si(c.contribution, "t/h", "mass_flow") - from_si(0.0, "t/h", "mass_flow") for c in u.contributions])
    notes = "\n".join(unescaped(m.value) for m in at.markdown)
    assert "Inputs taken as uncorrelated" in notes


def test_without_tolerances_the_answer_has_no_plus_minus_and_the_panel_says_so():
    at = page(sample(HEATER))
    no_exception(at)
    assert answer_uncertainty(at) == ""
    assert any("No input has a tolerance yet" in unescaped(i.value) for i in at.info)


# =========================================================================== tolerances
def test_suggested_tolerances_land_in_the_worksheet_and_give_the_answer_its_uncertainty():
    ws = sample(HEATER)
    at = page(ws)
    at.button(key="uncert_suggest").click().run()
    no_exception(at)
    suggested = suggested_tolerances(ws)
    assert suggested and held(at).tolerances == suggested
    assert all("common practice" in t.source for t in held(at).tolerances)  # shown as such
    assert "suggested tolerance(s) from common practice" in successes(at)
    assert answer_uncertainty(at) == uncertainty_text(propagate(held(at)), "SI", at.session_state[KEY].result.answer)


def test_suggested_tolerances_keep_the_ones_already_given():
    ws = sample(CONDENSER)
    at = page(ws)
    at.button(key="uncert_suggest").click().run()
    no_exception(at)
    tolerances = held(at).tolerances
    assert tolerances[:len(ws.tolerances)] == ws.tolerances  # the sample's own are untouched
    added = {t.address for t in tolerances[len(ws.tolerances):]}
    assert added == {t.address for t in suggested_tolerances(ws)} - {t.address for t in ws.tolerances}
    at.button(key="uncert_suggest").click().run()  # nothing left to add
    assert held(at).tolerances == tolerances
    assert "nothing added" in errors(at)


def test_a_tolerance_typed_on_the_page_lands_in_the_worksheet_and_in_the_answer():
    at = page(sample(CONDENSER))
    set_tolerance(at, CW_OUT, "0.2 K", "normal", "calibrated RTD, certificate 117")
    no_exception(at)
    assert errors(at) == ""
    tolerance = next(t for t in held(at).tolerances if t.address == CW_OUT)
    assert tolerance == Tolerance(address=CW_OUT, plus_minus=Quantity(value=0.2, unit="K"), distribution="normal",
                                  source="calibrated RTD, certificate 117")
    assert [t.address for t in held(at).tolerances] == [t.address for t in sample(CONDENSER).tolerances]  # in place
    assert answer_uncertainty(at) == uncertainty_text(propagate(held(at)), "SI", at.session_state[KEY].result.answer)
    set_tolerance(at, FLOW, "± 2 %")
    assert next(t for t in held(at).tolerances if t.address == FLOW).percent == 2.0


@pytest.mark.parametrize("where, size, words", [
    (CW_OUT, "-0.5 K", "cannot be negative"),
    (FLOW, "-1 %", "cannot be negative"),
    (CW_OUT, "0.5 kg/h", "temperature difference"),
    (FLOW, "0.5 K", "mass flow"),
    (FLOW, "about one", "is not a number followed by a unit"),
    (FLOW, "", "give the tolerance"),
], ids=["negative", "negative-percent", "wrong-unit-temperature", "wrong-unit-flow", "not-a-number", "empty"])
def test_a_bad_tolerance_is_refused_with_its_address_and_the_worksheet_is_kept(where, size, words):
    ws = sample(CONDENSER)
    at = page(ws)
    set_tolerance(at, where, size)
    no_exception(at)
    refusal = errors(at)
    assert f"{where}:" in refusal and words in refusal, refusal
    assert held(at) == ws
    assert answer_uncertainty(at) == uncertainty_text(propagate(ws), "SI", at.session_state[KEY].result.answer)


def test_a_tolerance_on_the_unknown_is_refused_with_its_address():
    ws = sample(CONDENSER)
    from heatbalance.address import inputs
    unknown = next(i for i in inputs(ws) if i.is_unknown)
    assert unknown.address == UNKNOWN
    tolerance = Tolerance(address=UNKNOWN, percent=1.0)
    with pytest.raises(InputError, match="this is the unknown") as caught:
        checked_tolerance(ws, tolerance)
    assert caught.value.where == UNKNOWN
    # a file arriving with one: the answer stands, its uncertainty is refused there (a warning), and the panel
    # points at the tolerance to remove
    at = page(ws.model_copy(update={"tolerances": [*ws.tolerances, tolerance]}))
    no_exception(at)
    assert at.session_state[KEY].result is not None
    assert f"A tolerance stops the uncertainty: {UNKNOWN}: this is the unknown" in errors(at)
    at.button(key=f"uncert_remove_{len(ws.tolerances)}").click().run()
    assert held(at).tolerances == ws.tolerances
    assert answer_uncertainty(at) == uncertainty_text(propagate(ws), "SI", at.session_state[KEY].result.answer)


def test_the_unknown_is_not_offered_for_a_tolerance():
    at = page(sample(CONDENSER))
    from heatbalance.address import label
    options = at.selectbox(key="uncert_address").options  # as shown: labels, marked when they have one
    assert label(UNKNOWN) not in options and f"{label(UNKNOWN)} (has a tolerance)" not in options
    assert f"{label(CW_OUT)} (has a tolerance)" in options and label("streams[Cooling water].pressure") in options


def test_picking_an_input_with_a_tolerance_as_the_unknown_removes_that_tolerance_and_says_so():
    ws = sample(CONDENSER)
    at = page(ws)
    from heatbalance.address import label, unknown_choices
    at.selectbox(key="unknown_picker").set_value(dict(unknown_choices(ws))[CW_OUT]).run()
    no_exception(at)
    assert CW_OUT not in {t.address for t in held(at).tolerances}
    assert len(held(at).tolerances) == len(ws.tolerances) - 1
    assert f"The tolerance on {label(CW_OUT)} was removed" in successes(at)
    assert at.session_state[KEY].result is not None and answer_uncertainty(at)


def test_removing_tolerances_one_and_all():
    ws = sample(CONDENSER)
    at = page(ws)
    at.button(key="uncert_remove_0").click().run()
    assert held(at).tolerances == ws.tolerances[1:]
    at.button(key="uncert_remove_all").click().run()
    assert held(at).tolerances == []
    assert answer_uncertainty(at) == ""


def test_the_monte_carlo_check_shows_the_engines_result_for_the_draws_asked():
    ws = sample(CONDENSER)
    at = page(ws)
    at.number_input(key="uncert_mc_draws").set_value(500)
    at.button(key="uncert_mc_run").click().run()
    no_exception(at)
    u = propagate(ws, monte_carlo=500)
    text = [unescaped(m.value) for m in at.markdown if "Monte Carlo (" in unescaped(m.value)]
    assert text == [monte_carlo_text(u, "SI", at.session_state[KEY].result.answer)]
    assert "500 of 500 draws solved" in text[0]
    set_tolerance(at, FLOW, "3 %")  # another worksheet: the old check is not shown against it
    assert not any("Monte Carlo (" in unescaped(m.value) for m in at.markdown)


def test_pure_parts_read_and_refuse_like_the_page():
    ws = sample(CONDENSER)
    from heatbalance.address import inputs
    by = {i.address: i for i in inputs(ws)}
    assert parse_tolerance(by[CW_IN], "±0.3 °C", "95 %", "").plus_minus == Quantity(value=0.3, unit="degC")
    assert parse_tolerance(by[FLOW], "+/- 1.5 %", "rectangular", " meter ").model_dump() == \
        Tolerance(address=FLOW, percent=1.5, source="meter").model_dump()
    with pytest.raises(InputError) as caught:
        parse_tolerance(by[FLOW], "150 %", "rectangular", "")
    assert caught.value.where == FLOW
    with pytest.raises(InputError) as caught:  # a tab pasted into the source: said to be the source's, in our words
        parse_tolerance(by[FLOW], "1.5 %", "rectangular", "meter\tFT-101")
    assert caught.value.message.startswith("tolerance source: holds a control character (U+0009")
    changed, added = with_suggested(ws)
    assert added == len(changed.tolerances) - len(ws.tolerances) > 0


# =========================================================================== filing: the sheet and sign-off
def test_an_unsaved_sheet_is_offered_as_not_saved_and_unchecked_and_cannot_be_signed(db):
    ws = sample(CONDENSER)
    at = page(ws)
    no_exception(at)
    assert at.button(key="filing_sign").disabled
    assert "Not saved: save the worksheet (Save and share) to sign it." in captions(at)
    offer = at.session_state[OFFER]
    assert offer.revision == "" and offer.file_name.endswith("_unsaved.pdf")
    text = pdf_text(offer.make())
    assert "not saved" in text and "Unchecked" in text


def test_a_sign_off_on_the_page_is_recorded_in_the_store_and_printed_on_the_sheet(db):
    ws = sample(CONDENSER)
    at = page(ws)
    at.button(key="share_save").click().run()
    rev_id = revision_id(ws)
    assert not at.button(key="filing_sign").disabled
    assert any("Unchecked" in unescaped(w.value) for w in at.warning)
    at.selectbox(key="filing_role").set_value("prepared")  # a check needs a "prepared" sign-off first
    at.text_input(key="filing_name").input("Rosa Okafor")
    at.text_area(key="filing_comment").input("Checked against the CW flow meter log")
    at.button(key="filing_sign").click().run()
    no_exception(at)
    assert f"Signed revision {rev_id}: prepared by Rosa Okafor." in successes(at)
    with WorksheetStore(db) as store:
        signoffs = store.signoffs(rev_id)
    assert [(s.revision, s.role, s.name, s.comment) for s in signoffs] == \
        [(rev_id, "prepared", "Rosa Okafor", "Checked against the CW flow meter log")]
    table = table_with(at, "signed (UTC)")
    assert list(table["name"]) == ["Rosa Okafor"] and list(table["role"]) == ["prepared"]
    offer = at.session_state[OFFER]
    assert offer.revision == rev_id and offer.link.endswith(f"?ws={rev_id}") and offer.file_name.endswith(
        f"_rev_{rev_id[:8]}.pdf")
    text = pdf_text(offer.make())
    assert rev_id in text and "Rosa Okafor" in text
    result = at.session_state[KEY].result
    assert uncertainty_text(result.uncertainty, "SI", result.answer) in text  # the answer ± U, as on the page
    assert answer_uncertainty(at) in text
    assert "Unchecked" not in text


def test_an_edit_after_the_save_disables_signing_with_the_reason(db):
    ws = sample(CONDENSER)
    at = page(ws)
    at.button(key="share_save").click().run()
    rev_id = revision_id(ws)
    set_tolerance(at, FLOW, "2 %")
    assert held(at) != ws
    assert at.button(key="filing_sign").disabled
    assert f"Edited since revision {rev_id} was saved" in captions(at)
    assert at.session_state[OFFER].revision == ""


def test_a_sign_off_without_a_name_is_refused_with_its_place(db):
    ws = sample(CONDENSER)
    at = page(ws)
    at.button(key="share_save").click().run()
    at.text_input(key="filing_name").input("   ")
    at.button(key="filing_sign").click().run()
    no_exception(at)
    assert "Not signed: name: a sign-off needs the name of who signs" in errors(at)
    with WorksheetStore(db) as store:
        assert store.signoffs(revision_id(ws)) == []


def test_with_a_login_the_logged_in_user_signs_and_nobody_logged_in_cannot(db, monkeypatch):
    import webapp.sharing as sharing

    user = {"is_logged_in": True, "email": "ana.lima@plant.example"}
    monkeypatch.setattr(sharing, "_user_info", lambda: dict(user))
    ws = sample(CONDENSER)
    at = page(ws)
    at.button(key="share_save").click().run()
    name = at.text_input(key="filing_name")
    assert name.value == "ana.lima@plant.example" and name.disabled
    with WorksheetStore(db) as store:
        store.sign(revision_id(ws), "prepared", "A. Engineer")  # an approval needs a "prepared" sign-off first
    at.selectbox(key="filing_role").set_value("approved")
    at.button(key="filing_sign").click().run()
    with WorksheetStore(db) as store:
        assert [(s.role, s.name) for s in store.signoffs(revision_id(ws))] == \
            [("prepared", "A. Engineer"), ("approved", "ana.lima@plant.example")]
    user.clear()
    user["is_logged_in"] = False
    at.run()
    assert at.button(key="filing_sign").disabled
    assert "This server records who signs: log in to sign." in captions(at)


def test_user_text_in_sources_and_sign_offs_is_plain_text(db):
    ws = sample(CONDENSER)
    at = page(ws)
    hostile = "[meter](http://e.invalid) <b>x</b> :red[y]"
    set_tolerance(at, FLOW, "2 %", source=hostile)
    assert next(t for t in held(at).tolerances if t.address == FLOW).source == hostile  # kept as typed
    listed = [m.value for m in at.markdown if "meter" in m.value]
    assert listed and all("](http" not in m and "<b>" not in m and ":red[" not in m for m in listed)  # escaped
    assert any(hostile in unescaped(m) for m in listed)  # and read as typed
    at.button(key="share_save").click().run()
    at.text_input(key="filing_name").input("<i>Eve</i> [x](http://e.invalid)")
    at.button(key="filing_sign").click().run()
    no_exception(at)
    notice = [s.value for s in at.success if "Signed revision" in s.value]
    assert notice and "<i>" not in notice[0] and "](http" not in notice[0]
    assert list(table_with(at, "signed (UTC)")["name"]) == ["<i>Eve</i> [x](http://e.invalid)"]  # a text-only table


def test_the_screenings_mtsr_shows_its_uncertainty_under_the_answer():
    """A shift engineer's finding: the sheet gave MTSR ± U, the page only the answer's. Now both, in the same words
    as the sheet (present.uncertainty.output_uncertainty_lines)."""
    import json

    from heatbalance.analyses import solve_and_analyse
    from heatbalance.present.uncertainty import output_uncertainty_lines
    from heatbalance.worksheet import parse_worksheet

    doc = json.load(open("sample_data/batch_reactor_exotherm.json", encoding="utf-8"))
    doc["tolerances"] = [{"address": "reactions[Main reaction].enthalpy", "percent": 5}]
    ws = parse_worksheet(doc)
    at = page(ws)
    no_exception(at)
    expected = output_uncertainty_lines(solve_and_analyse(ws), "SI")
    assert expected and expected[0].startswith("R-2: MTSR = ") and " ± " in expected[0]
    captions = [unescaped(c.value) for c in at.caption]
    assert expected[0] in captions

