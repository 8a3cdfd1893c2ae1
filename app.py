"""The heat-balance worksheet page: a thin shell that lays out and draws.

widgets -> the page's editing state (:mod:`webapp.state`, one session key) -> the engine
(:func:`heatbalance.analyses.solve_and_analyse`) -> drawing (:mod:`webapp.answer`, :mod:`webapp.inputs`,
:mod:`webapp.results` and the extra panels). No physics and no unit conversion here.

Another panel hooks in with one line in :data:`EXTRA_PANELS`; a panel that opens another worksheet
calls :func:`replace_worksheet`, one that changes an input outside the grids :func:`set_worksheet`.
Each extra panel is a fragment (:func:`webapp.common.fragment_panel`): its own widgets rerun it alone,
and a change of the worksheet made there reruns the whole page.
"""
from __future__ import annotations

import importlib

import streamlit as st

from heatbalance.results import Result
from heatbalance.worksheet import Worksheet
from webapp import sharing
from webapp.answer import ANSWER_KEY, render_answer, render_header
from webapp.common import (DEFAULT_SAMPLE, SAMPLES_DIR, display_system, fragment_panel, guarded,
                           keep_loaded_libraries_out_of_gc, load_sample, page_state)
from webapp.state import KEY, PageState


SIDEBAR_PX = 360  # the answer panel's width at first (the user can drag it)
# narrower page margins than Streamlit's wide layout, so the inputs fit a 1400 px screen beside the answer panel;
# the answer's value as large as a metric's
_LAYOUT_CSS = ("<style>.stMainBlockContainer{padding:2.5rem 2rem 4rem 2rem;}"
               f".st-key-{ANSWER_KEY} p{{font-size:2.25rem;line-height:1.25;margin:0;}}</style>")


def replace_worksheet(worksheet: Worksheet) -> None:
    """Put another worksheet on the page (an upload, a link)."""
    page_state().replace(worksheet)


def set_worksheet(worksheet: Worksheet) -> None:
    """An input changed outside the grids (the screening panel's): the grids stay as typed."""
    page_state().set_worksheet(worksheet)


# Panels below the results, each called as panel(worksheet, result, system) (result None when not solved);
# (module, argument of its ``panel``), imported when the page first draws them: after the answer is on screen
EXTRA_PANELS = [
    ("webapp.site_panel", set_worksheet),  # site atmosphere
    ("webapp.uncertainty_panel", set_worksheet),  # how sure
    ("webapp.humid_air_panel", set_worksheet),  # humid air: humidity, condensate
    ("webapp.screening_panel", set_worksheet),  # thermal screening
    ("webapp.exchanger_panel", set_worksheet),  # exchangers, utilities
    ("webapp.losses_panel", set_worksheet),  # computed surface losses
    ("webapp.mixing_panel", set_worksheet),  # heats of mixing
    ("webapp.whatif_panel", set_worksheet),  # what if
    ("webapp.freezing_panel", set_worksheet),  # freezing-range materials
    ("webapp.sharing", replace_worksheet),  # save and share
    ("webapp.filing_panel", None),  # the PDF sheet, sign-off
]


def extra_panels() -> list:
    """The panels of :data:`EXTRA_PANELS`, each a fragment (each module is imported once per process)."""
    panels = []
    for module, argument in EXTRA_PANELS:
        make = importlib.import_module(module).panel
        panels.append(fragment_panel(make() if argument is None else make(argument)))
    return panels


def open_state() -> None:
    """The state, opened on the worksheet a share link names (else the default sample); widgets set from it."""
    if KEY not in st.session_state:
        worksheet = sharing.worksheet_from_link()
        if worksheet is None:
            worksheet = load_sample(SAMPLES_DIR / DEFAULT_SAMPLE)
            sharing.note_origin("sample", worksheet, DEFAULT_SAMPLE)
        st.session_state[KEY] = PageState.opened(worksheet)
    state = page_state()
    if state.widgets_stale:
        st.session_state.update(state.widget_values())
        state.widgets_stale = False


def main() -> None:
    st.set_page_config(page_title="Heat balance worksheet", page_icon=":material/thermostat:", layout="wide",
                       initial_sidebar_state=SIDEBAR_PX)
    st.html(_LAYOUT_CSS)
    guarded(open_state)
    if KEY not in st.session_state:
        return
    state = page_state()
    system = display_system()
    result: Result | None
    result, error = state.solve()
    worksheet = state.worksheet
    with st.sidebar:  # always in view: the answer, its warnings, undo, save and share
        guarded(render_answer, worksheet, result, error, system)
    # the rest of the page needs pandas, plotly, SQLAlchemy…: loaded once the answer is drawn (its first run)
    from webapp.inputs import render_inputs
    from webapp.results import render_results
    from webapp.sidebar import render_sidebar

    with st.sidebar:
        guarded(sharing.render_save, worksheet)
        guarded(render_sidebar)
    guarded(render_header, worksheet)
    guarded(sharing.render_origin, worksheet)  # where it came from: a saved revision, a link, a sample, …
    guarded(render_inputs, worksheet, system)
    guarded(render_results, result, system)
    for panel in extra_panels():
        panel(worksheet, result, system)  # guarded inside the fragment, which may rerun alone
    keep_loaded_libraries_out_of_gc()  # every library the page uses is loaded by now


main()
