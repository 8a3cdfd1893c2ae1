"""What if: sweeps of one or two inputs, by address, solving the worksheet's unknown at every point.

A sweep axis is an input's address and the values it takes, in a unit of that input's kind (``"t/h"``,
``"degC"``; fractions are plain numbers). The worksheet is built into an SI problem once; at each point the
axes' values are written straight into that problem (a line's amount, a temperature, a duty, a loss, a
pressure, a phase fraction, a screening input) and the problem is solved again, so nothing is re-read or
re-validated. An input the fast path does not cover (a material's data, a reaction, an equipment mass...)
is set in a copy of the worksheet and rebuilt at each point: slower, the same answer.

A point that cannot be solved records its refusal (the address at fault and the words) and the sweep goes
on. The result is a pandas DataFrame: one row per point; the axes in the units they were given, the
outputs in SI; ``frame.attrs`` holds each column's unit (axes) or kind (outputs) for the presentation.
"""
from __future__ import annotations

import itertools
import math
from dataclasses import dataclass

import pandas as pd

from ..address import FRACTION, check_fraction, get, item, kinds_of, parse, unknown_address, with_value
from ..balance import SweepMemo
from ..errors import AddressError, HeatBalanceError, InputError
from ..humid_air import HumidAir
from ..problem import Problem, basis_si, build_problem, typed_si
from ..units import check_unit, heat_kind, kind_of
from ..worksheet import Quantity, Worksheet
from . import analyse, solve_closed, unsolved

__all__ = ["Axis", "axis_values", "sweep", "output_names", "answer_field", "MAX_POINTS", "REFUSED_AT", "REASON",
           "WARNINGS"]

MAX_POINTS = 100_000  # a sweep of more points is refused
REFUSED_AT = "refused at"  # column: the address at fault at a refused point ("" when solved)
REASON = "reason"  # column: the refusal (a HeatBalanceError) at a refused point, else None
WARNINGS = "warnings"  # column: the point's warnings (Phrases: a phase change, extrapolated data...), else []


@dataclass(frozen=True)
class Axis:
    """One swept input: its address, the values it takes, and their unit (``""`` for a fraction)."""

    address: str
    values: tuple[float, ...]
    unit: str = ""

    @property
    def column(self) -> str:
        return self.address


def axis_values(start: float, stop: float, count: int | None = None, step: float | None = None) -> tuple:
    """Evenly spaced values from ``start`` to ``stop`` (both included): ``count`` of them, or every ``step``.

    >>> axis_values(20, 32, count=3), axis_values(0, 1, step=0.25)
    ((20.0, 26.0, 32.0), (0.0, 0.25, 0.5, 0.75, 1.0))
    """
    if (count is None) == (step is None):
        raise InputError("give the number of points or the step, not both", "sweep")
    if step is not None:
        if not step > 0 or not math.isfinite(step):
            raise InputError(f"the step must be a positive number, not {step:g}", "sweep")
        count = int(math.floor(abs(stop - start) / step + 1e-9)) + 1
        sign = 1.0 if stop >= start else -1.0
        return tuple(float(start + sign * i * step) for i in range(count))
    if count < 1:
        raise InputError(f"a sweep needs at least one point, not {count}", "sweep")
    if count == 1:
        return (float(start),)
    return tuple(float(start + (stop - start) * i / (count - 1)) for i in range(count))


# --------------------------------------------------------------------------- outputs
def answer_field(ws: Worksheet) -> dict:
    """The unknown's address and the unit typed there (``None``: the view's), for showing the answer column."""
    if len(ws.unknowns) != 1:
        return {"address": "", "unit": None}
    address = unknown_address(ws.unknowns[0])
    try:
        typed = get(ws, address)
    except HeatBalanceError:
        typed = None
    return {"address": address, "unit": typed.unit if isinstance(typed, Quantity) else None}


def output_names(problem: Problem) -> dict[str, str]:
    """Every output a sweep can collect on this problem -> its kind (a key of ``units.KINDS``, or ``""``)."""
    heat = heat_kind(problem.basis)
    answer_kind = {"temperature": "temperature", "duty": heat}.get(problem.unknown.kind,
                                                                    "mass_flow" if problem.basis == "continuous"
                                                                    else "mass")
    names = {"answer": answer_kind, "answer.phase_fraction": "", "residual": heat}
    for line in problem.lines:
        names[f"lines[{line.name}].heat"] = heat
        names[f"lines[{line.name}].latent"] = heat
    for term in problem.terms:
        names[f"terms[{term.name}].heat"] = heat
    for e in problem.equipment:
        names[f"terms[{e.name}].heat"] = heat
    for vessel in problem.vessels:
        if any(t.kind in ("reaction", "mixing") and (t.vessel == vessel or (t.vessel is None and
                                                                          len(problem.vessels) == 1))
               for t in problem.terms):
            for name, kind in (("MTSR", "temperature"), ("dT_ad", "temperature_difference"),
                               ("MTT", "temperature"), ("criticality_class", "")):
                names[f"screening[{vessel}].{name}"] = kind
    names.update(_check_outputs(problem))
    return names


def _check_outputs(problem: Problem) -> dict[str, str]:
    """The exchanger check's and the utility tables' outputs: each exchanger's duty, approach, UA, area (with U),
    rated duty (with UA); each site utility's flow, cost and CO2 for each duty term and each exchanger with a
    utility side (NaN at a point where that utility is not offered or cannot meet the duty)."""
    names = {}
    for e in problem.exchangers:
        for field, kind in (("duty", "power"), ("min_approach", "temperature_difference"),
                            ("UA_required", "thermal_conductance"), ("mean_dT", "temperature_difference")):
            names[f"{item('exchangers', e.name)}.{field}"] = kind
        if e.U is not None:
            names[f"{item('exchangers', e.name)}.area_required"] = "area"
        if e.UA is not None:
            names[f"{item('exchangers', e.name)}.rated_duty"] = "power"
    owners = [item("duties", t.name) for t in problem.terms if t.kind == "duty"]
    owners += [item("exchangers", e.name) for e in problem.exchangers if e.utility_side]
    for owner in owners if problem.utilities else []:
        for u in problem.utilities:
            for field, kind in _UTILITY_OUTPUTS:
                names[f"{owner}.{item('utilities', u.name)}.{field}"] = kind
    return names


_UTILITY_OUTPUTS = (("flow", "mass_flow"), ("cost_per_hour", ""), ("cost_per_year", ""), ("co2_per_year", "mass"))


def _asks_checks(outputs: list[str]) -> bool:
    """Whether any output needs the exchanger check or the utility tables (else a point skips them)."""
    return any(name.startswith(("exchangers[", "duties[")) for name in outputs)


def _check_values(result) -> dict[str, float]:
    values = {}
    for c in result.exchangers:
        head = item("exchangers", c.name)
        for field, value in (("duty", c.duty), ("min_approach", c.min_approach), ("UA_required", c.UA_required),
                             ("mean_dT", c.mean_dT), ("area_required", c.area_required),
                             ("rated_duty", None if c.rating is None else c.rating.duty)):
            values[f"{head}.{field}"] = math.nan if value is None else value
    for table in result.utilities:
        owner = table.demand.address.removesuffix(".value")  # a duty's value field, or the exchanger
        for o in table.options:
            for field, _ in _UTILITY_OUTPUTS:
                value = getattr(o, field)
                values[f"{owner}.{item('utilities', o.utility)}.{field}"] = math.nan if value is None else value
    return values


def _collect(result, screenings, outputs: list[str], checks: bool) -> dict[str, float]:
    """The outputs of one solved point (``checks``: whether they ask for the exchanger check or the utility
    tables, :func:`_asks_checks`)."""
    answer = result.answer
    values = {"answer": answer.value_si, "residual": result.residual,
              "answer.phase_fraction": math.nan if answer.phase_fraction is None else answer.phase_fraction}
    for line in result.lines:
        values[f"lines[{line.name}].heat"] = line.total
        values[f"lines[{line.name}].latent"] = line.latent
    for term in result.terms:
        values[f"terms[{term.name}].heat"] = term.heat
    for s in screenings:
        values[f"screening[{s.vessel}].MTSR"] = s.MTSR
        values[f"screening[{s.vessel}].dT_ad"] = s.dT_ad
        values[f"screening[{s.vessel}].MTT"] = math.nan if s.MTT is None else s.MTT
        values[f"screening[{s.vessel}].criticality_class"] = \
            math.nan if s.criticality_class is None else float(s.criticality_class)
    if checks:
        values.update(_check_values(result))
    return {name: values.get(name, math.nan) for name in outputs}


# --------------------------------------------------------------------------- setting a point, fast
class _FastSetter:
    """Writes an axis value (in its unit) straight into the built problem; None when it cannot."""

    def __init__(self, problem: Problem, axis: Axis, kinds: tuple[str, ...]):
        self.p, self.axis, self.kinds = problem, axis, kinds
        steps = parse(axis.address)
        self.field = steps[-1][0]
        self.apply = self._choose(steps)

    def _choose(self, steps):
        p, address, field = self.p, self.axis.address, self.field
        head = steps[0][0]
        if field in ("flow", "mass") and head in ("streams", "vessels") and len(steps) in (2, 3):
            line = next((ln for ln in p.lines if ln.amount_address == address), None)
            return None if line is None or line is p.unknown_target else self._amount(line)
        humid_inlets = [ln.initial for ln in p.lines if isinstance(ln.material, HumidAir)]  # their humidity and
        # volume flow were worked out at the typed inlet temperature and pressure: such a point is rebuilt
        if field == "temperature" or address.endswith(".equipment.initial_temperature"):
            var = next((v for v, a in p.var_addresses.items() if a == address), None)
            if var is None or var == p.unknown_target or any(st.var == var for st in humid_inlets):
                return None
            return self._temperature(var)
        if head in ("duties", "losses") and field == "value":
            term = next((t for t in p.terms if t.kind == ("duty" if head == "duties" else "loss")
                         and t.name == steps[0][1]), None)
            return None if term is None or term is p.unknown_target else self._heat(term, head == "losses")
        if field == "pressure":
            specs = [st for ln in p.lines for st in (ln.initial, ln.final) if st.pressure_address == address]
            if any(st in humid_inlets for st in specs):
                return None
            return self._pressure(list({id(s): s for s in specs}.values())) if specs else None
        if field in ("vapour_fraction", "solid_fraction"):
            state = address.rpartition(".")[0]
            specs = [st for ln in p.lines for st in (ln.initial, ln.final)
                     if st.label == state and st.plateau == ("boiling" if field == "vapour_fraction" else "melting")]
            return self._fraction(list({id(s): s for s in specs}.values()), field) if specs else None
        if head == "vessels" and len(steps) >= 3 and steps[1][0] == "screening" and len(steps) == 3:
            return self._screening(steps[0][1], field)
        return None

    def _amount(self, line):
        role = "amount"

        def apply(value: float) -> None:
            si, _ = basis_si(value, self.axis.unit, role, self.p.basis, self.p.duration, self.axis.address)
            if si < 0:
                raise InputError(f"a mass or flow cannot be negative ({value:g} {self.axis.unit})", self.axis.address)
            line.amount = si
        return apply

    def _temperature(self, var: str):
        def apply(value: float) -> None:
            self.p.temperatures[var] = typed_si(value, self.axis.unit, "temperature", self.axis.address)
        return apply

    def _heat(self, term, is_loss: bool):
        def apply(value: float) -> None:
            si, _ = basis_si(value, self.axis.unit, "heat", self.p.basis, self.p.duration, self.axis.address)
            if is_loss and si < 0:
                raise InputError(f"enter a loss as a positive amount of heat leaving ({value:g} {self.axis.unit})",
                                 self.axis.address)
            term.heat = -si if is_loss else si
        return apply

    def _pressure(self, specs):
        def apply(value: float) -> None:
            P = typed_si(value, self.axis.unit, "pressure", self.axis.address, self.p.atmosphere)
            for spec in specs:
                spec.P = P
        return apply

    def _fraction(self, specs, field: str):
        def apply(value: float) -> None:
            check_fraction(value, self.axis.address)
            for spec in specs:
                spec.fraction = value if field == "vapour_fraction" else 1.0 - value
        return apply

    def _screening(self, vessel: str, field: str):
        inputs = self.p.screening.get(vessel)
        targets = {"accumulation": "accumulation", "T_D24": "T_D24", "MTT": "MTT", "process_temperature": "T_process"}
        if inputs is None or field not in targets:
            return None

        def apply(value: float) -> None:
            if field == "accumulation":
                check_fraction(value, self.axis.address)
                inputs.accumulation = value
            else:
                setattr(inputs, targets[field], typed_si(value, self.axis.unit, "temperature", self.axis.address))
        return apply


# --------------------------------------------------------------------------- the sweep
def _check_axis(ws: Worksheet, axis: Axis) -> tuple[str, ...]:
    kinds = kinds_of(axis.address, ws.basis.kind)  # refuses an address that is not a numeric input
    get(ws, axis.address)  # refuses an address naming nothing on this sheet
    if len(ws.unknowns) == 1:
        if unknown_address(ws.unknowns[0]) == axis.address:
            raise AddressError("this is the unknown: the balance solves for it; sweep another input", axis.address)
    setter = next((e.name for e in ws.exchangers if e.sets == axis.address), None)
    if setter is not None:
        raise AddressError(f"exchanger {setter}'s rating sets this input; sweep another", axis.address)
    if kinds == (FRACTION,):
        if axis.unit:
            raise AddressError(f"this input is a plain number between 0 and 1; give no unit, not '{axis.unit}'",
                               axis.address)
    else:
        try:
            check_unit(axis.unit, kinds[0], axis.address) if len(kinds) == 1 else kind_of(axis.unit, kinds,
                                                                                           axis.address)
        except HeatBalanceError as exc:
            raise AddressError(exc.message, axis.address) from None
    if not axis.values:
        raise AddressError("the sweep gives this input no values", axis.address)
    if not all(isinstance(v, (int, float)) and math.isfinite(v) for v in axis.values):
        raise AddressError("every value of a sweep must be a finite number", axis.address)
    return kinds


def _typed(axis: Axis, value: float, kinds: tuple[str, ...]):
    return value if kinds == (FRACTION,) else (value, axis.unit)


def sweep(ws: Worksheet, axes: list[Axis], outputs: list[str] | None = None, progress=None) -> pd.DataFrame:
    """Solve the worksheet's unknown at every point of one axis, or of the grid of two.

    Parameters
    ----------
    ws : Worksheet
        The worksheet (its unknown is solved at each point).
    axes : list[Axis]
        One or two inputs by address, with their values in a unit of their kind.
    outputs : list[str], optional
        Names from :func:`output_names` (default: ``answer`` and each screening's MTSR).
    progress : callable, optional
        Called as ``progress(done, total)`` as points are solved.

    Returns
    -------
    pandas.DataFrame
        One row per point: the axes (in their units), the outputs (SI), ``refused at``, ``reason`` and the
        point's ``warnings`` (a phase change, data used beyond their validated range, a temperature cross).
        ``frame.attrs["units"]`` maps each axis column to its unit, ``frame.attrs["kinds"]`` each output to
        its kind.

    Raises
    ------
    AddressError
        An axis that is not a numeric input of this sheet, is the unknown, or has a unit of another kind;
        an unknown output; more than :data:`MAX_POINTS` points.
    """
    if not 1 <= len(axes) <= 2:
        raise InputError(f"a sweep has one or two inputs, not {len(axes)}", "sweep")
    if len(axes) == 2 and axes[0].address == axes[1].address:
        raise AddressError("the two inputs of a sweep must differ", axes[1].address)
    kinds = [_check_axis(ws, axis) for axis in axes]
    total = math.prod(len(a.values) for a in axes)
    if total > MAX_POINTS:
        raise AddressError(f"{total:,} points is more than a sweep may have ({MAX_POINTS:,}); use fewer values",
                           axes[-1].address)
    problem = build_problem(ws)  # refuses a sheet that does not read at all
    known = output_names(problem)
    outputs = list(outputs) if outputs is not None else ["answer"] + [n for n in known if n.endswith(".MTSR")]
    unknown_outputs = [name for name in outputs if name not in known]
    if unknown_outputs:
        raise AddressError(f"no output called '{unknown_outputs[0]}' on this sheet (there are: {', '.join(known)})",
                           "sweep")
    points = list(itertools.product(*(a.values for a in axes)))
    run = _FastRun(ws, problem, axes, kinds)
    rows = []
    for i, values in enumerate(points):
        rows.append(run.point(values, outputs))
        if progress is not None and (i % 50 == 49 or i == total - 1):
            progress(i + 1, total)
    frame = pd.DataFrame(rows, columns=[a.column for a in axes] + outputs + [REFUSED_AT, REASON, WARNINGS])
    frame.attrs["units"] = {a.column: a.unit for a in axes}
    frame.attrs["kinds"] = {name: known[name] for name in outputs}
    frame.attrs["basis"] = problem.basis
    frame.attrs["answer"] = answer_field(ws)
    return frame


class _FastRun:
    """Solves the points: on the one built problem where every axis has a fast setter, else by rebuilding."""

    def __init__(self, ws: Worksheet, problem: Problem, axes: list[Axis], kinds: list[tuple[str, ...]]):
        self.ws, self.axes, self.kinds = ws, axes, kinds
        self.problem = problem
        self.setters = [_FastSetter(problem, a, k).apply for a, k in zip(axes, kinds)]
        self.fast = all(s is not None for s in self.setters)
        self.temperatures = dict(problem.temperatures)
        self.memo = SweepMemo()  # what one point's solve keeps for the next (brackets, evaluated states)

    def point(self, values: tuple[float, ...], outputs: list[str]) -> list:
        """``[*values, *outputs, refused at, reason, warnings]`` of one point."""
        checks = _asks_checks(outputs)
        try:
            result, screenings = self._solve(values, checks)
        except HeatBalanceError as exc:
            return [*values, *[math.nan] * len(outputs), exc.where or "worksheet", exc, []]
        return [*values, *_collect(result, screenings, outputs, checks).values(), "", None, result.warnings]

    def _solve(self, values, checks: bool = True):
        if self.fast:
            p = self.problem
            unsolved(p, self.temperatures)
            for setter, value in zip(self.setters, values):
                setter(value)
            with self.memo:
                result = analyse(p, solve_closed(p), checks)
            return result, result.screening
        ws = self.ws
        for axis, value, kinds in zip(self.axes, values, self.kinds):
            ws = with_value(ws, axis.address, _typed(axis, value, kinds))
        p = build_problem(ws)
        result = analyse(p, solve_closed(p), checks)
        return result, result.screening
