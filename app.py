"""The heat-balance worksheet page: a thin shell over the engine.

widgets -> the worksheet model (``st.session_state[WORKSHEET]``) -> solve -> draw.
The tables <-> worksheet conversion lives in ``heatbalance.tables``, the figure in
``heatbalance.figures``; no physics here.

Other panels hook in with one call each in :func:`render_extra_panels`; a panel that opens
another worksheet calls :func:`replace_worksheet`.
"""
from __future__ import annotations

import json
from pathlib import Path

import pandas as pd
import streamlit as st

from heatbalance import HeatBalanceError, Worksheet, load_worksheet, solve, unknown_choices
from heatbalance import tables as tb
from heatbalance.figures import energy_waterfall
from heatbalance.results import SIGN_CONVENTION, Result, contribution_rows, format_heat
from webapp import sharing
from webapp import screening_panel

SAMPLES_DIR = Path(__file__).resolve().parent / "sample_data"
DEFAULT_SAMPLE = "steam_heater_glycol.json"
SAFETY_CAUTION = ("A screening estimate, not a substitute for reaction calorimetry, a process hazard "
                  "analysis or licensed engineering; follow local codes and your site's practice.")
UNIT_SYSTEMS = {"SI (°C, kg, kW)": "SI", "US customary (°F, lb, Btu)": "US"}

# Session-state keys of the model, apart from widget keys.
WORKSHEET = "hb_worksheet"  # the last valid Worksheet: what is solved
ROWS = "hb_rows"  # the tables as the user left them (may hold bad cells)
ROWS_OF = "hb_rows_of"  # JSON of the worksheet the rows were drawn from
PROBLEMS = "hb_problems"  # CellProblems of the rows
BASIS_PROBLEM = "hb_basis_problem"  # message for a bad duration
GENERATION = "hb_generation"  # bumped to redraw the tables from ROWS
LAST_RESULT = "hb_last_result"  # the last Result, to free the old unknown with its answer
PENDING_EDITS = "hb_pending_edits"  # [(table, edits)] applied at the start of a run (tests, other panels)


# --------------------------------------------------------------------------- the model
def sample_files() -> dict[str, Path]:
    """Bundled samples, title -> path."""
    samples = {}
    for path in sorted(SAMPLES_DIR.glob("*.json")):
        try:
            samples[json.loads(path.read_text(encoding="utf-8")).get("title", path.stem)] = path
        except (OSError, ValueError):
            continue
    return samples


def load_sample(path: Path) -> Worksheet:
    return load_worksheet(path.read_bytes())


def initial_worksheet() -> Worksheet:
    """The worksheet the page opens on: the one a share link (?ws= or ?sheet=) names, else the default sample."""
    return sharing.worksheet_from_link() or load_sample(SAMPLES_DIR / DEFAULT_SAMPLE)


def replace_worksheet(worksheet: Worksheet) -> None:
    """Put another worksheet on the page (a loaded sample, a new sheet, a saved revision)."""
    st.session_state[WORKSHEET] = worksheet
    st.session_state[LAST_RESULT] = None


def _model_json(worksheet: Worksheet) -> str:
    return worksheet.model_dump_json()


def sync_tables_with_model() -> None:
    """Redraw the tables and model-bound widgets when the worksheet was replaced (runs before any widget)."""
    state = st.session_state
    if WORKSHEET not in state:
        replace_worksheet(initial_worksheet())
    worksheet = state[WORKSHEET]
    if state.get(ROWS_OF) == _model_json(worksheet):
        return
    state[ROWS] = tb.worksheet_to_tables(worksheet)
    state[ROWS_OF] = _model_json(worksheet)
    state[PROBLEMS] = []
    state[BASIS_PROBLEM] = ""
    state[GENERATION] = state.get(GENERATION, 0) + 1
    state["title_input"] = worksheet.title
    state["basis_kind"] = worksheet.basis.kind
    state["basis_duration"] = tb.format_quantity(worksheet.basis.duration)
    state["sample_picker"] = None  # a menu: any pick loads a fresh copy, the same sample again too
    state["show_own_tables"] = bool(worksheet.materials or worksheet.common_temperatures)


def apply_pending_edits() -> None:
    """Edits queued in the session (the same path as a table edit; AppTest cannot type into a table)."""
    for table, edits in st.session_state.pop(PENDING_EDITS, None) or []:
        apply_table_edit(table, edits)


def editor_key(table: str) -> str:
    return f"editor_{table}_{st.session_state[GENERATION]}"


# --------------------------------------------------------------------------- callbacks (edits -> model)
def on_table_edit(table: str) -> None:
    apply_table_edit(table, st.session_state.get(editor_key(table)) or {})


def apply_table_edit(table: str, edits: dict) -> None:
    """Apply a table's edits (as the editor reports them) to the rows, then to the model if every cell reads."""
    state = st.session_state
    before = state[ROWS][table]
    rows = {**state[ROWS], table: tb.apply_edits(before, edits, tb.COLUMNS[table])}
    base, rows = tb.follow_renames(state[WORKSHEET], rows, table, tb.renamed(before, edits))
    worksheet, problems = tb.tables_to_worksheet(rows, base)
    state[ROWS], state[PROBLEMS] = rows, problems
    state[GENERATION] += 1
    if worksheet is not None:
        state[WORKSHEET] = worksheet


def on_sample_pick() -> None:
    path = sample_files().get(st.session_state.get("sample_picker"))
    if path is not None:
        replace_worksheet(load_sample(path))
        sharing.forget_revision()


def on_new_worksheet() -> None:
    replace_worksheet(tb.empty_worksheet())
    sharing.forget_revision()


def commit_model(base: Worksheet) -> None:
    """Read the tables, as the user left them, onto ``base`` (a new title or basis); bad cells stay as typed."""
    state = st.session_state
    worksheet, problems = tb.tables_to_worksheet(state[ROWS], base)
    state[PROBLEMS] = problems
    state[WORKSHEET] = worksheet if worksheet is not None else base
    if worksheet is None:
        state[ROWS_OF] = _model_json(base)  # keep the rows: they hold what the user typed


def on_title_change() -> None:
    state = st.session_state
    title = (state.get("title_input") or "").strip() or "Untitled worksheet"
    commit_model(state[WORKSHEET].model_copy(update={"title": title[:200]}))


def on_basis_change() -> None:
    state = st.session_state
    text = (state.get("basis_duration") or "").strip()
    try:
        duration = tb.parse_quantity(text, ("duration",), "duration") if text else None
    except HeatBalanceError as exc:
        state[BASIS_PROBLEM] = exc.message
        return
    state[BASIS_PROBLEM] = ""
    basis = state[WORKSHEET].basis.model_copy(update={"kind": state["basis_kind"], "duration": duration})
    commit_model(state[WORKSHEET].model_copy(update={"basis": basis}))


def on_unknown_pick(choices: dict) -> None:
    state = st.session_state
    new = choices.get(state.get("unknown_picker"))
    if new is None:
        return
    result = state.get(LAST_RESULT)
    state[WORKSHEET] = tb.set_unknown(state[WORKSHEET], new, result.answer if result else None)


# --------------------------------------------------------------------------- solving
def solve_worksheet(worksheet: Worksheet, system: str) -> tuple[Result | None, HeatBalanceError | None]:
    """The engine's result, or its refusal (never a traceback)."""
    try:
        return solve(worksheet, system), None
    except HeatBalanceError as exc:
        return None, exc


def solve_current(worksheet: Worksheet, system: str) -> tuple[Result | None, HeatBalanceError | None]:
    """Solve unless a table cell is bad (then the answer would not match the page)."""
    problems = st.session_state.get(PROBLEMS) or []
    if not problems and not worksheet.streams and not worksheet.vessels:
        return None, None  # a new sheet: nothing to solve yet, and nothing wrong
    if problems:
        first = problems[0]
        more = f" (and {len(problems) - 1} more)" if len(problems) > 1 else ""
        return None, HeatBalanceError(first.message + more, first.place)
    try:
        return solve_worksheet(worksheet, system)
    except Exception as exc:  # noqa: BLE001 - an engine bug must not reach the page as a traceback
        return None, HeatBalanceError(f"the engine failed unexpectedly ({exc.__class__.__name__}); your inputs "
                                      "are kept. Please report this worksheet.")


def display_system() -> str:
    return UNIT_SYSTEMS.get(st.session_state.get("unit_system"), "SI")


# --------------------------------------------------------------------------- drawing: sidebar
def render_sidebar() -> None:
    with st.sidebar:
        st.header("Worksheet")
        samples = sample_files()
        st.selectbox("Open a sample worksheet", list(samples), index=None, key="sample_picker",
                     placeholder="choose a sample…", on_change=on_sample_pick)
        st.button("New, empty worksheet", key="new_worksheet", on_click=on_new_worksheet,
                  width="stretch")
        st.divider()
        st.radio("Show results in", list(UNIT_SYSTEMS), key="unit_system")
        st.divider()
        st.markdown(
            "**How it works**  \n"
            "1. List the streams (flows) or vessels (batch charges), each from its initial to its final state.  \n"
            "2. Add duties, losses, reaction heat and the equipment that warms with the contents.  \n"
            "3. Pick the one quantity to solve for: its cell shows **?**.\n\n"
            "Type every value with its unit: `12 t/h`, `4 barg`, `55 °C`, `-110 kW`. A state can also be "
            "`saturated vapour`, `saturated liquid`, `vapour fraction 0.3` or `solid fraction 0.5`.")


# --------------------------------------------------------------------------- drawing: answer
def render_header(worksheet: Worksheet) -> None:
    st.title(worksheet.title)
    if worksheet.notes:
        st.caption(worksheet.notes)


def render_unknown_picker(worksheet: Worksheet) -> None:
    choices = {label: unknown for label, unknown in unknown_choices(worksheet)}
    current = tb.unknown_label(worksheet, list(choices.items()))
    if st.session_state.get("unknown_picker") != current:
        st.session_state["unknown_picker"] = current
    blocked = bool(st.session_state.get(PROBLEMS))  # fix the marked cell first: the '?' cells move
    st.selectbox("Solve for", list(choices), index=None, key="unknown_picker", on_change=on_unknown_pick,
                 args=(choices,), disabled=blocked,
                 placeholder="pick the one unknown quantity…",
                 help="The one quantity the balance is solved for. Picking another one gives the old "
                      "unknown its last answer as a value.")


def render_answer(worksheet: Worksheet, result: Result | None, error: HeatBalanceError | None) -> None:
    with st.container(key="answer", border=True):
        left, right = st.columns([2, 3], vertical_alignment="center")
        with left:
            render_unknown_picker(worksheet)
        with right:
            if result is not None:
                st.metric(f"Answer: {result.answer.label}", result.answer.text)
            else:
                render_not_solved(worksheet, error)
    if result is not None and result.warnings:
        listed = "\n".join(f"- {warning}" for warning in result.warnings)
        st.warning(f"**Read before using this answer:**\n{listed}", icon=":material/warning:")
    render_safety_caution(worksheet)


def render_safety_caution(worksheet: Worksheet) -> None:
    """Where the results bear on safety: batch end temperatures and reaction heat."""
    if worksheet.reactions:
        bearing = "The reaction heat and the end temperature bear on safety."
    elif worksheet.vessels:
        bearing = "A batch end temperature can bear on safety."
    else:
        return
    st.warning(f"**Safety:** {bearing} {SAFETY_CAUTION}", icon=":material/health_and_safety:")


def render_not_solved(worksheet: Worksheet, error: HeatBalanceError | None) -> None:
    if error is None:
        st.info("Nothing to solve yet: add a stream or a vessel below, then pick what to solve for.")
        return
    where = f"{error.where}: " if error.where else ""
    st.error(f"**Not solved.** {where}{error.message}", icon=":material/error:")
    st.caption("The place is marked in the tables below; everything else is kept as you left it.")


# --------------------------------------------------------------------------- drawing: inputs
def render_basis() -> None:
    st.subheader("Basis")
    c1, c2, c3 = st.columns([3, 2, 2])
    c1.text_input("Worksheet title", key="title_input", on_change=on_title_change)
    c2.selectbox("Basis", ["continuous", "batch"], key="basis_kind", on_change=on_basis_change,
                 help="continuous: flows (kg/h) and powers (kW). batch: masses (kg) and energies (kJ).")
    c3.text_input("Batch duration", key="basis_duration", on_change=on_basis_change,
                  placeholder="e.g. 40 min",
                  help="batch only: a duty given as a power (kW) applies over this time")
    if st.session_state.get(BASIS_PROBLEM):
        st.error(f"Batch duration: {st.session_state[BASIS_PROBLEM]}", icon=":material/error:")


def _column_config(worksheet: Worksheet) -> dict:
    materials = tb.material_names(worksheet)
    vessels = [v.name for v in worksheet.vessels] or [""]
    text = st.column_config.TextColumn
    state_help = ("a temperature (55 °C, 131 °F, 328 K), or 'saturated vapour', 'saturated liquid', "
                  "'vapour fraction 0.3', 'solid fraction 0.5', 'shared: <name>'; ? = the unknown")
    pressure_help = "barg, psig, kPag = gauge (above 1.01325 bar); bar, bara, psia, kPa, MPa = absolute"
    return {
        "check": text("check", width="small", disabled=True,
                      help="⚠ marks a cell that cannot be used; the message is above the table"),
        "name": text("name", help="a unique name for the line or term"),
        "material": st.column_config.SelectboxColumn("material", options=materials,
                                                     help="from the property library, or defined below"),
        "mass fraction": st.column_config.NumberColumn("mass fraction", min_value=0.0, max_value=1.0,
                                                       format="%.3f", help="aqueous solutions only"),
        "flow": text("flow", help="mass flow with its unit: 12 t/h, 500 kg/h, 20000 lb/h; ? = the unknown"),
        "mass": text("mass", help="mass with its unit: 7.5 t, 400 kg, 2000 lb; ? = the unknown"),
        "pressure": text("pressure", help=pressure_help),
        "pressure is": text("gauge/abs.", disabled=True, help="read from the pressure unit"),
        "inlet": text("inlet state", help=state_help), "outlet": text("outlet state", help=state_help),
        "initial": text("initial state", help=state_help), "final": text("final state", help=state_help),
        "inlet pressure": text("inlet pressure", help="only if not the line pressure. " + pressure_help),
        "outlet pressure": text("outlet pressure", help="only if not the line pressure (a let-down, a flash). "
                                + pressure_help),
        "vessel": st.column_config.SelectboxColumn("vessel", options=vessels),
        "heat": text("heat", help="a power (kW, MW, Btu/h) or, in batch, an energy (kJ, MJ, Btu); "
                                  "duties: heater +, cooler −; losses: positive heat leaving; ? = the unknown"),
        "heat of reaction": text("ΔH reaction", help="per mole of key reactant, negative when exothermic: -92 kJ/mol"),
        "amount": text("amount fed", help="moles of key reactant (4.2 kmol), or a mass with a molar mass"),
        "conversion": st.column_config.NumberColumn("conversion", min_value=0.0, max_value=1.0, format="%.2f"),
        "molar mass": text("molar mass", help="only when the amount is a mass: 58 g/mol"),
        "heat capacity": text("heat capacity", help="instead of material and mass: 1600 kJ/K"),
        "initial temperature": text("initial temperature", help="default: the first charge's initial temperature"),
        "temperature": text("temperature", help="? = the unknown"),
        "phase": st.column_config.SelectboxColumn("phase", options=["solid", "liquid", "vapour"]),
        "cp": text("cp", help="2.1 kJ/(kg*K) or 0.5 Btu/(lb*degF)"),
        "cp per K": st.column_config.NumberColumn("cp per K", help="b in cp = a + b·T + c·T² (T in K)"),
        "cp per K²": st.column_config.NumberColumn("cp per K²", help="c in cp = a + b·T + c·T² (T in K)"),
        "up to": text("up to", help="the transition temperature to the next phase"),
        "latent heat": text("latent heat", help="to the next phase: 200 kJ/kg"),
        "min temperature": text("min T"), "max temperature": text("max T"), "source": text("data source"),
    }



def _check_marks(table: str, count: int, problems: list[tb.CellProblem]) -> list[str]:
    """The 'check' column: ⚠ and the bad column(s) on each row with a problem."""
    marks = [""] * count
    for p in problems:
        if p.table == table and p.row is not None and p.row < count:
            place = p.column or "row"
            marks[p.row] = f"{marks[p.row]}, {place}" if marks[p.row] else f"⚠ {place}"
    return marks


def table_frame(table: str, rows: list[dict], problems: list[tb.CellProblem]) -> pd.DataFrame:
    """The rows of one table as a frame, with a 'check' column marking bad cells."""
    data = {"check": pd.Series(_check_marks(table, len(rows), problems), dtype="object")}
    for column in tb.COLUMNS[table]:
        values = [row.get(column) for row in rows]
        if column in tb.NUMBER_COLUMNS:
            data[column] = pd.Series([v if isinstance(v, (int, float)) else None for v in values], dtype="float64")
        else:
            data[column] = pd.Series([None if v in (None, "") else str(v) for v in values], dtype="object")
    return pd.DataFrame(data)


def render_table(table: str, config: dict, problems: list[tb.CellProblem], caption: str,
                 title: bool = True) -> None:
    rows = st.session_state[ROWS][table]
    if title:
        st.markdown(f"**{tb.TABLE_TITLES[table]}** — {caption}")
    else:
        st.caption(caption)
    for problem in (p for p in problems if p.table == table):
        st.error(problem.text, icon=":material/error:")
    frame = table_frame(table, rows, problems)
    shown = (["check"] if frame["check"].any() else []) + tb.COLUMNS[table]  # 'check' only when needed
    st.data_editor(frame, key=editor_key(table), on_change=on_table_edit, args=(table,), num_rows="dynamic",
                   width="stretch", hide_index=True, placeholder="", column_order=shown,
                   column_config={c: config[c] for c in shown if c in config}, disabled=["check", *tb.DERIVED])


def solve_problems(worksheet: Worksheet, error: HeatBalanceError | None) -> list[tb.CellProblem]:
    """The engine's refusal, placed on its table row so the row is marked."""
    if error is None:
        return []
    place = tb.locate(error.where, worksheet)
    return [tb.CellProblem(place.table, place.row, place.column, error.message)]


def render_stream_table(config: dict, problems: list[tb.CellProblem]) -> None:
    st.subheader("Streams", help="continuous lines: each flows from its inlet state to its outlet state")
    render_table("streams", config, problems, "one row per flowing line, from its inlet state to its outlet state",
                 title=False)


def render_vessel_tables(config: dict, problems: list[tb.CellProblem]) -> None:
    st.subheader("Vessels", help="batch basis: the charges of a vessel are mixed and end at its final state")
    render_table("vessels", config, problems, "every charge of a vessel ends at the vessel's final state")
    render_table("charges", config, problems, "what is put in each vessel, at its initial state")


def render_inputs(worksheet: Worksheet, error: HeatBalanceError | None) -> None:
    problems = list(st.session_state.get(PROBLEMS) or []) or solve_problems(worksheet, error)
    for problem in problems:
        if problem.table in ("worksheet", "basis", "unknown"):
            st.error(problem.text, icon=":material/error:")
    render_basis()
    config = _column_config(worksheet)
    if worksheet.basis.kind == "batch" or worksheet.vessels:
        render_vessel_tables(config, problems)
        render_stream_table(config, problems)
    else:
        render_stream_table(config, problems)
        st.caption("Vessels and batch charges: switch the basis to batch.")
    st.subheader("Heat terms", help="+ = heat into the process")
    left, right = st.columns(2)
    with left:
        render_table("duties", config, problems, "heater +, cooler −")
    with right:
        render_table("losses", config, problems, "heat lost to the surroundings, entered as positive")
    render_table("reactions", config, problems, "heat released = −ΔH × amount fed × conversion")
    if worksheet.basis.kind == "batch" or worksheet.vessels:
        render_table("equipment", config, problems,
                     "vessel wall, agitator and internals that warm with the contents (per vessel)")
    if any(p.table in ("shared", "materials") for p in problems):
        st.session_state["show_own_tables"] = True  # a marked cell is never hidden
    if st.toggle("Shared temperatures and materials of your own", key="show_own_tables"):
        render_table("shared", config, problems, "one temperature for lines that end mixed; "
                     "refer to it in a state cell as 'shared: <name>'")
        render_table("materials", config, problems, "one row per phase; cp = a + b·T + c·T² with T in K")


# --------------------------------------------------------------------------- drawing: results
def _number(value: float | None) -> str:
    """A heat in the contribution table: 1,234.57; blank where it does not apply."""
    return "" if value is None else _no_negative_zero(f"{value:,.2f}")


def _no_negative_zero(text: str) -> str:
    return text[1:] if text.startswith("-") and not text.strip("-0.,").split(" ")[0] else text


def render_results(result: Result | None, system: str) -> None:
    st.header("Results")
    if result is None:
        st.info("The results appear here once the balance solves.")
        return
    st.plotly_chart(energy_waterfall(result, system), key="waterfall", width="stretch")
    st.caption("Each bar is one contribution, as heat into the process. Red: heat put in (heaters, reaction "
               "heat, lines that cool down or condense). Blue: heat taken out or taken up (coolers, losses, "
               "lines that warm up or boil, the equipment). Grey: the sum, which is zero when the balance closes.")
    rows = contribution_rows(result, system)
    heats = [c for c in rows[0] if "[" in c]
    order = ["item", "type", heats[-1], *heats[:-1], "material", "amount", "from", "to"]  # the heat first
    st.markdown("**Every contribution** (heat into the process; a line that absorbs heat shows as −)")
    config = {c: st.column_config.TextColumn(c, alignment="right") for c in heats}
    config.update({"from": st.column_config.TextColumn("from / detail", width="large"),
                   "to": st.column_config.TextColumn("to", width="medium")})
    shown = [{k: (_number(v) if k in heats else v) for k, v in row.items()} for row in rows]
    st.dataframe(pd.DataFrame(shown), key="contributions", hide_index=True, width="stretch", column_order=order,
                 column_config=config)
    st.markdown(f"**Closure residual:** {_no_negative_zero(format_heat(result.residual, result.basis, system))} "
                "(what is left when every contribution is added; zero when the balance closes)")
    left, right = st.columns(2)
    with left:
        st.markdown("**Sign convention**")
        st.markdown(SIGN_CONVENTION.replace("+", "\\+"))
        st.markdown("**Assumptions**")
        st.markdown("\n".join(f"- {a}" for a in result.assumptions))
    with right:
        st.markdown("**Property data**")
        st.markdown("\n".join(f"- **{name}**: {source}" for name, source in result.sources.items()))
        st.caption("Versions: " + ", ".join(f"{k} {v}" for k, v in result.versions.items()))
    st.markdown("**Warnings**")
    if result.warnings:
        for warning in result.warnings:
            st.warning(warning, icon=":material/warning:")
    else:
        st.markdown("None.")


# Panels other features add below the results; each is called as panel(worksheet, result, system),
# with result None when the balance is not solved. Add one call each (screening, save/share).
EXTRA_PANELS: list = []
EXTRA_PANELS.append(screening_panel.panel(replace_worksheet))  # thermal screening (webapp/screening_panel.py)
EXTRA_PANELS.append(sharing.panel(replace_worksheet))  # save and share (webapp/sharing.py)


def render_extra_panels(worksheet: Worksheet, result: Result | None, system: str) -> None:
    for panel in EXTRA_PANELS:
        guarded(panel, worksheet, result, system)


# --------------------------------------------------------------------------- the page
def guarded(draw, *args) -> None:
    """Draw a part of the page; an unexpected failure shows a plain message, never a traceback."""
    try:
        draw(*args)
    except HeatBalanceError as exc:
        st.error(str(exc), icon=":material/error:")
    except Exception as exc:  # noqa: BLE001 - the page must never show a traceback
        st.error(f"Something went wrong while drawing this part of the page ({exc.__class__.__name__}). "
                 "Your inputs are kept; try undoing the last change.", icon=":material/error:")


def main() -> None:
    st.set_page_config(page_title="Heat balance worksheet", page_icon=":material/thermostat:", layout="wide")
    guarded(sync_tables_with_model)
    guarded(apply_pending_edits)
    guarded(sync_tables_with_model)
    if WORKSHEET not in st.session_state:
        return
    worksheet = st.session_state[WORKSHEET]
    system = display_system()
    guarded(render_sidebar)
    result, error = solve_current(worksheet, system)
    st.session_state[LAST_RESULT] = result
    guarded(render_header, worksheet)
    guarded(render_answer, worksheet, result, error)
    guarded(render_inputs, worksheet, error)
    guarded(render_results, result, system)
    render_extra_panels(worksheet, result, system)


main()
