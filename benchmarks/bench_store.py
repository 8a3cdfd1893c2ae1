"""Worksheet store benchmark: saves per second and open latency, on SQLite and on PostgreSQL.

Run:  python benchmarks/bench_store.py [--saves N] [--opens N] [--processes P] [--no-postgres]

For each backend it reports
  saves/s (1 process)    distinct worksheets saved one after another (each save is a committed transaction)
  saves/s (P processes)  the same, P processes saving at once (total over all of them)
  re-saves/s             saving worksheets that are already stored (the ON CONFLICT path)
  open ms                median and 95th percentile of opening a revision by id (read, check, validate)
  ratio                  open / bare load_worksheet of the same JSON (the validation every open does anyway)
SQLite runs on a temporary file (WAL, synchronous=FULL). PostgreSQL is a throwaway server on loopback
(tests/pg_server.py, Debian's package) with fsync on, as a real server would run.
Not part of pytest.
"""
from __future__ import annotations

import argparse
import multiprocessing
import random
import statistics
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))
sys.path.insert(0, str(ROOT / "tests"))

from heatbalance.links import canonical_json  # noqa: E402
from heatbalance.store import WorksheetStore  # noqa: E402
from heatbalance.worksheet import load_worksheet  # noqa: E402

SAMPLES = [load_worksheet(p.read_bytes()) for p in sorted((ROOT / "sample_data").glob("*.json"))]


def worksheets(count: int, tag: str):
    """``count`` distinct worksheets: the samples with a note that makes each one new."""
    return [SAMPLES[i % len(SAMPLES)].model_copy(update={"notes": f"bench {tag} {i}"}) for i in range(count)]


def _save_many(url: str, sheets, barrier=None) -> float:
    store = WorksheetStore(url, busy_timeout=120)
    if barrier is not None:
        barrier.wait()
    start = time.perf_counter()
    for ws in sheets:
        store.save(ws)
    elapsed = time.perf_counter() - start
    store.close()
    return elapsed


def _worker(url, sheets, barrier, out):
    out.put(_save_many(url, sheets, barrier))


def concurrent_saves(url: str, processes: int, per_process: int, tag: str) -> float:
    context = multiprocessing.get_context("fork")
    barrier, out = context.Barrier(processes + 1), context.Queue()
    workers = [context.Process(target=_worker, args=(url, worksheets(per_process, f"{tag}-p{p}"), barrier, out))
               for p in range(processes)]
    for w in workers:
        w.start()
    barrier.wait()
    start = time.perf_counter()
    for _ in workers:
        out.get()
    elapsed = time.perf_counter() - start
    for w in workers:
        w.join()
    return processes * per_process / elapsed


def bench(url: str, label: str, saves: int, opens: int, processes: int) -> dict:
    with WorksheetStore(url) as store:
        sheets = worksheets(saves, label)
        start = time.perf_counter()
        ids = [store.save(ws).id for ws in sheets]
        single = saves / (time.perf_counter() - start)
        start = time.perf_counter()
        for ws in sheets:
            store.save(ws)
        resave = saves / (time.perf_counter() - start)
    parallel = concurrent_saves(url, processes, saves // processes or 1, label)
    with WorksheetStore(url) as store:
        rng = random.Random(1)
        picks = [rng.choice(ids) for _ in range(opens)]
        store.open(picks[0])  # warm the connection pool
        times, bare = [], []
        for rev_id in picks:
            t0 = time.perf_counter()
            revision = store.open(rev_id)
            times.append(time.perf_counter() - t0)
            text = canonical_json(revision.worksheet)
            t0 = time.perf_counter()
            load_worksheet(text)
            bare.append(time.perf_counter() - t0)
        total = store.count()
    times.sort()
    return {"backend": label, "saves/s (1 process)": single, f"saves/s ({processes} processes)": parallel,
            "re-saves/s": resave, "open ms median": 1000 * statistics.median(times),
            "open ms p95": 1000 * times[int(0.95 * (len(times) - 1))],
            "ratio open/bare load": statistics.median(times) / statistics.median(bare), "revisions": total}


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--saves", type=int, default=400)
    parser.add_argument("--opens", type=int, default=400)
    parser.add_argument("--processes", type=int, default=8)
    parser.add_argument("--no-postgres", action="store_true")
    args = parser.parse_args()
    rows = []
    with tempfile.TemporaryDirectory() as tmp:
        rows.append(bench(f"sqlite:///{tmp}/bench.sqlite3", "SQLite", args.saves, args.opens, args.processes))
    if not args.no_postgres:
        from pg_server import PostgresUnavailable, throwaway_postgres

        try:
            with throwaway_postgres(fsync=True) as url:
                rows.append(bench(url, "PostgreSQL", args.saves, args.opens, args.processes))
        except PostgresUnavailable as exc:
            print(f"PostgreSQL skipped: {exc}")
    keys = list(rows[0])
    print("  ".join(f"{k:>24s}" for k in keys[:1]) + "".join(f"{r['backend']:>14s}" for r in rows))
    for key in keys[1:]:
        cells = "".join(f"{r[key]:>14,.1f}" if isinstance(r[key], float) else f"{r[key]:>14}" for r in rows)
        print(f"{key:>24s}  {cells}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
