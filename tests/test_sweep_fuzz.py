"""Fuzz (hypothesis): every point of a what-if sweep equals the individual solve of the same sheet.

A sweep builds the worksheet into an SI problem once and, at each point, writes the axes' values straight into that
problem and solves again; during one sweep the temperature solve keeps its bracket and the states it evaluated from
point to point (``balance.SweepMemo``). A kept bracket or state filed under the wrong key would give a confident
wrong answer at some points only, and which points depends on the order of the values: so the values here repeat
and go back and forth (a, b, a), and every point is checked against the public path, the sheet set by address
(``address.with_value``) and solved from cold (``analyses.solve_and_analyse``).

Every expected number is the engine's own individual solve (consistency): the same answer (rel 1e-9, abs 1e-12),
the same upper-phase fraction (NaN when the answer is off a phase change), the same screening MTSR where the sheet
has one, and at a refused point the same address at fault and the same words.

CI runs a bounded number of examples (the file takes well under a minute). A longer local run (6000 examples
a test took about 8 minutes on 2 cores):

    HEATBALANCE_FUZZ_EXAMPLES=6000 python -m pytest tests/test_sweep_fuzz.py --hypothesis-show-statistics
"""
from __future__ import annotations

import glob
import math
import os
from functools import lru_cache

import pytest
from hypothesis import HealthCheck, event, given, settings
from hypothesis import strategies as st

from heatbalance.address import FRACTION, inputs, with_value
from heatbalance.analyses import solve_and_analyse
from heatbalance.analyses.sweep import REASON, REFUSED_AT, Axis, output_names, sweep
from heatbalance.errors import HeatBalanceError
from heatbalance.problem import build_problem
from heatbalance.worksheet import Quantity, load_worksheet

SCALE = int(os.environ.get("HEATBALANCE_FUZZ_EXAMPLES", "0")) or None  # per test; default: the CI counts below
PATHS = sorted(glob.glob("sample_data/*.json"))
PHASE = "answer.phase_fraction"
TEMPERATURE_KINDS = ("temperature", "temperature_difference")


@lru_cache(maxsize=None)
def sample(path: str):
    return load_worksheet(open(path, "rb").read())


@lru_cache(maxsize=None)
def sweepable(path: str) -> tuple:
    """The numeric inputs of a sample a sweep takes: every typed number but the unknown's own field and a field an
    exchanger's rating sets (both refused up front, with an AddressError)."""
    ws = sample(path)
    rated = {e.sets for e in ws.exchangers}
    return tuple(e for e in inputs(ws) if not e.is_unknown and e.address not in rated
                 and isinstance(e.value, (Quantity, int, float)))


@lru_cache(maxsize=None)
def outputs_of(path: str) -> tuple[str, ...]:
    """The answer, its phase fraction and, where the sheet screens a vessel, each MTSR."""
    names = output_names(build_problem(sample(path)))
    return ("answer", PHASE) + tuple(n for n in names if n.endswith(".MTSR"))


def typed_number(entry) -> float:
    return float(entry.value.value if isinstance(entry.value, Quantity) else entry.value)


@st.composite
def nearby(draw, entry) -> float:
    """A value around the typed one, in the typed unit: the typed value itself, typed × [0.5, 1.5], (a
    temperature) typed ± 25; now and then a far one (typed × [-1, 3], a temperature ± 400) that a point may refuse.
    A fraction stays within 0..1 (one beyond is refused alike both ways: see the test below)."""
    typed = typed_number(entry)
    temperature = bool(set(entry.kinds) & set(TEMPERATURE_KINDS))
    how = draw(st.sampled_from(["typed", "factor", "factor", "far"] + ["offset", "offset"] * temperature))
    if how == "typed":
        value = typed
    elif how == "offset":
        value = typed + draw(st.floats(-25.0, 25.0))
    elif how == "far" and temperature:
        value = typed + draw(st.floats(-400.0, 400.0))
    else:
        value = typed * draw(st.floats(-1.0, 3.0) if how == "far" else st.floats(0.5, 1.5))
    return min(max(value, 0.0), 1.0) if entry.kinds == (FRACTION,) else value


@st.composite
def axis_values(draw, entry, max_distinct: int, max_size: int) -> tuple[float, ...]:
    """A short list of values drawn from one to ``max_distinct`` nearby values, with repeats and returns."""
    pool = draw(st.lists(nearby(entry), min_size=1, max_size=max_distinct))
    pattern = draw(st.sampled_from(["any", "back and forth", "same"]))
    if pattern == "same":  # the same value several times
        return (pool[0],) * draw(st.integers(2, max_size))
    if pattern == "back and forth" and len(pool) >= 2:  # a, b, a (, b, a ...)
        return tuple(pool[i % 2] for i in range(draw(st.integers(3, max(3, max_size)))))
    return tuple(draw(st.lists(st.sampled_from(pool), min_size=1, max_size=max_size)))


def axis_of(entry, values) -> Axis:
    return Axis(entry.address, values, "" if entry.kinds == (FRACTION,) else entry.unit)


def individually(ws, axes: list[Axis], values) -> dict | HeatBalanceError:
    """The public path at one point: set each axis value by address, solve and analyse from cold; the outputs, or
    the refusal (setting a value may itself refuse it)."""
    try:
        for axis, value in zip(axes, values):
            ws = with_value(ws, axis.address, value if axis.unit == "" else (value, axis.unit))
        result = solve_and_analyse(ws)
    except HeatBalanceError as exc:
        return exc
    answer = result.answer
    found = {"answer": answer.value_si, PHASE: math.nan if answer.phase_fraction is None else answer.phase_fraction}
    found.update({f"screening[{s.vessel}].MTSR": s.MTSR for s in result.screening})
    return found


def same(got: float, expected: float) -> bool:
    if math.isnan(expected):
        return math.isnan(got)
    return got == pytest.approx(expected, rel=1e-9, abs=1e-12)


def first_refusal_of_a_grid(ws, axes, values, row, expected: HeatBalanceError) -> HeatBalanceError:
    """At a grid point where both axes' values are refused, the sweep names the first axis it set and the
    individual solve the field it reads first (see the two-refusal test below): taken as the same refusal
    when setting that axis's value alone is refused at that address in those words (the engine's own individual
    solve, consistency). Otherwise the refusal as it was."""
    if len(axes) < 2 or row[REFUSED_AT] == expected.where or row[REASON] is None:
        return expected
    mine = [i for i, a in enumerate(axes) if a.address == row[REFUSED_AT]]
    if not mine:
        return expected
    alone = individually(ws, [axes[mine[0]]], (values[mine[0]],))
    if isinstance(alone, HeatBalanceError) and (alone.where, alone.message) == (row[REFUSED_AT], row[REASON].message):
        event("both axes refused: the sweep names its own first")
        return alone
    return expected


def check_every_point(path: str, axes: list[Axis]) -> list[dict]:
    """Sweep the sample over the axes and check each point against its individual solve (the engine's own,
    consistency); returns each point's outputs (or refusal) in sweep order."""
    ws, outputs = sample(path), list(outputs_of(path))
    frame = sweep(ws, axes, outputs)  # the axes are ones a sweep takes: no refusal up front
    assert len(frame) == math.prod(len(a.values) for a in axes)
    rows = []
    for position, (_, row) in enumerate(frame.iterrows()):
        values = tuple(row[a.column] for a in axes)
        expected = individually(ws, axes, values)  # the engine's own individual solve (consistency)
        where = f"{path} point {position} {dict(zip((a.address for a in axes), values))}"
        if isinstance(expected, HeatBalanceError):
            event("refused point")
            expected = first_refusal_of_a_grid(ws, axes, values, row, expected)
            assert row[REFUSED_AT] == expected.where, f"{where}: refused at {row[REFUSED_AT]!r}, alone at " \
                                                      f"{expected.where!r} ({expected.message})"
            assert row[REASON] is not None and row[REASON].message == expected.message, \
                f"{where}: refused '{row[REASON] and row[REASON].message}', alone '{expected.message}'"
            assert all(math.isnan(row[name]) for name in outputs), where
            rows.append({"refused": (expected.where, expected.message)})
            continue
        event("answered point")
        assert row[REFUSED_AT] == "" and row[REASON] is None, \
            f"{where}: the sweep refused ({row[REFUSED_AT]}: {row[REASON]}), the individual solve answered"
        for name in outputs:
            assert same(row[name], expected[name]), f"{where}: {name} {row[name]!r} in the sweep, " \
                                                    f"{expected[name]!r} alone"
        rows.append({name: row[name] for name in outputs})
    return rows


@settings(max_examples=SCALE or 80, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(data=st.data())
def test_every_point_of_a_one_input_sweep_equals_its_own_solve(data):
    """One input of any sample, a few values around the typed one (repeated, back and forth): each point is
    the individual solve."""
    path = data.draw(st.sampled_from(PATHS), label="sample")
    entry = data.draw(st.sampled_from(sweepable(path)), label="input")
    axis = axis_of(entry, data.draw(axis_values(entry, 3, 6), label="values"))
    check_every_point(path, [axis])


@settings(max_examples=SCALE or 40, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(data=st.data())
def test_every_point_of_a_two_input_grid_equals_its_own_solve(data):
    """Two inputs of a sample in a grid (the first axis's values met again for each of the second's): each point
    is the individual solve."""
    path = data.draw(st.sampled_from([p for p in PATHS if len(sweepable(p)) >= 2]), label="sample")
    first, second = data.draw(st.lists(st.sampled_from(sweepable(path)), min_size=2, max_size=2,
                                       unique_by=lambda e: e.address), label="inputs")
    axes = [axis_of(first, data.draw(axis_values(first, 2, 3), label="first values")),
            axis_of(second, data.draw(axis_values(second, 2, 3), label="second values"))]
    check_every_point(path, axes)


@settings(max_examples=SCALE or 60, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(data=st.data())
def test_a_value_met_again_gives_the_answer_it_gave_the_first_time(data):
    """Values that go back and forth (a, b, a, b, a) or one value several times: each point is the individual
    solve, so a point met again gives what it gave the first time, whatever came between."""
    path = data.draw(st.sampled_from(PATHS), label="sample")
    entry = data.draw(st.sampled_from(sweepable(path)), label="input")
    a, b = data.draw(nearby(entry), label="a"), data.draw(nearby(entry), label="b")
    values = data.draw(st.sampled_from([(a, b, a), (a, b, a, b, a), (a, a, a), (b, a, a, b)]), label="values")
    rows = check_every_point(path, [axis_of(entry, values)])
    first = {}
    for value, row in zip(values, rows):
        if value in first:  # met again: what the sweep gave the first time (consistency)
            assert row.keys() == first[value].keys(), f"{path} {entry.address}={value}: {row} then {first[value]}"
            for name, got in row.items():
                assert (got == first[value][name]) if name == "refused" else same(got, first[value][name]), \
                    f"{path} {entry.address}={value}: {name} {first[value][name]!r}, then {got!r}"
        first.setdefault(value, row)


@settings(max_examples=SCALE or 100, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(data=st.data())
def test_a_temperature_unknowns_longer_sweep_equals_its_own_solves(data):
    """The sheets whose unknown is a temperature (where a solve's bracket is kept): a longer sweep, four to ten
    values drawn again and again from two to four, so kept brackets and states meet many orders of points."""
    path = data.draw(st.sampled_from([p for p in PATHS if sample(p).unknowns[0].kind == "temperature"]),
                     label="sample")
    entry = data.draw(st.sampled_from(sweepable(path)), label="input")
    pool = data.draw(st.lists(nearby(entry), min_size=2, max_size=4), label="pool")
    values = tuple(data.draw(st.lists(st.sampled_from(pool), min_size=4, max_size=10), label="values"))
    check_every_point(path, [axis_of(entry, values)])


@pytest.mark.parametrize("path, axis", [
    ("sample_data/steam_heater_glycol.json", Axis("streams[Steam].inlet.vapour_fraction", (1.0, 1.2), "")),
    ("sample_data/glycol_hydration_screening.json", Axis("vessels[R-7].screening.accumulation", (0.3, 1.3), "")),
], ids=["vapour_fraction", "accumulation"])
def test_a_fraction_beyond_one_is_refused_in_the_words_of_its_own_solve(path, axis):
    """The second point (a fraction of 1.2 or 1.3) is refused both ways at the axis's address; the words must be
    the individual solve's too (the engine's own refusal, consistency)."""
    ws = sample(path)
    row = sweep(ws, [axis], ["answer"]).iloc[1]
    alone = individually(ws, [axis], (axis.values[1],))
    assert isinstance(alone, HeatBalanceError) and row[REFUSED_AT] == alone.where == axis.address
    assert row[REASON].message == alone.message


def test_a_grid_point_with_two_refused_inputs_is_refused_at_one_of_them():
    """A negative flow (-1.8 t/h) and a pressure below vacuum (-10 barg) at one point: both are wrong, and the sweep
    refuses the point at the axis it sets first, in the words that value alone gets (the engine's own refusals,
    consistency); the individual solve, setting both, names the field it reads first."""
    path = "sample_data/condensate_flash.json"
    flow = Axis("streams[Condensate return].flow", (-1.8,), "t/h")
    pressure = Axis("streams[Condensate return].pressure", (-10.0,), "barg")
    for axes in ([pressure, flow], [flow, pressure]):
        row = sweep(sample(path), axes, ["answer"]).iloc[0]
        alone = individually(sample(path), [axes[0]], (axes[0].values[0],))
        assert (row[REFUSED_AT], row[REASON].message) == (alone.where, alone.message)
