"""Each property call a solve needs is made once (issue 16): counted on known sheets, not timed."""
from __future__ import annotations

from collections import Counter
from pathlib import Path

import pytest

from heatbalance import properties
from heatbalance.balance import solve
from heatbalance.worksheet import load_worksheet, parse_worksheet

SAMPLES = Path(__file__).resolve().parents[1] / "sample_data"
MATERIAL_CLASSES = (properties.CoolPropFluid, properties.IncompressibleSolution, properties.TabulatedMaterial)


@pytest.fixture
def calls(monkeypatch):
    """Every enthalpy call made while the test runs, as (material name, T, P)."""
    made = []
    for cls in MATERIAL_CLASSES:
        def recorded(self, T, P, _original=cls.enthalpy):
            made.append((self.name, T, P))
            return _original(self, T, P)
        monkeypatch.setattr(cls, "enthalpy", recorded)
    return made


def mixer(count: int):
    """``count`` streams of three materials, each at its own pressure, mixing into one header (T unknown)."""
    kinds = [("water", "3 barg"), ("toluene", "2 barg"), ("nitrogen", "5 barg")]
    streams = [{"name": f"S{i:02d}", "material": kinds[i % 3][0], "flow": f"{500 + 37 * i} kg/h",
                "pressure": kinds[i % 3][1], "inlet": {"temperature": f"{15 + (i * 7) % 70} degC"},
                "outlet": {"common": "Header"}} for i in range(count)]
    return parse_worksheet({"title": "mixer", "common_temperatures": [{"name": "Header"}], "streams": streams,
                            "duties": [{"name": "Trim heater", "value": "150 kW"}],
                            "unknowns": [{"kind": "temperature", "common": "Header"}]})


def test_a_duty_solve_evaluates_each_state_once(calls):
    ws = load_worksheet((SAMPLES / "us_water_heater_duty.json").read_text(encoding="utf-8"))
    solve(ws)
    # one line, inlet and outlet: two states; before this change the result evaluated both again (4 calls)
    assert len(calls) == 2
    assert len(set(calls)) == 2


def test_an_amount_solve_evaluates_each_state_once(calls):
    ws = load_worksheet((SAMPLES / "steam_heater_glycol.json").read_text(encoding="utf-8"))
    solve(ws)
    repeated = [key for key, n in Counter(calls).items() if n > 1]
    assert repeated == []
    # the steam condenses between saturation states (the cached saturation line, no enthalpy call); the
    # glycol's inlet and outlet are the two states that need one
    assert len(calls) == 2


def test_a_mixer_shares_one_call_per_material_and_pressure_at_each_trial_temperature(calls):
    ws = mixer(30)
    inlet_states = {(["water", "toluene", "nitrogen"][i % 3], 15 + (i * 7) % 70 + 273.15) for i in range(30)}
    result = solve(ws)
    assert abs(result.residual) < 1e-3
    assert [key for key, n in Counter(calls).items() if n > 1] == []  # no state evaluated twice
    trial = Counter(T for name, T, P in calls if (name, round(T, 9)) not in
                    {(m, round(T0, 9)) for m, T0 in inlet_states})
    # at every trial temperature of the header: one call per material (three), not one per stream (ten each)
    assert trial and max(trial.values()) == 3
    # before: 30 inlet states + 30 calls per trial temperature + 30 again for the result (over 300 calls)
    assert len(calls) <= len(inlet_states) + 3 * len(trial)
