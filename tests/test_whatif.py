"""What if: sweeps and case tables (issue 14), checked point by point against individual solves.

The expected values are the engine's own individual solves of the same sheets (a consistency check: the
sweep's fast path must give exactly what the public solve gives), and hand calculations where written.
"""
from __future__ import annotations

import csv
import io
import json
import math
import re

import pytest

from heatbalance import address as A
from heatbalance.analyses import solve_and_analyse
from heatbalance.analyses.cases import AS_TYPED, run_cases
from heatbalance.analyses.sweep import (MAX_POINTS, REASON, REFUSED_AT, WARNINGS, Axis, axis_values, output_names,
                                       sweep)
from heatbalance.cli import main
from heatbalance.errors import AddressError, HeatBalanceError, InputError
from heatbalance.links import decode_sheet, parse_link, sheet_link
from heatbalance.present.whatif import case_table, sweep_csv_bytes, sweep_figure, sweep_table
from heatbalance.problem import build_problem
from heatbalance.properties import EVALUATIONS
from heatbalance.worksheet import Case, Override, Quantity, load_worksheet, parse_worksheet

GLYCOL = "sample_data/steam_heater_glycol.json"
CONDENSER = "sample_data/solvent_condenser_cooling_water.json"
REACTOR = "sample_data/glycol_hydration_screening.json"
FLASH = "sample_data/condensate_flash.json"


def sample(path: str):
    return load_worksheet(open(path, "rb").read())


def one_by_one(ws, axes, values, output="answer"):
    """The public path: set the values by address, solve and analyse, pick the output (None if refused)."""
    for axis, value in zip(axes, values):
        ws = A.with_value(ws, axis.address, value if axis.unit == "" else (value, axis.unit))
    try:
        result = solve_and_analyse(ws)
    except HeatBalanceError as exc:
        return exc
    if output == "answer":
        return result.answer.value_si
    screening = {f"screening[{s.vessel}].MTSR": s.MTSR for s in result.screening}
    return screening[output]


# every kind of fast setter, and a slow one (a material's data), on the samples
CASES = [
    (GLYCOL, [Axis("streams[Glycol].outlet.temperature", axis_values(20, 110, count=10), "degC")], "answer"),
    (GLYCOL, [Axis("streams[Glycol].flow", (6, 12, 18, 26455), "lb/h")], "answer"),
    (GLYCOL, [Axis("streams[Steam].pressure", (0.5, 2, 4, 8, 15), "barg")], "answer"),
    (GLYCOL, [Axis("losses[Shell losses].value", (0, 2, 20, -1), "kW")], "answer"),
    (GLYCOL, [Axis("streams[Glycol].mass_fraction", (0.1, 0.3, 0.5), "")], "answer"),  # rebuilt per point
    (CONDENSER, [Axis("streams[Cooling water].inlet.temperature", (20, 26, 32, 38, 45), "degC"),
                 Axis("streams[Cooling water].outlet.temperature", (38, 42), "degC")], "answer"),
    (CONDENSER, [Axis("streams[Toluene overhead].inlet.vapour_fraction", (0.0, 0.5, 1.0), "")], "answer"),
    (FLASH, [Axis("streams[Condensate return].outlet.pressure", (0, 0.5, 2, 9), "barg")], "answer"),
    (REACTOR, [Axis("vessels[R-7].charges[Ethylene oxide].mass", (0.5, 0.9, 1.2), "t")], "answer"),
    (REACTOR, [Axis("duties[Jacket cooling].value", (-60, -95, -130), "kW")], "answer"),
    (REACTOR, [Axis("vessels[R-7].screening.accumulation", (0.1, 0.3, 1.0), "")], "screening[R-7].MTSR"),
    (REACTOR, [Axis("vessels[R-7].charges[Water].initial.temperature", (30, 45, 60), "degC")],
     "screening[R-7].MTSR"),
]


@pytest.mark.parametrize("path, axes, output", CASES, ids=[f"{c[0].split('/')[-1][:10]}-{c[1][0].address}"
                                                          for c in CASES])
def test_a_sweeps_points_equal_individual_solves(path, axes, output):
    ws = sample(path)
    frame = sweep(ws, axes, [output])
    assert len(frame) == math.prod(len(a.values) for a in axes)
    for _, row in frame.iterrows():
        values = [row[a.column] for a in axes]
        expected = one_by_one(ws, axes, values, output)
        if isinstance(expected, HeatBalanceError):
            assert math.isnan(row[output]) and row[REFUSED_AT] == expected.where
            assert row[REASON].message == expected.message
        else:
            assert row[REFUSED_AT] == "" and row[REASON] is None
            assert row[output] == pytest.approx(expected, rel=1e-9, abs=1e-12)


# a one-line water heater whose outlet temperature is the unknown (no equipment, no computed loss): its sweeps keep
# the temperature solve's bracket from point to point while the heated states stay the same
ONE_LINE_HEATER = {"title": "one-line heater", "streams": [{
    "name": "Water", "material": "water", "flow": "1 t/h", "pressure": "2 barg", "inlet": {"temperature": "20 degC"},
    "outlet": {"temperature": "60 degC"}}], "duties": [{"name": "Heater", "value": "40 kW"}],
    "unknowns": [{"kind": "temperature", "line": "Water", "end": "outlet"}]}


@pytest.mark.parametrize("axis, boiling", [
    # boiling at 2 barg from 133.6 °C takes 133 to 734 kW (hand: 0.2778 kg/s × (561.5 − 84.0) kJ/kg, then + 2163
    # kJ/kg; IAPWS-IF97 steam tables, from memory): 250 and 700 kW end on the plateau, 900 kW as steam
    (Axis("duties[Heater].value", (5, 40, 250, 700, 900), "kW"), [False, False, True, True, False]),
    (Axis("streams[Water].flow", (0.5, 1, 3), "t/h"), [False] * 3),  # the heated states' amount: a bracket each
    (Axis("streams[Water].pressure", (0, 2, 10), "barg"), [False] * 3),  # and their pressure (another boiling point)
], ids=lambda a: getattr(a, "address", ""))
def test_a_kept_bracket_gives_each_point_its_own_solve(axis, boiling):
    """A bracket kept across points for the wrong amount or pressure would move the answer: every point must
    still equal its individual solve (and land on the boiling plateau where that does)."""
    ws = parse_worksheet(ONE_LINE_HEATER)
    frame = sweep(ws, [axis], ["answer", "answer.phase_fraction"])
    for (_, row), on_plateau in zip(frame.iterrows(), boiling):
        single = solve_and_analyse(A.with_value(ws, axis.address, (row[axis.column], axis.unit))).answer
        assert row["answer"] == pytest.approx(single.value_si, rel=1e-12)
        assert (single.phase_fraction is not None) == on_plateau
        fraction = math.nan if single.phase_fraction is None else single.phase_fraction
        assert row["answer.phase_fraction"] == pytest.approx(fraction, rel=1e-12, nan_ok=True)


def test_a_sweep_keeps_its_bracket_and_fixed_states_between_points():
    """After its first point, a duty sweep evaluates the water's enthalpy neither at the ends of its data (the
    bracket's ends are kept) nor at the inlet (a fixed state): three calls fewer a point than a solve from cold."""
    ws = parse_worksheet(ONE_LINE_HEATER)
    EVALUATIONS.count = 0
    sweep(ws, [Axis("duties[Heater].value", (40,), "kW")])
    cold = EVALUATIONS.count
    EVALUATIONS.count = 0
    sweep(ws, [Axis("duties[Heater].value", (40, 40, 40, 40, 40), "kW")])
    assert EVALUATIONS.count == cold + 4 * (cold - 3)


def test_a_kept_state_is_only_for_its_own_material():
    """A state kept under another material's id (an id Python gave again) is not taken: evaluated afresh."""
    from heatbalance.balance import Point, SweepMemo, evaluate_state
    from heatbalance.materials import get_material

    problem = build_problem(parse_worksheet(ONE_LINE_HEATER))
    inlet, water = problem.lines[0].initial, problem.lines[0].material
    T = problem.temperatures[inlet.var]
    memo = SweepMemo()
    memo.states[id(water), T, inlet.P] = (get_material("toluene"), Point(T, None, -1.0))
    with memo:
        # 20 °C water at 3.013 bar(a): 84.201 kJ/kg (IAPWS-IF97 via iapws)
        assert evaluate_state(water, inlet, problem.temperatures, {}).h == pytest.approx(84_201.26, rel=1e-6)
        assert memo.states[id(water), T, inlet.P][0] is water  # now kept for water itself


def test_brents_method_core_equals_scipys_public_brentq(monkeypatch):
    """The temperature solve calls scipy's compiled Brent core where this scipy has it; it must find what the public
    ``brentq`` finds, and without it the solve falls back to ``brentq`` itself."""
    from scipy.optimize import brentq

    from heatbalance import balance

    f = lambda T: 4180.0 * (T - 293.15) - 1.5e5 + 0.9 * (T - 293.15) ** 2  # noqa: E731 (a water-like residual)
    expected = brentq(f, 273.16, 400.0, xtol=1e-7, rtol=1e-12, maxiter=100)
    assert balance._brent()(f, 273.16, 400.0) == expected
    monkeypatch.setattr(balance, "_compiled_brent_core", lambda: None)  # a scipy without it
    assert balance._brent.__wrapped__()(f, 273.16, 400.0) == expected
    from heatbalance.errors import NoSolutionError

    monkeypatch.setattr(balance, "_compiled_brent_core", lambda: lambda *args: (0.5005, 4, 2, -2))  # not converged
    with pytest.raises(NoSolutionError, match="did not converge"):
        balance._brent.__wrapped__()(f, 273.16, 400.0)
    monkeypatch.undo()
    with pytest.raises(NoSolutionError, match="the property data give no number at"):  # a NaN: never a root
        balance._root_in_segment(lambda T: math.nan, (273.16, -1.0), (400.0, 1.0))


def test_refused_points_carry_their_address_and_the_sweep_goes_on():
    frame = sweep(sample(GLYCOL), [Axis("streams[Glycol].outlet.temperature", (40, 120, 60), "degC")])
    assert list(frame[REFUSED_AT]) == ["", "streams[Glycol].outlet.temperature", ""]
    assert "outside the property data of ethylene glycol (aq)" in frame[REASON][1].message
    assert frame["answer"][0] == pytest.approx(sample_answer(GLYCOL), rel=1e-9)  # 40 °C is the sample itself


def sample_answer(path):
    return solve_and_analyse(sample(path)).answer.value_si


@pytest.mark.parametrize("axis, message", [
    (Axis("streams[Glycol].flow", (1, 2), "kW"), r"^streams\[Glycol\]\.flow: unit 'kW' is not a mass flow"),
    (Axis("streams[Nope].flow", (1, 2), "t/h"), r"^streams\[Nope\]\.flow: no stream called 'Nope'"),
    (Axis("streams[Glycol].name", (1, 2), ""), r"is not a numeric input"),
    (Axis("streams[Steam].flow", (1, 2), "kg/h"), r"^streams\[Steam\]\.flow: this is the unknown"),
    (Axis("streams[Glycol].mass_fraction", (0.2,), "kg"), r"plain number between 0 and 1"),
    (Axis("streams[Glycol].flow", (1, float("nan")), "t/h"), r"finite number"),
])
def test_a_bad_sweep_is_refused_at_its_address(axis, message):
    with pytest.raises(AddressError, match=message):
        sweep(sample(GLYCOL), [axis])


def test_too_many_points_is_refused_with_the_address():
    flow = Axis("streams[Glycol].flow", axis_values(1, 20, count=400), "t/h")
    temperature = Axis("streams[Glycol].inlet.temperature", axis_values(1, 30, count=MAX_POINTS // 400 + 1), "degC")
    with pytest.raises(AddressError, match=r"^streams\[Glycol\]\.inlet\.temperature: 100,\d+ points is more than"):
        sweep(sample(GLYCOL), [flow, temperature])


def test_a_sweep_crossing_a_phase_change_reports_each_point():
    """Condensate flashed to a rising pressure: flashing stops when the pressure reaches the inlet's saturation
    pressure (175 °C: 8.92 bar(a), IAPWS-IF97, from memory), and the outlet is then liquid: each point says so."""
    frame = sweep(sample(FLASH), [Axis("streams[Condensate return].outlet.pressure", (0, 4, 9), "barg")],
                  ["answer", "answer.phase_fraction"])
    fractions = list(frame["answer.phase_fraction"])
    assert fractions[0] > fractions[1] > 0 and math.isnan(fractions[2])  # 9 barg: no vapour, a plain temperature


def test_each_point_reports_its_warnings():
    """Steam let down from 15 barg: each point says the steam condenses (a phase change); the glycol heated past
    its validated range says so too (a validity limit crossed along the sweep)."""
    frame = sweep(sample(GLYCOL), [Axis("streams[Glycol].outlet.temperature", (40, 95), "degC")])
    texts = [" ".join(p.text for p in phrases) for phrases in frame[WARNINGS]]
    assert all("Steam changes phase" in t for t in texts)
    expected = [solve_and_analyse(A.with_value(sample(GLYCOL), "streams[Glycol].outlet.temperature", (v, "degC")))
                .warnings for v in (40, 95)]
    assert [[p.text for p in w] for w in frame[WARNINGS]] == [[p.text for p in w] for w in expected]


def test_outputs_are_named_and_checked():
    names = output_names(build_problem(sample(REACTOR)))
    assert {"answer", "residual", "lines[R-7 / Water].heat", "terms[Hydration].heat", "screening[R-7].MTSR",
            "screening[R-7].criticality_class"} <= set(names)
    with pytest.raises(AddressError, match="no output called 'lines\\[Nope\\].heat'"):
        sweep(sample(REACTOR), [Axis("vessels[R-7].screening.accumulation", (0.5,), "")], ["lines[Nope].heat"])


def test_axis_values():
    assert axis_values(20, 32, count=7) == (20.0, 22.0, 24.0, 26.0, 28.0, 30.0, 32.0)
    assert axis_values(10, 0, step=5) == (10.0, 5.0, 0.0)
    with pytest.raises(InputError):
        axis_values(0, 1)


# --------------------------------------------------------------------------- presentation
def test_the_sweep_table_and_csv_are_in_the_view_units_and_the_answer_as_on_the_answer():
    frame = sweep(sample(GLYCOL), [Axis("streams[Glycol].outlet.temperature", (40, 60), "degC")],
                  ["answer", "lines[Glycol].heat"])
    table = sweep_table(frame, "US")
    # the steam flow typed in kg/h is a unit set's own unit: the US view writes it in lb/h, as its answer does
    assert list(table.columns) == ["Glycol outlet temperature [°C]", "Steam flow [lb/h]",
                                   "Glycol: heat absorbed [Btu/h]", REFUSED_AT, REASON, WARNINGS]
    # 1 lb = 0.45359237 kg (exact)
    assert table["Steam flow [lb/h]"][0] == pytest.approx(sample_answer(GLYCOL) * 3600 / 0.45359237, rel=1e-9)
    rows = list(csv.DictReader(io.StringIO(sweep_csv_bytes(frame, "SI").decode("utf-8-sig"))))
    assert float(rows[1]["Glycol outlet temperature [°C]"]) == 60.0
    assert float(rows[0]["Steam flow [kg/h]"]) == pytest.approx(sample_answer(GLYCOL) * 3600, rel=1e-9)


def test_figures_for_one_and_two_inputs():
    ws = sample(GLYCOL)
    line = sweep_figure(sweep(ws, [Axis("streams[Glycol].outlet.temperature", (40, 60, 120), "degC")]))
    assert len(line.data[0].x) == 3 and line.data[0].y[2] is None or math.isnan(line.data[0].y[2])
    grid = sweep(ws, [Axis("streams[Glycol].flow", (6, 12), "t/h"), Axis("streams[Steam].pressure", (2, 4, 8), "barg")])
    heat = sweep_figure(grid, "SI")
    assert heat.data[0].type == "heatmap" and len(heat.data[0].z) == 3 and len(heat.data[0].z[0]) == 2


# --------------------------------------------------------------------------- cases
def test_the_condenser_cases_by_hand_and_against_individual_solves():
    ws = sample(CONDENSER)
    frame = run_cases(ws, base="design")
    assert list(frame.columns[:5]) == [AS_TYPED, "winter", "design", "summer", "summer, return 42 °C"]
    duty = -frame.loc["lines[Toluene overhead].heat", "design"]  # W, the same in every case
    # hand: the cooling water takes the duty: m = Q / (cp·ΔT) with cp ≈ 4.18 kJ/(kg·K) (common practice, ±0.3 %)
    for case, rise in (("winter", 18), ("design", 12), ("summer", 6), ("summer, return 42 °C", 10)):
        assert frame.loc["answer", case] == pytest.approx(duty / (4180 * rise), rel=5e-3)
        single = solve_and_analyse(A.with_value(ws, "streams[Cooling water].inlet.temperature",
                                                (32 if "summer" in case else 20 if case == "winter" else 26, "degC")))
        if case != "summer, return 42 °C":
            assert frame.loc["answer", case] == pytest.approx(single.answer.value_si, rel=1e-12)
    assert frame.loc["answer", "summer − design"] == pytest.approx(
        frame.loc["answer", "summer"] - frame.loc["answer", "design"], rel=1e-12)
    table = case_table(frame, "SI")
    assert table.loc["Cooling water flow [t/h]", "summer"] == pytest.approx(frame.loc["answer", "summer"] * 3.6)


def test_a_refused_case_keeps_its_reason_and_the_others_go_on():
    ws = sample(CONDENSER)
    bad = Case(name="too hot", overrides=[Override(address="streams[Cooling water].inlet.temperature",
                                                   value=Quantity(value=50, unit="degC"))])
    typo = Case(name="typo", overrides=[Override(address="streams[Cooling watr].inlet.temperature",
                                                 value=Quantity(value=20, unit="degC"))])
    frame = run_cases(ws.model_copy(update={"cases": [*ws.cases, bad, typo]}))
    refusals = frame.attrs["refusals"]
    assert set(refusals) == {"too hot", "typo"}
    # 50 °C water returning at 38 °C would give heat, not take it: a negative flow, refused at the unknown
    assert refusals["too hot"].where == "streams[Cooling water].flow"
    assert "negative amount" in refusals["too hot"].message
    assert refusals["typo"].where == "cases[typo]" and "no stream called 'Cooling watr'" in refusals["typo"].message
    assert math.isfinite(frame.loc["answer", "winter"])


def test_cases_survive_save_open_and_the_sheet_link(tmp_path):
    from heatbalance.store import WorksheetStore

    ws = sample(CONDENSER)
    _, payload = parse_link(sheet_link(ws, "https://sheets.example.invalid/"))
    assert decode_sheet(payload).cases == ws.cases
    with WorksheetStore(f"sqlite:///{tmp_path / 'store.sqlite3'}") as store:
        assert store.open(store.save(ws).id).worksheet.cases == ws.cases


def test_a_rename_carries_the_cases_overrides():
    renamed = A.rename(sample(CONDENSER), "streams[Cooling water]", "CW")
    assert {o.address for c in renamed.cases for o in c.overrides} == {"streams[CW].inlet.temperature",
                                                                       "streams[CW].outlet.temperature"}
    assert run_cases(renamed).loc["answer", "summer"] == pytest.approx(run_cases(sample(CONDENSER)).loc["answer",
                                                                                                      "summer"])


def test_an_unknown_base_case_is_refused():
    with pytest.raises(AddressError, match=r"no case called 'autumn' \(there are: as typed, winter"):
        run_cases(sample(CONDENSER), base="autumn")


# --------------------------------------------------------------------------- command line
def test_cli_sweep_csv_and_json_parse(capsys):
    args = ["sweep", GLYCOL, "--vary", "streams[Glycol].outlet.temperature=20:100:5 degC"]
    assert main([*args, "--csv"]) == 0
    rows = list(csv.DictReader(io.StringIO(capsys.readouterr().out)))
    assert [float(r["Glycol outlet temperature [°C]"]) for r in rows] == [20, 40, 60, 80, 100]
    assert float(rows[1]["Steam flow [kg/h]"]) == pytest.approx(sample_answer(GLYCOL) * 3600, rel=1e-9)
    assert main([*args, "--json", "--units", "US"]) == 0
    data = json.loads(capsys.readouterr().out)
    assert data["columns"][:2] == ["Glycol outlet temperature [°C]", "Steam flow [lb/h]"]  # as the US answer


def test_cli_cases_and_a_bad_vary(capsys):
    assert main(["cases", CONDENSER, "--base", "design", "--csv"]) == 0
    rows = list(csv.reader(io.StringIO(capsys.readouterr().out)))
    assert rows[0][:4] == ["output", AS_TYPED, "winter", "design"]
    # the table for people writes each output's cases and differences alike (hand: 28.31 t/h as typed)
    assert main(["cases", CONDENSER]) == 0
    flow = next(line for line in capsys.readouterr().out.splitlines() if line.startswith("Cooling water flow"))
    assert flow.split()[4:6] == ["28.31", "15.72"]
    assert main(["sweep", GLYCOL, "--vary", "streams[Glycol].flow=6:18:x t/h"]) == 2
    assert capsys.readouterr().err.startswith("error: --vary: 'streams[Glycol].flow=6:18:x t/h' is not ADDRESS=")
    assert main(["sweep", GLYCOL, "--vary", "streams[Glycol].flow=6,12 kW"]) == 1
    assert capsys.readouterr().err == ("error: streams[Glycol].flow: unit 'kW' is not a mass flow "
                                       "(it measures power)\n")


def test_warnings_every_point_shares_are_said_once():
    from heatbalance.present.whatif import shared_warnings

    frame = sweep(sample(GLYCOL), [Axis("streams[Glycol].outlet.temperature", (40, 60, 120), "degC")])
    shared = shared_warnings(frame, "SI")
    assert len(shared) == 1 and shared[0].startswith("Steam changes phase")
    table = sweep_table(frame, "SI", shared)
    assert not any("Steam changes phase" in text for text in table[WARNINGS])
    assert all("Steam changes phase" in text for text in sweep_table(frame, "SI")[WARNINGS][:2])


def test_csv_numbers_carry_ten_significant_figures():
    """No 16-digit float tails in a CSV (ten figures: 1e-10 relative), in the sweep's, the cases' and the results'."""
    from heatbalance.present.exports import results_csv_bytes
    from heatbalance.present.whatif import case_csv_bytes

    long_number = re.compile(r"\d\.?\d{11,}")  # eleven or more digits in a row, a decimal point allowed among them
    frame = sweep(sample(GLYCOL), [Axis("streams[Glycol].outlet.temperature", (20, 60.000000000001, 100), "degC")])
    texts = [sweep_csv_bytes(frame).decode("utf-8-sig"),
             case_csv_bytes(run_cases(sample(CONDENSER), "design")).decode("utf-8-sig"),
             results_csv_bytes(solve_and_analyse(sample(GLYCOL))).decode("utf-8-sig")]
    for text in texts:
        assert not long_number.search(text), long_number.search(text)
    rows = list(csv.DictReader(io.StringIO(texts[0])))
    # the engine's own answer (consistency), to the ten figures written
    assert float(rows[0]["Steam flow [kg/h]"]) == pytest.approx(frame["answer"][0] * 3600, rel=1e-9)


def test_a_point_with_a_warning_of_its_own_is_ringed_in_the_chart_and_listed():
    """A shift engineer's finding: the batch started at 100 °C at 0 barg is counted as steam (water boils at
    99.97 °C at 1.01325 bar, IAPWS-IF97 via iapws) and the sweep drew that point like any other. Now it is ringed
    in the chart and its warning is its own (not one every point has)."""
    from heatbalance.present.whatif import WARNED_NAME, own_warnings

    ws = sample("sample_data/batch_reactor_exotherm.json")
    axis = Axis("vessels[R-2].charges[Batch].initial.temperature", (40, 70, 100), "degC")
    frame = sweep(ws, [axis])
    own = own_warnings(frame)
    assert [bool(w) for w in own] == [False, False, True]
    assert any("vapour as charged" in t for t in own[2])
    ringed = next(t for t in sweep_figure(frame).data if t.name == WARNED_NAME)
    assert list(ringed.x) == [100]


def test_a_warning_whose_numbers_change_along_the_sweep_rings_no_point():
    """A review's finding: the steam's 'changes phase ... 2,133.0 kJ/kg' differs in its number at each pressure, but
    it is the same warning at every point (same words, same address): no point is unlike the others."""
    from heatbalance.present.whatif import own_warnings

    frame = sweep(sample(GLYCOL), [Axis("streams[Steam].pressure", (2, 3, 4, 5), "barg")])
    assert own_warnings(frame) == [[], [], [], []]


def test_a_sweep_or_case_table_that_bears_on_safety_carries_the_caution_once(capsys):
    """A plant engineer's finding: MTSR and MTT columns went out in the sweep's CSV, table and JSON without the
    caution; a sweep of the answer alone on a heater needs none."""
    import pandas as pd

    from heatbalance.present.whatif import case_csv_bytes
    from heatbalance.reactor import CAUTION

    axis = Axis("vessels[R-7].screening.accumulation", (0.1, 0.5, 1.0), "")
    text = sweep_csv_bytes(sweep(sample(REACTOR), [axis])).decode("utf-8-sig")
    assert text.splitlines()[0].startswith("# caution: A screening estimate") and text.count("# caution") == 1
    assert len(pd.read_csv(io.StringIO(text), comment="#")) == 3
    assert "caution" not in sweep_csv_bytes(sweep(sample(GLYCOL), [Axis("streams[Glycol].flow", (6, 12),
                                                                               "t/h")])).decode("utf-8-sig")
    assert case_csv_bytes(run_cases(sample(REACTOR))).decode("utf-8-sig").count("# caution") == 1
    args = ["sweep", REACTOR, "--vary", "vessels[R-7].screening.accumulation=0.1,1"]
    assert main(args) == 0
    assert capsys.readouterr().out.count(CAUTION) == 1
    assert main([*args, "--json"]) == 0
    assert json.loads(capsys.readouterr().out)["caution"] == CAUTION
