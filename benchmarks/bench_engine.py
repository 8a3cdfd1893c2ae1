"""Engine benchmark: property evaluations and wall time per solve, against the bare cost of those calls.

Run:  python benchmarks/bench_engine.py [--repeat N]

For each sample and for a generated 50-line worksheet it reports
  evals/line  enthalpy evaluations per line in one solve      (target <= 40 for a temperature solve)
  solve ms    median wall time of one solve (worksheet already parsed)
  bare ms     median time of replaying the same enthalpy calls directly on the materials
  ratio       solve / bare                                      (target <= 3x)
Times are ratios against a baseline measured in the same run, never absolute pass/fail thresholds.
"""
from __future__ import annotations

import argparse
import glob
import statistics
import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

from heatbalance import properties  # noqa: E402
from heatbalance.balance import solve  # noqa: E402
from heatbalance.properties import EVALUATIONS  # noqa: E402
from heatbalance.worksheet import load_worksheet, parse_worksheet  # noqa: E402

MATERIAL_CLASSES = (properties.CoolPropFluid, properties.IncompressibleSolution, properties.TabulatedMaterial)


def record_calls(action):
    """Run ``action()`` once, recording every enthalpy call it makes as (bound method, T, P)."""
    calls = []
    originals = {cls: cls.enthalpy for cls in MATERIAL_CLASSES}

    def recorder(original):
        def enthalpy(self, T, P):
            calls.append((self, T, P))
            return original(self, T, P)
        return enthalpy

    for cls, original in originals.items():
        cls.enthalpy = recorder(original)
    try:
        action()
    finally:
        for cls, original in originals.items():
            cls.enthalpy = original
    return [(material.enthalpy, T, P) for material, T, P in calls]


def median_ms(action, repeat: int) -> float:
    samples = []
    for _ in range(repeat):
        start = time.perf_counter()
        action()
        samples.append((time.perf_counter() - start) * 1000)
    return statistics.median(samples)


def fifty_line_sheet():
    """50 streams of six materials mixing into one outlet whose temperature is the unknown."""
    materials = [("water", None, "3 barg"), ("ethylene glycol (aq)", 0.3, "3 barg"), ("toluene", None, "2 barg"),
                 ("air", None, "1 barg"), ("nitrogen", None, "5 barg"), ("liquid B", None, "0 barg")]
    streams = []
    for i in range(50):
        name, fraction, pressure = materials[i % len(materials)]
        value, unit = pressure.split()
        stream = {"name": f"S{i:02d}", "material": name, "flow": {"value": 500 + 37 * i, "unit": "kg/h"},
                  "pressure": {"value": float(value), "unit": unit},
                  "inlet": {"temperature": {"value": 15 + (i * 7) % 70, "unit": "degC"}},
                  "outlet": {"common": "Header"}}
        if fraction:
            stream["mass_fraction"] = fraction
        streams.append(stream)
    return parse_worksheet({
        "schema_version": 1, "title": "generated 50-line mixer", "basis": {"kind": "continuous"},
        "materials": [{"name": "liquid B", "source": "benchmark", "phases": [{"name": "liquid",
                       "cp": {"value": 4.0, "unit": "kJ/(kg*K)"}}],
                       "min_temperature": {"value": -20, "unit": "degC"}, "max_temperature": {"value": 200, "unit": "degC"}}],
        "common_temperatures": [{"name": "Header"}], "streams": streams,
        "duties": [{"name": "Trim heater", "value": {"value": 150, "unit": "kW"}}],
        "unknowns": [{"kind": "temperature", "common": "Header"}]})


def bench(label: str, ws, repeat: int) -> dict:
    lines = len(ws.streams) + sum(len(v.charges) for v in ws.vessels)
    solve(ws)  # warm caches (materials, saturation)
    EVALUATIONS.reset()
    solve(ws)
    evaluations = EVALUATIONS.count
    calls = record_calls(lambda: solve(ws))
    solve_ms = median_ms(lambda: solve(ws), repeat)
    bare_ms = median_ms(lambda: [f(T, P) for f, T, P in calls], repeat)
    return {"case": label, "unknown": ws.unknowns[0].kind, "lines": lines, "evals": evaluations,
            "evals/line": evaluations / lines, "solve ms": solve_ms, "bare ms": bare_ms,
            "ratio": solve_ms / bare_ms if bare_ms else float("nan")}


def main() -> None:
    parser = argparse.ArgumentParser()
    parser.add_argument("--repeat", type=int, default=30)
    args = parser.parse_args()
    rows = [bench(Path(p).stem, load_worksheet(Path(p).read_text(encoding="utf-8")), args.repeat)
            for p in sorted(glob.glob("sample_data/*.json"))]
    rows.append(bench("generated 50-line mixer", fifty_line_sheet(), args.repeat))
    header = f"{'case':40s} {'unknown':11s} {'lines':>5s} {'evals':>6s} {'evals/line':>10s} " \
             f"{'solve ms':>9s} {'bare ms':>8s} {'ratio':>6s}"
    print(header)
    print("-" * len(header))
    for r in rows:
        print(f"{r['case']:40s} {r['unknown']:11s} {r['lines']:5d} {r['evals']:6d} {r['evals/line']:10.1f} "
              f"{r['solve ms']:9.3f} {r['bare ms']:8.3f} {r['ratio']:6.2f}")
    print("\ntargets: evals/line <= 40 for temperature solves; ratio <= 3; 50-line solve well under 100 ms")


if __name__ == "__main__":
    main()
