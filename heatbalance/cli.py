"""Command line: ``python -m heatbalance solve FILE`` and ``python -m heatbalance materials``."""
from __future__ import annotations

import argparse
import json
import sys
from pathlib import Path

from .balance import solve
from .errors import HeatBalanceError
from .materials import catalogue
from .results import SIGN_CONVENTION, contribution_rows, format_heat
from .worksheet import load_worksheet

__all__ = ["main"]


def _table(rows: list[dict], columns: list[str]) -> str:
    def cell(value) -> str:
        if value is None:
            return ""
        return f"{value:,.2f}" if isinstance(value, float) else str(value)

    cells = [[cell(r.get(c)) for c in columns] for r in rows]
    widths = [max(len(c), *(len(row[i]) for row in cells)) for i, c in enumerate(columns)]
    lines = ["  ".join(c.ljust(w) for c, w in zip(columns, widths)), "  ".join("-" * w for w in widths)]
    lines += ["  ".join(v.rjust(w) if i >= 4 else v.ljust(w) for i, (v, w) in enumerate(zip(row, widths)))
              for row in cells]
    return "\n".join(lines)


def format_result(result, system: str) -> str:
    """A readable report of a solved worksheet."""
    rows = contribution_rows(result, system)
    columns = ["item", "type", "from", "to", *[k for k in rows[0] if "[" in k]]
    out = [result.title, "=" * len(result.title), f"ANSWER  {result.answer.label} = {result.answer.text}", "",
           _table(rows, columns), "",
           f"closure residual: {format_heat(result.residual, result.basis, system)}",
           f"sign convention: {SIGN_CONVENTION}", "", "assumptions:"]
    out += [f"  - {a}" for a in result.assumptions]
    out += ["property data:"] + [f"  - {name}: {src}" for name, src in result.sources.items()]
    out += ["warnings:"] + ([f"  ! {w}" for w in result.warnings] or ["  (none)"])
    out.append("versions: " + ", ".join(f"{k} {v}" for k, v in result.versions.items()))
    return "\n".join(out)


def _solve(args) -> int:
    worksheet = load_worksheet(Path(args.worksheet).read_bytes())
    result = solve(worksheet, args.units)
    if args.json:
        print(json.dumps(result.to_dict(), indent=2, ensure_ascii=False))
    else:
        print(format_result(result, args.units))
    return 0


def _materials(args) -> int:
    for info in catalogue():
        print(f"{info.name:40s} {info.group:32s} {info.data}")
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
    return parser


def main(argv: list[str] | None = None) -> int:
    """Run the command line; return the exit status (0 ok, 1 refused input, 2 usage)."""
    args = _parser().parse_args(argv)
    try:
        return args.handler(args)
    except HeatBalanceError as exc:
        print(f"error: {exc}", file=sys.stderr)
        return 1
    except OSError as exc:
        print(f"error: cannot read {args.worksheet}: {exc.strerror or exc}", file=sys.stderr)
        return 1
