"""Unit conversions worked out by pint, kept between runs in the user's cache folder.

A command-line run converts a handful of units, but loading pint and building its registry takes about
half a second, the largest part of the start-up. A conversion met in an earlier run is read from a small
JSON file instead, and pint is not loaded at all. The file's name carries a digest of the module that
defines the conversions (``units.py``) and of the installed pint, so a change to either starts a new file;
a file that does not read is ignored (and replaced at exit). ``HEATBALANCE_CACHE_DIR`` moves the folder.
"""
from __future__ import annotations

import atexit
import hashlib
import importlib.util
import json
import os
import tempfile
from pathlib import Path

ENV_CACHE_DIR = "HEATBALANCE_CACHE_DIR"
_SEPARATOR = "\x1f"


def cache_folder() -> Path:
    """Where the kept conversions live: ``$HEATBALANCE_CACHE_DIR``, else the XDG cache folder."""
    chosen = os.environ.get(ENV_CACHE_DIR, "").strip()
    if chosen:
        return Path(chosen)
    return Path(os.environ.get("XDG_CACHE_HOME") or Path.home() / ".cache") / "heatbalance"


def _digest(definitions: Path) -> str:
    """A digest of the module defining the conversions and of the installed pint (its files' identity)."""
    digest = hashlib.sha256(definitions.read_bytes())
    spec = importlib.util.find_spec("pint")
    if spec is not None and spec.origin:
        status = os.stat(spec.origin)
        digest.update(f"{spec.origin}:{status.st_size}:{status.st_mtime_ns}".encode())
    return digest.hexdigest()[:16]


class KeptConversions:
    """``affine[unit, kind] = (scale, offset)`` and ``measures[unit, kind] = bool``, as pint answered them."""

    def __init__(self, path: Path):
        self.path = path
        self.affine: dict[str, list[float]] = {}
        self.measures: dict[str, bool] = {}
        self._changed = False
        try:
            data = json.loads(path.read_text(encoding="utf-8"))
            self.affine = {k: [float(a), float(b)] for k, (a, b) in data["affine"].items()}
            self.measures = {k: bool(v) for k, v in data["measures"].items()}
        except (OSError, ValueError, KeyError, TypeError, AttributeError):
            self.affine, self.measures = {}, {}  # no file yet, or one that does not read: start afresh

    @staticmethod
    def key(unit: str, kind: str) -> str:
        return f"{unit}{_SEPARATOR}{kind}"

    def get_affine(self, unit: str, kind: str) -> tuple[float, float] | None:
        kept = self.affine.get(self.key(unit, kind))
        return None if kept is None else (kept[0], kept[1])

    def keep_affine(self, unit: str, kind: str, scale: float, offset: float) -> None:
        self.affine[self.key(unit, kind)] = [scale, offset]
        self._changed = True

    def keep_measures(self, unit: str, kind: str, measures: bool) -> None:
        self.measures[self.key(unit, kind)] = measures
        self._changed = True

    def save(self) -> None:
        """Write the file if this run learnt something (atomically; a folder that cannot be written is skipped)."""
        if not self._changed:
            return
        try:
            self.path.parent.mkdir(parents=True, exist_ok=True)
            handle, temporary = tempfile.mkstemp(dir=self.path.parent, prefix=".units-", suffix=".tmp")
            with os.fdopen(handle, "w", encoding="utf-8") as out:
                json.dump({"affine": self.affine, "measures": self.measures}, out)
            os.replace(temporary, self.path)
            self._changed = False
        except OSError:
            pass


_KEPT: KeptConversions | None = None


def kept(definitions: Path) -> KeptConversions:
    """The conversions kept for ``definitions`` (read once a process; written back at exit)."""
    global _KEPT
    if _KEPT is None:
        _KEPT = KeptConversions(cache_folder() / f"units-{_digest(definitions)}.json")
        atexit.register(_KEPT.save)
    return _KEPT
