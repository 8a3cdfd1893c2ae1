"""The surface-losses panel on the page (AppTest): the computed loss drawn with its surface temperature, a new
computed loss set up through the form (and refused with its address when a value is wrong); the form's pure
function is tested directly."""
from __future__ import annotations

import pytest
from streamlit.testing.v1 import AppTest

from heatbalance.errors import HeatBalanceError
from page_helpers import page, sample
from webapp.losses_panel import BY_TEMPERATURE, NEW_LOSS, with_surface_loss

SAMPLE = "insulated_hot_water_line.json"
FIELDS = {"shape": "vessel wall", "diameter": "3 m", "length": "6 m", "emissivity": 0.9, "insulation": "mineral wool",
          "thickness": "80 mm", "ambient": "15 degC", "wind": "", "process": BY_TEMPERATURE,
          "process_temperature": "90 degC"}


def _open() -> AppTest:
    return page(sample(SAMPLE))


def test_with_surface_loss_adds_and_replaces():
    ws = sample(SAMPLE)
    added = with_surface_loss(ws, "Tank wall", FIELDS)
    assert [x.name for x in added.losses] == ["Yard line", "Tank wall"]
    assert str(added.losses[1].surface.insulation.thickness) == "80 mm"
    replaced = with_surface_loss(added, "Yard line", {**FIELDS, "process": "Hot water", "shape": "horizontal pipe"})
    assert [x.name for x in replaced.losses] == ["Yard line", "Tank wall"]
    assert replaced.losses[0].surface.shape == "horizontal pipe" and replaced.losses[0].surface.line == "Hot water"
    with pytest.raises(HeatBalanceError) as caught:
        with_surface_loss(ws, "Tank wall", {**FIELDS, "diameter": "-3 m"})
    assert caught.value.where == "losses[Tank wall].surface.diameter"


def test_panel_shows_the_computed_loss_and_the_caution_once():
    at = _open()
    assert not at.exception
    assert "Surface losses (computed from geometry)" in [s.value for s in at.subheader]
    assert len(at.main.metric) == 0  # the answer is in the side panel; this panel writes its numbers as text
    shown = " ".join(m.value for m in at.markdown)
    assert "Outer surface: **9\\.5 °C**" in shown  # own output (regression); the physics is in test_losses.py
    table = next(d.value for d in at.dataframe if "heat lost" in d.value.columns)
    assert list(table["loss"]) == ["Yard line"]
    cautions = [w.value for w in at.warning if "process hazard analysis" in w.value]
    assert len(cautions) == 1


def test_form_adds_a_loss_and_refuses_a_bad_value():
    at = _open()
    assert at.selectbox(key="losses_pick").value == "Yard line"
    at.selectbox(key="losses_pick").set_value(NEW_LOSS).run()
    key = 1  # the form's keys count the choices: "Yard line", then a new loss
    at.text_input(key=f"losses_name_{key}").set_value("Header")
    at.text_input(key=f"losses_diameter_{key}").set_value("-60 mm")
    at.button(key=f"losses_apply_{key}").click().run()
    assert not at.exception
    assert any("losses\\[Header\\]\\.surface\\.diameter" in e.value for e in at.error)
    assert [x.name for x in at.session_state["hb_page"].worksheet.losses] == ["Yard line"]
    at.text_input(key=f"losses_diameter_{key}").set_value("60.3 mm")
    at.button(key=f"losses_apply_{key}").click().run()
    assert not at.exception
    state = at.session_state["hb_page"]
    assert [x.name for x in state.worksheet.losses] == ["Yard line", "Header"]
    assert [r["name"] for r in state.rows["losses"]] == ["Yard line", "Header"]
    assert [r.name for r in state.result.surface_losses] == ["Yard line", "Header"]
