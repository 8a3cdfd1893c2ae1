"""Analyses that run on a solved balance (SI only): thermal screening, exchanger check, utilities.

Each takes the solved :class:`~heatbalance.problem.Problem` and
:class:`~heatbalance.results.Result` and returns typed SI records; the solver never imports them.
"""
import math
from dataclasses import fields, is_dataclass

from ..address import item
from ..balance import solve_problem
from ..errors import HeatBalanceError, NoSolutionError
from ..messages import Phrase
from ..problem import build_problem
from ..results import Result
from ..worksheet import Worksheet
from .critical import near_critical_warnings
from .screening import JacketTime, Screening, screen
from .utilities import UtilityTable, return_limit_warnings, utility_tables

__all__ = ["JacketTime", "Screening", "screen", "ExchangerCheck", "check_exchangers", "UtilityTable",
           "utility_tables", "analyse", "solve_and_analyse", "solve_closed", "unsolved"]


def __getattr__(name: str):
    """The exchanger check loads ``ht`` (and scipy's linear algebra): only a sheet with exchangers pays for it."""
    if name in ("ExchangerCheck", "check_exchangers"):
        from . import exchangers

        return getattr(exchangers, name)
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")


def _finite_numbers(record) -> bool:
    """True when every number in a record (a dataclass, nested) is finite."""
    if isinstance(record, float):
        return math.isfinite(record)
    if is_dataclass(record):
        return all(_finite_numbers(getattr(record, f.name)) for f in fields(record))
    if isinstance(record, (list, tuple)):
        return all(_finite_numbers(x) for x in record)
    return True


def unsolved(problem, temperatures: dict) -> None:
    """Put a built problem back as before a solve, to solve it again: its temperatures ``temperatures`` (as built,
    a copy), its unknown amount or duty without a value (the solver writes the answer into the problem)."""
    problem.temperatures.clear()
    problem.temperatures.update(temperatures)
    if problem.unknown.kind == "amount":
        problem.unknown_target.amount = None
    elif problem.unknown.kind == "duty":
        problem.unknown_target.heat = None


def solve_closed(problem) -> Result:
    """Solve a built problem: by the balance alone, or with an exchanger's rating setting one more input
    (:mod:`.rating_solve`, loaded only for such a sheet)."""
    if any(e.sets for e in problem.exchangers):
        from .rating_solve import solve_rated

        return solve_rated(problem)
    return solve_problem(problem)


def analyse(problem, result, checks: bool = True):
    """Run every analysis on a solved balance and attach its records to the result (returned).

    Like the balance, an analysis returns only finite numbers, or refuses at the inputs it used.
    ``checks=False`` leaves out the exchanger check and the utility tables (a sweep that does not ask for them).
    """
    result.screening = screen(problem, result)
    for s in result.screening:
        if not _finite_numbers(s):
            raise NoSolutionError("the thermal screening gives a number that is not finite (e.g. a jacket so small "
                                  "that the time is beyond any scale): check the screening inputs",
                                  item("vessels", s.vessel, "screening"))
    result.warnings = list(result.warnings) + near_critical_warnings(problem, result)
    if not checks:
        result.exchangers, result.utilities = [], []
        return result
    if problem.exchangers:
        from .exchangers import check_exchangers

        result.exchangers = check_exchangers(problem, result)
        closure = getattr(result, "rating_closure", None)
        for check in result.exchangers:
            if closure is not None and check.name == closure.exchanger:
                check.closure = closure
                check.notes.insert(0, closure.note)
    else:
        result.exchangers = []
    result.utilities = utility_tables(problem, result)
    for name, warning in return_limit_warnings(problem, result):  # at its exchanger, or on the result (a stream)
        (result.warnings if name is None else next(c for c in result.exchangers if c.name == name).warnings) \
            .append(warning)
    for records, where in ((result.exchangers, lambda r: r.address), (result.utilities, lambda r: r.demand.address)):
        for record in records:
            if not _finite_numbers(record):
                raise NoSolutionError("the exchanger or utility check gives a number that is not finite: check its "
                                      "inputs", where(record))
    result.warnings += [w for c in result.exchangers for w in c.warnings]
    return result


def solve_and_analyse(ws: Worksheet) -> Result:
    """Build, solve and analyse a worksheet: what the page and the command line show (SI records).

    With tolerances, the answer's uncertainty is propagated too (``result.uncertainty``).
    """
    problem = build_problem(ws)
    result = analyse(problem, solve_closed(problem))
    if ws.tolerances:
        from .uncertainty import propagate_outputs  # only sheets with tolerances pay for it

        try:
            # the answer, and the screening's temperatures (they bear on safety), from the same solves
            plateau = ["answer.phase_fraction"] if result.answer.phase_fraction is not None else []  # T is pinned
            found = propagate_outputs(ws, ["answer"] + plateau
                                      + [f"screening[{s.vessel}].MTSR" for s in result.screening])
            result.uncertainty = found.pop("answer")
            result.output_uncertainties = found
        except HeatBalanceError as exc:  # the answer stands; that its uncertainty is missing is said loudly
            result.uncertainty_error = exc
            result.warnings = list(result.warnings) + [Phrase(
                "The answer's uncertainty cannot be given ({where}): {reason} Fix or remove that tolerance.",
                {"where": exc.where, "reason": exc.phrase.text}, address=exc.where)]
    return result
