"""The sidebar under the answer: the view's unit set, open a sample or a new sheet, how it works."""
from __future__ import annotations

import streamlit as st

from heatbalance.worksheet import Worksheet

from . import grids, sharing
from .common import UNIT_SYSTEM_KEY, UNIT_SYSTEMS, load_sample, page_state, sample_files

__all__ = ["render_sidebar"]

_HOW = ("**How it works**  \n"
        "1. List the streams (flows) or vessels (batch charges), each from its initial to its final state.  \n"
        "2. Add duties, losses, reaction heat and the equipment that warms with the contents.  \n"
        "3. Pick the one quantity to solve for: its cell shows **?**.\n\n"
        "Type every value with its unit: `12 t/h`, `4 barg`, `55 °C`, `-110 kW`. A state can also be "
        "`saturated vapour`, `saturated liquid`, `vapour fraction 0.3` or `solid fraction 0.5`. "
        "Values stay in the units you type; *Show results in* only changes how results are shown. A number takes a decimal point: `12.5 t/h`.")


def _open(worksheet: Worksheet, kind: str, name: str = "") -> None:
    """Put ``worksheet`` on the page; Undo brings back the one it replaces, and where that came from."""
    before = sharing.provenance()
    page_state().replace(worksheet)
    sharing.loaded(before)
    sharing.note_origin(kind, worksheet, name)


def _on_sample_pick() -> None:
    path = sample_files().get(st.session_state.get("sample_picker"))
    if path is not None:
        _open(load_sample(path), "sample", path.name)


def _on_new_worksheet() -> None:
    _open(grids.empty_worksheet(), "new")


def render_sidebar() -> None:
    """Below the answer in the sidebar: the view's unit set, open a sample or a new sheet, how it works."""
    st.radio("Show results in", list(UNIT_SYSTEMS), key=UNIT_SYSTEM_KEY, horizontal=True)
    st.divider()
    st.selectbox("Open a sample worksheet", list(sample_files()), index=None, key="sample_picker",
                 placeholder="choose a sample…", on_change=_on_sample_pick,
                 help="A file or a link opens under Save and share, at the end of the page.")
    st.button("New, empty worksheet", key="new_worksheet", on_click=_on_new_worksheet, width="stretch")
    with st.expander("How it works", icon=":material/help:"):
        st.markdown(_HOW)
