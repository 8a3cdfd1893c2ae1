"""The page's thermal-screening panel: one per vessel with a reaction or a stated heat of mixing.

Hooked into ``app.py`` as one of its extra panels, called as
``render_screening_panel(worksheet, result, system)``. It shows the screening the engine
put in the result (:mod:`heatbalance.analyses.screening`): the cautions, a loud alarm when MTSR reaches
MTT or T_D24, one chart of the temperatures, the numbers and the criticality class.

Three inputs (accumulation, T_D24, MTT) start from the worksheet's own screening inputs.
Hooked in with :func:`panel`, a change is written into the worksheet (the vessel's
``screening`` inputs), so it is saved and shared with it; inputs the engine refuses are
shown with their message and not written. Without a setter the inputs are a what-if on a copy.
"""
from __future__ import annotations

import streamlit as st

from heatbalance.address import item
from heatbalance.analyses import Screening, solve_and_analyse
from heatbalance.errors import HeatBalanceError, InputError
from heatbalance.messages import Measure
from heatbalance.present.screening import screening_figure, temperature_difference_text
from heatbalance.present.text import UNIT_SETS, display_unit, error_text, measure_text, phrase_text, temperature_text
from heatbalance.reactor import CAUTION
from heatbalance.results import Result
from heatbalance.units import from_si, to_si
from heatbalance.worksheet import Quantity, ScreeningInputs, Worksheet

from .common import built, plain

__all__ = ["panel", "render_screening_panel", "what_if_worksheet", "widget_key"]

_CLASS_HELP = ("Stoessel's classes order T_process, MTSR, MTT and T_D24: 1-2 the batch neither boils nor "
               "decomposes on loss of cooling; 3-4 it boils, and evaporative cooling is the barrier; 5 a "
               "decomposition can start before boiling stops the rise.")
_SOURCE = "hb_screening_source"  # session key: which worksheet the what-if widgets were filled from


def widget_key(index: int, field: str) -> str:
    """Key of a what-if widget of the panel: ``screening_0_T_D24``."""
    return f"screening_{index}_{field}"


def _temperature_unit(system: str) -> str:
    return UNIT_SETS[system]["temperature"]


def _shown(T: float | None, system: str) -> float | None:
    return None if T is None else round(from_si(T, _temperature_unit(system), "temperature"), 2)


def _typed(value: float | None, system: str, kept: Quantity | None) -> Quantity | None:
    """The widget's value as a quantity; the worksheet's own (in the unit typed there) when unchanged."""
    if value is None:
        return None
    if kept is not None and _shown(to_si(kept.value, kept.unit, "temperature"), system) == value:
        return kept  # the view never rewrites a typed value
    return Quantity(value=float(value), unit=_temperature_unit(system))


def what_if_worksheet(worksheet: Worksheet, vessel: str, accumulation: float, T_D24: Quantity | None,
                      MTT: Quantity | None, process_temperature: Quantity | None = None) -> Worksheet:
    """A copy of the worksheet with the vessel's screening inputs replaced (the rest kept)."""
    copy = worksheet.model_copy(deep=True)
    for v in copy.vessels:
        if v.name == vessel:
            old = v.screening or ScreeningInputs()
            v.screening = old.model_copy(update={"accumulation": accumulation, "T_D24": T_D24, "MTT": MTT,
                                                 "process_temperature": process_temperature})
    return Worksheet.model_validate(copy.model_dump())


def _inputs(worksheet: Worksheet, vessel: str) -> ScreeningInputs:
    return next(v for v in worksheet.vessels if v.name == vessel).screening or ScreeningInputs()


def _defaults(worksheet: Worksheet, screening: Screening, system: str) -> dict[str, object]:
    inputs = _inputs(worksheet, screening.vessel)
    mtt = None
    if inputs.MTT is not None:
        mtt = _shown(to_si(inputs.MTT.value, inputs.MTT.unit, "temperature"), system)
    td24 = None
    if inputs.T_D24 is not None:
        td24 = _shown(to_si(inputs.T_D24.value, inputs.T_D24.unit, "temperature"), system)
    process = None
    if inputs.process_temperature is not None:
        process = _shown(to_si(inputs.process_temperature.value, inputs.process_temperature.unit, "temperature"),
                         system)
    return {"accumulation": round(inputs.accumulation * 100, 3), "T_D24": td24, "MTT": mtt,
            "process_temperature": process}


def _fill_widgets(worksheet: Worksheet, result: Result, system: str) -> None:
    """Set the what-if widgets from the worksheet when another worksheet (or unit system) is shown."""
    source = (worksheet.model_dump_json(), system)
    if st.session_state.get(_SOURCE) == source:
        return
    st.session_state[_SOURCE] = source
    for index, screening in enumerate(result.screening):
        st.session_state.pop(_error_key(index), None)
        for field, value in _defaults(worksheet, screening, system).items():
            st.session_state[widget_key(index, field)] = value


def panel(set_worksheet):
    """The panel as the page hooks it in: inputs are written into the worksheet through ``set_worksheet``;
    the page shows the safety caution once, so the panel does not repeat it."""
    def draw(worksheet: Worksheet, result: Result | None, system: str) -> None:
        render_screening_panel(worksheet, result, system, set_worksheet, caution=False)
    return draw


def _chosen(index: int) -> dict[str, object]:
    return {field: st.session_state.get(widget_key(index, field))
            for field in ("accumulation", "T_D24", "MTT", "process_temperature")}


def _checked_accumulation(vessel: str, percent: float | None) -> float:
    """The accumulation typed [%] as a fraction; refused at its address outside 0 to 100 % (the field has no
    bounds of its own: the browser would keep the old value with only a hover tip, and the server would put
    the default in its place)."""
    if percent is None:
        return 1.0
    if not 0.0 <= percent <= 100.0:
        raise InputError(f"{percent:g} % is not an accumulation: give 0 to 100 %",
                         f"{item('vessels', vessel)}.screening.accumulation")
    return percent / 100.0


def _with_inputs(worksheet: Worksheet, index: int, vessel: str, system: str) -> Worksheet:
    chosen, kept = _chosen(index), _inputs(worksheet, vessel)
    accumulation = _checked_accumulation(vessel, chosen["accumulation"])
    if round(kept.accumulation * 100, 3) == chosen["accumulation"]:
        accumulation = kept.accumulation
    return what_if_worksheet(worksheet, vessel, accumulation, _typed(chosen["T_D24"], system, kept.T_D24),
                             _typed(chosen["MTT"], system, kept.MTT),
                             _typed(chosen["process_temperature"], system, kept.process_temperature))


def _commit(index: int, vessel: str, worksheet: Worksheet, system: str, set_worksheet) -> None:
    """Write the inputs into the worksheet when the engine accepts them; else keep the message."""
    try:
        changed = _with_inputs(worksheet, index, vessel, system)
        solve_and_analyse(changed)
    except Exception as exc:  # noqa: BLE001 - a refusal is shown on the panel, never a traceback
        st.session_state[_error_key(index)] = _refusal(exc, system)
        return
    st.session_state.pop(_error_key(index), None)
    set_worksheet(changed)


def _error_key(index: int) -> str:
    return f"screening_{index}_refused"


def _refusal(exc: Exception, system: str) -> str:
    """The refusal in words, after the address of the field at fault when it has one."""
    if isinstance(exc, HeatBalanceError):
        return f"{exc.where}: {error_text(exc, system)}" if exc.where else error_text(exc, system)
    return f"the engine failed unexpectedly ({exc.__class__.__name__})"


def render_screening_panel(worksheet: Worksheet, result: Result | None, system: str = "SI",
                           set_worksheet=None, caution: bool = True) -> None:
    """Draw the screening of every vessel with a reaction or a heat of mixing (nothing when none, or no result).

    ``caution=False`` when the page already shows the one safety caution."""
    if result is None:
        if worksheet.vessels and (worksheet.reactions or worksheet.mixings):
            st.header("Thermal screening (loss of cooling)")
            st.info("The thermal screening of the vessels with a reaction or a heat of mixing appears here once "
                    "the balance solves.")
        return
    if not getattr(result, "screening", None):
        return
    _fill_widgets(worksheet, result, system)
    with st.container(key="screening_panel"):
        st.header("Thermal screening (loss of cooling)")
        if caution:
            st.warning(CAUTION, icon=":material/health_and_safety:")
        for index, screening in enumerate(result.screening):
            _vessel_panel(index, worksheet, screening, system, set_worksheet)


def _vessel_panel(index: int, worksheet: Worksheet, screening: Screening, system: str, set_worksheet) -> None:
    unit = display_unit(_temperature_unit(system))
    commit = None if set_worksheet is None else \
        {"on_change": _commit, "args": (index, screening.vessel, worksheet, system, set_worksheet)}
    with st.container(key=f"screening_vessel_{index}", border=True):
        st.subheader(f"Vessel {plain(screening.vessel)}")
        c0, c1, c2, c3 = st.columns(4)
        c0.number_input(f"T_process [{unit}]", value=None, step=5.0, key=widget_key(index, "process_temperature"),
                        **(commit or {}), placeholder="the batch's end temperature",
                        help="The batch's temperature when cooling fails: the temperature the cooling holds while "
                             "the reaction runs. Empty: the batch's end temperature from the balance (with all the "
                             "reaction heat already in it, MTSR then counts that heat twice: on the safe side).")
        c1.number_input("Accumulation at cooling failure [%]", step=5.0,  # 0-100 checked by _checked_accumulation
                        key=widget_key(index, "accumulation"), **(commit or {}),
                        help="Share of the reaction heat (and heat of mixing) not yet released when cooling "
                             "fails (100 % = batch with everything charged).")
        c2.number_input(f"T_D24 [{unit}]", value=None, step=5.0, key=widget_key(index, "T_D24"), **(commit or {}),
                        placeholder="from calorimetry",
                        help="Temperature at which the decomposition's time to maximum rate is 24 h "
                             "(from DSC/ARC data). Needed for the criticality class.")
        c3.number_input(f"MTT [{unit}]", value=None, step=5.0, key=widget_key(index, "MTT"), **(commit or {}),
                        placeholder="boiling point from the data",
                        help="Maximum technical temperature. Empty: the boiling (bubble) point of the vessel's "
                             "liquid at its pressure, from the property data (a mixture: thermo's vapour pressures, "
                             "UNIFAC or Raoult's law).")
        if _error_key(index) in st.session_state:
            st.error(f"These screening inputs cannot be used: {plain(st.session_state[_error_key(index)])}",
                     icon=":material/error:")
            return
        screening = _current(index, worksheet, screening, system)
        if screening is None:
            return
        for alarm in screening.alarms:
            st.error(f"**ALARM:** {plain(phrase_text(alarm, system))}", icon=":material/emergency_home:")
        figure = built(screening_figure, screening, system, False)  # the page shows the one caution beside the answer
        st.plotly_chart(figure, key=f"screening_chart_{index}", width="stretch")
        _numbers(screening, system)
        if screening.criticality_class is not None:
            meaning = screening.class_meaning.split(": ", 1)[1]
            st.markdown(f"**Criticality class {screening.criticality_class}** (Stoessel). "
                        f"{plain(meaning[:1].upper() + meaning[1:])}", help=_CLASS_HELP)
            for caveat in screening.class_caveats:
                st.caption(plain(phrase_text(caveat, system)))
        else:
            st.info(plain(screening.class_meaning))
        if screening.jacket is not None:
            j = screening.jacket
            minutes = measure_text(Measure(j.time, "duration", decimals=1), system)
            st.markdown(f"**Jacket {j.direction} time:** {minutes} from {temperature_text(j.start_T, system, 1)} "
                        f"to {temperature_text(j.target_T, system, 1)} with the utility at "
                        f"{temperature_text(j.utility_T, system, 1)} "
                        f"(UA {measure_text(Measure(j.UA, 'thermal_conductance', 3), system)}; "
                        "contents and vessel heat capacity, no reaction heat during it).")
        with st.expander("How these numbers were made"):
            notes = [plain(phrase_text(n, system)) for n in screening.notes]
            notes.append(f"MTT: {plain(phrase_text(screening.MTT_source, system))}.")
            st.markdown("\n".join(f"- {n}" for n in notes))


def _current(index: int, worksheet: Worksheet, screening: Screening, system: str) -> Screening | None:
    """The screening for the what-if inputs: the result's own when they match the worksheet."""
    if _chosen(index) == _defaults(worksheet, screening, system):
        return screening
    try:
        redone = solve_and_analyse(_with_inputs(worksheet, index, screening.vessel, system))
    except Exception as exc:  # noqa: BLE001 - a refusal is shown, never a traceback
        st.error(f"These screening inputs cannot be used: {plain(_refusal(exc, system))}", icon=":material/error:")
        return None
    return next((s for s in redone.screening if s.vessel == screening.vessel), None)


_LEGEND = ("T_process: the batch's temperature when cooling fails. MTSR: the highest temperature the desired "
           "reaction can reach then (T_process + accumulated ΔT_ad). MTT: the highest the equipment allows (the boiling "
           "point, or where the pressure reaches the relief set pressure). T_D24: where a decomposition takes 24 h to "
           "run away (from calorimetry). ΔT_ad: the adiabatic rise; φ: the vessel's thermal inertia factor.")


def _numbers(s: Screening, system: str) -> None:
    """The numbers as one small table (markdown, like the answer)."""
    dt = temperature_difference_text

    def t(value: float | None) -> str:
        return temperature_text(value, system, 1) if value is not None else "—"

    st.markdown(
        "| T_process | MTSR | MTT | T_D24 | ΔT_ad (φ = 1) | ΔT_ad / φ | φ |\n"
        "| --- | --- | --- | --- | --- | --- | --- |\n"
        f"| {t(s.T_process)} | **{t(s.MTSR)}** ({s.accumulation:.0%} accumulated) | {t(s.MTT)} | {t(s.T_D24)} "
        f"| {dt(s.dT_ad, system)} | {dt(s.dT_ad_phi, system)} | {s.phi:.3f} |")
    st.caption(_LEGEND + (" MTSR uses ΔT_ad / φ (thermal inertia included)." if s.thermal_inertia_used else
                          " MTSR uses ΔT_ad with φ = 1 (the vessel left out: conservative)."))
