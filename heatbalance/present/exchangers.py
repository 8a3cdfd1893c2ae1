"""The exchanger check and the utility table in a unit set: tables, the report block and the T–Q chart (plotly).

Reads the SI records of :mod:`heatbalance.analyses.exchangers` and :mod:`heatbalance.analyses.utilities`;
nothing here solves. Money is in the worksheet's currency as entered; CO2 in tonnes per year.
"""
from __future__ import annotations

from html import escape

from ..messages import Measure
from ..units import from_si
from .text import (NOT_APPLICABLE, UNIT_SETS, display_unit, measure_text, no_negative_zero, percent_text, phrase_text,
                   significant_text)

__all__ = ["exchanger_rows", "zone_rows", "utility_rows", "typical_U_rows", "number_columns", "exchanger_report",
           "tq_figure", "HOT_COLOUR", "COLD_COLOUR"]

HOT_COLOUR = "#c8553d"  # the hot side
COLD_COLOUR = "#2f6690"  # the cold side
_ZONE_FILLS = ("rgba(200, 85, 61, 0.07)", "rgba(47, 102, 144, 0.07)")


def _m(value: float | None, kind: str, system: str, **how) -> str:
    return "" if value is None else measure_text(Measure(value, kind, **how), system)


def _figures(value: float | None, kind: str, system: str, digits: int = 4) -> str:
    """A table cell: an SI value in the view's unit of ``kind`` (named in the heading), significant figures."""
    if value is None:
        return NOT_APPLICABLE
    return significant_text(from_si(value, UNIT_SETS[system][kind], kind), digits)


def _tonnes(kg: float | None) -> str:
    return NOT_APPLICABLE if kg is None else significant_text(kg / 1000.0)


def _fixed(value: float | None, decimals: int) -> str:
    """A table cell with a fixed number of decimals (money, a factor): ``563,326``, ``70.42``, ``0.995``."""
    return NOT_APPLICABLE if value is None else no_negative_zero(f"{value:,.{decimals}f}")


def _difference(value: float, system: str) -> str:
    """A temperature difference cell, one decimal as the approaches are written: ``106.0``."""
    unit = UNIT_SETS[system]["temperature_difference"]
    return _fixed(from_si(value, unit, "temperature_difference"), 1)


def exchanger_rows(check, system: str = "SI") -> list[dict]:
    """One exchanger's results as (quantity, value, note) rows."""
    rows = [
        ("duty", _m(check.duty, "power", system), "heat taken by the cold side"),
        ("arrangement", check.arrangement + (f", {check.shells} shells" if check.arrangement.endswith("N shells")
                                             else ""), ""),
        ("minimum internal approach", _m(check.min_approach, "temperature_difference", system, decimals=1),
         f"at {_m(check.min_approach_x, 'power', system)} from the cold end: hot "
         f"{_m(check.min_approach_hot_T, 'temperature', system, digits=1)}, cold "
         f"{_m(check.min_approach_cold_T, 'temperature', system, digits=1)}"),
        ("minimum approach allowed", _m(check.minimum_approach, "temperature_difference", system, decimals=1),
         check.approach_source),
        ("UA required", _m(check.UA_required, "thermal_conductance", system) or "none can (temperature cross)",
         "Σ Q_zone / (F · ΔT_lm,zone)"),
        ("mean temperature difference", _m(check.mean_dT, "temperature_difference", system, decimals=1),
         "duty / UA required"),
    ]
    if check.U is not None:
        rows.append(("area required", _m(check.area_required, "area", system),
                     f"for U = {_m(check.U, 'heat_transfer_coefficient', system)}"))
    if check.UA_given is not None:
        rows.append(("UA of the unit", _m(check.UA_given, "thermal_conductance", system), "entered"))
    if check.rating is not None:
        r = check.rating
        rows.append(("rated duty", _m(r.duty, "power", system),
                     f"{r.duty / r.balance_duty:.1%} of the balance; hot out "
                     f"{_m(r.hot_outlet_T, 'temperature', system, digits=1)}, cold out "
                     f"{_m(r.cold_outlet_T, 'temperature', system, digits=1)} (ε-NTU per zone, flows as in the balance)"))
    if check.closure is not None:
        c = check.closure
        digits = 2 if c.kind == "temperature" else 5
        rows.append(("set by the rating", f"{c.address} = {_m(c.value, c.kind, system, digits=digits)}",
                     f"typed {_m(c.typed_value, c.kind, system, digits=digits)}; with it the balance's duty is the rated "
                     f"{_m(c.rated_duty, 'power', system)} (ε-NTU per zone)"))
    return [{"quantity": q, "value": v, "note": n} for q, v, n in rows]


def zone_rows(check, system: str = "SI") -> list[dict]:
    """Each zone: services, duty, terminal temperatures, F, ΔT_lm and UA, written in the view's units."""
    t = UNIT_SETS[system]
    out = []
    for z in check.zones:
        out.append({
            "zone": z.index, "hot side": z.hot_service, "cold side": z.cold_service,
            f"duty [{display_unit(t['power'])}]": _figures(z.duty, "power", system),
            "hot in → out": f"{_m(z.hot_in, 'temperature', system, digits=1)} → "
                            f"{_m(z.hot_out, 'temperature', system, digits=1)}",
            "cold in → out": f"{_m(z.cold_in, 'temperature', system, digits=1)} → "
                             f"{_m(z.cold_out, 'temperature', system, digits=1)}",
            "F": _fixed(z.F, 3),
            f"ΔT_lm [{display_unit(t['temperature_difference'])}]": _difference(z.lmtd, system),
            f"UA [{display_unit(t['thermal_conductance'])}]": _figures(z.UA, "thermal_conductance", system),
        })
    return out


def utility_rows(table, system: str = "SI") -> list[dict]:
    """Each utility for one duty: flow, cost per hour and year, CO2 per year (a dash where one does not apply),
    or why it cannot; written in the view's units, money in the worksheet's currency."""
    t = UNIT_SETS[system]
    currency = table.currency
    out = []
    for o in table.options:
        row = {"utility": o.utility, "kind": o.kind, "feasible": "yes" if o.feasible else "NO",
               f"flow [{display_unit(t['mass_flow'])}]": _figures(o.flow, "mass_flow", system),
               f"cost [{currency}/h]": _fixed(o.cost_per_hour, 2),
               f"cost [{currency}/year]": _fixed(o.cost_per_year, 0), "CO2 [t/year]": _tonnes(o.co2_per_year)}
        notes = []
        if o.supply_T is not None:
            notes.append(f"{'condenses at' if o.kind == 'steam' else 'supply'} "
                         f"{_m(o.supply_T, 'temperature', system, digits=1)}, "
                         f"{'condensate' if o.kind == 'steam' else 'return'} "
                         f"{_m(o.return_T, 'temperature', system, digits=1)}")
        if o.flash_fraction is not None:
            credit = "" if o.flash_credit is None else f", credited {_m(o.flash_credit, 'power', system)}"
            notes.append(f"condensate flashes {percent_text(o.flash_fraction)} "
                         f"({_m(o.flash_flow, 'mass_flow', system)} of flash steam){credit}")
        notes += o.notes
        if o.refusal is not None:
            notes.append(f"{phrase_text(o.refusal.phrase, system)} [{o.refusal.where}]")
        row["note"] = "; ".join(notes)
        row["source"] = o.source
        out.append(row)
    return out


def typical_U_rows(rows, system: str = "SI") -> list[dict]:
    """The typical overall coefficients (``analyses.exchangers.typical_U()``) in the view's unit of U."""
    heading = f"[{display_unit(UNIT_SETS[system]['heat_transfer_coefficient'])}]"
    return [{"type": r["type"], "hot side": r["hot_side"], "cold side": r["cold_side"],
             f"U low {heading}": _figures(r["U_low_W_m2K"], "heat_transfer_coefficient", system, 3),
             f"U high {heading}": _figures(r["U_high_W_m2K"], "heat_transfer_coefficient", system, 3),
             "source": r["source"]} for r in rows]


def number_columns(rows: list[dict]) -> list[str]:
    """The columns of zone or utility rows that hold numbers (their unit in the heading, and F): right-aligned."""
    return [c for c in (rows[0] if rows else {}) if "[" in c or c == "F"]


def _table(rows: list[dict]) -> list[str]:
    if not rows:
        return []
    columns, numbers = list(rows[0]), set(number_columns(rows))
    cells = [[str(r[c]) for c in columns] for r in rows]
    widths = [max(len(c), *(len(row[i]) for row in cells)) for i, c in enumerate(columns)]

    def line(values: list[str]) -> str:
        return "  ".join(v.rjust(w) if c in numbers else v.ljust(w) for v, w, c in zip(values, widths, columns))

    return [line(columns).rstrip(), "  ".join("-" * w for w in widths)] + [line(row).rstrip() for row in cells]


def exchanger_report(result, system: str = "SI") -> list[str]:
    """The command line's EXCHANGERS and UTILITIES blocks."""
    out = []
    for check in result.exchangers:
        out.append(f"EXCHANGER {check.name}: hot {', '.join(check.hot)}; cold {', '.join(check.cold)}")
        out += ["  " + f"{r['quantity']}: {r['value']}" + (f"  ({r['note']})" if r["note"] else "")
                for r in exchanger_rows(check, system)]
        out += ["  " + line for line in _table(zone_rows(check, system))]
        out += [f"  ! {phrase_text(w, system)}" for w in check.warnings]
        out += [f"  note: {phrase_text(n, system)}" for n in check.notes]
        if check.rating is not None:
            out.append(f"  rating: {phrase_text(check.rating.verdict, system)}")
        out += [f"  source: {s}" for s in check.sources]
        out.append("")
    for table in result.utilities:
        d = table.demand
        out.append(f"UTILITIES for {d.label} ({d.sense}, {_m(d.duty, 'power', system)}; process "
                   f"{_m(d.T_cold, 'temperature', system, digits=1)} to {_m(d.T_hot, 'temperature', system, digits=1)}"
                   + (f"; now: {d.current}" if d.current else "") + ")")
        hours = "" if table.operating_hours is None else f"{table.operating_hours / 3600:,.0f} h/year"
        out.append(f"  operating hours: {hours or 'not entered (no annual figures)'}")
        out += ["  " + line for line in _table(utility_rows(table, system))]
        out.append("")
    return out[:-1] if out and out[-1] == "" else out


def tq_figure(check, system: str = "SI"):
    """The T–Q chart of one exchanger: both curves, the zones shaded, the minimum approach (the pinch) labelled."""
    import plotly.graph_objects as go

    t = UNIT_SETS[system]
    P, T = t["power"], t["temperature"]

    def x(v: float) -> float:
        return from_si(v, P, "power")

    def y(v: float) -> float:
        return from_si(v, T, "temperature")

    fig = go.Figure()
    for i, z in enumerate(check.zones):
        fig.add_vrect(x0=x(z.x_start), x1=x(z.x_end), fillcolor=_ZONE_FILLS[i % 2], line_width=0, layer="below",
                      annotation_text=escape(f"{z.index}: {z.hot_service} / {z.cold_service}", quote=False),
                      annotation_position="top left" if i % 2 == 0 else "bottom left", annotation_font_size=10)
    names = (("hot side: " + ", ".join(check.hot), check.hot_curve, HOT_COLOUR),
             ("cold side: " + ", ".join(check.cold), check.cold_curve, COLD_COLOUR))
    for name, points, colour in names:
        fig.add_trace(go.Scatter(x=[x(p[0]) for p in points], y=[y(p[1]) for p in points], mode="lines",
                                 name=escape(name, quote=False), line={"color": colour, "width": 2.5}))
    crossed = check.min_approach <= 0
    label = (f"{'CROSS' if crossed else 'pinch'}: ΔT = "
             f"{measure_text(Measure(check.min_approach, 'temperature_difference', decimals=1), system)}")
    px = x(check.min_approach_x)
    fig.add_trace(go.Scatter(x=[px, px], y=[y(check.min_approach_cold_T), y(check.min_approach_hot_T)],
                             mode="lines+markers", name=label, line={"color": "#b00020" if crossed else "#333333",
                                                                    "dash": "dot"}))
    fig.add_annotation(x=px, y=y(check.min_approach_hot_T), text=label, showarrow=True, arrowhead=2,
                       font={"color": "#b00020" if crossed else "#333333"})
    fig.update_layout(title=escape(f"T–Q: exchanger {check.name}", quote=False),
                      xaxis_title=f"heat exchanged from the cold end [{display_unit(P)}]",
                      yaxis_title=f"temperature [{display_unit(T)}]", legend={"orientation": "h", "y": -0.2},
                      margin={"t": 60, "b": 40})
    return fig
