"""Identity of a worksheet and the two kinds of share link.

* ``?ws=<id>`` names a saved revision in a worksheet store (:mod:`heatbalance.store`).
  The id is the first :data:`ID_LENGTH` hex digits of the SHA-256 of the worksheet's
  canonical JSON, so the same worksheet always has the same id and a link can only
  ever open the content it was made from.
* ``?sheet=<payload>`` carries the whole worksheet in the URL, for sharing without
  the server's database: the canonical JSON, zlib-compressed, in URL-safe base64
  without padding, after a format prefix (:data:`SHEET_PREFIX`). Decoding is
  size-limited (a decompression-bomb guard) and goes through the same validating
  loader as a file.

Limits: a link payload of at most :data:`MAX_SHEET_PARAM_CHARS` characters, and
at most :data:`~heatbalance.worksheet.MAX_DOCUMENT_BYTES` bytes once decompressed.
"""
from __future__ import annotations

import base64
import binascii
import hashlib
import json
import re
import zlib
from urllib.parse import parse_qs, parse_qsl, quote, urlencode, urlsplit, urlunsplit

from .errors import InputError
from .worksheet import MAX_DOCUMENT_BYTES, Worksheet, load_worksheet

__all__ = ["LinkError", "ID_LENGTH", "SHEET_PREFIX", "MAX_SHEET_PARAM_CHARS", "canonical_json", "revision_id",
           "check_id", "encode_sheet", "decode_sheet", "revision_link", "sheet_link", "parse_link", "view_link",
           "link_units", "named_unit_set", "UNITS_PARAM"]

ID_LENGTH = 24  # hex digits of SHA-256: 96 bits, collisions out of reach and not guessable by enumeration
_ID = re.compile(rf"^[0-9a-f]{{{ID_LENGTH}}}$")
SHEET_PREFIX = "z1."  # format of the ?sheet= payload: zlib, canonical JSON, version 1 of the link format
MAX_SHEET_PARAM_CHARS = 32_000  # longer links are refused (browsers and servers cut long URLs); save instead


class LinkError(InputError):
    """A worksheet id or a share link that cannot be used: malformed, tampered with, or too large."""


def canonical_json(worksheet: Worksheet) -> str:
    """The one JSON text of a worksheet: fields that differ from their defaults, keys sorted, compact.

    Two worksheets with the same content give the same text, whatever order or
    shorthand (``"12 t/h"``) the user's file had. Leaving defaults out keeps the
    text (and so the id) of a worksheet the same when a later version of the
    model adds an optional field; ``schema_version`` is always written.

    >>> canonical_json(Worksheet(title="T"))
    '{"schema_version":1,"title":"T"}'
    """
    data = worksheet.model_dump(mode="json", exclude_defaults=True)
    data["schema_version"] = worksheet.schema_version
    try:
        text = json.dumps(data, sort_keys=True, separators=(",", ":"), ensure_ascii=False, allow_nan=False)
        text.encode("utf-8")
    except (ValueError, UnicodeEncodeError) as exc:  # NaN/inf, or a lone surrogate in a text field
        raise LinkError(f"the worksheet cannot be written as JSON ({exc.__class__.__name__}: {str(exc)[:80]})",
                        "worksheet") from None
    return text


def revision_id(worksheet: Worksheet) -> str:
    """The id of a worksheet: the first :data:`ID_LENGTH` hex digits of SHA-256 of its canonical JSON.

    >>> len(revision_id(Worksheet()))
    24
    """
    return hashlib.sha256(canonical_json(worksheet).encode("utf-8")).hexdigest()[:ID_LENGTH]


def check_id(text: object, where: str = "ws") -> str:
    """A well-formed revision id (stripped, lower case), or :class:`LinkError` saying what one looks like.

    >>> check_id(" 0123456789ABCDEF01234567 ")
    '0123456789abcdef01234567'
    """
    candidate = text.strip().lower() if isinstance(text, str) else ""
    if not _ID.match(candidate):
        shown = repr(text[:40]) if isinstance(text, str) else type(text).__name__
        raise LinkError(f"{shown} is not a worksheet id (an id is {ID_LENGTH} characters 0-9 and a-f)", where)
    return candidate


def encode_sheet(worksheet: Worksheet) -> str:
    """The ``?sheet=`` payload carrying the whole worksheet; :class:`LinkError` if it is too long for a link."""
    raw = zlib.compress(canonical_json(worksheet).encode("utf-8"), 9)
    payload = SHEET_PREFIX + base64.urlsafe_b64encode(raw).decode("ascii").rstrip("=")
    if len(payload) > MAX_SHEET_PARAM_CHARS:
        raise LinkError(f"this worksheet makes a link of {len(payload):,} characters, more than the "
                        f"{MAX_SHEET_PARAM_CHARS:,} a link may carry; save it and share the ?ws= link", "sheet")
    return payload


def decode_sheet(payload: object) -> Worksheet:
    """The worksheet carried by a ``?sheet=`` payload, validated like a file.

    Refuses (:class:`LinkError`) a payload that is too long, not of this format,
    damaged in transit or tampered with (bad base64 or a failed zlib checksum), or
    that would decompress to more than :data:`MAX_DOCUMENT_BYTES` bytes; refuses
    (:class:`~heatbalance.errors.WorksheetFormatError`) content that is not a valid worksheet.
    """
    if not isinstance(payload, str):
        raise LinkError("the sheet link is empty", "sheet")
    payload = payload.strip()
    if len(payload) > MAX_SHEET_PARAM_CHARS:
        raise LinkError(f"the sheet link is {len(payload):,} characters; the limit is {MAX_SHEET_PARAM_CHARS:,}",
                        "sheet")
    if not payload.startswith(SHEET_PREFIX):
        raise LinkError(f"the sheet link is not of a known format (it should start with '{SHEET_PREFIX}'); "
                        "it may have been cut short or edited", "sheet")
    body = payload[len(SHEET_PREFIX):]
    try:
        raw = base64.urlsafe_b64decode(body + "=" * (-len(body) % 4))
        if base64.urlsafe_b64encode(raw).decode("ascii").rstrip("=") != body:
            raise binascii.Error("characters outside URL-safe base64")
        inflater = zlib.decompressobj()
        text = inflater.decompress(raw, MAX_DOCUMENT_BYTES + 1)
        if len(text) > MAX_DOCUMENT_BYTES or inflater.unconsumed_tail:
            raise LinkError(f"the sheet link unpacks to more than {MAX_DOCUMENT_BYTES:,} bytes", "sheet")
        text += inflater.flush()
        if not inflater.eof or inflater.unused_data:
            raise zlib.error("incomplete or trailing data")
    except (binascii.Error, ValueError, zlib.error) as exc:
        if isinstance(exc, LinkError):
            raise
        raise LinkError("the sheet link is damaged or has been altered (its data does not unpack); "
                        "ask for the link again", "sheet") from None
    return load_worksheet(text, source="link")


def revision_link(rev_id: str, base_url: str = "") -> str:
    """The link that opens a saved revision: ``<base_url>?ws=<id>``."""
    return f"{base_url}?ws={check_id(rev_id)}"


def sheet_link(worksheet: Worksheet, base_url: str = "") -> str:
    """The link that carries the whole worksheet: ``<base_url>?sheet=<payload>``."""
    return f"{base_url}?sheet={quote(encode_sheet(worksheet), safe='.-_')}"


def parse_link(text: str) -> tuple[str, str]:
    """What a pasted link or id names: ``("ws", id)`` or ``("sheet", payload)``.

    Accepts a bare id, a bare ``?sheet=`` payload, or a whole URL with ``ws=`` or ``sheet=``.

    >>> parse_link("https://example.invalid/?ws=0123456789abcdef01234567")
    ('ws', '0123456789abcdef01234567')
    """
    text = (text or "").strip()
    if text.startswith(SHEET_PREFIX):
        return "sheet", text
    if "=" not in text:
        return "ws", check_id(text)
    query = parse_qs(urlsplit(text).query or text.lstrip("?"), keep_blank_values=True)
    if "ws" in query:
        return "ws", check_id(query["ws"][0])
    if "sheet" in query:
        return "sheet", query["sheet"][0]
    raise LinkError("the link has neither ws= nor sheet=; paste the whole link or the id", "link")


UNITS_PARAM = "units"  # a link's query parameter naming the view's unit set (absent: SI)


def view_link(link: str, system: str) -> str:
    """The link that opens in the unit set ``system``: ``units=US`` for the US view; none for SI (as links always
    opened). Any ``units`` the link had is replaced; the rest of it is kept as it was.

    >>> view_link("https://e.invalid/?ws=0123456789abcdef01234567", "US")
    'https://e.invalid/?ws=0123456789abcdef01234567&units=US'
    >>> view_link("https://e.invalid/?ws=0123456789abcdef01234567&units=US", "SI")
    'https://e.invalid/?ws=0123456789abcdef01234567'
    """
    if not link:
        return link
    parts = urlsplit(link)
    query = [(k, v) for k, v in parse_qsl(parts.query, keep_blank_values=True) if k != UNITS_PARAM]
    if system != "SI":
        query.append((UNITS_PARAM, system))
    return urlunsplit(parts._replace(query=urlencode(query, safe=".-_~")))


def link_units(text: str) -> str | None:
    """The unit set a link names (``units=US``), or None when it names none (or ``text`` is no link).

    >>> link_units("https://e.invalid/?ws=0123456789abcdef01234567&units=us"), link_units("sheet.json")
    ('US', None)
    """
    if "=" not in (text or ""):
        return None
    named = parse_qs(urlsplit(text).query or text.lstrip("?")).get(UNITS_PARAM)
    if not named:
        return None
    system = named_unit_set(named[0])
    if system is None:
        raise LinkError(f"the link's unit set {named[0][:40]!r} is neither SI nor US", UNITS_PARAM)
    return system


def named_unit_set(value: object) -> str | None:
    """The unit set a ``units=`` value names, in any case (``"us"`` -> ``"US"``), or None."""
    system = value.strip().upper() if isinstance(value, str) else ""
    return system if system in ("SI", "US") else None
