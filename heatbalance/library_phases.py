"""A phase of a user material taken from a library material (e.g. its own solid, water's liquid), in SI.

A library material's phases at a pressure are the intervals between its transitions, within its data range.
A user material's phase that names one (``"from_library": "water"``) takes that phase's enthalpy differences
at :data:`REFERENCE_PRESSURE` (a user material's enthalpy does not depend on pressure), and its range bounds
the user material's own: a phase reaching past it is refused, and a missing min/max temperature defaults to it.
"""
from __future__ import annotations

import math
from dataclasses import dataclass

from .errors import InputError
from .materials import get_material
from .messages import Measure, Phrase
from .properties import Material

__all__ = ["REFERENCE_PRESSURE", "LibraryPhase", "PhaseRange", "phase_ranges", "library_phase"]

REFERENCE_PRESSURE = 101325.0  # Pa: library phases are taken at 1 atm


@dataclass(frozen=True)
class PhaseRange:
    """One phase of a library material at a pressure: from ``T_low`` to ``T_high`` [K]."""

    name: str
    T_low: float
    T_high: float
    valid_low: float  # K: inside [valid_low, valid_high] the data are used as published (else extrapolated)
    valid_high: float


def phase_ranges(material: Material, P: float) -> list[PhaseRange]:
    """The phases of ``material`` at ``P``, cold to hot, each with its temperature range."""
    bounds = [material.t_min, *(tr.T for tr in material.transitions(P)), material.t_max_at(P)]
    valid_low = material.t_min if material.valid_min is None else material.valid_min
    valid_high = material.t_max if material.valid_max is None else material.valid_max
    return [PhaseRange(material.phase_name((low + high) / 2, P), low, high, max(low, valid_low), min(high, valid_high))
            for low, high in zip(bounds, bounds[1:]) if high > low]


@dataclass(frozen=True)
class LibraryPhase:
    """A phase whose enthalpy differences are a library material's (the interface of ``properties.Phase``)."""

    name: str
    material: Material
    range: PhaseRange
    P: float = REFERENCE_PRESSURE
    T_upper: float = math.inf
    latent_to_next: float = 0.0

    def _h(self, T: float) -> float:
        """Enthalpy of this phase at T: at a transition that bounds it, the side of the transition it is on."""
        for tr in self.material.transitions(self.P):
            if abs(T - tr.T) < 1e-6:
                return tr.h_upper if abs(tr.T - self.range.T_low) < 1e-6 else tr.h_lower
        return self.material.enthalpy(T, self.P)

    def enthalpy_rise(self, T1: float, T2: float) -> float:
        """The library phase's h(T2) − h(T1) [J/kg]."""
        return self._h(T2) - self._h(T1)


def library_phase(material_name: str, phase_name: str, where: str) -> tuple[Material, PhaseRange]:
    """The library material and its phase ``phase_name`` at 1 atm; refused at ``where`` if it has none."""
    material = get_material(material_name, where=where)
    ranges = phase_ranges(material, REFERENCE_PRESSURE)
    found = [r for r in ranges if r.name == phase_name]
    if not found:
        raise InputError(Phrase("{material} has no {phase} phase at {P} in the library's data (it has: {phases})",
                                {"material": material_name, "phase": phase_name,
                                 "P": Measure(REFERENCE_PRESSURE, "pressure"),
                                 "phases": ", ".join(r.name for r in ranges)}), where)
    return material, found[0]
