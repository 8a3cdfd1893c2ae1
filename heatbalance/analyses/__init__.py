"""Analyses that run on a solved balance (SI only): the thermal screening today.

Each takes the solved :class:`~heatbalance.problem.Problem` and
:class:`~heatbalance.results.Result` and returns typed SI records; the solver never imports them.
"""
from ..balance import solve_problem
from ..problem import build_problem
from ..results import Result
from ..worksheet import Worksheet
from .screening import JacketTime, Screening, screen

__all__ = ["JacketTime", "Screening", "screen", "analyse", "solve_and_analyse"]


def analyse(problem, result):
    """Run every analysis on a solved balance and attach its records to the result (returned)."""
    result.screening = screen(problem, result)
    return result


def solve_and_analyse(ws: Worksheet) -> Result:
    """Build, solve and analyse a worksheet: what the page and the command line show (SI records)."""
    problem = build_problem(ws)
    return analyse(problem, solve_problem(problem, ws))
