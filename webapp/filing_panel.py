"""The page's filing panel: the calculation sheet as a PDF, and the sign-offs of the saved revision.

Hooked into ``app.py`` as one of its extra panels (:func:`panel`), called as ``draw(worksheet, result, system)``.

*The sheet.* A download button offers :func:`heatbalance.present.sheet.sheet_pdf_bytes` of the worksheet on the
page, made when clicked (deferred). When what is on the page is a saved revision (its content id is in the
store: see :func:`saved_revision`), the sheet carries the revision id, its ``?ws=`` link and its sign-offs;
otherwise it is printed "not saved" and "unchecked", and the panel says so. The offer (file name, revision,
link, sign-offs and the maker of the bytes) is kept under :data:`OFFER` so tests can read the very bytes.

*Sign-off.* Prepared / checked / approved, a name and a comment, recorded by
:meth:`heatbalance.store.WorksheetStore.sign` for the saved revision on the page. The form is disabled, with
the reason, while the worksheet is not saved or has been edited since its save (an edit is a new revision,
with no sign-offs). With a login configured the signer is the logged-in user (:func:`webapp.sharing.saver`),
shown and not editable; nobody logged in: the form asks to log in. The revision's sign-offs are listed
("unchecked" when there are none). Refusals (a bad role, an empty name, a long comment, an unknown revision,
a busy database) are shown with their place as plain text.
"""
from __future__ import annotations

from dataclasses import dataclass
from typing import Callable

import pandas as pd
import streamlit as st

from heatbalance.errors import HeatBalanceError
from heatbalance.links import revision_id, revision_link
from heatbalance.present.sheet import UNCHECKED, sheet_filename, sheet_pdf_bytes
from heatbalance.results import Result
from heatbalance.store import MAX_COMMENT, ROLES, RevisionInfo, SignOff
from heatbalance.worksheet import Worksheet

from . import sharing
from .common import plain

__all__ = ["panel", "render_filing_panel", "key", "OFFER", "Offer", "saved_revision", "signoff_rows"]

PREFIX = "filing_"
OFFER = "filing_offer"  # the sheet the page offers: an Offer


def key(name: str) -> str:
    """The session key of one of the panel's widgets or records: ``filing_<name>``."""
    return PREFIX + name


@dataclass(frozen=True)
class Offer:
    """The calculation sheet the download button offers: its file name, what it is printed with, its maker."""

    file_name: str
    revision: str  # "" when not saved
    link: str
    signoffs: tuple[SignOff, ...]
    make: Callable[[], bytes]


def panel():
    """The panel as the page hooks it in (it changes no input: no setter)."""
    def draw(worksheet: Worksheet, result: Result | None, system: str) -> None:
        render_filing_panel(worksheet, result, system)
    return draw


# =========================================================================== pure parts
def saved_revision(worksheet: Worksheet, store) -> RevisionInfo | None:
    """The saved revision whose content is the worksheet on the page (its content id is the revision id), or None."""
    return store.info(revision_id(worksheet))


def signoff_rows(signoffs) -> list[dict]:
    """The sign-offs as table rows, oldest first (text only: shown in a table, never as Markdown)."""
    return [{"role": s.role, "name": s.name, "signed (UTC)": f"{s.signed_at:%Y-%m-%d %H:%M}", "comment": s.comment}
            for s in signoffs]


def _maker(worksheet: Worksheet, result: Result, system: str, revision: str, link: str,
           signoffs: tuple[SignOff, ...]) -> Callable[[], bytes]:
    def make() -> bytes:
        return sheet_pdf_bytes(worksheet, result, system, revision=revision, link=link, signoffs=list(signoffs))
    return make


# =========================================================================== drawing
def render_filing_panel(worksheet: Worksheet, result: Result | None, system: str) -> None:
    """Draw the panel: the sheet's download and the sign-off form of the saved revision."""
    with st.container(key="filing_panel"):
        st.header("File the calculation sheet")
        if st.session_state.get(key("refusal")):
            st.error(plain(st.session_state[key("refusal")]), icon=":material/error:")
        elif st.session_state.get(key("notice")):
            st.success(plain(st.session_state[key("notice")]))
        try:
            revision = saved_revision(worksheet, sharing.get_store())
        except HeatBalanceError as exc:
            revision = None
            st.warning(f"The saved revisions cannot be read ({plain(exc.message)}): the sheet is printed as not "
                       "saved and cannot be signed now.", icon=":material/warning:")
        signoffs: tuple[SignOff, ...] = ()
        if revision is not None:
            try:
                signoffs = tuple(sharing.get_store().signoffs(revision.id))
            except HeatBalanceError as exc:
                st.warning(f"The sign-offs cannot be read: {plain(exc.message)}", icon=":material/warning:")
        left, right = st.columns(2, gap="large")
        with left, st.container(key="filing_sheet_box"):
            _sheet_section(worksheet, result, system, revision, signoffs)
        with right, st.container(key="filing_signoff_box"):
            _signoff_section(worksheet, revision, signoffs)


def _sheet_section(worksheet: Worksheet, result: Result | None, system: str, revision: RevisionInfo | None,
                   signoffs: tuple[SignOff, ...]) -> None:
    st.subheader("Calculation sheet (PDF)")
    if result is None:
        st.session_state.pop(OFFER, None)
        st.caption("The sheet can be printed once the balance solves.")
        return
    rev_id = revision.id if revision is not None else ""
    link = revision_link(rev_id, sharing.base_url()) if rev_id else ""
    offer = Offer(sheet_filename(worksheet, rev_id), rev_id, link, signoffs,
                  _maker(worksheet, result, system, rev_id, link, signoffs))
    st.session_state[OFFER] = offer
    st.download_button("Download the calculation sheet (PDF)", data=offer.make, file_name=offer.file_name,
                       mime="application/pdf", key=key("pdf"), on_click="ignore", icon=":material/picture_as_pdf:",
                       type="primary")
    if rev_id:
        st.caption(f"Printed with revision `{rev_id}`, its link and its sign-offs "
                   f"({len(signoffs) or 'none: printed unchecked'}); every input with its tolerance, the answer "
                   "± its uncertainty, the contributions, the waterfall and the conventions; in the view's units.")
    else:
        st.caption("This worksheet is not saved (or was edited since its save): the sheet is printed as "
                   "**not saved** and **unchecked**. Save it (Save and share) to print it with its revision id "
                   "and link, and to sign it.")


def _signoff_section(worksheet: Worksheet, revision: RevisionInfo | None, signoffs: tuple[SignOff, ...]) -> None:
    st.subheader("Sign-off")
    if revision is None:
        base = st.session_state.get(sharing.BASE)
        reason = (f"Edited since revision {base} was saved: save the changes (a new revision, with no sign-offs) "
                  "to sign them." if base else "Not saved: save the worksheet (Save and share) to sign it.")
        st.caption(f"Sign-offs belong to a saved revision. {reason}")
    else:
        st.caption(f"Revision `{revision.id}`. A sign-off is recorded for this revision only and never changed; "
                   "an edit of the worksheet is a new revision, unchecked.")
    with st.container(key="filing_signoffs"):
        if revision is not None and signoffs:
            st.dataframe(pd.DataFrame(signoff_rows(signoffs)), key=key("signoff_table"), hide_index=True)
        elif revision is not None:
            st.warning(UNCHECKED, icon=":material/pending:")
    _signoff_form(revision)


def _signoff_form(revision: RevisionInfo | None) -> None:
    who = sharing.saver()
    blocked = revision is None or who is None
    c1, c2 = st.columns([1, 2])
    c1.selectbox("Role", ROLES, key=key("role"), disabled=blocked)
    if who:
        st.session_state[key("name")] = who  # the logged-in user signs
    c2.text_input("Name", key=key("name"), max_chars=200, disabled=blocked or bool(who),
                  placeholder="who signs", help="With a login configured, the logged-in user signs.")
    st.text_area("Comment", key=key("comment"), max_chars=MAX_COMMENT, disabled=blocked, height=80,
                 placeholder="optional, e.g. checked against the flow meter log of 12 May")
    st.button("Sign this revision", key=key("sign"), on_click=_sign, args=(revision.id if revision else "",),
              disabled=blocked)
    if who is None:
        st.caption("This server records who signs: log in to sign.")


def _sign(rev_id: str) -> None:
    state = st.session_state
    state[key("refusal")] = state[key("notice")] = ""
    who = sharing.saver()
    if who is None:
        state[key("refusal")] = "sign: log in to sign (this server records who signs)"
        return
    name = who or (state.get(key("name")) or "")
    role = state.get(key("role")) or ROLES[0]
    try:
        signed = sharing.get_store().sign(rev_id, role, name, state.get(key("comment")) or "")
    except HeatBalanceError as exc:
        state[key("refusal")] = f"Not signed: {exc.where}: {exc.message}" if exc.where else \
            f"Not signed: {exc.message}"
        return
    state[key("comment")] = ""
    state[key("notice")] = f"Signed revision {signed.revision}: {signed.role} by {signed.name}."
