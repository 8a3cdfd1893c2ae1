"""The page's heats-of-mixing panel: state "mix A (x1) with B (x2) to x3", see its heat, remove it.

Hooked into ``app.py`` as one of its extra panels, called as ``panel(set_worksheet)(worksheet, result, system)``.
It lists the worksheet's stated mixings (``mixings``) with the heat each puts into the balance, and a small form
to add one (or replace one of the same name); the form starts from what the lines imply
(:func:`heatbalance.mixing_check.suggested_mixings`: one solution into water, the final strength by mass balance).
A statement the engine refuses is shown with its message and address and not written. The loud warnings about
an unstated heat of mixing are the answer block's (they are in the result's warnings).
"""
from __future__ import annotations

import json

import pandas as pd
import streamlit as st

from heatbalance.address import get as get_input
from heatbalance.address import item
from heatbalance.errors import HeatBalanceError, InputError
from heatbalance.mixing import SOLUTES
from heatbalance.mixing_check import suggested_mixings
from heatbalance.present.text import error_text, format_heat
from heatbalance.problem import build_problem
from heatbalance.results import Result
from heatbalance.worksheet import Quantity, Worksheet, parse_worksheet

from .common import plain

__all__ = ["panel", "render_mixing_panel", "with_mixing", "without_mixing", "KEYS"]

KEYS = {name: f"mixing_{name}" for name in ("name", "solute", "amount", "unit", "from", "with", "to", "vessel",
                                            "save", "remove_choice", "remove")}
NO_VESSEL = "(streams: no vessel)"
_SOURCE = "hb_mixing_source"  # session key: which lines the form was filled from
_OFFERED = "hb_mixing_vessels"  # session key: the vessels the form last offered
_FIELDS = ("name", "solute", "amount", "unit", "from", "with", "to", "vessel")  # the form's fields, set by _fill
# the strengths typed in % (no bounds on the fields: checked here, refused beside the field at their address)
_STRENGTHS = {"from": ("from_fraction", "A: solute mass fraction [%]"),
              "with": ("with_fraction", "B: solute mass fraction [%] (0 = water)"),
              "to": ("to_fraction", "Mixed to [%]")}


def with_mixing(worksheet: Worksheet, mixing: dict) -> Worksheet:
    """A copy with ``mixing`` added, or replacing the one of the same name; refused (HeatBalanceError with the
    address) when the loader or the engine would refuse it."""
    data = worksheet.model_dump(mode="json", exclude_none=True)
    data["mixings"] = [m for m in data.get("mixings", []) if m["name"] != mixing["name"]] + [mixing]
    candidate = parse_worksheet(data)
    build_problem(candidate)  # the engine's refusals (table range, solute, x3 between x1 and x2) come first
    return candidate


def without_mixing(worksheet: Worksheet, name: str) -> Worksheet:
    return worksheet.model_copy(update={"mixings": [m for m in worksheet.mixings if m.name != name]})


def _defaults(worksheet: Worksheet) -> dict:
    batch = worksheet.basis.kind == "batch"
    values = {"name": "Dilution", "solute": next(iter(SOLUTES)), "amount": 1000.0, "unit": "kg" if batch else "kg/h",
              "from": 98.0, "with": 0.0, "to": 25.0, "vessel": worksheet.vessels[0].name if worksheet.vessels else NO_VESSEL}
    try:
        suggestion = next(iter(suggested_mixings(build_problem(worksheet))), None)
    except HeatBalanceError:
        suggestion = None
    if suggestion is not None:
        typed = get_input(worksheet, suggestion.amount_address)
        values.update(solute=suggestion.solute, **{"from": round(suggestion.from_fraction * 100, 4)},
                      to=round(suggestion.to_fraction * 100, 4), vessel=suggestion.vessel or NO_VESSEL)
        if isinstance(typed, Quantity):
            values.update(amount=typed.value, unit=typed.unit)
    return values


def _stated_rows(worksheet: Worksheet, result: Result | None, system: str) -> list[dict]:
    heats = {t.name: t.heat for t in result.terms if t.kind == "mixing"} if result is not None else {}
    return [{"name": m.name, "solute": m.solute, "A": str(m.amount), "A strength": f"{m.from_fraction:.2%}",
             "B strength": f"{m.with_fraction:.2%}", "to": f"{m.to_fraction:.2%}", "vessel": m.vessel or "",
             "heat into process": format_heat(heats[m.name], worksheet.basis.kind, system) if m.name in heats else ""}
            for m in worksheet.mixings]


def _lines(worksheet: Worksheet) -> str:
    """What the form's defaults come from: the basis and the lines, whatever their names (a rename is no other line)."""
    data = worksheet.model_dump(mode="json", include={"basis", "streams", "vessels", "materials"})
    for line in (*data["streams"], *data["vessels"], *(c for v in data["vessels"] for c in v["charges"])):
        line.pop("name")
    return json.dumps(data, sort_keys=True)


def _fill(worksheet: Worksheet) -> None:
    """Set the form from the lines when other lines are shown (or its fields were cleared); else keep what is typed."""
    source = _lines(worksheet)
    if st.session_state.get(_SOURCE) == source and all(k in st.session_state for k in map(KEYS.get, _FIELDS)):
        return
    st.session_state[_SOURCE] = source
    for field, value in _defaults(worksheet).items():
        st.session_state[KEYS[field]] = value


def _follow_vessel(vessels: list[str]) -> None:
    """The form's vessel follows a rename (the same place in the list offered); a vessel gone: the first."""
    chosen, offered = st.session_state[KEYS["vessel"]], st.session_state.get(_OFFERED, [])
    if chosen not in vessels:
        renamed = len(offered) == len(vessels) and chosen in offered
        st.session_state[KEYS["vessel"]] = vessels[offered.index(chosen)] if renamed else vessels[0]
    st.session_state[_OFFERED] = vessels


def _mixing_name() -> str:
    return st.session_state[KEYS["name"]].strip() or "Dilution"


def _strength_refusal(field: str, percent: float, name: str) -> InputError | None:
    """The refusal of a strength typed in % (``field``: ``from``, ``with`` or ``to``) outside 0 to 100 %, at its
    address (``mixings[Dilution].from_fraction``); None when it can be used."""
    if 0.0 <= percent <= 100.0:
        return None
    return InputError(f"{percent:g} % is not a solute mass fraction: give 0 to 100 %",
                      f"{item('mixings', name)}.{_STRENGTHS[field][0]}")


def _refusal_text(exc: HeatBalanceError, system: str) -> str:
    return plain(error_text(exc, system)) + (f" \\[{plain(exc.where)}\\]" if exc.where else "")


def _form(worksheet: Worksheet, system: str, set_worksheet) -> None:
    _fill(worksheet)
    vessels = [v.name for v in worksheet.vessels] + [NO_VESSEL]
    _follow_vessel(vessels)
    left, middle, right = st.columns(3)
    left.text_input("Name", key=KEYS["name"], max_chars=80)
    left.selectbox("Solute", list(SOLUTES), key=KEYS["solute"])
    left.selectbox("Where", vessels, key=KEYS["vessel"])
    # no bounds on the number fields: a negative amount is refused by the engine at Save, a strength beside its field
    middle.number_input("Amount of A (mass, or mass flow)", key=KEYS["amount"])
    middle.text_input("Unit of the amount", key=KEYS["unit"], max_chars=20)
    refused = False
    for field, (_, label) in _STRENGTHS.items():
        right.number_input(label, key=KEYS[field])
        refusal = _strength_refusal(field, st.session_state[KEYS[field]], _mixing_name())
        if refusal is not None:
            right.error(_refusal_text(refusal, system), icon=":material/error:")
            refused = True
    if not st.button("Save this mixing", key=KEYS["save"]) or refused:  # refused: said beside the field, not saved
        return
    state = st.session_state
    vessel = state[KEYS["vessel"]]
    mixing = {"name": _mixing_name(), "solute": state[KEYS["solute"]],
              "amount": {"value": float(state[KEYS["amount"]]), "unit": state[KEYS["unit"]].strip()},
              "from_fraction": state[KEYS["from"]] / 100, "with_fraction": state[KEYS["with"]] / 100,
              "to_fraction": state[KEYS["to"]] / 100, **({} if vessel == NO_VESSEL else {"vessel": vessel})}
    try:
        changed = with_mixing(worksheet, mixing)
    except HeatBalanceError as exc:
        st.error(_refusal_text(exc, system), icon=":material/error:")
        return
    set_worksheet(changed)
    st.rerun()


def _concerned(worksheet: Worksheet, result: Result | None) -> bool:
    """Mixings are stated, or the result warns that one is missing."""
    return bool(worksheet.mixings) or (result is not None and any(
        "NOT IN THE BALANCE" in w.template for w in result.warnings))


def render_mixing_panel(worksheet: Worksheet, result: Result | None, system: str, set_worksheet=None) -> None:
    if not _concerned(worksheet, result):
        return
    with st.container(key="mixing_panel"):
        st.subheader("Heats of mixing")
        st.caption("Mix solution A with B (water, or a weaker solution) to a final strength: the heat released, from "
                   "integral heats of solution at 25 °C (the shipped table names each value's source), enters the "
                   "balance as its own line (+ = heat into the process).")
        if worksheet.mixings:
            st.dataframe(pd.DataFrame(_stated_rows(worksheet, result, system)), hide_index=True, key="mixing_rows")
        if set_worksheet is None:
            return
        with st.expander("State a mixing", expanded=not worksheet.mixings):
            _form(worksheet, system, set_worksheet)
        if worksheet.mixings:
            names = [m.name for m in worksheet.mixings]
            choice = st.selectbox("Remove a stated mixing", names, key=KEYS["remove_choice"])
            if st.button("Remove", key=KEYS["remove"]):
                set_worksheet(without_mixing(worksheet, choice))
                st.rerun()


def panel(set_worksheet=None):
    """The panel as ``app.py`` calls it: ``panel(set_worksheet)(worksheet, result, system)``."""
    def draw(worksheet: Worksheet, result: Result | None, system: str) -> None:
        render_mixing_panel(worksheet, result, system, set_worksheet)
    return draw
