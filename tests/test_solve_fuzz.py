"""Fuzz (hypothesis): whatever numbers, units and unknowns a user types, load -> solve -> every output
answers or refuses clearly.

"Clearly" means a HeatBalanceError with a message and the address of the field at fault; any other exception
would reach the page or the command line as a traceback. An answer must close its balance and carry only finite
numbers, in every output: the CLI report in both unit sets, its JSON, the CSV, the waterfall, a share link.

CI runs a bounded number of examples. A longer local run (the counts in a session note):

    HEATBALANCE_FUZZ_EXAMPLES=5000 python -m pytest tests/test_solve_fuzz.py --hypothesis-show-statistics -p no:cacheprovider
"""
import glob
import json
import math
import os
import re

from hypothesis import HealthCheck, event, given, settings
from hypothesis import strategies as st

from heatbalance.address import FRACTION, inputs, parse, unknown_at, unknown_choices, with_value
from heatbalance.analyses import solve_and_analyse
from heatbalance.errors import HeatBalanceError
from heatbalance.links import decode_sheet, parse_link, sheet_link
from heatbalance.present.exports import results_csv_bytes
from heatbalance.present.figures import energy_waterfall
from heatbalance.present.report import format_result, result_json
from heatbalance.present.text import error_text
from heatbalance.worksheet import parse_worksheet

SCALE = int(os.environ.get("HEATBALANCE_FUZZ_EXAMPLES", "0")) or None  # per test; default: the CI counts below
NOT_FINITE = re.compile(r"(?<![A-Za-z])(nan|inf|infinity)(?![A-Za-z])", re.IGNORECASE)
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
    kind, payload = parse_link(sheet_link(ws, "https://sheets.example.invalid/"))
    assert decode_sheet(payload) == ws  # the link round trip
    try:
        result = solve_and_analyse(ws)
    except HeatBalanceError as exc:
        assert exc.message and error_text(exc, "US")
        assert exc.where in ("unknown", "worksheet") or parse(exc.where)  # an address, as data
        event(f"refused: {type(exc).__name__}")
        return
    event("answered")
    largest = max([abs(ln.total) for ln in result.lines] + [abs(t.heat) for t in result.terms])
    assert abs(result.residual) <= max(1e-6 * largest, 1e-3)  # a closed balance
    for system in ("SI", "US"):
        data = result_json(result, system)
        json.dumps(data, allow_nan=False)  # only finite numbers (raises on NaN or infinity)
        assert math.isfinite(data["answer"]["value"])
        for text in (format_result(result, system), results_csv_bytes(result, system).decode("utf-8-sig")):
            # user text echoed in quotes (a unit typed as 'nan') is words, not a number the tool computed
            assert not NOT_FINITE.search(re.sub(r"'[^'\n]*'", "''", text))
        assert energy_waterfall(result, system)


@settings(max_examples=SCALE or 150, deadline=None, suppress_health_check=[HealthCheck.too_slow])
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


@settings(max_examples=SCALE or 80, deadline=None, suppress_health_check=[HealthCheck.too_slow])
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


#: units an engineer types, per kind (all valid): the sheet then gets past the unit checks into the solver
UNITS_OF = {
    "temperature": ["degC", "K", "degF"], "pressure": ["barg", "bar", "psig", "kPa"], "mass": ["kg", "t", "lb"],
    "mass_flow": ["kg/h", "t/h", "kg/s", "lb/h"], "power": ["kW", "MW", "Btu/h"], "energy": ["kJ", "MJ", "kWh"],
    "duration": ["min", "h", "s"], "amount": ["kmol", "mol"], "molar_flow": ["kmol/h"],
    "molar_energy": ["kJ/mol"], "heat_capacity": ["kJ/K"], "specific_heat": ["kJ/(kg*K)"],
    "specific_energy": ["kJ/kg"], "molar_mass": ["g/mol"], "thermal_conductance": ["kW/K"],
    "heat_transfer_coefficient": ["W/(m**2*K)"], "area": ["m**2"], "temperature_difference": ["K", "delta_degF"],
    "length": ["mm", "m", "in"], "velocity": ["m/s", "km/h"], "volume_flow": ["m**3/h", "ft**3/min"],
}
magnitudes = st.one_of(st.floats(-1e4, 1e4, allow_nan=False), st.floats(-1e12, 1e12, allow_nan=False),
                       st.sampled_from([0.0, 1e-9, -1e-9, 1e30, -1e30, 273.15, -273.15, 100.0, 1e300]))


@settings(max_examples=SCALE or 200, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(data=st.data())
def test_any_valid_number_in_any_input_is_answered_or_refused(data):
    """Well-typed but arbitrary numbers in one to three inputs, found by their addresses."""
    ws = parse_worksheet(json.loads(json.dumps(data.draw(st.sampled_from(SAMPLES)))))
    entries = [e for e in inputs(ws) if not e.is_unknown]
    for entry in data.draw(st.lists(st.sampled_from(entries), min_size=1, max_size=3, unique_by=lambda e: e.address)):
        if entry.kinds == (FRACTION,):
            value = data.draw(st.floats(0.0, 1.0))
        else:
            kind = data.draw(st.sampled_from(entry.kinds))
            value = (data.draw(magnitudes), data.draw(st.sampled_from(UNITS_OF[kind])))
        try:
            ws = with_value(ws, entry.address, value)
        except HeatBalanceError as exc:
            assert exc.where == entry.address
            event("refused when set")
            return
    solve_or_refuse(ws)
