"""Sweep benchmark (issue 14): a 1000-point sweep of a one-line temperature solve, as ratios in one run.

Run:  python benchmarks/bench_sweep.py [--points N] [--repeat R]

  sweep s      median wall time of the sweep (analyses.sweep.sweep; the answer collected at each point)
  loop s       the same points by looping the public path: set the input by address, solve and analyse
  bare s       replaying, directly on the materials, the enthalpy calls the sweep's points make
  floor s      the least a per-point solve in Python costs: scipy's brentq on m·(h(T) − h_in) − Q alone, each
               point (no bracket over phase changes, no closure check, no warnings, no result)
  loop/sweep   how much faster the sweep is than the loop                 (target >= 3x)
  sweep/bare   the sweep's cost over the property calls it needs          (target <= 3x)
Also a 50 x 50 grid on the glycol heater sample (the page's heat map), for scale.
Times are ratios against baselines measured in the same run, never pass/fail thresholds.
"""
from __future__ import annotations

import argparse
import statistics
import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

from bench_engine import record_calls  # noqa: E402
from heatbalance.address import with_value  # noqa: E402
from heatbalance.analyses import solve_and_analyse  # noqa: E402
from heatbalance.analyses.sweep import Axis, axis_values, sweep  # noqa: E402
from heatbalance.worksheet import load_worksheet, parse_worksheet  # noqa: E402

ONE_LINE = {  # a water heater: 1 t/h from 20 °C; the duty is swept, the outlet temperature solved
    "title": "one-line heater", "streams": [{"name": "Water", "material": "water", "flow": "1 t/h",
                                             "pressure": "2 barg", "inlet": {"temperature": "20 degC"},
                                             "outlet": {"temperature": "60 degC"}}],
    "duties": [{"name": "Heater", "value": "40 kW"}],
    "unknowns": [{"kind": "temperature", "line": "Water", "end": "outlet"}]}


def median_s(action, repeat: int) -> float:
    samples = []
    for _ in range(repeat):
        start = time.perf_counter()
        action()
        samples.append(time.perf_counter() - start)
    return statistics.median(samples)


def floor_loop(duties_w: tuple[float, ...]):
    """The one-line sheet solved by hand at each duty: brentq on the water's enthalpy, nothing else."""
    from scipy.optimize import brentq

    from heatbalance.materials import get_material

    water, P, m = get_material("water"), 2e5 + 101325.0, 1000 / 3600  # 2 barg, 1 t/h (the sheet above)
    h_in, T_boil = water.enthalpy(293.15, P), water.transitions(P)[0].T
    return [brentq(lambda T: m * (water.enthalpy(T, P) - h_in) - Q, 273.16, T_boil, xtol=1e-7, rtol=1e-12)
            for Q in duties_w]


def main() -> None:
    parser = argparse.ArgumentParser()
    parser.add_argument("--points", type=int, default=1000)
    parser.add_argument("--repeat", type=int, default=5)
    args = parser.parse_args()
    ws = parse_worksheet(ONE_LINE)
    axis = Axis("duties[Heater].value", axis_values(5, 60, count=args.points), "kW")
    run_sweep = lambda: sweep(ws, [axis])  # noqa: E731

    def loop():
        return [solve_and_analyse(with_value(ws, axis.address, (v, "kW"))).answer.value_si for v in axis.values]

    run_sweep()  # warm the property caches
    calls = record_calls(run_sweep)
    sweep_s = median_s(run_sweep, args.repeat)
    loop_s = median_s(loop, max(1, args.repeat // 2))
    bare_s = median_s(lambda: [f(T, P) for f, T, P in calls], args.repeat)
    duties_w = tuple(v * 1e3 for v in axis.values)
    floor_s = median_s(lambda: floor_loop(duties_w), args.repeat)
    print(f"{args.points}-point sweep of a one-line temperature solve ({len(calls) / args.points:.1f} property "
          "calls a point)")
    print(f"  sweep {sweep_s:.3f} s   loop {loop_s:.3f} s   bare {bare_s:.4f} s   floor {floor_s:.4f} s")
    print(f"  loop/sweep {loop_s / sweep_s:5.2f}   (target >= 3)")
    print(f"  sweep/bare {sweep_s / bare_s:5.2f}   (target <= 3)")
    print(f"  floor/bare {floor_s / bare_s:5.2f}   sweep/floor {sweep_s / floor_s:5.2f}")
    glycol = load_worksheet(Path("sample_data/steam_heater_glycol.json").read_bytes())
    grid = [Axis("streams[Glycol].flow", axis_values(4, 20, count=50), "t/h"),
            Axis("streams[Steam].pressure", axis_values(1, 10, count=50), "barg")]
    grid_s = median_s(lambda: sweep(glycol, grid), 1)
    print(f"50 x 50 grid on the glycol heater: {grid_s:.2f} s ({grid_s / 2500 * 1e3:.2f} ms a point)")


if __name__ == "__main__":
    main()
