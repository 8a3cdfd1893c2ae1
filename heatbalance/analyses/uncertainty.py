"""How sure is the number: the answer's uncertainty from the inputs' tolerances, by address (GUM).

Each tolerance (``worksheet.tolerances``) gives an input's standard uncertainty u(x_i) from its ± half-width
a and its distribution (GUM 4.3: rectangular u = a/√3, normal u = a, 95 % u = a/2). The output's sensitivity
to the input, c_i = ∂y/∂x_i, is the central difference over ±a, each side solved by the sweep's fast path;
the combination u_c(y)² = Σ (c_i·u(x_i))² for uncorrelated inputs is done by the ``uncertainties`` package
(its error components give each input's share). The expanded uncertainty is U = k·u_c with k = 2 (about 95 %
for a normal output). A Monte Carlo run (GUM Supplement 1), drawing every input from its distribution and
solving each draw, checks the linear result where the model is not linear (phase changes, plateau answers).

Property-data uncertainty is not included: none of the shipped sources states one; a user material's cp
is an input like any other and takes a tolerance.

References: JCGM 100:2008 (GUM), sections 4.3 and 5.1; JCGM 101:2008 (GUM Supplement 1), Monte Carlo.
"""
from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np
from uncertainties import ufloat

from ..address import FRACTION, get, kinds_of, label, unknown_address
from ..errors import AddressError, HeatBalanceError, InputError, NoSolutionError
from ..messages import Phrase
from ..problem import build_problem, site_atmosphere, typed_si
from ..units import ATMOSPHERE, absolute_unit, check_unit, is_gauge, kind_of
from ..worksheet import Quantity, Tolerance, Worksheet
from .sweep import Axis, _FastRun, output_names

__all__ = ["COVERAGE_FACTOR", "DEFAULT_TOLERANCES", "Contribution", "MonteCarlo", "Uncertainty", "propagate",
           "suggested_tolerances", "standard_uncertainty", "check_tolerance", "propagate_outputs"]

COVERAGE_FACTOR = 2.0  # k for the expanded uncertainty, about 95 % for a normal output (GUM 6.2)
_DIVISORS = {"rectangular": math.sqrt(3.0), "normal": 1.0, "95 %": 2.0}  # a / u (GUM 4.3.7, 4.3.3)
NONLINEAR = 0.1  # the two one-sided slopes differing by more than this (relative): a non-linear model there

GAUGE_SOURCE = ("pressure gauge ±1 % of the absolute pressure, as a pressure difference (a percent of a gauge "
                "reading would be ± 0 at 0 gauge): common practice, no source")

#: kind -> (± half-width, as a (value, unit) or a percent, its distribution, where it comes from)
DEFAULT_TOLERANCES: dict[str, tuple] = {
    "mass_flow": ({"percent": 1.5}, "rectangular", "flow meter ±1–2 %: common practice, no source"),
    "mass": ({"percent": 0.5}, "rectangular", "weighed charge ±0.5 %: common practice, no source"),
    "temperature": ({"plus_minus": {"value": 0.5, "unit": "K"}}, "rectangular",
                    "resistance thermometer ±0.3–0.5 K: common practice, no source"),
    "pressure": ({"percent": 1.0}, "rectangular", "pressure gauge ±1 %: common practice, no source"),  # gauge-typed:
    # ±1 % of the absolute pressure as a pressure difference (:func:`_gauge_suggestion`), never ± 0 at 0 barg
    "specific_heat": ({"percent": 2.0}, "rectangular", "tabulated cp ±2–5 %: common practice, no source"),
    "molar_energy": ({"percent": 5.0}, "rectangular", "heat of reaction ±5 %: common practice, no source"),
    "power": ({"percent": 2.0}, "rectangular", "metered duty ±2 %: common practice, no source"),
    "energy": ({"percent": 2.0}, "rectangular", "metered duty ±2 %: common practice, no source"),
}


@dataclass
class Contribution:
    """One input's part in the output's uncertainty (SI for the output; the input in its typed unit)."""

    address: str
    tolerance: Tolerance
    value: float  # the input's value in its typed unit
    unit: str  # the typed unit ("" for a fraction)
    half_width: float  # a, in the typed unit
    standard: float  # u(x_i), in the typed unit
    sensitivity: float  # c_i, output SI per typed unit
    contribution: float  # |c_i|·u(x_i), output SI
    share: float = 0.0  # of the combined variance
    nonlinear: bool = False  # the slopes on the two sides differ by more than NONLINEAR
    refused: HeatBalanceError | None = None  # a side that could not be solved (one-sided difference used)


@dataclass
class MonteCarlo:
    """A Monte Carlo check (GUM S1): draws solved, the mean, standard deviation and 95 % interval (SI)."""

    draws: int
    solved: int
    mean: float
    standard: float
    low: float  # 2.5 % quantile
    high: float  # 97.5 % quantile


@dataclass
class Uncertainty:
    """The uncertainty of one output (SI): value ± U = k·u_c, and what contributes to it, largest first."""

    output: str
    kind: str
    value: float
    standard: float  # u_c
    coverage: float  # k
    contributions: list[Contribution]
    monte_carlo: MonteCarlo | None = None
    notes: list[Phrase] = field(default_factory=list)

    @property
    def expanded(self) -> float:
        return self.coverage * self.standard


# --------------------------------------------------------------------------- tolerances
# temperature fields that are no plant reading: a material's data limits and phase bounds, a freezing point from
# data, a decomposition temperature (from calorimetry), a technical limit, a controller's set point
NOT_READINGS = frozenset({"min_temperature", "max_temperature", "up_to", "initial_freezing_point", "T_D24", "MTT",
                          "target_temperature"})


def suggested_tolerances(ws: Worksheet) -> list[Tolerance]:
    """A tolerance for every input of a kind with a common-practice default (the unknown left out),
    each saying where it comes from: offered to the user, never applied silently."""
    from ..address import inputs

    out = []
    for entry in inputs(ws):
        if entry.is_unknown or not isinstance(entry.value, Quantity) or any(e.sets == entry.address
                                                                              for e in ws.exchangers):
            continue
        if entry.address.rpartition(".")[2] in NOT_READINGS:
            continue  # no thermometer reads a data limit, a set point or a decomposition temperature
        kind = _typed_kind(entry.value.unit, entry.kinds, entry.address)
        if kind in DEFAULT_TOLERANCES:
            size, distribution, source = DEFAULT_TOLERANCES[kind]
            if kind == "pressure" and is_gauge(entry.value.unit):
                size, source = _gauge_suggestion(ws, entry.value), GAUGE_SOURCE
                if size is None:  # a pressure refused as typed (below vacuum): refused at its field, not here
                    continue
            out.append(Tolerance(address=entry.address, distribution=distribution, source=source, **size))
    return out


def _gauge_suggestion(ws: Worksheet, typed: Quantity) -> dict | None:
    """±1 % of a gauge pressure's absolute value (the site's atmosphere added), as a pressure difference in the
    matching absolute unit to 2 significant digits: 0 barg at sea level gives ± 0.01 bar, not ± 0."""
    try:
        atmosphere = site_atmosphere(ws)[0]
    except HeatBalanceError:  # the site's own refusal is shown with the answer; the standard atmosphere here
        atmosphere = ATMOSPHERE
    unit = absolute_unit(typed.unit)
    try:
        absolute = typed_si(typed.value, typed.unit, "pressure", "", atmosphere)
    except HeatBalanceError:
        return None
    size = 0.01 * abs(absolute) / (typed_si(2.0, unit, "pressure", "") - typed_si(1.0, unit, "pressure", ""))
    return {"plus_minus": Quantity(value=float(f"{size:.2g}"), unit=unit)}


def _typed_kind(unit: str, kinds: tuple[str, ...], where: str) -> str:
    return kinds[0] if len(kinds) == 1 else kind_of(unit, kinds, where)


def _half_width(tolerance: Tolerance, typed, kinds: tuple[str, ...]) -> float:
    """The tolerance's ± half-width in the input's typed unit (refused at the input's address if unusable)."""
    where = tolerance.address
    if kinds == (FRACTION,):
        if tolerance.percent is not None:
            return abs(typed) * tolerance.percent / 100.0
        if isinstance(tolerance.plus_minus, Quantity):
            raise InputError(f"this input is a plain number: give its tolerance as a plain number, not "
                             f"{tolerance.plus_minus}", where)
        return float(tolerance.plus_minus)
    if tolerance.percent is not None:
        _check_percent(tolerance.percent, typed, _typed_kind(typed.unit, kinds, where), where)
        return abs(typed.value) * tolerance.percent / 100.0
    if not isinstance(tolerance.plus_minus, Quantity):
        raise InputError(f"give the tolerance with a unit (e.g. '0.5 K', '1 t/h'), not {tolerance.plus_minus!r}",
                         where)
    kind = _typed_kind(typed.unit, kinds, where)
    difference = "temperature_difference" if kind == "temperature" else kind
    size = tolerance.plus_minus
    if difference == "pressure" and size.unit.strip() == "psi":  # a ± of a pressure: gauge or absolute cancels
        size = Quantity(value=size.value, unit="psia")
    try:
        check_unit(size.unit, difference, where)
    except HeatBalanceError as exc:
        raise InputError(f"tolerance '{size}': {exc.message}" + (" (a temperature's tolerance is a temperature "
                         "difference: K or °F)" if kind == "temperature" else ""), where) from None
    # sizes as differences between two values (a gauge unit's offset, e.g. barg's atmosphere, cancels)
    a_si = typed_si(1.0 + size.value, size.unit, difference, where) - typed_si(1.0, size.unit, difference, where)
    one_si = typed_si(2.0, typed.unit, difference, where) - typed_si(1.0, typed.unit, difference, where)
    return a_si / one_si


def _check_percent(percent: float, typed: Quantity, kind: str, where: str) -> None:
    """Refuse a percent of a value whose zero is arbitrary: a temperature (°C, °F: an interval scale) or a gauge
    pressure (its zero is the atmosphere). Its width would depend on the unit typed, and be ± 0 at 0 °C or 0 barg."""
    if kind == "temperature":
        raise InputError(f"± {percent:g} % of a temperature has no meaning: its size depends on the scale the "
                         f"temperature is typed in (°C, °F, K) and is ± 0 at 0 °C; give the tolerance as a "
                         f"temperature difference, e.g. '0.5 K' (or '1 °F' difference)", where)
    if kind == "pressure" and is_gauge(typed.unit):
        raise InputError(f"± {percent:g} % of a gauge pressure ({typed.value:g} {typed.unit.strip()}) depends on "
                         f"the atmosphere it is read from and is ± 0 at 0 gauge; give the tolerance as a pressure "
                         f"difference, e.g. '0.05 bar', or the pressure as absolute", where)


def standard_uncertainty(tolerance: Tolerance, half_width: float) -> float:
    """u(x) = a / divisor of the distribution (GUM 4.3.7 rectangular √3; normal 1; 95 % 2)."""
    return half_width / _DIVISORS[tolerance.distribution]


def check_tolerance(ws: Worksheet, tolerance: Tolerance) -> float:
    """Refuse a tolerance the worksheet cannot use (at its address), without solving; return its ± half-width
    in the input's typed unit."""
    unknown = unknown_address(ws.unknowns[0]) if len(ws.unknowns) == 1 else ""
    return _entry(ws, tolerance, unknown)[2]


# --------------------------------------------------------------------------- propagation
def propagate(ws: Worksheet, output: str = "answer", coverage: float = COVERAGE_FACTOR, monte_carlo: int = 0,
              seed: int = 20261202) -> Uncertainty:
    """The uncertainty of an output from the worksheet's tolerances: linear propagation (and Monte Carlo).

    Parameters
    ----------
    ws : Worksheet
        With ``tolerances`` (each by an input's address).
    output : str
        A name from :func:`heatbalance.analyses.sweep.output_names` (default: the answer).
    coverage : float
        k of the expanded uncertainty U = k·u_c.
    monte_carlo : int
        Draws of a Monte Carlo check (0: none).
    seed : int
        Of the draws, so a sheet's Monte Carlo result is reproducible.

    Raises
    ------
    InputError
        A tolerance on the unknown, on a field with no value, in a unit of another kind.
    AddressError
        A tolerance's address naming nothing numeric; an unknown output.
    """
    return propagate_outputs(ws, [output], coverage, monte_carlo, seed)[output]


def propagate_outputs(ws: Worksheet, outputs: list[str], coverage: float = COVERAGE_FACTOR, monte_carlo: int = 0,
                      seed: int = 20261202) -> dict[str, Uncertainty]:
    """:func:`propagate` for several outputs at once: each perturbed point (and each draw) is solved once and
    gives every output."""
    if not ws.tolerances:
        raise InputError("no input has a tolerance: give at least one (or take the suggested ones)", "tolerances")
    problem = build_problem(ws)
    known = output_names(problem)
    for output in outputs:
        if output not in known:
            raise AddressError(f"no output called '{output}' (there are: {', '.join(known)})", "uncertainty")
    unknown = unknown_address(ws.unknowns[0]) if len(ws.unknowns) == 1 else ""
    entries = [_entry(ws, t, unknown) for t in ws.tolerances]
    axes = [Axis(t.address, (0.0,), unit) for t, (_, unit, _, _) in zip(ws.tolerances, entries)]
    kinds = [k for _, _, _, k in entries]
    base = _evaluate(_FastRun(ws, problem, axes, kinds), [value for value, _, _, _ in entries], outputs)
    if isinstance(base, HeatBalanceError):
        raise base
    sides = [_sides(ws, entry, axes[i], kinds[i], outputs) for i, entry in enumerate(entries)]
    results = {o: _combined(o, known[o], base[o], coverage, [_contribution(t, e, s, o, base[o]) for t, e, s
                                                             in zip(ws.tolerances, entries, sides)])
               for o in outputs}
    if monte_carlo:
        for output, check in _monte_carlo(ws, axes, kinds, entries, outputs, monte_carlo, seed).items():
            results[output].monte_carlo = check
    return results


def _combined(output: str, kind: str, base: float, coverage: float, contributions: list[Contribution]) -> Uncertainty:
    """u_c² = Σ (c_i·u(x_i))² by the ``uncertainties`` package, each input's share, ranked largest first."""
    combined = base + sum((c.sensitivity * ufloat(0.0, c.standard, tag=c.address) for c in contributions
                           if c.standard > 0), start=0.0)
    components = combined.error_components() if hasattr(combined, "error_components") else {}
    standard = combined.std_dev if hasattr(combined, "std_dev") else 0.0
    variance = standard ** 2
    for c in contributions:
        c.contribution = abs(sum(v for var, v in components.items() if var.tag == c.address))
        c.share = c.contribution ** 2 / variance if variance > 0 else 0.0
    contributions.sort(key=lambda c: c.contribution, reverse=True)
    result = Uncertainty(output, kind, base, standard, coverage, contributions)
    result.notes = _notes(result)
    return result


def _entry(ws: Worksheet, tolerance: Tolerance, unknown: str) -> tuple[float, str, float, tuple[str, ...]]:
    """(typed value, typed unit, ± half-width in that unit, kinds) of a tolerance's input."""
    where = tolerance.address
    kinds = kinds_of(where, ws.basis.kind)
    if where == unknown:
        raise InputError("this is the unknown: the balance solves for it; its uncertainty is the result, not an "
                         "input", where)
    setter = next((e.name for e in ws.exchangers if e.sets == where), None)
    if setter is not None:
        raise InputError(f"exchanger {setter}'s rating sets this input: it is solved, not measured; remove its "
                         "tolerance", where)
    typed = get(ws, where)
    if typed is None:
        raise InputError("this field has no value to be uncertain about", where)
    half = _half_width(tolerance, typed, kinds)
    if isinstance(typed, Quantity):
        return typed.value, typed.unit, half, kinds
    return float(typed), "", half, kinds


def _evaluate(run: _FastRun, values: list[float], outputs: list[str]):
    """The outputs at these input values (SI), ``{output: value}``, or the refusal."""
    row = run.point(tuple(values), outputs)
    reason = row[len(values) + len(outputs) + 1]
    return reason if reason is not None else dict(zip(outputs, row[len(values):len(values) + len(outputs)]))


def _sides(ws, entry, axis: Axis, kinds, outputs: list[str]) -> tuple:
    """The outputs with this input at +a and at −a (the others as typed), or each side's refusal."""
    value, _, half, _ = entry
    if half == 0:
        return None, None
    single = _FastRun(ws, build_problem(ws), [axis], [kinds])
    return tuple(_evaluate(single, [value + sign * half], outputs) for sign in (1.0, -1.0))


def _contribution(tolerance, entry, sides: tuple, output: str, base: float) -> Contribution:
    value, unit, half, _ = entry
    up, down = ((s if s is None or isinstance(s, HeatBalanceError) else s[output]) for s in sides)
    if half == 0:
        up = down = base
    refused = next((s for s in (up, down) if isinstance(s, HeatBalanceError)), None)
    slope, nonlinear = _slope(base, up, down, half, tolerance.address)
    u = standard_uncertainty(tolerance, half)
    return Contribution(tolerance.address, tolerance, value, unit, half, u, slope, abs(slope) * u,
                        nonlinear=nonlinear, refused=refused)


def _slope(base: float, up, down, half: float, where: str) -> tuple[float, bool]:
    """∂y/∂x by the central difference over ±a (one-sided where a side cannot be solved), and whether the
    two sides' slopes differ by more than :data:`NONLINEAR`."""
    if half == 0:
        return 0.0, False
    up_ok, down_ok = not isinstance(up, HeatBalanceError), not isinstance(down, HeatBalanceError)
    if up_ok and down_ok:
        right, left = (up - base) / half, (base - down) / half
        return (up - down) / (2 * half), abs(right - left) > NONLINEAR * max(abs(right), abs(left), 1e-300)
    if up_ok or down_ok:
        return ((up - base) if up_ok else (base - down)) / half, True
    raise NoSolutionError(Phrase("the answer cannot be solved at either end of this input's tolerance ({reason}); "
                                 "its uncertainty cannot be propagated: narrow the tolerance",
                                 {"reason": up.message}), where)
def _notes(result: Uncertainty) -> list[Phrase]:
    notes = [Phrase("Inputs taken as uncorrelated; property-data uncertainty not included (the sources state "
                    "none).")]
    for c in result.contributions:
        if c.refused is not None:
            notes.append(Phrase(f"{label(c.address)}: one side of its tolerance cannot be solved ({c.refused.where}); "
                                "its sensitivity is one-sided.", address=c.address))
        elif c.nonlinear and c.share > 0.01:
            notes.append(Phrase(f"{label(c.address)}: the answer is not linear in this input over its tolerance "
                                "(e.g. a phase change nearby): check with the Monte Carlo run.", address=c.address))
    return notes


def _monte_carlo(ws, axes, kinds, entries, outputs: list[str], draws: int, seed: int) -> dict[str, MonteCarlo]:
    """Every input drawn from its distribution at once, each draw solved once for every output (GUM S1)."""
    rng = np.random.default_rng(seed)
    columns = []
    for tolerance, (value, _, half, _) in zip(ws.tolerances, entries):
        if tolerance.distribution == "rectangular":
            columns.append(rng.uniform(value - half, value + half, draws))
        else:
            columns.append(rng.normal(value, standard_uncertainty(tolerance, half), draws))
    run = _FastRun(ws, build_problem(ws), axes, kinds)
    solved = [v for v in (_evaluate(run, list(draw), outputs) for draw in zip(*columns))
              if not isinstance(v, HeatBalanceError)]
    return {output: _summary(draws, [v[output] for v in solved]) for output in outputs}


def _summary(draws: int, values: list[float]) -> MonteCarlo:
    if len(values) < 2:
        return MonteCarlo(draws, len(values), math.nan, math.nan, math.nan, math.nan)
    array = np.asarray(values)
    low, high = np.quantile(array, [0.025, 0.975])
    return MonteCarlo(draws, len(values), float(array.mean()), float(array.std(ddof=1)), float(low), float(high))
