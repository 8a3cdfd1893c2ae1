"""Issue 16 (page): redraw only what changed, and build a figure once per content (AppTest, the real app.py).

The extra panels are fragments (webapp.common.fragment_panel). AppTest asks for a full run after every change;
the browser asks for a run of the fragment that drew the widget, and ``fragment_runs.browser_runs`` sends the
runs that way (see its docstring). A change that stays in a panel must run that panel alone (the page neither
solves nor draws anything else); a change that reaches the worksheet must run the whole page, so the answer
follows. Figures are built by webapp.common.built, keyed on the content of their inputs.

Expected answers are the engine's own for the worksheet the page holds (heatbalance.solve, written by
heatbalance.present.text). The samples are scenarios of our own invention.
"""
from __future__ import annotations

import json
import re
from types import SimpleNamespace

import pytest
from fragment_runs import browser_runs
from page_helpers import held, page, sample, shown_answer

import webapp.results
from heatbalance import solve
from heatbalance.address import with_value
from heatbalance.present.figures import energy_waterfall
from heatbalance.present.text import answer_text
from webapp import common
from webapp.common import BUILT_KEPT, UNIT_SYSTEMS, built
from webapp.site_panel import WIDGET as SITE
from webapp.state import KEY, PageState

GLYCOL = "steam_heater_glycol.json"  # 12 t/h glycol 5 -> 40 °C on 4 barg steam; no tolerances, no exchanger


@pytest.fixture
def solves(monkeypatch):
    """The worksheets the page solved: one per run of the whole page (a panel's own run solves nothing)."""
    solved = []
    solve_page = PageState.solve

    def counted(state):
        solved.append(state.worksheet)
        return solve_page(state)

    monkeypatch.setattr(PageState, "solve", counted)
    return solved


def unescaped(markdown: str) -> str:
    """Markdown source as read on screen (user text is escaped by webapp.common.plain)."""
    return re.sub(r"\\(.)", r"\1", markdown)


def no_exception(at) -> None:
    assert not at.exception, [e.value for e in at.exception]


# =========================================================================== a panel's own change
def _points(at):
    return at.number_input(key="whatif_count_0").set_value(5)


def _second_input(at):
    return at.selectbox(key="whatif_axis_1").select_index(1)


def _tolerance_size(at):
    return at.text_input(key="uncert_size").input("0.5 K")


PANEL_ONLY = [
    pytest.param(_points, lambda at: at.button(key="whatif_run").label == "Run the sweep (5 points)",
                 id="what-if-points"),
    pytest.param(_second_input, lambda at: at.number_input(key="whatif_count_1").value == 11,
                 id="what-if-second-input"),
    pytest.param(_tolerance_size, lambda at: at.text_input(key="uncert_size").value == "0.5 K",
                 id="uncertainty-size"),
]


@pytest.mark.parametrize("change, shown", PANEL_ONLY)
def test_a_change_that_stays_in_its_panel_reruns_that_panel_alone(solves, change, shown):
    with browser_runs() as runs:
        at = page(sample(GLYCOL))
        solved = len(solves)
        widget = change(at)
        assert runs.in_fragment(widget)
        before = len(runs.kinds)
        at = runs.interact(widget)
    no_exception(at)
    assert runs.kinds[before:] == ["fragment"]
    assert len(solves) == solved  # the page did not run: nothing solved again
    assert shown_answer(at) is None  # and nothing outside the panel was drawn again
    assert shown(at)  # the panel shows the change


def test_a_sign_off_is_recorded_by_a_run_of_the_filing_panel_alone(db, solves):
    ws = sample(GLYCOL)
    with browser_runs() as runs:
        at = page(ws)
        at.button(key="share_save").click().run()  # in the sidebar: the whole page
        solved, before = len(solves), len(runs.kinds)
        at.text_input(key="filing_name").input("Rosa Okafor")
        at.text_area(key="filing_comment").input("Checked against the flow meter log")
        at = runs.interact(at.button(key="filing_sign").click())
    no_exception(at)
    assert runs.kinds[before:] == ["fragment"] and len(solves) == solved
    assert any(s.value.startswith("Signed revision") and "Rosa Okafor" in s.value for s in at.success)


# =========================================================================== a change of the worksheet
def test_an_altitude_typed_in_the_site_panel_reruns_the_whole_page_and_moves_the_answer(solves):
    ws = sample(GLYCOL)
    high = with_value(ws, "atmosphere.altitude", "2000 m")
    assert answer_text(solve(high).answer) != answer_text(solve(ws).answer)  # the steam's pressure falls
    with browser_runs() as runs:
        at = page(ws)
        solved, before = len(solves), len(runs.kinds)
        at = runs.interact(at.text_input(key=SITE).set_value("2000 m"))
    no_exception(at)
    assert runs.kinds[before:] == ["fragment", "app"]  # the panel's callback changed the worksheet
    assert solves[solved:] == [held(at)] and str(held(at).atmosphere.altitude) == "2000 m"
    assert shown_answer(at)[1] == answer_text(solve(held(at)).answer) == answer_text(solve(high).answer)


def test_suggested_tolerances_rerun_the_whole_page_and_the_answer_gets_its_uncertainty(solves):
    with browser_runs() as runs:
        at = page(sample(GLYCOL))
        assert not any("(k = 2" in unescaped(m.value) for m in at.sidebar.markdown)
        before = len(runs.kinds)
        at = runs.interact(at.button(key="uncert_suggest").click())
    no_exception(at)
    assert runs.kinds[before:] == ["fragment", "app"]
    assert held(at).tolerances
    assert any("(k = 2" in unescaped(m.value) for m in at.sidebar.markdown)  # the answer panel shows value ± U


def test_demo_utilities_added_from_the_exchanger_panel_rerun_the_whole_page(solves):
    with browser_runs() as runs:
        at = page(sample(GLYCOL))
        solved, before = len(solves), len(runs.kinds)
        at = runs.interact(at.button(key="exchanger_add_demo_utilities").click())
    no_exception(at)
    assert runs.kinds[before:] == ["fragment", "app"]  # the panel's own st.rerun() is a run of the page
    assert held(at).utilities and solves[solved:] == [held(at)]
    assert "No site utility list in this worksheet." not in [c.value for c in at.caption]
    assert shown_answer(at) is not None  # the whole page was drawn


# =========================================================================== figures built once per content
def _drawn_waterfall(at) -> list[str]:
    chart = next(c for c in at.get("plotly_chart") if c.proto.id.endswith("-waterfall"))
    return json.loads(chart.proto.spec)["data"][0]["text"]


def _labels(ws, system="SI") -> list[str]:
    """The waterfall's bar labels for the engine's result of ``ws``."""
    return energy_waterfall(solve(ws), system).data[0].text


def test_a_rerun_reuses_the_waterfall_and_a_changed_result_draws_its_own(monkeypatch):
    made = []

    def counted(result, system="SI"):
        made.append(system)
        return energy_waterfall(result, system)

    monkeypatch.setattr(webapp.results, "energy_waterfall", counted)
    at = page(sample(GLYCOL))
    at.run()  # a new Result object with the same content
    assert made == ["SI"]
    assert _drawn_waterfall(at) == list(_labels(held(at)))
    at.session_state[KEY].apply_table_edit("streams", {"edited_rows": {0: {"flow": "6 t/h"}}})
    at.run()
    no_exception(at)
    assert made == ["SI", "SI"]
    assert _drawn_waterfall(at) == list(_labels(held(at))) != list(_labels(sample(GLYCOL)))
    at.radio(key="unit_system").set_value(list(UNIT_SYSTEMS)[1]).run()  # the US view: its own figure
    at.radio(key="unit_system").set_value(list(UNIT_SYSTEMS)[0]).run()  # back to SI: the one kept
    assert made == ["SI", "SI", "US"]
    assert _drawn_waterfall(at) == list(_labels(held(at)))


@pytest.fixture
def session(monkeypatch):
    """``webapp.common``'s session state, outside a script run: a plain dict."""
    state = {}
    monkeypatch.setattr(common, "st", SimpleNamespace(session_state=state))
    return state


def test_built_keys_on_content_not_on_the_object(session):
    made = []

    def figure(result, system):
        made.append((result, system))
        return object()

    first = solve(sample(GLYCOL))
    same = solve(sample(GLYCOL))
    changed = solve(with_value(sample(GLYCOL), "streams[Glycol].flow", "6 t/h"))
    assert same is not first and same == first
    assert built(figure, same, "SI") is built(figure, first, "SI")
    assert built(figure, changed, "SI") is not built(figure, first, "SI")
    assert built(figure, first, "US") is not built(figure, first, "SI")
    assert len(made) == 3


def test_built_builds_inputs_that_do_not_pickle_every_time_and_keeps_a_bounded_number(session):
    made = []

    def figure(*inputs):
        made.append(inputs)
        return object()

    unpicklable = lambda: None  # noqa: E731 - a local function does not pickle
    assert built(figure, unpicklable) is not built(figure, unpicklable)
    for n in range(BUILT_KEPT + 5):
        built(figure, n)
    assert len(next(iter(session.values()))) == BUILT_KEPT
    count = len(made)
    built(figure, BUILT_KEPT + 4)  # among the most recent: kept
    built(figure, 0)  # the oldest: built again
    assert len(made) == count + 1


def test_an_unexpected_failure_is_shown_plainly_and_logged_with_its_traceback(caplog):
    from webapp.common import guarded

    def broken_panel():
        raise TypeError("a defect")

    with caplog.at_level("ERROR", logger="heatbalance.page"):
        guarded(broken_panel)  # no traceback reaches the page (bare mode: no page to draw on)
    (record,) = [r for r in caplog.records if r.name == "heatbalance.page"]
    assert "broken_panel" in record.getMessage() and record.exc_info[0] is TypeError
