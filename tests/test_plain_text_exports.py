"""User text is plain text in every export and view: CSV cells never read as spreadsheet formulas, names and
titles never carrying control characters into a report or a terminal, figures that show names as names, page
widgets that show names as text (a review's findings, each test failing before its fix)."""
from __future__ import annotations

import csv
import io
import json
import re
import subprocess
import sys
from pathlib import Path

import pytest

from heatbalance.balance import solve
from heatbalance.worksheet import parse_worksheet

ROOT = Path(__file__).resolve().parent.parent
GLYCOL = ROOT / "sample_data" / "steam_heater_glycol.json"
FORMULA = '=HYPERLINK("http://example.invalid/x","open")'
FORMULA_STARTS = ("=", "+", "-", "@", "\t", "\r")


def _glycol(**changes) -> dict:
    doc = json.loads(GLYCOL.read_text(encoding="utf-8"))
    doc.update(changes)
    return doc


def _hostile_glycol() -> dict:
    """The glycol heater with a stream, the unknown's stream and the loss named like spreadsheet formulas."""
    doc = _glycol()
    doc["streams"][0]["name"] = FORMULA
    doc["streams"][1]["name"] = "@SUM(1+1)"
    doc["unknowns"] = [{"kind": "amount", "line": "@SUM(1+1)"}]
    doc["losses"][0]["name"] = "+cmd|' /C calc'!A0"
    return doc


def _is_number(text: str) -> bool:
    try:
        float(text)
    except ValueError:
        return False
    return True


def _formula_cells(text: str) -> list[str]:
    """Every CSV cell (header included, ``#`` comment lines left out) a spreadsheet would read as a formula:
    text (not a number) starting with = + - @, a tab or a carriage return."""
    lines = [line for line in text.splitlines() if not line.startswith("#")]
    cells = [cell for row in csv.reader(io.StringIO("\n".join(lines))) for cell in row]
    return [c for c in cells if c.startswith(FORMULA_STARTS) and not _is_number(c)]


# ----------------------------------------------------------------------------------------------- CSV exports
def test_results_csv_cells_never_start_a_spreadsheet_formula():
    """heatbalance/present/exports.py: results_csv_bytes writes names as typed, so a stream named
    '=HYPERLINK(...)' is a live formula (a link, or a DDE command) when the CSV is opened in a spreadsheet."""
    from heatbalance.present.exports import results_csv_bytes

    text = results_csv_bytes(solve(parse_worksheet(_hostile_glycol()))).decode("utf-8-sig")
    assert _formula_cells(text) == []
    # the names are still there, as text
    assert "HYPERLINK" in text and "SUM(1+1)" in text


def test_a_csv_comment_line_never_breaks():
    """A '#' header line of the results CSV stays one line, whatever line break its text holds (a spreadsheet and
    pandas split lines on CR as well as LF), and one cell (a review's finding: a comma split it)."""
    from heatbalance.present.csv_cells import comment_line
    from heatbalance.present.exports import results_csv_bytes

    assert comment_line("Heater\r=1+1\nmore") == "# Heater =1+1 more"
    # a title with a comma: one cell, so no '=...' cell after it; a number's thousands stay in one cell too
    doc = _glycol(title='Heater,=HYPERLINK("http://example.invalid/x","open")')
    text = results_csv_bytes(solve(parse_worksheet(doc))).decode("utf-8-sig")
    header = [line for line in text.splitlines() if line.startswith("#")]
    assert all(len(row) == 1 for row in csv.reader(io.StringIO("\n".join(header))))


def test_sweep_csv_cells_never_start_a_spreadsheet_formula():
    """heatbalance/present/whatif.py: sweep_csv_bytes writes the axis header ('<name> flow [t/h]') and the
    warnings column ('<name> changes phase ...') starting with the user's name, as typed."""
    from heatbalance.analyses.sweep import Axis, sweep
    from heatbalance.present.whatif import sweep_csv_bytes

    ws = parse_worksheet(_hostile_glycol())
    frame = sweep(ws, [Axis(f"streams[{FORMULA}].flow", (6.0, 12.0), "t/h")])
    text = sweep_csv_bytes(frame).decode("utf-8-sig")
    assert _formula_cells(text) == []


def test_case_table_csv_from_the_command_line_never_starts_a_spreadsheet_formula(tmp_path):
    """heatbalance/cli.py (_cases): the case table's CSV has the case names as column headers and the output
    labels (which start with user names) as its first column, as typed."""
    doc = _hostile_glycol()
    doc["cases"] = [{"name": '=HYPERLINK("http://example.invalid/case","c")',
                     "overrides": [{"address": f"streams[{FORMULA}].flow", "value": "10 t/h"}]}]
    path = tmp_path / "cases.json"
    path.write_text(json.dumps(doc), encoding="utf-8")
    run = subprocess.run([sys.executable, "-m", "heatbalance", "cases", str(path), "--csv"], cwd=ROOT,
                         capture_output=True, text=True, timeout=300)
    assert run.returncode == 0, run.stderr
    assert _formula_cells(run.stdout) == []


# --------------------------------------------------------------------- control characters, refused at their field
@pytest.mark.parametrize("field, text, where", [
    ("title", "Heater\nANSWER  Steam flow = 2.0 kg/h", "title"),  # would print a forged ANSWER line
    ("title", "Heater \x1b]8;;http://example.invalid/\x07click\x1b]8;;\x07", "title"),  # OSC 8: a terminal link
    ("stream", "Glycol\x1b[31m", "streams[Glycol<U+001B>[31m].name"),  # ESC colours the terminal; shown as its code
    ("stream", "Glycol\u202e", "streams[Glycol<U+202E>].name"),  # a direction override shows text reversed
    ("title", "Heater\u0000rev 2", "title"),  # NUL: PostgreSQL cannot store it
])
def test_a_name_or_title_with_a_control_character_is_refused_at_its_field(field, text, where):
    """The report, the terminal and the team server's store never meet a control character: a name or a title
    holding one is refused when the worksheet is read, at its field, the character named by its code."""
    from heatbalance.errors import WorksheetFormatError

    doc = _glycol(title=text) if field == "title" else _glycol()
    if field == "stream":
        doc["streams"][0]["name"] = text
    with pytest.raises(WorksheetFormatError) as refused:
        parse_worksheet(doc)
    assert refused.value.where == where
    assert "holds a control character (U+" in refused.value.message
    assert not any(ord(c) < 32 or c == "\u202e" for c in refused.value.message)  # the refusal itself is safe to print


def test_names_in_a_list_and_line_separators_are_refused_too():
    """A review's finding: an exchanger's list of hot lines was not checked, and U+2028 (a line break to editors
    and str.splitlines) passed in a title."""
    from heatbalance.errors import WorksheetFormatError

    doc = json.loads((ROOT / "sample_data" / "glycol_cooler_rated.json").read_text(encoding="utf-8"))
    doc["exchangers"][0]["hot"] = ["Glycol\x1b[31m"]
    with pytest.raises(WorksheetFormatError, match=r"holds a control character \(U\+001B"):
        parse_worksheet(doc)
    with pytest.raises(WorksheetFormatError, match=r"U\+2028, a line break") as refused:
        parse_worksheet(_glycol(title="Heater\u2028ANSWER"))
    assert refused.value.where == "title"


def test_notes_keep_their_line_breaks_and_tabs():
    ws = parse_worksheet(_glycol(notes="first line\nsecond\tline"))
    assert ws.notes == "first line\nsecond\tline"


# ------------------------------------------------------------------------------------------------- figures
def test_the_waterfall_shows_names_that_look_like_numbers_as_names():
    """heatbalance/present/figures.py (energy_waterfall): the x axis has no type, so plotly.js guesses it from
    the names: streams named by line number ('101', '102') beside two other bars make a linear axis (numbers
    count as many as the names), the other bars get no place and vanish; a name like '2024-05-01' makes a date
    axis. The names are categories, whatever they look like."""
    from heatbalance.present.figures import energy_waterfall

    doc = _glycol()
    doc["streams"][0]["name"], doc["streams"][1]["name"] = "101", "102"
    doc["unknowns"] = [{"kind": "amount", "line": "102"}]
    figure = energy_waterfall(solve(parse_worksheet(doc)))
    assert figure.layout.xaxis.type == "category"


def test_the_sweep_chart_hover_uses_only_its_own_template_fields():
    """heatbalance/present/whatif.py (sweep_figure): the axis label (a user name) is put into the hover
    template as template text, so a name holding '%{y}' is replaced by a number in the hover box."""
    from heatbalance.analyses.sweep import Axis, sweep
    from heatbalance.present.whatif import sweep_figure

    doc = _glycol()
    doc["streams"][0]["name"] = "Glycol %{y} loop"
    ws = parse_worksheet(doc)
    frame = sweep(ws, [Axis("streams[Glycol %{y} loop].flow", (6.0, 12.0), "t/h")])
    figure = sweep_figure(frame)
    for trace in figure.data:
        fields = re.findall(r"%\{[^}]*\}", trace.hovertemplate or "")
        assert sorted(fields) == sorted(["%{x:.4g}", "%{y:.4g}"]) or not fields, (trace.name, fields)


# ------------------------------------------------------------------------------------------ page (AppTest)
HOSTILE_LINE = "![i](http://example.invalid/i.png) **bold** :red[red]"


def test_the_undo_deletion_button_shows_the_deleted_line_name_as_text():
    """webapp/answer.py:134: st.button(f"Undo: bring back {line}") puts the deleted line's name in a button
    label, which Streamlit reads as Markdown (bold, links, coloured text and images: an image fetched from
    any address)."""
    from page_helpers import edit, page

    from heatbalance import address

    ws = parse_worksheet(_glycol())
    ws = address.rename(ws, "streams[Steam]", HOSTILE_LINE)
    at = page(ws)
    at = edit(at, "streams", {"deleted_rows": [1]})
    label = at.button(key="undo_deletion").label
    assert "![i](" not in label and "**bold**" not in label and ":red[" not in label, label


def test_the_remove_tolerance_tooltip_shows_the_name_as_text():
    """webapp/uncertainty_panel.py:288: help=f"Remove the tolerance on {_label(t.address)}" puts a user name
    in a tooltip, which Streamlit reads as Markdown."""
    from page_helpers import page

    from heatbalance import address

    doc = _glycol()
    doc["tolerances"] = [{"address": "streams[Glycol].flow", "percent": 1.5}]
    ws = address.rename(parse_worksheet(doc), "streams[Glycol]", HOSTILE_LINE)
    at = page(ws)
    helps = [b.help for b in at.button if b.key and b.key.startswith("uncert_remove_")]
    assert helps, "the tolerance's remove button is drawn"
    for text in helps:
        assert "![i](" not in text and "**bold**" not in text and ":red[" not in text, text


def test_a_name_with_a_hash_reads_back_from_every_csv():
    """A plant engineer's finding: 'Glykol #2' cut its row (results CSV) or shifted every column (sweep CSV) for a
    reader that skips the '#' lines (pandas read_csv(comment='#')). Text cells are quoted now."""
    import pandas as pd

    from heatbalance.analyses.sweep import Axis, sweep
    from heatbalance.present.exports import results_csv_bytes
    from heatbalance.present.whatif import sweep_csv_bytes

    doc = _glycol()
    doc["streams"][0]["name"] = "Glykol #2"
    ws = parse_worksheet(doc)
    table = pd.read_csv(io.BytesIO(results_csv_bytes(solve(ws))), comment="#", encoding="utf-8-sig")
    row = table[table["item"] == "Glykol #2"].iloc[0]
    # the engine's own line heat (consistency), to the ten figures written
    assert row["heat into process [kW]"] == pytest.approx(-solve(ws).lines[0].total / 1e3, rel=1e-9)
    frame = sweep(ws, [Axis("streams[Glykol #2].flow", (6.0, 12.0), "t/h")])
    read = pd.read_csv(io.BytesIO(sweep_csv_bytes(frame)), comment="#", encoding="utf-8-sig")
    assert list(read.columns)[:2] == ["Glykol #2 flow [t/h]", "Steam flow [kg/h]"] and len(read) == 2
