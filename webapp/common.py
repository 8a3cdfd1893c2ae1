"""Small helpers every part of the page uses: the state, the view's unit set, plain text, a guard, a panel
drawn as a fragment, and figures built once per content."""
from __future__ import annotations

import functools
import gc
import hashlib
import json
import logging
import pickle
import re
import string
from collections import OrderedDict
from pathlib import Path

import streamlit as st

from heatbalance.errors import HeatBalanceError, InputError
from heatbalance.worksheet import Worksheet, load_worksheet

from .state import KEY, PageState, first_and_more

__all__ = ["UNIT_SYSTEMS", "UNIT_SYSTEM_KEY", "SAMPLES_DIR", "DEFAULT_SAMPLE", "page_state", "display_system",
           "plain", "guarded", "fragment_panel", "built", "BUILT_KEPT", "sample_files", "load_sample",
           "keep_loaded_libraries_out_of_gc", "count_refusal", "REFUSED", "refused_on_page"]

UNIT_SYSTEMS = {"SI (°C, kg, kW)": "SI", "US customary (°F, lb, Btu)": "US"}
SAMPLES_DIR = Path(__file__).resolve().parent.parent / "sample_data"
DEFAULT_SAMPLE = "steam_heater_glycol.json"
_PUNCTUATION = frozenset(string.punctuation)  # CommonMark lets a backslash escape every one of these
WORD_JOINER = "\u2060"  # invisible, no width: breaks an autolink's pattern without changing what is seen
# The page's Markdown turns text that looks like an address into a link *after* escapes are read
# (GFM autolink literals: ``http://…``, ``www.…``, ``name@host.tld``): a word joiner goes inside each pattern.
_AUTOLINK = re.compile(r"(?<=:)(?=//)|(?i:(?<=www)(?=\.))|(?=@)")
_LOG = logging.getLogger("heatbalance.page")
_BUILT = "built_by_content"  # session key: what `built` made, by builder and the digest of its inputs (a cache)
BUILT_KEPT = 12  # figures and tables `built` keeps per session (the least recently used go first)


def page_state() -> PageState:
    """The page's one editing state (:data:`webapp.state.KEY`)."""
    return st.session_state[KEY]


UNIT_SYSTEM_KEY = "unit_system"  # the sidebar's "Show results in" (its label -> UNIT_SYSTEMS)
# a panel keeps the refusal of a value typed into it (not written into the worksheet) under a session key that ends
# so (site_atmosphere_refused, screening_0_refused, exchanger_edit_refused)
REFUSED = "_refused"


def _refusal_words(kept) -> str:
    """A panel's kept refusal in words: its address and message (a panel keeps the error, or its words)."""
    if isinstance(kept, HeatBalanceError):
        return f"{kept.where}: {kept.message}" if kept.where else kept.message
    return str(kept)


def refused_on_page() -> str:
    """What the page shows typed but the worksheet does not hold, in words ('' when nothing): a bad cell, a bad
    batch duration, a panel's refused value; Save stores the worksheet, so it waits until these are corrected."""
    return first_and_more(page_state().unread_items() + [_refusal_words(value)
                                                         for key, value in st.session_state.items()
                                                         if isinstance(key, str) and key.endswith(REFUSED) and value])


def display_system() -> str:
    """The view's unit set, ``SI`` or ``US``: a view only, never a typed value."""
    return UNIT_SYSTEMS.get(st.session_state.get(UNIT_SYSTEM_KEY), "SI")


def plain(text: object) -> str:
    r"""User text (names, titles, messages quoting them) for a Markdown-rendering element, shown as typed.

    Every ASCII punctuation character is backslash-escaped, so nothing the user typed becomes
    Markdown or HTML: no link, image, emphasis, list, heading, entity (``&amp;``), math (``$``),
    colour or icon directive (``:red[…]``, ``:material/…:``). Text that looks like an address
    (``http://…``, ``www.…``, ``a@b.c``) would still be linked by the page's Markdown, whatever the
    escapes: an invisible word joiner (U+2060) goes after ``:`` before ``//``, after ``www`` and before
    ``@``. The page shows the text as typed (a copy of it carries the joiners).

    >>> print(plain("[x](e.invalid) <b>"))
    \[x\]\(e\.invalid\) \<b\>
    >>> plain("http://e.invalid") == "http\\:\u2060\\/\\/e\\.invalid"
    True
    """
    text = _AUTOLINK.sub(WORD_JOINER, str(text))
    return "".join("\\" + c if c in _PUNCTUATION else c for c in text)


def guarded(draw, *args) -> None:
    """Draw a part of the page; an unexpected failure shows a plain message, never a traceback."""
    try:
        draw(*args)
    except HeatBalanceError as exc:
        st.error(plain(str(exc)), icon=":material/error:")
    except Exception as exc:  # noqa: BLE001 - the page must never show a traceback
        _LOG.exception("drawing %s failed", getattr(draw, "__qualname__", draw))  # the server's log keeps it
        st.error(f"Something went wrong while drawing this part of the page ({exc.__class__.__name__}). "
                 "Your inputs are kept; try undoing the last change.", icon=":material/error:")


def fragment_panel(draw):
    """A panel's ``draw(worksheet, result, system)`` as a fragment: a change of one of its own widgets reruns the
    panel alone, on the worksheet and result of the page's last run.

    A change that reaches the worksheet (a callback of the panel that calls ``set_worksheet`` or
    ``replace_worksheet``) reruns the whole page, so the answer, the grids and the results follow it: a callback
    inside a fragment would otherwise rerun only the fragment."""
    @st.fragment
    def panel(worksheet: Worksheet, result, system: str) -> None:
        if page_state().worksheet is not worksheet:
            st.rerun(scope="app")
        guarded(draw, worksheet, result, system)
    return panel


def built(builder, *inputs):
    """``builder(*inputs)``, made once per session while the inputs' content stays the same.

    Keyed on a digest of the inputs' pickle: a solved Result pickles in tens of microseconds, a plotly figure
    takes milliseconds to build, and a Result is a new object on every run. Equal bytes are equal content, so a
    changed result never gets the figure of the old one (equal content that pickles differently is only built
    again); inputs that do not pickle are built every time. ``builder`` must be pure, and its output is shared
    between runs: never changed by the caller."""
    try:
        digest = hashlib.sha256(pickle.dumps(inputs, protocol=pickle.HIGHEST_PROTOCOL)).digest()
    except (pickle.PicklingError, TypeError, AttributeError, RecursionError):
        return builder(*inputs)
    kept = st.session_state.setdefault(_BUILT, OrderedDict())
    key = (builder, digest)  # the function itself: a module reloaded while developing builds afresh
    if key in kept:
        kept.move_to_end(key)
        return kept[key]
    kept[key] = made = builder(*inputs)
    while len(kept) > BUILT_KEPT:
        kept.popitem(last=False)
    return made


@functools.cache
def keep_loaded_libraries_out_of_gc() -> None:
    """Once per server process, when the page's libraries are loaded: leave every object alive now out of the
    garbage collector's passes (``gc.freeze``).

    Streamlit collects garbage after every run (``runner.postScriptGC``): a full pass over the libraries' objects
    (CoolProp, pint, pandas, plotly…: about 196,000) took 65-100 ms and held the interpreter while the run's last
    messages waited. Frozen, they are not walked again (a pass then takes well under a millisecond); what the runs
    make is collected as before. Objects frozen here that later become unreachable through a cycle only are not
    reclaimed: the libraries' live for the process anyway, and the first session's are a bounded, one-off amount.
    """
    gc.collect()  # what is already garbage goes first
    gc.freeze()


def sample_files() -> dict[str, Path]:
    """Bundled samples, title -> path."""
    samples = {}
    for path in sorted(SAMPLES_DIR.glob("*.json")):
        try:
            samples[json.loads(path.read_text(encoding="utf-8")).get("title", path.stem)] = path
        except (OSError, ValueError):
            continue
    return samples


def load_sample(path: Path) -> Worksheet:
    return load_worksheet(path.read_bytes())


def count_refusal(count: float | None, low: int, high: int, what: str, where: str = "") -> InputError | None:
    """The refusal of a count typed in a number field (``what``: "points", "draws") that is not a whole number
    from ``low`` to ``high``, at ``where``; None when it can be used. Never put back in range: the field has no
    bounds of its own (the browser would keep the old value with a hover tip only)."""
    if count is not None and float(count).is_integer() and low <= count <= high:
        return None
    shown = "an empty field" if count is None else f"{count:g}"
    return InputError(f"{shown} is not a number of {what}: give a whole number of {what} from {low:,} to {high:,}",
                      where)
