"""The page's save-and-share part: saved revisions, share links, files in and out.

Hooked into ``app.py`` with two calls:

* ``initial_worksheet()`` returns :func:`worksheet_from_link` when the page was opened
  with ``?ws=<id>`` or ``?sheet=<payload>`` (else the default sample);
* :func:`panel` ``(replace_worksheet)`` is one of the page's extra panels, called as
  ``panel(worksheet, result, system)``.

The view's unit set travels with the links (it is a view, not part of the worksheet, so not of its id):
every link the page shows carries ``units=US`` in the US view (:func:`view_link`; none in SI), the address
bar follows the view (:func:`keep_view_in_address`), and a link opens in the unit set it names
(:func:`view_from_link`; a link without ``units`` opens in SI, as links always did).

Everything that can go wrong (a bad link, a locked database, a bad upload) is shown
as a message on the page; nothing stored is changed by a refusal. The engine work is
in :mod:`heatbalance.store`, :mod:`heatbalance.links` and :mod:`heatbalance.present.exports`.
"""
from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING, Callable
from urllib.parse import parse_qs, urlsplit, urlunsplit

import streamlit as st

from heatbalance.errors import HeatBalanceError, WorksheetFormatError
from heatbalance.present.exports import results_csv_bytes, results_filename, worksheet_filename, worksheet_json_bytes
from heatbalance.links import UNITS_PARAM as UNITS
from heatbalance.links import (decode_sheet, named_unit_set, parse_link, revision_id, revision_link, sheet_link,
                              view_link)
from heatbalance.results import Result
from heatbalance.worksheet import MAX_DOCUMENT_BYTES, Worksheet, load_worksheet

from .common import UNIT_SYSTEM_KEY, UNIT_SYSTEMS, display_system, page_state, plain, refused_on_page

if TYPE_CHECKING:  # SQLAlchemy loads at the store's first use, after the answer is on screen
    from heatbalance.store import RevisionInfo, WorksheetStore

__all__ = ["worksheet_from_link", "worksheet_from_upload", "panel", "get_store", "open_link", "forget_revision",
           "Origin", "note_origin", "origin_text", "render_origin", "saver", "PROBLEM", "BASE", "SAVED",
           "OPENED_FROM", "ORIGIN", "render_save", "saved_state_text", "provenance", "put_back", "loaded",
           "view_from_link", "keep_view_in_address"]

# Session-state keys of this part (apart from widget keys).
BASE = "hb_share_base"  # id of the revision the page's worksheet was opened from or last saved as
SAVED = "hb_share_saved"  # RevisionInfo of the last save in this session
PROBLEM = "hb_share_problem"  # message of the last refusal, shown in the panel
NOTICE = "hb_share_notice"  # message of the last success, shown in the panel
OPENED_FROM = "hb_share_opened_from"  # the query parameter the page was opened from
ORIGIN = "hb_share_origin"  # where the worksheet on the page came from: an Origin
NOT_SAVED_LINK = "not a saved revision; content as carried by the link"
_LABELS = {code: label for label, code in UNIT_SYSTEMS.items()}  # "US" -> "US customary (°F, lb, Btu)"


@dataclass(frozen=True)
class Origin:
    """Where the worksheet on the page came from, as it came.

    ``kind``: ``revision`` (opened from, or saved as, a stored revision), ``link`` (a ``?sheet=`` link),
    ``sample``, ``upload`` or ``new``. ``content_id`` is the worksheet's id as it came (an edit since
    changes the id of what is on the page). ``revision`` is the stored record: the revision itself, or for
    a link the saved revision with the same content (None when there is none). ``check`` says why a link
    could not be compared with the store.
    """

    kind: str
    content_id: str | None
    name: str = ""
    revision: RevisionInfo | None = None
    check: str = ""


@st.cache_resource(show_spinner=False)
def _store(url: str) -> WorksheetStore:
    from heatbalance.store import WorksheetStore

    return WorksheetStore(url)


def get_store() -> WorksheetStore:
    """The worksheet store named by the environment, one per process (SQLAlchemy engines are thread-safe)."""
    from heatbalance.store import database_url

    return _store(database_url())


def base_url() -> str:
    """This page's address without its query ("" when unknown: links are then relative)."""
    try:
        url = st.context.url or ""
    except Exception:  # noqa: BLE001 - no request context (tests, scripts)
        url = ""
    if not url:
        return ""
    parts = urlsplit(url)
    return urlunsplit((parts.scheme, parts.netloc, parts.path or "/", "", ""))


def open_link(kind: str, value: str) -> tuple[Worksheet, str | None]:
    """The worksheet a link names, and the revision id it came from (None for a ``?sheet=`` link)."""
    if kind == "sheet":
        return decode_sheet(value), None
    revision = get_store().open(value)
    st.session_state[ORIGIN] = Origin("revision", revision.id, revision=revision)
    return revision.worksheet, revision.id


def _content_id(worksheet: Worksheet) -> str | None:
    try:
        return revision_id(worksheet)
    except HeatBalanceError:
        return None


def note_origin(kind: str, worksheet: Worksheet, name: str = "", revision: RevisionInfo | None = None) -> Origin:
    """Record where the worksheet now on the page came from. A ``link``'s content is looked up in the
    store by its id (its content's id): the saved revision it matches, if any."""
    content_id, check = _content_id(worksheet), ""
    if kind == "link" and content_id is not None:
        try:
            revision = get_store().info(content_id)
        except HeatBalanceError as exc:
            check = exc.message
    origin = Origin(kind, content_id, name, revision, check)
    st.session_state[ORIGIN] = origin
    return origin


def _saved(revision: RevisionInfo) -> str:
    by = f" by {plain(revision.saved_by)}" if revision.saved_by else ""
    return f"saved {revision.saved_at:%Y-%m-%d %H:%M} UTC{by}"


def origin_text(origin: Origin, worksheet: Worksheet) -> str:
    """Where the worksheet came from, in words (Markdown, user text escaped), and whether it was edited since."""
    rev = origin.revision
    if origin.kind == "revision" and rev is not None:
        text = f"**Saved revision** `{rev.id}`, {_saved(rev)}."
    elif origin.kind == "link":
        text = f"**From a link that carries the worksheet:** {NOT_SAVED_LINK}"
        if rev is not None:
            text += f". Its content is identical to saved revision `{rev.id}` ({_saved(rev)})."
        elif origin.check:
            text += f" (it could not be compared with the saved revisions: {plain(origin.check)})."
        else:
            text += "; no saved revision on this server has this content."
    elif origin.kind == "sample":
        text = f"**Bundled sample** ({plain(origin.name)}): not a saved revision."
    elif origin.kind == "upload":
        text = f"**Opened from the file** {plain(origin.name)}: not a saved revision."
    else:
        text = "**A new worksheet**: not saved yet."
    if _content_id(worksheet) != origin.content_id:
        text += " **Edited since**: what is on the page now is not saved."
    return text


def render_origin(worksheet: Worksheet) -> None:
    """One line under the title: where the worksheet came from (nothing when that is not recorded)."""
    origin = st.session_state.get(ORIGIN)
    if origin is not None:
        with st.container(key="provenance"):
            st.caption(origin_text(origin, worksheet))


# --------------------------------------------------------------------------- the view's unit set in links
def _apply_units(value: object) -> None:
    """Show the page in the unit set a link names (before the sidebar's choice is drawn, or in a callback);
    a value that names none is said (at ``units``) and the view is left as it is."""
    system = named_unit_set(value)
    if system is not None:
        st.session_state[UNIT_SYSTEM_KEY] = _LABELS[system]
        return
    shown = str(value)[:40]
    st.session_state[NOTICE] = ""
    st.session_state[PROBLEM] = (f"units: the link's unit set {shown!r} is not one of {', '.join(_LABELS)}; "
                                 f"the results are shown in {display_system()}")


def view_from_link() -> None:
    """The page opens in the unit set its address names (``units=US``); without one, in SI as always."""
    if UNITS in st.query_params:
        _apply_units(st.query_params.get(UNITS))


def keep_view_in_address(system: str) -> None:
    """The address bar names the view's unit set (``units=US``; nothing for SI), so a reload or a copy of the
    address opens as the page is seen. Written only when it differs (no needless browser history)."""
    wanted = None if system == "SI" else system
    if st.query_params.get(UNITS) != wanted:
        if wanted is None:
            del st.query_params[UNITS]
        else:
            st.query_params[UNITS] = wanted


def _units_last() -> None:
    """The address bar reads like the link the page shows: ``?ws=<id>&units=US``."""
    units = st.query_params.get(UNITS)
    if units is not None:
        del st.query_params[UNITS]
        st.query_params[UNITS] = units


def worksheet_from_link() -> Worksheet | None:
    """The worksheet the page's address names (``?ws=`` or ``?sheet=``), or None; the page is shown in the unit
    set the address names (:func:`view_from_link`).

    A bad link leaves a message (shown at once and in the panel) and returns None,
    so the page opens on its default worksheet instead.
    """
    view_from_link()
    params = st.query_params
    for kind in ("ws", "sheet"):
        value = params.get(kind)
        if value is None:
            continue
        st.session_state[OPENED_FROM] = (kind, value)
        try:
            worksheet, rev_id = open_link(kind, value)
        except HeatBalanceError as exc:
            message = f"The link could not be opened: {exc.message}"
            st.session_state[PROBLEM] = message
            st.error(_plain(message), icon="🔗")
            return None
        if rev_id is None:
            note_origin("link", worksheet)
        st.session_state[BASE] = rev_id
        st.session_state[NOTICE] = (f"Opened saved revision {rev_id}." if rev_id
                                    else "Opened the worksheet carried by the link.")
        return worksheet
    return None


def worksheet_from_upload(upload) -> Worksheet:
    """The worksheet in an uploaded file (anything with ``name``, ``size`` and ``getvalue()``), size-checked first."""
    if upload.size > MAX_DOCUMENT_BYTES:
        raise WorksheetFormatError(f"the file is {upload.size:,} bytes; the limit is {MAX_DOCUMENT_BYTES:,}",
                                   upload.name)
    return load_worksheet(upload.getvalue())


def forget_revision() -> None:
    """Another worksheet is on the page (a sample, a new sheet): it descends from no saved revision,
    and the address bar no longer names the old one."""
    for key in (BASE, SAVED, NOTICE):
        st.session_state.pop(key, None)
    for kind in ("ws", "sheet"):
        if kind in st.query_params:
            del st.query_params[kind]


_RECORD = (ORIGIN, BASE, SAVED)  # where the worksheet came from, and the saved revision it is based on
_LINKS = ("ws", "sheet")  # the address bar's query parameters naming a worksheet


def provenance() -> dict:
    """This part's record of the worksheet on the page: where it came from, the saved revision it is based on,
    the last save and the address bar's link; what :func:`put_back` takes."""
    state, query = st.session_state, st.query_params
    return {"session": {key: state[key] for key in _RECORD if key in state},
            "query": {kind: query[kind] for kind in _LINKS if kind in query}}


def put_back(record: dict | None) -> None:
    """Make ``record`` (from :func:`provenance`) the page's again, as undo or redo across a load brings its
    worksheet back; None (an edit): nothing to do. An empty record: origin unknown, based on no revision."""
    if record is None:
        return
    for key in (*_RECORD, NOTICE, PROBLEM):
        st.session_state.pop(key, None)
    st.session_state.update(record.get("session", {}))
    links = record.get("query", {})
    for kind in _LINKS:
        if kind in links:
            st.query_params[kind] = links[kind]
        elif kind in st.query_params:
            del st.query_params[kind]


def loaded(before: dict) -> None:
    """Another worksheet was put on the page: undoing that brings back ``before`` (:func:`provenance` taken
    before the load) with the one it replaced; the new one descends from no saved revision."""
    page_state().note_replaced(before)
    forget_revision()


# --------------------------------------------------------------------------- who saves
def _user_info() -> dict:
    """``st.user`` as a dict: empty without a login configured (``is_logged_in`` exists only with one)."""
    try:
        return dict(st.user.to_dict())
    except Exception:  # noqa: BLE001 - no script context (scripts, some tests): no login
        return {}


def login_configured() -> bool:
    return "is_logged_in" in _user_info()


def saver() -> str | None:
    """Who saves: "" without a login configured (nothing is recorded); with one, the logged-in user's
    e-mail (else name, else the provider's subject id); None when a login is configured and nobody is
    logged in (the save is refused)."""
    info = _user_info()
    if "is_logged_in" not in info:
        return ""
    if not info.get("is_logged_in"):
        return None
    for claim in ("email", "name", "preferred_username", "sub"):
        value = info.get(claim)
        if isinstance(value, str) and value.strip():
            return value.strip()
    return None


# --------------------------------------------------------------------------- callbacks
def _on_save(worksheet: Worksheet) -> None:
    state = st.session_state
    state[PROBLEM] = state[NOTICE] = ""
    unread = refused_on_page()
    if unread:  # what would be saved is the last worksheet that read, not what the page shows
        state[PROBLEM] = f"Not saved: a value on the page is refused ({unread}). Correct it, then save."
        return
    who = saver()
    if who is None:
        state[PROBLEM] = ("Not saved: this server records who saves each revision; log in (with an account "
                          "that gives an e-mail or a name) to save")
        return
    try:
        saved = get_store().save(worksheet, parent=state.get(BASE), saved_by=who)
    except HeatBalanceError as exc:
        state[PROBLEM] = f"Not saved: {exc.message}"
        return
    state[ORIGIN] = Origin("revision", saved.id, revision=saved)
    state[SAVED], state[BASE] = saved, saved.id
    state[NOTICE] = f"Saved as revision {saved.id}."
    if "sheet" in st.query_params:
        del st.query_params["sheet"]
    st.query_params["ws"] = saved.id  # the address bar now reopens this revision
    _units_last()


def _on_upload(replace: Callable[[Worksheet], None]) -> None:
    state = st.session_state
    state[PROBLEM] = state[NOTICE] = ""
    upload = state.get("share_upload")
    if upload is None:
        return
    try:
        worksheet = worksheet_from_upload(upload)
    except HeatBalanceError as exc:
        state[PROBLEM] = f"{upload.name} was not opened: {exc}"
        return
    before = provenance()
    replace(worksheet)
    loaded(before)
    note_origin("upload", worksheet, upload.name)
    state[NOTICE] = f"Opened {upload.name}."


def _on_open_link(replace: Callable[[Worksheet], None]) -> None:
    state = st.session_state
    state[PROBLEM] = state[NOTICE] = ""
    text = (state.get("share_link_input") or "").strip()
    if not text:
        return
    before = provenance()  # taken first: opening a saved revision records its origin
    try:
        worksheet, rev_id = open_link(*parse_link(text))
    except HeatBalanceError as exc:
        state[PROBLEM] = f"The link could not be opened: {exc.message}"
        return
    replace(worksheet)
    loaded(before)
    if rev_id is None:  # a saved revision's origin is recorded by open_link
        note_origin("link", worksheet)
    state[BASE] = rev_id
    if rev_id:
        st.query_params["ws"] = rev_id  # the address bar names what is on the page
        _units_last()
    state[NOTICE] = f"Opened saved revision {rev_id}." if rev_id else "Opened the worksheet carried by the link."
    units = parse_qs(urlsplit(text).query).get(UNITS)
    if units:  # a link that names its unit set opens in it; one that names none leaves the view as it is
        _apply_units(units[0])


# --------------------------------------------------------------------------- drawing
def panel(replace: Callable[[Worksheet], None]) -> Callable[[Worksheet, Result | None, str], None]:
    """The save-and-share panel, as an extra panel of the page; ``replace`` puts a worksheet on the page."""

    def draw(worksheet: Worksheet, result: Result | None, system: str) -> None:
        render_panel(worksheet, result, system, replace)

    return draw


def render_panel(worksheet: Worksheet, result: Result | None, system: str,
                 replace: Callable[[Worksheet], None]) -> None:
    state = st.session_state
    st.header("Save and share")
    if state.get(PROBLEM):
        st.error(_plain(state[PROBLEM]), icon="🚫")
    elif state.get(NOTICE):
        st.success(_plain(state[NOTICE]))
    base = base_url()
    try:
        current_id = revision_id(worksheet)
    except HeatBalanceError as exc:
        st.error(f"This worksheet cannot be saved or shared: {_plain(exc.message)}", icon="🚫")
        return
    left, right = st.columns(2)
    with left:
        based_on = state.get(BASE)
        if based_on and based_on == current_id:
            st.caption("The link to this saved revision (it opens exactly these inputs and this result) is "
                       "beside the answer, under **Save and share**.")
        else:
            st.caption("**Save and share** is beside the answer; it saves this worksheet as a new revision.")
        if based_on:
            render_history(based_on, base, system)
    with right:
        with st.expander("Link that carries the whole worksheet (no database needed)"):
            try:
                st.code(view_link(sheet_link(worksheet, base), system), language=None)
                st.caption("Anyone with the link opens these inputs, on any server running this program.")
            except HeatBalanceError as exc:
                st.warning(_plain(exc.message))
        st.download_button("Download worksheet (JSON)", data=worksheet_json_bytes(worksheet),
                           file_name=worksheet_filename(worksheet), mime="application/json",
                           key="share_download_json")
        if result is not None:
            st.download_button("Download results table (CSV)", data=results_csv_bytes(result, system),
                               file_name=results_filename(worksheet), mime="text/csv", key="share_download_csv")
        else:
            st.caption("The results table can be downloaded once the balance solves.")
        st.file_uploader(f"Open a worksheet file (JSON, at most {MAX_DOCUMENT_BYTES // 1000:,} kB)", type=["json"],
                         key="share_upload", on_change=_on_upload, args=(replace,))
        st.text_input("Open a link or revision id", key="share_link_input", on_change=_on_open_link,
                      args=(replace,), placeholder="…?ws=… or …?sheet=…, or a revision id")


def saved_state_text(worksheet: Worksheet) -> str:
    """Whether what is on the page is saved: the revision it is, or the one it has changed since."""
    based_on = st.session_state.get(BASE)
    try:
        current_id = revision_id(worksheet)
    except HeatBalanceError:
        current_id = None
    if based_on and based_on == current_id:
        return f"Saved as revision {based_on}."
    if based_on:
        return (f"Unsaved changes since revision {based_on}: save to share them as a new revision "
                "(the old one stays as it is).")
    return "Not saved yet."


def render_save(worksheet: Worksheet) -> None:
    """The save button, who saves, whether the page is saved, and the link once it is (beside the answer)."""
    state = st.session_state
    who = saver()
    st.button("Save and share", key="share_save", on_click=_on_save, args=(worksheet,), type="primary",
              disabled=who is None, width="stretch",
              help="Saves this worksheet as a revision that is never changed, and gives a link to it. "
                   "Saving an edited worksheet makes a new revision; the old one stays."
                   + (" The revision records who saved it." if who else ""))
    if who is None:
        st.caption("This server records who saves each revision: log in to save.")
        st.button("Log in", key="share_login", on_click=st.login)
    elif who:
        st.caption(f"Saving as {_plain(who)}.")
    if state.get(PROBLEM):
        st.error(_plain(state[PROBLEM]), icon="🚫")
    with st.container(key="saved_state"):
        st.caption(saved_state_text(worksheet))
    based_on = state.get(BASE)
    system = display_system()
    keep_view_in_address(system)
    try:
        if based_on and based_on == revision_id(worksheet):
            st.code(view_link(revision_link(based_on, base_url()), system), language=None)
    except HeatBalanceError:
        pass  # the panel says why this worksheet cannot be saved


def render_history(rev_id: str, base: str, system: str = "SI") -> None:
    """The revision and its ancestors, newest first, each with its link (in the view's unit set)."""
    try:
        chain = get_store().history(rev_id)
    except HeatBalanceError as exc:
        st.caption(f"Revision list unavailable: {_plain(exc.message)}")
        return
    st.markdown("**Revisions** (newest first)")
    st.markdown("\n".join(
        f"- [`{r.id}`]({view_link(revision_link(r.id, base), system)}) {r.saved_at:%Y-%m-%d %H:%M} UTC — "
        f"{_plain(r.title)}"
        + (f" (saved by {_plain(r.saved_by)})" if r.saved_by else "") for r in chain))


def _plain(text: str) -> str:
    """User text (a title, a file name, a message quoting them) shown as text, not as Markdown."""
    return plain(text)
