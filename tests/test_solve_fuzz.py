"""Fuzz (hypothesis): whatever units and unknowns a user types, solve() answers or refuses clearly.

"Clearly" means a HeatBalanceError with a message; any other exception would reach the page or the
command line as a traceback.
"""
import glob
import json

from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from heatbalance.address import parse, unknown_at, unknown_choices
from heatbalance.analyses import solve_and_analyse
from heatbalance.errors import HeatBalanceError
from heatbalance.present.exports import results_csv_bytes
from heatbalance.present.figures import energy_waterfall
from heatbalance.present.report import format_result, result_json
from heatbalance.present.text import error_text
from heatbalance.worksheet import parse_worksheet

SAMPLES = [json.load(open(p, encoding="utf-8")) for p in sorted(glob.glob("sample_data/*.json"))]
UNIT_WORDS = ["kg", "t/h", "kg/0", "(", "kg**(1/0)", "degC", "barg", "kW", "kJ/K", "°F", "psig", "lb/h", "K", "",
              "1/0", "m**3", "kmol", "kJ/mol", "h", "Btu", "mol/s", "kg/h/0", ")", "**", "e", "nan"]
units = st.one_of(st.sampled_from(UNIT_WORDS), st.text(max_size=12))
numbers = st.one_of(st.floats(allow_nan=False, allow_infinity=False, width=32), st.integers(-10**6, 10**6))


def quantities(doc, path=()):
    """Paths of every {"value", "unit"} object in a document."""
    if isinstance(doc, dict):
        if set(doc) == {"value", "unit"}:
            yield path
        for key, value in doc.items():
            yield from quantities(value, path + (key,))
    elif isinstance(doc, list):
        for index, value in enumerate(doc):
            yield from quantities(value, path + (index,))


def set_at(doc, path, value):
    for key in path[:-1]:
        doc = doc[key]
    doc[path[-1]] = value


def solve_or_refuse(ws):
    """Solve and write every output in both unit sets, or refuse with a message and the field's address."""
    try:
        result = solve_and_analyse(ws)
    except HeatBalanceError as exc:
        assert exc.message and error_text(exc, "US")
        assert exc.where in ("unknown", "worksheet") or parse(exc.where)  # an address, as data
        return
    for system in ("SI", "US"):
        assert format_result(result, system) and result_json(result, system)
        assert results_csv_bytes(result, system) and energy_waterfall(result, system)


@settings(max_examples=150, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(data=st.data())
def test_any_typed_quantity_is_answered_or_refused(data):
    doc = json.loads(json.dumps(data.draw(st.sampled_from(SAMPLES))))
    paths = list(quantities(doc))
    for path in data.draw(st.lists(st.sampled_from(paths), min_size=1, max_size=3)):
        set_at(doc, path, {"value": data.draw(numbers), "unit": data.draw(units)})
    try:
        ws = parse_worksheet(doc)
    except HeatBalanceError:
        return
    solve_or_refuse(ws)


@settings(max_examples=80, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(data=st.data())
def test_any_unknown_is_answered_or_refused(data):
    doc = json.loads(json.dumps(data.draw(st.sampled_from(SAMPLES))))
    ws = parse_worksheet(doc)
    choices = [unknown_at(address) for address, _ in unknown_choices(ws)]
    picked = data.draw(st.lists(st.sampled_from(choices), min_size=0, max_size=2))
    made_up = data.draw(st.fixed_dictionaries({"kind": st.sampled_from(["amount", "temperature", "duty"]),
                                               "line": st.sampled_from(["R-2", "Steam", "nope", "A / B"]),
                                               "charge": st.sampled_from(["Batch", "nope"]),
                                               "common": st.sampled_from(["X", "Header"])}))
    unknowns = [u.model_dump(exclude_none=True) for u in picked] or [made_up]
    try:
        ws = parse_worksheet({**doc, "unknowns": unknowns})
    except HeatBalanceError:
        return
    solve_or_refuse(ws)
