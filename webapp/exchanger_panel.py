"""The page's exchanger and utility panel: will the exchanger do it, and which utility at what cost?

Hooked into ``app.py`` as one of its extra panels, called as ``panel(worksheet, result, system)``. It shows what
the engine put in the result (:mod:`heatbalance.analyses.exchangers`, :mod:`heatbalance.analyses.utilities`):
each exchanger's loud warnings (a temperature cross, an approach below the minimum, a unit too small), its
numbers and zones, and its T–Q chart; each duty's utilities side by side with flow, cost and CO2, the ones that
cannot meet it with the reason. A sheet without a site utility list can take the demo list (our own invention)
through the setter it is given. Exchangers are declared in the worksheet file (see the guide).
"""
from __future__ import annotations

import pandas as pd
import streamlit as st

from heatbalance.analyses.exchangers import typical_U
from heatbalance.analyses.utilities import demo_utilities
from heatbalance.present.exchangers import exchanger_rows, tq_figure, utility_rows, zone_rows
from heatbalance.present.text import phrase_text
from heatbalance.results import Result
from heatbalance.worksheet import Worksheet

from .common import plain

__all__ = ["panel", "render_exchanger_panel", "with_demo_utilities"]


def with_demo_utilities(worksheet: Worksheet) -> Worksheet:
    """A copy of the worksheet with the demo site utility list (kept as it is if it has one)."""
    if worksheet.utilities:
        return worksheet
    return Worksheet.model_validate({**worksheet.model_dump(), "utilities": [u.model_dump() for u in demo_utilities()],
                                     "operating_hours": worksheet.operating_hours or {"value": 8000, "unit": "h"}})


def render_exchanger_panel(worksheet: Worksheet, result: Result | None, system: str, set_worksheet=None) -> None:
    if not worksheet.exchangers and not worksheet.utilities and set_worksheet is None:
        return
    with st.container(key="exchanger_panel"):
        st.subheader("Will the exchanger do it? Which utility?")
        if result is None:
            st.info("Solve the balance first: the exchanger check and the utilities run on its answer.")
            return
        if not result.exchangers:
            st.caption("No exchanger in this worksheet: declare one under `exchangers` in the file (its hot and cold "
                       "lines, the arrangement, optionally U, area or UA) to see its T–Q curves.")
        for i, check in enumerate(result.exchangers):
            st.markdown(f"**Exchanger {plain(check.name)}**: hot {plain(', '.join(check.hot))}; "
                        f"cold {plain(', '.join(check.cold))}")
            for warning in check.warnings:
                st.error(plain(phrase_text(warning, system)) + f" \\[{plain(warning.address)}\\]",
                         icon=":material/warning:")
            for note in check.notes:
                st.caption(plain(phrase_text(note, system)))
            st.plotly_chart(tq_figure(check, system), key=f"exchanger_tq_{i}", width="stretch")
            st.dataframe(pd.DataFrame(exchanger_rows(check, system)), hide_index=True, key=f"exchanger_rows_{i}")
            st.dataframe(pd.DataFrame(zone_rows(check, system)), hide_index=True, key=f"exchanger_zones_{i}")
            if check.rating is not None:
                st.markdown(plain(phrase_text(check.rating.verdict, system)))
            st.caption(plain("; ".join(check.sources)))
        for j, table in enumerate(result.utilities):
            d = table.demand
            st.markdown(f"**Utilities for {plain(d.label)}** ({d.sense})")
            st.dataframe(pd.DataFrame(utility_rows(table, system)), hide_index=True, key=f"utility_table_{j}")
        if not worksheet.utilities:
            st.caption("No site utility list in this worksheet.")
            if set_worksheet is not None and st.button("Add the demo site utilities (our own invention)",
                                                       key="exchanger_add_demo_utilities"):
                set_worksheet(with_demo_utilities(worksheet))
                st.rerun()
        with st.expander("Typical overall coefficients U (guidance only)"):
            st.dataframe(pd.DataFrame(typical_U()), hide_index=True, key="exchanger_typical_U")


def panel(set_worksheet=None):
    """The panel as ``app.py`` calls it: ``panel(set_worksheet)(worksheet, result, system)``."""
    def draw(worksheet: Worksheet, result: Result | None, system: str) -> None:
        render_exchanger_panel(worksheet, result, system, set_worksheet)
    return draw
