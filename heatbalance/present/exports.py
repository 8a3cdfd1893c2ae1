"""Files a user downloads: the worksheet as JSON and the results table as CSV (pure functions returning bytes)."""
from __future__ import annotations

import csv
import io

from ..reactor import CAUTION
from ..results import Result
from ..worksheet import Worksheet, dump_worksheet
from .csv_cells import CSV_QUOTING, CsvNumber, comment_line, csv_cell
from .screening import bears_on_safety, screening_report
from .tables import contribution_rows
from .text import answer_text, format_heat, phrase_text
from .uncertainty import output_uncertainty_lines, uncertainty_text

__all__ = ["worksheet_json_bytes", "results_csv_bytes", "worksheet_filename", "results_filename"]


def worksheet_json_bytes(worksheet: Worksheet) -> bytes:
    """The worksheet as the JSON file the loader reads back (UTF-8, indented, newline-terminated)."""
    return (dump_worksheet(worksheet) + "\n").encode("utf-8")


def results_csv_bytes(result: Result, system: str = "SI") -> bytes:
    """The contribution table as CSV, after ``#`` lines with the title, answer, residual and sign convention.

    UTF-8 with a byte-order mark so spreadsheet programs show ``°C`` and ``−`` correctly;
    read it back with ``pandas.read_csv(..., comment="#", encoding="utf-8-sig")``.
    """
    rows = contribution_rows(result, system)
    out = io.StringIO()
    header = [result.title, f"answer: {result.answer.label} = {answer_text(result.answer, system)}",
              f"closure residual: {format_heat(result.residual, result.basis, system)}",
              f"sign convention: {result.sign_convention}"]
    header += _how_sure_and_how_safe(result, system)
    header += [f"warning: {phrase_text(w, system)}" for w in result.warnings]
    header += [f"assumption: {phrase_text(a, system)}" for a in result.assumptions]  # the gauge reference among them
    out.write("\n".join(comment_line(line) for line in header) + "\n")
    columns = list(rows[0]) if rows else ["item"]
    writer = csv.DictWriter(out, fieldnames=columns, lineterminator="\n", quoting=CSV_QUOTING)
    writer.writeheader()
    for row in rows:
        writer.writerow({k: ("" if v is None else CsvNumber(v) if isinstance(v, float) else csv_cell(v))
                         for k, v in row.items()})
    return out.getvalue().encode("utf-8-sig")


def _how_sure_and_how_safe(result: Result, system: str) -> list[str]:
    """The answer's uncertainty, each vessel's screening and the one caution: a colleague given only the CSV
    sees them too."""
    lines = []
    if getattr(result, "uncertainty", None) is not None:
        lines.append(f"uncertainty: {uncertainty_text(result.uncertainty, system, result.answer)}")
    lines += [f"uncertainty: {text}" for text in output_uncertainty_lines(result, system) if text]
    lines += [f"screening: {line.strip()}" for line in screening_report(getattr(result, "screening", []), system,
                                                                          caution=False)
              if line.strip() and not line.startswith("-")]
    if bears_on_safety(result):
        lines.append(f"caution: {CAUTION}")
    return lines


def slug(title: str) -> str:
    """A title as a file name stem: ``glycol_loop_heater_on_4_barg_steam``."""
    keep = "".join(c if c.isalnum() else "_" for c in title.strip().lower())
    return "_".join(part for part in keep.split("_") if part)[:60] or "worksheet"


def worksheet_filename(worksheet: Worksheet) -> str:
    """``glycol_loop_heater_on_4_barg_steam.json``"""
    return slug(worksheet.title) + ".json"


def results_filename(worksheet: Worksheet) -> str:
    """``glycol_loop_heater_on_4_barg_steam_results.csv``"""
    return slug(worksheet.title) + "_results.csv"
