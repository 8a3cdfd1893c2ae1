"""The exchanger check and the utility table in a unit set: tables, the report block and the T–Q chart (plotly).

Reads the SI records of :mod:`heatbalance.analyses.exchangers` and :mod:`heatbalance.analyses.utilities`;
nothing here solves. Money is in the worksheet's currency as entered; CO2 in tonnes per year.
"""
from __future__ import annotations

from html import escape

from ..messages import Measure
from ..units import from_si
from .text import UNIT_SETS, display_unit, measure_text, phrase_text

__all__ = ["exchanger_rows", "zone_rows", "utility_rows", "exchanger_report", "tq_figure", "HOT_COLOUR",
           "COLD_COLOUR"]

HOT_COLOUR = "#c8553d"  # the hot side
COLD_COLOUR = "#2f6690"  # the cold side
_ZONE_FILLS = ("rgba(200, 85, 61, 0.07)", "rgba(47, 102, 144, 0.07)")


def _m(value: float | None, kind: str, system: str, **how) -> str:
    return "" if value is None else measure_text(Measure(value, kind, **how), system)


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
    """Each zone: services, duty, terminal temperatures, F, ΔT_lm and UA."""
    t = UNIT_SETS[system]
    out = []
    for z in check.zones:
        out.append({
            "zone": z.index, "hot side": z.hot_service, "cold side": z.cold_service,
            f"duty [{display_unit(t['power'])}]": from_si(z.duty, t["power"], "power"),
            "hot in → out": f"{_m(z.hot_in, 'temperature', system, digits=1)} → "
                            f"{_m(z.hot_out, 'temperature', system, digits=1)}",
            "cold in → out": f"{_m(z.cold_in, 'temperature', system, digits=1)} → "
                             f"{_m(z.cold_out, 'temperature', system, digits=1)}",
            "F": round(z.F, 4),
            f"ΔT_lm [{display_unit(t['temperature_difference'])}]":
                from_si(z.lmtd, t["temperature_difference"], "temperature_difference"),
            f"UA [{display_unit(t['thermal_conductance'])}]":
                None if z.UA is None else from_si(z.UA, t["thermal_conductance"], "thermal_conductance"),
        })
    return out


def utility_rows(table, system: str = "SI") -> list[dict]:
    """Each utility for one duty: flow, cost per hour and year, CO2 per year, or why it cannot."""
    t = UNIT_SETS[system]
    currency = table.currency
    out = []
    for o in table.options:
        row = {"utility": o.utility, "kind": o.kind, "feasible": "yes" if o.feasible else "NO",
               f"flow [{display_unit(t['mass_flow'])}]":
                   None if o.flow is None else from_si(o.flow, t["mass_flow"], "mass_flow"),
               f"cost [{currency}/h]": o.cost_per_hour, f"cost [{currency}/year]": o.cost_per_year,
               "CO2 [t/year]": None if o.co2_per_year is None else o.co2_per_year / 1000.0}
        notes = []
        if o.supply_T is not None:
            notes.append(f"{'condenses at' if o.kind == 'steam' else 'supply'} "
                         f"{_m(o.supply_T, 'temperature', system, digits=1)}, "
                         f"{'condensate' if o.kind == 'steam' else 'return'} "
                         f"{_m(o.return_T, 'temperature', system, digits=1)}")
        if o.flash_fraction is not None:
            notes.append(f"condensate flashes {o.flash_fraction:.1%} ({_m(o.flash_flow, 'mass_flow', system)} of "
                         "flash steam)" + (f", credited {_m(o.flash_credit, 'power', system)}"
                                            if o.flash_credit is not None else ""))
        notes += o.notes
        if o.refusal is not None:
            notes.append(f"{phrase_text(o.refusal.phrase, system)} [{o.refusal.where}]")
        row["note"] = "; ".join(notes)
        row["source"] = o.source
        out.append(row)
    return out


def _table(rows: list[dict]) -> list[str]:
    if not rows:
        return []
    columns = list(rows[0])

    def cell(v) -> str:
        if v is None:
            return ""
        return f"{v:,.2f}" if isinstance(v, float) else str(v)

    cells = [[cell(r[c]) for c in columns] for r in rows]
    widths = [max(len(c), *(len(row[i]) for row in cells)) for i, c in enumerate(columns)]
    return ["  ".join(c.ljust(w) for c, w in zip(columns, widths)), "  ".join("-" * w for w in widths)] + \
        ["  ".join(v.ljust(w) for v, w in zip(row, widths)).rstrip() for row in cells]


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
