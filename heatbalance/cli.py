"""Command line: ``python -m heatbalance solve FILE``, ``materials``, what-if (``sweep``, ``cases``), and the
worksheet store: ``save FILE``, ``open ID`` (or a share link), ``history ID``."""
from __future__ import annotations

import argparse
import json
import os
import re
import stat
import sys

from .errors import HeatBalanceError, InputError

# The command line imports, per command, only what that command needs (start-up time; see DEVELOPERS.md).
MAX_DOCUMENT_BYTES = 1_000_000  # = worksheet.MAX_DOCUMENT_BYTES (checked by a test), without importing the model

__all__ = ["main"]


def solve_and_analyse(worksheet):
    from .analyses import solve_and_analyse as run

    return run(worksheet)


def error_text(error, units: str) -> str:
    from .present.text import error_text as words

    return words(error, units)


def load_worksheet(data, source: str = "file"):
    from .worksheet import load_worksheet as load

    return load(data, source)


def _print_result(result, args) -> None:
    from .present.report import format_result, result_json

    if args.json:
        print(json.dumps(result_json(result, args.units), indent=2, ensure_ascii=False))
    else:
        print(format_result(result, args.units))


class _FileError(HeatBalanceError):
    """A worksheet file that cannot be read as one (missing, not a regular file, too large)."""


def read_document(path: str) -> bytes:
    """A worksheet file's bytes: a regular file of at most :data:`MAX_DOCUMENT_BYTES`, checked before reading.

    A named pipe, a device or a folder is refused without opening it (opening a pipe would wait forever).
    """
    try:
        info = os.stat(path)
    except OSError as exc:
        raise _FileError(f"cannot read it ({exc.strerror or exc})", path) from None
    if not stat.S_ISREG(info.st_mode):
        raise _FileError("not a regular file (a folder, a pipe or a device); give a worksheet .json file", path)
    if info.st_size > MAX_DOCUMENT_BYTES:
        raise _FileError(f"the file is {info.st_size:,} bytes; the limit is {MAX_DOCUMENT_BYTES:,}", path)
    try:
        with open(path, "rb") as handle:
            data = handle.read(MAX_DOCUMENT_BYTES + 1)  # bounded, even if the file grows meanwhile
    except OSError as exc:
        raise _FileError(f"cannot read it ({exc.strerror or exc})", path) from None
    return data


def _load(path: str):
    return load_worksheet(read_document(path), source=path)


def _solve(args) -> int:
    worksheet = _load(args.worksheet)
    _print_result(solve_and_analyse(worksheet), args)
    return 0


def _materials(args) -> int:
    from .materials import catalogue

    for info in catalogue():
        print(f"{info.name:40s} {info.group:32s} {info.data}")
    return 0


def _open_store():
    from .store import open_store  # SQLAlchemy is loaded only by the store commands

    return open_store()


def _save(args) -> int:
    worksheet = _load(args.worksheet)
    with _open_store() as store:
        if args.parent and store.info(args.parent) is None:
            raise HeatBalanceError(f"no saved worksheet has the id {args.parent.strip().lower()} in this store; "
                                   "give the id of the revision this one was edited from", "--parent")
        revision = store.save(worksheet, parent=args.parent)
    print(revision.id)
    return 0


def _opened(link: str):
    """The worksheet a revision id or a share link (``?ws=`` or ``?sheet=``) names."""
    from .links import decode_sheet, parse_link

    kind, value = parse_link(link)
    if kind == "sheet":
        return decode_sheet(value)
    with _open_store() as store:
        return store.open(value).worksheet


def _open(args) -> int:
    if args.stored:
        from .links import parse_link

        kind, value = parse_link(args.id)
        if kind != "ws":
            raise InputError("--stored prints a saved revision: give its id or its ?ws= link", "id")
        with _open_store() as store:
            print(store.stored_text(value))
        return 0
    worksheet = _opened(args.id)
    if args.solve:
        _print_result(solve_and_analyse(worksheet), args)
    else:
        from .worksheet import dump_worksheet

        print(dump_worksheet(worksheet))
    return 0


def _worksheet_of(source: str):
    """A worksheet from a file, else from a revision id or a share link."""
    return _load(source) if os.path.exists(source) else _opened(source)


_VARY = re.compile(r"^(?P<address>.+?)=(?P<values>[-+0-9.eE]+(?:[:,][-+0-9.eE]+)*)\s*(?P<unit>(?:[^\d:,\s.+\-].*)?)$")


def parse_vary(text: str):
    """``ADDRESS=START:STOP:COUNT UNIT`` or ``ADDRESS=V1,V2,V3 UNIT`` (no unit for a fraction) -> a sweep axis.

    >>> parse_vary("streams[Glycol].flow=6:18:3 t/h")
    Axis(address='streams[Glycol].flow', values=(6.0, 12.0, 18.0), unit='t/h')
    """
    from .analyses.sweep import Axis, axis_values

    match = _VARY.match(text.strip())
    if not match:
        raise _UsageError(f"'{text}' is not ADDRESS=START:STOP:COUNT UNIT or ADDRESS=V1,V2,... UNIT", "--vary")
    spec, unit = match.group("values"), match.group("unit").strip()
    try:
        if ":" in spec:
            start, stop, count = spec.split(":")
            values = axis_values(float(start), float(stop), count=int(count))
        else:
            values = tuple(float(v) for v in spec.split(","))
    except ValueError:
        raise _UsageError(f"'{spec}' is not START:STOP:COUNT (a whole count) or a list of numbers", "--vary") from None
    return Axis(match.group("address").strip(), values, unit)


def _print_frame(table, args, csv_bytes, caution: str | None = None) -> None:
    """A what-if table as CSV, JSON (with a top-level ``caution`` when it bears on safety) or text (the caution
    under it, once)."""
    if args.csv:
        sys.stdout.write(csv_bytes.decode("utf-8-sig"))
    elif args.json:
        data = json.loads(table.to_json(orient="split", force_ascii=False))
        print(json.dumps({**data, "caution": caution} if caution else data, ensure_ascii=False, indent=2))
    else:
        with pd_options():
            print(table.to_string())
        if caution:
            print(f"\n{caution}")


def pd_options():
    import pandas as pd

    return pd.option_context("display.width", 200, "display.max_columns", 50, "display.max_rows", 10_000,
                             "display.float_format", _number)


def _number(value: float) -> str:
    """Six significant figures, never in scientific notation for plant-sized numbers: 1,121,299 / 745.627."""
    return f"{value:,.0f}" if 1e5 <= abs(value) < 1e15 else f"{value:,.6g}"


def _sweep(args) -> int:
    from .analyses.sweep import sweep
    from .present.whatif import caution_of, refusal_rows, sweep_csv_bytes, sweep_table

    frame = sweep(_worksheet_of(args.worksheet), [parse_vary(v) for v in args.vary], args.output or None)
    _print_frame(sweep_table(frame, args.units), args, sweep_csv_bytes(frame, args.units), caution_of(frame))
    if not (args.json or args.csv):
        for row in refusal_rows(frame, args.units):
            print(f"refused: {row}")
    return 0


def _cases(args) -> int:
    from .analyses.cases import AS_TYPED, run_cases
    from .present.whatif import case_csv_bytes, case_table, case_table_text, caution_of

    frame = run_cases(_worksheet_of(args.worksheet), args.base or AS_TYPED, args.output or None)
    table = case_table(frame, args.units)
    shown = table if args.json or args.csv else case_table_text(frame, args.units)  # people: one format a row
    _print_frame(shown, args, case_csv_bytes(frame, args.units), caution_of(frame))
    machine = args.json or args.csv  # its table stays pure data: a refused case's reason goes to standard error
    for name, exc in frame.attrs["refusals"].items():
        where = f"{exc.where}: " if exc.where else ""
        print(f"refused: {name}: {where}{error_text(exc, args.units)}", file=sys.stderr if machine else sys.stdout)
    return 0


def _history(args) -> int:
    with _open_store() as store:
        for rev in store.history(args.id):
            by = f"  saved by {rev.saved_by}" if rev.saved_by else ""
            print(f"{rev.id}  {rev.saved_at:%Y-%m-%d %H:%M:%S} UTC  {rev.title}{by}")
    return 0


def _sheet(args) -> int:
    """The calculation sheet as PDF: a saved revision (with its sign-offs) or an unsaved file ("unchecked")."""
    from .links import parse_link, revision_link
    from .present.sheet import sheet_filename, sheet_pdf_bytes

    revision, signoffs = "", []
    if os.path.exists(args.source):
        worksheet = _load(args.source)
    else:
        kind, value = parse_link(args.source)
        if kind == "sheet":
            worksheet = _opened(args.source)
        else:
            with _open_store() as store:
                worksheet, revision, signoffs = store.open(value).worksheet, value, store.signoffs(value)
    link = revision_link(revision, os.environ.get("HEATBALANCE_BASE_URL", "")) if revision else ""
    pdf = sheet_pdf_bytes(worksheet, solve_and_analyse(worksheet), args.units, revision, link, signoffs)
    path = args.output or sheet_filename(worksheet, revision)
    try:
        with open(path, "wb") as handle:
            handle.write(pdf)
    except OSError as exc:
        raise _FileError(f"cannot write it ({exc.strerror or exc})", path) from None
    print(path)
    return 0


def _sign(args) -> int:
    from .links import parse_link

    kind, value = parse_link(args.id)
    if kind != "ws":
        raise HeatBalanceError("only a saved revision can be signed: save the worksheet, then sign its id", "id")
    with _open_store() as store:
        signed = store.sign(value, args.role, args.name, args.comment or "")
    print(f"{signed.role} by {signed.name}, {signed.signed_at:%Y-%m-%d %H:%M:%S} UTC, revision {signed.revision}")
    return 0


class _UsageError(HeatBalanceError):
    """Arguments the command line cannot use."""


class _Parser(argparse.ArgumentParser):
    """Usage errors in the one-line form of every refusal, ``error: <where>: <what>`` (exit status 2)."""

    def error(self, message: str):
        where, _, what = message.partition(": ") if message.startswith("argument ") else ("", "", message)
        raise _UsageError(what or message, where.removeprefix("argument ").split("/")[0] or self.prog)


def _units_option(command) -> None:
    command.add_argument("--units", choices=["SI", "US"], help="display units (default: the link's units=, else SI)")


def _view_units(args) -> None:
    """``--units`` as given, else the unit set the link names (``units=US``), else SI."""
    from .links import link_units

    if getattr(args, "units", "SI") is None:
        args.units = "SI"  # until the link is read (a refusal of its units= is written in SI), and without one
        source = next((getattr(args, name) for name in ("id", "worksheet", "source") if hasattr(args, name)), "")
        if not os.path.exists(source):
            args.units = link_units(source) or "SI"


def _parser() -> argparse.ArgumentParser:
    parser = _Parser(prog="python -m heatbalance", description="Solve process heat-balance worksheets.")
    commands = parser.add_subparsers(dest="command", required=True, parser_class=_Parser)
    run = commands.add_parser("solve", help="solve a worksheet JSON file for its unknown")
    run.add_argument("worksheet", help="path to a worksheet .json file")
    run.add_argument("--json", action="store_true", help="print the full result as JSON")
    _units_option(run)
    run.set_defaults(handler=_solve)
    listing = commands.add_parser("materials", help="list the materials that can be used")
    listing.set_defaults(handler=_materials)
    store_help = " (store: $HEATBALANCE_DATABASE_URL, else the SQLite file $HEATBALANCE_DB, else the user data folder)"
    save = commands.add_parser("save", help="save a worksheet file as a revision and print its id" + store_help)
    save.add_argument("worksheet", help="path to a worksheet .json file")
    save.add_argument("--parent", help="id of the revision this worksheet was edited from")
    save.set_defaults(handler=_save)
    show = commands.add_parser("open", help="print a saved worksheet's JSON, or solve it" + store_help)
    show.add_argument("id", help="a revision id, or a share link with ?ws= or ?sheet=")
    show.add_argument("--solve", action="store_true", help="solve it and print the result")
    show.add_argument("--stored", action="store_true", help="print the revision's JSON exactly as saved, without "
                                                              "reading it (a revision this version cannot read)")
    show.add_argument("--json", action="store_true", help="with --solve: print the full result as JSON")
    _units_option(show)
    show.set_defaults(handler=_open)
    what_if = commands.add_parser("sweep", help="solve the worksheet over a range of one or two inputs")
    what_if.add_argument("worksheet", help="a worksheet .json file, a revision id or a share link")
    what_if.add_argument("--vary", action="append", required=True, metavar="ADDRESS=START:STOP:COUNT UNIT",
                         help="an input by its address and its values, e.g. 'streams[Glycol].flow=6:18:13 t/h' "
                              "or 'streams[Glycol].outlet.temperature=30,40,50 degC'; give it twice for a grid")
    what_if.add_argument("--output", action="append", help="an output to collect (default: the answer)")
    cases = commands.add_parser("cases", help="solve the worksheet's named cases side by side")
    cases.add_argument("worksheet", help="a worksheet .json file, a revision id or a share link")
    cases.add_argument("--base", help="the case the differences are taken against (default: as typed)")
    cases.add_argument("--output", action="append", help="an output to show (default: answer and heats)")
    for command, handler in ((what_if, _sweep), (cases, _cases)):
        formats = command.add_mutually_exclusive_group()
        formats.add_argument("--json", action="store_true", help="print the table as JSON")
        formats.add_argument("--csv", action="store_true", help="print the table as CSV")
        _units_option(command)
        command.set_defaults(handler=handler)
    sheet = commands.add_parser("sheet", help="write the calculation sheet (PDF) of a file or a saved revision"
                                + store_help)
    sheet.add_argument("source", help="a worksheet .json file, a revision id or a share link")
    sheet.add_argument("-o", "--output", help="the PDF file to write (default: named after the title and revision)")
    _units_option(sheet)
    sheet.set_defaults(handler=_sheet)
    sign = commands.add_parser("sign", help="record a sign-off of a saved revision (never changes it)" + store_help,
                               description="Record a sign-off of a saved revision (never changes it). The roles "
                                           "go in order: a 'checked' or 'approved' sign-off needs a 'prepared' "
                                           "sign-off of the revision first.")
    sign.add_argument("id", help="a revision id (or its ?ws= link)")
    sign.add_argument("--role", required=True, choices=["prepared", "checked", "approved"],
                      help="prepared, checked or approved; checked or approved needs a 'prepared' sign-off of the "
                           "revision first")
    sign.add_argument("--name", required=True, help="who signs")
    sign.add_argument("--comment", help="a comment kept with the sign-off")
    sign.set_defaults(handler=_sign)
    history = commands.add_parser("history", help="list a revision and its ancestors, newest first" + store_help)
    history.add_argument("id", help="a revision id")
    history.set_defaults(handler=_history)
    return parser


def _refuse(exc: HeatBalanceError, units: str = "SI") -> None:
    print(f"error: {exc.where or 'command'}: {error_text(exc, units)}", file=sys.stderr)


def main(argv: list[str] | None = None) -> int:
    """Run the command line; return the exit status (0 ok, 1 refused input, 2 usage).

    Every refusal is one line on standard error, ``error: <where>: <what>``; a reader that closes
    the output early (``| head``) ends the run quietly.
    """
    try:
        args = _parser().parse_args(argv)
    except _UsageError as exc:
        _refuse(exc)
        return 2
    try:
        _view_units(args)
        return args.handler(args)
    except _UsageError as exc:
        _refuse(exc)
        return 2
    except HeatBalanceError as exc:
        _refuse(exc, getattr(args, "units", "SI"))
        return 1
    except BrokenPipeError:
        devnull = os.open(os.devnull, os.O_WRONLY)  # nothing more can be written; silence the final flush
        os.dup2(devnull, sys.stdout.fileno())
        return 0
