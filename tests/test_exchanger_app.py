"""The exchanger panel on the page (AppTest): the check and utilities drawn, the demo utility list added through
the setter; the T–Q figure itself is tested in test_exchangers.py and in the browser test."""
from __future__ import annotations

from pathlib import Path

from streamlit.testing.v1 import AppTest

from heatbalance.links import encode_sheet
from heatbalance.worksheet import load_worksheet

ROOT = Path(__file__).resolve().parent.parent
APP = str(ROOT / "app.py")


def _open(sample: str | None = None) -> AppTest:
    at = AppTest.from_file(APP, default_timeout=120)
    if sample:
        ws = load_worksheet((ROOT / "sample_data" / sample).read_bytes())
        at.query_params["sheet"] = encode_sheet(ws)
    at.run()
    return at


def test_condenser_sample_shows_exchanger_and_utilities():
    at = _open("methanol_condenser_cooling_water.json")
    assert not at.exception
    assert "Will the exchanger do it? Which utility?" in [s.value for s in at.subheader]
    markdown = " ".join(m.value for m in at.markdown)
    assert "Exchanger E\\-301" in markdown and "Utilities for exchanger E\\-301" in markdown
    frames = [d.value for d in at.dataframe]
    utilities = next(f for f in frames if "utility" in f.columns)
    assert list(utilities["utility"]) == ["Cooling water", "Chilled water", "Brine -15 °C"]
    assert list(utilities["feasible"]) == ["yes", "yes", "yes"]
    zones = next(f for f in frames if "hot side" in f.columns)
    assert list(zones["hot side"]) == ["subcooling", "condensing"]


def test_demo_utilities_added_through_the_setter():
    at = _open()  # the default sample: no exchanger, no utilities
    at.button(key="exchanger_add_demo_utilities").click().run()
    assert not at.exception
    state = at.session_state["hb_page"]
    assert [u.name for u in state.worksheet.utilities][:2] == ["LP steam 4 barg", "MP steam 12 barg"]
    assert str(state.worksheet.operating_hours) == "8000 h"
