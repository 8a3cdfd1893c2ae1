"""Lines as T–Q paths and their composite curves (SI): what the exchanger check and the utility table share.

A line's path is the heat it has exchanged against its temperature along its real enthalpy path at its
pressure (a condensing line: desuperheating, a flat plateau, subcooling; a sensible line follows cp(T)),
sampled at its ends, its phase changes and inside each single-phase stretch. Several lines on one side add
their heats at each temperature (a composite curve).
"""
from __future__ import annotations

import bisect

import numpy as np

from ..balance import T_TOL, evaluate_state
from ..messages import Measure, Phrase
from ..problem import Problem
from ..properties import Material
from ..results import Result

__all__ = ["SAMPLES_PER_SEGMENT", "LinePath", "Curve", "composite", "line_paths"]

SAMPLES_PER_SEGMENT = 24  # interior samples of each single-phase stretch of a line's path


class LinePath:
    """The heat a line has exchanged as a function of its temperature along its enthalpy path (SI).

    ``H(T, upper)`` is m·(h(T) − h_low) clipped to [0, m·(h_high − h_low)]: 0 at its colder end, its whole
    duty at its hotter end; at a phase change, ``upper`` picks the plateau's hot side (all vapour or
    liquid). The path runs at one pressure ``P``.
    """

    def __init__(self, material: Material, P: float, m: float, T_low: float, h_low: float, T_high: float,
                 h_high: float):
        self.material, self.P, self.m = material, P, m
        self.T_low, self.h_low, self.T_high, self.h_high = T_low, h_low, T_high, h_high
        self.transitions = [tr for tr in material.transitions(P) if T_low - T_TOL <= tr.T <= T_high + T_TOL]

    @property
    def total(self) -> float:
        return self.m * (self.h_high - self.h_low)

    def h(self, T: float, upper: bool) -> float:
        tr = next((t for t in self.transitions if abs(t.T - T) < T_TOL), None)
        if tr is not None:
            return tr.h_upper if upper else tr.h_lower
        return self.material.enthalpy(T, self.P)

    def H(self, T: float, upper: bool = False) -> float:
        if T <= self.T_low - T_TOL or (T < self.T_low + T_TOL and not upper and not self._on_plateau(T)):
            return 0.0
        if T >= self.T_high + T_TOL or (T > self.T_high - T_TOL and upper and not self._on_plateau(T)):
            return self.total
        return self.m * min(max(self.h(T, upper) - self.h_low, 0.0), self.h_high - self.h_low)

    def _on_plateau(self, T: float) -> bool:
        return any(abs(t.T - T) < T_TOL for t in self.transitions)

    def temperatures(self) -> list[float]:
        """The path's ends, its phase changes and interior samples of each single-phase stretch."""
        stops = sorted({self.T_low, self.T_high, *(t.T for t in self.transitions)})
        out = list(stops)
        for a, b in zip(stops, stops[1:]):
            if b - a > 2 * T_TOL:
                out += list(np.linspace(a, b, SAMPLES_PER_SEGMENT + 2)[1:-1])
        return sorted(out)

    def events(self) -> list[float]:
        """Temperatures where the line's service changes: its ends and its phase changes."""
        return sorted({self.T_low, self.T_high, *(t.T for t in self.transitions)})

    def service(self, T_mid: float, flat: bool, giving: bool) -> str:
        """What the line does in a zone around ``T_mid`` (``flat``: the zone is on its plateau)."""
        if not self.T_low - T_TOL <= T_mid <= self.T_high + T_TOL:
            return ""
        if flat:
            tr = next((t for t in self.transitions if abs(t.T - T_mid) < 1e-3), None)
            if tr is not None:
                return {("boiling", True): "condensing", ("boiling", False): "boiling",
                        ("melting", True): "freezing", ("melting", False): "melting"}[(tr.kind, giving)]
        boil = next((t for t in self.material.transitions(self.P) if t.kind == "boiling"), None)
        if boil is not None and T_mid > boil.T:
            return "desuperheating" if giving else "superheating"
        if boil is not None and giving and self.T_high > boil.T - T_TOL:
            return "subcooling"
        return "cooling" if giving else "heating"


class Curve:
    """A side's curve: points (x, T) with x non-decreasing; T at x from the left or the right."""

    def __init__(self, points: list[tuple[float, float]]):
        self.points = points
        self.xs = [p[0] for p in points]

    def T(self, x: float, right: bool = False) -> float:
        return float(self._T(x, right))

    def _T(self, x: float, right: bool) -> float:
        xs, pts = self.xs, self.points
        if x <= xs[0]:
            return pts[0][1] if not right or x < xs[0] else pts[bisect.bisect_right(xs, x) - 1][1]
        if x >= xs[-1]:
            return pts[-1][1] if right or x > xs[-1] else pts[bisect.bisect_left(xs, x)][1]
        if right:
            i = bisect.bisect_right(xs, x) - 1
            if xs[i] == x:
                return pts[i][1]
        else:
            i = bisect.bisect_left(xs, x)
            if xs[i] == x:
                return pts[i][1]
            i -= 1
        (x0, T0), (x1, T1) = pts[i], pts[i + 1]
        return T0 if x1 == x0 else T0 + (T1 - T0) * (x - x0) / (x1 - x0)


def composite(paths: list[LinePath]) -> list[tuple[float, float]]:
    """(H, T) of several lines on one side: their heats added at each temperature, from the coldest end."""
    grid = sorted({T for p in paths for T in p.temperatures()})
    points: list[tuple[float, float]] = []
    for T in grid:
        low = sum(p.H(T, False) for p in paths)
        high = sum(p.H(T, True) for p in paths)
        points.append((float(low), float(T)))
        if high > low:
            points.append((float(high), float(T)))
    cleaned = [points[0]]
    for H, T in points[1:]:  # property noise never makes the heat run backwards
        cleaned.append((max(H, cleaned[-1][0]), T))
    return cleaned


def line_paths(problem: Problem, result: Result, pairs, notes: list[Phrase], address: str) -> list[LinePath]:
    """Each (line, its result) as its enthalpy path, at its inlet pressure (said at ``address`` when its outlet is at
    another)."""
    sides = {}
    if result.answer.phase_fraction is not None and problem.unknown.kind == "temperature":
        sides = {problem.unknown_target: result.answer.phase_fraction}
    paths = []
    for line, res in pairs:
        a = evaluate_state(line.material, line.initial, problem.temperatures, sides)
        b = evaluate_state(line.material, line.final, problem.temperatures, sides)
        if abs(line.initial.P - line.final.P) > 1.0:
            notes.append(Phrase("{line}: its path is drawn at its inlet pressure {P} (its outlet is at another "
                                "pressure)", {"line": line.name, "P": Measure(line.initial.P, "pressure")},
                                address))
        low, high = (a, b) if a.h <= b.h else (b, a)
        paths.append(LinePath(line.material, line.initial.P, res.amount_si, low.T, low.h, high.T, high.h))
    return paths
