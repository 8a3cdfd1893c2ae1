"""The heat balance, SI only: solve a problem for its one unknown.

    Σ m·(h_final − h_initial) + Σ equipment heat = Σ duties + Σ reaction heat − Σ losses

Amount and duty unknowns enter linearly and are solved directly. A temperature
unknown is found by bracketing: the residual is evaluated on both sides of every
phase change the dependent lines can cross; a sign change across a phase change
is a plateau answer (the transition temperature and a phase fraction), a sign
change within a single-phase segment is found with Brent's method.

The solver takes no display unit set: its result is SI records
(:mod:`heatbalance.results`) whose words are :class:`~heatbalance.messages.Phrase`s;
analyses run on that result, and :mod:`heatbalance.present` writes it in a unit set.
"""
from __future__ import annotations

import math
from contextvars import ContextVar
from dataclasses import dataclass
from functools import cache

from .address import item
from .errors import HeatBalanceError, InputError, NoSolutionError
from .humid_air import HumidAir, humid_air_line
from .losses import check_service, heat_loss, surface_loss
from .materials import get_material
from .messages import Measure, Phrase
from .mixing import REFERENCE_T, released_at
from .mixing_check import mixing_groups, unstated_mixing
from .problem import ComputedLoss, EquipmentHeat, HeatTerm, Line, Problem, StateSpec, build_problem
from .properties import IncompressibleSolution, Material, Transition, property_library_versions
from .results import Answer, LineResult, Result, TermResult
from .units import ATMOSPHERE, basis_kinds, heat_kind
from .worksheet import Worksheet

__all__ = ["solve", "solve_problem", "build_problem", "Problem", "evaluate_state", "Point", "SweepMemo"]

T_TOL = 1e-6  # K: two temperatures closer than this are the same (a state on a plateau)
AMBIENT_T = 273.15  # K: a material boiling below this at its pressure is a gas at ambient (charged as one on purpose)
LATENT_NOTICE_J_PER_KG = 10.0  # a line's latent heat above this is reported as a phase change
CLOSURE_RELATIVE = 1e-6  # a result is returned only if |residual| <= this × the largest contribution ...
CLOSURE_FLOOR = 1e-3  # ... or this many W (J in batch), whichever is larger


# --------------------------------------------------------------------------- evaluation
# Within one solve a state is asked for again and again (the fixed states while solving, every state again for
# the result): each distinct (material, T, P) is evaluated once. Unset outside a solve, so callers see no cache.
_SOLVE_ENTHALPIES: ContextVar[dict | None] = ContextVar("solve_enthalpies", default=None)


def _enthalpy(material: Material, T: float, P: float) -> float:
    memo = _SOLVE_ENTHALPIES.get()
    if memo is None:
        return material.enthalpy(T, P)
    key = (id(material), T, P)
    h = memo.get(key)
    if h is None:
        h = memo[key] = material.enthalpy(T, P)
    return h


def _transition_at(material: Material, P: float, T: float) -> Transition | None:
    return next((t for t in material.transitions(P) if abs(t.T - T) < T_TOL), None)


def _plateau_transition(material: Material, state: StateSpec) -> Transition:
    found = next((t for t in material.transitions(state.P) if t.kind == state.plateau), None)
    if found is None:
        raise InputError(Phrase("{name} has no {plateau} plateau at {P} in its property data; give a temperature "
                                "instead", {"name": material.name, "plateau": state.plateau,
                                            "P": Measure(state.P, "pressure")}), state.label)
    return found


@dataclass
class Point:
    """Where a state sits: temperature, the upper-phase fraction on a plateau (or None), enthalpy (never changed
    once made: a sweep shares it between points)."""

    T: float
    fraction: float | None
    h: float


def evaluate_state(material: Material, state: StateSpec, temperatures: dict, plateau_side: dict) -> Point:
    """Enthalpy of a state; ``plateau_side[var]`` gives the upper-phase fraction for a T on a plateau."""
    if state.plateau is not None:
        tr = _plateau_transition(material, state)
        return Point(tr.T, state.fraction, tr.h_lower + state.fraction * tr.latent)
    T = temperatures[state.var]
    fraction = plateau_side.get(state.var)
    memo = _SWEEP_MEMO.get() if fraction is None else None
    if memo is not None:
        kept = memo.states.get((id(material), T, state.P))
        if kept is not None and kept[0] is material:
            return kept[1]
    material.check_range(T, state.temperature_address)
    if hasattr(material, "check_pressure"):
        material.check_pressure(state.P, state.pressure_address)
    if fraction is not None:
        tr = _transition_at(material, state.P, T)
        if tr is not None:
            return Point(T, fraction, tr.h_lower + fraction * tr.latent)
    try:
        point = Point(T, None, _enthalpy(material, T, state.P))
    except HeatBalanceError as exc:
        raise exc.located(state.temperature_address)
    if memo is not None:
        memo.keep_state(material, point, state.P)
    return point


def _equipment_enthalpy(e: EquipmentHeat, var: str, T: float, plateau_side: dict) -> float:
    """Specific enthalpy of the equipment's material at T; on its own phase change, at the plateau's fraction."""
    e.material.check_range(T, e.address)
    fraction = plateau_side.get(var)
    if fraction is not None:
        tr = _transition_at(e.material, ATMOSPHERE, T)
        if tr is not None:
            return tr.h_lower + fraction * tr.latent
    try:
        return _enthalpy(e.material, T, ATMOSPHERE)
    except HeatBalanceError as exc:
        raise exc.located(e.address)


def _equipment_heat(e: EquipmentHeat, temperatures: dict, plateau_side: dict) -> float:
    T0 = temperatures[e.initial_var]
    T1 = evaluate_state(e.final_material, e.final, temperatures, {}).T if e.final.plateau else \
        temperatures[e.final.var]
    if e.heat_capacity is not None:
        return e.heat_capacity * (T1 - T0)
    return e.mass * (_equipment_enthalpy(e, e.final.var, T1, plateau_side)
                     - _equipment_enthalpy(e, e.initial_var, T0, plateau_side))


def _line_dh(line: Line, temperatures: dict, plateau_side: dict) -> float:
    h0 = evaluate_state(line.material, line.initial, temperatures, plateau_side).h
    h1 = evaluate_state(line.material, line.final, temperatures, plateau_side).h
    return h1 - h0


def _depends(line: Line, var: str) -> bool:
    return line.initial.var == var or line.final.var == var


def _process_ends(c: ComputedLoss, temperatures: dict) -> tuple[float, float]:
    """The process side of a computed loss at its two ends: as typed, or its line's start and end temperatures."""
    if c.line is None:
        return c.process_T, c.process_T
    initial, final = (evaluate_state(c.line.material, st, temperatures, {}).T for st in (c.line.initial, c.line.final))
    return initial, final


def _process_temperature(c: ComputedLoss, temperatures: dict) -> float:
    """The process side of a computed loss: as typed; for a stream (a pipe run) the temperature whose difference
    to the air is the log mean of its ends' (exact for a loss in proportion to that difference: the run's
    exponential approach to the air, so it never ends past the air temperature); for a vessel, over time, the
    mean of its start and end."""
    initial, final = _process_ends(c, temperatures)
    if c.line is None or c.line.kind != "stream":
        return (initial + final) / 2
    air = c.surface.ambient_T
    return air + _log_mean(initial - air, final - air)


def _log_mean(a: float, b: float) -> float:
    """(a − b) / ln(a / b) for two differences of one sign; their mean when they differ in sign or barely differ.

    >>> round(_log_mean(40.0, 10.0), 4), _log_mean(10.0, 10.0), _log_mean(5.0, -5.0)
    (21.6404, 10.0, 0.0)
    """
    if a * b <= 0 or abs(a - b) <= 1e-9 * max(abs(a), abs(b)):
        return (a + b) / 2
    return (a - b) / math.log(a / b)


def _computed_heat(c: ComputedLoss, temperatures: dict) -> float:
    """A computed loss as a heat term (− out of the process); a refusal names the loss's surface."""
    try:
        return -heat_loss(c.surface, _process_temperature(c, temperatures)) * c.per_power
    except HeatBalanceError as exc:
        raise exc.located(c.address)
    except (ArithmeticError, ValueError) as exc:  # a correlation or root search beyond any plant scale
        raise _loss_failed(c, exc) from None


def _loss_failed(c: ComputedLoss, exc: Exception) -> NoSolutionError:
    return NoSolutionError(f"the loss cannot be computed for this geometry and these temperatures "
                           f"({exc.__class__.__name__}): check the sizes, the wind and the temperatures", c.address)


def _state_T(material: Material, state: StateSpec, temperatures: dict) -> float:
    return temperatures[state.var] if state.plateau is None else _plateau_transition(material, state).T


def _mixing_line(p: Problem, term: HeatTerm) -> Line | None:
    """The line whose final temperature is a stated mixing's: a charge of its vessel (or of the only vessel), or
    a line of the group of streams ending at one temperature that carries its solute; None: none is known."""
    vessel = term.vessel or (p.vessels[0] if len(p.vessels) == 1 else None)
    if vessel is not None:
        return next((ln for ln in p.lines if ln.vessel == vessel), None)
    for group_vessel, members in mixing_groups(p):
        solutes = {getattr(getattr(p.lines[i].material, "solute", None), "name", None) for i in members}
        if group_vessel is None and term.mixing.solute in solutes:
            return p.lines[members[0]]
    return None


def _mixing_heat(term: HeatTerm, line: Line, temperatures: dict) -> float:
    """A stated mixing's heat at its mixture's temperature (Kirchhoff); at 25 °C where the data do not reach."""
    term.mixing_T = T = _state_T(line.material, line.final, temperatures)
    heat = released_at(term.mixing, T)
    term.mixing_at_25 = heat is None
    return term.mixing.released if heat is None else heat


def _moving_terms(p: Problem, var: str | None) -> list[tuple]:
    """The heat terms set from the temperatures (computed losses, stated mixings): (term, heat(temperatures),
    whether it moves with ``var``)."""
    found = []
    for term in p.terms:
        if term.computed is not None:
            found.append((term, lambda temps, c=term.computed: _computed_heat(c, temps),
                          term.computed.line is not None and _depends(term.computed.line, var)))
        elif term.mixing is not None:
            line = _mixing_line(p, term)
            if line is not None:
                found.append((term, lambda temps, t=term, ln=line: _mixing_heat(t, ln, temps), line.final.var == var))
    return found


def _set_term_heats(p: Problem, temperatures: dict, var: str | None = None) -> list:
    """Set each computed loss's and stated mixing's heat from the temperatures; return those that move with
    ``var`` instead, as (term, heat(temperatures))."""
    moving = []
    for term, heat, moves in _moving_terms(p, var):
        if var is not None and moves:
            moving.append((term, heat))
        else:
            term.heat = heat(temperatures)
    return moving


# --------------------------------------------------------------------------- solving
def _solve_linear(p: Problem) -> None:
    """Solve an amount or duty unknown directly (they enter the balance linearly)."""
    temps = p.temperatures
    _set_term_heats(p, temps)
    absorbed = sum(ln.amount * _line_dh(ln, temps, {}) for ln in p.lines if ln.amount is not None)
    absorbed += sum(_equipment_heat(e, temps, {}) for e in p.equipment)
    supplied = sum(t.heat for t in p.terms if t.heat is not None)
    target = p.unknown_target
    if isinstance(target, HeatTerm):
        target.heat = absorbed - supplied
        return
    dh = _line_dh(target, temps, {})
    if abs(dh) < 1e-9:
        raise NoSolutionError(f"{target.name} does not change state (h_final = h_initial), so its "
                              "amount cannot carry any heat: give it different initial and final states",
                              p.unknown_address)
    if supplied == 0 and absorbed == 0:
        raise NoSolutionError(f"nothing else in the balance gives {target.name} heat or takes heat from it, so "
                              "its amount is undetermined: add the duty or the line that exchanges heat with it, "
                              "or solve for one of its temperatures instead", p.unknown_address)
    amount = (supplied - absorbed) / dh
    if amount < 0:
        raise NoSolutionError(_negative_amount_message(p, target, dh, supplied - absorbed), p.unknown_address)
    target.amount = amount


def _negative_amount_message(p: Problem, line: Line, dh: float, surplus: float) -> Phrase:
    return Phrase("the balance would need a negative amount: {line} {role} ({dh}), but the rest of the worksheet "
                  "already has {other} of {gap}. Check the states of this line and the duties.",
                  {"line": line.name, "role": "absorbs heat" if dh > 0 else "gives up heat",
                   "dh": Measure(abs(dh), "specific_energy", decimals=1),
                   "other": "a heat surplus" if surplus > 0 else "a heat deficit",
                   "gap": Measure(abs(surplus), heat_kind(p.basis))})


def _solve_temperature(p: Problem) -> float | None:
    """Solve a temperature unknown; return the upper-phase fraction if the answer is on a plateau."""
    var = p.unknown_target
    temps = dict(p.temperatures)
    dependent = [ln for ln in p.lines if _depends(ln, var)]
    equipment_dep = [e for e in p.equipment if var in (e.initial_var, e.final.var)]
    if not dependent and not equipment_dep:
        raise InputError("no line's state depends on this temperature", p.unknown_address)
    fixed = sum(ln.amount * _line_dh(ln, temps, {}) for ln in p.lines if not _depends(ln, var))
    fixed += sum(_equipment_heat(e, temps, {}) for e in p.equipment if e not in equipment_dep)
    movers = _set_term_heats(p, temps, var)  # a computed loss or a mixing at this temperature moves with it
    moving_terms = [t for t, _ in movers]
    fixed -= sum(t.heat for t in p.terms if t not in moving_terms)
    # the states that move with T, each with its line's amount and sign; the others' enthalpies are fixed
    moving = []
    for ln in dependent:
        for state, sign in ((ln.initial, -1.0), (ln.final, 1.0)):
            if state.var == var:
                moving.append((ln.material, state, sign * ln.amount))
            else:
                fixed += sign * ln.amount * evaluate_state(ln.material, state, temps, {}).h
    for material, state, _ in moving:  # checked once here, so the residual below need not check again
        if hasattr(material, "check_pressure"):
            material.check_pressure(state.P, state.pressure_address)
    reusable = not movers and not equipment_dep
    bracket = _kept_bracket(var, moving) if reusable else None
    plain = bracket.plain if bracket is not None else _grouped(moving)
    moving_heat = _moving_heat(var, temps, moving, plain, movers, equipment_dep)
    if bracket is None:
        bracket = _bracket(p, var, moving, plain, moving_heat, reusable)
    points = [(T, fixed + cold, fixed + hot) for T, cold, hot in bracket.points]
    for i, (T, r_cold, r_hot) in enumerate(points):
        if r_cold == 0 or r_hot == 0:
            p.temperatures[var] = T
            return (0.0 if r_cold == 0 else 1.0) if r_cold != r_hot else None
        if r_cold * r_hot < 0:
            p.temperatures[var] = T
            return -r_cold / (r_hot - r_cold)
        if i + 1 < len(points) and r_hot * points[i + 1][1] < 0:
            p.temperatures[var] = _root_in_segment(lambda T: fixed + moving_heat(T), (T, r_hot), points[i + 1][:2])
            return None
    limits = {bracket.low: next(m.name for m, lo, _ in bracket.ranges if lo == bracket.low),
              bracket.high: next(m.name for m, _, hi in bracket.ranges if hi == bracket.high)}
    raise NoSolutionError(_unreachable_message(p, points, limits), p.unknown_address)


def _grouped(moving: list) -> list:
    """The states that move with a temperature unknown as (id of the material, its enthalpy, P, summed weight): a
    state on the temperature variable is never a plateau state (a StateSpec is one or the other), so the states of
    one material at one pressure share one enthalpy call, weighted by their summed amounts."""
    grouped: dict[tuple[int, float], list] = {}
    for material, state, weight in moving:
        entry = grouped.setdefault((id(material), state.P), [id(material), material.enthalpy, state.P, 0.0])
        entry[3] += weight
    return [tuple(entry) for entry in grouped.values()]


def _moving_heat(var: str, temps: dict, moving: list, plain: list, movers: list, equipment_dep: list):
    """The heat of what moves with the temperature unknown at T (the residual less its fixed part): the states on
    it (``plain``: grouped), each weighted by its line's signed amount, the terms that move with it, the equipment
    on it. ``side``: the upper-phase fraction to take for a T on a phase change."""
    fast = not equipment_dep
    memo = _SOLVE_ENTHALPIES.get()  # the trial at the root is the result's state: kept, not evaluated again

    def moving_heat(T: float, side: float | None = None) -> float:
        temps[var] = T
        total = -sum(heat(temps) for _, heat in movers) if movers else 0.0
        if side is None and fast:  # off every plateau, inside every material's range (the bracket's bounds)
            for key, enthalpy, P, weight in plain:
                h = enthalpy(T, P)
                if memo is not None:
                    memo[key, T, P] = h
                total += weight * h
            return total
        sides = {var: side} if side is not None else {}
        total += sum(weight * evaluate_state(m, state, temps, sides).h for m, state, weight in moving)
        return total + sum(_equipment_heat(e, temps, sides) for e in equipment_dep)
    return moving_heat


@dataclass(frozen=True)
class _Bracket:
    """Where a temperature solve looks: the data's range [low, high] shared by the states that move with the
    unknown (``ranges``: each material's), and the moving heat at each bound and on both sides of each phase
    change between, as (T, heat on the cold side, heat on the hot side) in order of T; ``plain``: those states
    grouped (:func:`_grouped`)."""

    materials: tuple
    ranges: list
    low: float
    high: float
    points: list
    plain: list


class SweepMemo:
    """What the solves of a sweep's points (one built problem, set again at each point) keep from one point to the
    next: each temperature solve's bracket, while the states that move with the unknown stay the same (materials,
    pressures, amounts), and each state evaluated off a phase change (a pure function of its material, temperature
    and pressure). Only inside ``with memo:``; each entry holds its material, so an id reused by another is no hit.

    >>> memo = SweepMemo()
    >>> with memo:
    ...     _SWEEP_MEMO.get() is memo
    True
    >>> _SWEEP_MEMO.get() is None
    True
    """

    LIMIT = 65536  # entries of each kind (a sweep has at most 100,000 points; past this, points are solved afresh)

    def __init__(self):
        self.brackets: dict[tuple, _Bracket] = {}
        self.states: dict[tuple, tuple[Material, Point]] = {}
        self._tokens: list = []

    def keep_state(self, material: Material, point: Point, P: float) -> None:
        if len(self.states) < self.LIMIT:
            self.states[id(material), point.T, P] = (material, point)

    def __enter__(self) -> SweepMemo:
        self._tokens.append(_SWEEP_MEMO.set(self))
        return self

    def __exit__(self, *_) -> None:
        _SWEEP_MEMO.reset(self._tokens.pop())


_SWEEP_MEMO: ContextVar[SweepMemo | None] = ContextVar("sweep_memo", default=None)


def _bracket_key(var: str, moving: list) -> tuple:
    return var, tuple((id(m), state.P, weight) for m, state, weight in moving)


def _kept_bracket(var: str, moving: list) -> _Bracket | None:
    """The bracket kept in this sweep for these moving states (the very materials, at these pressures and
    amounts), if any."""
    memo = _SWEEP_MEMO.get()
    found = memo.brackets.get(_bracket_key(var, moving)) if memo is not None else None
    if found is not None and all(a is m for a, (m, _, _) in zip(found.materials, moving)):
        return found
    return None


def _bracket(p: Problem, var: str, moving: list, plain: list, moving_heat, reusable: bool) -> _Bracket:
    """The bracket of a temperature solve (kept for the sweep's next points when ``reusable``)."""
    # (material, lowest, highest temperature of its data at the state's pressure: a fluid's melting line rises
    # with pressure, water's IF97 data reach 2000 °C only at low pressure)
    ranges = [(m, m.lowest_temperature(state.P), m.t_max_at(state.P)) for m, state, _ in moving]
    ranges += [(e.material, e.material.t_min, e.material.t_max_at(ATMOSPHERE)) for e in p.equipment
               if e.material and var in (e.initial_var, e.final.var)]
    low, high = max(r[1] for r in ranges), min(r[2] for r in ranges)
    if low >= high:
        raise NoSolutionError("the property data of the lines sharing this temperature do not overlap "
                              f"({', '.join(sorted({r[0].name for r in ranges}))})", p.unknown_address)
    breaks = sorted({tr.T for tr in _transitions_on(p, var) if low - T_TOL <= tr.T <= high + T_TOL})
    points = [(T, moving_heat(T, 0.0), moving_heat(T, 1.0)) for T in breaks]
    for bound in (low, high):
        if not any(abs(bound - T) < T_TOL for T in breaks):
            heat = moving_heat(bound)
            points.append((bound, heat, heat))
    points.sort()
    found = _Bracket(tuple(m for m, _, _ in moving), ranges, low, high, points, plain)
    memo = _SWEEP_MEMO.get() if reusable else None
    if memo is not None and len(memo.brackets) < memo.LIMIT:
        memo.brackets[_bracket_key(var, moving)] = found
    return found


def _transitions_on(p: Problem, var: str) -> list[Transition]:
    """Every phase change a state on the temperature ``var`` can cross: the lines' and the equipment's."""
    found = [tr for ln in p.lines for st in (ln.initial, ln.final) if st.var == var
             for tr in ln.material.transitions(st.P)]
    found += [tr for e in p.equipment if e.material is not None and var in (e.initial_var, e.final.var)
              for tr in e.material.transitions(ATMOSPHERE)]
    return found


def _root_in_segment(residual, left: tuple[float, float], right: tuple[float, float]) -> float:
    """Brent's method on one single-phase segment; its ends take the residual of the segment's side."""
    ends = dict((left, right))

    def on_segment(T: float) -> float:
        if T in ends:
            return ends[T]
        value = residual(T)
        if value != value:  # NaN: Brent's compiled core would go on with it
            raise NoSolutionError(Phrase("the property data give no number at {T}: no answer can be found there",
                                         {"T": Measure(T, "temperature", 2)}))
        return value

    return _brent()(on_segment, left[0], right[0])


@cache
def _brent():
    """Brent's method of scipy as ``brent(f, a, b)``, to 1e-7 K: its compiled core where this scipy has it, else the
    public ``brentq`` (the same iterations; it also checks each value for NaN, at about 1 µs a call, and a solve makes
    5 to 10 calls. No NaN passes here either: the result is refused unless its balance closes). Either refuses a
    search that does not converge."""
    from scipy.optimize import brentq  # imported at the first temperature solve (costs a part of a second)

    core = _compiled_brent_core()
    if core is None:
        return lambda f, a, b: brentq(f, a, b, xtol=1e-7, rtol=1e-12, maxiter=100)

    def brent(f, a: float, b: float) -> float:
        root, _, _, flag = core(f, a, b, 1e-7, 1e-12, 100, (), True, False)
        if flag != 0:  # not converged (scipy's own brentq raises here): no answer from it
            raise NoSolutionError("the temperature search did not converge in 100 steps; report this worksheet")
        return root
    return brent


def _compiled_brent_core():
    """scipy's compiled ``_brentq`` (private; scipy 1.13 to 1.17 keep it with this signature), or None if this
    scipy does not have it as it was."""
    try:
        from scipy.optimize._zeros import _brentq as core

        return core if core(lambda x: x - 0.25, 0.0, 1.0, 1e-12, 1e-12, 100, (), True, False)[::3] == (0.25, 0) \
            else None
    except (ImportError, TypeError, ValueError):
        return None


def _unreachable_message(p: Problem, points, limits: dict[float, str]) -> Phrase:
    (low, _, r_low), (high, r_high, _) = points[0], points[-1]
    too_much = r_low < 0 and r_high < 0
    bound = high if too_much else low
    return Phrase("no temperature between {low} and {high} (the range of the property data) closes the balance: "
                  "even at {bound} (the {side} limit of the data for {material}) there is {much} heat by {gap}. "
                  "Check the duties, the amounts and the other states.",
                  {"low": Measure(low, "temperature"), "high": Measure(high, "temperature"),
                   "bound": Measure(bound, "temperature"), "side": "upper" if too_much else "lower",
                   "material": limits[bound], "much": "too much" if too_much else "too little",
                   "gap": Measure(min(abs(r_low), abs(r_high)), heat_kind(p.basis))})


def solve(ws: Worksheet) -> Result:
    """Solve a worksheet for its one unknown; everything in the result is SI.

    Parameters
    ----------
    ws : Worksheet
        A validated worksheet.

    Returns
    -------
    Result
        The answer (SI, with the unit typed for its field), each line's sensible and latent
        heat, each heat term, the closure residual, warnings, assumptions and data sources.

    Raises
    ------
    InputError
        A value, unit or state that cannot be used (``where`` is the field's address).
    NoSolutionError
        No physical answer: a negative amount, an unreachable temperature, a
        second-law violation between lines.

    Examples
    --------
    Heat 3.6 t/h of a liquid with cp = 2 kJ/(kg·K) from 20 to 80 °C; the duty by hand is
    1 kg/s × 2 kJ/(kg·K) × 60 K = 120 kW:

    >>> from heatbalance.worksheet import parse_worksheet
    >>> ws = parse_worksheet({
    ...     "materials": [{"name": "oil", "source": "example", "phases": [{"name": "liquid", "cp": "2 kJ/(kg*K)"}],
    ...                    "min_temperature": "0 degC", "max_temperature": "200 degC"}],
    ...     "streams": [{"name": "Oil", "material": "oil", "flow": "3.6 t/h",
    ...                  "inlet": {"temperature": "20 degC"}, "outlet": {"temperature": "80 degC"}}],
    ...     "duties": [{"name": "Heater"}], "unknowns": [{"kind": "duty", "term": "Heater"}]})
    >>> result = solve(ws)
    >>> result.answer.address, result.answer.value_si  # W
    ('duties[Heater].value', 120000.0)
    """
    return solve_problem(build_problem(ws))


def solve_problem(p: Problem) -> Result:
    """Solve a built problem (it is changed: the unknown takes its value)."""
    token = _SOLVE_ENTHALPIES.set({})
    try:
        fraction = _solve_temperature(p) if p.unknown.kind == "temperature" else _solve_linear(p)
        _set_term_heats(p, p.temperatures)  # the moving terms at the answer
        records = _computed_loss_records(p)
        result = _result(p, fraction)
    except HeatBalanceError as exc:  # a property refusal met while searching (no field of its own): the unknown's
        raise exc.located(p.unknown_address)
    finally:
        _SOLVE_ENTHALPIES.reset(token)
    result.surface_losses = records
    result.warnings += [_hot_surface(record) for record in records if record.surface_T > record.protection_limit]
    result.humid_air = [humid_air_line(ln.name, ln.address, model.material, ln.amount_si, ln.initial_T, ln.initial_P,
                                       ln.final_T, ln.final_P)
                        for model, ln in zip(p.lines, result.lines) if isinstance(model.material, HumidAir)]
    return result


def _hot_surface(record) -> Phrase:
    """A computed loss's outer surface above the personnel-protection limit: said beside the answer, not only in
    the losses' own block."""
    return Phrase("Hot surface: {name}'s outer surface is at {T_s} with the process at {T_p}, above the {limit} limit "
                  "for personnel protection; its losses block gives the insulation that keeps it below.",
                  {"name": record.name, "T_s": Measure(record.surface_T, "temperature", 1),
                   "T_p": Measure(record.process_T, "temperature", 1),
                   "limit": Measure(record.protection_limit, "temperature", 0)}, record.address)


def _computed_loss_records(p: Problem) -> list:
    """Each computed loss at the solved temperatures: its heat set, its details (surface, parts, protection)."""
    records = []
    for term in p.terms:
        c = term.computed
        if c is None:
            continue
        T_p = _process_temperature(c, p.temperatures)
        try:
            for T in _process_ends(c, p.temperatures):
                check_service(c.surface, T, f"{c.address}.insulation.material")
            record = surface_loss(c.surface, T_p, c.limit)
        except HeatBalanceError as exc:
            raise exc.located(c.address)
        except (ArithmeticError, ValueError) as exc:
            raise _loss_failed(c, exc) from None
        record.name, record.address = term.name, c.address
        term.heat = -record.loss * c.per_power
        term.detail = Phrase("computed: surface at {T_s} (process {T_p}); convection {convection}, radiation "
                             "{radiation}", {"T_s": Measure(record.surface_T, "temperature", 1),
                                             "T_p": Measure(T_p, "temperature", 1),
                                             "convection": Measure(record.convection, "power"),
                                             "radiation": Measure(record.radiation, "power")}, c.address)
        records.append(record)
    return records


# --------------------------------------------------------------------------- the result
def _latent_content(material: Material, point: Point, P: float) -> float:
    """Latent heat held by a state: every transition below it, plus its own plateau fraction (and what a
    material that freezes over a range holds at its temperature; humid air: the condensate that left it)."""
    if isinstance(material, HumidAir):  # condensate that left the vapour over a range of temperatures
        return material.latent_content(point.T, P)
    total = material.latent_held(point.T, P)
    for tr in material.transitions(P):
        if point.T > tr.T + T_TOL:
            total += tr.latent
        elif abs(point.T - tr.T) <= T_TOL and point.fraction is not None:
            total += point.fraction * tr.latent
    return total


def _phase_text(material: Material, point: Point, P: float) -> str:
    if point.fraction is None:
        return material.phase_name(point.T, P)
    tr = _transition_at(material, P, point.T)
    melting = tr is not None and tr.kind == "melting"
    lower, upper = ("solid", "liquid") if melting else ("liquid", "vapour")
    if point.fraction in (0.0, 1.0):
        return f"saturated {upper if point.fraction else lower}" if not melting else \
            f"{upper if point.fraction else lower} at its melting point"
    return f"{1 - point.fraction:.1%} solid" if melting else f"{point.fraction:.1%} vapour"


def _line_result(line: Line, temps: dict, sides: dict) -> LineResult:
    a = evaluate_state(line.material, line.initial, temps, sides)
    b = evaluate_state(line.material, line.final, temps, sides)
    latent_per_kg = (_latent_content(line.material, b, line.final.P)
                     - _latent_content(line.material, a, line.initial.P))
    total = line.amount * (b.h - a.h)
    latent = line.amount * latent_per_kg
    return LineResult(line.name, line.kind, line.material_name, line.amount, a.T, b.T,
                      _phase_text(line.material, a, line.initial.P), _phase_text(line.material, b, line.final.P),
                      line.initial.P, line.final.P, total - latent, latent, address=line.address,
                      vessel=line.vessel)


def _answer(p: Problem, fraction: float | None) -> Answer:
    kind = p.unknown.kind
    if kind == "temperature":
        si_kind, value_si = "temperature", p.temperatures[p.unknown_target]
    elif kind == "amount":
        si_kind, value_si = basis_kinds("amount", p.basis)[0], p.unknown_target.amount
    else:
        si_kind, value_si = heat_kind(p.basis), p.unknown_target.heat
    plateau = None
    if fraction is not None:
        plateau = next(tr.kind for tr in _transitions_on(p, p.unknown_target) if abs(tr.T - value_si) < T_TOL)
    return Answer(p.unknown_address, p.unknown_label, kind, si_kind, value_si,
                  p.unknown_typed_unit, fraction, plateau)


def _equipment_words(heat: float) -> Phrase:
    """The equipment row's words follow its sign (heat into the process +): it warms and takes heat up, or
    cools and gives heat to the contents."""
    if heat > 0:
        return Phrase("heat given to the contents by the vessel and its internals as they cool (+ into the process)")
    return Phrase("heat taken up by the vessel and its internals as they warm (− into the process)")


def _result(p: Problem, fraction: float | None) -> Result:
    sides = {p.unknown_target: fraction} if fraction is not None else {}
    lines = [_line_result(ln, p.temperatures, sides) for ln in p.lines]
    terms = [TermResult(t.name, t.kind, t.heat, _term_detail(t, p.basis), vessel=t.vessel) for t in p.terms]
    for e in p.equipment:
        heat = -_equipment_heat(e, p.temperatures, sides)
        terms.append(TermResult(e.name, "equipment", heat, _equipment_words(heat), vessel=e.vessel))
    residual = sum(ln.total for ln in lines) - sum(t.heat for t in terms)
    largest = _check_closure(p, lines, terms, residual)
    warnings = list(p.warnings) + _second_law(p, lines, terms) + _phase_warnings(p, lines) \
        + _range_warnings(p, lines) + unstated_mixing(p, lines) + _mixing_warnings(p) \
        + (_equipment_start_warnings(p) if p.vessels else []) + _negligible_duties(p, terms, largest) \
        + (_charge_warnings(p, lines) if p.vessels else [])
    sources = {ln.material_name: ln.material.source for ln in p.lines}
    sources.update({e.material.name: e.material.source for e in p.equipment if e.material})
    return Result(p.title, p.basis, _answer(p, fraction), lines, terms, residual, warnings, p.assumptions,
                  sources, property_library_versions(), duration=p.duration)


def _term_detail(term: HeatTerm, basis: str) -> Phrase:
    """A term's words; a mixing taken to its temperature says so, beside its 25 °C value."""
    if term.mixing is None or term.mixing_at_25:
        return term.detail
    return Phrase(term.detail.template + "; at {T_mixed}: {Q_T} (at 25 °C: {Q_25}; Kirchhoff with the solutions' "
                  "Laliberté cp)", {**term.detail.values, "T_mixed": Measure(term.mixing_T, "temperature", 1),
                                    "Q_T": Measure(term.heat, heat_kind(basis), decimals=0),
                                    "Q_25": Measure(term.mixing.released, heat_kind(basis), decimals=0)},
                  term.detail.address)


def _mixing_warnings(p: Problem) -> list[Phrase]:
    """A mixing whose heat stays at 25 °C: no line is known to be its mixture, or its mixture ends elsewhere and
    the cp data do not reach."""
    out = []
    for t in p.terms:
        if t.mixing is None or not t.mixing_at_25:
            continue
        if t.mixing_T is None:
            out.append(Phrase("Heat of mixing {name} is taken at 25 °C: no vessel's charges and no streams ending at "
                              "one common temperature carry {solute}, so the mixture's temperature is not known and "
                              "the heat's change with temperature (Kirchhoff) is left out; expect a few percent. Name "
                              "its vessel, or give its streams a common outlet temperature.",
                              {"name": t.name, "solute": t.mixing.solute}, item("mixings", t.name)))
        elif abs(t.mixing_T - REFERENCE_T) > 0.5:
            out.append(Phrase("Heat of mixing {name} is taken at 25 °C although the mixture ends at {T}: the "
                              "solutions' heat capacity data (Laliberté) do not reach {strengths} there, so its change "
                              "with temperature (Kirchhoff) is left out; expect a few percent.",
                              {"name": t.name, "T": Measure(t.mixing_T, "temperature", 1),
                               "strengths": ", ".join(f"{x:.1%}" for x in (t.mixing.x1, t.mixing.x2, t.mixing.x3))},
                              item("mixings", t.name)))
    return out


def _equipment_start_warnings(p: Problem) -> list[Phrase]:
    """Equipment taken to start at the first charge's temperature while the charges start at different ones: the
    answer then depends on the order of the charges."""
    out = []
    for e in p.equipment:
        charges = [ln for ln in p.lines if ln.vessel == e.vessel and ln.initial.plateau is None]
        if not charges or e.initial_var != charges[0].initial.var:
            continue  # its own initial temperature is given (or the first charge starts on a plateau)
        starts = [p.temperatures[ln.initial.var] for ln in charges]
        if max(starts) - min(starts) > 0.05:
            out.append(Phrase("Vessel {vessel}'s equipment is taken to start at its first charge's temperature "
                              "({charge}, {T}), but the charges start between {low} and {high}: the answer depends "
                              "on the order of the charges. Give the equipment's initial temperature.",
                              {"vessel": e.vessel, "charge": charges[0].charge,
                               "T": Measure(starts[0], "temperature", 1), "low": Measure(min(starts), "temperature", 1),
                               "high": Measure(max(starts), "temperature", 1)},
                              item("vessels", e.vessel, "equipment", "initial_temperature")))
    return out


def _charge_warnings(p: Problem, lines: list[LineResult]) -> list[Phrase]:
    """What a vessel's charges may need said: charged as vapour, boiling in a mixture, ice charged above 0 °C."""
    return _charged_as_vapour(p, lines) + _boiling_in_a_mixture(p, lines) + _ice_charged_melted(p, lines)


def _charges(p: Problem, lines: list[LineResult]):
    """(model, solved line) of each vessel charge."""
    return ((model, ln) for model, ln in zip(p.lines, lines) if model.kind == "charge")


NEAR_BOILING_K = 1.0  # a charge this close above its boiling point was most likely meant as boiling liquid


def _charged_as_vapour(p: Problem, lines: list[LineResult]) -> list[Phrase]:
    """A charge above its boiling point at its vessel's pressure, of a material that is liquid at ambient there or
    that condenses in the vessel: said, for a hot liquid typed without its own pressure is counted as vapour (a
    permanent gas, or steam charged at its own pressure, is not said)."""
    out = []
    for model, ln in _charges(p, lines):
        at_vessel_pressure = model.initial.pressure_address == item("vessels", model.vessel, "pressure")
        if model.initial.plateau is not None or not at_vessel_pressure:
            continue
        boiling = [tr for tr in model.material.transitions(ln.initial_P) if tr.kind == "boiling"]
        if not boiling or ln.initial_T <= boiling[0].T + T_TOL or (boiling[0].T < AMBIENT_T and ln.latent >= 0):
            continue
        near = ln.initial_T - boiling[0].T < NEAR_BOILING_K  # "100 °C" typed for water boiling at 99.97 °C
        out.append(Phrase("{name} is vapour as charged: {T} is above its boiling point {T_b} at {P}, so it is counted "
                          "as vapour. If it is a liquid under pressure, give the charge's own pressure (a liquid that "
                          "flashes as it enters loses its flash vapour, which is not modelled)."
                          + (" It is within 1 K of boiling: for a liquid at its boiling point, give its state as "
                             "vapour fraction 0." if near else ""),
                          {"name": ln.name, "T": Measure(ln.initial_T, "temperature", 2),
                           "T_b": Measure(boiling[0].T, "temperature", 2), "P": Measure(ln.initial_P, "pressure")},
                          model.initial.temperature_address))
    return out


def _ice_charged_melted(p: Problem, lines: list[LineResult]) -> list[Phrase]:
    """Ice charged above its melting point is water as charged: said, for the answer then holds no ice to melt."""
    out = []
    for model, ln in _charges(p, lines):
        if not model.material_name.lower().startswith("ice") or model.initial.plateau:
            continue
        melting = [tr for tr in model.material.transitions(ln.initial_P) if tr.kind == "melting"]
        if melting and ln.initial_T > melting[0].T + T_TOL:
            out.append(Phrase("{name} is ice charged at {T}, above its melting point {T_m}: it is counted as water, "
                              "with no ice to melt. Charge ice at or below {T_m}.",
                              {"name": ln.name, "T": Measure(ln.initial_T, "temperature", 1),
                               "T_m": Measure(melting[0].T, "temperature", 1)}, model.initial.temperature_address))
    return out


def _boiling_in_a_mixture(p: Problem, lines: list[LineResult]) -> list[Phrase]:
    """A charge that boils in the balance as a pure liquid while mixed with other materials in its vessel: a
    mixture's boiling (at its bubble point, with its own latent heat) is not modelled, so said loudly."""
    out = []
    for model, ln in _charges(p, lines):
        if "vapour" not in ln.final_phase or ln.latent <= 0:
            continue
        others = sorted({o.material_name for o in p.lines if o.vessel == model.vessel
                         and o.material_name != model.material_name})
        if others:
            out.append(Phrase("MIXTURE BOILING NOT MODELLED: {name} boils here as a pure liquid at {P} ({phase}), but "
                              "it is mixed with {others} in the vessel, and a mixture boils at its bubble point with "
                              "its own latent heat: this answer does not model that. Keep the final state below the "
                              "boiling, or enter the boil-up as a duty of your own.",
                              {"name": ln.name, "P": Measure(ln.final_P, "pressure"), "phase": ln.final_phase,
                               "others": ", ".join(others)}, model.address))
    return out


# a typed duty below this fraction of the balance's largest heat is likely a unit slip (mW for MW is 1e-9; a
# 2 kW trace heater beside a 30 MW boiler, 7e-5, is not warned)
NEGLIGIBLE_DUTY = 1e-6


def _negligible_duties(p: Problem, terms: list[TermResult], largest: float) -> list[Phrase]:
    """A typed duty so small beside the balance's largest heat that its unit was likely slipped (mW for MW)."""
    kind = heat_kind(p.basis)
    solved = p.unknown_target.name if p.unknown.kind == "duty" else None
    return [Phrase("Duty {name} is {Q}, under a millionth of the balance's largest heat ({largest}): check its "
                   "unit (mW or MW, W or MW).", {"name": t.name, "Q": Measure(t.heat, kind),
                                            "largest": Measure(largest, kind)}, item("duties", t.name, "value"))
            for t in terms if t.kind == "duty" and t.name != solved and 0 < abs(t.heat) < NEGLIGIBLE_DUTY * largest]


def _check_closure(p: Problem, lines: list[LineResult], terms: list[TermResult], residual: float) -> float:
    """No result leaves the solver unless every number is finite and the balance closes; returns the balance's
    largest heat (the scale of its closure)."""
    # a sum is finite only if every number in it is (a NaN or an infinity carries through; a sum beyond 1e308 is
    # beyond any physical scale too)
    total = sum(ln.sensible + ln.latent + ln.amount_si + ln.initial_T + ln.final_T for ln in lines)
    if not math.isfinite(total + sum(t.heat for t in terms) + residual):
        raise NoSolutionError("the balance gives a number that is not finite (a flow, heat or temperature beyond "
                              "any physical scale): check the magnitudes of the inputs", p.unknown_address)
    largest = max([abs(ln.total) for ln in lines] + [abs(t.heat) for t in terms], default=0.0)
    tolerance = max(CLOSURE_RELATIVE * largest, CLOSURE_FLOOR)
    if abs(residual) > tolerance:
        raise NoSolutionError(Phrase(
            "the balance does not close: {residual} is left over (tolerance {tolerance}); the answer would be "
            "wrong, so none is given. This is a limit of the model here (e.g. two phase changes at one "
            "temperature): give this temperature, or solve for another quantity, and report the worksheet.",
            {"residual": Measure(residual, heat_kind(p.basis)),
             "tolerance": Measure(tolerance, heat_kind(p.basis), 2)}), p.unknown_address)
    return largest


def _cross(source: LineResult, target: LineResult, verb: str) -> Phrase:
    return Phrase("{source} enters at {T_in}, so it cannot " + verb + " {target} to {T_out}: heat does not flow "
                  "from cold to hot", {"source": source.name, "T_in": Measure(source.initial_T, "temperature"),
                                       "target": target.name, "T_out": Measure(target.final_T, "temperature")},
                  address=target.address)


def _with(phrase: Phrase, before: str = "", after: str = "") -> Phrase:
    return Phrase(before + phrase.template + after, phrase.values, phrase.address)


def _second_law(p: Problem, lines: list[LineResult], terms: list[TermResult]) -> list[Phrase]:
    """Heat flows from hot to cold: refuse a line heated above every heat source, unless a duty can do it."""
    hot = [ln for ln in lines if ln.total < 0]
    cold = [ln for ln in lines if ln.total > 0]
    if not hot or not cold:
        return []
    warnings = []
    source = max(hot, key=lambda ln: ln.initial_T)
    target = max(cold, key=lambda ln: ln.final_T)
    if target.final_T > source.initial_T + 1e-3:
        text = _cross(source, target, "heat")
        if not any(t.heat > 0 for t in terms if t.kind in ("duty", "reaction")):
            raise NoSolutionError(_with(text, after=". Use a hotter heating medium (higher steam pressure), lower "
                                        "the target, or add a heater duty."), p.unknown_address)
        warnings.append(_with(text, "Temperature cross: ", " without the heater duty or reaction heat."))
    sink = min(cold, key=lambda ln: ln.initial_T)
    cooled = min(hot, key=lambda ln: ln.final_T)
    if cooled.final_T < sink.initial_T - 1e-3:
        text = _cross(sink, cooled, "cool")
        if not any(t.heat < 0 for t in terms if t.kind == "duty"):
            raise NoSolutionError(_with(text, after=". Use a colder cooling medium, raise the outlet temperature, "
                                        "or add a cooler duty."), p.unknown_address)
        warnings.append(_with(text, "Temperature cross: ", " without the cooler duty."))
    return warnings


def _phase_warnings(p: Problem, lines: list[LineResult]) -> list[Phrase]:
    out = []
    for model, ln in zip(p.lines, lines):
        per_kg = ln.latent / max(ln.amount_si, 1e-300)
        if abs(per_kg) > LATENT_NOTICE_J_PER_KG:
            out.append(Phrase("{name} changes phase ({a} → {b}) and {verb} latent heat, {latent}; included in the "
                              "balance.", {"name": ln.name, "a": ln.initial_phase, "b": ln.final_phase,
                                           "verb": "takes up" if per_kg > 0 else "gives up",
                                           "latent": Measure(abs(per_kg), "specific_energy", decimals=1)}, ln.address))
        for T, P, end in ((ln.initial_T, ln.initial_P, "inlet"), (ln.final_T, ln.final_P, "outlet")):
            if isinstance(model.material, IncompressibleSolution):
                water_boils = get_material("water").transitions(P)
                if water_boils and T > water_boils[0].T:
                    out.append(Phrase("{name} {end} is above the boiling point of water at {P}; boiling of the "
                                      "solution is not modelled.",
                                      {"name": ln.name, "end": end, "P": Measure(P, "pressure")}, ln.address))
    return out


def _extrapolated(name: str, T: float, material: Material, address: str) -> Phrase:
    low = material.t_min if material.valid_min is None else material.valid_min
    high = material.t_max if material.valid_max is None else material.valid_max
    return Phrase("{name}: {T} is outside the validated range of the data for {material} ({low} to {high}); "
                  "the value is extrapolated.",
                  {"name": name, "T": Measure(T, "temperature", 1), "material": material.name,
                   "low": Measure(low, "temperature", 0), "high": Measure(high, "temperature", 0)}, address)


def _range_warnings(p: Problem, lines: list[LineResult]) -> list[Phrase]:
    out = []
    for model, ln in zip(p.lines, lines):
        T = next((T for T in (ln.initial_T, ln.final_T) if model.material.extrapolated(T)), None)
        if T is not None:
            out.append(_extrapolated(ln.name, T, model.material, ln.address))
    for e in p.equipment:
        if e.material is not None:
            T1 = p.temperatures.get(e.final.var) if e.final.var else None
            T = next((T for T in (p.temperatures[e.initial_var], T1) if T is not None and e.material.extrapolated(T)),
                     None)
            if T is not None:
                out.append(_extrapolated(e.name, T, e.material, item("vessels", e.vessel, "equipment")))
    return out
