"""Defects a checker reported on the calculation sheet, the share links and the sign-off (pure parts: the PDF,
the store, the command line). The page's side is in ``test_checker_fixes_app.py``.

1. The sheet printed a screening ALARM and then "No warnings." under it.
2. A link printed on a sheet in the US view opened the page in SI (the unit set is now carried: ``units=US``).
3. The ``?ws=`` link on the sheet was plain text, wrapped in the middle of the id.
4. "Inputs (as typed)" listed a default (the screening's accumulation, never typed) as if typed.
5. A "checked" sign-off was recorded with no "prepared" one.

The PDF is read back with ``pypdf`` (independent of reportlab, which writes it): its text and its link
annotations.
"""
from __future__ import annotations

import json
import os
import subprocess
import sys
from datetime import datetime, timezone
from pathlib import Path

import pytest
import sqlalchemy as sa
from pdf_reading import link_uris, pages_text

from heatbalance import address as A
from heatbalance.analyses import solve_and_analyse
from heatbalance.present.sheet import sheet_pdf_bytes
from heatbalance.present.text import phrase_text
from heatbalance.store import SignOff, StoreError, WorksheetStore
from heatbalance.worksheet import load_worksheet, parse_worksheet

ROOT = Path(__file__).resolve().parent.parent
REACTOR = ROOT / "sample_data" / "batch_reactor_exotherm.json"
NO_WARNINGS = ROOT / "sample_data" / "us_water_heater_duty.json"  # no warning, no vessel, no computed loss
CONDENSER = ROOT / "sample_data" / "solvent_condenser_cooling_water.json"
REVISION = "0123456789abcdef01234567"
BASE = "https://sheets.example.invalid/"


def reactor_with_t_d24(accumulation: float | None = None):
    """The batch reactor sample with T_D24 = 60 °C typed in its vessel's screening (the checker's case)."""
    data = json.loads(REACTOR.read_text())
    data["vessels"][0]["screening"]["T_D24"] = "60 degC"
    if accumulation is not None:
        data["vessels"][0]["screening"]["accumulation"] = accumulation
    return parse_worksheet(data)


def folded(pdf: bytes) -> str:
    """All the text, whitespace folded (table cells wrap lines)."""
    return " ".join(" ".join(text.split()) for text in pages_text(pdf))


def section(text: str, heading: str, following: str) -> str:
    start = text.index(heading)
    return text[start:text.index(following, start)]


# =========================================================================== 1. alarm, then "No warnings."
def test_a_screening_alarm_is_never_followed_by_no_warnings():
    ws = reactor_with_t_d24()
    result = solve_and_analyse(ws)
    alarms = [phrase_text(a, "SI") for s in result.screening for a in s.alarms]
    assert alarms and not result.warnings  # the checker's case: an alarm and no other warning
    text = section(folded(sheet_pdf_bytes(ws, result, "SI")), "Warnings and cautions", "Inputs (as typed)")
    # the checker's report quotes this line (our own output, kept as a regression value)
    assert "ALARM: MTSR 66.1 °C reaches T_D24 60.0 °C" in text
    assert all(f"ALARM: {' '.join(a.split())}" in text for a in alarms)  # the engine's own alarm phrase, printed whole
    assert "No warnings." not in text  # the checker's report (defect 1): the contradiction


def test_no_warnings_is_said_only_when_the_section_is_empty():
    ws = load_worksheet(NO_WARNINGS.read_bytes())
    result = solve_and_analyse(ws)
    assert not result.warnings and not result.screening
    text = section(folded(sheet_pdf_bytes(ws, result, "SI")), "Warnings and cautions", "Inputs (as typed)")
    # product rule: "No warnings." only for an empty section
    assert text.strip() == "Warnings and cautions No warnings."
    # a vessel without any warning: the safety caution is there, so the section is not empty
    reactor = load_worksheet(REACTOR.read_bytes())
    result = solve_and_analyse(reactor)
    assert not result.warnings and not any(s.alarms for s in result.screening)
    text = section(folded(sheet_pdf_bytes(reactor, result, "SI")), "Warnings and cautions", "Inputs (as typed)")
    # the standing caution is content: no "No warnings." under it
    assert "Safety:" in text and "No warnings." not in text


# =========================================================================== 2 and 3. the link on the sheet
def test_the_link_on_the_sheet_is_a_link_annotation_and_its_id_is_never_split():
    ws = load_worksheet(CONDENSER.read_bytes())
    link = f"{BASE}?ws={REVISION}"
    pdf = sheet_pdf_bytes(ws, solve_and_analyse(ws), "SI", revision=REVISION, link=link)
    assert link_uris(pdf) == [link]  # clickable, to exactly the link
    lines = pages_text(pdf)[0].splitlines()
    assert any(link in line for line in lines), lines[:12]  # the whole link on one line


@pytest.mark.parametrize("base", [
    "http://127.0.0.1:8501/",
    "https://heat-balance.process-engineering.site-services.example.invalid/tools/worksheets/heat-balance/",
    "https://" + "very-long-host-name." * 9 + "example.invalid/",  # longer than a line: it breaks before the query
], ids=["short", "long", "longer-than-a-line"])
def test_a_long_link_keeps_its_query_on_one_line(base):
    ws = load_worksheet(CONDENSER.read_bytes())
    link = f"{base}?ws={REVISION}"
    pdf = sheet_pdf_bytes(ws, solve_and_analyse(ws), "US", revision=REVISION, link=link)
    uris = link_uris(pdf)  # one annotation per line the link takes, each to the whole link
    assert uris and set(uris) == {link + "&units=US"}  # reportlab's link annotation: one per line the link takes
    lines = pages_text(pdf)[0].splitlines()
    # the checker's report (defect 3): never broken inside the id
    assert any(f"?ws={REVISION}&units=US" in line for line in lines), lines[:12]


def test_the_link_printed_on_a_us_sheet_opens_the_page_in_us_units():
    ws = load_worksheet(CONDENSER.read_bytes())
    result = solve_and_analyse(ws)
    link = f"{BASE}?ws={REVISION}"
    us = sheet_pdf_bytes(ws, result, "US", revision=REVISION, link=link)
    # the checker's report (defect 2): the sheet's view travels
    assert link_uris(us) == [f"{link}&units=US"] and f"{link}&units=US" in folded(us)
    si = sheet_pdf_bytes(ws, result, "SI", revision=REVISION, link=link)
    assert link_uris(si) == [link] and "units=" not in folded(si)  # an SI sheet prints the link as before
    # a link given already in the US view, printed on an SI sheet, opens in SI: the sheet's view wins
    # the sheet's view wins over a units= given in
    assert link_uris(sheet_pdf_bytes(ws, result, "SI", revision=REVISION, link=f"{link}&units=US")) == [link]


def test_without_a_link_nothing_is_clickable():
    ws = load_worksheet(CONDENSER.read_bytes())
    pdf = sheet_pdf_bytes(ws, solve_and_analyse(ws), "US")
    assert link_uris(pdf) == [] and b"/URI" not in pdf  # no link: nothing clickable (the notes never become links)


# =========================================================================== 4. defaults are not "as typed"
def test_a_default_is_printed_as_a_default_and_a_typed_value_as_typed():
    ws = reactor_with_t_d24()
    assert ws.vessels[0].screening.accumulation == 1.0  # not in the file: the model's default
    text = section(folded(sheet_pdf_bytes(ws, solve_and_analyse(ws), "SI")), "Inputs (as typed)", "line material")
    address = "vessels[R-2].screening.accumulation"
    # the checker's report (defect 4): a default says so; a fraction is printed with its percentage
    assert f"{A.label(address)} 1 (100 %) (default) {address}" in text
    assert "screening T D24 60 °C vessels[R-2].screening.T_D24" in text  # typed: no mark
    assert "(default): the value the program uses when the field is left empty" in text  # explained under it
    typed = reactor_with_t_d24(accumulation=0.4)
    text = section(folded(sheet_pdf_bytes(typed, solve_and_analyse(typed), "SI")), "Inputs (as typed)",
                   "line material")
    assert f"{A.label(address)} 0.4 (40 %) {address}" in text  # a typed value is printed as typed, unmarked


def test_a_sheet_with_no_default_has_no_default_note():
    ws = load_worksheet(CONDENSER.read_bytes())
    text = folded(sheet_pdf_bytes(ws, solve_and_analyse(ws), "SI"))
    assert "(default)" not in text  # no default in this sample: no mark, no note


# =========================================================================== 5. sign-off order
@pytest.fixture
def store(tmp_path):
    with WorksheetStore(f"sqlite:///{tmp_path / 'signoffs.sqlite3'}") as opened:
        yield opened


@pytest.mark.parametrize("role", ["checked", "approved"])
def test_a_check_or_an_approval_before_anything_is_prepared_is_refused_with_where(store, role):
    saved = store.save(load_worksheet(CONDENSER.read_bytes()))
    with pytest.raises(StoreError) as refusal:
        store.sign(saved.id, role, "B. Checker")
    assert refusal.value.where == "role"  # product rule: a refusal names its field
    article = {"checked": "a", "approved": "an"}[role]
    # common practice, no source: prepared, then checked, then approved
    assert f"{article} '{role}' sign-off needs a 'prepared' sign-off of this revision first" in refusal.value.message
    assert store.signoffs(saved.id) == []  # nothing recorded
    store.sign(saved.id, "prepared", "A. Engineer")
    store.sign(saved.id, role, "B. Checker")
    # the same roles are recorded once a preparer has signed
    assert [s.role for s in store.signoffs(saved.id)] == ["prepared", role]


def test_a_prepared_sign_off_of_another_revision_does_not_count(store):
    first = store.save(load_worksheet(CONDENSER.read_bytes()))
    other = store.save(load_worksheet(REACTOR.read_bytes()))
    store.sign(first.id, "prepared", "A. Engineer")
    with pytest.raises(StoreError, match="needs a 'prepared' sign-off"):
        store.sign(other.id, "checked", "B. Checker")


def _legacy_check(store, rev_id: str) -> None:
    """A 'checked' sign-off recorded before the order was enforced, written as the old program wrote it."""
    from heatbalance.store import _signoff_digest, signoffs  # the record's digest, as the store computes it

    row = dict(revision_id=rev_id, role="checked", name="B. Checker", signed_at="2026-01-05T10:00:00.000000+00:00",
               comment="checked before the rule")
    row["record_sha256"] = _signoff_digest(row)
    row["id"] = row["record_sha256"][:24]
    engine = sa.create_engine(store.url)
    with engine.begin() as conn:
        conn.execute(sa.insert(signoffs).values(**row))
    engine.dispose()


def test_a_check_saved_before_the_rule_stays_readable_and_the_sheet_says_nothing_was_prepared(store):
    ws = load_worksheet(CONDENSER.read_bytes())
    saved = store.save(ws)
    _legacy_check(store, saved.id)
    kept = store.signoffs(saved.id)
    # product rule: nothing saved is ever lost
    assert [(s.role, s.name, s.comment) for s in kept] == [("checked", "B. Checker", "checked before the rule")]
    text = folded(sheet_pdf_bytes(ws, solve_and_analyse(ws), "SI", revision=saved.id, signoffs=kept))
    assert "B. Checker" in text and "checked before the rule" in text  # the old sign-off is printed as recorded
    assert "No 'prepared' sign-off is recorded for this revision" in text  # and the sheet says what is missing


def test_the_sheet_says_nothing_of_the_order_when_it_was_kept():
    ws = load_worksheet(CONDENSER.read_bytes())
    signed = [SignOff(REVISION, "prepared", "A. Engineer", datetime(2026, 12, 1, 9, 30, tzinfo=timezone.utc)),
              SignOff(REVISION, "checked", "B. Checker", datetime(2026, 12, 2, 9, 30, tzinfo=timezone.utc))]
    text = folded(sheet_pdf_bytes(ws, solve_and_analyse(ws), "SI", revision=REVISION, signoffs=signed))
    assert "No 'prepared' sign-off" not in text  # the order kept: nothing to say


def test_the_command_line_refuses_a_check_before_prepared_and_says_the_order_in_its_help(tmp_path, monkeypatch,
                                                                                      capsys):
    from heatbalance.cli import main

    monkeypatch.setenv("HEATBALANCE_DB", str(tmp_path / "cli.sqlite3"))
    monkeypatch.delenv("HEATBALANCE_DATABASE_URL", raising=False)
    assert main(["save", str(CONDENSER)]) == 0
    rev = capsys.readouterr().out.strip()
    # the checker's report (defect 5), on the command line
    assert main(["sign", rev, "--role", "checked", "--name", "B. Checker"]) == 1
    err = capsys.readouterr().err
    # one line, naming the field
    assert err.startswith("error: role: a 'checked' sign-off needs a 'prepared' sign-off of this revision first")
    assert err.count("\n") == 1  # one line, no traceback
    assert main(["sign", rev, "--role", "prepared", "--name", "A. Engineer"]) == 0
    assert main(["sign", rev, "--role", "checked", "--name", "B. Checker"]) == 0
    # prepared first: the check is recorded
    assert capsys.readouterr().out.splitlines()[-1].startswith("checked by B. Checker, ")
    env = {**os.environ, "PYTHONPATH": str(ROOT)}
    shown = subprocess.run([sys.executable, "-m", "heatbalance", "sign", "--help"], capture_output=True, text=True,
                           cwd=ROOT, env=env, timeout=120)
    assert shown.returncode == 0
    # the help says the order
    assert "needs a 'prepared' sign-off of the revision first" in " ".join(shown.stdout.split())
