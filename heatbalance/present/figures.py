"""Figures of a solved balance (plotly; no user-interface import).

The energy waterfall shows every contribution as *heat into the process*: a heat term
with its sign (+ in, − out), a line with −ΔH (a line that absorbs heat takes it from the
balance). The bars add up to the closing bar, which is −residual: zero when the balance closes.
"""
from __future__ import annotations

from html import escape

import plotly.graph_objects as go

from ..results import Result
from ..units import from_si, heat_kind
from .tables import state_text
from .text import UNIT_SETS, display_unit, phrase_text

__all__ = ["waterfall_steps", "energy_waterfall", "HEAT_IN_COLOUR", "HEAT_OUT_COLOUR", "CLOSING_COLOUR"]

HEAT_IN_COLOUR = "#c8553d"  # brick red: heat put into the process
HEAT_OUT_COLOUR = "#2f6690"  # slate blue: heat taken up or removed
CLOSING_COLOUR = "#6c757d"  # grey: the closing bar
CLOSING_LABEL = "Sum (closes at 0)"

_KIND_WORDS = {"duty": "duty", "loss": "loss", "reaction": "reaction heat", "mixing": "heat of mixing",
               "equipment": "equipment",
               "stream": "stream", "charge": "vessel charge"}


def waterfall_steps(result: Result, system: str = "SI") -> list[dict]:
    """The bars of the waterfall: label, heat into the process in the display unit, hover text.

    The last step is the closing bar (the sum, −residual). ``label`` is the item's name as typed;
    ``detail`` is plotly text (user text in it escaped: plotly reads ``<``, ``>`` and ``&`` as HTML).
    """
    kind = heat_kind(result.basis)
    unit = UNIT_SETS[system][kind]
    shown = display_unit(unit)
    steps = []
    for line in result.lines:
        heat = -from_si(line.total, unit, kind)
        states = (f"{state_text(line.initial_T, line.initial_phase, None, system, 1)} → "
                  f"{state_text(line.final_T, line.final_phase, None, system, 1)}")
        steps.append({"label": line.name, "heat": heat, "kind": _KIND_WORDS[line.kind],
                      "detail": f"{escape(line.material, quote=False)}: {escape(states, quote=False)}<br>"
                                f"absorbs {-heat:,.4g} {shown} "
                                f"(latent {from_si(line.latent, unit, kind):,.4g} {shown})"})
    for term in result.terms:
        steps.append({"label": term.name, "heat": from_si(term.heat, unit, kind), "kind": _KIND_WORDS[term.kind],
                      "detail": escape(phrase_text(term.detail, system), quote=False)})
    steps.append({"label": CLOSING_LABEL, "heat": -from_si(result.residual, unit, kind), "kind": "sum",
                  "detail": "sum of all contributions (zero when the balance closes)"})
    return steps


def _number_format(steps: list[dict]) -> str:
    largest = max((abs(s["heat"]) for s in steps), default=0.0)
    return ",.0f" if largest >= 1000 else ",.1f" if largest >= 10 else ",.3f"


def _label(heat: float, number: str) -> str:
    """A bar label; a value that rounds to zero is written without a minus sign."""
    text = f"{heat:{number}}"
    return text.lstrip("-") if float(text.replace(",", "")) == 0 else text


def energy_waterfall(result: Result, system: str = "SI") -> go.Figure:
    """A waterfall of every contribution that closes at zero, labelled in the display unit.

    Hover shows the item, its kind, its states (for a line) and its heat. User text (names, materials)
    is HTML-escaped: plotly renders ``<a href>``, ``<b>`` and entities in text.
    """
    steps = waterfall_steps(result, system)
    unit = display_unit(UNIT_SETS[system][heat_kind(result.basis)])
    number = _number_format(steps)
    figure = go.Figure(go.Waterfall(
        x=[escape(s["label"], quote=False) for s in steps],  # user names: plotly text reads some HTML
        y=[s["heat"] for s in steps],
        measure=["relative"] * (len(steps) - 1) + ["total"],
        text=[_label(s["heat"], number) for s in steps],
        textposition="outside",
        cliponaxis=False,
        customdata=[[s["kind"], s["detail"]] for s in steps],
        hovertemplate=("<b>%{x}</b> (%{customdata[0]})<br>%{customdata[1]}<br>"
                       f"heat into the process: %{{y:{number}}} {unit}<extra></extra>"),
        increasing={"marker": {"color": HEAT_IN_COLOUR}},
        decreasing={"marker": {"color": HEAT_OUT_COLOUR}},
        totals={"marker": {"color": CLOSING_COLOUR}},
        connector={"line": {"color": "#adb5bd", "dash": "dot"}},
    ))
    figure.update_layout(
        title={"text": f"Energy waterfall: heat into the process [{unit}]", "x": 0.0},
        yaxis={"title": {"text": f"cumulative heat into the process [{unit}]"}, "tickformat": number,
               "zeroline": True, "zerolinecolor": "#495057", "zerolinewidth": 2},
        # the bars are names, whatever they look like: "101", "102" or "2024-05-01" would make plotly guess a number
        # or a date axis and drop the other bars
        xaxis={"type": "category", "tickangle": 0 if len(steps) <= 5 else -25, "automargin": True},
        margin={"l": 70, "r": 20, "t": 60, "b": 40}, height=420, showlegend=False,
        plot_bgcolor="#ffffff", font={"size": 13},
    )
    return figure
