"""Older worksheet formats load through explicit migrations; newer or foreign formats are refused clearly."""
from __future__ import annotations

import copy
import json
from pathlib import Path

import pytest

from heatbalance.errors import WorksheetFormatError
from heatbalance.migrations import CURRENT_VERSION, MIGRATIONS, migrate, migrate_0_to_1
from heatbalance.worksheet import SCHEMA_VERSION, load_worksheet, parse_worksheet

SAMPLES = sorted(Path(__file__).parent.parent.joinpath("sample_data").glob("*.json"))


def as_version_0(doc: dict) -> dict:
    """Write a version-1 document the way version 0 had it: one ``unknown``, a duty's ``heat``."""
    old = copy.deepcopy(doc)
    old["schema_version"] = 0
    unknowns = old.pop("unknowns", [])
    assert len(unknowns) <= 1
    if unknowns:
        old["unknown"] = unknowns[0]
    for duty in old.get("duties", []):
        if "value" in duty:
            duty["heat"] = duty.pop("value")
    return old


def test_the_migration_chain_reaches_the_current_version():
    assert CURRENT_VERSION == SCHEMA_VERSION
    assert sorted(MIGRATIONS) == list(range(CURRENT_VERSION))


@pytest.mark.parametrize("path", SAMPLES, ids=[p.stem for p in SAMPLES])
def test_every_sample_written_as_version_0_loads_as_the_same_worksheet(path):
    current = json.loads(path.read_text())
    old = as_version_0(current)
    assert load_worksheet(json.dumps(old)) == load_worksheet(path.read_bytes())


def test_a_version_0_duty_heat_becomes_value():
    ws = parse_worksheet({"schema_version": 0, "duties": [{"name": "Heater", "heat": "150 kW"}],
                          "unknown": {"kind": "amount", "line": "Feed"}})
    assert ws.schema_version == 1
    assert (ws.duties[0].value.value, ws.duties[0].value.unit) == (150, "kW")
    assert ws.unknowns[0].line == "Feed"


def test_a_version_0_document_without_an_unknown_has_none():
    assert parse_worksheet({"schema_version": 0, "title": "draft"}).unknowns == []


def test_migrations_do_not_change_their_input():
    doc = {"schema_version": 0, "unknown": {"kind": "duty", "term": "H"}, "duties": [{"name": "H", "heat": None}]}
    kept = copy.deepcopy(doc)
    migrate_0_to_1(doc)
    migrate(doc)
    assert doc == kept


def test_a_current_document_is_not_copied():
    doc = {"schema_version": 1, "title": "x"}
    assert migrate(doc) is doc


def test_a_version_0_document_with_the_new_key_is_refused():
    with pytest.raises(WorksheetFormatError, match=r"^unknown: a version 0 worksheet has 'unknown', "
                                                   r"not 'unknowns'"):
        parse_worksheet({"schema_version": 0, "unknowns": []})


def test_a_version_0_duty_with_both_keys_is_refused():
    with pytest.raises(WorksheetFormatError, match=r"worksheet.duties.0: a version 0 duty has 'heat', not also"):
        parse_worksheet({"schema_version": 0, "duties": [{"name": "H", "heat": "1 kW", "value": "2 kW"}]})


def test_a_newer_version_is_refused_with_what_to_do():
    with pytest.raises(WorksheetFormatError, match=r"schema_version 2 is newer than this program reads \(0 to 1\); "
                                                   r"update the program"):
        load_worksheet('{"schema_version": 2, "title": "from the future"}')


@pytest.mark.parametrize("version, shown", [("1", "'1'"), (1.0, "'1.0'"), (True, "'True'"), (None, "'None'")])
def test_a_version_that_is_not_a_whole_number_is_refused(version, shown):
    with pytest.raises(WorksheetFormatError, match=rf"schema_version must be a whole number, not {shown}"):
        parse_worksheet({"schema_version": version})


def test_a_negative_version_is_refused():
    with pytest.raises(WorksheetFormatError, match=r"schema_version -1 is not a known version"):
        parse_worksheet({"schema_version": -1})


def test_a_file_of_another_schema_is_refused():
    with pytest.raises(WorksheetFormatError, match=r"this JSON is not a heat-balance worksheet \(its keys: "
                                                   r"customer, lines_total"):
        load_worksheet('{"customer": "ACME", "lines_total": 3}')


def test_a_solved_result_uploaded_as_a_worksheet_is_named_as_such():
    with pytest.raises(WorksheetFormatError, match=r"this is a solved result \(the output of 'solve --json'\), "
                                                   r"not a worksheet"):
        load_worksheet(json.dumps({"title": "x", "answer": {}, "lines": [], "terms": [], "residual": 0.0})
                       .replace('"title": "x", ', ""))


def test_a_json_array_is_not_a_worksheet():
    with pytest.raises(WorksheetFormatError, match=r"^file: a worksheet is a JSON object$"):
        load_worksheet("[1, 2]")
