"""The heat-balance worksheet page: a thin shell that lays out and draws.

widgets -> the page's editing state (:mod:`webapp.state`, one session key) -> the engine
(:func:`heatbalance.analyses.solve_and_analyse`) -> drawing (:mod:`webapp.answer`, :mod:`webapp.inputs`,
:mod:`webapp.results` and the extra panels). No physics and no unit conversion here.

Another panel hooks in with one line in :data:`EXTRA_PANELS`; a panel that opens another worksheet
calls :func:`replace_worksheet`, one that changes an input outside the grids :func:`set_worksheet`.
"""
from __future__ import annotations

import streamlit as st

from heatbalance.results import Result
from heatbalance.worksheet import Worksheet
from webapp import screening_panel, sharing
from webapp.answer import render_answer, render_header
from webapp.common import DEFAULT_SAMPLE, SAMPLES_DIR, display_system, guarded, load_sample, page_state
from webapp.inputs import render_inputs
from webapp.results import render_results
from webapp.sidebar import render_sidebar
from webapp.state import KEY, PageState


SIDEBAR_PX = 360  # the answer panel's width at first (the user can drag it)
# narrower page margins than Streamlit's wide layout, so the inputs fit a 1400 px screen beside the answer panel
_LAYOUT_CSS = "<style>.stMainBlockContainer{padding:2.5rem 2rem 4rem 2rem;}</style>"


def replace_worksheet(worksheet: Worksheet) -> None:
    """Put another worksheet on the page (an upload, a link)."""
    page_state().replace(worksheet)


def set_worksheet(worksheet: Worksheet) -> None:
    """An input changed outside the grids (the screening panel's): the grids stay as typed."""
    page_state().set_worksheet(worksheet)


# Panels below the results, each called as panel(worksheet, result, system) (result None when not solved).
EXTRA_PANELS = [
    __import__("webapp.site_panel", fromlist=["panel"]).panel(set_worksheet),  # site atmosphere (site_panel.py)
    __import__("webapp.uncertainty_panel", fromlist=["panel"]).panel(set_worksheet),  # how sure (uncertainty_panel.py)
    __import__("webapp.humid_air_panel", fromlist=["panel"]).panel(set_worksheet),  # humid air: humidity, condensate
    screening_panel.panel(set_worksheet),  # thermal screening (webapp/screening_panel.py)
    __import__("webapp.exchanger_panel", fromlist=["panel"]).panel(set_worksheet),  # exchangers, utilities
    __import__("webapp.losses_panel", fromlist=["panel"]).panel(set_worksheet),  # computed surface losses
    __import__("webapp.mixing_panel", fromlist=["panel"]).panel(set_worksheet),  # heats of mixing (mixing_panel.py)
    __import__("webapp.whatif_panel", fromlist=["panel"]).panel(set_worksheet),  # what if (webapp/whatif_panel.py)
    __import__("webapp.freezing_panel", fromlist=["panel"]).panel(set_worksheet),  # freezing-range materials
    sharing.panel(replace_worksheet),  # save and share (webapp/sharing.py)
    __import__("webapp.filing_panel", fromlist=["panel"]).panel(),  # the PDF sheet, sign-off (filing_panel.py)
]


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
        guarded(sharing.render_save, worksheet)
        guarded(render_sidebar)
    guarded(render_header, worksheet)
    guarded(sharing.render_origin, worksheet)  # where it came from: a saved revision, a link, a sample, …
    guarded(render_inputs, worksheet, system)
    guarded(render_results, result, system)
    for panel in EXTRA_PANELS:
        guarded(panel, worksheet, result, system)


main()
