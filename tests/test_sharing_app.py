"""Save and share on the page, through Streamlit's AppTest (the real app.py, no browser).

Every sample saved to a store opens through ``?ws=<id>`` (and through ``?sheet=``) as the identical
worksheet with the identical answer; bad links show a clear message and the page still works.
AppTest cannot click downloads: the download bytes are tested as pure functions in test_links.py.
"""
from __future__ import annotations

import re
from pathlib import Path

import pytest
from streamlit.testing.v1 import AppTest

from heatbalance import load_worksheet
from heatbalance.analyses import solve_and_analyse
from heatbalance.present.text import answer_text
from heatbalance.errors import WorksheetFormatError
from heatbalance.links import encode_sheet, revision_id
from heatbalance.store import ENV_DATABASE_URL, ENV_DB, WorksheetStore

from page_helpers import answer_value, errors, no_traceback, opened, unescaped

ROOT = Path(__file__).resolve().parent.parent
APP = str(ROOT / "app.py")
KEY = "hb_page"  # app.py's one session key: the page state (webapp.state.PageState)
SAMPLES = sorted((ROOT / "sample_data").glob("*.json"))
DEFAULT = "steam_heater_glycol.json"  # the sample the page opens on


def _sample(path: Path):
    return load_worksheet(path.read_bytes())


page = opened  # the page opened on an address's query


answer = answer_value


def successes(at: AppTest) -> list[str]:
    return [unescaped(s.value) for s in at.success]


@pytest.mark.parametrize("path", SAMPLES, ids=[p.stem for p in SAMPLES])
def test_a_saved_sample_opens_from_its_link_identical_with_the_identical_answer(db, path):
    worksheet = _sample(path)
    with WorksheetStore(db) as store:
        rev_id = store.save(worksheet).id
    at = page(ws=rev_id)
    no_traceback(at)
    assert at.session_state[KEY].worksheet == worksheet
    assert answer(at) == answer_text(solve_and_analyse(worksheet).answer)
    assert f"Opened saved revision {rev_id}." in successes(at)
    assert any(c.value.endswith(f"?ws={rev_id}") for c in at.code)  # its link, to pass on


def test_a_sheet_link_opens_the_identical_worksheet(db):
    worksheet = _sample(SAMPLES[0])
    at = page(sheet=encode_sheet(worksheet))
    no_traceback(at)
    assert at.session_state[KEY].worksheet == worksheet
    assert answer(at) == answer_text(solve_and_analyse(worksheet).answer)


@pytest.mark.parametrize("query, message", [
    ({"ws": "0123456789abcdef01234567"}, r"no saved worksheet has the id 0123456789abcdef01234567"),
    ({"ws": "not-an-id"}, r"'not-an-id' is not a worksheet id \(an id is 24 characters 0-9 and a-f\)"),
    ({"sheet": "z1.AAAAtampered"}, r"the sheet link is damaged or has been altered"),
])
def test_a_bad_link_shows_a_clear_message_and_opens_the_default_sheet(db, query, message):
    at = page(**query)
    no_traceback(at)
    assert re.search(message, errors(at)), errors(at)
    assert at.session_state[KEY].worksheet == _sample(ROOT / "sample_data" / DEFAULT)
    answer(at)  # the page still solves


def test_an_unreadable_database_shows_a_clear_message_and_is_left_alone(monkeypatch, tmp_path):
    import hashlib

    bad = tmp_path / "garbage.sqlite3"
    bad.write_bytes(b"not a database at all " * 40)
    before = hashlib.sha256(bad.read_bytes()).hexdigest()
    monkeypatch.delenv(ENV_DATABASE_URL, raising=False)
    monkeypatch.setenv(ENV_DB, str(bad))
    at = page(ws="0123456789abcdef01234567")
    no_traceback(at)
    assert "is not a readable worksheet database" in errors(at)
    at.button(key="share_save").click().run()
    no_traceback(at)
    assert "Not saved: " in errors(at)
    assert hashlib.sha256(bad.read_bytes()).hexdigest() == before


def test_save_and_share_gives_the_link_the_revision_list_and_the_address(db):
    at = page()
    no_traceback(at)
    worksheet = at.session_state[KEY].worksheet
    at.button(key="share_save").click().run()
    no_traceback(at)
    rev_id = revision_id(worksheet)
    assert at.query_params["ws"] == [rev_id] or at.query_params["ws"] == rev_id
    assert any(c.value.endswith(f"?ws={rev_id}") for c in at.code)
    assert any(f"`{rev_id}`" in m.value for m in at.markdown)  # the revision list
    with WorksheetStore(db) as store:
        assert store.open(rev_id).worksheet == worksheet
    reopened = page(ws=rev_id)
    assert reopened.session_state[KEY].worksheet == worksheet
    assert answer(reopened) == answer(at)


def test_an_edit_saved_again_is_a_new_revision_with_the_old_one_as_parent(db):
    at = page()
    at.button(key="share_save").click().run()
    first = revision_id(at.session_state[KEY].worksheet)
    at.text_input(key="title_input").set_value("Glycol heater, checked").run()
    no_traceback(at)
    assert any("Unsaved changes since revision" in c.value for c in at.caption)  # issue 17 wording
    at.button(key="share_save").click().run()
    second = revision_id(at.session_state[KEY].worksheet)
    assert second != first
    with WorksheetStore(db) as store:
        assert [r.id for r in store.history(second)] == [second, first]
        assert store.open(first).worksheet.title != "Glycol heater, checked"  # the first is untouched
    assert any(f"`{first}`" in m.value and f"`{second}`" in m.value for m in at.markdown)


def test_another_sample_descends_from_no_revision_and_leaves_the_address(db):
    at = page()
    at.button(key="share_save").click().run()
    first = revision_id(at.session_state[KEY].worksheet)
    other = _sample(SAMPLES[0])
    at.selectbox(key="sample_picker").select(other.title).run()
    no_traceback(at)
    assert "ws" not in at.query_params  # the address no longer names the first revision
    assert not any(c.value.endswith(f"?ws={first}") for c in at.code)
    at.button(key="share_save").click().run()
    second = revision_id(other)
    with WorksheetStore(db) as store:
        assert [r.id for r in store.history(second)] == [second]  # not recorded as an edit of the first


def test_the_compressed_link_on_the_page_opens_the_same_worksheet(db):
    at = page()
    payload = encode_sheet(at.session_state[KEY].worksheet)
    assert any(c.value.endswith("?sheet=" + payload) for c in at.code)


def test_pasting_a_link_opens_it(db):
    worksheet = _sample(SAMPLES[0])
    with WorksheetStore(db) as store:
        rev_id = store.save(worksheet).id
    at = page()
    at.button(key="share_save").click().run()  # the default sheet saved: the address names its revision
    at.text_input(key="share_link_input").set_value(f"https://sheets.example.invalid/?ws={rev_id}").run()
    no_traceback(at)
    assert at.session_state[KEY].worksheet == worksheet
    assert answer(at) == answer_text(solve_and_analyse(worksheet).answer)
    assert at.query_params["ws"] in (rev_id, [rev_id])  # now the pasted revision, not the saved one


def test_pasting_a_bad_link_says_why_and_keeps_the_sheet(db):
    at = page()
    before = at.session_state[KEY].worksheet
    at.text_input(key="share_link_input").set_value("?ws=123").run()
    no_traceback(at)
    assert "The link could not be opened: '123' is not a worksheet id" in errors(at)
    assert at.session_state[KEY].worksheet == before


class _Upload:
    def __init__(self, name: str, data: bytes, size: int | None = None):
        self.name, self._data, self.size = name, data, len(data) if size is None else size

    def getvalue(self) -> bytes:
        return self._data


def test_an_uploaded_file_opens_through_the_validating_loader():
    from webapp.sharing import worksheet_from_upload

    for path in SAMPLES:
        assert worksheet_from_upload(_Upload(path.name, path.read_bytes())) == _sample(path)


@pytest.mark.parametrize("upload, error, message", [
    (_Upload("huge.json", b"{}", size=5_000_000), WorksheetFormatError,
     r"huge\.json: the file is 5,000,000 bytes; the limit is 1,000,000"),
    (_Upload("deep.json", b'{"notes": ' + b"[" * 500 + b"]" * 500 + b"}"), WorksheetFormatError,
     r"nested more than 20 levels deep"),
    (_Upload("other.json", b'{"invoice": 1}'), WorksheetFormatError, r"this JSON is not a heat-balance worksheet"),
    (_Upload("future.json", b'{"schema_version": 5}'), WorksheetFormatError,
     r"schema_version 5 is newer than this program reads"),
    (_Upload("photo.json", b"\x89PNG\r\n"), WorksheetFormatError, r"not valid JSON"),
])
def test_a_bad_upload_is_refused_clearly(upload, error, message):
    from webapp.sharing import worksheet_from_upload

    with pytest.raises(error, match=message):
        worksheet_from_upload(upload)


# -- provenance: where the worksheet on the page came from --------------------------------------------------
def origin(at: AppTest) -> str:
    """The provenance line under the title, as read (bold marks left out)."""
    captions = [unescaped(c.value).replace("**", "") for c in at.caption]
    lines = [c for c in captions if c.startswith(("Saved revision", "From a link", "Bundled sample",
                                                  "Opened from the file", "A new worksheet"))]
    assert len(lines) == 1, captions
    return lines[0]


def test_the_default_page_says_it_is_a_bundled_sample_and_an_edit_says_edited_since(db):
    at = page()
    assert origin(at) == f"Bundled sample ({DEFAULT}): not a saved revision."
    at.text_input(key="title_input").set_value("Glycol heater, my version").run()
    assert origin(at) == (f"Bundled sample ({DEFAULT}): not a saved revision. "
                          "Edited since: what is on the page now is not saved.")


def test_a_saved_revision_link_says_its_id_date_and_who_saved_it(db):
    worksheet = _sample(SAMPLES[0])
    with WorksheetStore(db) as store:
        saved = store.save(worksheet, saved_by="ana.lima@plant.example")
    at = page(ws=saved.id)
    no_traceback(at)
    assert origin(at) == (f"Saved revision `{saved.id}`, saved {saved.saved_at:%Y-%m-%d %H:%M} UTC "
                          "by ana.lima@plant.example.")


def test_a_sheet_link_says_it_is_not_a_saved_revision_unless_its_content_is_saved(db):
    worksheet = _sample(SAMPLES[0])
    at = page(sheet=encode_sheet(worksheet))
    assert origin(at) == ("From a link that carries the worksheet: not a saved revision; content as carried by "
                          "the link; no saved revision on this server has this content.")
    with WorksheetStore(db) as store:
        saved = store.save(worksheet, saved_by="bo")
    at = page(sheet=encode_sheet(worksheet))
    assert origin(at) == ("From a link that carries the worksheet: not a saved revision; content as carried by "
                          f"the link. Its content is identical to saved revision `{saved.id}` "
                          f"(saved {saved.saved_at:%Y-%m-%d %H:%M} UTC by bo).")
    edited_by_hand = worksheet.model_copy(update={"title": worksheet.title + " (approved)"})  # a link edited
    at = page(sheet=encode_sheet(edited_by_hand))
    assert "no saved revision on this server has this content" in origin(at)
    assert at.session_state[KEY].worksheet == edited_by_hand


def test_after_a_save_the_page_says_saved_revision(db):
    at = page()
    at.button(key="share_save").click().run()
    rev_id = revision_id(at.session_state[KEY].worksheet)
    assert origin(at).startswith(f"Saved revision `{rev_id}`, saved ")
    assert " by " not in origin(at)  # no login: nobody is recorded
    at.button(key="new_worksheet").click().run()
    assert origin(at) == "A new worksheet: not saved yet."


def test_a_revision_whose_record_was_edited_is_refused_on_the_page(db):
    import sqlalchemy as sa

    with WorksheetStore(db) as store:
        saved = store.save(_sample(SAMPLES[0]), saved_by="ana")
    engine = sa.create_engine(db)
    with engine.begin() as conn:
        conn.execute(sa.text("UPDATE heatbalance_revisions SET saved_by = 'the plant manager'"))
    engine.dispose()
    at = page(ws=saved.id)
    no_traceback(at)
    assert f"the record of saved worksheet {saved.id}" in errors(at) and "has been altered" in errors(at)
    assert origin(at) == f"Bundled sample ({DEFAULT}): not a saved revision."  # not shown as the revision
    assert "the plant manager" not in "\n".join(unescaped(m.value) for m in [*at.markdown, *at.caption])


# -- who saved it: only with a login configured ---------------------------------------------------------------
def _logged_in(monkeypatch, info: dict) -> None:
    """The page as with a login configured (``st.user`` as Streamlit gives it: ``is_logged_in`` only then)."""
    import webapp.sharing as sharing

    monkeypatch.setattr(sharing, "_user_info", lambda: dict(info))


def test_with_a_login_the_revision_records_the_users_email_and_the_list_shows_it(db, monkeypatch):
    _logged_in(monkeypatch, {"is_logged_in": True, "email": "ana.lima@plant.example", "name": "Ana Lima"})
    at = page()
    assert "Saving as ana.lima@plant.example." in [unescaped(c.value) for c in at.caption]
    at.button(key="share_save").click().run()
    no_traceback(at)
    rev_id = revision_id(at.session_state[KEY].worksheet)
    with WorksheetStore(db) as store:
        assert store.info(rev_id).saved_by == "ana.lima@plant.example"
    assert any("(saved by ana.lima@plant.example)" in unescaped(m.value) for m in at.markdown)  # the revision list
    assert origin(at).endswith("by ana.lima@plant.example.")


def test_with_a_login_configured_and_nobody_logged_in_nothing_is_saved(db, monkeypatch):
    user = {"is_logged_in": False}
    _logged_in(monkeypatch, user)
    at = page()
    no_traceback(at)
    assert at.button(key="share_save").disabled
    assert "This server records who saves each revision: log in to save." in [unescaped(c.value) for c in at.caption]
    user.update(is_logged_in=True, email="ana@plant.example")
    at.run()
    assert not at.button(key="share_save").disabled
    user.clear()
    user["is_logged_in"] = False  # logged out in another tab before the click: the save itself refuses
    at.button(key="share_save").click().run()
    no_traceback(at)
    assert "Not saved: this server records who saves each revision; log in" in errors(at)
    with WorksheetStore(db) as store:
        assert store.count() == 0


def test_without_a_login_the_saver_is_empty_and_nothing_about_logins_is_unescaped(db):
    at = page()
    assert at.button(key="share_save").disabled is False
    assert not any("log in" in unescaped(c.value).lower() or "Saving as" in unescaped(c.value) for c in at.caption)
