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


# --------------------------------------------------------------------------- the exchanger editor
def _edit(at: AppTest, choice: str, **values) -> AppTest:
    """Set the editor's widgets for ``choice`` and save."""
    at.selectbox(key="exchanger_edit_choice").set_value(choice).run()
    for field, value in values.items():
        key = f"exchanger_edit_{choice}_{field}"
        widget = next(w for kind in (at.text_input, at.multiselect, at.selectbox, at.number_input)
                      for w in kind if w.key == key)
        widget.set_value(value)
    return at.button(key="exchanger_edit_save").click().run()


def test_editor_changes_an_exchanger_and_its_rating_closes_the_balance():
    at = _open("steam_heater_subcooled_condensate.json")
    _edit(at, "E-201", arrangement="counter-current", U="", area="", UA="44 kW/K",
          sets="streams[Process water].outlet.temperature")
    assert not at.exception
    (e,) = at.session_state["hb_page"].worksheet.exchangers
    assert (e.arrangement, str(e.UA), e.U, e.sets) == ("counter-current", "44 kW/K", None,
                                                       "streams[Process water].outlet.temperature")
    assert e.hot == ["Steam"] and e.utility_side == "hot"  # what was not edited is kept
    frames = [d.value for d in at.dataframe]
    rows = next(f for f in frames if "quantity" in f.columns)
    assert "set by the rating" in list(rows["quantity"])


def test_editor_refuses_a_wrong_side_with_its_address_and_keeps_the_sheet():
    at = _open("steam_heater_subcooled_condensate.json")
    before = at.session_state["hb_page"].worksheet
    _edit(at, "(new exchanger)", name="E-9", hot=["Process water"], cold=["Steam"])
    assert not at.exception
    assert at.session_state["hb_page"].worksheet == before
    errors = " ".join(e.value for e in at.error)
    assert "This exchanger cannot be used" in errors and "exchangers\\[E\\-9\\]\\.hot" in errors


def test_editor_adds_and_removes_an_exchanger():
    at = _open("methanol_condenser_cooling_water.json")
    _edit(at, "(new exchanger)", name="E-302", hot=["Methanol overhead"], cold=["Cooling water"],
          U="600 W/(m^2*K)")
    assert not at.exception
    assert [e.name for e in at.session_state["hb_page"].worksheet.exchangers] == ["E-301", "E-302"]
    at.selectbox(key="exchanger_edit_choice").set_value("E-302").run()
    at.button(key="exchanger_edit_remove").click().run()
    assert not at.exception
    assert [e.name for e in at.session_state["hb_page"].worksheet.exchangers] == ["E-301"]
