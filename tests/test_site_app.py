"""The site-atmosphere panel (webapp/site_panel.py) through Streamlit's AppTest, on the real app.py.

The typed site lands in the worksheet the page holds and moves the boiling point of a 0 barg line (IAPWS-IF97
via iapws at the ISO 2533 standard atmosphere's pressure); refusals are shown with their address and change
nothing.
"""
import re

import pytest
from iapws import IAPWS97
from page_helpers import held, page

from heatbalance.errors import HeatBalanceError
from heatbalance.worksheet import parse_worksheet
from tests.sheet_factory import q, sheet, stream, temp
from webapp.common import WORD_JOINER
from webapp.site_panel import WIDGET, site_from_text, site_text
from webapp.state import KEY


def boiling_water():
    """1 t/h of water at 20 °C takes 300 kW at 0 barg: it ends on the boiling plateau (our own scenario)."""
    return parse_worksheet(sheet(
        streams=[stream("Water", "water", q(1, "t/h"), temp(20), temp(90))],
        duties=[{"name": "Heater", "value": q(300, "kW")}],
        unknowns=[{"kind": "temperature", "line": "Water", "end": "outlet"}]))


def shown(at, elements) -> str:
    return re.sub(r"\\(.)", r"\1", "\n".join(e.value for e in elements)).replace(WORD_JOINER, "")


def test_an_altitude_typed_on_the_page_moves_the_boiling_point():
    at = page(boiling_water())
    assert "Gauge pressures are relative to 1.01325 bar(a)" in shown(at, at.caption)
    at.text_input(key=WIDGET).set_value("1500 m").run()
    assert not at.exception
    assert str(held(at).atmosphere.altitude) == "1500 m"
    assert "0.84556 bar(a): the ISO 2533 standard atmosphere at the site's altitude, 1500 m" in shown(at, at.caption)
    result, _ = at.session_state[KEY].solve()
    p_site = 101325.0 * (1 - 0.0065 * 1500 / 288.15) ** 5.25588  # ISO 2533 troposphere, by hand
    assert result.answer.value_si == pytest.approx(IAPWS97(P=p_site / 1e6, x=0).T, abs=0.01)  # iapws


@pytest.mark.parametrize("typed, where", [
    pytest.param("12000 m", "atmosphere.altitude", id="above-troposphere"),
    pytest.param("2 barg", "atmosphere.barometric_pressure", id="gauge"),
    pytest.param("warm", "atmosphere", id="not-a-quantity"),
    pytest.param("3 kg", "atmosphere", id="wrong-kind"),
])
def test_a_refused_site_is_shown_with_its_address_and_not_written(typed, where):
    at = page(boiling_water())
    at.text_input(key=WIDGET).set_value(typed).run()
    assert not at.exception
    errors = shown(at, at.error)
    assert f"Not used, at {where}:" in errors
    assert held(at).atmosphere.altitude is None and held(at).atmosphere.barometric_pressure is None


def test_typed_text_round_trips():
    for text in ("1500 m", "0.85 bar", "12.3 psia", "4900 ft", ""):
        assert site_text(site_from_text(text)) == text


def test_the_site_example_is_in_the_views_unit_set():
    """A US view's example reads psia and feet (ISO 2533: 1 atm = 14.696 psia), an SI view's bar and metres."""
    from page_helpers import opened

    from heatbalance.links import encode_sheet

    us = opened(sheet=encode_sheet(boiling_water()), units="US")
    assert us.text_input(key=WIDGET).placeholder == "e.g. 12.3 psia or 5000 ft (empty: 14.696 psia)"
    si = page(boiling_water())
    assert si.text_input(key=WIDGET).placeholder == "e.g. 0.85 bar or 1500 m (empty: 1.01325 bar)"


def test_a_site_beyond_any_float_is_refused():
    with pytest.raises(HeatBalanceError, match="beyond any number a worksheet can hold") as refused:
        site_from_text("1e400 m")
    assert refused.value.where == "atmosphere"


def test_save_waits_while_the_site_box_holds_a_refused_value(db):
    """A review's finding: with '2 barg' refused in the site box, Save stored the sheet with the previous site."""
    at = page(boiling_water())
    at.text_input(key=WIDGET).set_value("2 barg").run()
    at.button(key="share_save").click().run()
    assert not at.exception
    assert "Not saved: a value on the page is refused (atmosphere.barometric_pressure: " in shown(at, at.error)
    at.text_input(key=WIDGET).set_value("1500 m").run()
    at.button(key="share_save").click().run()
    assert "Not saved" not in shown(at, at.error)


def test_saves_refusal_counts_every_refused_value_once(db):
    """Two bad cells and a refused site: the first named, 'and 2 more' once (the count had been said twice)."""
    from page_helpers import edit

    at = page(boiling_water())
    at = edit(at, "streams", {"edited_rows": {0: {"flow": "abc", "inlet": "xyz"}}})
    at.text_input(key=WIDGET).set_value("2 barg").run()
    at.button(key="share_save").click().run()
    assert not at.exception
    message = next(e for e in shown(at, at.error).splitlines() if e.startswith("Not saved"))
    assert message.count("(and ") == 1 and "(and 2 more)" in message
