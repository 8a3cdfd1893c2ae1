"""The site atmosphere on the page: the barometric pressure every gauge pressure of the worksheet is relative to.

One text input takes the site's barometric pressure (``0.85 bar``, absolute) or its altitude (``1500 m``,
converted by the ISO 2533 standard atmosphere); empty is the standard atmosphere at sea level. The value is
written into the worksheet (``atmosphere``) when the engine accepts it, else its refusal is shown with the
address; the line under it is the assumption the results and exports carry.
"""
from __future__ import annotations

import math

import streamlit as st

from heatbalance.errors import HeatBalanceError, InputError
from heatbalance.present.text import error_text, phrase_text
from heatbalance.problem import site_atmosphere
from heatbalance.units import kind_of
from heatbalance.worksheet import QUANTITY_TEXT, Quantity, SiteAtmosphere, Worksheet

from .common import plain

__all__ = ["panel", "WIDGET", "site_from_text", "site_text"]

WIDGET = "site_atmosphere"
_SOURCE = "site_atmosphere_source"  # session key: the worksheet the widget was filled from
_REFUSED = "site_atmosphere_refused"


# the example and the help in the view's unit set (ISO 2533: 0.8456 bar = 12.26 psia at 1500 m = 4921 ft)
_WORDS = {"SI": {"example": "e.g. 0.85 bar or 1500 m (empty: 1.01325 bar)",
                 "zero_gauge": "0 barg is below 1.01325 bar"},
          "US": {"example": "e.g. 12.3 psia or 5000 ft (empty: 14.696 psia)",
                 "zero_gauge": "0 psig is below 14.696 psia"}}


def site_text(site: SiteAtmosphere) -> str:
    """The site as typed: ``"1500 m"``, ``"0.85 bar"``, or ``""`` (the standard atmosphere at sea level)."""
    typed = site.barometric_pressure or site.altitude
    return "" if typed is None else str(typed)


def site_from_text(text: str) -> SiteAtmosphere:
    """A typed site: a pressure is the barometric pressure, a length the altitude; empty is the default.

    Raises :class:`InputError` at ``atmosphere`` for text that is neither."""
    text = (text or "").strip()
    if not text:
        return SiteAtmosphere()
    match = QUANTITY_TEXT.match(text)
    if not match or not match.group(2):
        raise InputError(f"'{text}' is not a pressure or an altitude with its unit (e.g. '0.85 bar', '1500 m')",
                         "atmosphere")
    if not math.isfinite(float(match.group(1))):  # 1e400 reads as infinity
        raise InputError(f"'{text}' is beyond any number a worksheet can hold", "atmosphere")
    q = Quantity(value=float(match.group(1)), unit=match.group(2))
    field = "barometric_pressure" if kind_of(q.unit, ("pressure", "length"), "atmosphere") == "pressure" \
        else "altitude"
    return SiteAtmosphere(**{field: q})


def panel(set_worksheet):
    """The panel as the page hooks it in; a change is written through ``set_worksheet``."""
    def draw(worksheet: Worksheet, result, system: str) -> None:
        render_site_panel(worksheet, system, set_worksheet)
    return draw


def _commit(worksheet: Worksheet, set_worksheet) -> None:
    try:
        changed = worksheet.model_copy(update={"atmosphere": site_from_text(st.session_state.get(WIDGET, ""))})
        site_atmosphere(changed)  # the engine's refusals (range, a gauge barometer), with the address
    except HeatBalanceError as exc:
        st.session_state[_REFUSED] = exc
        return
    st.session_state.pop(_REFUSED, None)
    set_worksheet(changed)


def render_site_panel(worksheet: Worksheet, system: str, set_worksheet) -> None:
    source = worksheet.atmosphere.model_dump_json()
    if st.session_state.get(_SOURCE) != source:  # another worksheet (or a change made elsewhere) is shown
        st.session_state[_SOURCE] = source
        st.session_state[WIDGET] = site_text(worksheet.atmosphere)
        st.session_state.pop(_REFUSED, None)
    with st.container(key="site_panel"):
        words = _WORDS.get(system, _WORDS["SI"])
        st.subheader("Site atmosphere", help="Gauge pressures (barg, psig, kPag) are relative to the site's "
                     f"barometric pressure: at altitude {words['zero_gauge']} and water boils lower.")
        st.text_input("Site barometric pressure or altitude", key=WIDGET, on_change=_commit,
                      args=(worksheet, set_worksheet), placeholder=words["example"],
                      help="an absolute pressure (bar, kPa, psia) as measured at the site, or the altitude "
                           "(m, ft), converted by the ISO 2533 standard atmosphere")
        refused = st.session_state.get(_REFUSED)
        if refused is not None:
            st.error(f"Not used, at {plain(refused.where)}: {plain(error_text(refused, system))}",
                     icon=":material/error:")
        try:
            st.caption(plain(phrase_text(site_atmosphere(worksheet)[1], system)))
        except HeatBalanceError as exc:
            st.error(f"At {plain(exc.where)}: {plain(error_text(exc, system))}", icon=":material/error:")
