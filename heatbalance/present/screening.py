"""The thermal screening in a unit set: the command line's report and the page's figure."""
from __future__ import annotations

from html import escape

from ..analyses.screening import Screening
from ..messages import Measure
from ..reactor import CAUTION
from ..units import from_si
from .text import UNIT_SETS, display_unit, measure_text, phrase_text

__all__ = ["bears_on_safety", "screening_report", "screening_figure", "temperature_difference_text"]


def bears_on_safety(result) -> bool:
    """Whether a solved worksheet bears on safety: its output then shows :data:`~heatbalance.reactor.CAUTION`, once.

    The rule of the calculation sheet and the page, read from the result: a vessel (a batch end temperature:
    runaway, boiling, pressure), a reaction (its heat, screened or not) or a surface loss computed from its
    geometry (a hot surface: personnel protection).

    Parameters
    ----------
    result : Result
        A solved worksheet (``balance.solve`` or ``analyses.solve_and_analyse``)

    Returns
    -------
    bool
        True when the sheet has a vessel (a line charged to one), a reaction term or a computed surface loss

    Notes
    -----
    Every vessel has at least one charge (the worksheet refuses an empty one) and every charge line names its
    vessel, so ``any(line.vessel ...)`` is the worksheet's ``bool(ws.vessels)``; every reaction is a term of kind
    ``reaction``; every loss with a ``surface`` is one record of ``result.surface_losses``. A screening is not
    needed: a vessel without a reaction, or a reaction naming no vessel on a sheet of two, still bears on safety.
    """
    return bool(any(line.vessel is not None for line in result.lines)
                or any(term.kind == "reaction" for term in result.terms)
                or result.surface_losses)


def _t(T: float, system: str) -> str:
    return measure_text(Measure(T, "temperature", 1), system)


def temperature_difference_text(dT: float, system: str = "SI") -> str:
    """A temperature difference [K] in the view's unit, one decimal: ``40.0 K`` or ``72.0 °F``."""
    unit = UNIT_SETS[system]["temperature_difference"]
    return f"{from_si(dT, unit, 'temperature_difference'):.1f} {display_unit(unit)}"


_dt = temperature_difference_text


def screening_report(screenings: list[Screening], system: str = "SI", caution: bool = True) -> list[str]:
    """Lines of text for the command line: the numbers, the class, the alarms and the caution.

    Parameters
    ----------
    screenings : list[Screening]
        From ``Result.screening``
    system : str
        ``"SI"`` or ``"US"``: the display units
    caution : bool
        Write the caution (a document that shows it once elsewhere leaves it out here)

    Returns
    -------
    list[str]
        The report, one line each; an alarm line starts with ``!!! ALARM:``
    """
    out: list[str] = []
    for s in screenings:
        title = f"THERMAL SCREENING  vessel {s.vessel} ({', '.join(s.reactions)})"
        out += [title, "-" * len(title)] + ([f"  caution: {s.caution}"] if caution else [])
        for alarm in s.alarms:
            out.append(f"  !!! ALARM: {phrase_text(alarm, system)}")
        units = UNIT_SETS[system]
        out += _released_lines(s, units)
        out += [
            f"  reaction mass              {from_si(s.mass, units['mass'], 'mass'):,.1f} {units['mass']}, "
            f"cp {from_si(s.cp, units['specific_heat'], 'specific_heat'):.3f} {display_unit(units['specific_heat'])}",
            f"  thermal inertia factor φ   {s.phi:.4f}",
            f"  ΔT_ad (φ = 1)              {_dt(s.dT_ad, system)}",
            f"  ΔT_ad / φ                  {_dt(s.dT_ad_phi, system)}",
            f"  T_process                  {_t(s.T_process, system)}",
            f"  MTSR ({s.accumulation:.0%} accumulation)   {_t(s.MTSR, system)}",
            f"  MTT                        {_t(s.MTT, system) if s.MTT is not None else 'not available'}"
            f"  [{phrase_text(s.MTT_source, system)}]",
            f"  T_D24                      {_t(s.T_D24, system) if s.T_D24 is not None else 'not entered'}",
            f"  criticality class          {s.criticality_class if s.criticality_class else '-'}: "
            f"{s.class_meaning}",
        ]
        out += [f"  caveat: {phrase_text(c, system)}" for c in s.class_caveats]
        if s.jacket is not None:
            j = s.jacket
            out.append(f"  jacket {j.direction} time        {j.time / 60:,.1f} min from {_t(j.start_T, system)} to "
                       f"{_t(j.target_T, system)} with the utility at {_t(j.utility_T, system)}, "
                       f"UA {j.UA / 1000:,.3g} kW/K")
        out += [f"  note: {phrase_text(n, system)}" for n in s.notes]
        out.append("")
    return out


def _released_lines(s: Screening, units: dict) -> list[str]:
    """The heat released: the reactions', and the stated mixings' where there are any."""
    def energy(Q: float) -> str:
        return f"{from_si(Q, units['energy'], 'energy'):,.1f} {display_unit(units['energy'])}"

    if not s.Q_mixing:
        return [f"  reaction heat released     {energy(s.Q_reaction)}"]
    lines = [f"  heat of mixing released    {energy(s.Q_mixing)}"]
    if s.Q_reaction != s.Q_mixing:
        lines.append(f"  reaction heat released     {energy(s.Q_reaction - s.Q_mixing)}")
    return lines


def screening_figure(screening: Screening, system: str = "SI", caution: bool = True):
    """T_process, MTSR, MTT and T_D24 as points on one temperature axis, with MTT and T_D24 as dashed limits.

    Points, not bars: the axis spans only the temperatures shown (a bar from 0 °C or 0 °F would say nothing, and a
    bar on a cut axis would make the gaps look larger than they are).

    Parameters
    ----------
    screening : Screening
        One vessel's screening
    system : str
        ``"SI"`` (°C) or ``"US"`` (°F)
    caution : bool
        Write the caution under the plot (a page that shows it once elsewhere leaves it out here)

    Returns
    -------
    plotly.graph_objects.Figure
        Points in the order T_process, MTSR, MTT, T_D24 (those known); MTSR red and "ALARM" in
        the title when it reaches MTT or T_D24; the caution written under the plot (unless ``caution=False``).
    """
    import plotly.graph_objects as go  # only a figure needs plotly (the command line's report does not)

    unit = UNIT_SETS[system]["temperature"]

    def shown(T: float) -> float:
        return from_si(T, unit, "temperature")

    s = screening
    reaches = (s.MTT is not None and s.MTSR >= s.MTT) or (s.T_D24 is not None and s.MTSR >= s.T_D24)
    bars = [("T_process", s.T_process, "#7f8c8d"), ("MTSR", s.MTSR, "#c0392b" if reaches else "#e67e22")]
    if s.MTT is not None:
        bars.append(("MTT", s.MTT, "#2980b9"))
    if s.T_D24 is not None:
        bars.append(("T_D24", s.T_D24, "#8e44ad"))
    figure = go.Figure(go.Scatter(x=[b[0] for b in bars], y=[shown(b[1]) for b in bars], mode="markers+text",
                                  marker={"color": [b[2] for b in bars], "size": 16, "symbol": "diamond"},
                                  text=[f"{shown(b[1]):.1f} {display_unit(unit)}" for b in bars],
                                  textposition="top center", cliponaxis=False, name="temperature"))
    for label, T, color in bars[2:]:
        figure.add_hline(y=shown(T), line_dash="dash", line_color=color, annotation_text=label,
                         annotation_position="top left")
    low = min(shown(b[1]) for b in bars)
    high = max(shown(b[1]) for b in bars)
    title = f"Thermal screening: {escape(s.vessel, quote=False)}"  # a user name: plotly text reads some HTML
    figure.update_layout(title=title + ("  (ALARM)" if reaches else ""),
                         yaxis_title=f"temperature [{display_unit(unit)}]", showlegend=False,
                         yaxis_range=[low - 0.15 * (high - low + 10), high + 0.15 * (high - low + 10)],
                         margin={"t": 60, "b": 80, "l": 60, "r": 20}, height=400)
    if caution:  # a page that shows the one caution elsewhere leaves it out of the figure
        figure.add_annotation(text=CAUTION.replace("; defer", ";<br>defer"), xref="paper", yref="paper", x=0,
                              y=-0.12, xanchor="left", yanchor="top", showarrow=False, font={"size": 10},
                              align="left")
    return figure
