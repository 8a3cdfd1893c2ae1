"""Explicit migrations of older worksheet documents to the current ``schema_version``.

A worksheet document names its format in ``schema_version``. The loader runs
:func:`migrate` on the decoded JSON *before* validation, so an old file opens
as the current model, and a file of a newer or unknown format is refused with
a clear message instead of being half-read.

Versions
--------
0
    The first format. The unknown was one object under the key ``unknown``
    (``{"unknown": {"kind": "amount", "line": "Steam"}}``), and a duty's value
    was under ``heat`` instead of ``value``.
1
    The current format (:data:`heatbalance.worksheet.SCHEMA_VERSION`): a list
    ``unknowns`` (exactly one entry when solving), a duty's ``value``.

A document without ``schema_version`` is read as the current version (every
field has a default), so hand-written files stay short.

Each migration is a pure function from a version-*n* dict to a version-*n+1*
dict: it never changes its input and refuses what it cannot carry over.
"""
from __future__ import annotations

import copy
from typing import Callable

from .errors import WorksheetFormatError

__all__ = ["CURRENT_VERSION", "MIGRATIONS", "migrate", "migrate_0_to_1"]

CURRENT_VERSION = 1

#: Keys a worksheet of version 0 or 1 may have (with the model's fields): a document with none is not a worksheet.
_WORKSHEET_KEYS = {"schema_version", "title", "notes", "basis", "materials", "common_temperatures",
                   "streams", "vessels", "duties", "losses", "reactions", "unknowns", "unknown", "cases", "tolerances", "tags",
                   "exchangers", "utilities", "operating_hours", "currency"}
#: Keys of a solved result (``solve --json``): a common mix-up with a worksheet file.
_RESULT_KEYS = {"answer", "lines", "terms", "residual"}


def migrate_0_to_1(doc: dict) -> dict:
    """Version 0 -> 1: ``unknown`` (one object) becomes ``unknowns`` (a list); a duty's ``heat`` becomes ``value``.

    >>> migrate_0_to_1({"schema_version": 0, "unknown": {"kind": "duty", "term": "Heater"},
    ...                 "duties": [{"name": "Heater"}]})
    {'schema_version': 1, 'duties': [{'name': 'Heater'}], 'unknowns': [{'kind': 'duty', 'term': 'Heater'}]}
    """
    out = copy.deepcopy(doc)
    out["schema_version"] = 1
    if "unknowns" in out:
        raise WorksheetFormatError("a version 0 worksheet has 'unknown', not 'unknowns'", "unknown")
    unknown = out.pop("unknown", None)
    out["unknowns"] = [] if unknown is None else [unknown]
    duties = out.get("duties")
    if isinstance(duties, list):
        for i, duty in enumerate(duties):
            if isinstance(duty, dict) and "heat" in duty:
                if "value" in duty:
                    raise WorksheetFormatError("a version 0 duty has 'heat', not also 'value'",
                                               f"worksheet.duties.{i}")
                duty["value"] = duty.pop("heat")
    return out


#: ``MIGRATIONS[n]`` turns a version-*n* document into version *n + 1*.
MIGRATIONS: dict[int, Callable[[dict], dict]] = {0: migrate_0_to_1}


def migrate(doc: dict, model_fields=()) -> dict:
    """Bring a decoded worksheet document to :data:`CURRENT_VERSION`, or raise :class:`WorksheetFormatError`.

    ``model_fields``: the current model's keys (the loader passes them), so a document with any of them
    counts as a worksheet whatever has been added since version 1; this module never imports the model.

    Returns the document itself when it is already current (nothing is copied),
    else a migrated copy. Refuses a document of a newer version, a version that
    is not an integer, and a JSON object that is not a worksheet at all.

    >>> migrate({"schema_version": 0, "unknown": {"kind": "amount", "line": "Steam"}})["unknowns"]
    [{'kind': 'amount', 'line': 'Steam'}]
    >>> migrate({"schema_version": 7})
    Traceback (most recent call last):
    ...
    heatbalance.errors.WorksheetFormatError: schema_version: schema_version 7 is newer than this program reads (0 to 1); update the program
    """
    if not isinstance(doc, dict):
        raise WorksheetFormatError("a worksheet is a JSON object")
    if doc and not (doc.keys() & (_WORKSHEET_KEYS | set(model_fields))):
        if doc.keys() >= _RESULT_KEYS:
            raise WorksheetFormatError("this is a solved result (the output of 'solve --json'), not a worksheet")
        shown = ", ".join(sorted(map(str, doc))[:5])
        raise WorksheetFormatError(f"this JSON is not a heat-balance worksheet (its keys: {shown})")
    version = doc.get("schema_version", CURRENT_VERSION)
    if isinstance(version, bool) or not isinstance(version, int):
        raise WorksheetFormatError(f"schema_version must be a whole number, not {str(version)[:40]!r}",
                                   "schema_version")
    oldest = min(MIGRATIONS, default=CURRENT_VERSION)
    if version > CURRENT_VERSION:
        raise WorksheetFormatError(f"schema_version {version} is newer than this program reads "
                                   f"({oldest} to {CURRENT_VERSION}); update the program",
                                   "schema_version")
    if version < oldest:
        raise WorksheetFormatError(f"schema_version {version} is not a known version "
                                   f"(this program reads {oldest} to {CURRENT_VERSION})",
                                   "schema_version")
    while version < CURRENT_VERSION:
        doc = MIGRATIONS[version](doc)
        version += 1
    return doc
