"""What if: the worksheet's named cases, solved side by side with differences against a base case.

A case (``worksheet.cases``) is a name and a set of overrides, each an input's address and the value it
takes (see :mod:`heatbalance.address`). The sheet as typed is the case :data:`AS_TYPED`. Each case is the
sheet with its overrides set, solved and analysed like any sheet; a case that cannot be solved keeps its
refusal (the address at fault, in the case's name) and the others go on.
"""
from __future__ import annotations

import math

import pandas as pd

from ..address import item, parse, unknown_address, with_value
from ..errors import AddressError, HeatBalanceError
from ..problem import build_problem
from ..worksheet import Case, Worksheet
from . import solve_and_analyse
from .sweep import _asks_checks, _collect, answer_field, output_names

__all__ = ["AS_TYPED", "case_worksheet", "run_cases", "difference_column"]

AS_TYPED = "as typed"  # the name of the sheet without overrides, as a case


def case_worksheet(ws: Worksheet, case: Case) -> Worksheet:
    """The worksheet with a case's overrides set.

    A bad override is refused at ``cases[name]``, the message starting with the override's address: one that
    names nothing or takes no such value, the unknown (the balance solves for it), an input an exchanger's
    rating sets, and a second override of an input the case already sets.
    """
    where = item("cases", case.name)
    unknown = unknown_address(ws.unknowns[0]) if len(ws.unknowns) == 1 else None
    seen: list[str] = []
    for override in case.overrides:
        if any(_same_address(override.address, earlier) for earlier in seen):
            raise AddressError(f"override of {override.address}: this case already sets this input; keep one "
                               "override of it", where)
        seen.append(override.address)
        if unknown is not None and _same_address(override.address, unknown):
            raise AddressError(f"override of {override.address}: this is the unknown: the balance solves for it; "
                               "override another input", where)
        setter = next((e.name for e in ws.exchangers if e.sets and _same_address(e.sets, override.address)), None)
        if setter is not None:
            raise AddressError(f"override of {override.address}: exchanger {setter}'s rating sets this input", where)
        try:
            ws = with_value(ws, override.address, override.value)
        except HeatBalanceError as exc:
            raise AddressError(f"override of {override.address}: {exc.message}", where) from None
    return ws.model_copy(update={"cases": []})


def _same_address(a: str, b: str) -> bool:
    """Whether two addresses name the same field (spacing aside); text that is no address only equals itself."""
    try:
        return parse(a) == parse(b)
    except HeatBalanceError:
        return a.strip() == b.strip()


def difference_column(case: str, base: str) -> str:
    return f"{case} − {base}"


def run_cases(ws: Worksheet, base: str = AS_TYPED, outputs: list[str] | None = None) -> pd.DataFrame:
    """Every case solved side by side: one row per output (SI), one column per case, then the differences.

    Parameters
    ----------
    ws : Worksheet
        The worksheet and its ``cases``.
    base : str
        The case the differences are taken against (default: the sheet as typed).
    outputs : list[str], optional
        Names from :func:`heatbalance.analyses.sweep.output_names` (default: the answer, every line's and
        heat term's heat, and each screening's MTSR).

    Returns
    -------
    pandas.DataFrame
        Index: the outputs; columns: :data:`AS_TYPED`, each case, then ``"<case> − <base>"`` for every other
        case. ``attrs["kinds"]`` gives each output's kind, ``attrs["refusals"]`` each refused case's
        :class:`~heatbalance.errors.HeatBalanceError` (its column is NaN), ``attrs["base"]`` the base,
        ``attrs["cases"]`` the case columns, ``attrs["answer"]`` the unknown's address and typed unit.
    """
    names = [AS_TYPED] + [c.name for c in ws.cases]
    if base not in names:
        raise AddressError(f"no case called '{base}' (there are: {', '.join(names)})", "cases")
    taken = {AS_TYPED: "the worksheet as typed"}
    taken.update({difference_column(n, base): f"the difference {difference_column(n, base)}" for n in names
                  if n != base})
    clash = next((c.name for c in ws.cases if c.name in taken), None)
    if clash is not None:  # its column would stand for another
        raise AddressError(f"'{clash}' already names the table's column for {taken[clash]}; give the case "
                           "another name", item("cases", clash))
    known = output_names(build_problem(ws.model_copy(update={"cases": []})))
    if outputs is None:
        outputs = ["answer"] + [n for n in known if n.endswith("].heat") or n.endswith(".MTSR")]
    unknown = [n for n in outputs if n not in known]
    if unknown:
        raise AddressError(f"no output called '{unknown[0]}' on this sheet (there are: {', '.join(known)})", "cases")
    columns, refusals = {}, {}
    sheets = {AS_TYPED: lambda: ws.model_copy(update={"cases": []})}
    sheets.update({c.name: (lambda c=c: case_worksheet(ws, c)) for c in ws.cases})
    for name, sheet in sheets.items():
        try:
            result = solve_and_analyse(sheet())
            columns[name] = _collect(result, result.screening, outputs, _asks_checks(outputs))
        except HeatBalanceError as exc:
            refusals[name] = exc
            columns[name] = {o: math.nan for o in outputs}
    frame = pd.DataFrame(columns, index=outputs)
    for name in names:
        if name != base:
            frame[difference_column(name, base)] = frame[name] - frame[base]
    frame.attrs.update(kinds={o: known[o] for o in outputs}, refusals=refusals, base=base, cases=names,
                       basis=ws.basis.kind, answer=answer_field(ws))
    return frame
