"""Time of one full script run of the page (AppTest) per sample, next to the engine's own solve time.

    python benchmarks/bench_app.py [--repeat 7]

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
import statistics
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

from streamlit.testing.v1 import AppTest  # noqa: E402

from heatbalance import load_worksheet  # noqa: E402
from heatbalance.analyses import solve_and_analyse as solve  # noqa: E402
from webapp.state import KEY, PageState  # noqa: E402

APP = str(ROOT / "app.py")
TARGET_ADDED_MS = 150.0


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


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--repeat", type=int, default=7)
    args = parser.parse_args(argv)
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
