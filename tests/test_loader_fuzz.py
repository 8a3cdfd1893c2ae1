"""Property tests of everything that reads outside data: random and mutated JSON, files and link payloads.

The one promise: a clear refusal (a HeatBalanceError) or a valid worksheet, never any other exception.
"""
from __future__ import annotations

import json
from pathlib import Path

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from heatbalance.errors import HeatBalanceError, WorksheetFormatError
from heatbalance.links import canonical_json, decode_sheet, encode_sheet, parse_link
from heatbalance.worksheet import MAX_NESTING_DEPTH, Worksheet, load_worksheet

SAMPLES = sorted(Path(__file__).parent.parent.joinpath("sample_data").glob("*.json"))
SAMPLE_TEXTS = [p.read_text() for p in SAMPLES]
SAMPLE_DOCS = [json.loads(t) for t in SAMPLE_TEXTS]
FUZZ = settings(max_examples=300, deadline=None, suppress_health_check=[HealthCheck.too_slow])

scalars = st.one_of(st.none(), st.booleans(), st.integers(), st.floats(allow_nan=True, allow_infinity=True),
                    st.text(max_size=20))
json_values = st.recursive(scalars, lambda children: st.one_of(
    st.lists(children, max_size=5), st.dictionaries(st.text(max_size=12), children, max_size=5)), max_leaves=40)
# Keys and values a worksheet really uses, so mutations reach deep into validation.
words = st.sampled_from(["schema_version", "title", "unknowns", "unknown", "streams", "vessels", "duties", "losses",
                         "name", "material", "flow", "inlet", "outlet", "temperature", "value", "unit", "kind",
                         "line", "basis", "batch", "continuous", "amount", "water", "12 t/h", "degC", "kW",
                         "vapour_fraction", "mass_fraction", "pressure", "charges", "final", "heat"])
values = st.one_of(json_values, words, st.builds(lambda w: {"value": 1, "unit": w}, words))


def _load_or_refuse(text) -> Worksheet | None:
    try:
        ws = load_worksheet(text)
    except HeatBalanceError as exc:
        assert exc.where and exc.message  # every refusal says where: a field's address, or "file"
        return None
    assert isinstance(ws, Worksheet)
    canonical_json(ws)  # a worksheet that loads can always be saved and linked
    return ws


@FUZZ
@given(json_values)
def test_random_json_is_refused_clearly_or_loads(value):
    _load_or_refuse(json.dumps(value))


@FUZZ
@given(st.binary(max_size=300))
def test_random_bytes_are_refused_clearly_or_load(data):
    _load_or_refuse(data)


def _mutate(node, path: list, replacement):
    """Replace the node at ``path`` (list of choices) by ``replacement``; return the new document."""
    if not path or not isinstance(node, (dict, list)) or not node:
        return replacement
    choice = path[0] % len(node)
    if isinstance(node, dict):
        key = list(node)[choice]
        return {**node, key: _mutate(node[key], path[1:], replacement)}
    return [*node[:choice], _mutate(node[choice], path[1:], replacement), *node[choice + 1:]]


@FUZZ
@given(st.sampled_from(SAMPLE_DOCS), st.lists(st.integers(0, 50), max_size=8), values)
def test_samples_with_a_node_replaced_are_refused_clearly_or_load(doc, path, replacement):
    _load_or_refuse(json.dumps(_mutate(doc, path, replacement)))


@FUZZ
@given(st.sampled_from(SAMPLE_DOCS), st.lists(st.integers(0, 50), max_size=8), words)
def test_samples_with_a_key_dropped_or_added_are_refused_clearly_or_load(doc, path, key):
    def edit(node, rest):
        if isinstance(node, dict) and node:
            if not rest:
                out = dict(node)
                if key in out:
                    del out[key]
                else:
                    out[key] = 1
                return out
            k = list(node)[rest[0] % len(node)]
            return {**node, k: edit(node[k], rest[1:])}
        if isinstance(node, list) and node:
            i = (rest[0] if rest else 0) % len(node)
            return [*node[:i], edit(node[i], rest[1:]), *node[i + 1:]]
        return node

    _load_or_refuse(json.dumps(edit(doc, path)))


@FUZZ
@given(st.sampled_from(SAMPLE_TEXTS), st.integers(0, 10_000), st.integers(0, 20), st.text(max_size=5))
def test_sample_text_with_characters_changed_is_refused_clearly_or_loads(text, at, cut, insert):
    at %= len(text) + 1
    _load_or_refuse(text[:at] + insert + text[at + cut:])


@FUZZ
@given(st.sampled_from(SAMPLES), st.integers(0, 10_000), st.text(alphabet="ABCxyz019-_=.*%", min_size=1, max_size=3))
def test_a_mutated_sheet_link_is_refused_clearly_or_opens(path, at, insert):
    payload = encode_sheet(load_worksheet(path.read_bytes()))
    at %= len(payload)
    try:
        ws = decode_sheet(payload[:at] + insert + payload[at + len(insert):])
    except HeatBalanceError:
        return
    assert isinstance(ws, Worksheet)


@FUZZ
@given(st.text(max_size=80))
def test_any_pasted_link_is_refused_clearly_or_parsed(text):
    try:
        kind, value = parse_link(text)
    except HeatBalanceError:
        return
    assert kind in ("ws", "sheet")


@pytest.mark.parametrize("depth", [MAX_NESTING_DEPTH + 1, 1_000, 100_000])
def test_deep_nesting_is_refused_with_the_limit(depth):
    with pytest.raises(WorksheetFormatError, match=rf"nested more than {MAX_NESTING_DEPTH} levels deep"):
        load_worksheet('{"notes": ' + "[" * depth + "]" * depth + "}")


def test_an_oversized_document_is_refused_with_the_limit():
    with pytest.raises(WorksheetFormatError, match=r"the document is 1,000,001 bytes; the limit is 1,000,000"):
        load_worksheet(b" " * 1_000_001)


@pytest.mark.parametrize("text, message", [
    ('{"title": NaN}', r"NaN is not a number a worksheet can hold"),
    ('{"losses": [{"name": "L", "value": {"value": 1e400, "unit": "kW"}}]}', r"inf is not a finite number"),
    ('{"title": "\\ud800"}', r"is not valid Unicode \(a lone surrogate\)"),
    ('{"title": ' + "9" * 5000 + "}", r"not valid JSON \(ValueError: Exceeds the limit"),
])
def test_numbers_and_text_json_allows_but_a_worksheet_cannot_hold_are_refused(text, message):
    with pytest.raises(WorksheetFormatError, match=message):
        load_worksheet(text)
