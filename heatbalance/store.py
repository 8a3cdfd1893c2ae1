"""Saved worksheets: immutable revisions in SQLite (default) or PostgreSQL (a team server).

Every save is a revision whose id is :func:`heatbalance.links.revision_id` of the
worksheet: the same worksheet saved twice gives the same id and the same row.
A revision records its parent (the revision it was edited from), its title,
the time it was first saved and who saved it (``saved_by``: the logged-in user
when the page has a login, else empty; set at the save, never changed). Rows are
only ever inserted (``INSERT ... ON CONFLICT DO NOTHING``): no revision is changed
or deleted, so concurrent saves of the same worksheet cannot clash, and a link
opens exactly what was shared, for good.

Integrity: reading a revision re-checks its content against its id, and its record
(id, parent, title, save time, schema version, content digest, saved_by) against
``record_sha256``, a SHA-256 of the canonical record stored with it
(:func:`record_digest`). A row whose content or record was edited in the database is
refused with a :class:`StoreError`, never shown as genuine. This catches an edited
row, not a forger who also recomputes the digest (anyone who can write the database
can do that): protect the database itself.

Store formats: format 1 (no ``saved_by`` nor ``record_sha256``) is migrated in place
to format 2 the first time this program opens it: the two columns are added, every
existing row is kept and gets its record digest, computed from what is stored then
(the content is still checked against the id), and the format is set to 2, so a
program that reads only format 1 refuses the store rather than write unchecked rows.

Where the store lives:

* ``HEATBALANCE_DATABASE_URL``: a PostgreSQL URL (``postgresql://user@host/db``)
  for a store shared by several app processes;
* else ``HEATBALANCE_DB``: the path of an SQLite file;
* else :func:`default_database_path` (``~/.local/share/heatbalance/worksheets.sqlite3``
  on Linux, or under ``$XDG_DATA_HOME``).

All SQL is built by SQLAlchemy Core with bound parameters. Every database
failure is raised as :class:`StoreError` with a message a user can act on.
"""
from __future__ import annotations

import hashlib
import json
import os
import sys
import time
from dataclasses import dataclass, field
from datetime import datetime, timezone
from pathlib import Path

import sqlalchemy as sa
from sqlalchemy import exc as sa_exc

from .errors import HeatBalanceError
from .links import ID_LENGTH, LinkError, canonical_json, check_id
from .worksheet import MAX_DOCUMENT_BYTES, Worksheet, load_worksheet

__all__ = ["StoreError", "RevisionNotFoundError", "RevisionInfo", "Revision", "SignOff", "ROLES", "WorksheetStore",
           "open_store",
           "default_database_path", "database_url", "MAX_HISTORY", "ENV_DB", "ENV_DATABASE_URL",
           "LinkError"]  # LinkError: a malformed id, refused by the store's methods too

ENV_DB = "HEATBALANCE_DB"
ENV_DATABASE_URL = "HEATBALANCE_DATABASE_URL"
MAX_HISTORY = 200  # revisions listed at most when following parent links
BUSY_TIMEOUT_S = 15  # how long a save waits for another writer before giving up
STORE_FORMAT = "2"  # 2: saved_by and record_sha256 (format 1 is migrated in place, see the module docstring)
MAX_SAVED_BY = 200  # characters of a saver's name or e-mail kept

_metadata = sa.MetaData()
revisions = sa.Table(
    "heatbalance_revisions", _metadata,
    sa.Column("id", sa.String(32), primary_key=True),
    sa.Column("parent_id", sa.String(32), nullable=True),
    sa.Column("title", sa.String(200), nullable=False),
    sa.Column("saved_at", sa.String(40), nullable=False),  # ISO 8601, UTC, microseconds: sorts as text
    sa.Column("schema_version", sa.Integer, nullable=False),
    sa.Column("content_sha256", sa.String(64), nullable=False),
    sa.Column("content", sa.Text, nullable=False),
    sa.Column("saved_by", sa.String(MAX_SAVED_BY), nullable=False, server_default=""),
    sa.Column("record_sha256", sa.String(64), nullable=True),  # NULL only between the migration's two steps
)
_RECORD = ("id", "parent_id", "title", "saved_at", "schema_version", "content_sha256", "saved_by")
_META = [revisions.c[name] for name in _RECORD] + [revisions.c.record_sha256]  # a revision without its content
store_info = sa.Table(
    "heatbalance_store_info", _metadata,
    sa.Column("key", sa.String(40), primary_key=True),
    sa.Column("value", sa.String(200), nullable=False),
)
_parent_index = sa.Index("heatbalance_revisions_parent", revisions.c.parent_id)
signoffs = sa.Table(  # added to format 2 as a new table: a program that does not know it leaves it alone
    "heatbalance_signoffs", _metadata,
    sa.Column("id", sa.String(32), primary_key=True),  # the first 24 hex digits of record_sha256
    sa.Column("revision_id", sa.String(32), nullable=False),
    sa.Column("role", sa.String(20), nullable=False),
    sa.Column("name", sa.String(MAX_SAVED_BY), nullable=False),
    sa.Column("signed_at", sa.String(40), nullable=False),  # ISO 8601, UTC, microseconds
    sa.Column("comment", sa.Text, nullable=False),
    sa.Column("record_sha256", sa.String(64), nullable=False),
)
_signoff_index = sa.Index("heatbalance_signoffs_revision", signoffs.c.revision_id)
ROLES = ("prepared", "checked", "approved")  # in their order: a check or an approval needs a "prepared" first
PREPARED = ROLES[0]
MAX_COMMENT = 2000  # characters of a sign-off's comment
_SIGNOFF = ("revision_id", "role", "name", "signed_at", "comment")


class StoreError(HeatBalanceError, RuntimeError):
    """The worksheet store cannot be used: locked, unreadable, unreachable, or its content is damaged."""


class RevisionNotFoundError(StoreError, LookupError):
    """No revision has this id in this store."""


@dataclass(frozen=True)
class RevisionInfo:
    """What the revision list shows: id, parent, title, time saved (UTC) and who saved it ("" without a login)."""

    id: str
    parent: str | None
    title: str
    saved_at: datetime
    saved_by: str = ""


@dataclass(frozen=True)
class SignOff:
    """A sign-off of one saved revision: its role (prepared, checked, approved), who, when (UTC), a comment.

    Stored as its own record, only ever inserted: it never alters the revision, and no method changes or
    removes it. An edit of the worksheet is a new revision, with no sign-offs.
    """

    revision: str
    role: str
    name: str
    signed_at: datetime
    comment: str = ""


@dataclass(frozen=True)
class Revision(RevisionInfo):
    """A saved revision with its worksheet."""

    worksheet: Worksheet = field(kw_only=True)


def record_digest(row) -> str:
    """SHA-256 (hex) of a revision's canonical record: its metadata and content digest as sorted, compact JSON.

    ``row`` has the attributes or keys ``id``, ``parent_id``, ``title``, ``saved_at``, ``schema_version``,
    ``content_sha256`` and ``saved_by``.

    >>> record_digest({"id": "0" * 24, "parent_id": None, "title": "T", "saved_at": "2026-01-01T00:00:00+00:00",
    ...                "schema_version": 1, "content_sha256": "0" * 64, "saved_by": ""})[:12]
    'e82a420d7867'
    """
    get = row.get if isinstance(row, dict) else lambda name: getattr(row, name)
    record = {name: get(name) for name in _RECORD}
    text = json.dumps(record, sort_keys=True, separators=(",", ":"), ensure_ascii=False)
    return hashlib.sha256(text.encode("utf-8")).hexdigest()


def default_database_path() -> Path:
    """Where the SQLite store lives unless ``HEATBALANCE_DB`` says otherwise: the user's data folder."""
    if sys.platform == "win32":
        base = Path(os.environ.get("LOCALAPPDATA") or Path.home() / "AppData" / "Local")
    elif sys.platform == "darwin":
        base = Path.home() / "Library" / "Application Support"
    else:
        base = Path(os.environ.get("XDG_DATA_HOME") or Path.home() / ".local" / "share")
    return base / "heatbalance" / "worksheets.sqlite3"


def database_url(environ: dict | None = None) -> str:
    """The store's SQLAlchemy URL from the environment (see the module docstring)."""
    env = os.environ if environ is None else environ
    url = (env.get(ENV_DATABASE_URL) or "").strip()
    if url:
        for prefix in ("postgresql://", "postgres://"):
            if url.startswith(prefix):
                return "postgresql+psycopg://" + url[len(prefix):]
        return url
    path = (env.get(ENV_DB) or "").strip()
    return "sqlite:///" + str(Path(path).expanduser() if path else default_database_path())


def _now() -> str:
    return datetime.now(timezone.utc).isoformat(timespec="microseconds")


def _describe_db_error(exc: Exception, where: str, busy_timeout: float = BUSY_TIMEOUT_S) -> str:
    text = str(getattr(exc, "orig", None) or exc).strip().splitlines()[0][:200]
    low = text.lower()
    if "locked" in low or "busy" in low:
        return (f"the worksheet database is busy (locked by another program for more than {busy_timeout:g} s); "
                "try again in a moment")
    if "not a database" in low or "malformed" in low or "corrupt" in low:
        return f"{where} is not a readable worksheet database ({text}); nothing was changed"
    if "unable to open" in low or "readonly" in low or "read-only" in low or "permission" in low:
        return f"cannot open or write {where} ({text}); check the path and its permissions"
    if "connection" in low or "could not connect" in low or "timeout" in low:
        return f"cannot reach the worksheet database at {where} ({text})"
    return f"the worksheet database at {where} failed: {text}"


class WorksheetStore:
    """Immutable worksheet revisions in one SQL database (SQLite or PostgreSQL).

    >>> import tempfile, os
    >>> folder = tempfile.TemporaryDirectory()
    >>> store = WorksheetStore("sqlite:///" + os.path.join(folder.name, "doc.sqlite3"))
    >>> first = store.save(Worksheet(title="Heater"))
    >>> store.open(first.id).worksheet.title
    'Heater'
    >>> store.save(Worksheet(title="Heater")).id == first.id     # same worksheet, same id
    True
    >>> second = store.save(Worksheet(title="Heater, edited"), parent=first.id)
    >>> [r.title for r in store.history(second.id)]
    ['Heater, edited', 'Heater']
    >>> store.close(); folder.cleanup()
    """

    def __init__(self, url: str, busy_timeout: float = BUSY_TIMEOUT_S):
        try:
            self.url = sa.engine.make_url(url)
        except (sa_exc.ArgumentError, ValueError) as exc:
            raise StoreError(f"not a database URL ({exc})", "store") from None
        self.dialect = self.url.get_backend_name()
        if self.dialect not in ("sqlite", "postgresql"):
            raise StoreError(f"database '{self.dialect}' is not supported; use sqlite or postgresql", "store")
        self.busy_timeout = busy_timeout
        self.where = self.url.database if self.dialect == "sqlite" else self.url.render_as_string(hide_password=True)
        try:
            if self.dialect == "sqlite":
                self._prepare_sqlite_file()
                self._engine = sa.create_engine(self.url, connect_args={"timeout": busy_timeout})
                sa.event.listen(self._engine, "connect", _sqlite_pragmas)
            else:
                self._engine = sa.create_engine(self.url, pool_pre_ping=True,
                                               connect_args={"connect_timeout": 10})
        except (sa_exc.ArgumentError, ImportError) as exc:
            raise StoreError(f"cannot use database URL {self.where} ({exc})", "store") from None
        self._insert = (sa.dialects.sqlite.insert if self.dialect == "sqlite" else sa.dialects.postgresql.insert)
        self._create_schema()

    # -- set-up ---------------------------------------------------------------------------------------------
    def _prepare_sqlite_file(self) -> None:
        database = self.url.database or ""
        if database in ("", ":memory:"):
            raise StoreError("an in-memory SQLite store would lose every save; give a file path", "store")
        path = Path(database)
        try:
            path.parent.mkdir(parents=True, exist_ok=True)
        except OSError as exc:
            raise StoreError(f"cannot create the folder {path.parent} ({exc.strerror or exc})", "store") from None
        if path.exists() and not path.is_file():
            raise StoreError(f"{path} is not a file", "store")

    def _create_schema(self) -> None:
        """Check an existing store (reading only), create the tables of a new one, or migrate format 1."""
        statements = [sa.schema.CreateTable(table, if_not_exists=True) for table in (revisions, store_info)]
        statements.append(sa.schema.CreateIndex(_parent_index, if_not_exists=True))
        signoff_statements = [sa.schema.CreateTable(signoffs, if_not_exists=True),
                              sa.schema.CreateIndex(_signoff_index, if_not_exists=True)]
        for attempt in range(5):
            try:
                with self._engine.connect() as conn:
                    if self.dialect == "sqlite":
                        self._refuse_foreign_sqlite(conn)
                    found = self._format(conn)
                if found is None:
                    with self._engine.begin() as conn:
                        for statement in statements:
                            conn.execute(statement)
                        conn.execute(self._insert(store_info).values(key="format", value=STORE_FORMAT)
                                     .on_conflict_do_nothing(index_elements=["key"]))
                        found = self._format(conn)
                if found == "1":
                    found = self._migrate_1_to_2()
                if found != STORE_FORMAT:
                    raise StoreError(f"{self.where} holds worksheet store format {found!r}; this program reads "
                                     f"format {STORE_FORMAT}", "store")
                with self._engine.connect() as conn:
                    has_signoffs = sa.inspect(conn).has_table(signoffs.name)
                if not has_signoffs:  # a format-2 store from before sign-offs: add their table
                    with self._engine.begin() as conn:
                        for statement in signoff_statements:
                            conn.execute(statement)
                if self.dialect == "sqlite":
                    self._use_wal()
                return
            except (sa_exc.IntegrityError, sa_exc.ProgrammingError, sa_exc.OperationalError) as exc:
                # Two processes creating the same table, or migrating the same store, at once: try again
                # (the loser finds the work done; SQLite tells a reader that lost the race "locked" at once,
                # so that is tried once more). A lock held longer than the busy timeout is reported.
                text = str(exc).lower()
                if isinstance(exc, sa_exc.OperationalError) and "duplicate column" not in text \
                        and not ("lock" in text and attempt == 0):
                    raise StoreError(_describe_db_error(exc, self.where, self.busy_timeout), "store") from None
                if attempt == 4:
                    raise StoreError(_describe_db_error(exc, self.where, self.busy_timeout), "store") from None
                time.sleep(0.05 * (attempt + 1))
            except sa_exc.SQLAlchemyError as exc:
                raise StoreError(_describe_db_error(exc, self.where, self.busy_timeout), "store") from None

    def _migrate_1_to_2(self) -> str:
        """Format 1 -> 2, in place and in one transaction: add ``saved_by`` ('' for every existing row) and
        ``record_sha256`` (the digest of each existing row's record as stored now); keep every row."""
        with self._engine.begin() as conn:
            if self._format(conn) != "1":  # another process migrated it meanwhile
                return self._format(conn)
            present = {c["name"] for c in sa.inspect(conn).get_columns(revisions.name)}
            table = conn.dialect.identifier_preparer.quote(revisions.name)
            if "saved_by" not in present:
                conn.exec_driver_sql(f"ALTER TABLE {table} ADD COLUMN saved_by VARCHAR({MAX_SAVED_BY}) "
                                     "NOT NULL DEFAULT ''")
            if "record_sha256" not in present:
                conn.exec_driver_sql(f"ALTER TABLE {table} ADD COLUMN record_sha256 VARCHAR(64)")
            rows = conn.execute(sa.select(*_META).where(revisions.c.record_sha256.is_(None))).all()
            for row in rows:
                conn.execute(revisions.update().where(revisions.c.id == row.id, revisions.c.record_sha256.is_(None))
                             .values(record_sha256=record_digest(row)))
            conn.execute(store_info.update().where(store_info.c.key == "format", store_info.c.value == "1")
                         .values(value=STORE_FORMAT))
            conn.execute(self._insert(store_info).values(key="migrated_from_1", value=f"{_now()}, {len(rows)} rows")
                         .on_conflict_do_nothing(index_elements=["key"]))
            return self._format(conn)

    def _use_wal(self) -> None:
        """Write-ahead logging (kept in the file): readers never wait for a writer. Set once, on our store only."""
        with self._engine.connect() as conn:
            if conn.exec_driver_sql("PRAGMA journal_mode").scalar() != "wal":
                conn.exec_driver_sql("PRAGMA journal_mode = WAL")

    @staticmethod
    def _format(conn) -> str | None:
        if not (sa.inspect(conn).has_table(store_info.name) and sa.inspect(conn).has_table(revisions.name)):
            return None
        return conn.execute(sa.select(store_info.c.value).where(store_info.c.key == "format")).scalar()

    def _refuse_foreign_sqlite(self, conn) -> None:
        tables = set(conn.execute(sa.text("SELECT name FROM sqlite_master WHERE type = 'table'")).scalars())
        if tables and revisions.name not in tables:
            raise StoreError(f"{self.where} is an SQLite database of another program (it has no worksheet "
                             f"revisions); set {ENV_DB} to another file. Nothing was changed", "store")

    def close(self) -> None:
        """Release the database connections."""
        self._engine.dispose()

    def __enter__(self):
        return self

    def __exit__(self, *exc_info):
        self.close()

    # -- the interface --------------------------------------------------------------------------------------
    def save(self, worksheet: Worksheet, parent: str | None = None, saved_by: str = "") -> RevisionInfo:
        """Save a worksheet as a revision (or find it already saved); return the stored revision's record.

        ``parent`` is the id of the revision this worksheet was edited from; it is
        recorded only when the revision is new (the first save of a content wins)
        and ignored when it is the worksheet's own id (saved unchanged). ``saved_by``
        names who saves (the page's logged-in user; "" without a login), kept with the
        revision when it is new (at most :data:`MAX_SAVED_BY` characters) and never changed.
        """
        content = canonical_json(worksheet)
        if len(content.encode("utf-8")) > MAX_DOCUMENT_BYTES:
            raise StoreError(f"the worksheet is larger than {MAX_DOCUMENT_BYTES:,} bytes and cannot be saved", "save")
        digest = hashlib.sha256(content.encode("utf-8")).hexdigest()
        rev_id = digest[:ID_LENGTH]
        parent = check_id(parent, "parent") if parent else None
        if parent == rev_id:
            parent = None
        if not isinstance(saved_by, str):
            raise StoreError("saved_by must be text (a user's e-mail or name)", "save")
        row = dict(id=rev_id, parent_id=parent, title=worksheet.title[:200], saved_at=_now(),
                   schema_version=worksheet.schema_version, content_sha256=digest, content=content,
                   saved_by=" ".join(saved_by.split())[:MAX_SAVED_BY])
        row["record_sha256"] = record_digest(row)
        statement = self._insert(revisions).values(**row).on_conflict_do_nothing(index_elements=["id"])
        try:
            with self._engine.begin() as conn:
                conn.execute(statement)
                stored = conn.execute(sa.select(revisions).where(revisions.c.id == rev_id)).one_or_none()
        except sa_exc.SQLAlchemyError as exc:
            raise StoreError(_describe_db_error(exc, self.where, self.busy_timeout), "save") from None
        if stored is None or stored.content != content:
            raise StoreError(f"revision {rev_id} is stored with other content than this worksheet; the stored "
                             "one was kept. Report this: it should never happen", "save")
        return _info(stored, "save")

    def open(self, rev_id: str) -> Revision:
        """The revision with this id, its content checked against the id; :class:`RevisionNotFoundError` if none."""
        row = self._checked_row(rev_id)
        info = _info(row)
        try:
            worksheet = load_worksheet(row.content)
        except HeatBalanceError as exc:
            raise StoreError(f"saved worksheet {row.id} cannot be read ({exc}); its stored text is kept as saved: "
                             f"'python -m heatbalance open {row.id} --stored' prints it", "ws") from None
        return Revision(**vars(info), worksheet=worksheet)

    def stored_text(self, rev_id: str) -> str:
        """The revision's JSON exactly as saved, its content checked against the id, not read as a worksheet: the
        way back to a revision this version refuses to read (a rule tightened since it was saved)."""
        return self._checked_row(rev_id).content

    def _checked_row(self, rev_id: str):
        rev_id = check_id(rev_id)
        try:
            with self._engine.connect() as conn:
                row = conn.execute(sa.select(revisions).where(revisions.c.id == rev_id)).one_or_none()
        except sa_exc.SQLAlchemyError as exc:
            raise StoreError(_describe_db_error(exc, self.where, self.busy_timeout), "ws") from None
        if row is None:
            raise RevisionNotFoundError(f"no saved worksheet has the id {rev_id} in this store "
                                        "(check the link, or that it was saved on this server)", "ws")
        if hashlib.sha256(row.content.encode("utf-8")).hexdigest() != row.content_sha256 \
                or not row.content_sha256.startswith(rev_id):
            raise StoreError(f"saved worksheet {rev_id} has been altered in the database (its content no longer "
                             "matches its id); it is not opened", "ws")
        return row

    def info(self, rev_id: str) -> RevisionInfo | None:
        """The record of one revision without its worksheet, or None when it is not stored."""
        rev_id = check_id(rev_id)
        try:
            with self._engine.connect() as conn:
                row = conn.execute(sa.select(*_META).where(revisions.c.id == rev_id)).one_or_none()
        except sa_exc.SQLAlchemyError as exc:
            raise StoreError(_describe_db_error(exc, self.where, self.busy_timeout), "ws") from None
        return None if row is None else _info(row)

    def history(self, rev_id: str, limit: int = MAX_HISTORY) -> list[RevisionInfo]:
        """The revision and its ancestors, newest first, following parent links (at most ``limit``).

        A parent saved elsewhere (not in this store) ends the list.
        """
        first = self.info(rev_id)
        if first is None:
            raise RevisionNotFoundError(f"no saved worksheet has the id {check_id(rev_id)} in this store", "ws")
        chain, seen = [first], {first.id}
        while chain[-1].parent and chain[-1].parent not in seen and len(chain) < limit:
            parent = self.info(chain[-1].parent)
            if parent is None:
                break
            chain.append(parent)
            seen.add(parent.id)
        return chain

    def children(self, rev_id: str, limit: int = MAX_HISTORY) -> list[RevisionInfo]:
        """Revisions saved as edits of this one, oldest first (at most ``limit``)."""
        rev_id = check_id(rev_id)
        query = (sa.select(*_META).where(revisions.c.parent_id == rev_id)
                 .order_by(revisions.c.saved_at, revisions.c.id).limit(limit))
        try:
            with self._engine.connect() as conn:
                return [_info(row) for row in conn.execute(query)]
        except sa_exc.SQLAlchemyError as exc:
            raise StoreError(_describe_db_error(exc, self.where, self.busy_timeout), "ws") from None

    def sign(self, rev_id: str, role: str, name: str, comment: str = "") -> SignOff:
        """Record a sign-off of a saved revision (never changing the revision); return it as stored.

        Refuses an unknown revision, a role other than :data:`ROLES`, an empty name, a comment over
        :data:`MAX_COMMENT` characters, and a check or an approval of a revision nobody has signed as prepared
        (at ``role``: something is prepared before it is checked). Sign-offs recorded before that rule are kept
        and read as they were.
        """
        rev_id = check_id(rev_id)
        if self.info(rev_id) is None:
            raise RevisionNotFoundError(f"no saved worksheet has the id {rev_id} in this store: save it first, then "
                                        "sign the saved revision", "ws")
        if role not in ROLES:
            raise StoreError(f"a sign-off's role is one of {', '.join(ROLES)}, not {role!r}", "role")
        name = " ".join(str(name or "").split())[:MAX_SAVED_BY]
        if not name:
            raise StoreError("a sign-off needs the name of who signs", "name")
        if not isinstance(comment, str) or len(comment) > MAX_COMMENT:
            raise StoreError(f"a sign-off's comment is text of at most {MAX_COMMENT:,} characters", "comment")
        if role != PREPARED and not any(s.role == PREPARED for s in self.signoffs(rev_id)):  # digests checked
            article = "an" if role[0] in "aeiou" else "a"
            raise StoreError(f"{article} '{role}' sign-off needs a '{PREPARED}' sign-off of this revision first (the "
                             f"order is {', then '.join(ROLES)}): nobody has signed revision {rev_id} as {PREPARED}",
                             "role")
        row = dict(revision_id=rev_id, role=role, name=name, signed_at=_now(), comment=comment)
        row["record_sha256"] = _signoff_digest(row)
        row["id"] = row["record_sha256"][:ID_LENGTH]
        try:
            with self._engine.begin() as conn:
                conn.execute(self._insert(signoffs).values(**row).on_conflict_do_nothing(index_elements=["id"]))
        except sa_exc.SQLAlchemyError as exc:
            raise StoreError(_describe_db_error(exc, self.where, self.busy_timeout), "sign") from None
        return _signoff(row)

    def signoffs(self, rev_id: str) -> list[SignOff]:
        """The sign-offs of a revision, oldest first, each checked against its record digest."""
        rev_id = check_id(rev_id)
        query = sa.select(signoffs).where(signoffs.c.revision_id == rev_id).order_by(signoffs.c.signed_at,
                                                                                      signoffs.c.id)
        try:
            with self._engine.connect() as conn:
                rows = conn.execute(query).all()
        except sa_exc.SQLAlchemyError as exc:
            raise StoreError(_describe_db_error(exc, self.where, self.busy_timeout), "ws") from None
        out = []
        for row in rows:
            if _signoff_digest(row._mapping) != row.record_sha256 or not row.record_sha256.startswith(row.id):
                raise StoreError(f"a sign-off of revision {rev_id} has been altered in the database (its record no "
                                 "longer matches its digest); the sign-offs are not shown", "ws")
            out.append(_signoff(row._mapping))
        return out

    def count(self) -> int:
        """How many revisions the store holds."""
        try:
            with self._engine.connect() as conn:
                return conn.execute(sa.select(sa.func.count()).select_from(revisions)).scalar_one()
        except sa_exc.SQLAlchemyError as exc:
            raise StoreError(_describe_db_error(exc, self.where, self.busy_timeout), "store") from None


def _signoff_digest(row) -> str:
    """SHA-256 (hex) of a sign-off's record (revision, role, name, time, comment) as sorted, compact JSON."""
    text = json.dumps({k: row[k] for k in _SIGNOFF}, sort_keys=True, separators=(",", ":"), ensure_ascii=False)
    return hashlib.sha256(text.encode("utf-8")).hexdigest()


def _signoff(row) -> SignOff:
    return SignOff(row["revision_id"], row["role"], row["name"], datetime.fromisoformat(row["signed_at"]),
                   row["comment"])


def _sqlite_pragmas(dbapi_connection, _record) -> None:
    cursor = dbapi_connection.cursor()
    try:
        cursor.execute("PRAGMA synchronous = FULL")  # a save that returned survives a power cut
    finally:
        cursor.close()


def _info(row, where: str = "ws") -> RevisionInfo:
    """The record of a stored row, once its record digest is checked: an edited row is refused, never shown."""
    if row.record_sha256 is None or row.record_sha256 != record_digest(row):
        why = ("has no record digest (written by an older program after this store was migrated, or edited)"
               if row.record_sha256 is None else "no longer matches its digest")
        raise StoreError(f"the record of saved worksheet {row.id} (title, parent, save time, saved by) has been "
                         f"altered in the database: it {why}; it is not shown", where)
    try:
        saved_at = datetime.fromisoformat(row.saved_at)
    except (TypeError, ValueError):
        raise StoreError(f"saved worksheet {row.id} has an unreadable save time; it is not shown", where) from None
    return RevisionInfo(id=row.id, parent=row.parent_id, title=row.title, saved_at=saved_at,
                        saved_by=row.saved_by or "")


def open_store(url: str | None = None) -> WorksheetStore:
    """The store named by ``url``, else by the environment (``HEATBALANCE_DATABASE_URL``, ``HEATBALANCE_DB``)."""
    return WorksheetStore(url or database_url())

