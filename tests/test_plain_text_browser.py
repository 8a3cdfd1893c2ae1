"""User text is shown as plain text in a real browser (Debian's chromium driven by Playwright, headless).

A ``?sheet=`` link (``heatbalance.links.sheet_link``) carries a worksheet whose title, notes, vessel, charge,
duty, reaction and material names and material source hold Markdown links and images, autolinks, HTML
(``<img src>``, ``<a href>``, ``<b id>``), entities, colour and icon directives and math. Opened on the page,
solved (answer, waterfall, screening chart) and refused (the refusal quotes the names): no element of the page
carries an address at ``example.invalid`` in any attribute (``href``, ``xlink:href`` in plotly's SVG, ``src``),
no element the text asked for exists, the browser requests nothing from ``example.invalid``, and the text is
on the page as typed. Every wait is on page state, never a fixed sleep.
"""
from __future__ import annotations

from pathlib import Path

import pytest

from conftest import running_app_with_store
from page_helpers import ANSWER
from heatbalance import address
from heatbalance.links import sheet_link
from heatbalance.worksheet import Quantity, load_worksheet
from webapp.common import WORD_JOINER

pytestmark = pytest.mark.browser

ROOT = Path(__file__).resolve().parent.parent
SAMPLE = ROOT / "sample_data" / "batch_reactor_exotherm.json"
NOT_SOLVED = ".st-key-answer [data-testid='stAlert']"
TIMEOUT_MS = 30_000
FIRST_DRAW_MS = 120_000  # the first page of a fresh server (imports, property tables) on a busy machine
HOST = "example.invalid"

# Names are at most 80 characters: each carries one kind of attack; the title and notes carry all of them.
VESSEL = f'<a href="http://{HOST}/a">a</a> <b id="inj-vessel">b</b> &amp;'
CHARGE = f"[x](http://{HOST}/md) *em* __u__"
DUTY = f"![i](http://{HOST}/i.png) `c` :red[r]"
REACTION = f'<img src="http://{HOST}/h.png" id="inj-reaction"> :material/home:'
MATERIAL = f"www.{HOST} http://{HOST}/m a@{HOST} $x^2$"
SOURCE = f"<a href='http://{HOST}/src' id='inj-source'>handbook</a> # not a heading"
TITLE = (f"Title [x](http://{HOST}/t) ![i](http://{HOST}/t.png) <img src=\"http://{HOST}/t.gif\" id=\"inj-title\"> "
         f"<a href=\"http://{HOST}/ta\">a</a> <b id=\"inj-title-b\">b</b>")
NOTES = (f"- notes [x](http://{HOST}/n) ![i](http://{HOST}/n.png) <img src=\"http://{HOST}/n.gif\" id=\"inj-notes\"> "
         f"http://{HOST}/auto :red[r] :material/home: <script id=\"inj-script\">window.injected = 1</script>")
TEXTS = (VESSEL, CHARGE, DUTY, REACTION, MATERIAL, SOURCE, TITLE, NOTES)


def hostile_worksheet():
    ws = load_worksheet(SAMPLE.read_bytes())
    for item, name in [("vessels[R-2].charges[Batch]", CHARGE), ("vessels[R-2]", VESSEL),
                       ("duties[Jacket cooling]", DUTY), ("reactions[Main reaction]", REACTION),
                       ("materials[reagent solution]", MATERIAL)]:
        ws = address.rename(ws, item, name)
    material = ws.materials[0].model_copy(update={"source": SOURCE})
    return ws.model_copy(update={"title": TITLE, "notes": NOTES, "materials": [material]})


def refused_worksheet():
    """The same sheet, refused: the reagent's data end at 10 °C, below its charge's 20 °C (the message quotes
    the material's name and the place names the vessel)."""
    ws = hostile_worksheet()
    material = ws.materials[0].model_copy(update={"max_temperature": Quantity(value=10, unit="degC")})
    return ws.model_copy(update={"materials": [material]})


@pytest.fixture(scope="module")
def server(tmp_path_factory):
    with running_app_with_store(tmp_path_factory, "plain") as (url, _):
        yield url


@pytest.fixture
def page(browser):
    context = browser.new_context(viewport={"width": 1440, "height": 3600})
    opened = context.new_page()
    opened.set_default_timeout(TIMEOUT_MS)
    opened.requested = []
    opened.on("request", lambda request: opened.requested.append(request.url))
    yield opened
    context.close()


def _open(page, url: str, worksheet, ready: str) -> None:
    page.goto(f"{url}/?sheet={sheet_link(worksheet).split('=', 1)[1]}")
    page.wait_for_selector(ready, timeout=FIRST_DRAW_MS)
    page.wait_for_selector("[data-testid='stStatusWidget']", state="hidden", timeout=FIRST_DRAW_MS)


# Every attribute that makes the browser fetch or navigate (SVG's namespaced xlink:href too, CSS url()):
# text attributes (aria-label, a text field's value, plotly's data-unformatted) may hold the text as typed.
_FOREIGN = """host => {
  const urls = new Set(['href', 'xlink:href', 'src', 'srcset', 'action', 'formaction', 'poster', 'data',
                        'background', 'cite', 'longdesc', 'ping', 'manifest']);
  const found = [];
  for (const el of document.querySelectorAll('*')) {
    for (const attr of el.attributes) {
      const fetches = urls.has(attr.name) || urls.has(attr.localName)
                      || (attr.name === 'style' && attr.value.includes('url('));
      if (fetches && attr.value.includes(host)) found.push(`${el.tagName} ${attr.name}=${attr.value.slice(0, 80)}`);
    }
  }
  return found;
}"""
_INJECTED = "() => [...document.querySelectorAll('[id^=\"inj-\"]')].map(e => e.tagName + '#' + e.id)"


def _assert_nothing_injected(page) -> None:
    assert page.evaluate(_FOREIGN, HOST) == []
    assert page.evaluate(_INJECTED) == []
    assert page.locator(f"a[href*='{HOST}'], img[src*='{HOST}'], script#inj-script").count() == 0
    assert page.evaluate("() => window.injected === undefined")
    assert [u for u in page.requested if HOST in u] == []


def _shown(page, selector: str = "body") -> str:
    """The text as the reader sees it: without the invisible word joiners that break autolinks
    (``webapp.common.plain``)."""
    return page.inner_text(selector).replace(WORD_JOINER, "")


def test_names_title_and_notes_from_a_sheet_link_are_shown_as_text(server, page):
    _open(page, server, hostile_worksheet(), ANSWER)
    page.wait_for_selector(".js-plotly-plot .xtick")  # the waterfall's bar labels (user names) are drawn
    page.wait_for_selector(".st-key-screening_panel .js-plotly-plot .gtitle")  # the screening chart's title
    _assert_nothing_injected(page)
    assert _shown(page, "h1").strip() == TITLE
    text = _shown(page)
    for typed in (NOTES, f"Vessel {VESSEL}", f"{MATERIAL}: user-defined: {SOURCE}"):
        assert typed in text, typed
    ticks = page.locator(".js-plotly-plot .xtick text").all_text_contents()
    assert {DUTY, REACTION} <= set(ticks), ticks  # plotly's labels: the names as typed
    assert f"Thermal screening: {VESSEL}" in page.locator(".st-key-screening_panel .gtitle").text_content()


def test_a_refusal_quoting_user_names_is_shown_as_text(server, page):
    _open(page, server, refused_worksheet(), NOT_SOLVED)
    _assert_nothing_injected(page)
    message = _shown(page, NOT_SOLVED)
    assert "Not solved." in message
    assert f"is outside the property data of {MATERIAL}" in message
    assert VESSEL in message  # the place, named from the address
    assert _shown(page, "h1").strip() == TITLE
