"""The command line of tools/neumann_kopp.py: --help only prints its usage, the table is written only with --write.

Each run is the real ``python -m tools.neumann_kopp`` on a copy of the tool and of its table in a temporary
folder (the tool finds its table beside it), so the shipped table is never touched.
"""
from __future__ import annotations

import shutil
import subprocess
import sys
from pathlib import Path

import pytest

from tools.neumann_kopp import TABLE

ROOT = Path(__file__).resolve().parent.parent
STALE_ROW = "fireclay brick,273.15,"  # a row of a blend the tool writes


@pytest.fixture
def copy(tmp_path) -> Path:
    """A copy of the tool beside a copy of its table with one blend row altered; the table's path."""
    (tmp_path / "tools").mkdir()
    shutil.copy(ROOT / "tools" / "neumann_kopp.py", tmp_path / "tools" / "neumann_kopp.py")
    table = tmp_path / TABLE.relative_to(ROOT)
    table.parent.mkdir(parents=True)
    text = TABLE.read_text(encoding="utf-8")
    assert STALE_ROW in text
    table.write_text(text.replace(STALE_ROW, STALE_ROW + "9", 1), encoding="utf-8")
    return table


def run(table: Path, *args: str) -> subprocess.CompletedProcess:
    folder = table.parents[len(TABLE.relative_to(ROOT).parts) - 1]
    return subprocess.run([sys.executable, "-m", "tools.neumann_kopp", *args], cwd=folder, capture_output=True,
                          text=True, timeout=300)


def test_help_prints_the_usage_and_writes_nothing(copy):
    before = copy.read_bytes()
    done = run(copy, "--help")
    assert done.returncode == 0 and done.stdout.startswith("usage: python -m tools.neumann_kopp")
    assert "--write" in done.stdout
    assert copy.read_bytes() == before


def test_without_write_it_says_the_table_differs_and_leaves_it(copy):
    before = copy.read_bytes()
    done = run(copy)
    assert done.returncode == 1 and "differs from the Neumann-Kopp rows: run with --write" in done.stderr
    assert copy.read_bytes() == before


def test_an_unknown_option_is_refused_and_writes_nothing(copy):
    before = copy.read_bytes()
    done = run(copy, "--wirte")
    assert done.returncode == 2 and "unrecognized arguments: --wirte" in done.stderr
    assert copy.read_bytes() == before


def test_write_rewrites_the_blends_rows_as_shipped(copy):
    done = run(copy, "--write")
    assert done.returncode == 0, done.stderr
    assert copy.read_text(encoding="utf-8") == TABLE.read_text(encoding="utf-8")  # the shipped rows are the tool's
    assert run(copy).returncode == 0
