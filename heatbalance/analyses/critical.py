"""Near the critical point: where latent heats and heat capacities from different formulations part ways.

A line's state is warned when its pressure is at or above :data:`PRESSURE_SHARE` of the fluid's critical pressure
at a temperature within :data:`REDUCED_T_BAND` of the critical temperature,
or when its temperature is within :data:`TEMPERATURE_BAND` of the critical temperature while the fluid is dense
(pressure at or above :data:`DENSE_SHARE` of the critical pressure: a gas at its critical temperature and a few bar is
far from the critical point). There the latent heat goes to zero and cp grows without bound, and formulations
disagree by several percent (issue 12; the project's domain brief).
"""
from __future__ import annotations

from ..messages import Measure, Phrase

__all__ = ["PRESSURE_SHARE", "TEMPERATURE_BAND", "DENSE_SHARE", "REDUCED_T_BAND", "near_critical",
           "near_critical_warnings"]

PRESSURE_SHARE = 0.97  # of p_c: common practice, no source (the "about 0.97")
TEMPERATURE_BAND = 5.0  # K either side of T_c: common practice, no source ("a few kelvin")
DENSE_SHARE = 0.5  # of p_c: below it a state at T_c is a gas far from the critical point (common practice, no source)
# T/T_c where a state at or above PRESSURE_SHARE is near the critical point: a cold compressed liquid (water at 220 bar
# and 25 °C) or a hot supercritical gas (400 bar and 1000 °C) is not (common practice, no source)
REDUCED_T_BAND = (0.9, 1.2)


def near_critical(T: float, P: float, T_c: float, p_c: float) -> bool:
    """Whether a state (K, Pa) lies near the critical point (T_c, p_c) by the rules above.

    >>> near_critical(640.0, 21.5e6, 647.096, 22.064e6)  # water at 0.974 p_c
    True
    >>> near_critical(647.0, 1e5, 647.096, 22.064e6)  # steam at 1 bar and T_c: an ordinary gas
    False
    >>> near_critical(1273.15, 40e6, 647.096, 22.064e6), near_critical(298.15, 22e6, 647.096, 22.064e6)
    (False, False)
    """
    if P >= PRESSURE_SHARE * p_c:
        return REDUCED_T_BAND[0] * T_c <= T <= REDUCED_T_BAND[1] * T_c
    return abs(T - T_c) <= TEMPERATURE_BAND and P >= DENSE_SHARE * p_c


def near_critical_warnings(problem, result) -> list[Phrase]:
    """One warning per line state near its fluid's critical point, at the state's address (a vessel's final state
    once per material)."""
    warnings, seen = [], set()
    for line, solved in zip(problem.lines, result.lines):
        material = line.material
        T_c, p_c = getattr(material, "T_critical", None), getattr(material, "p_critical", None)
        if T_c is None or p_c is None:
            continue
        for spec, T, P in ((line.initial, solved.initial_T, solved.initial_P),
                           (line.final, solved.final_T, solved.final_P)):
            if (spec.label, line.material_name) in seen or not near_critical(T, P, T_c, p_c):
                continue
            seen.add((spec.label, line.material_name))
            warnings.append(Phrase(
                "Near the critical point: {material} at {T} and {P} ({where}) is close to its critical point ({T_c}, "
                "{p_c}); latent heats and cp there differ by several percent between formulations: check this line "
                "against a second source.",
                {"material": line.material_name, "T": Measure(T, "temperature", 1), "P": Measure(P, "pressure"),
                 "where": spec.label, "T_c": Measure(T_c, "temperature", 1), "p_c": Measure(p_c, "pressure")},
                address=spec.label))
    return warnings
