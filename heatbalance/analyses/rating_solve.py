"""Rating as a way of solving: an existing exchanger's UA closes the balance (SI).

An exchanger with a UA (or U and area) may name, under ``sets``, one more input of the worksheet: a
temperature (typically the other outlet of its own lines) or a flow. That input is then not taken as typed:
Brent's method moves it (x) until the duty the exchanger delivers with its UA equals the duty the balance
passes through it,

    g(x) = Q_rated(x) − Q_balance(x) = 0,

where Q_rated is the ε-NTU rating per zone with the inlets and flows of the balance at x
(:func:`.exchangers.rated_duty`; Kays & London relations via ``ht``) and Q_balance the heat its cold side
takes in that balance. The worksheet's own unknown is still solved by the balance at every trial x, so the
result returned is an ordinary solved balance (it closes, or it is refused) in which the exchanger delivers
exactly its rated duty.

A temperature is searched between the exchanger's two inlet temperatures (and on each side of the phase
changes of its line); a flow from the typed value outwards, by factors of two. A set temperature that cannot
express the answer (the rated duty ends part-way along a condensing or boiling plateau, where the outlet is a
mixture at one temperature) and a duty no value reaches are refused at ``exchangers[E].sets``.
"""
from __future__ import annotations

from dataclasses import dataclass, field

from ..balance import T_TOL, evaluate_state, solve_problem
from ..errors import HeatBalanceError, InputError, NoSolutionError
from ..messages import Measure, Phrase
from ..problem import ExchangerInputs, Problem
from ..results import Result
from ..units import heat_kind
from . import unsolved
from .exchangers import rated_duty

__all__ = ["RatingClosure", "closing_exchanger", "solve_rated", "CLOSURE_RELATIVE"]

CLOSURE_RELATIVE = 1e-6  # |Q_rated − Q_balance| at the answer, as a fraction of the duty (plus 1 mW)
_FLOW_FACTORS = 30  # a flow is searched from the typed value × 2^±30
_TEMPERATURE_POINTS = 12  # intervals of the first scan between the exchanger's inlets
_EDGE_STEPS = 40  # bisections towards the edge of the values the balance can solve


@dataclass
class RatingClosure:
    """How an exchanger's rating closed the balance: the input it set and the duties that now agree (SI)."""

    exchanger: str
    address: str  # the input the rating set
    kind: str  # temperature | mass_flow
    value: float  # K or kg/s: the value the rating gives it
    typed_value: float  # the value typed there (not used)
    rated_duty: float  # W
    balance_duty: float  # W, the cold side's heat in the closed balance
    hot_outlet_T: float  # K, as the rating reaches it
    cold_outlet_T: float
    evaluations: int  # balances solved on the way
    note: Phrase = field(default_factory=lambda: Phrase(""))


def closing_exchanger(problem: Problem) -> ExchangerInputs | None:
    """The exchanger whose rating sets an input (at most one; a second is refused at its ``sets``)."""
    closing = [e for e in problem.exchangers if e.sets]
    if len(closing) > 1:
        raise InputError(f"only one exchanger can set an input by its rating (so far: {closing[0].name}); remove "
                         "'sets' from the others", f"{closing[1].address}.sets")
    return closing[0] if closing else None


class _Trial:
    """Solves the balance at a trial value of the set input, the problem reset to its state at the start."""

    def __init__(self, problem: Problem, e: ExchangerInputs):
        self.p, self.e, self.where = problem, e, f"{e.address}.sets"
        if e.UA is None:
            raise InputError(f"{e.name} sets {e.sets} by its rating: give its UA, or its U and area",
                             f"{e.address}.UA")
        if e.sets == problem.unknown_address:
            raise InputError(f"{e.sets} is the worksheet's unknown (the balance solves it): the rating must set "
                             "another input", self.where)
        self.var = next((v for v, a in problem.var_addresses.items() if a == e.sets), None)
        self.line = next((ln for ln in problem.lines if ln.amount_address == e.sets), None)
        if self.var is None and self.line is None:
            raise InputError(f"'{e.sets}' is not a temperature or a flow of this worksheet: name one (e.g. "
                             f"{problem.lines[0].address}.outlet.temperature)", self.where)
        if (self.var is not None and self.var == problem.unknown_target) or self.line is problem.unknown_target:
            raise InputError(f"{e.sets} is the worksheet's unknown: the rating must set another input", self.where)
        self.kind = "temperature" if self.var is not None else "mass_flow"
        self.typed = problem.temperatures[self.var] if self.var is not None else self.line.amount
        self.temperatures = dict(problem.temperatures)
        self.evaluations = 0
        self.refusals: list[HeatBalanceError] = []

    def set(self, x: float) -> None:
        p = self.p
        unsolved(p, self.temperatures)
        if self.var is not None:
            p.temperatures[self.var] = x
        else:
            self.line.amount = x

    def solve(self, x: float) -> tuple[Result, tuple[float, float, float, float], float]:
        """(the balance, the rating, Q_rated − Q_balance) at x."""
        self.set(x)
        self.evaluations += 1
        result = solve_problem(self.p)
        rating = rated_duty(self.p, result, self.e)
        balance = sum(ln.total for ln in result.lines if ln.kind == "stream" and ln.name in self.e.cold)
        return result, rating, rating[0] - balance

    def g(self, x: float) -> float | None:
        """Q_rated − Q_balance at x, or None where the balance or the rating refuses (the refusal kept)."""
        try:
            return self.solve(x)[2]
        except HeatBalanceError as exc:
            self.refusals.append(exc)
            return None


def _inlets(p: Problem, e: ExchangerInputs) -> list[float]:
    out = []
    for name in (*e.hot, *e.cold):
        line = next(ln for ln in p.lines if ln.kind == "stream" and ln.name == name)
        try:
            out.append(evaluate_state(line.material, line.initial, p.temperatures, {}).T)
        except (HeatBalanceError, KeyError, TypeError):  # the inlet is the unknown: its material's range instead
            out += [line.material.t_min, line.material.t_max]
    return out


def _temperature_grid(trial: _Trial) -> list[float]:
    p, e = trial.p, trial.e
    inlets = _inlets(p, e)
    low, high = min(inlets), max(inlets)
    owner = next(ln for ln in p.lines if trial.var in (ln.initial.var, ln.final.var))
    low, high = max(low, owner.material.t_min), min(high, owner.material.t_max)
    grid = {low + (high - low) * i / _TEMPERATURE_POINTS for i in range(_TEMPERATURE_POINTS + 1)}
    for state in (owner.initial, owner.final):
        for tr in owner.material.transitions(state.P):
            if low < tr.T < high:  # both sides of a plateau: the outlet all liquid, or all vapour
                grid |= {tr.T - 1e3 * T_TOL, tr.T + 1e3 * T_TOL}
    return sorted(grid)


def _bracket(trial: _Trial) -> tuple[float, float, float, float]:
    """Two trial values (x, g) with g of opposite signs, the first found; refused when none is."""
    seen: list[tuple[float, float]] = []

    def found():
        ordered = sorted(seen)
        for (a, ga), (b, gb) in zip(ordered, ordered[1:]):
            if ga == 0 or ga * gb < 0:
                return a, ga, b, gb
        return None

    if trial.kind == "temperature":
        candidates = _temperature_grid(trial)
    else:
        start = trial.typed if trial.typed and trial.typed > 0 else 1.0
        candidates = [start * 2.0 ** (s * k) for k in range(_FLOW_FACTORS + 1) for s in ((1,) if k == 0 else (-1, 1))]
    tried = []
    for x in candidates:
        g = trial.g(x)
        tried.append((x, g))
        if g is not None:
            seen.append((x, g))
            pair = found()
            if pair is not None:
                return pair
    if not seen:  # no trial value could be solved at all: the first refusal is the reason
        raise trial.refusals[0]
    # the answer may lie close to where the balance starts refusing (e.g. a flow so small that its outlet would
    # pass the other side's inlet): bisect each edge between a solved and a refused trial value
    ordered = sorted(tried)
    for (a, ga), (b, gb) in zip(ordered, ordered[1:]):
        if (ga is None) == (gb is None):
            continue
        good, bad = (a, b) if gb is None else (b, a)
        for _ in range(_EDGE_STEPS):
            middle = (good * bad) ** 0.5 if trial.kind == "mass_flow" and good > 0 and bad > 0 else (good + bad) / 2
            g = trial.g(middle)
            if g is None:
                bad = middle
                continue
            good = middle
            seen.append((middle, g))
            pair = found()
            if pair is not None:
                return pair
    raise NoSolutionError(_unreachable(trial, seen, candidates), trial.where)


def _measure(kind: str, value: float, digits: int = 1) -> Measure:
    return Measure(value, kind, digits) if kind == "temperature" else Measure(value, kind)


def _unreachable(trial: _Trial, seen: list[tuple[float, float]], candidates: list[float]) -> Phrase:
    more = all(g > 0 for _, g in seen)
    solved = [x for x, _ in seen]
    refused = "" if not trial.refusals else \
        "; the balance itself refuses it outside {a} to {b} (at {where}: {reason})"
    return Phrase(
        "no value of {address} from {lo} to {hi} makes the duty {exchanger} delivers with its UA equal to the duty "
        "the balance passes through it: the unit always delivers {more} (by {gap} at best)" + refused + ". Its UA "
        "cannot close this balance by this input: set another input, or check the UA and the other states",
        {"address": trial.e.sets, "exchanger": trial.e.name, "lo": _measure(trial.kind, min(candidates)),
         "hi": _measure(trial.kind, max(candidates)), "more": "more" if more else "less",
         "gap": Measure(min(abs(g) for _, g in seen), heat_kind(trial.p.basis)),
         "a": _measure(trial.kind, min(solved)), "b": _measure(trial.kind, max(solved)),
         "where": trial.refusals[0].where if trial.refusals else "",
         "reason": trial.refusals[0].phrase.text if trial.refusals else ""})


def solve_rated(problem: Problem) -> Result:
    """Solve a problem whose exchanger sets an input by its rating (see the module's notes).

    Returns the solved balance at the set value, with ``result.rating_closure`` (a :class:`RatingClosure`).
    Raises :class:`~heatbalance.errors.HeatBalanceError` at ``exchangers[E].sets`` (or the field at fault)
    when no value closes it.
    """
    from scipy.optimize import brentq

    e = closing_exchanger(problem)
    trial = _Trial(problem, e)
    a, ga, b, gb = _bracket(trial)
    if ga == 0:
        x = a
    else:
        try:
            x = _root(trial, a, ga, b, gb, brentq)
        except (ValueError, RuntimeError):
            raise NoSolutionError(f"the rating of {e.name} could not be closed between {a:.6g} and {b:.6g} (SI): "
                                  "check its UA and the states of its lines", trial.where) from None
    result, rating, gap = trial.solve(x)
    q, _, hot_out, cold_out = rating
    if abs(gap) > CLOSURE_RELATIVE * abs(q) + 1e-3:
        raise NoSolutionError(_on_plateau(trial, x, q, q - gap), trial.where)
    closure = RatingClosure(e.name, e.sets, trial.kind, float(x), float(trial.typed), q, q - gap, hot_out, cold_out,
                            trial.evaluations)
    closure.note = Phrase("{address} is set by the rating of {exchanger} (its UA, ε-NTU per zone) to {value}, not "
                          "as typed ({typed}): the exchanger then delivers {q}, the duty of the balance",
                          {"address": e.sets, "exchanger": e.name, "value": _measure(trial.kind, x, 2),
                           "typed": _measure(trial.kind, trial.typed, 2), "q": Measure(q, "power")}, trial.where)
    result.rating_closure = closure
    result.assumptions = list(result.assumptions) + [f"{e.sets}: set by the rating of exchanger {e.name} "
                                                     "(its UA closes the balance), not as typed."]
    result.warnings = list(result.warnings) + [closure.note]  # beside the answer: the grid shows the typed value
    return result


def _root(trial: _Trial, a: float, ga: float, b: float, gb: float, brentq) -> float:
    """Brent's method inside the bracket; a trial the balance refuses inside it stops with that refusal."""
    def g(x: float) -> float:
        if x == a:
            return ga
        if x == b:
            return gb
        return trial.solve(x)[2]

    scale = max(abs(a), abs(b), 1e-12)
    return brentq(g, a, b, xtol=1e-12 * scale, rtol=1e-14, maxiter=200)


def _on_plateau(trial: _Trial, x: float, q: float, balance: float) -> Phrase:
    return Phrase("the duty {exchanger} delivers ({q}) is not reached by any single value of {address}: the balance "
                  "jumps at {value} (from {balance}), where a line changes phase. The outlet there is a mixture at one "
                  "temperature (part condensed or boiled): {instead}",
                  {"exchanger": trial.e.name, "q": Measure(q, "power"), "address": trial.e.sets,
                   "value": _measure(trial.kind, x), "balance": Measure(balance, "power"),
                   "instead": "set a flow instead, or give that line's outlet a phase fraction"
                   if trial.kind == "temperature" else "set another input, or check the UA"})
