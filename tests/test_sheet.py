"""The calculation sheet (issue 15, part 2): a PDF an engineer can file.

Its text is read back with ``pypdf`` (a PDF library independent of the one that writes it) and its pages are
rendered with ``pypdfium2`` (PDFium) to check that every page draws at A4 size.
"""
from __future__ import annotations

import io
import re
from datetime import datetime, timezone

import pypdf
import pypdfium2
import pytest

from heatbalance import address as A
from heatbalance.analyses import solve_and_analyse
from heatbalance.present.sheet import UNCHECKED, sheet_filename, sheet_pdf_bytes
from heatbalance.present.text import answer_text
from heatbalance.present.uncertainty import uncertainty_text
from heatbalance.reactor import CAUTION
from heatbalance.store import SignOff
from heatbalance.worksheet import Quantity, load_worksheet, parse_worksheet

CONDENSER = "sample_data/solvent_condenser_cooling_water.json"
REACTOR = "sample_data/glycol_hydration_screening.json"
REVISION = "0123456789abcdef01234567"
A4_POINTS = (595.28, 841.89)


def sample(path):
    return load_worksheet(open(path, "rb").read())


def text_of(pdf: bytes) -> str:
    """All the text of a PDF, whitespace folded (table cells wrap lines)."""
    reader = pypdf.PdfReader(io.BytesIO(pdf))
    return " ".join(" ".join((page.extract_text() or "").split()) for page in reader.pages)


def folded(text: str) -> str:
    return " ".join(text.split())


@pytest.mark.parametrize("path, system", [(CONDENSER, "SI"), (REACTOR, "US")])
def test_the_sheet_holds_the_revision_every_input_and_the_answer(path, system):
    ws = sample(path)
    result = solve_and_analyse(ws)
    pdf = sheet_pdf_bytes(ws, result, system, revision=REVISION, link=f"https://sheets.example.invalid/?ws={REVISION}")
    text = text_of(pdf)
    assert REVISION in text and ws.title in text
    shown = uncertainty_text(result.uncertainty, system, result.answer) if result.uncertainty is not None else \
        answer_text(result.answer, system)
    assert f"{result.answer.label} = {shown}" in text
    for entry in A.inputs(ws):
        assert A.label(entry.address) in text, entry.address
        if isinstance(entry.value, Quantity) and not entry.is_unknown:
            assert f"{entry.value.value:g}" in text, entry.address
    for phrase in ("Sign convention", "Assumptions", "Property data and versions", "Every contribution",
                   "Closure residual", "Energy waterfall", "Sign-off", UNCHECKED):
        assert phrase in text, phrase
    pages = len(pypdf.PdfReader(io.BytesIO(pdf)).pages)
    assert re.findall(r"page (\d+) of (\d+)", text) == [(str(i), str(pages)) for i in range(1, pages + 1)]


def test_the_reactor_sheet_carries_the_caution_once_and_the_screening():
    ws = sample(REACTOR)
    text = text_of(sheet_pdf_bytes(ws, solve_and_analyse(ws), "SI"))
    assert text.count(folded(CAUTION)) == 1
    assert "Thermal screening" in text and "MTSR" in text and "not saved" in text


def test_a_fraction_input_is_printed_with_its_percentage():
    """A shift engineer's finding: the panel shows the accumulation in %, the sheet printed '0.5'."""
    ws = A.with_value(sample(REACTOR), "vessels[R-7].screening.accumulation", 0.5)
    text = text_of(sheet_pdf_bytes(ws, solve_and_analyse(ws), "SI"))
    assert "0.5 (50 %)" in text


def test_the_uncertainty_and_the_cases_are_on_the_sheet():
    ws = sample(CONDENSER)
    result = solve_and_analyse(ws)
    text = text_of(sheet_pdf_bytes(ws, result, "SI"))
    assert "± " in text and "(k = 2, about 95 %)" in text and "resistance thermometer" in text
    assert "Cases (what if)" in text and "summer" in text and "winter" in text


def test_sign_offs_are_printed_with_their_names_and_dates():
    ws = sample(CONDENSER)
    signed = [SignOff(REVISION, "prepared", "A. Engineer", datetime(2026, 12, 1, 9, 30, tzinfo=timezone.utc), "first issue"),
              SignOff(REVISION, "checked", "B. Checker", datetime(2026, 12, 2, 14, 0, tzinfo=timezone.utc), "agreed")]
    text = text_of(sheet_pdf_bytes(ws, solve_and_analyse(ws), "SI", revision=REVISION, signoffs=signed))
    assert "A. Engineer" in text and "2026-12-01 09:30" in text and "B. Checker" in text and "agreed" in text
    assert UNCHECKED not in text


def test_every_page_renders_at_a4():
    ws = sample(REACTOR)
    document = pypdfium2.PdfDocument(sheet_pdf_bytes(ws, solve_and_analyse(ws), "US"))
    assert len(document) >= 2
    for page in document:
        assert page.get_size() == pytest.approx(A4_POINTS, abs=0.5)
        image = page.render(scale=1).to_pil()
        assert image.size == (596, 842)
        assert image.convert("L").getextrema()[0] < 100  # something dark is drawn: text, rules, bars


def test_user_text_is_printed_as_text_not_markup():
    ws = parse_worksheet({
        "title": "<b>bold</b> & <font color='red'>red</font>", "notes": "<a href='http://example.invalid'>x</a>",
        "streams": [{"name": "A<br/>B", "material": "water", "flow": "1 t/h", "inlet": {"temperature": "20 degC"},
                     "outlet": {"temperature": "30 degC"}}],
        "duties": [{"name": "H"}], "unknowns": [{"kind": "duty", "term": "H"}]})
    pdf = sheet_pdf_bytes(ws, solve_and_analyse(ws), "SI")
    text = text_of(pdf)
    assert "<b>bold</b> & <font color='red'>red</font>" in text and "A<br/>B" in text
    assert b"/URI" not in pdf  # no link was made from the notes


def test_the_hostile_sheet_prints_every_user_text_exactly_as_typed():
    from test_plain_text_browser import TEXTS, TITLE, hostile_worksheet

    ws = hostile_worksheet()
    pdf = sheet_pdf_bytes(ws, solve_and_analyse(ws), "SI")
    pages = [folded(page.extract_text() or "") for page in pypdf.PdfReader(io.BytesIO(pdf)).pages]
    text = " ".join(pages)
    for typed in TEXTS:  # title, notes, names and a source: markup, entities, Markdown, all as typed
        assert folded(typed) in text, typed
    assert all(folded(TITLE[:120]) in page for page in pages)  # the running header, drawn as a string
    # the typed texts hold no "&lt;" and one "&amp;" (the vessel's): an escape shown is one added by the sheet
    assert "&lt;" not in text and "&gt;" not in text and "&amp;amp;" not in text
    assert b"/URI" not in pdf


def test_the_exchanger_sheet_writes_its_tables_in_the_view_units():
    ws = sample("sample_data/steam_heater_subcooled_condensate.json")
    result = solve_and_analyse(ws)
    text = text_of(sheet_pdf_bytes(ws, result, "US"))
    electric = next(o for o in result.utilities[0].options if o.kind == "electric")
    assert f"Electric heating electric yes — {electric.cost_per_hour:,.2f} {electric.cost_per_year:,.0f}" in text
    assert "e+" not in text and "None" not in text


def test_the_file_name_says_the_revision():
    ws = sample(CONDENSER)
    assert sheet_filename(ws, REVISION) == "toluene_overhead_condenser_cooling_water_demand_rev_01234567.pdf"
    assert sheet_filename(ws).endswith("_unsaved.pdf")


def test_the_cli_writes_the_sheet_of_a_signed_revision(tmp_path, monkeypatch, capsys):
    from heatbalance.cli import main

    monkeypatch.setenv("HEATBALANCE_DB", str(tmp_path / "store.sqlite3"))
    monkeypatch.delenv("HEATBALANCE_DATABASE_URL", raising=False)
    assert main(["save", CONDENSER]) == 0
    rev = capsys.readouterr().out.strip()
    assert main(["sign", rev, "--role", "prepared", "--name", "A. Engineer"]) == 0  # a check needs it first
    capsys.readouterr()
    assert main(["sign", rev, "--role", "checked", "--name", "B. Checker", "--comment", "agreed"]) == 0
    assert capsys.readouterr().out.startswith("checked by B. Checker, ")
    out = tmp_path / "sheet.pdf"
    assert main(["sheet", rev, "-o", str(out), "--units", "US"]) == 0
    text = text_of(out.read_bytes())
    assert rev in text and "B. Checker" in text and "agreed" in text and UNCHECKED not in text
    assert main(["sheet", CONDENSER, "-o", str(tmp_path / "unsaved.pdf")]) == 0
    assert UNCHECKED in text_of((tmp_path / "unsaved.pdf").read_bytes())
    assert main(["sign", "0" * 24, "--role", "checked", "--name", "X"]) == 1
    assert capsys.readouterr().err.startswith(f"error: ws: no saved worksheet has the id {'0' * 24}")


def test_an_exchanger_sheet_carries_its_check_its_t_q_chart_and_the_utilities():
    ws = sample("sample_data/steam_heater_subcooled_condensate.json")
    result = solve_and_analyse(ws)
    text = text_of(sheet_pdf_bytes(ws, result, "SI"))
    check = result.exchangers[0]
    assert f"Exchanger {check.name}" in text and "minimum internal approach" in text and "UA required" in text
    assert f"{check.name}: T-Q chart" in text
    assert "Utilities for" in text and result.utilities[0].options[0].utility in text


def test_a_batch_duty_is_printed_with_its_average_power():
    ws = sample("sample_data/acid_dilution_jacketed_vessel.json")
    text = text_of(sheet_pdf_bytes(ws, solve_and_analyse(ws), "SI"))
    # hand: −360,182 kJ over 2 h = −50.03 kW (test_mixing.py)
    assert "= -50.03 kW on average over the batch's 120 min" in text
