"""The page's "how sure is the answer" panel: the inputs' tolerances, the answer's contributors, a Monte Carlo check.

Hooked into ``app.py`` as one of its extra panels (:func:`panel`), called as ``draw(worksheet, result, system)``.

*Contributors.* When the worksheet has tolerances, the solve already propagated them
(``result.uncertainty``, :func:`heatbalance.analyses.uncertainty.propagate`): the panel lists the inputs
ranked by their part in the answer's uncertainty, with their share, and the engine's notes.

*Tolerances.* One tolerance per input, by its address: ``± 0.5 K``, ``± 1.5 %`` (or a plain number for a
fraction), what the ± means (rectangular limits, one standard uncertainty, a 95 % interval) and where it
comes from. A button fills in the engine's suggested tolerances (common practice, each saying so in its
source) for inputs that have none; the user edits or removes them. Every change is checked by the engine
(:func:`propagate` on the worksheet with just that tolerance: the unknown, a field without a value, a unit
of another kind are refused at the input's address) and then by the worksheet loader, and written through
the setter the page passes, so tolerances are saved and shared with the sheet.

*Monte Carlo.* An optional check with a number of draws; its result is kept with the worksheet it ran on
and hidden once that worksheet changes.

Every piece of user text (labels quoting names, sources, messages quoting them) is shown as plain text.
"""
from __future__ import annotations

import math
import re

import pandas as pd
import streamlit as st
from pydantic import ValidationError

from heatbalance import address
from heatbalance.analyses.uncertainty import propagate, suggested_tolerances
from heatbalance.errors import HeatBalanceError, InputError
from heatbalance.present.text import display_unit, error_text, phrase_text
from heatbalance.present.uncertainty import contribution_rows, monte_carlo_text, uncertainty_text
from heatbalance.results import Result
from heatbalance.worksheet import Quantity, Tolerance, Worksheet, parse_worksheet, plain_text_refusal

from .common import count_refusal, page_state, plain
from .grids import parse_quantity

__all__ = ["panel", "render_uncertainty_panel", "key", "DISTRIBUTIONS", "parse_tolerance", "tolerance_size_text",
           "checked_tolerance", "with_tolerances", "with_suggested", "MC_DEFAULT", "MC_MAX"]

PREFIX = "uncert_"
DISTRIBUTIONS = {
    "rectangular": "rectangular: ± are limits (e.g. an instrument's specification)",
    "normal": "normal: ± is one standard uncertainty",
    "95 %": "95 %: ± is an expanded uncertainty at about 95 % (k = 2)",
}
MC_DEFAULT, MC_MIN, MC_MAX = 2000, 100, 20000
_NUMBER = r"[-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?"
_PERCENT = re.compile(rf"^\s*({_NUMBER})\s*%\s*$")
_PLAIN = re.compile(rf"^\s*({_NUMBER})\s*$")
_PLUS_MINUS = re.compile(r"^\s*(?:±|\+/-|\+-)\s*")


def key(name: str) -> str:
    """The session key of one of the panel's widgets or records: ``uncert_<name>``."""
    return PREFIX + name


def panel(set_worksheet):
    """The panel as the page hooks it in: tolerance edits are written into the worksheet through ``set_worksheet``."""
    def draw(worksheet: Worksheet, result: Result | None, system: str) -> None:
        render_uncertainty_panel(worksheet, result, system, set_worksheet)
    return draw


# =========================================================================== pure parts
def _is_fraction(i: address.Input) -> bool:
    return i.kinds == (address.FRACTION,)


def parse_tolerance(i: address.Input, text: str, distribution: str, source: str) -> Tolerance:
    """A tolerance for input ``i`` from what was typed: ``0.5 K``, ``± 1.5 %``, a plain number for a fraction.

    Refused (an :class:`InputError` at the input's address): empty or unreadable text, a negative size,
    a unit that does not measure the input's kind (for a temperature: a temperature difference).
    """
    where = i.address
    text = _PLUS_MINUS.sub("", (text or "").replace("−", "-")).strip()
    if not text:
        raise InputError("give the tolerance: a number with a unit (e.g. 0.5 K, 0.2 t/h) or a percent (e.g. 1.5 %)",
                         where)
    percent = _PERCENT.match(text)
    if percent:
        size = float(percent.group(1))
        form = {"percent": size}
        shown = f"{size:g} %"
    elif _is_fraction(i):
        number = _PLAIN.match(text)
        if not number:
            raise InputError(f"'{text}' is not a plain number or a percent (this input is a plain number "
                             "between 0 and 1)", where)
        size = float(number.group(1))
        form = {"plus_minus": size}
        shown = f"{size:g}"
    else:
        kinds = ("temperature_difference",) if i.kinds == ("temperature",) else i.kinds
        try:
            quantity = parse_quantity(text, kinds, where)
        except HeatBalanceError as exc:
            hint = " (a temperature's tolerance is a temperature difference: K or °F)" \
                if kinds == ("temperature_difference",) else ""
            raise InputError(f"tolerance {exc.message}{hint}", where) from None
        size = quantity.value
        form = {"plus_minus": quantity}
        shown = text
    if not math.isfinite(size):
        raise InputError(f"the tolerance {shown} is not a finite number", where)
    if size < 0:
        raise InputError(f"a tolerance is a ± half-width and cannot be negative ({shown})", where)
    if distribution not in DISTRIBUTIONS:
        raise InputError(f"the distribution is one of {', '.join(DISTRIBUTIONS)}, not {distribution!r}", where)
    why = plain_text_refusal(source or "")
    if why:
        raise InputError(f"tolerance source: {why}", where)
    try:
        return Tolerance(address=where, distribution=distribution, source=(source or "").strip(), **form)
    except ValidationError as exc:  # the field in words, the model's words without pydantic's prefix
        raise InputError("; ".join(f"tolerance {'.'.join(str(p) for p in e['loc'])}: "
                                   f"{e['msg'].removeprefix('Value error, ')}" for e in exc.errors()), where) from None


def checked_tolerance(worksheet: Worksheet, tolerance: Tolerance) -> None:
    """The engine's own check of one tolerance on this worksheet (the unknown, no value, a unit of another
    kind, a tolerance so wide the answer cannot be solved at either end): refused at its address.

    A refusal somewhere else (the worksheet does not solve as it is) is not the tolerance's fault: it is
    shown beside the answer, and the tolerance is kept.
    """
    try:
        propagate(worksheet.model_copy(update={"tolerances": [tolerance]}))
    except HeatBalanceError as exc:
        if exc.where in (tolerance.address, "tolerances"):
            raise


def with_tolerances(worksheet: Worksheet, tolerances: list[Tolerance]) -> Worksheet:
    """The worksheet with these tolerances, through the loader's own checks (limits, unique addresses)."""
    data = worksheet.model_dump(mode="json", exclude_none=True)
    data["tolerances"] = [t.model_dump(mode="json", exclude_none=True) for t in tolerances]
    try:
        return parse_worksheet(data)
    except HeatBalanceError as exc:
        raise exc.located("tolerances")


def with_suggested(worksheet: Worksheet) -> tuple[Worksheet, int]:
    """The worksheet with the suggested tolerances added for the inputs that have none (and how many)."""
    held = {t.address for t in worksheet.tolerances}
    added = [t for t in suggested_tolerances(worksheet) if t.address not in held]
    if not added:
        return worksheet, 0
    return with_tolerances(worksheet, [*worksheet.tolerances, *added]), len(added)


def tolerance_size_text(t: Tolerance) -> str:
    """``± 0.5 K``, ``± 1.5 %``, ``± 0.02``: the size as it would be typed again."""
    if t.percent is not None:
        return f"± {t.percent:g} %"
    if isinstance(t.plus_minus, Quantity):
        return f"± {t.plus_minus.value:g} {display_unit(t.plus_minus.unit)}".rstrip()
    return f"± {t.plus_minus:g}"


def _editable_text(t: Tolerance | None) -> str:
    return "" if t is None else tolerance_size_text(t)[2:]


def _label(where: str) -> str:
    try:
        return address.label(where)
    except HeatBalanceError:
        return where


def _located(exc: HeatBalanceError, system: str = "SI") -> str:
    text = error_text(exc, system)
    return f"{exc.where}: {text}" if exc.where else text


# =========================================================================== drawing
def render_uncertainty_panel(worksheet: Worksheet, result: Result | None, system: str, set_worksheet) -> None:
    """Draw the panel (nothing on a sheet without lines or without one unknown)."""
    if not (worksheet.streams or worksheet.vessels) or len(worksheet.unknowns) != 1:
        return
    with st.container(key="uncertainty_panel"):
        st.header("How sure is the answer")
        st.caption("Each input may carry a tolerance; the answer's uncertainty is propagated from them "
                   "(GUM, inputs taken as uncorrelated) and shown beside the answer as value ± U (k = 2, "
                   "about 95 %).")
        left, right = st.columns(2, gap="large")
        with left, st.container(key="uncert_result_box"):
            _result_section(worksheet, result, system)
        with right, st.container(key="uncert_editor_box"):
            _editor_section(worksheet, system, set_worksheet)


def _result_section(worksheet: Worksheet, result: Result | None, system: str) -> None:
    u = getattr(result, "uncertainty", None) if result is not None else None
    if not worksheet.tolerances:
        st.info("No input has a tolerance yet: the answer is shown without its uncertainty. Give tolerances "
                "on the right, or fill in the suggested ones.", icon=":material/info:")
        return
    if u is None:
        _refusal_of_sheet(worksheet, result, system)
        return
    st.markdown(f"**Answer with its uncertainty:** {plain(uncertainty_text(u, system, result.answer))}")
    rows = contribution_rows(u, system, result.answer)
    table = pd.DataFrame(rows).drop(columns=["address"]).rename(columns={"input": "input (largest first)"})
    first = ["input (largest first)", "share"] + [c for c in table.columns if c.startswith("contribution")]
    table = table[first + [c for c in table.columns if c not in first]]  # what matters most, in view
    numbers = {c: st.column_config.NumberColumn(format="%.4g") for c in table.columns if c.startswith("contribution")}
    st.dataframe(table, key=key("contributions"), hide_index=True, column_config=numbers)
    if u.notes:
        st.markdown("\n".join(f"- {plain(phrase_text(n, system))}" for n in u.notes))
    _monte_carlo_section(worksheet, result, system)


def _refusal_of_sheet(worksheet: Worksheet, result: Result | None, system: str) -> None:
    """No uncertainty: a tolerance the engine cannot use (the answer stands, its ± is missing), or no answer."""
    error = getattr(result, "uncertainty_error", None) if result is not None else page_state().error
    held = {t.address for t in worksheet.tolerances}
    if error is not None and (error.where in held or error.where == "tolerances"):
        st.error(f"A tolerance stops the uncertainty: {plain(_located(error, system))}. Change or remove it on "
                 "the right.", icon=":material/error:")
    else:
        st.caption("The uncertainty is shown once the balance solves.")


def _monte_carlo_section(worksheet: Worksheet, result: Result, system: str) -> None:
    with st.expander("Monte Carlo check (for answers that are not linear in their inputs)"):
        st.caption("Every input drawn from its distribution at once and the balance solved for each draw "
                   "(GUM Supplement 1; seeded, so the same sheet gives the same numbers).")
        # a float field without bounds: the browser would keep the old number of draws (hover tip only) and
        # truncate 150.5 to 150; _draws_refusal says so here instead
        st.number_input("Draws", value=float(MC_DEFAULT), step=500.0, format="%.10g", key=key("mc_draws"))
        refusal = _draws_refusal(st.session_state.get(key("mc_draws")))
        if refusal is not None:
            st.error(plain(_located(refusal, system)), icon=":material/error:")
        st.button("Run the Monte Carlo check", key=key("mc_run"), on_click=_run_monte_carlo, args=(worksheet,),
                  disabled=refusal is not None)
        kept = st.session_state.get(key("mc"))
        if kept is None or kept[0] != worksheet.model_dump_json():
            return
        outcome = kept[1]
        if isinstance(outcome, HeatBalanceError):
            st.error(f"Not run: {plain(_located(outcome, system))}", icon=":material/error:")
            return
        with st.container(key="uncert_mc_result"):
            st.markdown(plain(monte_carlo_text(outcome, system, result.answer)))


def _draws_refusal(draws: float | None) -> InputError | None:
    """The refusal of a number of Monte Carlo draws (no worksheet input: the refusal names the field)."""
    return count_refusal(draws, MC_MIN, MC_MAX, "draws", "Monte Carlo draws")


def _run_monte_carlo(worksheet: Worksheet) -> None:
    draws = st.session_state.get(key("mc_draws"))
    outcome = _draws_refusal(draws)
    if outcome is None:
        try:
            outcome = propagate(worksheet, monte_carlo=int(draws))
        except HeatBalanceError as exc:
            outcome = exc
    st.session_state[key("mc")] = (worksheet.model_dump_json(), outcome)


# --------------------------------------------------------------------------- the editor
def _candidates(worksheet: Worksheet) -> list[address.Input]:
    """The inputs a tolerance may be given on: every addressable input with a value but the unknown."""
    return [i for i in address.inputs(worksheet) if not i.is_unknown and i.value is not None]


def _editor_section(worksheet: Worksheet, system: str, set_worksheet) -> None:
    st.subheader("Tolerances")
    if key("refusal") in st.session_state:
        st.error(plain(st.session_state[key("refusal")]), icon=":material/error:")
    elif st.session_state.get(key("notice")):
        st.success(plain(st.session_state[key("notice")]))
    with st.container(key="uncert_tolerance_list"):
        if not worksheet.tolerances:
            st.caption("None yet.")
        for j, t in enumerate(worksheet.tolerances):
            c1, c2 = st.columns([9, 1], vertical_alignment="center")
            source = f" — {t.source}" if t.source else " — no source given"
            c1.markdown(plain(f"{_label(t.address)}: {tolerance_size_text(t)} ({t.distribution}){source}"))
            c2.button("", key=key(f"remove_{j}"), on_click=_remove, args=(j, set_worksheet),
                      icon=":material/delete:", help=f"Remove the tolerance on {plain(_label(t.address))}")
    b1, b2 = st.columns(2)
    b1.button("Fill in suggested tolerances", key=key("suggest"), on_click=_suggest, args=(set_worksheet,),
              width="stretch",
              help="Adds common-practice tolerances (flow meter ±1.5 %, thermometer ±0.5 K, tabulated cp ±2 %, "
                   "heat of reaction ±5 %, …) to the inputs that have none. They are rules of thumb, not your "
                   "instruments' data: each says so in its source; edit or remove them.")
    if worksheet.tolerances:
        b2.button("Remove all tolerances", key=key("remove_all"), on_click=_remove_all, args=(set_worksheet,),
                  width="stretch")
    candidates = {i.address: i for i in _candidates(worksheet)}
    if not candidates:
        return
    with st.expander("Give or change a tolerance", expanded=True):
        addresses = list(candidates)
        if st.session_state.get(key("address")) not in addresses:
            st.session_state[key("address")] = addresses[0]
        held = {t.address: t for t in worksheet.tolerances}
        st.selectbox("Input", addresses, key=key("address"),
                     format_func=lambda a: _label(a) + (" (has a tolerance)" if a in held else ""))
        chosen = candidates[st.session_state[key("address")]]
        existing = held.get(chosen.address)
        marker = (chosen.address, existing, page_state().load)
        if st.session_state.get(key("filled")) != marker or key("size") not in st.session_state:
            st.session_state[key("size")] = _editable_text(existing)
            st.session_state[key("distribution")] = existing.distribution if existing else "rectangular"
            st.session_state[key("source")] = existing.source if existing else ""
            st.session_state[key("filled")] = marker
        value = chosen.value
        typed = f"{value.value:g} {display_unit(value.unit)}" if isinstance(value, Quantity) else f"{value:g}"
        st.caption(plain(f"As typed: {typed}"))
        example = "0.02 or 2 %" if _is_fraction(chosen) else \
            "0.5 K" if chosen.kinds == ("temperature",) else "a value with its unit, or 1.5 %"
        st.text_input("± tolerance", key=key("size"), placeholder=example,
                      help="A half-width: a value in a unit of the input's kind (a temperature difference, K or "
                           "°F, for a temperature), or a percent of the value (not for a temperature or a gauge "
                           "pressure: a percent of them depends on the unit typed); a plain number for a fraction.")
        st.selectbox("What the ± means", list(DISTRIBUTIONS), key=key("distribution"),
                     format_func=DISTRIBUTIONS.get)
        st.text_input("Source", key=key("source"), max_chars=300,
                      placeholder="e.g. flow meter datasheet, calibration certificate 2024-117")
        st.button("Set the tolerance", key=key("set"), on_click=_set, args=(set_worksheet,), type="primary")


# --------------------------------------------------------------------------- editor callbacks
def _refuse(message: str) -> None:
    st.session_state[key("refusal")] = message
    st.session_state.pop(key("notice"), None)


def _write(set_worksheet, worksheet: Worksheet, notice: str) -> bool:
    st.session_state.pop(key("refusal"), None)
    st.session_state[key("notice")] = notice
    set_worksheet(worksheet)
    return True


def _set(set_worksheet) -> None:
    worksheet = page_state().worksheet
    chosen = {i.address: i for i in _candidates(worksheet)}.get(st.session_state.get(key("address")))
    if chosen is None:
        return
    try:
        tolerance = parse_tolerance(chosen, st.session_state.get(key("size")),
                                    st.session_state.get(key("distribution")), st.session_state.get(key("source")))
        checked_tolerance(worksheet, tolerance)
        others = [t for t in worksheet.tolerances if t.address != tolerance.address]
        at = next((n for n, t in enumerate(worksheet.tolerances) if t.address == tolerance.address), len(others))
        others.insert(at, tolerance)
        changed = with_tolerances(worksheet, others)
    except HeatBalanceError as exc:
        _refuse(_located(exc))
        return
    _write(set_worksheet, changed, f"Tolerance set: {_label(tolerance.address)} {tolerance_size_text(tolerance)} "
                                   f"({tolerance.distribution}).")


def _suggest(set_worksheet) -> None:
    worksheet = page_state().worksheet
    try:
        changed, added = with_suggested(worksheet)
    except HeatBalanceError as exc:
        _refuse(_located(exc))
        return
    if not added:
        _refuse("tolerances: every input with a suggested tolerance has one already (nothing added)")
        return
    _write(set_worksheet, changed, f"Added {added} suggested tolerance(s) from common practice (rules of thumb, "
                                   "not your instruments' data; each says so in its source): edit or remove them.")


def _remove(j: int, set_worksheet) -> None:
    worksheet = page_state().worksheet
    if j >= len(worksheet.tolerances):
        return
    gone = worksheet.tolerances[j]
    try:
        changed = with_tolerances(worksheet, [t for n, t in enumerate(worksheet.tolerances) if n != j])
    except HeatBalanceError as exc:
        _refuse(_located(exc))
        return
    _write(set_worksheet, changed, f"Tolerance removed: {_label(gone.address)}.")


def _remove_all(set_worksheet) -> None:
    worksheet = page_state().worksheet
    try:
        changed = with_tolerances(worksheet, [])
    except HeatBalanceError as exc:
        _refuse(_located(exc))
        return
    _write(set_worksheet, changed, "Every tolerance removed: the answer is shown without its uncertainty.")
