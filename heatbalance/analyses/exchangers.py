"""Will the exchanger do it? Zoned T–Q curves, the internal approach, required UA (design) and rating (SI).

An exchanger pairs lines of a solved balance: its hot side gives heat to its cold side. Each side's
temperature is drawn against the heat it has exchanged (the T–Q curve) along the real enthalpy path of
every line at its pressure, from the material's own property data: a condensing line has a
desuperheating zone, a flat condensing plateau and a subcooling zone; a boiling line its plateau; a
sensible line follows cp(T). Several lines on one side form a composite curve (their heat flows added
at each temperature).

The heat axis ``x`` runs from the exchanger's cold end (hot outlet) to its hot end (hot inlet). In
counter-current (and for the approach check of shell-and-tube and cross-flow units, whose curves are
compared as counter-current) the cold side's heat taken is ``x``; in co-current it is ``Q − x``.

* Approach: ΔT(x) = T_hot(x) − T_cold(x); the curves are piecewise linear between the samples, so the
  smallest gap is at a sample of either curve. ΔT ≤ 0 somewhere is a temperature cross (a loud warning,
  no UA given); ΔT below the minimum approach a loud warning; the hot side colder than the cold side
  everywhere is refused (:class:`~heatbalance.errors.NoSolutionError` at ``exchangers[E].hot``).
* Design: UA_required = Σ_zones Q_zone / (F_zone · ΔT_lm,zone), each zone summed over its sample intervals
  (exact for straight zone curves, a quadrature of ∫dQ/ΔT for curved ones); F from the zone's terminal
  temperatures: 1 for counter-current and co-current (the co-current pairing is already in ΔT), Fakheri's
  expression for shell-and-tube with 1 or N shell passes (``ht.F_LMTD_Fakheri``), and for cross-flow
  (both fluids unmixed) F = NTU_counter(ε, C_r) / NTU_cross(ε, C_r) from ``ht.NTU_from_effectiveness``.
  A zone where one side is isothermal (a plateau) has F = 1. The mean temperature difference is
  Q / UA_required; the area is UA_required / U for an entered U.
* Rating (UA entered, one line per side): the duty at which the zones' required UA equals the given UA,
  with the inlets and flows of the balance (each side extended beyond its outlet along its own path);
  within one zone this is the ε-NTU relation (Kays & London; ``ht.effectiveness_from_NTU``), across
  zones it is the same sum as the design. Reported against the balance's duty: what the exchanger
  delivers, and the outlet temperatures it reaches.

References: Incropera, DeWitt, Bergman, Lavine, *Fundamentals of Heat and Mass Transfer*, 6th ed., ch. 11
(LMTD, F, ε-NTU); Fakheri, A., J. Heat Transfer 125 (2003) 527–530 (F for N shell passes); Kays, W. M.,
London, A. L., *Compact Heat Exchangers*, 3rd ed. (ε-NTU relations).
"""
from __future__ import annotations

import csv
import math
import warnings
from dataclasses import dataclass, field
from functools import lru_cache
from pathlib import Path

import ht
import numpy as np
from fluids.numerics import UnconvergedError
from scipy.optimize import brentq

from ..balance import T_TOL, evaluate_state
from ..errors import HeatBalanceError, InputError, NoSolutionError
from ..messages import Measure, Phrase
from ..problem import ExchangerInputs, Line, Problem
from ..results import Result
from .curves import SAMPLES_PER_SEGMENT, Curve, LinePath, composite, line_paths

__all__ = ["Zone", "Rating", "rated_duty", "ExchangerCheck", "LinePath", "Curve", "check_exchangers", "check_exchanger",
           "required_UA", "correction_factor", "typical_U", "TYPICAL_U_FILE", "F_FLOOR", "SAMPLES_PER_SEGMENT", "APPROACH_SOURCE"]

F_FLOOR = 0.75  # below this F a shell-and-tube design is poor: more shells (common practice, no source)
APPROACH_SOURCE = ("default 10 K: shell-and-tube liquid service, common practice (no source); 3–5 K for plate "
                   "exchangers, 20 K or more with a gas; sites set their own")
_BALANCE_TOLERANCE = 0.01  # sides differing by more than this fraction of the duty are reported


# --------------------------------------------------------------------------- records
@dataclass
class Zone:
    """One zone of the exchanger: between two changes of service on either side (SI: W, K, W/K)."""

    index: int
    x_start: float  # W from the cold end
    x_end: float
    duty: float
    hot_service: str  # desuperheating | condensing | subcooling | cooling | …
    cold_service: str  # heating | boiling | superheating | …
    hot_in: float  # K, where the hot side enters the zone
    hot_out: float
    cold_in: float
    cold_out: float
    F: float
    lmtd: float  # K, ΔT_lm of the zone's terminal temperatures (0 when a terminal gap is not positive)
    UA: float | None  # None: a cross in the zone


@dataclass
class Rating:
    """What an existing exchanger (UA) delivers with the balance's inlets and flows (SI)."""

    UA: float
    duty: float  # W
    balance_duty: float
    hot_outlet_T: float
    cold_outlet_T: float
    max_duty: float  # the duty at which the curves would touch (infinite UA)
    verdict: Phrase = field(default_factory=lambda: Phrase(""))


@dataclass
class ExchangerCheck:
    """The check of one exchanger on a solved balance; every number SI and finite (``None``: not known)."""

    name: str
    address: str
    arrangement: str
    shells: int
    hot: list[str]
    cold: list[str]
    duty: float  # W taken by the cold side
    hot_duty: float  # W given by the hot side
    hot_curve: list[tuple[float, float]]  # (x [W] from the cold end, T [K])
    cold_curve: list[tuple[float, float]]
    zones: list[Zone]
    min_approach: float  # K, the smallest T_hot − T_cold inside (negative: a cross)
    min_approach_x: float  # W from the cold end
    min_approach_hot_T: float
    min_approach_cold_T: float
    minimum_approach: float  # K, the smallest acceptable (entered, or the default)
    approach_source: str
    UA_required: float | None  # W/K (None: a cross, no exchanger can)
    mean_dT: float | None  # K: duty / UA_required
    U: float | None = None
    area_required: float | None = None  # m² for the entered U
    UA_given: float | None = None
    rating: Rating | None = None
    closure: object = None  # rating_solve.RatingClosure: the input its rating set, when it closes the balance
    warnings: list[Phrase] = field(default_factory=list)
    notes: list[Phrase] = field(default_factory=list)
    sources: list[str] = field(default_factory=list)


# --------------------------------------------------------------------------- one line's path
# --------------------------------------------------------------------------- F and UA
def _crossflow_NTU(eps: float, Cr: float) -> float:
    """NTU of a cross-flow exchanger (both fluids unmixed) at effectiveness ε, checked by the way back: ht's series
    integral may warn of a slow quadrature (said quietly here), so the NTU must give ε again to 1e-6, else none."""
    from scipy.integrate import IntegrationWarning

    with warnings.catch_warnings():
        warnings.simplefilter("ignore", IntegrationWarning)
        NTU = ht.NTU_from_effectiveness(eps, Cr, "crossflow")
        back = ht.effectiveness_from_NTU(NTU, Cr, "crossflow")
    if not abs(back - eps) <= 1e-6 * max(eps, 1e-12):
        raise ValueError("the cross-flow NTU does not give its effectiveness back")
    return NTU


def correction_factor(arrangement: str, shells: int, Thi: float, Tho: float, Tci: float, Tco: float) -> float:
    """LMTD correction factor F of an arrangement for terminal temperatures [K] (1 when one side is isothermal).

    Counter-current and co-current: 1 (co-current's pairing is in its ΔT). Shell-and-tube, 1-2 and N shell
    passes: Fakheri (2003) via ``ht.F_LMTD_Fakheri``. Cross-flow, both fluids unmixed: F = NTU_cf / NTU_x at the
    same ε and C_r (``ht.NTU_from_effectiveness``, Kays & London). NaN when the arrangement cannot reach the
    temperatures (a cross inside the shell).

    >>> round(correction_factor("shell-and-tube 1-2", 1, 130 + 273.15, 110 + 273.15, 15 + 273.15, 85 + 273.15), 4)
    0.9438
    """
    if arrangement in ("counter-current", "co-current"):
        return 1.0
    dh, dc = Thi - Tho, Tco - Tci
    if dh < 1e-6 or dc < 1e-6:
        return 1.0
    n = 1 if arrangement == "shell-and-tube 1-2" else shells
    try:
        if arrangement.startswith("shell-and-tube"):
            F = ht.F_LMTD_Fakheri(Thi=Thi, Tho=Tho, Tci=Tci, Tco=Tco, shells=n)
        else:
            C_hot, C_cold = 1.0 / dh, 1.0 / dc  # heat capacity rates for a unit duty
            C_min, C_max = min(C_hot, C_cold), max(C_hot, C_cold)
            eps = 1.0 / (C_min * (Thi - Tci))
            Cr = C_min / C_max
            F = ht.NTU_from_effectiveness(eps, Cr, "counterflow") / _crossflow_NTU(eps, Cr)
    except (ValueError, ZeroDivisionError, OverflowError, UnconvergedError):  # no NTU reaches this ε
        return math.nan
    F = float(np.real(F))
    return F if math.isfinite(F) and 0 < F <= 1.0 + 1e-9 else math.nan


def _lmtd(a: float, b: float) -> float:
    if abs(a - b) < 1e-9 * max(a, b):
        return (a + b) / 2
    return (a - b) / math.log(a / b)


def required_UA(hot: Curve, cold: Curve, bounds: list[float], arrangement: str, shells: int
                ) -> list[tuple[float, float, float, float, float, float | None]]:
    """Per zone between consecutive ``bounds`` [W]: (duty, F, ΔT_lm of its terminals, UA or None when ΔT ≤ 0
    somewhere in it, (T_hot_in, T_hot_out, T_cold_in, T_cold_out)). A zone's UA is the sum of
    Q_i / (F · ΔT_lm,i) over the sample intervals inside it."""
    xs = sorted({*hot.xs, *cold.xs, *bounds})
    rows = []
    for a, b in zip(bounds, bounds[1:]):
        duty = b - a
        Th_out, Th_in = hot.T(a, True), hot.T(b, False)
        Tc_a, Tc_b = cold.T(a, True), cold.T(b, False)
        Tc_in, Tc_out = min(Tc_a, Tc_b), max(Tc_a, Tc_b)
        F = correction_factor(arrangement, shells, Th_in, Th_out, Tc_in, Tc_out)
        d_a, d_b = Th_out - Tc_a, Th_in - Tc_b
        lmtd = _lmtd(d_a, d_b) if d_a > 0 and d_b > 0 else math.nan
        inner = [x for x in xs if a <= x <= b]
        UA, crossed = 0.0, False
        for u, v in zip(inner, inner[1:]):
            if v - u <= 0:
                continue
            du, dv = hot.T(u, True) - cold.T(u, True), hot.T(v, False) - cold.T(v, False)
            if du <= 0 or dv <= 0:
                crossed = True
                break
            UA += (v - u) / _lmtd(du, dv)
        rows.append((float(duty), F, float(lmtd), None if crossed or not math.isfinite(F) else float(UA / F),
                     (float(Th_in), float(Th_out), float(Tc_in), float(Tc_out))))
    return rows


# --------------------------------------------------------------------------- the check
def _side(problem: Problem, result: Result, e: ExchangerInputs, side: str) -> list[tuple[Line, object]]:
    pairs = []
    for name in getattr(e, side):
        index = next(i for i, ln in enumerate(problem.lines) if ln.kind == "stream" and ln.name == name)
        line, res = problem.lines[index], result.lines[index]
        giving = res.total < 0
        if (side == "hot") != giving or abs(res.total) == 0:
            verb = "takes up" if res.total > 0 else "gives up" if res.total < 0 else "exchanges no"
            raise NoSolutionError(Phrase("{line} {verb} heat in the balance ({heat}), so it cannot be on the "
                                         "{side} side of {exchanger}", {
                                             "line": name, "verb": verb, "heat": Measure(abs(res.total), "power"),
                                             "side": side, "exchanger": e.name}), f"{e.address}.{side}")
        pairs.append((line, res))
    return pairs


def _bounds(paths: list[LinePath], to_x, Q: float) -> list[float]:
    xs = {0.0, Q}
    for p in paths:
        for T in p.events():
            for upper in (False, True):
                xs.add(min(max(to_x(sum(q.H(T, upper) for q in paths)), 0.0), Q))
    out = []
    for x in sorted(xs):
        if not out or x - out[-1] > 1e-9 * max(Q, 1.0):
            out.append(x)
    if out[-1] != Q:
        out[-1] = Q
    return out


def _service(paths: list[LinePath], T_mid: float, flat: bool, giving: bool) -> str:
    words = [p.service(T_mid, flat, giving) for p in paths]
    return " + ".join(dict.fromkeys(w for w in words if w)) or ("cooling" if giving else "heating")


def check_exchanger(problem: Problem, result: Result, e: ExchangerInputs) -> ExchangerCheck:
    """Check one exchanger on a solved balance (see the module's notes for the methods)."""
    notes: list[Phrase] = []
    warnings: list[Phrase] = []
    hot_paths = line_paths(problem, result, _side(problem, result, e, "hot"), notes, e.address)
    cold_paths = line_paths(problem, result, _side(problem, result, e, "cold"), notes, e.address)
    hot_pts, cold_pts = composite(hot_paths), composite(cold_paths)
    Q_hot, Q = hot_pts[-1][0], cold_pts[-1][0]
    if abs(Q_hot - Q) > _BALANCE_TOLERANCE * max(Q, Q_hot):
        notes.append(Phrase("the hot side gives {hot} and the cold side takes {cold}: the difference is the "
                            "balance's other heat terms (losses, duties); the exchanger's duty is taken as the "
                            "cold side's, the hot curve scaled to it", {
                                "hot": Measure(Q_hot, "power"), "cold": Measure(Q, "power")}, e.address))
    scale = Q / Q_hot
    hot = Curve([(H * scale, T) for H, T in hot_pts])
    co = e.arrangement == "co-current"
    cold = Curve(sorted(((Q - H, T) for H, T in cold_pts), key=lambda p: (p[0], -p[1])) if co else cold_pts)

    # the approach: at every sample of either curve, from both sides of a jump
    xs = sorted({*hot.xs, *cold.xs})
    gaps = [(hot.T(x, r) - cold.T(x, r), x, hot.T(x, r), cold.T(x, r)) for x in xs for r in (False, True)]
    dT_min, x_min, Th_min, Tc_min = min(gaps)
    if max(g[0] for g in gaps) <= 0:
        raise NoSolutionError(Phrase(
            "the hot side of {exchanger} is nowhere hotter than its cold side (at best {gap}): no exchanger can "
            "pass heat this way. Check which lines are hot and cold, or use a hotter heating medium",
            {"exchanger": e.name, "gap": Measure(max(g[0] for g in gaps), "temperature_difference", decimals=1)}),
            f"{e.address}.hot")
    where = {"exchanger": e.name, "x": Measure(x_min, "power"), "Q": Measure(Q, "power"),
             "Th": Measure(Th_min, "temperature", 1), "Tc": Measure(Tc_min, "temperature", 1),
             "gap": Measure(abs(dT_min), "temperature_difference", decimals=1),
             "min": Measure(e.minimum_approach, "temperature_difference", decimals=1)}
    if dT_min <= 0:
        warnings.append(Phrase(
            "TEMPERATURE CROSS inside {exchanger}: at {x} of {Q} from its cold end the hot side is at {Th} and the "
            "cold side at {Tc} (the cold side {gap} hotter). The terminal temperatures do not show it; this duty "
            "cannot be done in this exchanger as paired: raise the heating medium's temperature (steam pressure), "
            "lower the target, or split the duty", where, e.address))
    elif dT_min < e.minimum_approach - 1e-9:
        warnings.append(Phrase(
            "Approach below the minimum in {exchanger}: {gap} at {x} of {Q} from its cold end (hot side {Th}, cold "
            "side {Tc}); the minimum is {min}", where, f"{e.address}.minimum_approach"))

    # zones
    def hot_x(H: float) -> float:
        return H * scale

    def cold_x(H: float) -> float:
        return Q - H if co else H

    bounds = sorted(set(_bounds(hot_paths, hot_x, Q)) | set(_bounds(cold_paths, cold_x, Q)))
    merged = [bounds[0]]
    for x in bounds[1:]:
        if x - merged[-1] > 1e-7 * max(Q, 1.0):
            merged.append(x)
    merged[-1] = Q
    rows = required_UA(hot, cold, merged, e.arrangement, e.shells)
    zones = []
    for i, ((duty, F, lmtd, UA, (Th_in, Th_out, Tc_in, Tc_out)), a, b) in enumerate(zip(rows, merged, merged[1:])):
        mid = (a + b) / 2
        hot_flat, cold_flat = abs(Th_in - Th_out) < 1e-6, abs(Tc_in - Tc_out) < 1e-6
        if not math.isfinite(F):
            raise NoSolutionError(Phrase(
                "{exchanger} as {arrangement} cannot reach these temperatures in zone {n} (hot {Th_in} → {Th_out}, "
                "cold {Tc_in} → {Tc_out}): the F-correction has no value (a cross inside the shell). Use more shell "
                "passes or counter-current flow", {"exchanger": e.name, "arrangement": e.arrangement, "n": i + 1,
                                                   "Th_in": Measure(Th_in, "temperature", 1),
                                                   "Th_out": Measure(Th_out, "temperature", 1),
                                                   "Tc_in": Measure(Tc_in, "temperature", 1),
                                                   "Tc_out": Measure(Tc_out, "temperature", 1)}),
                f"{e.address}.arrangement")
        if F < F_FLOOR:
            warnings.append(Phrase("{exchanger}, zone {n}: F = {F} is below {floor} (common practice, no source): "
                                   "the arrangement wastes surface and is sensitive to small changes; add shell "
                                   "passes", {"exchanger": e.name, "n": i + 1, "F": f"{F:.3f}",
                                              "floor": f"{F_FLOOR:.2f}"}, f"{e.address}.arrangement"))
        zones.append(Zone(i + 1, a, b, duty, _service(hot_paths, hot.T(mid), hot_flat, True),
                          _service(cold_paths, cold.T(mid), cold_flat, False), Th_in, Th_out,
                          Tc_in, Tc_out, F, lmtd if math.isfinite(lmtd) else 0.0, UA))
    UA_req = None if dT_min <= 0 or any(z.UA is None for z in zones) else sum(z.UA for z in zones)
    if not Q > 0:
        raise NoSolutionError(Phrase("{exchanger} exchanges no heat in this balance", {"exchanger": e.name}),
                              e.address)
    check = ExchangerCheck(
        e.name, e.address, e.arrangement, e.shells, list(e.hot), list(e.cold), Q, Q_hot, hot.points, cold.points,
        zones, dT_min, x_min, Th_min, Tc_min, e.minimum_approach,
        "entered" if e.approach_entered else APPROACH_SOURCE, UA_req,
        Q / UA_req if UA_req else None, U=e.U, UA_given=e.UA, warnings=warnings, notes=notes,
        sources=["T–Q paths: the lines' own property data (see the sheet's sources)",
                 "LMTD, F, ε-NTU: Incropera et al. ch. 11; Fakheri (2003) and Kays & London via ht "
                 + ht.__version__])
    if UA_req is not None and e.U is not None:
        check.area_required = UA_req / e.U
    if e.UA is not None:
        try:
            check.rating = _rate(problem, result, e, check, warnings, notes)
        except HeatBalanceError as exc:  # e.g. a line extended past its outlet beyond its property data
            raise exc.located(f"{e.address}.UA")
    return check


# --------------------------------------------------------------------------- rating
def _extended(problem: Problem, line: Line, res, towards: float, giving: bool) -> LinePath:
    """The line's path from its inlet on past its outlet, as far as ``towards`` (the other side's inlet)."""
    m = line.material
    T_in, h_in = res.initial_T, evaluate_state(m, line.initial, problem.temperatures, {}).h
    T_far = min(max(towards, m.t_min), m.t_max)
    tr = next((t for t in m.transitions(line.initial.P) if abs(t.T - T_far) < T_TOL), None)
    h_far = (tr.h_lower if giving else tr.h_upper) if tr is not None else m.enthalpy(T_far, line.initial.P)
    if giving:
        return LinePath(m, line.initial.P, res.amount_si, T_far, h_far, T_in, h_in)
    return LinePath(m, line.initial.P, res.amount_si, T_in, h_in, T_far, h_far)


def _not_rateable(e: ExchangerInputs, hr, cr) -> NoSolutionError:
    return NoSolutionError(Phrase("{exchanger} cannot be rated: its hot inlet ({Th}) is not hotter than its cold inlet "
                                  "({Tc})", {"exchanger": e.name, "Th": Measure(hr.initial_T, "temperature", 1),
                                             "Tc": Measure(cr.initial_T, "temperature", 1)}), f"{e.address}.hot")


def _rate(problem: Problem, result: Result, e: ExchangerInputs, check: ExchangerCheck, warnings, notes) -> Rating | None:
    if len(e.hot) != 1 or len(e.cold) != 1:
        notes.append(Phrase("{exchanger}: rating is done for one line on each side; this one has {n_hot} hot and "
                            "{n_cold} cold (the design check above still holds)",
                            {"exchanger": e.name, "n_hot": len(e.hot), "n_cold": len(e.cold)}, f"{e.address}.UA"))
        return None
    (hl, hr), = _side(problem, result, e, "hot")
    (cl, cr), = _side(problem, result, e, "cold")
    q, q_top, T_hot_out, T_cold_out = _rated(problem, e, hl, hr, cl, cr)
    ratio = q / check.duty if check.duty > 0 else math.inf
    if not math.isfinite(ratio):
        raise NoSolutionError(f"{e.name} exchanges no heat in this balance: nothing to rate", f"{e.address}.UA")
    values = {"exchanger": e.name, "q": Measure(q, "power"), "duty": Measure(check.duty, "power"),
              "share": f"{ratio:.1%}", "Th": Measure(T_hot_out, "temperature", 1),
              "Tc": Measure(T_cold_out, "temperature", 1)}
    if ratio < 1 - 1e-3:
        verdict = Phrase("{exchanger} IS TOO SMALL for the balance: with its UA it delivers {q}, {share} of the "
                         "{duty} the balance needs (hot outlet {Th}, cold outlet {Tc})", values, f"{e.address}.UA")
        warnings.append(verdict)
    else:
        verdict = Phrase("{exchanger} can deliver {q} ({share} of the balance's {duty}; hot outlet {Th}, cold outlet "
                         "{Tc} if nothing throttles it)", values, f"{e.address}.UA")
    return Rating(e.UA, float(q), check.duty, T_hot_out, T_cold_out, float(q_top), verdict)


def rated_duty(problem: Problem, result: Result, e: ExchangerInputs) -> tuple[float, float, float, float]:
    """(duty [W], the duty at which the curves would touch [W], hot outlet [K], cold outlet [K]) that the
    exchanger's UA delivers with the balance's inlets and flows, by ε-NTU per zone (one line per side).

    Unlike the check, it does not ask which way the balance sends the heat: a rating solve
    (:mod:`.rating_solve`) calls it at trial values where the balance is not yet the exchanger's.
    """
    if e.UA is None:
        raise InputError("rating needs the exchanger's UA, or its U and area", f"{e.address}.UA")
    if len(e.hot) != 1 or len(e.cold) != 1:
        raise InputError(Phrase("rating is done for one line on each side; {exchanger} has {n_hot} hot and {n_cold} "
                                "cold", {"exchanger": e.name, "n_hot": len(e.hot), "n_cold": len(e.cold)}),
                         f"{e.address}.{'hot' if len(e.hot) != 1 else 'cold'}")
    (hl, hr), (cl, cr) = (_pair(problem, result, e.hot[0]), _pair(problem, result, e.cold[0]))
    return _rated(problem, e, hl, hr, cl, cr)


def _pair(problem: Problem, result: Result, name: str) -> tuple[Line, object]:
    index = next(i for i, ln in enumerate(problem.lines) if ln.kind == "stream" and ln.name == name)
    return problem.lines[index], result.lines[index]


def _rated(problem: Problem, e: ExchangerInputs, hl: Line, hr, cl: Line, cr) -> tuple[float, float, float, float]:
    if not hr.initial_T > cr.initial_T:
        raise _not_rateable(e, hr, cr)
    hot_path = _extended(problem, hl, hr, cr.initial_T, True)
    cold_path = _extended(problem, cl, cr, hr.initial_T, False)
    hot_full, cold_full = composite([hot_path]), composite([cold_path])
    Qh_max, Qc_max = hot_full[-1][0], cold_full[-1][0]
    co = e.arrangement == "co-current"

    def curves(q: float) -> tuple[Curve, Curve, list[float]]:
        cut = Qh_max - q
        h_pts = [(H - cut, T) for H, T in hot_full if H > cut]
        h_pts.insert(0, (0.0, Curve(hot_full).T(cut)))
        c_pts = [(H, T) for H, T in cold_full if H < q]
        c_pts.append((q, Curve(cold_full).T(q)))
        cold = Curve(sorted(((q - H, T) for H, T in c_pts), key=lambda p: (p[0], -p[1])) if co else c_pts)
        hot = Curve(h_pts)
        events = {0.0, q}
        for T in (t.T for t in hot_path.transitions):
            for up in (False, True):
                events.add(min(max(hot_path.H(T, up) - cut, 0.0), q))
        for T in (t.T for t in cold_path.transitions):
            for up in (False, True):
                H = min(max(cold_path.H(T, up), 0.0), q)
                events.add(q - H if co else H)
        bounds = []
        for x in sorted(events):
            if not bounds or x - bounds[-1] > 1e-9 * max(q, 1.0):
                bounds.append(x)
        bounds[-1] = q
        return hot, cold, bounds

    def gap(q: float) -> float:
        hot, cold, _ = curves(q)
        return min(hot.T(x, r) - cold.T(x, r) for x in sorted({*hot.xs, *cold.xs}) for r in (False, True))

    def UA_of(q: float) -> float:
        hot, cold, bounds = curves(q)
        rows = required_UA(hot, cold, bounds, e.arrangement, e.shells)
        if any(r[3] is None for r in rows):
            return math.inf
        return sum(r[3] for r in rows)

    q_top = min(Qh_max, Qc_max)
    low = 1e-9 * q_top
    if not q_top > 0 or gap(low) <= 0:
        raise _not_rateable(e, hr, cr)
    try:
        if gap(q_top) <= 0:
            q_top = brentq(gap, low, q_top, xtol=1e-9 * q_top, rtol=1e-12)
        q_hi = q_top * (1 - 1e-7)
        if UA_of(q_hi) <= e.UA:
            q = q_hi
        elif UA_of(low) >= e.UA:
            q = low
        else:
            q = brentq(lambda x: UA_of(x) - e.UA, low, q_hi, xtol=1e-9 * q_top, rtol=1e-12, maxiter=200)
    except (ValueError, RuntimeError) as exc:  # no bracket or no convergence: said, never a bare error
        raise NoSolutionError(f"{e.name} could not be rated with this UA ({exc.__class__.__name__}): check its UA and "
                              "the temperatures of its lines", f"{e.address}.UA") from None
    hot, cold, _ = curves(q)
    T_hot_out = hot.T(0.0, True)
    T_cold_out = cold.T(0.0 if co else q, not co)
    return float(q), float(q_top), T_hot_out, T_cold_out


def check_exchangers(problem: Problem, result: Result) -> list[ExchangerCheck]:
    """Every exchanger of the worksheet checked on the solved balance (a refusal names the exchanger at least)."""
    checks = []
    for e in problem.exchangers:
        try:
            checks.append(check_exchanger(problem, result, e))
        except HeatBalanceError as exc:
            raise exc.located(e.address)
    return checks



TYPICAL_U_FILE = Path(__file__).resolve().parent.parent / "data" / "typical_overall_coefficients.csv"


@lru_cache(maxsize=1)
def typical_U() -> tuple[dict, ...]:
    """Typical overall coefficients U [W/(m²·K)] by service, each row with its ``source``: guidance only.

    U varies by an order of magnitude with fouling, velocities and geometry; a range here is a first
    estimate for a design check, never a rating of a real unit.
    """
    with open(TYPICAL_U_FILE, encoding="utf-8", newline="") as handle:
        rows = list(csv.DictReader(handle))
    for row in rows:
        row["U_low_W_m2K"], row["U_high_W_m2K"] = float(row["U_low_W_m2K"]), float(row["U_high_W_m2K"])
    return tuple(rows)
