"""Specific enthalpy of materials: the only module that imports CoolProp.

Every material answers the same questions, in SI floats (K, Pa, J/kg):

* ``transitions(P)``: the phase changes on its temperature scale at pressure P,
  each with its temperature and the enthalpy of the lower and upper phase there;
* ``enthalpy(T, P)``: specific enthalpy of the single phase present at T, P;
* ``t_min``/``t_max``: the range of its property data (refused outside).

A state on a plateau (a phase change at constant T and P) has the enthalpy
``h_lower + f * (h_upper - h_lower)`` with ``f`` the fraction of the upper phase.
Enthalpy references differ between materials; only differences are used.
"""
from __future__ import annotations

import threading
from dataclasses import dataclass
from functools import lru_cache

from types import SimpleNamespace

from .errors import InputError, PropertyRangeError
from .messages import Measure, Phrase

__all__ = ["Transition", "Material", "CoolPropFluid", "IncompressibleSolution", "TabulatedMaterial",
           "Phase", "EVALUATIONS", "property_library_versions", "air_transport",
           "coolprop"]


_LIBRARY = SimpleNamespace(module=None)


def _cp():
    """CoolProp's low-level module, imported on first use (a command that needs no properties never pays for it)."""
    if _LIBRARY.module is None:
        import CoolProp.CoolProp as coolprop

        _LIBRARY.module = coolprop
    return _LIBRARY.module


def coolprop():
    """CoolProp's module, loaded on first use: for the modules that call its humid-air functions."""
    return _cp()


@lru_cache(maxsize=1)
def _version() -> str:
    import CoolProp

    return CoolProp.__version__


class _Counter:
    """Counts enthalpy evaluations (for the benchmarks)."""

    def __init__(self) -> None:
        self.count = 0

    def reset(self) -> None:
        self.count = 0


EVALUATIONS = _Counter()


@dataclass(frozen=True)
class Transition:
    """A phase change at temperature ``T`` [K]: ``kind`` is ``"boiling"`` or ``"melting"``."""

    T: float
    kind: str
    h_lower: float
    h_upper: float

    @property
    def latent(self) -> float:
        """Latent heat [J/kg]."""
        return self.h_upper - self.h_lower


class Material:
    """Interface shared by every material."""

    name: str = ""
    source: str = ""
    t_min: float = 0.0
    t_max: float = 0.0

    def transitions(self, P: float) -> list[Transition]:
        return []

    def enthalpy(self, T: float, P: float) -> float:
        raise NotImplementedError

    def phase_name(self, T: float, P: float) -> str:
        """Name of the phase present at a temperature off any plateau."""
        below = [t for t in self.transitions(P) if t.T < T]
        return _UPPER_PHASE[below[-1].kind] if below else self.lowest_phase

    lowest_phase = "liquid"

    #: Inside [valid_min, valid_max] the data are used as published; between these and
    #: [t_min, t_max] they are extrapolated (a warning); outside t_min..t_max they are refused.
    valid_min: float | None = None
    valid_max: float | None = None

    def lowest_temperature(self, P: float) -> float:
        """The lowest temperature of its data at pressure P [K] (``t_min``; a fluid with a melting line: that line)."""
        return self.t_min

    def check_range(self, T: float, where: str = "") -> None:
        """Refuse a temperature outside the property data's range."""
        if not self.t_min - 1e-9 <= T <= self.t_max + 1e-9:
            raise PropertyRangeError(self.name, "temperature", T, self.t_min, self.t_max, "temperature", where)

    def t_max_at(self, P: float) -> float:
        """The highest temperature of the data at pressure P (most materials: ``t_max`` at any pressure)."""
        return self.t_max

    def latent_held(self, T: float, P: float) -> float:
        """Latent heat [J/kg] held at T off its transitions (a material that freezes over a range); else 0."""
        return 0.0

    def extrapolated(self, T: float) -> bool:
        """True when T lies in the extrapolation band of the data."""
        low = self.t_min if self.valid_min is None else self.valid_min
        high = self.t_max if self.valid_max is None else self.valid_max
        return not low <= T <= high


_UPPER_PHASE = {"boiling": "vapour", "melting": "liquid"}


def property_library_versions() -> dict[str, str]:
    """Versions of the property libraries behind the results."""
    return {"CoolProp": _version()}


class _ThreadLocalState(threading.local):
    def __init__(self, backend: str, fluid: str, fraction: float | None):
        self.state = _cp().AbstractState(backend, fluid)
        if fraction is not None:
            self.state.set_mass_fractions([fraction])


IF97_REGION2_T_MAX = 1073.15  # K: regions 1-3 end here (IAPWS-IF97, p <= 100 MPa)
IF97_REGION5_T_MAX = 2273.15  # K: region 5, high-temperature steam (IAPWS-IF97)
IF97_REGION5_P_MAX = 50e6  # Pa: region 5's pressure limit (IAPWS-IF97)


class CoolPropFluid(Material):
    """A pure fluid from CoolProp's low-level ``AbstractState`` (one instance per thread, reused).

    Water and steam use the IAPWS-IF97 backend (``IF97``); other fluids the
    Helmholtz-energy equations of state (``HEOS``).
    """

    def __init__(self, name: str, fluid: str, backend: str = "HEOS"):
        self.name, self.fluid, self.backend = name, fluid, backend
        self._local = _ThreadLocalState(backend, fluid, None)
        self._transitions: dict[float, list[Transition]] = {}
        CP = _cp()
        self._PT = CP.PT_INPUTS
        probe = CP.AbstractState("HEOS", fluid)
        self.t_min = max(probe.Ttriple(), probe.Tmin()) if backend == "HEOS" else 273.15
        # IF97: regions 1-3 to 1073.15 K at p <= 100 MPa, region 5 to 2273.15 K at p <= 50 MPa (IAPWS-IF97, 2007
        # revision, section 1); CoolProp's IF97 backend computes region 5 though its Tmax() says 1073.15 K
        self.t_max = probe.Tmax() if backend == "HEOS" else IF97_REGION5_T_MAX
        self.p_critical = probe.p_critical()
        self.T_critical = probe.T_critical()
        self.p_triple = probe.trivial_keyed_output(CP.iP_triple)
        self.p_max = probe.pmax() if backend == "HEOS" else 100e6
        # IF97 has no data below the triple-point pressure (611.657 Pa); HEOS gases go lower.
        self.p_min = self.p_triple if backend == "IF97" else 0.0
        label = "IAPWS-IF97" if backend == "IF97" else "Helmholtz equation of state"
        self.source = f"CoolProp {_version()}, {backend} backend ({label})"

    def _state(self):
        return self._local.state

    def lowest_temperature(self, P: float) -> float:
        """Below its melting line the fluid is solid, which its equation of state does not model: at a pressure above
        the triple point's the data start at the melting temperature T_m(P) (above T_triple: it rises with P;
        methanol at 1.3 bar: 175.63 K against 175.61 K, CoolProp's HEOS melting line)."""
        if self.backend != "HEOS":
            return self.t_min
        return max(self.t_min, _melting_temperature(self.fluid, P))

    def check_pressure(self, P: float, where: str = "") -> None:
        if not self.p_min <= P <= self.p_max:
            raise PropertyRangeError(self.name, "pressure", P, self.p_min, self.p_max, "pressure", where)

    def phase_name(self, T: float, P: float) -> str:
        return "supercritical fluid" if P >= self.p_critical else super().phase_name(T, P)

    def transitions(self, P: float) -> list[Transition]:
        """The boiling transition at P (kept per pressure: a solve asks many times; do not modify the list)."""
        found = self._transitions.get(P)
        if found is None:
            # supercritical, or below the triple point (sublimation is not modelled): no transition
            found = [_saturation(self, P)] if self.p_triple < P < self.p_critical else []
            if len(self._transitions) < 4096:
                self._transitions[P] = found
        return found

    def t_max_at(self, P: float) -> float:
        if self.backend == "IF97" and P > IF97_REGION5_P_MAX:
            return IF97_REGION2_T_MAX
        return self.t_max

    def enthalpy(self, T: float, P: float) -> float:
        EVALUATIONS.count += 1
        if T > IF97_REGION2_T_MAX and self.backend == "IF97" and P > IF97_REGION5_P_MAX:
            raise InputError(Phrase("no IAPWS-IF97 data for {name} at {T} and {P}: above {T2} the formulation "
                                    "(region 5, to {T5}) covers pressures up to {P5} only",
                                    {"name": self.name, "T": Measure(T, "temperature"), "P": Measure(P, "pressure"),
                                     "T2": Measure(IF97_REGION2_T_MAX, "temperature"),
                                     "T5": Measure(IF97_REGION5_T_MAX, "temperature"),
                                     "P5": Measure(IF97_REGION5_P_MAX, "pressure")}))
        state = self._state()
        try:
            state.update(self._PT, P, T)
            return state.hmass()
        except (ValueError, IndexError) as exc:
            low = self.lowest_temperature(P)
            if T < low:  # below the melting line: solid, not modelled
                raise PropertyRangeError(self.name, "temperature", T, low, self.t_max, "temperature") from exc
            if not self.p_triple < P < self.p_critical:
                raise PropertyRangeError(self.name, "pressure", P, self.p_min, self.p_max, "pressure") from exc
            sat = _saturation(self, P)  # on the saturation line (IF97: "Region 4 with T and p")
            if abs(T - sat.T) > 1e-3:
                raise InputError(Phrase("no property data for {name} at {T}, {P} ({detail})",
                                        {"name": self.name, "T": Measure(T, "temperature"),
                                         "P": Measure(P, "pressure"), "detail": str(exc)})) from exc
            return sat.h_lower if T <= sat.T else sat.h_upper


@lru_cache(maxsize=4096)
def _melting_temperature(fluid: str, P: float) -> float:
    """T_m(P) [K] of a HEOS fluid's melting line (0 when it has none, or none at this pressure)."""
    CP = _cp()
    state = CP.AbstractState("HEOS", fluid)
    if not state.has_melting_line():
        return 0.0
    try:
        return float(state.melting_line(CP.iT, CP.iP, P))
    except ValueError:  # outside the line's range, or a form CoolProp cannot invert
        return 0.0


@lru_cache(maxsize=4096)
def _saturation_cached(fluid: str, backend: str, P: float) -> tuple[float, float, float]:
    CP = _cp()
    state = CP.AbstractState(backend, fluid)
    state.update(CP.PQ_INPUTS, P, 0.0)
    T, h_liquid = state.T(), state.hmass()
    state.update(CP.PQ_INPUTS, P, 1.0)
    return T, h_liquid, state.hmass()


def _saturation(fluid: CoolPropFluid, P: float) -> Transition:
    T, h_liquid, h_vapour = _saturation_cached(fluid.fluid, fluid.backend, P)
    return Transition(T, "boiling", h_liquid, h_vapour)


class IncompressibleSolution(Material):
    """An aqueous solution at a mass fraction, from CoolProp's incompressible-fluid library.

    Liquid only: no boiling or freezing is modelled, so states are refused
    below the solution's freezing point and above the fit's upper limit.
    """

    def __init__(self, name: str, code: str, fraction: float, fraction_max: float):
        if not 0.0 <= fraction <= fraction_max:
            raise InputError(f"mass fraction {fraction:g} of {name} must be between 0 and {fraction_max:g}")
        self.name, self.code, self.fraction = name, code, fraction
        self._local = _ThreadLocalState("INCOMP", code, fraction)
        state = self._local.state
        try:
            t_freeze = _cp().PropsSI("T_freeze", "T", 293.15, "P", 101325.0, f"INCOMP::{code}[{fraction}]")
        except ValueError:
            t_freeze = state.Tmin()
        self.t_min = max(state.Tmin(), t_freeze)
        self.t_max = state.Tmax()
        self.source = f"CoolProp {_version()}, incompressible solution {code} (mass-fraction fit)"
        self._PT = _cp().PT_INPUTS

    def enthalpy(self, T: float, P: float) -> float:
        EVALUATIONS.count += 1
        state = self._local.state
        state.update(self._PT, P, T)
        return state.hmass()


@dataclass(frozen=True)
class Phase:
    """A condensed or gas phase with cp(T) = a + b·T + c·T² [J/(kg·K), T in K], up to ``T_upper``."""

    name: str
    cp: tuple[float, ...]
    T_upper: float = float("inf")
    latent_to_next: float = 0.0

    def enthalpy_rise(self, T1: float, T2: float) -> float:
        """∫cp dT from T1 to T2 [J/kg]."""
        return sum(c / (k + 1) * (T2 ** (k + 1) - T1 ** (k + 1)) for k, c in enumerate(self.cp))


class TabulatedMaterial(Material):
    """A material described by cp per phase, transition temperatures and latent heats.

    Enthalpy is zero for the lowest phase at 298.15 K and integrates cp
    through each phase, adding the latent heat at each transition.
    The ``phases`` are ordered from cold to hot; each but the last ends at ``T_upper``
    with ``latent_to_next`` [J/kg] to reach the next.
    """

    _REFERENCE_T = 298.15

    def __init__(self, name: str, phases: tuple[Phase, ...], t_min: float, t_max: float, source: str):
        self.name, self.phases, self.source = name, phases, source
        self.t_min, self.t_max = t_min, t_max

    @property
    def lowest_phase(self) -> str:  # type: ignore[override]
        return self.phases[0].name

    def _h_start(self, index: int) -> tuple[float, float]:
        """Enthalpy of phase ``index`` at its lower bound."""
        h, T = 0.0, self._REFERENCE_T
        for phase in self.phases[:index]:
            h += phase.enthalpy_rise(T, phase.T_upper) + phase.latent_to_next
            T = phase.T_upper
        return h, T

    def transitions(self, P: float) -> list[Transition]:
        out = []
        for i, phase in enumerate(self.phases[:-1]):
            h0, T0 = self._h_start(i)
            h_lower = h0 + phase.enthalpy_rise(T0, phase.T_upper)
            kind = "boiling" if self.phases[i + 1].name == "vapour" else "melting"
            out.append(Transition(phase.T_upper, kind, h_lower, h_lower + phase.latent_to_next))
        return out

    def enthalpy(self, T: float, P: float) -> float:
        EVALUATIONS.count += 1
        index = next((i for i, p in enumerate(self.phases) if T <= p.T_upper), len(self.phases) - 1)
        h0, T0 = self._h_start(index)
        return h0 + self.phases[index].enthalpy_rise(T0, T)

    def phase_name(self, T: float, P: float) -> str:
        return next((p.name for p in self.phases if T <= p.T_upper), self.phases[-1].name)


_AIR = SimpleNamespace(local=None)


def air_transport(T: float, P: float = 101325.0) -> tuple[float, float, float, float]:
    """Dry air's density [kg/m³], viscosity [Pa·s], conductivity [W/(m·K)] and cp [J/(kg·K)] at T [K], P [Pa].

    CoolProp's ``Air`` (Lemmon et al. 2000 pseudo-pure equation of state; transport by Lemmon & Jacobsen
    2004), for surface heat-loss correlations (:mod:`heatbalance.losses`). Refused outside 60–2000 K.
    """
    if not 60.0 <= T <= 2000.0:
        raise PropertyRangeError("air", "film temperature", T, 60.0, 2000.0, "temperature")
    if _AIR.local is None:
        _AIR.local = _ThreadLocalState("HEOS", "Air", None)
    state = _AIR.local.state
    state.update(_cp().PT_INPUTS, P, T)
    return state.rhomass(), state.viscosity(), state.conductivity(), state.cpmass()
