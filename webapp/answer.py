"""The answer box: what is solved for, the answer in the unit typed for it (± its uncertainty when the inputs
have tolerances), warnings, the one caution."""
from __future__ import annotations

import dataclasses

import streamlit as st

from heatbalance import address
from heatbalance.errors import HeatBalanceError
from heatbalance.present.text import answer_text, average_power_text, error_text, phrase_text
from heatbalance.present.uncertainty import output_uncertainty_lines, uncertainty_text
from heatbalance.reactor import CAUTION
from heatbalance.results import Result
from heatbalance.worksheet import Worksheet

from . import sharing
from .common import page_state, plain
from .state import NEW_DUTY

__all__ = ["render_header", "render_answer", "refusal_place", "unknown_choices", "NEW_DUTY_LABEL", "ANSWER_KEY"]

ANSWER_KEY = "answer_value"  # the container holding the answer's value alone (its look: app.py's CSS)


def render_header(worksheet: Worksheet) -> None:
    st.title(plain(worksheet.title))
    if worksheet.notes:
        st.caption(plain(worksheet.notes))


NEW_DUTY_LABEL = "a heater or cooler duty (adds a duty line)"


def _on_unknown_pick(choices: dict[str, str]) -> None:
    from .uncertainty_panel import key as uncertainty_key  # (pandas comes with it: not before the answer)

    new = choices.get(st.session_state.get("unknown_picker"))
    if new is not None:
        state = page_state()
        had = any(t.address == new for t in state.worksheet.tolerances)
        state.pick_unknown(new)  # the engine drops a tolerance the new unknown had (it is solved for)
        if had:
            st.session_state[uncertainty_key("notice")] = (
                f"The tolerance on {address.label(new)} was removed: it is now the unknown, solved for.")
            st.session_state.pop(uncertainty_key("refusal"), None)


def unknown_choices(worksheet: Worksheet) -> dict[str, str]:
    """What "Solve for" offers, label -> address: every field that can be the unknown, and a new duty."""
    choices = {label: where for where, label in address.unknown_choices(worksheet)}
    choices[NEW_DUTY_LABEL] = NEW_DUTY
    return choices


def _render_unknown_picker(worksheet: Worksheet) -> None:
    """Always usable (a marked cell too: only the two cells concerned change); no clear button (index 0
    as the widget's default with the current choice set in the session makes it not clearable)."""
    choices = unknown_choices(worksheet)
    current = None
    if len(worksheet.unknowns) == 1:
        held = address.unknown_address(worksheet.unknowns[0])
        current = next((label for label, where in choices.items() if where == held), None)
    if st.session_state.get("unknown_picker") != current:
        st.session_state["unknown_picker"] = current
    st.selectbox("Solve for", list(choices), index=0 if current is not None else None, key="unknown_picker",
                 on_change=_on_unknown_pick, args=(choices,), placeholder="pick the one unknown quantity…",
                 help="The one quantity the balance is solved for. Picking another one gives the old "
                      "unknown its last answer as a value, in the unit typed there (or keeps a value you "
                      "typed into its cell).")


def refusal_place(error: HeatBalanceError) -> str:
    """Where a refusal is, in words (from its address): ``Quench pit / Hot condensate mass``; empty when it is
    not one field (the worksheet, the unknown: the message says it)."""
    if not error.address or error.address in ("worksheet", "unknown", "unknowns"):
        return ""
    try:
        return address.label(error.address)
    except HeatBalanceError:
        return error.address


def _render_answer_value(result: Result, system: str) -> None:
    answer = result.answer
    shown = answer_text(answer, system)
    # plain Markdown, not a metric widget: the page's first draw waits for no script of the browser's own,
    # so the answer is on screen before the grids and charts are (the metric's look comes from the page's CSS)
    st.caption(f"Answer: {plain(answer.label)}")
    st.container(key=ANSWER_KEY).markdown(plain(shown))
    in_view = answer_text(dataclasses.replace(answer, typed_unit=None), system)
    if in_view != shown:  # typed in another unit than the view's: show both
        st.caption(f"= {plain(in_view)}")
    average = average_power_text(result, system)
    if average is not None:  # a batch duty: what the jacket or heater must give on average (as on the sheet)
        st.caption(f"= {plain(average)} (the peak, set by the dosing or heating rate, is higher)")
    if getattr(result, "uncertainty", None) is not None:  # the sheet has tolerances: value ± U
        with st.container(key="answer_uncertainty"):
            st.markdown(f"**{plain(uncertainty_text(result.uncertainty, system, answer))}**",
                        help="From the inputs' tolerances (GUM, inputs uncorrelated); the contributors are "
                             "listed under \"How sure is the answer\".")
            for line in output_uncertainty_lines(result, system):  # the plateau's fraction, each screening's MTSR
                st.caption(plain(line))


def _on_undo() -> None:
    sharing.put_back(page_state().undo(sharing.provenance()))  # across a load: where that sheet came from


def _on_redo() -> None:
    sharing.put_back(page_state().redo(sharing.provenance()))


def _render_undo_redo() -> None:
    state = page_state()
    left, right = st.columns(2)
    left.button("Undo", key="undo", icon=":material/undo:", on_click=_on_undo, disabled=not state.past,
                shortcut="Ctrl+Z", width="stretch", help="Undo the last change to the worksheet")
    right.button("Redo", key="redo", icon=":material/redo:", on_click=_on_redo, disabled=not state.future,
                 shortcut="Ctrl+Y", width="stretch", help="Redo the change undone last")


def _render_not_solved(worksheet: Worksheet, error: HeatBalanceError | None, system: str) -> None:
    if error is None:
        st.info("Nothing to solve yet: add a stream or a vessel below, then pick what to solve for.")
        return
    gone = page_state().unknown_gone
    if gone is not None:
        line = address.parse(gone)[0][1]
        st.error(f"**Not solved.** The quantity solved for, {plain(address.label(gone))}, belonged to "
                 f"{plain(line)}, which is no longer on the sheet. Pick what to solve for above, or undo the "
                 "deletion.", icon=":material/error:")
        st.button(f"Undo: bring back {plain(line)}", key="undo_deletion", on_click=_on_undo, type="primary",
                  disabled=not page_state().past)
        return
    place = refusal_place(error)
    lead = f"**Not solved.** {plain(place)}: " if place else "**Not solved** — "  # the message as written
    st.error(lead + plain(error_text(error, system)), icon=":material/error:")
    st.caption("The place is marked in the tables; everything else is kept as you left it.")


def render_answer(worksheet: Worksheet, result: Result | None, error: HeatBalanceError | None,
                  system: str) -> None:
    """The answer panel (drawn in the sidebar, so it stays in view): "Solve for", the answer or why there is
    none, undo and redo, its warnings, the one caution."""
    with st.container(key="answer", border=True):
        _render_unknown_picker(worksheet)
        if result is not None:
            _render_answer_value(result, system)
        else:
            _render_not_solved(worksheet, error, system)
    _render_undo_redo()
    if result is not None and result.warnings:
        listed = "\n".join(f"- {plain(phrase_text(w, system))}" for w in result.warnings)
        st.warning(f"**Read before using this answer:**\n{listed}", icon=":material/warning:")
    hot_surfaces = any(loss.surface is not None for loss in worksheet.losses)  # personnel protection
    if worksheet.reactions or worksheet.vessels or hot_surfaces:  # a batch end temperature or reaction heat
        st.warning(CAUTION, icon=":material/health_and_safety:")
