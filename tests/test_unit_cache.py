"""Unit conversions kept between runs (issue 16): the same numbers as pint, and pint not loaded at all."""
from __future__ import annotations

import json
import os
import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]
CONVERT = """
import json, sys
from heatbalance.units import UnitError, check_unit, kind_of, to_si
out = {"si": [to_si(4, "barg", "pressure"), to_si(212, "degF", "temperature"), to_si(12.5, "t/h", "mass_flow"),
              to_si(1, "kcal/h", "power"), to_si(3, "Btu/(lb*degF)", "specific_heat")],
       "kind": kind_of("kmol/h", ("mass_flow", "molar_flow")), "pint": "pint" in sys.modules}
try:
    check_unit("kW", "mass_flow", "streams[Steam].flow")
except UnitError as exc:
    out["refusal"] = str(exc)
print(json.dumps(out))
"""
# the SI values by hand: 4 bar + 1.01325 bar; (212 - 32)/1.8 + 273.15; 12500 kg / 3600 s; the IT calorie
# (1 kcal/h = 4186.8 J / 3600 s = 1.163 W); pint's Btu is 1055.056 J (ISO 31-4), so 1 Btu/(lb·°F) is
# 1055.056 J / (0.45359237 kg × 5/9 K), 1.4e-7 above the IT value 4186.8 J/(kg·K)
EXPECTED = [501325.0, 373.15, 12500 / 3600, 1.163, 3 * 1055.056 / (0.45359237 * 5 / 9)]


def run_conversions(folder: Path) -> dict:
    env = {**os.environ, "HEATBALANCE_CACHE_DIR": str(folder), "PYTHONPATH": str(ROOT)}
    done = subprocess.run([sys.executable, "-c", CONVERT], env=env, capture_output=True, text=True, check=True,
                          cwd=ROOT)
    return json.loads(done.stdout)


def test_a_second_run_converts_the_same_without_loading_pint(tmp_path):
    first = run_conversions(tmp_path)
    assert first["pint"] is True  # nothing kept yet: pint answered
    assert first["si"] == pytest.approx(EXPECTED, rel=1e-12)
    assert first["kind"] == "molar_flow"
    assert "streams[Steam].flow" in first["refusal"] and "mass flow" in first["refusal"]
    kept = list(tmp_path.glob("units-*.json"))
    assert len(kept) == 1
    second = run_conversions(tmp_path)
    assert second["pint"] is False  # every conversion above was kept: pint never loaded for them
    assert second["si"] == first["si"]  # bit for bit
    assert second["kind"] == "molar_flow"
    # the refusal that follows is written by pint, loaded only for it: the same words, the same field
    assert second["refusal"] == first["refusal"]


def test_a_file_that_does_not_read_is_ignored_and_replaced(tmp_path):
    run_conversions(tmp_path)
    (kept,) = tmp_path.glob("units-*.json")
    kept.write_text("{not json", encoding="utf-8")
    again = run_conversions(tmp_path)
    assert again["si"] == pytest.approx(EXPECTED, rel=1e-12)
    assert again["pint"] is True
    assert set(json.loads(kept.read_text(encoding="utf-8"))) == {"affine", "measures"}


def test_a_folder_that_cannot_be_written_costs_nothing_but_the_keeping(tmp_path):
    blocked = tmp_path / "a file, not a folder"
    blocked.write_text("")
    out = run_conversions(blocked / "cache")
    assert out["si"] == pytest.approx(EXPECTED, rel=1e-12)
