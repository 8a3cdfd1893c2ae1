"""Sweeps and case tables in a unit set: tables, CSV and plotly figures (reads analyses.sweep / analyses.cases)."""
from __future__ import annotations

import io
import math
import re
from html import escape

import pandas as pd
import plotly.graph_objects as go

from ..address import label as address_label
from ..analyses.cases import difference_column
from ..analyses.sweep import REASON, REFUSED_AT, WARNINGS
from ..reactor import CAUTION
from ..units import from_si
from .csv_cells import CSV_FLOAT, CSV_QUOTING, comment_line, csv_table
from .text import NOT_APPLICABLE, display_unit, error_text, no_negative_zero, phrase_text, shown_unit

__all__ = ["output_label", "output_unit", "shared_warnings", "own_warnings", "sweep_table", "sweep_csv_bytes",
           "case_csv_bytes", "caution_of", "sweep_figure", "case_table", "case_table_text", "refusal_rows"]

_OUTPUT_WORDS = {"answer": "answer", "answer.phase_fraction": "phase fraction of the answer", "residual": "residual"}


def output_label(name: str, frame: pd.DataFrame | None = None) -> str:
    """An output in words: ``lines[Steam].heat`` -> ``Steam: heat absorbed``; ``answer`` -> ``Steam flow``."""
    answer = (frame.attrs.get("answer") or {}).get("address") if frame is not None else None
    if name == "answer" and answer:
        return address_label(answer)
    if name in _OUTPUT_WORDS:
        return _OUTPUT_WORDS[name]
    head, _, field = name.rpartition(".")
    owner = head[head.index("[") + 1:-1] if "[" in head else head
    if "].utilities[" in head:  # an exchanger's or a duty's utility: both names
        owner = head[head.index("[") + 1:head.index("].utilities[")] + " / " + head[head.index("].utilities[") + 12:-1]
    words = {"heat": "heat absorbed" if head.startswith("lines[") else "heat into the process",
             "latent": "latent heat absorbed", "dT_ad": "ΔT_ad", "criticality_class": "criticality class",
             "min_approach": "minimum internal approach", "UA_required": "UA required", "mean_dT": "mean ΔT",
             "area_required": "area required", "rated_duty": "rated duty", "flow": "utility flow",
             "cost_per_hour": "cost per hour (currency)", "cost_per_year": "cost per year (currency)",
             "co2_per_year": "CO2 per year"}
    return f"{owner}: {words.get(field, field)}"


def output_unit(kind: str, system: str, name: str = "", frame: pd.DataFrame | None = None) -> str:
    """The unit an output is shown in, as on the answer itself (:func:`~heatbalance.present.text.shown_unit`): the
    answer's typed unit when it is one of its own (MMBtu/h, t/h), else the view's unit of its kind (a typed °C is
    °F in the US view); ``""`` for a plain number."""
    if not kind:
        return ""
    typed = (frame.attrs.get("answer") or {}).get("unit") if frame is not None and name == "answer" else None
    return shown_unit(typed, kind, system)


def _convert(values, kind: str, unit: str):
    return values if not unit else values.map(lambda v: from_si(v, unit, kind) if math.isfinite(v) else math.nan)


def _output_header(name: str, kind: str, system: str, frame: pd.DataFrame) -> tuple[str, str]:
    unit = output_unit(kind, system, name, frame)
    return _header(output_label(name, frame), unit), unit


def _header(label: str, unit: str) -> str:
    return f"{label} [{display_unit(unit)}]" if unit else label


def shared_warnings(frame: pd.DataFrame, system: str = "SI") -> list[str]:
    """The warnings every solved point of a sweep has (e.g. the steam condenses), to be said once."""
    if WARNINGS not in frame:
        return []
    solved = [phrases for phrases, reason in zip(frame[WARNINGS], frame[REASON]) if reason is None]
    if not solved:
        return []
    texts = [phrase_text(p, system) for p in solved[0]]
    return [t for t in texts if all(t in {phrase_text(p, system) for p in phrases} for phrases in solved[1:])]


def own_warnings(frame: pd.DataFrame, system: str = "SI") -> list[list[str]]:
    """Each point's warnings of a kind (the same words at the same address, whatever their numbers) that not every
    solved point has: what makes a point unlike the others (a charge counted as vapour there, data extrapolated at
    the end of the range); [] at a refused point. The steam's latent heat changing with its pressure is no such
    warning."""
    if WARNINGS not in frame:
        return [[] for _ in range(len(frame))]
    solved = [phrases for phrases, reason in zip(frame[WARNINGS], frame[REASON]) if reason is None]
    common = set.intersection(*({(p.template, p.address) for p in phrases} for phrases in solved)) if solved else set()
    return [[] if reason is not None else
            [phrase_text(p, system) for p in phrases if (p.template, p.address) not in common]
            for phrases, reason in zip(frame[WARNINGS], frame[REASON])]


def sweep_table(frame: pd.DataFrame, system: str = "SI", leave_out: tuple | list = ()) -> pd.DataFrame:
    """A sweep's frame for people: axes as given, outputs in the view's units, each refusal in words;
    ``leave_out``: warnings said once elsewhere (see :func:`shared_warnings`), not repeated on every row."""
    out = {}
    for column, unit in frame.attrs["units"].items():
        out[_header(address_label(column), unit)] = frame[column]
    for name, kind in frame.attrs["kinds"].items():
        header, unit = _output_header(name, kind, system, frame)
        out[header] = _convert(frame[name], kind, unit)
    out[REFUSED_AT] = frame[REFUSED_AT]
    out[REASON] = frame[REASON].map(lambda exc: "" if exc is None else error_text(exc, system))
    if WARNINGS in frame:
        left_out = set(leave_out)
        out[WARNINGS] = frame[WARNINGS].map(lambda phrases: " ".join(
            t for t in (phrase_text(p, system) for p in phrases) if t not in left_out))
    return pd.DataFrame(out)


def caution_of(frame: pd.DataFrame) -> str | None:
    """The one safety caution when a sweep's or a case table's outputs bear on safety (a screening's MTSR, MTT,
    ΔT_ad or class), else None."""
    return CAUTION if any(name.startswith("screening[") for name in frame.attrs.get("kinds", {})) else None


def sweep_csv_bytes(frame: pd.DataFrame, system: str = "SI") -> bytes:
    """The sweep table as CSV (UTF-8 with a byte-order mark, for spreadsheets); refused points have empty outputs;
    the caution in a first '#' line when the outputs bear on safety (read it with ``comment='#'``)."""
    return _csv_bytes(sweep_table(frame, system), index=False, caution=caution_of(frame))


def case_csv_bytes(frame: pd.DataFrame, system: str = "SI") -> bytes:
    """The case table as CSV: a row per output, a column per case and the difference (as :func:`case_table`)."""
    return _csv_bytes(case_table(frame, system), index=True, caution=caution_of(frame))


def _csv_bytes(table: pd.DataFrame, index: bool, caution: str | None = None) -> bytes:
    buffer = io.StringIO()
    if caution:
        buffer.write(comment_line(f"caution: {caution}") + "\n")
    csv_table(table).to_csv(buffer, index=index, lineterminator="\n", float_format=CSV_FLOAT, quoting=CSV_QUOTING)
    return buffer.getvalue().encode("utf-8-sig")


def refusal_rows(frame: pd.DataFrame, system: str = "SI") -> list[str]:
    """Each refused point in words: ``flow = 18 t/h: streams[Steam].flow: ...``."""
    rows = []
    axes = list(frame.attrs["units"].items())
    for _, row in frame[frame[REASON].notna()].iterrows():
        where = ", ".join(f"{address_label(c)} = {row[c]:g} {display_unit(u)}".rstrip() for c, u in axes)
        rows.append(f"{where}: {row[REFUSED_AT]}: {error_text(row[REASON], system)}")
    return rows


WARNED_NAME = "a warning of its own (see the table)"
WARNED_MARKER = {"symbol": "circle-open", "size": 14, "line": {"width": 2}, "color": "#c0392b"}


def sweep_figure(frame: pd.DataFrame, system: str = "SI", output: str | None = None) -> go.Figure:
    """One input: a line per output against it (refused points are gaps). Two inputs: a heat map of one output.
    Either way a point with a warning of its own (:func:`own_warnings`) is ringed."""
    kinds = frame.attrs["kinds"]
    output = output or next(iter(kinds))
    axes = list(frame.attrs["units"].items())
    table = sweep_table(frame, system)
    shown, _ = _output_header(output, kinds[output], system, frame)
    if len(axes) == 1:
        (column, unit), = axes
        x_title = _header(address_label(column), unit)
        figure = go.Figure()
        for name, kind in kinds.items():
            header, _ = _output_header(name, kind, system, frame)
            figure.add_trace(go.Scatter(x=table[x_title], y=table[header], mode="lines+markers", name=header,
                                        connectgaps=False,
                                        hovertemplate=f"{x_title}: %{{x:.4g}}<br>{header}: %{{y:.4g}}<extra></extra>"))
        refused = frame[REASON].notna()
        if refused.any():
            figure.add_trace(go.Scatter(x=table.loc[refused, x_title], y=[None] * int(refused.sum()), mode="markers",
                                        name="refused (see the list)", showlegend=True))
        x_ring, y_ring = x_title, shown
    else:
        (x_col, x_unit), (y_col, y_unit) = axes
        grid = table.pivot_table(index=_header(address_label(y_col), y_unit),
                                 columns=_header(address_label(x_col), x_unit), values=shown, dropna=False,
                                 aggfunc="first")
        figure = go.Figure(go.Heatmap(x=list(grid.columns), y=list(grid.index), z=grid.values,
                                      colorbar={"title": {"text": shown}},
                                      hovertemplate=(f"{grid.columns.name}: %{{x:.4g}}<br>{grid.index.name}: "
                                                     f"%{{y:.4g}}<br>{shown}: %{{z:.4g}}<extra></extra>")))
        x_ring, y_ring = grid.columns.name, grid.index.name
    warned = pd.Series([bool(w) for w in own_warnings(frame, system)], index=frame.index)
    if warned.any():  # a point unlike the others: ringed, its warning in the table
        figure.add_trace(go.Scatter(x=table.loc[warned, x_ring], y=table.loc[warned, y_ring], mode="markers",
                                    marker=WARNED_MARKER, name=WARNED_NAME, showlegend=True,
                                    hovertemplate="a warning of its own: see the table<extra></extra>"))
    others = len(kinds) - 1 if len(axes) == 1 else 0  # one input: every output in the chart's unit is a line
    more = f" and {others} more (see the legend)" if others else ""
    figure.update_layout(title={"text": "What if: " + output_label(output, frame) + more, "x": 0.0},
                         xaxis_title=x_ring, yaxis_title=y_ring, height=420,
                         margin={"l": 70, "r": 20, "t": 60, "b": 50}, plot_bgcolor="#ffffff")
    _plotly_safe(figure, [address_label(a) for a in frame.attrs["units"]]
                 + [output_label(n, frame) for n in frame.attrs["kinds"]])
    return figure


# plotly reads <, > and & in a figure's text as HTML and '%{' in a hover template as a field: a user's name is
# written with them escaped (an invisible word joiner splits '%{')
_WORD_JOINER = "\u2060"


def _plotly_safe(figure: go.Figure, texts: list[str]) -> None:
    """Escape the user text in ``texts`` (labels that may quote names) wherever the figure shows it: trace names,
    hover templates, titles. One pass over each string, so nothing is escaped twice."""
    risky = sorted({t for t in texts if t and ("%{" in t or any(c in t for c in "<>&"))}, key=len, reverse=True)
    if not risky:
        return
    pattern = re.compile("|".join(re.escape(t) for t in risky))

    def safe(text):
        if not isinstance(text, str):
            return text
        return pattern.sub(lambda m: escape(m.group(0), quote=False).replace("%{", "%" + _WORD_JOINER + "{"), text)

    for trace in figure.data:
        trace.name = safe(trace.name)
        if getattr(trace, "hovertemplate", None):
            trace.hovertemplate = safe(trace.hovertemplate)
        if trace.type == "heatmap" and trace.colorbar.title.text:
            trace.colorbar.title.text = safe(trace.colorbar.title.text)
    layout = figure.layout
    for part in (layout.title, layout.xaxis.title, layout.yaxis.title):
        if part.text:
            part.text = safe(part.text)


def case_table(frame: pd.DataFrame, system: str = "SI") -> pd.DataFrame:
    """A case table for people: each output in its unit (the answer in the unit typed in the unknown's field,
    as on the answer itself); each difference in exactly the unit of the values it subtracts, so a difference
    of temperatures shown in °F is a temperature difference in °F (Δ°F = 1.8 × ΔK) and one in °C is in K."""
    rows = {}
    cases, base = list(frame.attrs["cases"]), frame.attrs["base"]
    differences = {difference_column(name, base): name for name in cases if name != base}
    for name, kind in frame.attrs["kinds"].items():
        header, unit = _output_header(name, kind, system, frame)
        values = frame.loc[name]
        shown = {c: (from_si(values[c], unit, kind) if unit and math.isfinite(values[c]) else values[c])
                 for c in cases}
        rows[header] = {column: shown[column] if column in shown else shown[differences[column]] - shown[base]
                        for column in frame.columns}
    table = pd.DataFrame(rows).T
    table.index.name = "output"
    return table


def case_table_text(frame: pd.DataFrame, system: str = "SI") -> pd.DataFrame:
    """The case table written for people: every number of one output (its cases and differences) with the same
    decimals, four significant figures of the row's largest, thousands separated; a refused case a dash."""
    return case_table(frame, system).apply(_row_text, axis=1)


def _row_text(row: pd.Series) -> pd.Series:
    finite = [float(v) for v in row if math.isfinite(v)]
    decimals = _row_decimals(finite)
    return row.map(lambda v: no_negative_zero(f"{v:,.{decimals}f}") if math.isfinite(v) else NOT_APPLICABLE)


def _row_decimals(values: list[float]) -> int:
    """Decimals giving the largest value four significant figures (none for whole numbers, e.g. a class)."""
    largest = max((abs(v) for v in values), default=0.0)
    if largest == 0 or all(v.is_integer() for v in values):
        return 0
    return max(0, 3 - math.floor(math.log10(largest)))
