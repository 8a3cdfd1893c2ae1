"""The results: the waterfall, every contribution, the closure, sign convention, sources, warnings.

The waterfall and the contribution table are built once per result content (:func:`webapp.common.built`)."""
from __future__ import annotations

import pandas as pd
import streamlit as st

from heatbalance.present.figures import energy_waterfall
from heatbalance.present.tables import contribution_rows
from heatbalance.present.text import format_heat, no_negative_zero, phrase_text
from heatbalance.results import SIGN_CONVENTION, Result

from .common import built, plain

__all__ = ["render_results"]

_WATERFALL_CAPTION = ("Each bar is one contribution, as heat into the process. Red: heat put in (heaters, "
                      "reaction heat, lines that cool down or condense). Blue: heat taken out or taken up "
                      "(coolers, losses, lines that warm up or boil, the equipment). Grey: the sum, which is "
                      "zero when the balance closes.")


def _number(value: float | None) -> str:
    """A heat in the contribution table: 1,234.57; blank where it does not apply."""
    return "" if value is None else no_negative_zero(f"{value:,.2f}")


def _contribution_table(result: Result, system: str) -> tuple[pd.DataFrame, list[str], list[str]]:
    """The contribution table as shown (heats written as text), its column order (the heat first) and its heat
    columns (pure)."""
    rows = contribution_rows(result, system)
    heats = [c for c in rows[0] if "[" in c]
    order = ["item", "type", heats[-1], *heats[:-1], "material", "amount", "from", "to"]
    shown = [{k: (_number(v) if k in heats else v) for k, v in row.items()} for row in rows]
    return pd.DataFrame(shown), order, heats


def _render_contributions(result: Result, system: str) -> None:
    table, order, heats = built(_contribution_table, result, system)
    st.markdown("**Every contribution** (heat into the process; a line that absorbs heat shows as −)")
    config = {c: st.column_config.TextColumn(c, alignment="right") for c in heats}
    config.update({"from": st.column_config.TextColumn("from / detail", width="large"),
                   "to": st.column_config.TextColumn("to", width="medium")})
    st.dataframe(table, key="contributions", hide_index=True, width="stretch", column_order=order,
                 column_config=config)


def render_results(result: Result | None, system: str) -> None:
    st.header("Results")
    if result is None:
        st.info("The results appear here once the balance solves.")
        return
    st.plotly_chart(built(energy_waterfall, result, system), key="waterfall", width="stretch")
    st.caption(_WATERFALL_CAPTION)
    _render_contributions(result, system)
    st.markdown(f"**Closure residual:** {format_heat(result.residual, result.basis, system)} "
                "(what is left when every contribution is added; zero when the balance closes)")
    left, right = st.columns(2)
    with left:
        st.markdown("**Sign convention**")
        st.markdown(plain(SIGN_CONVENTION))
        st.markdown("**Assumptions**")
        st.markdown("\n".join(f"- {plain(phrase_text(a, system))}" for a in result.assumptions))
    with right:
        st.markdown("**Property data**")
        st.markdown("\n".join(f"- **{plain(name)}**: {plain(source)}" for name, source in result.sources.items()))
        st.caption("Versions: " + ", ".join(f"{k} {v}" for k, v in result.versions.items()))
    st.markdown("**Warnings**")
    if result.warnings:
        for warning in result.warnings:
            st.warning(plain(phrase_text(warning, system)), icon=":material/warning:")
    else:
        st.markdown("None.")
