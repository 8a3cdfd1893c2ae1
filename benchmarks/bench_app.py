"""Time of one full script run of the page (AppTest) per sample, next to the engine's own solve time.

    python benchmarks/bench_app.py [--repeat 7]
    python benchmarks/bench_app.py --rerun [--repeat 21]   # the default sample: a rerun, a panel-only change

``--rerun`` times, on the default sample and inside the script thread (the script runner's start to stop
event: callbacks and drawing, not AppTest's parsing), a rerun of the page with nothing changed and a change
of the what-if panel's number of points (sent as the browser sends it: a run of the panel's fragment when it
has one, ``tests/fragment_runs.py``), each as a ratio of an empty page's rerun timed the same way; then where a
rerun's time goes (cProfile of app.py in the script thread, cumulative ms per run).

For each sample: the median of ``repeat`` runs of
  * solve: ``heatbalance.analyses.solve_and_analyse`` of the worksheet (what the page runs) (warm: properties and imports loaded);
  * page: a fresh ``AppTest`` of app.py holding that worksheet, one ``run()`` (the whole page:
    tables, solve, answer, contribution table, waterfall), AppTest's own overhead included;
  * rerun: a second ``run()`` of the same AppTest (what a widget change costs).
Target: the page adds no more than 150 ms over the solve. AppTest itself costs a fixed start-up on
a fresh run whatever the page; the same run times an empty page (one ``st.write``) as that baseline
and also reports the page net of it. Not part of pytest.
"""
from __future__ import annotations

import argparse
import pstats
import statistics
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))
sys.path.insert(0, str(ROOT / "tests"))

from fragment_runs import browser_runs  # noqa: E402  (runs as the browser asks for them, timed)
from streamlit.testing.v1 import AppTest  # noqa: E402

from heatbalance import load_worksheet  # noqa: E402
from heatbalance.analyses import solve_and_analyse as solve  # noqa: E402
from webapp.state import KEY, PageState  # noqa: E402

APP = str(ROOT / "app.py")
TARGET_ADDED_MS = 150.0
DEFAULT_SAMPLE = "steam_heater_glycol.json"
POINTS = "whatif_count_0"  # the what-if panel's number of points: changes no input of the worksheet
# app.py run under cProfile inside the script thread; each run's profile kept in the session
PROFILED_APP = f"""import cProfile, runpy
import streamlit as st
profile = cProfile.Profile()
profile.runcall(runpy.run_path, {APP!r}, run_name="__main__")
st.session_state.setdefault("bench_profiles", []).append(profile)
"""
PARTS = ("main", "solve", "render_answer", "render_inputs", "render_results", "render_sidebar", "render_save",
         "render_origin", "render_panel", "_render_contributions")
BUILDERS = ("energy_waterfall", "contribution_rows", "tq_figure", "screening_figure")  # pure figure/table builders


def _ms(action) -> float:
    start = time.perf_counter()
    action()
    return (time.perf_counter() - start) * 1000.0


def solve_ms(worksheet, repeat: int) -> float:
    solve(worksheet)  # warm
    return statistics.median(_ms(lambda: solve(worksheet)) for _ in range(repeat))


def empty_page_ms(repeat: int) -> tuple[float, float]:
    """AppTest's own cost: an empty page, fresh run and rerun."""
    first, again = [], []
    for _ in range(repeat):
        page = AppTest.from_string("import streamlit as st\nst.write('empty page')\n", default_timeout=60)
        first.append(_ms(page.run))
        again.append(_ms(page.run))
    return statistics.median(first), statistics.median(again)


def page_ms(worksheet, repeat: int) -> tuple[float, float]:
    first, again = [], []
    for _ in range(repeat):
        page = AppTest.from_file(APP, default_timeout=60)
        page.session_state[KEY] = PageState.opened(worksheet)  # the page's one state key
        first.append(_ms(page.run))
        if page.exception:
            raise SystemExit(f"the page failed: {[e.value for e in page.exception]}")
        again.append(_ms(page.run))
    return statistics.median(first), statistics.median(again)


def _verdict(ms: float) -> str:
    return "within target" if ms <= TARGET_ADDED_MS else "OVER target"


def _opened(source: str | None = None) -> AppTest:
    """A fresh AppTest of app.py (or of ``source``) on the default sample, after its first run."""
    page = AppTest.from_file(APP, default_timeout=60) if source is None else \
        AppTest.from_string(source, default_timeout=60)
    page.session_state[KEY] = PageState.opened(load_worksheet((ROOT / "sample_data" / DEFAULT_SAMPLE).read_bytes()))
    page.run()
    if page.exception:
        raise SystemExit(f"the page failed: {[e.value for e in page.exception]}")
    return page


def script_ms(repeat: int) -> dict[str, float]:
    """Median ms in the script thread: an empty page's rerun, the page's rerun, a panel-only change."""
    with browser_runs() as runs:
        empty = AppTest.from_string("import streamlit as st\nst.write('empty page')\n", default_timeout=60)
        empty.run()
        for _ in range(repeat):
            empty.run()
        empty_ms = statistics.median(runs.seconds[1:]) * 1e3
        page = _opened()
        start = len(runs.seconds)
        for _ in range(repeat):
            page.run()
        rerun_ms = statistics.median(runs.seconds[start:]) * 1e3
        start = len(runs.kinds)
        changes = []
        for i in range(repeat):
            points = page.number_input(key=POINTS)
            points.set_value(12 if i % 2 == 0 else 11)
            page = runs.interact(points)
            changes.append(runs.seconds[-1])
        kinds = sorted(set(runs.kinds[start:]))
    return {"empty": empty_ms, "rerun": rerun_ms, "panel": statistics.median(changes) * 1e3,
            "panel runs": "+".join(kinds)}


def rerun_profile(repeat: int) -> list[tuple[str, float]]:
    """Cumulative ms per run of the page's parts and of each extra panel, from cProfile in the script thread."""
    page = _opened(PROFILED_APP)
    for _ in range(repeat):
        page.run()
    stats = pstats.Stats(*page.session_state["bench_profiles"][1:])
    parts = {}
    for (path, _, name), (_, _, _, cumulative, _) in stats.stats.items():
        page_part = Path(path).name == "app.py" or "/webapp/" in path
        panel = path.endswith("_panel.py") and name.startswith("render_") and name.endswith("_panel")
        if (page_part and (name in PARTS or panel)) or name in BUILDERS:
            parts[f"{Path(path).stem}.{name}"] = cumulative * 1e3 / repeat
    return sorted(parts.items(), key=lambda item: -item[1])


def report_rerun(repeat: int) -> None:
    ms = script_ms(repeat)
    print(f"default sample ({DEFAULT_SAMPLE}), medians of {repeat}, in the script thread (start -> stop event)")
    print(f"  empty page rerun (baseline)          {ms['empty']:7.1f} ms")
    print(f"  page rerun, nothing changed          {ms['rerun']:7.1f} ms  "
          f"{ms['rerun'] / ms['empty']:6.1f}x the baseline")
    changed = f"what-if points changed ({ms['panel runs']} run)"
    print(f"  {changed:36s} {ms['panel']:7.1f} ms  {ms['panel'] / ms['empty']:6.1f}x the baseline, "
          f"{ms['panel'] / ms['rerun']:.2f}x a page rerun")
    print("\nwhere a rerun's time goes (cProfile, cumulative ms per run; profiling slows every call):")
    for label, cumulative in rerun_profile(repeat):
        print(f"  {label:48s} {cumulative:7.1f}")


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--repeat", type=int, default=None, help="runs per figure (7; 21 with --rerun)")
    parser.add_argument("--rerun", action="store_true", help="the default sample's rerun and a panel-only change")
    args = parser.parse_args(argv)
    if args.rerun:
        report_rerun(args.repeat or 21)
        return 0
    args.repeat = args.repeat or 7
    samples = sorted((ROOT / "sample_data").glob("*.json"))
    warm = AppTest.from_file(APP, default_timeout=60)
    warm.run()  # imports, CoolProp, plotly: loaded once, as on a running server
    base_first, base_again = empty_page_ms(args.repeat)
    header = (f"{'sample':32s} {'solve ms':>8s} {'page ms':>8s} {'added ms':>8s} {'ratio':>6s} "
              f"{'net added':>9s} {'rerun ms':>8s} {'net rerun':>9s}")
    print(header)
    print("-" * len(header))
    print(f"{'(empty page: AppTest baseline)':32s} {'':8s} {base_first:8.1f} {'':8s} {'':6s} {'':9s} "
          f"{base_again:8.1f}")
    worst = worst_net = 0.0
    for path in samples:
        worksheet = load_worksheet(path.read_bytes())
        engine = solve_ms(worksheet, args.repeat)
        page, rerun = page_ms(worksheet, args.repeat)
        added, net = page - engine, page - base_first - engine
        worst, worst_net = max(worst, added), max(worst_net, net)
        print(f"{path.stem:32s} {engine:8.2f} {page:8.1f} {added:8.1f} {page / engine:6.0f} {net:9.1f} "
              f"{rerun:8.1f} {rerun - base_again - engine:9.1f}")
    print(f"\nworst added over the solve: {worst:.1f} ms raw ({_verdict(worst)}), "
          f"{worst_net:.1f} ms net of AppTest's start-up ({_verdict(worst_net)}); target {TARGET_ADDED_MS:.0f} ms")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
