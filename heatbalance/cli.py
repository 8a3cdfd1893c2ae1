"""Command line: ``python -m heatbalance solve FILE``, ``materials``, and the worksheet store:
``save FILE``, ``open ID`` (or a share link), ``history ID``."""
from __future__ import annotations

import argparse
import json
import sys
from pathlib import Path

from .analyses import solve_and_analyse
from .errors import HeatBalanceError
from .materials import catalogue
from .present.report import format_result, result_json
from .present.text import error_text
from .worksheet import dump_worksheet, load_worksheet

__all__ = ["main"]


def _print_result(result, args) -> None:
    if args.json:
        print(json.dumps(result_json(result, args.units), indent=2, ensure_ascii=False))
    else:
        print(format_result(result, args.units))


def _solve(args) -> int:
    worksheet = load_worksheet(Path(args.worksheet).read_bytes())
    _print_result(solve_and_analyse(worksheet), args)
    return 0


def _materials(args) -> int:
    for info in catalogue():
        print(f"{info.name:40s} {info.group:32s} {info.data}")
    return 0


def _open_store():
    from .store import open_store  # SQLAlchemy is loaded only by the store commands

    return open_store()


def _save(args) -> int:
    worksheet = load_worksheet(Path(args.worksheet).read_bytes())
    with _open_store() as store:
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
    worksheet = _opened(args.id)
    if args.solve:
        _print_result(solve_and_analyse(worksheet), args)
    else:
        print(dump_worksheet(worksheet))
    return 0


def _history(args) -> int:
    with _open_store() as store:
        for rev in store.history(args.id):
            print(f"{rev.id}  {rev.saved_at:%Y-%m-%d %H:%M:%S} UTC  {rev.title}")
    return 0


def _parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(prog="python -m heatbalance",
                                     description="Solve process heat-balance worksheets.")
    commands = parser.add_subparsers(dest="command", required=True)
    run = commands.add_parser("solve", help="solve a worksheet JSON file for its unknown")
    run.add_argument("worksheet", help="path to a worksheet .json file")
    run.add_argument("--json", action="store_true", help="print the full result as JSON")
    run.add_argument("--units", choices=["SI", "US"], default="SI", help="display units (default SI)")
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
    show.add_argument("--json", action="store_true", help="with --solve: print the full result as JSON")
    show.add_argument("--units", choices=["SI", "US"], default="SI", help="display units (default SI)")
    show.set_defaults(handler=_open)
    history = commands.add_parser("history", help="list a revision and its ancestors, newest first" + store_help)
    history.add_argument("id", help="a revision id")
    history.set_defaults(handler=_history)
    return parser


def main(argv: list[str] | None = None) -> int:
    """Run the command line; return the exit status (0 ok, 1 refused input, 2 usage)."""
    args = _parser().parse_args(argv)
    try:
        return args.handler(args)
    except HeatBalanceError as exc:
        where = f"{exc.where}: " if exc.where else ""
        print(f"error: {where}{error_text(exc, getattr(args, 'units', 'SI'))}", file=sys.stderr)
        return 1
    except OSError as exc:
        print(f"error: cannot read {getattr(args, 'worksheet', '')}: {exc.strerror or exc}", file=sys.stderr)
        return 1
