"""Defects a checker reported, on the page (Streamlit's AppTest: the real app.py, no browser).

2. A saved link did not keep the view's unit set: the page opened in SI whatever view it was shared from. Links
   the page shows now carry ``units=US`` in the US view, the address bar follows the view, and a link opens in the
   unit set it names (old links, without ``units``, open in SI as before).
5. The sign-off form recorded a "checked" sign-off with nothing prepared: refused, naming the field.

The PDF side (the link printed on the sheet) is in ``test_checker_fixes.py``.
"""
from __future__ import annotations

import pytest
from pdf_reading import link_uris
from page_helpers import answer_value, errors, no_traceback, opened, page, sample, unescaped
from streamlit.testing.v1 import AppTest

from heatbalance.analyses import solve_and_analyse
from heatbalance.links import encode_sheet, revision_id
from heatbalance.present.text import answer_text
from heatbalance.store import WorksheetStore
from webapp.common import UNIT_SYSTEMS
from webapp.filing_panel import OFFER
from webapp.state import KEY

CONDENSER = "solvent_condenser_cooling_water.json"
SI, US = list(UNIT_SYSTEMS)  # the radio's labels


def param(at: AppTest, name: str) -> str | None:
    value = at.query_params.get(name)
    return value[0] if isinstance(value, list) else value


def shown_links(at: AppTest) -> list[str]:
    return [c.value for c in at.code]


# =========================================================================== 2. the unit set travels with the link
def test_a_revision_saved_in_the_us_view_reopens_in_the_us_view_from_its_link(db):
    ws = sample(CONDENSER)
    at = page(ws)
    at.radio(key="unit_system").set_value(US).run()
    us_answer = answer_value(at)
    at.button(key="share_save").click().run()
    no_traceback(at)
    rev_id = revision_id(ws)
    # the checker's report (defect 2): the link carries the view
    assert any(link.endswith(f"?ws={rev_id}&units=US") for link in shown_links(at)), shown_links(at)
    assert param(at, "ws") == rev_id and param(at, "units") == "US"  # the address bar, to reload or copy
    sheet = next(link for link in shown_links(at) if "?sheet=" in link)
    assert sheet.endswith("&units=US")  # the ?sheet= link likewise
    # the very link, opened afresh (a new session): same inputs and answer, and the US view
    again = opened(ws=rev_id, units="US")
    no_traceback(again)
    assert again.session_state[KEY].worksheet == ws  # product rule: a saved link opens exactly what was shared
    assert again.radio(key="unit_system").value == US  # the checker's report (defect 2): in the view it was shared from
    # the engine's answer, in the unit typed for it
    assert answer_value(again) == us_answer == answer_text(solve_and_analyse(ws).answer, "US")
    # the page passes the link on as it came
    assert any(link.endswith(f"?ws={rev_id}&units=US") for link in shown_links(again))
    # the ?sheet= link likewise
    carried = opened(sheet=encode_sheet(ws), units="US")
    no_traceback(carried)
    # the ?sheet= link: same worksheet, same view
    assert carried.session_state[KEY].worksheet == ws and carried.radio(key="unit_system").value == US
    assert answer_value(carried) == us_answer  # and the same answer


def test_an_old_link_without_units_opens_in_si_and_its_link_has_no_units(db):
    ws = sample(CONDENSER)
    with WorksheetStore(db) as store:
        rev_id = store.save(ws).id
    at = opened(ws=rev_id)
    no_traceback(at)
    # the brief: old links open in SI as today
    assert at.radio(key="unit_system").value == SI and param(at, "units") is None
    assert answer_value(at) == answer_text(solve_and_analyse(ws).answer, "SI")  # the engine's answer
    assert any(link.endswith(f"?ws={rev_id}") for link in shown_links(at))  # and its link is as before
    at.radio(key="unit_system").set_value(US).run()  # the view changes: the address and the link follow it
    # the address and the link follow the view
    assert param(at, "units") == "US" and any(link.endswith(f"?ws={rev_id}&units=US") for link in shown_links(at))
    at.radio(key="unit_system").set_value(SI).run()
    # back to SI: no units= at all
    assert param(at, "units") is None and any(link.endswith(f"?ws={rev_id}") for link in shown_links(at))


@pytest.mark.parametrize("units, system", [("us", US), ("SI", SI)])
def test_the_unit_set_is_read_in_any_case(db, units, system):
    ws = sample(CONDENSER)
    at = opened(sheet=encode_sheet(ws), units=units)
    no_traceback(at)
    assert at.radio(key="unit_system").value == system  # the unit set is read in any case


def test_a_link_naming_no_unit_set_opens_in_si_and_says_so_at_units(db):
    ws = sample(CONDENSER)
    at = opened(sheet=encode_sheet(ws), units="<b>metric</b>")
    no_traceback(at)
    assert at.session_state[KEY].worksheet == ws  # the worksheet still opens
    assert at.radio(key="unit_system").value == SI  # a bad units= leaves the view in SI
    # product rule: a refusal names its field (units), as plain text
    assert "units: the link's unit set '<b>metric</b>' is not one of SI, US; the results are shown in SI" \
        in errors(at)
    assert all("<b>" not in e.value for e in at.error)  # shown as plain text


def test_a_pasted_link_opens_in_the_unit_set_it_names(db):
    ws = sample(CONDENSER)
    with WorksheetStore(db) as store:
        rev_id = store.save(ws).id
    at = opened()
    at.text_input(key="share_link_input").input(f"http://elsewhere.invalid/?ws={rev_id}&units=US").run()
    no_traceback(at)
    # a pasted link opens in the unit set it names
    assert at.session_state[KEY].worksheet == ws and at.radio(key="unit_system").value == US
    assert param(at, "ws") == rev_id and param(at, "units") == "US"  # and the address bar says so


def test_the_sheet_offered_in_the_us_view_prints_the_link_that_opens_in_it(db):
    ws = sample(CONDENSER)
    at = page(ws)
    at.radio(key="unit_system").set_value(US).run()
    at.button(key="share_save").click().run()
    rev_id = revision_id(ws)
    pdf = at.session_state[OFFER].make()
    # the sheet printed from the US view opens in it
    assert [uri for uri in link_uris(pdf) if "?ws=" in uri][0].endswith(f"?ws={rev_id}&units=US")


# =========================================================================== 5. sign-off order on the page
def test_the_page_refuses_a_check_before_anything_is_prepared_naming_the_role(db):
    ws = sample(CONDENSER)
    at = page(ws)
    at.button(key="share_save").click().run()
    rev_id = revision_id(ws)
    at.selectbox(key="filing_role").set_value("checked")
    at.text_input(key="filing_name").input("Rosa Okafor")
    at.button(key="filing_sign").click().run()
    no_traceback(at)
    # the checker's report (defect 5): refused, naming the field
    assert "Not signed: role: a 'checked' sign-off needs a 'prepared' sign-off of this revision first" in errors(at)
    with WorksheetStore(db) as store:
        assert store.signoffs(rev_id) == []  # nothing recorded
    at.selectbox(key="filing_role").set_value("prepared")
    at.text_input(key="filing_name").input("Ana Lima")
    at.button(key="filing_sign").click().run()
    at.selectbox(key="filing_role").set_value("checked")
    at.text_input(key="filing_name").input("Rosa Okafor")
    at.button(key="filing_sign").click().run()
    no_traceback(at)
    # prepared first: the check is recorded
    assert any(f"Signed revision {rev_id}: checked by Rosa Okafor." in unescaped(s.value) for s in at.success)
    with WorksheetStore(db) as store:
        assert [(s.role, s.name) for s in store.signoffs(rev_id)] == [("prepared", "Ana Lima"),
                                                                       ("checked", "Rosa Okafor")]
