"""The worker processes of the store's concurrency test (a module of its own so a fresh process can import it).

Started from a fork server, not forked from the test session: a forked child of a session that runs other
threads (the app tests, the browser) can inherit a lock held by one of them and hang.
"""
from __future__ import annotations

import traceback
from pathlib import Path

SAMPLES = sorted(Path(__file__).parent.parent.joinpath("sample_data").glob("*.json"))


def save_many(url: str, worker: int, saves: int, barrier, out) -> None:
    """Save ``saves`` worksheets: half of them this worker's own, half shared by every worker.

    Puts ``(worker, [(id, canonical JSON), ...])`` on ``out``, or ``(worker, "traceback text")`` on failure.
    """
    try:
        from heatbalance.links import canonical_json
        from heatbalance.store import WorksheetStore
        from heatbalance.worksheet import load_worksheet

        base = load_worksheet(SAMPLES[worker % len(SAMPLES)].read_bytes())
        shared = load_worksheet(SAMPLES[0].read_bytes())
        store = WorksheetStore(url, busy_timeout=120)
        barrier.wait(timeout=300)
        results = []
        for i in range(saves):
            if i % 2:
                ws = shared.model_copy(update={"notes": f"shared {i}"})
            else:
                ws = base.model_copy(update={"notes": f"worker {worker} save {i}"})
            rev = store.save(ws)
            results.append((rev.id, canonical_json(ws)))
        store.close()
        out.put((worker, results))
    except BaseException:  # noqa: BLE001 - report it to the test instead of leaving it waiting
        out.put((worker, traceback.format_exc()))
