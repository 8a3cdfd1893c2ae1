"""The page's what-if panel: a sweep of one or two inputs, and the worksheet's named cases side by side.

Hooked into ``app.py`` as one of its extra panels (:func:`panel`), called as ``draw(worksheet, result, system)``.

*Sweep.* One or two inputs are picked from the worksheet's addressable inputs (in words; the unknown is
left out), each with a range (from, to, number of points) in a unit the user types (the unit typed on the
sheet by default). The engine (:func:`heatbalance.analyses.sweep.sweep`) solves the unknown at every point
with a progress bar; the presentation (:mod:`heatbalance.present.whatif`) gives the chart (lines for one
input, a heat map for two; refused points are gaps), the list of refused points with their reasons, the
table and its CSV. A refused request (a unit of another kind, too many points) is shown with its address.
The ranges and chosen outputs are transient widget state (keys ``whatif_…``); the last sweep is kept in
the session with the worksheet it was run on, and hidden once that worksheet changes.

*Cases.* The worksheet's cases (:func:`heatbalance.analyses.cases.run_cases`) in one table with the
differences against a base case picked on the page; refused cases are listed with their reasons. A small
editor adds, renames and deletes a case and sets or removes its overrides (an input picked from the list,
a value typed with its unit); each change is written into the worksheet through the setter the page
passes, so it is saved and shared with the sheet.

Every piece of user text (names in labels, messages quoting them) is shown as plain text.
"""
from __future__ import annotations

import math
import time

import pandas as pd
import streamlit as st

from heatbalance import address
from heatbalance.analyses.cases import AS_TYPED, run_cases
from heatbalance.analyses.sweep import MAX_POINTS, REASON, Axis, answer_field, axis_values, output_names, sweep
from heatbalance.errors import HeatBalanceError, InputError
from heatbalance.present.text import display_unit, error_text
from heatbalance.present.whatif import (case_table, output_label, output_unit, own_warnings, refusal_rows,
                                        shared_warnings, sweep_csv_bytes, sweep_figure, sweep_table)
from heatbalance.problem import build_problem
from heatbalance.results import Result
from heatbalance.units import from_si, kind_of, to_si
from heatbalance.worksheet import Case, Override, Quantity, Worksheet, parse_worksheet

from .common import count_refusal, page_state, plain
from .grids import format_quantity, parse_quantity

__all__ = ["panel", "render_whatif_panel", "key", "NO_SECOND_INPUT", "NEW_CASE", "LISTED_REFUSALS",
           "sweep_axes", "override_value"]

PREFIX = "whatif_"
NO_SECOND_INPUT = ""  # the second input's choice "none": a sweep of one input
NEW_CASE = -1  # the case picker's choice "a new case"
LISTED_REFUSALS = 50  # refused points listed on the page (all of them are in the table and its CSV)
DEFAULT_POINTS = 11
_NUMBER = "%.6g"


def key(name: str) -> str:
    """The session key of one of the panel's widgets or records: ``whatif_<name>``."""
    return PREFIX + name


def panel(set_worksheet):
    """The panel as the page hooks it in: case edits are written into the worksheet through ``set_worksheet``."""
    def draw(worksheet: Worksheet, result: Result | None, system: str) -> None:
        render_whatif_panel(worksheet, result, system, set_worksheet)
    return draw


def render_whatif_panel(worksheet: Worksheet, result: Result | None, system: str, set_worksheet) -> None:
    """Draw the sweep and the case table (nothing on a sheet without lines or without one unknown)."""
    if not (worksheet.streams or worksheet.vessels) or len(worksheet.unknowns) != 1:
        return
    with st.container(key="whatif_panel"):
        st.header("What if")
        left, right = st.columns(2, gap="large")
        with left, st.container(key="whatif_sweep_box"):
            _sweep_section(worksheet, system)
        with right, st.container(key="whatif_cases_box"):
            _cases_section(worksheet, system, set_worksheet)


# =========================================================================== shared
def _candidates(worksheet: Worksheet) -> list[address.Input]:
    """The inputs a sweep or a case may set: every addressable input but the unknown."""
    return [i for i in address.inputs(worksheet) if not i.is_unknown]


def _is_fraction(i: address.Input) -> bool:
    return i.kinds == (address.FRACTION,)


def _refusal(exc: Exception, system: str) -> str:
    """A refusal in words with its address: ``streams[Steam].flow: …``."""
    if isinstance(exc, HeatBalanceError):
        text = error_text(exc, system)
        return f"{exc.where}: {text}" if exc.where else text
    return f"the engine failed unexpectedly ({exc.__class__.__name__}); your inputs are kept"


def _sheet_identity(worksheet: Worksheet) -> str:
    """What a sweep depends on: the worksheet without its cases."""
    return worksheet.model_copy(update={"cases": []}).model_dump_json()


def _valid_choice(name: str, options: list, default) -> None:
    """Put a widget's kept choice back to ``default`` when it is no longer one of ``options`` (another sheet)."""
    if st.session_state.get(key(name)) not in options:
        st.session_state[key(name)] = default


# =========================================================================== sweep
def _default_range(i: address.Input) -> tuple[float, float]:
    """A first range around the typed value: ± 20 degrees for a temperature, half to one and a half else."""
    value = i.value.value if isinstance(i.value, Quantity) else float(i.value if i.value is not None else 0.0)
    if _is_fraction(i):
        low, high = (value * 0.5, min(1.0, value * 1.5)) if value > 0 else (0.0, 1.0)
        return (round(low, 6), round(high, 6)) if high > low else (0.0, 1.0)
    if "temperature" in i.kinds:
        return value - 20.0, value + 20.0
    if value == 0:
        return 0.0, 1.0
    return value * 0.5, value * 1.5


def _shown_unit(i: address.Input) -> str:
    if _is_fraction(i) or i.unit is None:
        return ""
    try:  # the screen form (°C) when it reads back as the same unit
        return display_unit(i.unit) if parse_quantity(f"1 {display_unit(i.unit)}", i.kinds, i.address).unit \
            == i.unit else i.unit
    except HeatBalanceError:
        return i.unit


def _fill_range(n: int, i: address.Input) -> None:
    """Set an axis's range widgets from the input when another input (or another sheet) is picked."""
    marker = (i.address, page_state().load)
    names = [f"from_{n}", f"to_{n}", f"count_{n}", f"unit_{n}"]
    if st.session_state.get(key(f"filled_{n}")) == marker and all(key(x) in st.session_state for x in names):
        return
    low, high = _default_range(i)
    st.session_state[key(f"from_{n}")] = float(low)
    st.session_state[key(f"to_{n}")] = float(high)
    st.session_state[key(f"count_{n}")] = float(DEFAULT_POINTS)
    st.session_state[key(f"unit_{n}")] = st.session_state[key(f"unit_was_{n}")] = _shown_unit(i)
    st.session_state[key(f"range_was_{n}")] = (float(low), float(high))
    st.session_state[key(f"filled_{n}")] = marker


def _stored_unit(text: str, i: address.Input) -> str:
    """A unit as typed in the panel (``°C``) as the worksheet stores it (``degC``); raises when it does not read."""
    return parse_quantity(f"1 {text.strip()}", i.kinds, i.address).unit


def _follow_unit(n: int, i: address.Input) -> None:
    """A new unit converts the range the panel filled in (35 to 75 °C becomes 95 to 167 °F) rather than rereading it
    in that unit; numbers the user typed are theirs and stay. A unit that does not read changes nothing here (the
    sweep refuses it at the input)."""
    state = st.session_state
    was, now = state.get(key(f"unit_was_{n}")) or "", state.get(key(f"unit_{n}")) or ""
    ends = (state.get(key(f"from_{n}")), state.get(key(f"to_{n}")))
    try:
        old, new = _stored_unit(was, i), _stored_unit(now, i)
        kind = kind_of(new, i.kinds)
    except HeatBalanceError:
        return
    state[key(f"unit_was_{n}")] = now
    if ends != state.get(key(f"range_was_{n}")) or None in ends:
        return
    converted = tuple(from_si(to_si(value, old, kind), new, kind) for value in ends)
    state[key(f"from_{n}")], state[key(f"to_{n}")] = converted
    state[key(f"range_was_{n}")] = converted


def _range_widgets(n: int, i: address.Input, system: str) -> bool:
    """The axis's range; False (its refusal shown below it) when its number of points cannot be used."""
    _fill_range(n, i)
    c1, c2, c3, c4 = st.columns([3, 3, 2, 2])
    c1.number_input("From", key=key(f"from_{n}"), format=_NUMBER, step=None)
    c2.number_input("To", key=key(f"to_{n}"), format=_NUMBER, step=None)
    # a float field without bounds: the browser would keep the old count of 0 (hover tip only) and truncate 2.5
    # to 2; count_refusal says so here instead
    c3.number_input("Points", key=key(f"count_{n}"), step=1.0, format="%.10g")
    if _is_fraction(i):
        c4.text_input("Unit", key=key(f"unit_{n}"), disabled=True, placeholder="0 to 1",
                      help="A plain number between 0 and 1: no unit.")
    else:
        c4.text_input("Unit", key=key(f"unit_{n}"), on_change=_follow_unit, args=(n, i),
                      help="Any unit of this input's kind (the unit typed on the sheet to start with); From and "
                           "To are converted to it.")
    refusal = count_refusal(st.session_state.get(key(f"count_{n}")), 1, MAX_POINTS, "points", i.address)
    if refusal is not None:
        st.error(plain(_refusal(refusal, system)), icon=":material/error:")
    return refusal is None


def sweep_axes(inputs: dict[str, address.Input], chosen: list[str], ranges: list[tuple]) -> list[Axis]:
    """The sweep's axes from the chosen inputs and their ranges ``(from, to, points, unit text)``.

    A unit typed in its screen form (``°C``) is read as the unit stored; a unit that does not read is
    passed on as typed, for the engine to refuse at the input's address.
    """
    axes = []
    for addr, (start, stop, count, unit) in zip(chosen, ranges):
        i = inputs[addr]
        unit = (unit or "").strip()
        if not _is_fraction(i) and unit:
            try:
                unit = _stored_unit(unit, i)
            except HeatBalanceError:
                pass
        values = axis_values(float(start), float(stop), count=int(count))
        axes.append(Axis(addr, values, "" if _is_fraction(i) else unit))
    return axes


def _output_choices(worksheet: Worksheet, system: str) -> tuple[dict[str, str], dict[str, str]]:
    """Every output a sweep can collect on this sheet -> its kind, and -> its words (with the unit)."""
    kinds = output_names(build_problem(worksheet.model_copy(update={"cases": []})))
    labelled = pd.DataFrame()
    labelled.attrs["answer"] = answer_field(worksheet)
    words = {}
    for name, kind in kinds.items():
        unit = output_unit(kind, system, name, labelled)
        words[name] = output_label(name, labelled) + (f" [{display_unit(unit)}]" if unit else "")
    return kinds, words


def _sweep_section(worksheet: Worksheet, system: str) -> None:
    st.subheader("Sweep")
    inputs = {i.address: i for i in _candidates(worksheet)}
    if not inputs:
        st.info("This worksheet has no input to vary besides the unknown.")
        return
    if page_state().unknown_gone is not None:  # said in plain words beside the answer
        st.info("A sweep needs an unknown: pick what to solve for beside the answer.")
        return
    try:
        kinds, words = _output_choices(worksheet, system)
    except HeatBalanceError as exc:
        st.error(f"A sweep needs a worksheet that reads: {plain(_refusal(exc, system))}", icon=":material/error:")
        return
    addresses = list(inputs)
    _valid_choice("axis_0", addresses, addresses[0])
    st.selectbox("Vary", addresses, key=key("axis_0"), format_func=address.label,
                 help="An input of the worksheet (the unknown is solved at every point).")
    chosen = [st.session_state[key("axis_0")]]
    counted = _range_widgets(0, inputs[chosen[0]], system)
    seconds = [NO_SECOND_INPUT] + [a for a in addresses if a != chosen[0]]
    _valid_choice("axis_1", seconds, NO_SECOND_INPUT)
    st.selectbox("And vary", seconds, key=key("axis_1"),
                 format_func=lambda a: "nothing else (a line chart)" if a == NO_SECOND_INPUT else address.label(a),
                 help="A second input makes a grid of both ranges, drawn as a heat map.")
    if st.session_state[key("axis_1")] != NO_SECOND_INPUT:
        chosen.append(st.session_state[key("axis_1")])
        counted = _range_widgets(1, inputs[chosen[1]], system) and counted
    outputs = list(kinds)
    kept = [o for o in st.session_state.get(key("outputs")) or [] if o in outputs]
    st.session_state[key("outputs")] = kept or ["answer"]
    st.multiselect("Show", outputs, key=key("outputs"), format_func=words.get,
                   help="What is collected at every point (the answer by default).")
    ranges = [tuple(st.session_state[key(f"{x}_{n}")] for x in ("from", "to", "count", "unit"))
              for n in range(len(chosen))]
    problems = bool(page_state().unread())
    label = f"Run the sweep ({math.prod(int(r[2]) for r in ranges):,} points)" if counted else \
        "Run the sweep (give the points first)"
    run = st.button(label, key=key("run"), type="primary",
                    disabled=problems or not counted or not st.session_state[key("outputs")])
    if problems:
        st.session_state.pop(key("refusal"), None)  # a refusal of an earlier run, of a worksheet no longer shown
        st.caption("Fix the refused values first (the marked cells, the batch duration): the sweep runs on the "
                   "worksheet as shown.")
    if run and counted:  # a refused number of points never reaches the sweep
        _run_sweep(worksheet, inputs, chosen, ranges, list(st.session_state[key("outputs")]), system)
    if key("refusal") in st.session_state:
        st.error(f"This sweep cannot be run: {plain(st.session_state[key('refusal')])}", icon=":material/error:")
        return
    _draw_sweep(worksheet, system)


def _run_sweep(worksheet, inputs, chosen, ranges, outputs, system) -> None:
    """Run the sweep with a progress bar; keep its frame (or its refusal) in the session."""
    st.session_state.pop(key("refusal"), None)
    st.session_state.pop(key("result"), None)
    bar = st.progress(0.0, text="Solving…")

    def progress(done: int, total: int) -> None:
        bar.progress(done / total, text=f"Solved {done:,} of {total:,} points")

    started = time.perf_counter()
    try:
        frame = sweep(worksheet, sweep_axes(inputs, chosen, ranges), outputs, progress)
    except Exception as exc:  # noqa: BLE001 - a refusal (or a bug) is shown in words, never a traceback
        st.session_state[key("refusal")] = _refusal(exc, system)
        return
    finally:
        bar.empty()
    st.session_state[key("result")] = {"frame": frame, "sheet": _sheet_identity(worksheet),
                                       "seconds": time.perf_counter() - started}


def _chart_frame(frame: pd.DataFrame, chosen: str, system: str) -> pd.DataFrame:
    """For one input: the outputs shown in the same unit as the chosen one (one y axis); else the frame."""
    if len(frame.attrs["units"]) != 1:
        return frame
    kinds = frame.attrs["kinds"]
    unit = output_unit(kinds[chosen], system, chosen, frame)
    same = {n: k for n, k in kinds.items() if output_unit(k, system, n, frame) == unit}
    shown = {chosen: kinds[chosen], **{n: k for n, k in same.items() if n != chosen}}
    part = frame.copy()
    part.attrs = {**frame.attrs, "kinds": shown}
    return part


def _drawn(kept: dict, system: str, chosen: str):
    """The figure, table and CSV of a kept sweep in a unit set, made once (the page reruns on every click)."""
    drawn = kept.setdefault("drawn", {})
    if (system, chosen) not in drawn:
        frame = kept["frame"]
        figure = sweep_figure(_chart_frame(frame, chosen, system), system, chosen)
        drawn.clear()  # one view at a time is enough
        shared = shared_warnings(frame, system)  # said once above the table, not on each of its rows
        drawn[(system, chosen)] = (figure, sweep_table(frame, system, shared), sweep_csv_bytes(frame, system),
                                   shared)
    return drawn[(system, chosen)]


def _draw_sweep(worksheet: Worksheet, system: str) -> None:
    kept = st.session_state.get(key("result"))
    if kept is None:
        return
    if kept["sheet"] != _sheet_identity(worksheet):
        st.info("The worksheet changed since the last sweep: run it again to see the new numbers.")
        return
    frame = kept["frame"]
    outputs = list(frame.attrs["kinds"])
    refused = int(frame[REASON].notna().sum())
    own = own_warnings(frame, system)
    warned = sum(1 for w in own if w)
    st.caption(f"{len(frame):,} points, {refused:,} refused, {warned:,} with a warning of their own; solved in "
               f"{kept['seconds']:.2f} s.",
               help="The axes are in the units typed above; the outputs in the view's units "
                    "(the answer in the unit typed for it).")
    _valid_choice("chart_output", outputs, outputs[0])
    if len(outputs) > 1:
        st.selectbox("Chart", outputs, key=key("chart_output"), format_func=lambda n: output_label(n, frame))
    chosen = st.session_state[key("chart_output")]
    figure, table, csv, shared = _drawn(kept, system, chosen)
    with st.container(key="whatif_chart"):
        st.plotly_chart(figure, key=key("figure"), width="stretch")
    if refused:
        rows = refusal_rows(frame, system)
        more = f" (the first {LISTED_REFUSALS} below; every one is in the table)" if refused > LISTED_REFUSALS else ""
        with st.container(key="whatif_refused"):
            st.warning(f"{refused:,} of {len(frame):,} points were refused: gaps in the chart{more}.",
                       icon=":material/block:")
            st.markdown("\n".join(f"- {plain(r)}" for r in rows[:LISTED_REFUSALS]))
    if shared:
        st.warning("At every point: " + " ".join(plain(w) for w in shared), icon=":material/warning:")
    if warned:  # a point unlike the others (a charge counted as vapour, data extrapolated): said, not only ringed
        distinct = list(dict.fromkeys(t for texts in own for t in texts))
        more = f" (the first {LISTED_REFUSALS}; each point's are in the table)" if len(distinct) > LISTED_REFUSALS \
            else ""
        with st.container(key="whatif_warned"):
            st.warning(f"{warned:,} of {len(frame):,} points have a warning of their own, ringed in the chart{more}:",
                       icon=":material/warning:")
            st.markdown("\n".join(f"- {plain(t)}" for t in distinct[:LISTED_REFUSALS]))
    numbers = {c: st.column_config.NumberColumn(format=_NUMBER) for c in table.columns
               if pd.api.types.is_float_dtype(table[c])}
    st.dataframe(table, key=key("table"), hide_index=True, column_config=numbers)
    st.download_button("Download the table (CSV)", csv, file_name="what-if-sweep.csv",
                       mime="text/csv", key=key("csv"), on_click="ignore", icon=":material/download:")


# =========================================================================== cases
def _case_frame(worksheet: Worksheet, base: str) -> pd.DataFrame:
    """The case table's frame, kept for this worksheet and base (the page reruns on every click)."""
    identity = (worksheet.model_dump_json(), base)
    kept = st.session_state.get(key("cases_run"))
    if kept is not None and kept[0] == identity:
        return kept[1]
    frame = run_cases(worksheet, base)
    st.session_state[key("cases_run")] = (identity, frame)
    return frame


def _cases_section(worksheet: Worksheet, system: str, set_worksheet) -> None:
    st.subheader("Cases")
    names = [AS_TYPED] + [c.name for c in worksheet.cases]
    if not worksheet.cases:
        st.caption("No cases yet. A case is the worksheet with a few inputs changed (\"summer\", \"turndown "
                   "60 %\"); add one below and it is saved and shared with the worksheet.")
    else:
        _valid_choice("base", names, AS_TYPED)
        st.selectbox("Differences against", names, key=key("base"),
                     help="The case the difference columns subtract (the worksheet as typed by default).")
        try:
            frame = _case_frame(worksheet, st.session_state[key("base")])
        except HeatBalanceError as exc:
            st.error(f"The cases cannot be solved: {plain(_refusal(exc, system))}", icon=":material/error:")
        else:
            table = case_table(frame, system)
            numbers = {c: st.column_config.NumberColumn(format=_NUMBER) for c in table.columns}
            st.dataframe(table, key=key("case_table"), column_config=numbers)
            refusals = frame.attrs.get("refusals") or {}
            if refusals:
                with st.container(key="whatif_case_refusals"):
                    st.warning(f"{len(refusals)} case(s) cannot be solved (empty columns):", icon=":material/block:")
                    st.markdown("\n".join(f"- {plain(name)}: {plain(_refusal(exc, system))}"
                                          for name, exc in refusals.items()))
    with st.expander("Add or edit a case", expanded=True):
        _case_editor(worksheet, set_worksheet)


def override_value(i: address.Input, text: str):
    """An override's value from its text: a plain number for a fraction, else a number with its unit."""
    text = (text or "").strip()
    if _is_fraction(i):
        try:
            value = float(text.replace("−", "-"))
        except ValueError:
            raise InputError(f"'{text}' is not a number between 0 and 1", i.address) from None
        if not (math.isfinite(value) and 0.0 <= value <= 1.0):
            raise InputError(f"'{text}' is not a number between 0 and 1", i.address)
        return value
    return parse_quantity(text, i.kinds, i.address)


def _value_text(value) -> str:
    if isinstance(value, Quantity):
        return format_quantity(value)
    return "" if value is None else f"{value:g}"


def _case_editor(worksheet: Worksheet, set_worksheet) -> None:
    cases = worksheet.cases
    options = list(range(len(cases))) + [NEW_CASE]
    _valid_choice("case", options, NEW_CASE if not cases else 0)
    st.selectbox("Case", options, key=key("case"),
                 format_func=lambda n: "a new case…" if n == NEW_CASE else cases[n].name)
    index = st.session_state[key("case")]
    marker = (index, None if index == NEW_CASE else cases[index].name, page_state().load)
    if st.session_state.get(key("case_filled")) != marker or key("case_name") not in st.session_state:
        st.session_state[key("case_name")] = "" if index == NEW_CASE else cases[index].name
        st.session_state[key("case_filled")] = marker
    st.text_input("Name", key=key("case_name"), max_chars=80, placeholder="e.g. summer")
    c1, c2 = st.columns(2)
    if index == NEW_CASE:
        c1.button("Add the case", key=key("case_add"), on_click=_add_case, args=(set_worksheet,))
    else:
        c1.button("Rename", key=key("case_rename"), on_click=_rename_case, args=(index, set_worksheet))
        c2.button("Delete the case", key=key("case_delete"), on_click=_delete_case, args=(index, set_worksheet))
    if key("case_refusal") in st.session_state:
        st.error(plain(st.session_state[key("case_refusal")]), icon=":material/error:")
    if index == NEW_CASE:
        return
    case = cases[index]
    st.markdown("**Overrides** (the inputs this case changes)")
    if not case.overrides:
        st.caption("None yet: this case is the worksheet as typed.")
    for j, override in enumerate(case.overrides):
        o1, o2 = st.columns([5, 1], vertical_alignment="center")
        o1.markdown(f"{plain(address.label(override.address))} = {plain(_value_text(override.value))}")
        o2.button("Remove", key=key(f"override_remove_{j}"), on_click=_remove_override,
                  args=(index, j, set_worksheet))
    inputs = {i.address: i for i in _candidates(worksheet)}
    if not inputs:
        return
    addresses = list(inputs)
    _valid_choice("override_address", addresses, addresses[0])
    o1, o2 = st.columns([3, 2])
    o1.selectbox("Input", addresses, key=key("override_address"), format_func=address.label)
    chosen = inputs[st.session_state[key("override_address")]]
    existing = next((o.value for o in case.overrides if o.address == chosen.address), chosen.value)
    value_marker = (index, chosen.address, page_state().load)
    if st.session_state.get(key("override_filled")) != value_marker or key("override_value") not in st.session_state:
        st.session_state[key("override_value")] = _value_text(existing)
        st.session_state[key("override_filled")] = value_marker
    o2.text_input("Value in this case", key=key("override_value"),
                  help="A number with its unit (e.g. 32 °C, 14 t/h); a plain number from 0 to 1 for a fraction.")
    st.button("Set this input in the case", key=key("override_set"), on_click=_set_override,
              args=(index, set_worksheet))


# --------------------------------------------------------------------------- editor callbacks
def _located(exc: HeatBalanceError, where: str) -> str:
    return f"{exc.where or where}: {exc.message}"


def _refuse(message: str) -> None:
    st.session_state[key("case_refusal")] = message


def _write(set_worksheet, worksheet: Worksheet, cases: list[Case]) -> bool:
    """Write the cases into the worksheet (validated as a whole); False with the refusal kept when refused."""
    data = worksheet.model_dump(mode="json", exclude_none=True)
    data["cases"] = [c.model_dump(mode="json", exclude_none=True) for c in cases]
    try:
        changed = parse_worksheet(data)  # the loader's own checks: too many cases or overrides, bounds
    except HeatBalanceError as exc:
        _refuse(_located(exc, "cases"))
        return False
    st.session_state.pop(key("case_refusal"), None)
    set_worksheet(changed)
    return True


def _new_name(worksheet: Worksheet, keep: int | None = None) -> str | None:
    """The typed case name, checked (not empty, at most 80 characters, not another case's); None when refused."""
    name = (st.session_state.get(key("case_name")) or "").strip()
    others = [c.name for n, c in enumerate(worksheet.cases) if n != keep]
    if not name:
        _refuse("cases: give the case a name (e.g. summer)")
    elif len(name) > 80:
        _refuse(f"cases: a case name has at most 80 characters, not {len(name)}")
    elif name == AS_TYPED:
        _refuse(f"cases: '{AS_TYPED}' is the name of the worksheet without overrides; choose another name")
    elif name in others:
        _refuse(f"cases[{name}]: there is already a case called '{name}'; choose another name")
    else:
        return name
    return None


def _add_case(set_worksheet) -> None:
    worksheet = page_state().worksheet
    name = _new_name(worksheet)
    # not validated here: _write reads the whole worksheet and refuses a bad name at its case's address
    if name is not None and _write(set_worksheet, worksheet, [*worksheet.cases, Case.model_construct(name=name)]):
        st.session_state[key("case")] = len(worksheet.cases)


def _rename_case(index: int, set_worksheet) -> None:
    worksheet = page_state().worksheet
    if index >= len(worksheet.cases):
        return
    name = _new_name(worksheet, keep=index)
    if name is None:
        return
    cases = list(worksheet.cases)
    old = cases[index].name
    cases[index] = cases[index].model_copy(update={"name": name})
    if _write(set_worksheet, worksheet, cases) and st.session_state.get(key("base")) == old:
        st.session_state[key("base")] = name


def _delete_case(index: int, set_worksheet) -> None:
    worksheet = page_state().worksheet
    if index >= len(worksheet.cases):
        return
    cases = [c for n, c in enumerate(worksheet.cases) if n != index]
    if _write(set_worksheet, worksheet, cases):
        st.session_state[key("case")] = 0 if cases else NEW_CASE


def _set_override(index: int, set_worksheet) -> None:
    worksheet = page_state().worksheet
    if index >= len(worksheet.cases):
        return
    inputs = {i.address: i for i in _candidates(worksheet)}
    chosen = inputs.get(st.session_state.get(key("override_address")))
    if chosen is None:
        return
    try:
        value = override_value(chosen, st.session_state.get(key("override_value")))
        address.with_value(worksheet, chosen.address, value)  # the engine's own check of the value
    except HeatBalanceError as exc:
        _refuse(_located(exc, chosen.address))
        return
    case = worksheet.cases[index]
    overrides = [o for o in case.overrides if o.address != chosen.address]
    at = next((n for n, o in enumerate(case.overrides) if o.address == chosen.address), len(overrides))
    overrides.insert(at, Override(address=chosen.address, value=value))
    cases = list(worksheet.cases)
    cases[index] = case.model_copy(update={"overrides": overrides})
    _write(set_worksheet, worksheet, cases)


def _remove_override(index: int, j: int, set_worksheet) -> None:
    worksheet = page_state().worksheet
    if index >= len(worksheet.cases) or j >= len(worksheet.cases[index].overrides):
        return
    cases = list(worksheet.cases)
    case = cases[index]
    cases[index] = case.model_copy(update={"overrides": [o for n, o in enumerate(case.overrides) if n != j]})
    _write(set_worksheet, worksheet, cases)
