"""Share links (?ws= id, ?sheet= compressed worksheet), worksheet identity, and the download files."""
from __future__ import annotations

import base64
import csv
import io
import json
import zlib
from pathlib import Path

import pytest

from heatbalance.analyses import solve_and_analyse
from heatbalance.balance import solve
from heatbalance.present.text import answer_text
from heatbalance.errors import WorksheetFormatError
from heatbalance.present.csv_cells import comment_line, csv_cell
from heatbalance.present.exports import results_csv_bytes, results_filename, worksheet_filename, worksheet_json_bytes
from heatbalance.links import (ID_LENGTH, MAX_SHEET_PARAM_CHARS, SHEET_PREFIX, LinkError, canonical_json, check_id,
                               decode_sheet, encode_sheet, parse_link, revision_id, revision_link, sheet_link)
from heatbalance.present.tables import contribution_rows
from heatbalance.reactor import CAUTION
from heatbalance.results import SIGN_CONVENTION
from heatbalance.worksheet import MAX_DOCUMENT_BYTES, Worksheet, load_worksheet, parse_worksheet

SAMPLES = sorted(Path(__file__).parent.parent.joinpath("sample_data").glob("*.json"))
IDS = [p.stem for p in SAMPLES]


def _sample(path: Path) -> Worksheet:
    return load_worksheet(path.read_bytes())


def _payload(raw: bytes) -> str:
    return SHEET_PREFIX + base64.urlsafe_b64encode(raw).decode().rstrip("=")


# -- identity -----------------------------------------------------------------------------------------------
def test_the_id_is_the_truncated_sha256_of_the_canonical_json():
    import hashlib

    ws = _sample(SAMPLES[0])
    assert revision_id(ws) == hashlib.sha256(canonical_json(ws).encode()).hexdigest()[:ID_LENGTH]
    assert len(revision_id(ws)) == 24


def test_shorthand_and_key_order_do_not_change_the_id():
    written_out = {"title": "T", "streams": [], "losses": [{"name": "L", "value": {"value": 2, "unit": "kW"}}]}
    shorthand = {"losses": [{"value": "2 kW", "name": "L"}], "title": "T", "schema_version": 1}
    assert revision_id(load_worksheet(json.dumps(written_out))) == revision_id(load_worksheet(json.dumps(shorthand)))


def test_fields_written_out_at_their_defaults_do_not_change_the_id():
    # defaults are left out of the canonical JSON, so a later model adding an optional field keeps every id
    explicit = {"schema_version": 1, "title": "T", "notes": "", "basis": {"kind": "continuous"}, "streams": [],
                "losses": [{"name": "L", "value": "2 kW"}], "unknowns": []}
    assert revision_id(load_worksheet(json.dumps(explicit))) == revision_id(
        load_worksheet('{"title": "T", "losses": [{"name": "L", "value": "2 kW"}]}'))
    assert canonical_json(load_worksheet(json.dumps(explicit))) == \
        '{"losses":[{"name":"L","value":{"unit":"kW","value":2.0}}],"schema_version":1,"title":"T"}'


def test_any_edit_changes_the_id():
    ws = _sample(SAMPLES[0])
    assert revision_id(ws) != revision_id(ws.model_copy(update={"notes": ws.notes + " "}))


@pytest.mark.parametrize("text", [" 0123456789ABCDEF01234567 ", "0123456789abcdef01234567"])
def test_well_formed_ids_are_normalised(text):
    assert check_id(text) == "0123456789abcdef01234567"


@pytest.mark.parametrize("text", ["", "0123", "0123456789abcdef012345678", "0123456789abcdef0123456z", None, 12])
def test_malformed_ids_are_refused(text):
    with pytest.raises(LinkError, match=r"is not a worksheet id \(an id is 24 characters 0-9 and a-f\)"):
        check_id(text)


# -- the ?sheet= link ---------------------------------------------------------------------------------------
@pytest.mark.parametrize("path", SAMPLES, ids=IDS)
def test_every_sample_through_the_compressed_link_gives_the_identical_worksheet_and_result(path):
    ws = _sample(path)
    link = sheet_link(ws, "https://sheets.example.invalid/")
    kind, payload = parse_link(link)
    assert kind == "sheet" and len(payload) < 2_000  # the samples make links of about 500-900 characters
    reopened = decode_sheet(payload)
    assert reopened == ws
    assert solve(reopened).to_dict() == solve(ws).to_dict()


def test_a_revision_link_names_the_id():
    assert revision_link("0123456789abcdef01234567", "https://h/") == "https://h/?ws=0123456789abcdef01234567"
    assert parse_link("https://h/?ws=0123456789abcdef01234567&x=1") == ("ws", "0123456789abcdef01234567")
    assert parse_link("0123456789abcdef01234567") == ("ws", "0123456789abcdef01234567")


def test_a_link_with_neither_parameter_is_refused():
    with pytest.raises(LinkError, match=r"the link has neither ws= nor sheet="):
        parse_link("https://h/?page=2")


def test_a_tampered_payload_is_refused():
    payload = encode_sheet(_sample(SAMPLES[0]))
    middle = len(payload) // 2
    tampered = payload[:middle] + ("A" if payload[middle] != "A" else "B") + payload[middle + 1:]
    with pytest.raises(LinkError, match=r"the sheet link is damaged or has been altered"):
        decode_sheet(tampered)


def test_a_truncated_payload_is_refused():
    payload = encode_sheet(_sample(SAMPLES[0]))
    with pytest.raises(LinkError, match=r"the sheet link is damaged or has been altered"):
        decode_sheet(payload[:-10])


def test_characters_outside_the_alphabet_are_refused():
    payload = encode_sheet(_sample(SAMPLES[0]))
    with pytest.raises(LinkError, match=r"the sheet link is damaged or has been altered"):
        decode_sheet(payload[:20] + "*" + payload[20:])


def test_a_payload_of_another_format_is_refused():
    with pytest.raises(LinkError, match=r"the sheet link is not of a known format \(it should start with 'z1\.'\)"):
        decode_sheet("x9." + encode_sheet(_sample(SAMPLES[0]))[3:])


def test_a_decompression_bomb_is_refused_without_unpacking_it():
    bomb = _payload(zlib.compress(b" " * (20 * MAX_DOCUMENT_BYTES), 9))
    assert len(bomb) < MAX_SHEET_PARAM_CHARS  # small enough to pass the length check
    with pytest.raises(LinkError, match=r"the sheet link unpacks to more than 1,000,000 bytes"):
        decode_sheet(bomb)


def test_an_overlong_link_is_refused():
    with pytest.raises(LinkError, match=r"the sheet link is 32,001 characters; the limit is 32,000"):
        decode_sheet(SHEET_PREFIX + "A" * (MAX_SHEET_PARAM_CHARS + 1 - len(SHEET_PREFIX)))


def test_a_worksheet_too_big_for_a_link_says_to_save_instead():
    with pytest.raises(LinkError, match=r"more than the 32,000 a link may carry; save it and share the \?ws= link"):
        encode_sheet(_big_worksheet())


def _big_worksheet() -> Worksheet:
    """Random (incompressible) notes and material sources: a valid worksheet whose link passes 32,000 characters."""
    import random

    rng = random.Random(7)

    def text(n):
        return "".join(rng.choice("abcdefghijklmnopqrstuvwxyz0123456789") for _ in range(n))

    materials = [{"name": f"m{i}", "source": text(300), "phases": [{"name": "liquid", "cp": "2 kJ/(kg*K)"}],
                  "min_temperature": "0 degC", "max_temperature": "100 degC"} for i in range(50)]
    losses = [{"name": text(80), "value": "1 kW"} for _ in range(100)]
    return load_worksheet(json.dumps({"title": "big", "notes": text(20_000), "materials": materials,
                                      "losses": losses}))


def test_content_that_is_not_a_worksheet_is_refused_by_the_same_loader():
    with pytest.raises(WorksheetFormatError, match=r"this JSON is not a heat-balance worksheet"):
        decode_sheet(_payload(zlib.compress(b'{"invoice": 12}')))
    with pytest.raises(WorksheetFormatError, match=r"not valid JSON"):
        decode_sheet(_payload(zlib.compress(b"\xff\xfe not json")))
    with pytest.raises(WorksheetFormatError, match=r"schema_version 9 is newer than this program reads"):
        decode_sheet(_payload(zlib.compress(b'{"schema_version": 9}')))


# -- files --------------------------------------------------------------------------------------------------
@pytest.mark.parametrize("path", SAMPLES, ids=IDS)
def test_the_json_download_loads_back_identical(path):
    ws = _sample(path)
    data = worksheet_json_bytes(ws)
    assert data.endswith(b"\n")
    assert load_worksheet(data) == ws


@pytest.mark.parametrize("path", SAMPLES, ids=IDS)
@pytest.mark.parametrize("system", ["SI", "US"])
def test_the_csv_download_holds_every_contribution_and_the_sign_convention(path, system):
    ws = _sample(path)
    result = solve(ws)
    data = results_csv_bytes(result, system)
    assert data.startswith(b"\xef\xbb\xbf")  # a byte-order mark: spreadsheets then read UTF-8 (°C, −)
    text = data.decode("utf-8-sig")
    comments = [line for line in text.splitlines() if line.startswith("#")]
    assert comments[0] == comment_line(ws.title)  # a comma is written as a look-alike (one cell a line)
    assert comment_line(f"answer: {result.answer.label} = {answer_text(result.answer, system)}") in comments
    assert comment_line(f"sign convention: {SIGN_CONVENTION}") in comments
    assert all(len(row) == 1 for row in csv.reader(io.StringIO("\n".join(comments))))
    table = list(csv.DictReader(io.StringIO("\n".join(l for l in text.splitlines() if not l.startswith("#")))))
    expected = contribution_rows(result, system)
    assert len(table) == len(expected) == len(result.lines) + len(result.terms)
    for got, want in zip(table, expected):
        assert list(got) == list(want)
        for key, value in want.items():
            if isinstance(value, float):
                assert float(got[key]) == pytest.approx(value, rel=5e-10)  # written to ten significant figures
            else:
                # a text a spreadsheet would read as a formula ('-10.00 °C solid') is kept as text by an apostrophe
                assert got[key] == ("" if value is None else csv_cell(value))


def test_download_file_names_come_from_the_title():
    ws = Worksheet(title="Glycol loop heater: 4 barg steam!")
    assert worksheet_filename(ws) == "glycol_loop_heater_4_barg_steam.json"
    assert results_filename(ws) == "glycol_loop_heater_4_barg_steam_results.csv"
    assert worksheet_filename(Worksheet(title="***")) == "worksheet.json"


def test_the_results_csv_carries_the_screening_the_uncertainty_and_the_caution_once():
    """A shift engineer's finding: a colleague given only the CSV saw no screening, no ± and no caution."""
    ws = _sample(Path("sample_data/glycol_hydration_screening.json"))
    text = results_csv_bytes(solve_and_analyse(ws)).decode("utf-8-sig")
    comments = [line for line in text.splitlines() if line.startswith("#")]
    assert any(line.startswith("# screening: MTSR (30% accumulation)") for line in comments)
    assert sum(comment_line(f"caution: {CAUTION}") == line for line in comments) == 1
    doc = json.loads(open("sample_data/steam_heater_glycol.json", "rb").read())
    doc["tolerances"] = [{"address": "streams[Glycol].flow", "percent": 1.5}]
    text = results_csv_bytes(solve_and_analyse(parse_worksheet(doc))).decode("utf-8-sig")
    assert any(line.startswith("# uncertainty: ") and " ± " in line for line in text.splitlines())
    assert CAUTION not in text  # nothing here bears on safety
