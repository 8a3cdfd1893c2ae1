"""A throwaway PostgreSQL server on loopback for the store's tests and benchmarks.

Uses Debian's ``postgresql`` package (``/usr/lib/postgresql/<version>/bin``): ``initdb``
into a fresh temporary folder, ``pg_ctl start`` on a free 127.0.0.1 port with the unix
socket in that folder, ``pg_ctl stop`` and removal afterwards. ``initdb`` refuses to run
as root, so as root the server runs as the ``postgres`` user (``runuser``), owning the folder.

The fixture skips with the reason when no server can be started, except in CI
(env ``CI`` set), where that is a failure.
"""
from __future__ import annotations

import contextlib
import glob
import os
import pwd
import shutil
import socket
import subprocess
import tempfile
from pathlib import Path

import pytest

__all__ = ["throwaway_postgres", "postgres_url", "PostgresUnavailable", "in_ci"]


class PostgresUnavailable(RuntimeError):
    """No PostgreSQL server could be started here; the message says why."""


def in_ci() -> bool:
    return os.environ.get("CI", "").strip().lower() not in ("", "0", "false", "no")


def _bin_dir() -> Path:
    found = sorted(glob.glob("/usr/lib/postgresql/*/bin/initdb"),
                   key=lambda p: int(Path(p).parent.parent.name) if Path(p).parent.parent.name.isdigit() else 0)
    if found:
        return Path(found[-1]).parent
    initdb = shutil.which("initdb")
    if initdb:
        return Path(initdb).parent
    raise PostgresUnavailable("PostgreSQL is not installed (no initdb; `apt-get install -y postgresql`)")


def _free_port() -> int:
    with socket.socket(socket.AF_INET, socket.SOCK_STREAM) as s:
        s.bind(("127.0.0.1", 0))
        return s.getsockname()[1]


@contextlib.contextmanager
def throwaway_postgres(fsync: bool = False):
    """Start a PostgreSQL server in a temporary folder; yield its SQLAlchemy URL; stop and remove it."""
    bindir = _bin_dir()
    root = Path(tempfile.mkdtemp(prefix="heatbalance-pg-"))
    prefix: list[str] = []
    if os.geteuid() == 0:
        try:
            user = pwd.getpwnam("postgres")
        except KeyError:
            shutil.rmtree(root, ignore_errors=True)
            raise PostgresUnavailable("running as root and there is no 'postgres' user to run the server") from None
        os.chown(root, user.pw_uid, user.pw_gid)
        runuser = shutil.which("runuser")
        prefix = [runuser, "-u", "postgres", "--"] if runuser else ["su", "postgres", "-s", "/bin/sh", "-c"]
    os.chmod(root, 0o700)
    data, log = root / "data", root / "server.log"

    def run(*args: str, timeout: float = 120) -> subprocess.CompletedProcess:
        command = [str(a) for a in args]
        if prefix and prefix[0] == "su":
            command = [*prefix, " ".join(f"'{c}'" for c in command)]
        else:
            command = [*prefix, *command]
        return subprocess.run(command, capture_output=True, text=True, timeout=timeout, cwd=root)

    port = _free_port()
    started = False
    try:
        try:
            done = run(bindir / "initdb", "-D", data, "-U", "postgres", "--auth=trust", "-E", "UTF8",
                       "--locale=C", "--no-sync")
            if done.returncode:
                raise PostgresUnavailable(f"initdb failed: {(done.stderr or done.stdout).strip()[-300:]}")
            options = (f"-p {port} -k {root} -c listen_addresses=127.0.0.1 -c max_connections=50 "
                       f"-c fsync={'on' if fsync else 'off'} -c full_page_writes={'on' if fsync else 'off'}")
            done = run(bindir / "pg_ctl", "-D", data, "-l", log, "-o", options, "-w", "-t", "60", "start")
            if done.returncode:
                tail = log.read_text(errors="replace")[-300:] if log.exists() else done.stderr
                raise PostgresUnavailable(f"pg_ctl start failed: {tail.strip()}")
            started = True
        except (OSError, subprocess.SubprocessError) as exc:
            raise PostgresUnavailable(f"cannot start PostgreSQL: {exc}") from None
        yield f"postgresql+psycopg://postgres@127.0.0.1:{port}/postgres"
    finally:
        if started:
            run(bindir / "pg_ctl", "-D", data, "-m", "fast", "-w", "stop")
        shutil.rmtree(root, ignore_errors=True)


@pytest.fixture(scope="session")
def postgres_url():
    """The URL of a throwaway PostgreSQL server for this test session (skip, or fail in CI, if none)."""
    try:
        with throwaway_postgres() as url:
            yield url
    except PostgresUnavailable as exc:
        if in_ci():
            pytest.fail(f"PostgreSQL is required in CI: {exc}")
        pytest.skip(f"no PostgreSQL server could be started here: {exc}")
