"""The calculation sheet: a printable, fileable PDF of one solved worksheet (reportlab, vector drawing).

Title, site, job and equipment; revision id and its link; the date and the unit set; every input as typed with
its tolerance; the sign convention; assumptions; property sources and library versions; each line's sensible
and latent heat, the reaction, equipment and loss terms, the closing residual; the answer (± its uncertainty,
with its contributors); warnings and the safety caution; the thermal screening; the energy waterfall; the
sign-offs of the revision ("unchecked" where there are none). A header and "page n of N" on every page.

reportlab was chosen over an HTML-to-PDF route because it is pure Python with no system libraries (the
README's one ``pip install`` is enough), draws the figures as vectors, and its output is deterministic.
User text is escaped once, where it reaches reportlab's paragraph markup (``_plain``), and never where it is drawn
as a string (``_glyphs``: the page header, the charts' labels): it is shown as typed, never interpreted.
"""
from __future__ import annotations

import io
import os
from dataclasses import dataclass, replace
from datetime import datetime, timezone
from xml.sax.saxutils import escape

from reportlab.graphics.shapes import Drawing, Line, Rect, String
from reportlab.lib import colors
from reportlab.lib.pagesizes import A4
from reportlab.lib.styles import ParagraphStyle, getSampleStyleSheet
from reportlab.lib.units import mm
from reportlab.pdfbase import pdfmetrics
from reportlab.pdfbase.ttfonts import TTFont
from reportlab.platypus import KeepTogether, Paragraph, SimpleDocTemplate, Spacer, Table, TableStyle

from .. import address as addresses
from ..errors import HeatBalanceError
from ..links import view_link
from ..reactor import CAUTION
from ..results import SIGN_CONVENTION, Result
from ..worksheet import Quantity, Worksheet
from ..units import from_si, heat_kind
from .exports import slug
from .exchangers import exchanger_rows, utility_rows, zone_rows
from .figures import CLOSING_COLOUR, HEAT_IN_COLOUR, HEAT_OUT_COLOUR, waterfall_steps
from .humid_air import humid_air_rows
from .losses import surface_loss_rows
from .screening import bears_on_safety, screening_report
from .tables import contribution_rows
from .text import (UNIT_SETS, amount_text, answer_text, average_power_text, display_unit, format_heat,
                   no_negative_zero, phrase_text)
from .uncertainty import contribution_rows as uncertainty_rows
from .uncertainty import monte_carlo_text, output_uncertainty_lines, tolerance_text, uncertainty_text

__all__ = ["sheet_pdf_bytes", "sheet_filename", "UNCHECKED", "NOT_PREPARED", "DEFAULT_MARK"]

UNCHECKED = "Unchecked: no sign-off is recorded for this revision."
NOT_PREPARED = ("No 'prepared' sign-off is recorded for this revision: the sign-offs below were recorded before a "
                "check or an approval needed one.")
ROLES = ("prepared", "checked", "approved")
DEFAULT_MARK = " (default)"  # after an input's value when it is the model's default (see _inputs)
LINK_COLOUR = "#1a56c4"
LINK_FONT_SIZES = (7.5, 7, 6.5, 6, 5.5)  # the link's size: the largest that keeps it on one line


# --------------------------------------------------------------------------- fonts and text
_FALLBACK = {"Δ": "Delta ", "Σ": "Sum ", "φ": "phi", "→": "->", "≥": ">=", "≤": "<=", "−": "-"}


def _font() -> tuple[str, str]:
    """A Unicode TrueType font: DejaVu Sans where the system has it, else reportlab's own Vera."""
    if "Sheet" in pdfmetrics.getRegisteredFontNames():
        return "Sheet", "Sheet-Bold"
    import reportlab

    system = "/usr/share/fonts/truetype/dejavu/"
    bundled = os.path.join(os.path.dirname(reportlab.__file__), "fonts")
    if os.path.exists(system + "DejaVuSans.ttf") and os.path.exists(system + "DejaVuSans-Bold.ttf"):
        regular, bold = system + "DejaVuSans.ttf", system + "DejaVuSans-Bold.ttf"
    else:
        regular, bold = os.path.join(bundled, "Vera.ttf"), os.path.join(bundled, "VeraBd.ttf")
    pdfmetrics.registerFont(TTFont("Sheet", regular))
    pdfmetrics.registerFont(TTFont("Sheet-Bold", bold))
    return "Sheet", "Sheet-Bold"


def _glyphs(text) -> str:
    """Text as typed, glyphs the font lacks spelled out: for drawn strings, which read no markup."""
    face = pdfmetrics.getFont(_font()[0]).face
    return "".join(ch if ord(ch) in face.charToGlyph or ch in "\n\t" else _FALLBACK.get(ch, "?") for ch in str(text))


def _plain(text) -> str:
    """User or engine text made safe for a paragraph (which reads markup): escaped once, shown as typed."""
    return escape(_glyphs(text))


def _styles():
    regular, bold = _font()
    base = getSampleStyleSheet()
    body = ParagraphStyle("body", parent=base["BodyText"], fontName=regular, fontSize=8.5, leading=10.5)
    return {
        "body": body,
        "small": ParagraphStyle("small", parent=body, fontSize=7.5, leading=9),
        "cell": ParagraphStyle("cell", parent=body, fontSize=7.5, leading=9),
        "number": ParagraphStyle("number", parent=body, fontSize=7.5, leading=9, alignment=2),
        "h1": ParagraphStyle("h1", parent=base["Heading1"], fontName=bold, fontSize=14, leading=17, spaceAfter=4),
        "h2": ParagraphStyle("h2", parent=base["Heading2"], fontName=bold, fontSize=10.5, leading=13,
                             spaceBefore=8, spaceAfter=3),
        "answer": ParagraphStyle("answer", parent=body, fontName=bold, fontSize=12, leading=15),
        "alarm": ParagraphStyle("alarm", parent=body, fontName=bold, textColor=colors.HexColor("#9b1c1c")),
    }


def _p(text, style) -> Paragraph:
    return Paragraph(_plain(text).replace("\n", "<br/>"), style)


def _table(rows: list[list], widths: list[float], styles, header: bool = True, numbers_from: int | None = None):
    """A ruled table of plain-text cells; columns from ``numbers_from`` on are right-aligned numbers."""
    def cell(c, column: int):
        if isinstance(c, Paragraph):
            return c
        numeric = numbers_from is not None and column >= numbers_from
        return _p(c, styles["number"] if numeric else styles["cell"])

    cells = [[cell(c, j) if i or not header else _p(c, styles["cell"]) for j, c in enumerate(row)]
             for i, row in enumerate(rows)]
    table = Table(cells, colWidths=widths, repeatRows=1 if header else 0)
    style = [("GRID", (0, 0), (-1, -1), 0.25, colors.HexColor("#9aa0a6")),
             ("VALIGN", (0, 0), (-1, -1), "TOP"), ("LEFTPADDING", (0, 0), (-1, -1), 3),
             ("RIGHTPADDING", (0, 0), (-1, -1), 3), ("TOPPADDING", (0, 0), (-1, -1), 1.5),
             ("BOTTOMPADDING", (0, 0), (-1, -1), 1.5)]
    if header:
        style.append(("BACKGROUND", (0, 0), (-1, 0), colors.HexColor("#e8eaed")))
    table.setStyle(TableStyle(style))
    return table


# --------------------------------------------------------------------------- sections
def _identity(ws: Worksheet, revision: str, link: str, system: str, printed: datetime, styles) -> list:
    """Title, tags, revision, its link (a clickable line of its own, never broken inside the id) and the view."""
    tags = ws.tags
    width = 180 * mm
    rows = [["Site", tags.site or "-", "Revision", revision or "not saved: no revision id"],
            ["Link", _link(link, width - 22 * mm - 6, styles), "", ""],
            ["Job", tags.job or "-", "Printed", printed.strftime("%Y-%m-%d %H:%M UTC")],
            ["Equipment", tags.equipment or "-", "Units",
             "SI (°C, kg, kW)" if system == "SI" else "US customary (°F, lb, Btu)"],
            ["Basis", ws.basis.kind + (f", {ws.basis.duration}" if ws.basis.duration else ""), "", ""]]
    table = _table(rows, [22 * mm, 68 * mm, 20 * mm, width - 110 * mm], styles, header=False)
    table.setStyle(TableStyle([("SPAN", (1, 1), (3, 1)), ("SPAN", (1, 4), (3, 4))]))
    return [_p(ws.title, styles["h1"]), table] + ([Spacer(1, 3), _p(ws.notes, styles["small"])] if ws.notes else [])


def _link(link: str, width: float, styles):
    """The link as a clickable paragraph (a URI annotation to exactly ``link``) that is never broken inside its
    query (the revision id): the largest of :data:`LINK_FONT_SIZES` that keeps it on one line; if even the smallest
    does not, the query goes on a line of its own (only the address before it may wrap)."""
    if not link:
        return "-"
    regular = _font()[0]
    size = next((s for s in LINK_FONT_SIZES if pdfmetrics.stringWidth(link, regular, s) <= width),
                LINK_FONT_SIZES[-1])
    base, mark, query = link.partition("?")
    fits = pdfmetrics.stringWidth(link, regular, size) <= width
    text = _plain(link) if fits or not (base and mark) else f"{_plain(base)}<br/>{_plain(mark + query)}"
    style = ParagraphStyle("link", parent=styles["cell"], fontSize=size, leading=size + 1.5)
    href = escape(link, {'"': "&quot;"})
    return Paragraph(f'<a href="{href}" color="{LINK_COLOUR}">{text}</a>', style)


def _answer(result: Result, system: str, styles) -> list:
    out = [_p("Answer", styles["h2"])]
    text = f"{result.answer.label} = {answer_text(result.answer, system)}"
    if result.uncertainty is not None:
        text = f"{result.answer.label} = {uncertainty_text(result.uncertainty, system, result.answer)}"
    out.append(_p(text, styles["answer"]))
    in_view = answer_text(replace(result.answer, typed_unit=None), system)
    if in_view != answer_text(result.answer, system):  # typed in another unit than the view's: both
        out.append(_p(f"= {in_view} (in the sheet's units; the answer is given in the unit typed for it)",
                      styles["body"]))
    average = average_power_text(result, system)
    if average:
        out.append(_p(f"= {average} (the peak, set by the dosing or heating rate, is higher)", styles["body"]))
    out.append(_p(f"Closure residual: {format_heat(result.residual, result.basis, system)} (zero when the "
                  "balance closes)", styles["body"]))
    return out


def _warnings(ws: Worksheet, result: Result, system: str, styles) -> list:
    out = [_p("Warnings and cautions", styles["h2"])]
    warnings = [phrase_text(w, system) for w in result.warnings]
    alarms = [phrase_text(a, system) for s in result.screening for a in s.alarms]
    caution = bears_on_safety(result)  # a vessel, a reaction, a hot surface: the one rule of every output
    out += [_p(f"ALARM: {a}", styles["alarm"]) for a in alarms]
    out += [_p(f"• {w}", styles["body"]) for w in warnings]
    if caution:
        out.append(_p(f"Safety: {CAUTION}", styles["alarm"]))
    if not (alarms or warnings or caution):  # said only when the section holds nothing else
        out.append(_p("No warnings.", styles["body"]))
    return out


def _inputs(ws: Worksheet, styles) -> list:
    tolerances = {t.address: t for t in ws.tolerances}
    rows = [["input", "as typed", "tolerance", "address"]]
    defaults = 0
    for entry in addresses.inputs(ws):
        value = "? (the unknown)" if entry.is_unknown else _typed(entry.value, entry.kinds)
        if not entry.is_unknown and _is_default(ws, entry.address, entry.value):
            value, defaults = value + DEFAULT_MARK, defaults + 1
        tolerance = tolerances.get(entry.address)
        rows.append([addresses.label(entry.address), value,
                     tolerance_text(_Tol(tolerance)) if tolerance else "", entry.address])
    materials = [[f"{s.name}", s.material + (f", mass fraction {s.mass_fraction:g}" if s.mass_fraction else "")]
                 for s in ws.streams]
    materials += [[f"{v.name} / {c.name}", c.material + (f", mass fraction {c.mass_fraction:g}" if c.mass_fraction
                                                          else "")] for v in ws.vessels for c in v.charges]
    materials += [[f"{v.name} equipment", v.equipment.material or f"heat capacity {v.equipment.heat_capacity}"]
                  for v in ws.vessels if v.equipment]
    materials += [[f"reaction {r.name}", r.equation or f"ΔH {r.enthalpy}"] for r in ws.reactions]
    materials += [[f"mixing {m.name}", f"solute {m.solute}" + (f", in {m.vessel}" if m.vessel else "")]
                  for m in ws.mixings]
    out = [_p("Inputs (as typed)", styles["h2"]), _table(rows, [52 * mm, 30 * mm, 38 * mm, 60 * mm], styles)]
    if defaults:
        out.append(_p(f"{DEFAULT_MARK.strip()}: the value the program uses when the field is left empty; the sheet "
                      "cannot tell it from the same value typed (both are the same worksheet, with the same revision "
                      "id).", styles["small"]))
    if materials:
        out += [Spacer(1, 4), _table([["line", "material / equation"], *materials], [60 * mm, 120 * mm], styles)]
    return out


_NO_DEFAULT = object()


def _default(ws: Worksheet, address: str):
    """The model's default of the field at ``address`` (a number or a quantity), or ``_NO_DEFAULT``."""
    try:
        steps = addresses.parse(address)
        node = ws
        for field_name, name in steps[:-1]:
            node = getattr(node, field_name)
            if name is not None:
                node = next(x for x in node if x.name == name)
        info = type(node).model_fields.get(steps[-1][0])
    except (HeatBalanceError, AttributeError, StopIteration):
        return _NO_DEFAULT
    if info is None or info.is_required():
        return _NO_DEFAULT
    value = info.get_default(call_default_factory=True)
    return value if isinstance(value, (Quantity, int, float)) and not isinstance(value, bool) else _NO_DEFAULT


def _is_default(ws: Worksheet, address: str, value) -> bool:
    """Whether an input holds its field's default (so was not, or need not have been, typed).

    A worksheet's identity leaves defaults out (:func:`heatbalance.links.canonical_json`): a value typed equal to
    its default is the same revision, so it is marked the same way and every copy of a revision prints alike.
    """
    default = _default(ws, address)
    return default is not _NO_DEFAULT and value is not None and value == default


@dataclass
class _Tol:
    """A tolerance alone, shaped for present.uncertainty.tolerance_text."""

    tolerance: object


def _typed(value, kinds: tuple = ()) -> str:
    """A value as typed; a fraction also as a percentage, as the page's fields show some of them (0.5 (50 %))."""
    if isinstance(value, Quantity):
        return f"{value.value:g} {display_unit(value.unit)}"
    if value is None:
        return ""
    return f"{value:g} ({value * 100:.4g} %)" if kinds == (addresses.FRACTION,) else f"{value:g}"


def _conventions(result: Result, styles, system: str = "SI") -> list:
    out = [_p("Sign convention", styles["h2"]), _p(SIGN_CONVENTION, styles["body"]), _p("Assumptions", styles["h2"])]
    out += [_p(f"• {phrase_text(a, system)}", styles["body"]) for a in result.assumptions]
    out.append(_p("Property data and versions", styles["h2"]))
    out += [_p(f"• {name}: {source}", styles["body"]) for name, source in result.sources.items()]
    out.append(_p("Libraries: " + ", ".join(f"{k} {v}" for k, v in result.versions.items()), styles["body"]))
    return out


def _contributions(result: Result, system: str, styles) -> list:
    rows = contribution_rows(result, system)
    unit = display_unit(UNIT_SETS[system][heat_kind(result.basis)])
    table = [["item", "type", "from / detail", "to", f"sensible absorbed [{unit}]", f"latent absorbed [{unit}]",
              f"heat into process [{unit}]"]]
    for row in rows:
        heats = [v for k, v in row.items() if "[" in k]
        table.append([row["item"], row["type"], row["from"], row["to"],
                      *("" if v is None else no_negative_zero(f"{v:,.2f}") for v in heats)])
    return [_p("Every contribution (heat into the process; a line that absorbs heat shows as −)", styles["h2"]),
            _table(table, [24 * mm, 15 * mm, 44 * mm, 33 * mm, 21 * mm, 21 * mm, 22 * mm], styles, numbers_from=4)]


def _uncertainty(result: Result, system: str, styles) -> list:
    u = result.uncertainty
    if u is None:
        return []
    rows = uncertainty_rows(u, system, result.answer)
    heading = [c for c in rows[0] if c not in ("address",)] if rows else []
    table = [heading] + [[r[c] if not isinstance(r[c], float) else amount_text(r[c]) for c in heading] for r in rows]
    out = [_p("How sure is the answer (GUM, linear propagation)", styles["h2"]),
           _p(uncertainty_text(u, system, result.answer), styles["body"])]
    out += [_p(line, styles["body"]) for line in output_uncertainty_lines(result, system)]
    if rows:
        table[0] = [h.replace("contribution", "part") for h in table[0]]
        out.append(_table(table, [34 * mm, 18 * mm, 24 * mm, 42 * mm, 16 * mm, 18 * mm, 12 * mm, 16 * mm], styles))
    out += [_p(f"• {phrase_text(n, system)}", styles["small"]) for n in u.notes]
    if u.monte_carlo is not None:
        out.append(_p(monte_carlo_text(u, system, result.answer), styles["small"]))
    return out


def _screening(result: Result, system: str, styles) -> list:
    if not result.screening:
        return []
    lines = screening_report(result.screening, system, caution=False)  # the caution is shown once, above
    return [_p("Thermal screening", styles["h2"])] + [_p(line, styles["small"]) for line in lines if line.strip()]


def _waterfall(result: Result, system: str, styles) -> list:
    """The energy waterfall drawn as vectors: bars from the running sum, labelled, closing at zero."""
    steps = waterfall_steps(result, system)
    width, height, left, bottom = 180 * mm, 70 * mm, 18 * mm, 14 * mm
    running, spans = 0.0, []
    for step in steps[:-1]:
        spans.append((running, running + step["heat"], step))
        running += step["heat"]
    spans.append((0.0, steps[-1]["heat"], steps[-1]))
    low = min(0.0, *(min(a, b) for a, b, _ in spans))
    high = max(0.0, *(max(a, b) for a, b, _ in spans))
    scale = (height - bottom - 8) / ((high - low) or 1.0)
    drawing = Drawing(width, height)
    bar = (width - left) / len(spans)

    def y(v: float) -> float:
        return bottom + (v - low) * scale

    drawing.add(Line(left, y(0), width, y(0), strokeColor=colors.black, strokeWidth=0.6))
    regular = _font()[0]
    for i, (a, b, step) in enumerate(spans):
        colour = CLOSING_COLOUR if i == len(spans) - 1 else HEAT_IN_COLOUR if b >= a else HEAT_OUT_COLOUR
        x = left + i * bar + bar * 0.15
        drawing.add(Rect(x, min(y(a), y(b)), bar * 0.7, max(abs(y(b) - y(a)), 0.5),
                         fillColor=colors.HexColor(colour), strokeColor=None))
        name = _glyphs(step["label"])[:18]
        drawing.add(String(x, 2, name, fontName=regular, fontSize=6))
        shown = step["heat"] if abs(step["heat"]) > 1e-9 * (high - low or 1.0) else 0.0  # the closing sum: 0
        drawing.add(String(x, max(y(a), y(b)) + 1.5, no_negative_zero(amount_text(shown)), fontName=regular,
                           fontSize=6))
    unit = display_unit(UNIT_SETS[system][heat_kind(result.basis)])
    drawing.add(String(0, height - 6, f"[{unit}]", fontName=regular, fontSize=7))
    return [KeepTogether([_p("Energy waterfall (heat into the process; the sum closes at zero)", styles["h2"]),
                          drawing])]


def _cases(ws: Worksheet, system: str, styles) -> list:
    """The worksheet's named cases side by side (what if), when it has any."""
    if not ws.cases:
        return []
    from ..analyses.cases import run_cases
    from .whatif import case_table_text

    frame = run_cases(ws)
    table = case_table_text(frame, system)
    names = list(frame.attrs["cases"])
    rows = [["output", *names]] + [[index, *(table.loc[index, n] for n in names)] for index in table.index]
    width = 180 * mm
    out = [_p("Cases (what if)", styles["h2"]),
           _table(rows, [52 * mm] + [(width - 52 * mm) / len(names)] * len(names), styles, numbers_from=1)]
    for case in ws.cases:
        overrides = "; ".join(f"{addresses.label(o.address)} = {_typed(o.value)}" for o in case.overrides)
        out.append(_p(f"{case.name}: {overrides}" + (f" ({case.notes})" if case.notes else ""), styles["small"]))
    for name, exc in frame.attrs["refusals"].items():
        out.append(_p(f"{name}: not solved: {exc.where}: {phrase_text(exc.phrase, system)}", styles["alarm"]))
    return out


def _exchangers(result: Result, system: str, styles) -> list:
    """Each exchanger's check (approach, UA, zones, rating) with its T–Q chart, and the utilities side by side."""
    checks, tables = getattr(result, "exchangers", []) or [], getattr(result, "utilities", []) or []
    out = []
    for check in checks:
        rows = [["quantity", "value", "note"]] + [[r["quantity"], r["value"], r["note"]]
                                                  for r in exchanger_rows(check, system)]
        out += [_p(f"Exchanger {check.name}: hot {', '.join(check.hot)}; cold {', '.join(check.cold)}", styles["h2"]),
                _table(rows, [45 * mm, 35 * mm, 100 * mm], styles)]
        zones = zone_rows(check, system)
        if zones:
            heading = list(zones[0])
            body = [[r[c] for c in heading] for r in zones]
            out += [Spacer(1, 3), _table([heading, *body], [180 * mm / len(heading)] * len(heading), styles)]
        out += [_p(f"• {phrase_text(n, system)}", styles["small"]) for n in check.notes]
        out.append(_tq_drawing(check, system))
    for table in tables:
        rows = utility_rows(table, system)
        if not rows:
            continue
        heading = [c for c in rows[0] if c != "source"]
        body = [[r[c] for c in heading] for r in rows]
        out += [_p(f"Utilities for {table.demand.label}", styles["h2"]),
                _table([heading, *body], [180 * mm / len(heading)] * len(heading), styles)]
    return out


def _losses_and_air(result: Result, system: str, styles) -> list:
    """The computed surface losses (with the protection thickness) and the humid-air lines' water, as tables."""
    out = []
    for title, rows, skip in (("Surface losses (computed from geometry)", surface_loss_rows(result, system),
                               ("address", "method", "area")),
                              ("Humid air (per kg of dry air)", humid_air_rows(result, system), ("address",))):
        if rows:
            heading = [c for c in rows[0] if c not in skip]
            out += [_p(title, styles["h2"]),
                    _table([heading, *[[r[c] for c in heading] for r in rows]],
                           [180 * mm / len(heading)] * len(heading), styles)]
    return out


def _tq_drawing(check, system: str) -> Drawing:
    """The T–Q chart as vectors: the hot curve above the cold one against heat from the cold end."""
    width, height, left, bottom = 180 * mm, 62 * mm, 16 * mm, 10 * mm
    unit = UNIT_SETS[system]["temperature"]
    points = [(x, from_si(T, unit, "temperature")) for x, T in check.hot_curve + check.cold_curve]
    x_max = max(x for x, _ in points) or 1.0
    t_low, t_high = min(t for _, t in points), max(t for _, t in points)
    span = (t_high - t_low) or 1.0
    drawing = Drawing(width, height)
    regular = _font()[0]

    def xy(x: float, t: float) -> tuple[float, float]:
        return left + (width - left - 4) * x / x_max, bottom + (height - bottom - 10) * (t - t_low) / span

    for curve, colour in ((check.hot_curve, HEAT_IN_COLOUR), (check.cold_curve, HEAT_OUT_COLOUR)):
        shown = [xy(x, from_si(T, unit, "temperature")) for x, T in curve]
        for (x0, y0), (x1, y1) in zip(shown, shown[1:]):
            drawing.add(Line(x0, y0, x1, y1, strokeColor=colors.HexColor(colour), strokeWidth=1.2))
    drawing.add(Line(left, bottom, width, bottom, strokeColor=colors.black, strokeWidth=0.5))
    drawing.add(Line(left, bottom, left, height - 6, strokeColor=colors.black, strokeWidth=0.5))
    drawing.add(String(0, height - 8, f"T [{display_unit(unit)}]", fontName=regular, fontSize=6.5))
    low, high = (no_negative_zero(f"{t:.0f}") for t in (t_low, t_high))
    for t, shown in ((t_low, low), (t_high, high)):
        drawing.add(String(0, xy(0.0, t)[1] - 2, shown, fontName=regular, fontSize=6.5))
    drawing.add(String(left, height - 8, f"{_glyphs(check.name)}: T-Q chart (red: hot side, blue: cold side), "
                       f"{low} to {high} {display_unit(unit)}", fontName=regular, fontSize=6.5))
    drawing.add(String(width - 60 * mm, 1, "heat from the cold end →".replace("→", "->"), fontName=regular,
                       fontSize=6.5))
    return drawing


def _signoffs(signoffs: list, styles) -> list:
    out = [_p("Sign-off", styles["h2"])]
    if not signoffs:
        out.append(_p(UNCHECKED, styles["alarm"]))
    elif not any(s.role == ROLES[0] for s in signoffs):  # kept as recorded before a check needed a preparer
        out.append(_p(NOT_PREPARED, styles["alarm"]))
    rows = [["role", "name", "date (UTC)", "comment"]]
    by_role = {role: [s for s in signoffs if s.role == role] for role in ROLES}
    for role in ROLES:
        for s in by_role[role] or [None]:
            rows.append([role, s.name if s else "", s.signed_at.strftime("%Y-%m-%d %H:%M") if s else "",
                         s.comment if s else ""])
    out.append(_table(rows, [22 * mm, 45 * mm, 30 * mm, 83 * mm], styles))
    return out


# --------------------------------------------------------------------------- the document
def sheet_pdf_bytes(ws: Worksheet, result: Result, system: str = "SI", revision: str = "", link: str = "",
                    signoffs: list | None = None, printed: datetime | None = None) -> bytes:
    """The calculation sheet of a solved worksheet as PDF bytes (A4).

    ``link``: the revision's ``?ws=`` link, printed clickable with ``units=`` of ``system`` (:func:`view_link`).
    ``signoffs``: the revision's sign-offs, records with ``role``, ``name``, ``signed_at`` and ``comment``
    (:class:`heatbalance.store.SignOff`); none prints "unchecked".
    """
    styles = _styles()
    printed = printed or datetime.now(timezone.utc)
    link = view_link(link, system)  # it opens the page in the sheet's unit set
    story = []
    for section in (_identity(ws, revision, link, system, printed, styles), _answer(result, system, styles),
                    _warnings(ws, result, system, styles), _inputs(ws, styles), _contributions(result, system, styles),
                    _uncertainty(result, system, styles), _cases(ws, system, styles), _exchangers(result, system, styles),
                    _losses_and_air(result, system, styles),
                    _screening(result, system, styles),
                    _waterfall(result, system, styles), _conventions(result, styles, system),
                    _signoffs(signoffs or [], styles)):
        story += section
    buffer = io.BytesIO()
    header = _glyphs(f"{ws.title} | {ws.tags.job or 'no job'} | {ws.tags.equipment or 'no equipment tag'} | "
                    f"revision {revision or 'not saved'}")
    document = SimpleDocTemplate(buffer, pagesize=A4, leftMargin=15 * mm, rightMargin=15 * mm, topMargin=18 * mm,
                                 bottomMargin=15 * mm, title=ws.title, author="heat-balance worksheet",
                                 subject=f"calculation sheet, revision {revision or 'not saved'}")
    document.build(story, canvasmaker=_numbered(header))
    return buffer.getvalue()


def _numbered(header: str):
    """A canvas that writes the header and 'page n of N' on every page (N known once all are laid out)."""
    from reportlab.pdfgen.canvas import Canvas

    class NumberedCanvas(Canvas):
        def __init__(self, *args, **kwargs):
            super().__init__(*args, **kwargs)
            self._pages = []

        def showPage(self):
            self._pages.append(dict(self.__dict__))
            self._startPage()

        def save(self):
            total = len(self._pages)
            for state in self._pages:
                self.__dict__.update(state)
                regular = _font()[0]
                self.setFont(regular, 7)
                self.setFillColor(colors.HexColor("#5f6368"))
                self.drawString(15 * mm, A4[1] - 11 * mm, header[:150])
                self.drawRightString(A4[0] - 15 * mm, 8 * mm, f"page {self._pageNumber} of {total}")
                self.line(15 * mm, A4[1] - 12.5 * mm, A4[0] - 15 * mm, A4[1] - 12.5 * mm)
                super().showPage()
            super().save()

    return NumberedCanvas


def sheet_filename(ws: Worksheet, revision: str = "") -> str:
    """``toluene_overhead_condenser_rev_1a2b3c.pdf``"""
    stem = slug(ws.title)
    return f"{stem}_rev_{revision[:8]}.pdf" if revision else f"{stem}_unsaved.pdf"
