"""The energy waterfall (heatbalance.figures): closes at zero, in the user's units, with hover details.

References: the engine's contribution table for the same result (heatbalance.results.contribution_rows),
and IAPWS-IF97 through the `iapws` package for one bar computed by hand.
"""
from pathlib import Path

import pytest
from iapws import IAPWS97

from heatbalance import load_worksheet, solve
from heatbalance.present.tables import contribution_rows
from heatbalance.present.figures import CLOSING_LABEL, energy_waterfall, waterfall_steps

SAMPLES = sorted((Path(__file__).resolve().parent.parent / "sample_data").glob("*.json"))


def solved(name):
    return solve(load_worksheet((SAMPLES[0].parent / name).read_bytes()))


@pytest.mark.parametrize("path", SAMPLES, ids=[p.stem for p in SAMPLES])
@pytest.mark.parametrize("system", ["SI", "US"])
def test_the_waterfall_closes_at_zero_and_matches_the_contribution_table(path, system):
    result = solve(load_worksheet(path.read_bytes()))
    steps = waterfall_steps(result, system)
    heat_column = next(c for c in contribution_rows(result, system)[0] if c.startswith("heat into process"))
    table = [row[heat_column] for row in contribution_rows(result, system)]
    assert [s["heat"] for s in steps[:-1]] == pytest.approx(table, rel=1e-12)
    scale = max(abs(h) for h in table)
    assert steps[-1]["label"] == CLOSING_LABEL
    assert sum(table) == pytest.approx(0.0, abs=1e-9 * scale)
    assert steps[-1]["heat"] == pytest.approx(0.0, abs=1e-9 * scale)


def test_a_bar_against_iapws_in_us_units():
    """Feedwater sample: 20,000 lb/h heated from 60 to 220 °F at 50 psig absorbs m·Δh."""
    result = solved("us_water_heater_duty.json")
    figure = energy_waterfall(result, "US")
    # IAPWS-IF97 (iapws package), P = 50 psi + 1 atm in MPa; h in kJ/kg
    P = (50 * 6894.757293168 + 101325) / 1e6
    dh = IAPWS97(T=(220 - 32) / 1.8 + 273.15, P=P).h - IAPWS97(T=(60 - 32) / 1.8 + 273.15, P=P).h
    absorbed_btu_h = 20000 * 0.45359237 * dh / 1.05505585262  # lb/h -> kg/h; kJ -> Btu (IT), NIST SP 811
    bar = list(figure.data[0].x).index("Feedwater")
    assert figure.data[0].y[bar] == pytest.approx(-absorbed_btu_h, rel=1e-5)  # ≈ −3.20 MMBtu/h
    assert "Btu/h" in figure.layout.title.text and "Btu/h" in figure.data[0].hovertemplate


def test_bars_are_labelled_and_hover_shows_line_states_and_heat():
    result = solved("steam_heater_glycol.json")
    trace = energy_waterfall(result).data[0]
    assert list(trace.x) == ["Glycol", "Steam", "Shell losses", CLOSING_LABEL]
    assert list(trace.measure) == ["relative", "relative", "relative", "total"]
    kind, detail = trace.customdata[0]
    assert kind == "stream" and "5.0 °C liquid → 40.0 °C liquid" in detail
    assert "heat into the process: %{y" in trace.hovertemplate and "kW" in trace.hovertemplate
    assert trace.text[-1] == "0.0"  # the closing bar shows no "-0.0"


def test_the_engine_never_imports_streamlit():
    engine = Path(__file__).resolve().parent.parent / "heatbalance"
    for module in engine.glob("*.py"):
        text = module.read_text(encoding="utf-8")
        assert "import streamlit" not in text and "from streamlit" not in text, module.name
