"""The worksheet store: round trips of every sample, immutability, history, concurrency, refusals, the CLI.

Runs against SQLite always and against a throwaway PostgreSQL server (``pg_server.py``)
when one can be started (in CI it must be).
"""
from __future__ import annotations

import hashlib
import json
import multiprocessing
import sqlite3
from pathlib import Path

import pytest

from heatbalance.analyses import solve_and_analyse
from heatbalance.balance import solve
from heatbalance.present.report import result_json
from heatbalance.cli import main
from heatbalance.links import LinkError, canonical_json, revision_id
from heatbalance.store import (ENV_DATABASE_URL, ENV_DB, RevisionNotFoundError, StoreError, WorksheetStore,
                               database_url, default_database_path, open_store)
from heatbalance.worksheet import load_worksheet
import store_workers
from pg_server import postgres_url  # noqa: F401  (a fixture)

SAMPLES = sorted(Path(__file__).parent.parent.joinpath("sample_data").glob("*.json"))
WORKERS, SAVES_PER_WORKER = 8, 50


def _sample(path: Path):
    return load_worksheet(path.read_bytes())


def _file_digest(path: Path) -> str:
    return hashlib.sha256(path.read_bytes()).hexdigest()


@pytest.fixture
def sqlite_url(tmp_path):
    return f"sqlite:///{tmp_path / 'store' / 'worksheets.sqlite3'}"


@pytest.fixture(params=["sqlite", "postgresql"])
def store(request, tmp_path):
    if request.param == "sqlite":
        url = f"sqlite:///{tmp_path / 'worksheets.sqlite3'}"
    else:
        url = request.getfixturevalue("postgres_url")
        _empty_postgres(url)
    with WorksheetStore(url) as s:
        yield s


def _empty_postgres(url: str) -> None:
    """Each PostgreSQL test starts from an empty store (the server lives for the whole session)."""
    import sqlalchemy as sa

    engine = sa.create_engine(url)
    with engine.begin() as conn:
        conn.execute(sa.text("DROP TABLE IF EXISTS heatbalance_revisions, heatbalance_store_info, "
                             "heatbalance_signoffs"))
    engine.dispose()


# -- round trips --------------------------------------------------------------------------------------------
@pytest.mark.parametrize("path", SAMPLES, ids=[p.stem for p in SAMPLES])
def test_every_sample_reopens_identical_with_identical_result(store, path):
    worksheet = _sample(path)
    saved = store.save(worksheet)
    assert saved.id == revision_id(worksheet)
    reopened = store.open(saved.id)
    assert reopened.worksheet == worksheet
    assert canonical_json(reopened.worksheet) == canonical_json(worksheet)
    assert solve(reopened.worksheet).to_dict() == solve(worksheet).to_dict()
    assert (reopened.title, reopened.parent) == (worksheet.title, None)


def test_same_worksheet_saved_twice_is_one_revision_and_keeps_its_first_record(store):
    worksheet = _sample(SAMPLES[0])
    first = store.save(worksheet)
    other = store.save(_sample(SAMPLES[1]))
    again = store.save(worksheet, parent=other.id)  # a different parent cannot rewrite the stored record
    assert again == first
    assert store.count() == 2


def test_same_content_written_differently_has_the_same_id(store):
    text = SAMPLES[0].read_text()
    reordered = json.dumps(dict(reversed(list(json.loads(text).items()))), indent=4)
    assert store.save(load_worksheet(text)).id == store.save(load_worksheet(reordered)).id


def test_an_edit_is_a_new_revision_and_the_original_is_untouched(store):
    original = _sample(SAMPLES[0])
    first = store.save(original)
    edited = original.model_copy(update={"title": original.title + " (checked)"})
    second = store.save(edited, parent=first.id)
    assert second.id != first.id and second.parent == first.id
    assert store.open(first.id).worksheet == original
    assert store.open(second.id).worksheet == edited
    assert [r.id for r in store.history(second.id)] == [second.id, first.id]
    assert [r.id for r in store.children(first.id)] == [second.id]


def test_saving_unchanged_with_itself_as_parent_records_no_parent(store):
    worksheet = _sample(SAMPLES[0])
    assert store.save(worksheet, parent=revision_id(worksheet)).parent is None


def test_history_follows_a_long_chain_and_stops_at_a_parent_saved_elsewhere(store):
    worksheet = _sample(SAMPLES[0])
    parent = "f" * 24  # saved on another server
    ids = []
    for i in range(5):
        worksheet = worksheet.model_copy(update={"notes": f"edit {i}"})
        parent = store.save(worksheet, parent=parent).id
        ids.append(parent)
    assert [r.id for r in store.history(ids[-1])] == ids[::-1]
    assert [r.id for r in store.history(ids[-1], limit=2)] == ids[:-3:-1]


def test_text_that_looks_like_sql_is_stored_as_text(store):
    # every statement binds its values: a title or note made of SQL is just text
    hostile = "x'); DROP TABLE heatbalance_revisions; -- \" ; DELETE FROM heatbalance_revisions"
    worksheet = _sample(SAMPLES[0]).model_copy(update={"title": hostile[:200], "notes": hostile * 3})
    saved = store.save(worksheet)
    store.save(_sample(SAMPLES[1]), parent=saved.id)
    assert store.open(saved.id).worksheet == worksheet
    assert store.count() == 2


def test_saved_at_is_utc_and_increases(store):
    a = store.save(_sample(SAMPLES[0]))
    b = store.save(_sample(SAMPLES[1]), parent=a.id)
    assert a.saved_at.utcoffset().total_seconds() == 0
    assert b.saved_at >= a.saved_at


# -- concurrency --------------------------------------------------------------------------------------------
def _save_from_many_processes(url: str):
    # forkserver: each worker is forked from a clean single-threaded server process that has imported the
    # engine once (forking the test session itself could inherit a lock held by another of its threads)
    context = multiprocessing.get_context("forkserver")
    context.set_forkserver_preload(["store_workers", "heatbalance.store"])
    barrier, out = context.Barrier(WORKERS), context.Queue()
    workers = [context.Process(target=store_workers.save_many, args=(url, w, SAVES_PER_WORKER, barrier, out))
               for w in range(WORKERS)]
    for p in workers:
        p.start()
    try:
        collected = dict(out.get(timeout=600) for _ in workers)
    finally:
        for p in workers:
            p.join(timeout=60)
            if p.is_alive():
                p.kill()
    failures = {w: r for w, r in collected.items() if isinstance(r, str)}
    assert not failures, failures
    assert [p.exitcode for p in workers] == [0] * WORKERS
    return collected


def _check_nothing_lost(url: str, collected: dict) -> None:
    assert sorted(collected) == list(range(WORKERS))
    expected = {}
    for results in collected.values():
        assert len(results) == SAVES_PER_WORKER
        for rev_id, content in results:
            assert expected.setdefault(rev_id, content) == content
    own = WORKERS * (SAVES_PER_WORKER // 2)
    shared = SAVES_PER_WORKER // 2
    assert len(expected) == own + shared
    with WorksheetStore(url) as store:
        assert store.count() == len(expected)
        for rev_id, content in expected.items():
            assert canonical_json(store.open(rev_id).worksheet) == content
            assert revision_id(store.open(rev_id).worksheet) == rev_id


def test_many_processes_saving_at_once_on_sqlite_lose_and_corrupt_nothing(tmp_path):
    url = f"sqlite:///{tmp_path / 'busy.sqlite3'}"  # a fresh file: the workers also race to create it
    _check_nothing_lost(url, _save_from_many_processes(url))
    with sqlite3.connect(tmp_path / "busy.sqlite3") as conn:
        assert conn.execute("PRAGMA integrity_check").fetchone() == ("ok",)


def test_many_processes_saving_at_once_on_postgresql_lose_and_corrupt_nothing(postgres_url):  # noqa: F811
    _empty_postgres(postgres_url)
    _check_nothing_lost(postgres_url, _save_from_many_processes(postgres_url))


# -- refusals -----------------------------------------------------------------------------------------------
def test_unknown_id_is_refused_clearly(store):
    with pytest.raises(RevisionNotFoundError, match=r"no saved worksheet has the id 0123456789abcdef01234567"):
        store.open("0123456789abcdef01234567")
    with pytest.raises(RevisionNotFoundError, match=r"no saved worksheet has the id"):
        store.history("0123456789abcdef01234567")


@pytest.mark.parametrize("bad", ["", "123", "0123456789abcdef0123456g", "0123456789abcdef01234567x",
                                 "'; DROP TABLE heatbalance_revisions; --", "../../etc/passwd"])
def test_malformed_id_is_refused_before_any_query(store, bad):
    store.save(_sample(SAMPLES[0]))
    with pytest.raises(LinkError, match=r"is not a worksheet id \(an id is 24 characters 0-9 and a-f\)"):
        store.open(bad)
    assert store.count() == 1


def test_malformed_parent_is_refused_and_nothing_saved(store):
    with pytest.raises(LinkError, match=r"parent: 'nope' is not a worksheet id"):
        store.save(_sample(SAMPLES[0]), parent="nope")
    assert store.count() == 0


def test_locked_sqlite_database_gives_a_clear_message_and_keeps_what_is_stored(tmp_path):
    path = tmp_path / "locked.sqlite3"
    with WorksheetStore(f"sqlite:///{path}") as store:
        kept = store.save(_sample(SAMPLES[0]))
    blocker = sqlite3.connect(path, isolation_level=None)
    blocker.execute("BEGIN EXCLUSIVE")
    try:
        with WorksheetStore(f"sqlite:///{path}", busy_timeout=0.2) as store:
            with pytest.raises(StoreError, match=r"the worksheet database is busy \(locked by another program"):
                store.save(_sample(SAMPLES[1]))
            assert store.open(kept.id).worksheet == _sample(SAMPLES[0])  # readers are never blocked (WAL)
    finally:
        blocker.execute("ROLLBACK")
        blocker.close()
    with WorksheetStore(f"sqlite:///{path}") as store:
        assert store.count() == 1


def test_a_file_that_is_not_a_database_is_refused_and_left_alone(tmp_path):
    path = tmp_path / "notes.sqlite3"
    path.write_text("these are my notes, not a database\n" * 50)
    before = _file_digest(path)
    with pytest.raises(StoreError, match=r"is not a readable worksheet database \(file is not a database\); "
                                         r"nothing was changed"):
        WorksheetStore(f"sqlite:///{path}")
    assert _file_digest(path) == before


def test_a_database_of_another_program_is_refused_and_left_alone(tmp_path):
    path = tmp_path / "other.sqlite3"
    with sqlite3.connect(path) as conn:
        conn.execute("CREATE TABLE invoices (n INTEGER)")
        conn.execute("INSERT INTO invoices VALUES (1)")
    conn.close()
    before = _file_digest(path)
    with pytest.raises(StoreError, match=r"is an SQLite database of another program .* Nothing was changed"):
        WorksheetStore(f"sqlite:///{path}")
    assert _file_digest(path) == before


def test_a_revision_altered_in_the_database_is_not_opened(tmp_path):
    path = tmp_path / "altered.sqlite3"
    with WorksheetStore(f"sqlite:///{path}") as store:
        rev = store.save(_sample(SAMPLES[0]))
    with sqlite3.connect(path) as conn:
        conn.execute("UPDATE heatbalance_revisions SET content = replace(content, '\"title\":\"', '\"title\":\"Not checked: ')")
    conn.close()
    with WorksheetStore(f"sqlite:///{path}") as store:
        with pytest.raises(StoreError, match=rf"saved worksheet {rev.id} has been altered in the database"):
            store.open(rev.id)


# -- who saved it; the record's integrity; the format-1 migration ------------------------------------------------
def test_saved_by_is_kept_with_the_revision_and_never_rewritten(store):
    worksheet = _sample(SAMPLES[0])
    first = store.save(worksheet, saved_by="ana.lima@plant.example")
    assert first.saved_by == "ana.lima@plant.example"
    assert store.save(worksheet, saved_by="someone else").saved_by == "ana.lima@plant.example"  # first save wins
    assert store.open(first.id).saved_by == store.info(first.id).saved_by == "ana.lima@plant.example"
    edited = store.save(worksheet.model_copy(update={"notes": "checked"}), parent=first.id, saved_by="Bo Chen")
    assert [(r.id, r.saved_by) for r in store.history(edited.id)] == [(edited.id, "Bo Chen"),
                                                                     (first.id, "ana.lima@plant.example")]
    assert [r.saved_by for r in store.children(first.id)] == ["Bo Chen"]
    assert store.save(_sample(SAMPLES[1])).saved_by == ""  # no login: nothing recorded
    with pytest.raises(StoreError, match="saved_by must be text"):
        store.save(_sample(SAMPLES[2]), saved_by=None)


def test_the_raw_database_engine_is_private(store):
    assert not hasattr(store, "engine")
    assert "engine" not in [name for name in dir(store) if not name.startswith("_")]


def _sql(url: str, *statements: str, params: dict | None = None) -> None:
    """Run statements on the store's database directly, as someone with database access could."""
    import sqlalchemy as sa

    engine = sa.create_engine(url)
    with engine.begin() as conn:
        for statement in statements:
            conn.execute(sa.text(statement), params or {})
    engine.dispose()


@pytest.mark.parametrize("column, value", [("title", "Approved by the shift lead"), ("saved_by", "the plant manager"),
                                           ("parent_id", "f" * 24), ("saved_at", "2020-01-01T00:00:00.000000+00:00"),
                                           ("record_sha256", None)])
def test_an_edited_revision_record_is_refused_and_never_shown_as_genuine(store, column, value):
    first = store.save(_sample(SAMPLES[0]), saved_by="ana")
    second = store.save(_sample(SAMPLES[1]), parent=first.id, saved_by="bo")
    url = store.url.render_as_string(hide_password=False)
    _sql(url, f"UPDATE heatbalance_revisions SET {column} = :value WHERE id = :id",
         params={"value": value, "id": first.id})
    message = rf"the record of saved worksheet {first.id} \(title, parent, save time, saved by\) has been altered"
    for read in (lambda: store.open(first.id), lambda: store.info(first.id), lambda: store.history(second.id),
                 lambda: store.save(_sample(SAMPLES[0]))):
        with pytest.raises(StoreError, match=message):
            read()
    assert store.open(second.id).title == _sample(SAMPLES[1]).title  # the others are untouched
    assert store.count() == 2  # nothing deleted


_FORMAT_1 = [  # the store's tables as the previous program (store format 1) created them
    "CREATE TABLE heatbalance_revisions (id VARCHAR(32) NOT NULL PRIMARY KEY, parent_id VARCHAR(32), "
    "title VARCHAR(200) NOT NULL, saved_at VARCHAR(40) NOT NULL, schema_version INTEGER NOT NULL, "
    "content_sha256 VARCHAR(64) NOT NULL, content TEXT NOT NULL)",
    "CREATE TABLE heatbalance_store_info (key VARCHAR(40) NOT NULL PRIMARY KEY, value VARCHAR(200) NOT NULL)",
    "CREATE INDEX heatbalance_revisions_parent ON heatbalance_revisions (parent_id)",
    "INSERT INTO heatbalance_store_info (key, value) VALUES ('format', '1')",
]


def _format_1_store(url: str) -> list[dict]:
    """A store written by the previous program: format 1, one revision per sample in a parent chain."""
    rows, parent = [], None
    for i, path in enumerate(SAMPLES):
        content = canonical_json(_sample(path))
        digest = hashlib.sha256(content.encode("utf-8")).hexdigest()
        rows.append(dict(id=digest[:24], parent_id=parent, title=_sample(path).title,
                         saved_at=f"2025-0{1 + i % 9}-01T08:00:00.000000+00:00", schema_version=1,
                         content_sha256=digest, content=content))
        parent = digest[:24]
    _sql(url, *_FORMAT_1)
    for row in rows:
        _sql(url, "INSERT INTO heatbalance_revisions (id, parent_id, title, saved_at, schema_version, "
                  "content_sha256, content) VALUES (:id, :parent_id, :title, :saved_at, :schema_version, "
                  ":content_sha256, :content)", params=row)
    return rows


@pytest.fixture(params=["sqlite", "postgresql"])
def empty_url(request, tmp_path):
    if request.param == "sqlite":
        return f"sqlite:///{tmp_path / 'old.sqlite3'}"
    url = request.getfixturevalue("postgres_url")
    _empty_postgres(url)
    return url


def test_a_format_1_store_is_migrated_in_place_and_keeps_every_revision(empty_url):
    import sqlalchemy as sa

    rows = _format_1_store(empty_url)
    with WorksheetStore(empty_url) as store:
        assert store.count() == len(rows)
        for row in rows:  # every revision opens, with its record as the old program saved it
            revision = store.open(row["id"])
            assert canonical_json(revision.worksheet) == row["content"]
            assert (revision.title, revision.parent, revision.saved_by) == (row["title"], row["parent_id"], "")
            assert revision.saved_at.isoformat(timespec="microseconds") == row["saved_at"]
        assert [r.id for r in store.history(rows[-1]["id"])] == [r["id"] for r in reversed(rows)]
        new = store.save(_sample(SAMPLES[0]).model_copy(update={"notes": "after"}), parent=rows[-1]["id"],
                         saved_by="ana")
        assert store.info(new.id).saved_by == "ana"
    engine = sa.create_engine(empty_url)
    with engine.connect() as conn:
        columns = {c["name"] for c in sa.inspect(conn).get_columns("heatbalance_revisions")}
        info = dict(conn.execute(sa.text("SELECT key, value FROM heatbalance_store_info")).all())
        stored = {r.id: r for r in conn.execute(sa.text("SELECT * FROM heatbalance_revisions"))}
    engine.dispose()
    assert {"saved_by", "record_sha256"} <= columns
    assert info["format"] == "2" and info["migrated_from_1"].endswith(f", {len(rows)} rows")
    for row in rows:  # nothing of the old rows changed but the two new columns
        assert {k: getattr(stored[row["id"]], k) for k in row} == row
    with WorksheetStore(empty_url) as again:  # a second opening finds it migrated
        assert again.count() == len(rows) + 1


def test_a_store_of_a_newer_format_is_refused_and_left_alone(tmp_path):
    path = tmp_path / "newer.sqlite3"
    url = f"sqlite:///{path}"
    _sql(url, *_FORMAT_1[:-1], "INSERT INTO heatbalance_store_info (key, value) VALUES ('format', '3')")
    before = _file_digest(path)
    with pytest.raises(StoreError, match=r"holds worksheet store format '3'; this program reads format 2"):
        WorksheetStore(url)
    assert _file_digest(path) == before


def test_a_folder_in_place_of_the_database_file_is_refused(tmp_path):
    (tmp_path / "dir.sqlite3").mkdir()
    with pytest.raises(StoreError, match=r"dir\.sqlite3 is not a file"):
        WorksheetStore(f"sqlite:///{tmp_path / 'dir.sqlite3'}")


def test_unreachable_postgresql_server_gives_a_clear_message():
    import socket

    with socket.socket() as s:  # a loopback port with nobody listening
        s.bind(("127.0.0.1", 0))
        port = s.getsockname()[1]
    with pytest.raises(StoreError, match=rf"cannot reach the worksheet database at "
                                         rf"postgresql\+psycopg://nobody@127\.0\.0\.1:{port}/x"):
        WorksheetStore(f"postgresql+psycopg://nobody@127.0.0.1:{port}/x")


@pytest.mark.parametrize("url, message", [
    ("mysql://u@localhost/db", r"database 'mysql' is not supported; use sqlite or postgresql"),
    ("sqlite://", r"an in-memory SQLite store would lose every save; give a file path"),
    ("not a url at all", r"not a database URL"),
])
def test_unusable_database_urls_are_refused(url, message):
    with pytest.raises(StoreError, match=message):
        WorksheetStore(url)


# -- where the store lives ----------------------------------------------------------------------------------
def test_database_url_prefers_the_server_url_then_the_file_then_the_user_data_folder(tmp_path):
    assert database_url({ENV_DATABASE_URL: "postgresql://team@db.internal/sheets", ENV_DB: "/x.sqlite3"}) \
        == "postgresql+psycopg://team@db.internal/sheets"
    assert database_url({ENV_DB: str(tmp_path / "a.sqlite3")}) == f"sqlite:///{tmp_path / 'a.sqlite3'}"
    assert database_url({}) == f"sqlite:///{default_database_path()}"


def test_default_path_is_under_the_user_data_folder(monkeypatch, tmp_path):
    monkeypatch.setenv("XDG_DATA_HOME", str(tmp_path))
    assert default_database_path() == tmp_path / "heatbalance" / "worksheets.sqlite3"


def test_open_store_reads_the_environment(monkeypatch, tmp_path):
    monkeypatch.delenv(ENV_DATABASE_URL, raising=False)
    monkeypatch.setenv(ENV_DB, str(tmp_path / "env.sqlite3"))
    with open_store() as store:
        store.save(_sample(SAMPLES[0]))
    assert (tmp_path / "env.sqlite3").exists()


# -- command line -------------------------------------------------------------------------------------------
@pytest.fixture
def cli_store(monkeypatch, tmp_path):
    monkeypatch.delenv(ENV_DATABASE_URL, raising=False)
    monkeypatch.setenv(ENV_DB, str(tmp_path / "cli.sqlite3"))
    return tmp_path / "cli.sqlite3"


def test_cli_save_prints_the_id_and_open_prints_the_same_worksheet(cli_store, capsys):
    path = SAMPLES[0]
    assert main(["save", str(path)]) == 0
    rev_id = capsys.readouterr().out.strip()
    assert rev_id == revision_id(_sample(path))
    assert main(["open", rev_id]) == 0
    assert load_worksheet(capsys.readouterr().out) == _sample(path)


def test_cli_open_solves_and_opens_share_links(cli_store, capsys):
    from heatbalance.links import sheet_link

    worksheet = _sample(SAMPLES[0])
    main(["save", str(SAMPLES[0])])
    rev_id = capsys.readouterr().out.strip()
    assert main(["open", rev_id, "--solve", "--json"]) == 0
    expected = result_json(solve_and_analyse(worksheet), "SI")
    assert json.loads(capsys.readouterr().out) == json.loads(json.dumps(expected))
    assert main(["open", f"https://sheets.example.invalid/?ws={rev_id}"]) == 0
    assert load_worksheet(capsys.readouterr().out) == worksheet
    assert main(["open", sheet_link(worksheet, "https://sheets.example.invalid/")]) == 0
    assert load_worksheet(capsys.readouterr().out) == worksheet


def test_cli_history_lists_newest_first(cli_store, capsys, tmp_path):
    main(["save", str(SAMPLES[0])])
    first = capsys.readouterr().out.strip()
    edited = tmp_path / "edited.json"
    edited.write_text(SAMPLES[0].read_text().replace('"title": "', '"title": "Edited: ', 1))
    main(["save", str(edited), "--parent", first])
    second = capsys.readouterr().out.strip()
    assert main(["history", second]) == 0
    lines = capsys.readouterr().out.splitlines()
    assert [line.split()[0] for line in lines] == [second, first]
    assert "Edited: " in lines[0]


@pytest.mark.parametrize("argv, message", [
    (["open", "123"], r"^error: ws: '123' is not a worksheet id \(an id is 24 characters 0-9 and a-f\)\n$"),
    (["open", "0123456789abcdef01234567"], r"^error: ws: no saved worksheet has the id 0123456789abcdef01234567"),
    (["open", "?sheet=z1.AAAA"], r"^error: sheet: the sheet link is damaged or has been altered"),
    (["save", "/no/such/file.json"], r"^error: /no/such/file.json: cannot read it \(No such file or directory\)\n$"),
    (["history", "0123456789abcdef01234567"], r"^error: ws: no saved worksheet has the id"),
])
def test_cli_refuses_bad_input_in_one_line(cli_store, capsys, argv, message):
    assert main(argv) == 1
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and "Traceback" not in err
    assert __import__("re").search(message, err), err


def test_cli_refuses_a_file_of_another_schema_and_saves_nothing(cli_store, capsys, tmp_path):
    other = tmp_path / "result.json"
    other.write_text(json.dumps({"answer": {}, "lines": [], "terms": [], "residual": 0}))
    assert main(["save", str(other)]) == 1
    assert "this is a solved result (the output of 'solve --json'), not a worksheet" in capsys.readouterr().err
    assert not cli_store.exists() or WorksheetStore(f"sqlite:///{cli_store}").count() == 0


def test_cli_unreadable_database_is_one_line_and_untouched(monkeypatch, tmp_path, capsys):
    bad = tmp_path / "garbage.sqlite3"
    bad.write_bytes(b"\x00garbage" * 100)
    before = _file_digest(bad)
    monkeypatch.delenv(ENV_DATABASE_URL, raising=False)
    monkeypatch.setenv(ENV_DB, str(bad))
    assert main(["save", str(SAMPLES[0])]) == 1
    err = capsys.readouterr().err
    assert err.startswith("error: store: ") and "is not a readable worksheet database" in err
    assert _file_digest(bad) == before


# -- sign-offs (issue 15) -------------------------------------------------------------------------------------
def _store_url(store) -> str:
    return store.url.render_as_string(hide_password=False)


def test_sign_offs_survive_a_reopen_and_a_new_revision_has_none(store):
    from heatbalance.store import SignOff

    first = store.save(_sample(SAMPLES[0]))
    prepared = store.sign(first.id, "prepared", "A.  Engineer", "first issue")
    checked = store.sign(first.id, "checked", "B. Checker", "agreed, see note 3")
    assert isinstance(prepared, SignOff) and prepared.name == "A. Engineer" and prepared.revision == first.id
    with WorksheetStore(_store_url(store)) as again:
        stored = again.signoffs(first.id)
    assert [(s.role, s.name, s.comment) for s in stored] == [("prepared", "A. Engineer", "first issue"),
                                                             ("checked", "B. Checker", "agreed, see note 3")]
    assert stored[0].signed_at <= stored[1].signed_at and stored[1].signed_at == checked.signed_at
    edited = store.save(_sample(SAMPLES[0]).model_copy(update={"title": "edited"}), parent=first.id)
    assert store.signoffs(edited.id) == []  # an edit is a new revision: unchecked
    assert store.open(first.id).worksheet == _sample(SAMPLES[0])  # signing never altered the revision


@pytest.mark.parametrize("rev, role, name, comment, where, message", [
    ("0" * 24, "checked", "B", "", "ws", "no saved worksheet has the id 000000000000000000000000"),
    (None, "reviewed", "B", "", "role", "one of prepared, checked, approved"),
    (None, "checked", "  ", "", "name", "needs the name"),
    (None, "checked", "B", "x" * 2001, "comment", "at most 2,000 characters"),
])
def test_bad_sign_offs_are_refused_with_where(store, rev, role, name, comment, where, message):
    saved = store.save(_sample(SAMPLES[0]))
    with pytest.raises(StoreError, match=message) as refusal:
        store.sign(rev or saved.id, role, name, comment)
    assert refusal.value.where == where
    assert store.signoffs(saved.id) == []


def test_a_sign_off_cannot_be_edited_through_any_api_and_an_edit_in_the_database_is_caught(store):
    assert not [name for name in dir(store) if not name.startswith("_") and
                any(word in name for word in ("update", "delete", "edit", "remove", "unsign", "replace"))]
    saved = store.save(_sample(SAMPLES[0]))
    store.sign(saved.id, "prepared", "A. Engineer")  # an approval needs it first
    store.sign(saved.id, "approved", "C. Approver")
    _sql(_store_url(store), "UPDATE heatbalance_signoffs SET name = 'someone else'")
    with pytest.raises(StoreError, match="has been altered in the database"):
        store.signoffs(saved.id)


def test_a_store_from_before_sign_offs_gains_their_table_and_keeps_its_revisions(tmp_path):
    url = f"sqlite:///{tmp_path / 'old.sqlite3'}"
    with WorksheetStore(url) as s:
        saved = s.save(_sample(SAMPLES[0]))
    _sql(url, "DROP TABLE heatbalance_signoffs")
    with WorksheetStore(url) as s:
        assert s.open(saved.id).worksheet == _sample(SAMPLES[0]) and s.signoffs(saved.id) == []
        s.sign(saved.id, "prepared", "A. Engineer")
        s.sign(saved.id, "checked", "B. Checker")
        assert len(s.signoffs(saved.id)) == 2


def test_a_revision_this_version_refuses_to_read_is_kept_and_printed_as_stored(cli_store, monkeypatch, capsys):
    """A rule tightened after a save (names with control characters are now refused) must not lose the revision:
    opening it says why and how to get it, and 'open --stored' prints its JSON exactly as saved."""
    import json

    import heatbalance.worksheet as model

    doc = json.loads(SAMPLES[0].read_bytes())
    doc["title"] = "Heater\trev 2"  # a tab: accepted when it was saved
    monkeypatch.setattr(model, "_check_texts", lambda data: None)
    with WorksheetStore(f"sqlite:///{cli_store}") as store:
        rev = store.save(model.parse_worksheet(doc))
    monkeypatch.undo()
    monkeypatch.delenv(ENV_DATABASE_URL, raising=False)
    monkeypatch.setenv(ENV_DB, str(cli_store))
    with WorksheetStore(f"sqlite:///{cli_store}") as store:
        with pytest.raises(StoreError, match=rf"saved worksheet {rev.id} cannot be read .* 'python -m heatbalance "
                                             rf"open {rev.id} --stored' prints it"):
            store.open(rev.id)
        stored = store.stored_text(rev.id)
    assert json.loads(stored)["title"] == "Heater\trev 2"
    assert main(["open", rev.id, "--stored"]) == 0
    assert capsys.readouterr().out.strip() == stored


def test_open_stored_takes_a_saved_revision_only(cli_store, capsys):
    """'open --stored' prints what a store holds: a ?sheet= link holds no stored text, and is refused at 'id'."""
    from heatbalance.links import sheet_link

    link = sheet_link(_sample(SAMPLES[0]), "https://sheets.example.invalid/")
    assert main(["open", link, "--stored"]) == 1
    assert "id: --stored prints a saved revision: give its id or its ?ws= link" in capsys.readouterr().err
