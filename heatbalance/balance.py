"""The heat balance: build a numeric problem from a worksheet, solve it for its one unknown.

    Σ m·(h_final − h_initial) + Σ equipment heat = Σ duties + Σ reaction heat − Σ losses

Amount and duty unknowns enter linearly and are solved directly. A temperature
unknown is found by bracketing: the residual is evaluated on both sides of every
phase change the dependent lines can cross; a sign change across a phase change
is a plateau answer (the transition temperature and a phase fraction), a sign
change within a single-phase segment is found with Brent's method.
"""
from __future__ import annotations

import math
from dataclasses import dataclass, field
from functools import cached_property, partial

from scipy.optimize import brentq

from .errors import InputError, NoSolutionError, UnitError
from .materials import get_material
from .properties import (IncompressibleSolution, Material, Phase, TabulatedMaterial, Transition,
                         property_library_versions)
from .reactions import reaction_enthalpy
from .reactor import screen_worksheet
from .results import (Answer, LineResult, Result, TermResult, heat_kind, heat_text, pressure_text,
                      specific_energy_text, temperature_text)
from .units import ATMOSPHERE, DISPLAY_UNITS, check_unit, from_si, is_us_customary, kind_of, to_si
from .worksheet import Quantity, State, Unknown, UserMaterial, Worksheet

__all__ = ["solve", "unknown_choices", "build_problem", "Problem"]

T_TOL = 1e-6  # K: two temperatures closer than this are the same (a state on a plateau)
LATENT_NOTICE_KJ_PER_KG = 0.01  # a line's latent heat above this is reported as a phase change
ASSUMPTIONS = [
    "Ideal mixing: no heat of mixing or solution unless entered as a duty.",
    "Losses as entered.",
    "Reaction heat applied at the process temperature (no Kirchhoff correction).",
    "Gauge pressures are relative to the standard atmosphere, 1.01325 bar.",
]


# --------------------------------------------------------------------------- problem model
@dataclass
class StateSpec:
    """A state in SI: either on a temperature variable, or on a plateau at a fraction."""

    label: str
    P: float
    var: str | None = None
    plateau: str | None = None  # boiling | melting
    fraction: float | None = None  # of the upper phase


@dataclass
class Line:
    name: str
    kind: str  # stream | charge
    material_name: str
    material: Material
    amount: float | None  # kg/s or kg (None: the unknown)
    initial: StateSpec
    final: StateSpec
    amount_label: str = ""
    vessel: str | None = None  # for a charge: its vessel and its own name
    charge: str | None = None


@dataclass
class EquipmentHeat:
    name: str
    initial_var: str
    final: StateSpec  # the vessel's final state (its temperature)
    final_material: Material
    heat_capacity: float | None = None  # J/K
    material: Material | None = None
    mass: float = 0.0


@dataclass
class HeatTerm:
    name: str
    kind: str  # duty | loss | reaction
    heat: float | None  # + into the process; None: the unknown
    detail: str = ""


@dataclass
class Problem:
    """A worksheet in plain SI numbers."""

    title: str
    basis: str
    lines: list[Line]
    equipment: list[EquipmentHeat]
    terms: list[HeatTerm]
    temperatures: dict[str, float | None]
    var_labels: dict[str, str]
    var_units: dict[str, str]
    unknown: Unknown
    unknown_target: object  # a Line, a HeatTerm, or a temperature variable key
    unknown_label: str
    unknown_unit: str
    system: str = "SI"
    warnings: list[str] = field(default_factory=list)
    assumptions: list[str] = field(default_factory=list)


# --------------------------------------------------------------------------- building
class _Builder:
    """Turns a validated :class:`Worksheet` into a :class:`Problem`."""

    def __init__(self, ws: Worksheet, system: str):
        self.ws, self.system = ws, system
        self.basis = ws.basis.kind
        self.duration = self._duration()
        self.user_materials = {m.name: _user_material(m) for m in ws.materials}
        self.temperatures: dict[str, float | None] = {}
        self.var_labels: dict[str, str] = {}
        self.var_units: dict[str, str] = {}
        self.assumptions = list(ASSUMPTIONS)
        self.unknown = _the_unknown(ws)

    def _duration(self) -> float | None:
        q = self.ws.basis.duration
        if q is None:
            return None
        value = to_si(q.value, q.unit, "duration", "basis duration")
        if value <= 0:
            raise InputError(f"the duration must be positive, not {q}", "basis duration")
        return value

    # -- quantities on the basis
    def basis_value(self, q: Quantity, total: str, rate: str, where: str) -> float:
        """A total (batch) or a rate (continuous); a rate in batch is applied over the duration."""
        if self.basis == "continuous":
            return to_si(q.value, q.unit, rate, where)
        kind = kind_of(q.unit, (total, rate), where)
        value = to_si(q.value, q.unit, kind, where)
        if kind == rate:
            if self.duration is None:
                raise InputError(f"{q} is a rate; a batch worksheet needs a duration to apply it", where)
            self.assumptions.append(f"{where}: {q} applied over the batch duration {self.ws.basis.duration}.")
            value *= self.duration
        return value

    def amount(self, q: Quantity | None, where: str, is_unknown: bool) -> float | None:
        if is_unknown:
            return None
        if q is None:
            raise InputError("no value given, and it is not the unknown: enter it or make it the unknown",
                             where)
        value = self.basis_value(q, "mass", "mass_flow", where)
        if value < 0:
            raise InputError(f"a mass or flow cannot be negative ({q})", where)
        return value

    def material(self, name: str, fraction: float | None, where: str) -> Material:
        return get_material(name, fraction, self.user_materials, where)

    def pressure(self, q: Quantity, where: str) -> float:
        return to_si(q.value, q.unit, "pressure", where)

    # -- temperatures and states
    def variable(self, key: str, label: str, q: Quantity | None) -> str:
        is_unknown = self.unknown.kind == "temperature" and self._unknown_var == key
        if q is None and not is_unknown:
            raise InputError("no temperature given, and it is not the unknown: enter it or make it the unknown",
                             label)
        self.temperatures[key] = None if is_unknown else to_si(q.value, q.unit, "temperature", label)
        self.var_labels[key] = label
        self.var_units[key] = q.unit if q is not None else DISPLAY_UNITS[self.system]["temperature"]
        return key

    def state(self, state: State, key: str, label: str, line_pressure: float) -> StateSpec:
        P = self.pressure(state.pressure, f"{label} pressure") if state.pressure else line_pressure
        is_unknown = self.unknown.kind == "temperature" and self._unknown_var == key
        if state.common is not None and not is_unknown:
            common = self._common_key(state.common, label)
            return StateSpec(label, P, var=common)
        if not is_unknown and state.vapour_fraction is not None:
            return StateSpec(label, P, plateau="boiling", fraction=state.vapour_fraction)
        if not is_unknown and state.solid_fraction is not None:
            return StateSpec(label, P, plateau="melting", fraction=1.0 - state.solid_fraction)
        return StateSpec(label, P, var=self.variable(key, f"{label} temperature", state.temperature))

    def _common_key(self, name: str, where: str) -> str:
        key = f"common:{name}"
        if key not in self.temperatures:
            raise InputError(f"no common temperature called '{name}'", where)
        return key

    # -- the unknown
    @cached_property
    def _unknown_var(self) -> str | None:
        u = self.unknown
        if u.kind != "temperature":
            return None
        if u.common is not None:
            return f"common:{u.common}"
        if u.charge is not None:
            charge = next((c for v in self.ws.vessels if v.name == u.line for c in v.charges if c.name == u.charge),
                          None)
            if charge is not None:
                common = charge.initial.common
                return f"common:{common}" if common else f"charge:{u.line}/{u.charge}:initial"
        stream = next((s for s in self.ws.streams if s.name == u.line), None)
        if stream is not None and u.end in ("inlet", "outlet"):
            state = stream.inlet if u.end == "inlet" else stream.outlet
            return f"common:{state.common}" if state.common else f"stream:{u.line}:{u.end}"
        vessel = next((v for v in self.ws.vessels if v.name == u.line), None)
        if vessel is not None and u.end == "final":
            return f"common:{vessel.final.common}" if vessel.final.common else f"vessel:{u.line}:final"
        raise InputError(f"the unknown temperature names no state of this worksheet ({_unknown_text(u)})",
                         "unknown")

    # -- the whole problem
    def build(self) -> Problem:
        ws = self.ws
        if ws.vessels and self.basis == "continuous":
            raise InputError("vessels hold batch charges: switch the basis to batch, or model the vessel's "
                             "feeds as streams", f"vessel {ws.vessels[0].name}")
        if not ws.streams and not ws.vessels:
            raise InputError("the worksheet has no streams or vessels", "worksheet")
        unknown_var = self._unknown_var
        for common in ws.common_temperatures:
            self.variable(f"common:{common.name}", f"common temperature '{common.name}'", common.temperature)
        lines = [self._stream(s) for s in ws.streams]
        equipment = []
        for vessel in ws.vessels:
            vessel_lines, vessel_equipment = self._vessel(vessel)
            lines += vessel_lines
            equipment += vessel_equipment
        terms = self._terms()
        target, label, unit = self._target(lines, terms, unknown_var)
        return Problem(ws.title, self.basis, lines, equipment, terms, self.temperatures, self.var_labels,
                       self.var_units, self.unknown, target, label, unit, self.system,
                       assumptions=self.assumptions)

    def _stream(self, s) -> Line:
        where = f"stream {s.name}"
        P = self.pressure(s.pressure, f"{where} pressure")
        is_unknown = self.unknown.kind == "amount" and self.unknown.line == s.name and self.unknown.charge is None
        return Line(s.name, "stream", s.material, self.material(s.material, s.mass_fraction, where),
                    self.amount(s.flow, f"{where} flow", is_unknown),
                    self.state(s.inlet, f"stream:{s.name}:inlet", f"{where} inlet", P),
                    self.state(s.outlet, f"stream:{s.name}:outlet", f"{where} outlet", P),
                    amount_label=f"{s.name} flow")

    def _vessel(self, v) -> tuple[list[Line], list[EquipmentHeat]]:
        where = f"vessel {v.name}"
        P = self.pressure(v.pressure, f"{where} pressure")
        final = self.state(v.final, f"vessel:{v.name}:final", f"{where} final", P)
        lines = []
        for c in v.charges:
            cw = f"{where}, charge {c.name}"
            is_unknown = (self.unknown.kind == "amount" and self.unknown.line == v.name
                          and self.unknown.charge == c.name)
            lines.append(Line(f"{v.name} / {c.name}", "charge", c.material,
                              self.material(c.material, c.mass_fraction, cw),
                              self.amount(c.mass, f"{cw} mass", is_unknown),
                              self.state(c.initial, f"charge:{v.name}/{c.name}:initial", f"{cw} initial", P),
                              final, amount_label=f"{v.name} / {c.name} mass", vessel=v.name, charge=c.name))
        if final.plateau and len({line.material_name for line in lines}) > 1:
            raise InputError("a final phase fraction needs all charges of one material; give a temperature",
                             f"{where} final")
        return lines, ([self._equipment(v, lines, final)] if v.equipment else [])

    def _equipment(self, v, lines: list[Line], final: StateSpec) -> EquipmentHeat:
        e, where = v.equipment, f"vessel {v.name} equipment"
        if e.initial_temperature is not None:
            initial = self.variable(f"equipment:{v.name}:initial", f"{where} initial temperature",
                                    e.initial_temperature)
        elif lines[0].initial.var is not None:
            initial = lines[0].initial.var
        else:
            raise InputError("give the equipment's initial temperature (the first charge starts on a plateau)",
                             where)
        heat = EquipmentHeat(f"{v.name} equipment", initial, final, lines[0].material)
        if e.heat_capacity is not None:
            heat.heat_capacity = to_si(e.heat_capacity.value, e.heat_capacity.unit, "heat_capacity", where)
            if heat.heat_capacity < 0:
                raise InputError(f"a heat capacity cannot be negative ({e.heat_capacity})", where)
        else:
            heat.material = self.material(e.material, None, where)
            heat.mass = to_si(e.mass.value, e.mass.unit, "mass", f"{where} mass")
            if heat.mass < 0:
                raise InputError(f"a mass cannot be negative ({e.mass})", f"{where} mass")
        return heat

    def _terms(self) -> list[HeatTerm]:
        total = "energy"
        terms = []
        for d in self.ws.duties:
            is_unknown = self.unknown.kind == "duty" and self.unknown.term == d.name
            if d.value is None and not is_unknown:
                raise InputError("no value given, and it is not the unknown", f"duty {d.name}")
            value = None if is_unknown else self.basis_value(d.value, total, "power", f"duty {d.name}")
            terms.append(HeatTerm(d.name, "duty", value, "heater +, cooler −"))
        for loss in self.ws.losses:
            value = self.basis_value(loss.value, total, "power", f"loss {loss.name}")
            if value < 0:
                raise InputError(f"enter a loss as a positive amount of heat leaving ({loss.value})",
                                 f"loss {loss.name}")
            terms.append(HeatTerm(loss.name, "loss", -value, f"{loss.value} lost"))
        for r in self.ws.reactions:
            terms.append(self._reaction(r))
        return terms

    def _reaction(self, r) -> HeatTerm:
        where = f"reaction {r.name}"
        hess = None if r.equation is None else reaction_enthalpy(r.equation, r.key_reactant,
                                                                 where=f"{where} equation")
        if r.enthalpy is not None:
            dH = to_si(r.enthalpy.value, r.enthalpy.unit, "molar_energy", f"{where} heat of reaction")
        else:
            dH = hess.dH_per_key
        if hess is not None:
            used = "the entered ΔH is used; the equation gives " if r.enthalpy is not None else ""
            tables = "; ".join(f"{name} = {source}" for name, source in hess.sources.items())
            self.assumptions.append(f"{where}: {used}{hess.text}. Tables: {tables}.")
        if r.molar_mass is None and hess is not None and \
                kind_of(r.amount.unit, ("amount", "molar_flow", "mass", "mass_flow"), f"{where} amount") \
                in ("mass", "mass_flow"):
            mass = self.basis_value(r.amount, "mass", "mass_flow", f"{where} amount")
            moles = mass / hess.key_molar_mass
        elif r.molar_mass is None:
            moles = self.basis_value(r.amount, "amount", "molar_flow", f"{where} amount")
        else:
            mass = self.basis_value(r.amount, "mass", "mass_flow", f"{where} amount")
            M = to_si(r.molar_mass.value, r.molar_mass.unit, "molar_mass", f"{where} molar mass")
            if M <= 0:
                raise InputError(f"a molar mass must be positive ({r.molar_mass})", f"{where} molar mass")
            moles = mass / M
        if moles < 0:
            raise InputError(f"the amount reacted cannot be negative ({r.amount})", f"{where} amount")
        reacted = moles * r.conversion
        amount_kind = "amount" if self.basis == "batch" else "molar_flow"
        amount_unit = DISPLAY_UNITS[self.system][amount_kind]
        entered = str(r.enthalpy) if r.enthalpy is not None else \
            f"{dH / 1000:.2f} kJ/mol {hess.key_reactant} (Hess's law, 25 °C)"
        detail = (f"ΔH = {entered} × {from_si(reacted, amount_unit, amount_kind):.4g} {amount_unit} reacted "
                  f"(conversion {r.conversion:.0%})")
        return HeatTerm(r.name, "reaction", -dH * reacted, detail)

    def _target(self, lines: list[Line], terms: list[HeatTerm], var: str | None):
        u = self.unknown
        if u.kind == "temperature":
            if var not in self.var_labels:
                raise InputError(f"the unknown temperature names no state of this worksheet ({_unknown_text(u)})",
                                 "unknown")
            return var, self.var_labels[var], self.var_units[var]
        if u.kind == "amount":
            line = next((ln for ln in lines if ln.amount is None), None)
            if line is None:
                raise InputError(f"the unknown amount names no line of this worksheet ({_unknown_text(u)})",
                                 "unknown")
            return line, line.amount_label, self._amount_unit(line)
        term = next((t for t in terms if t.heat is None), None)
        if term is None:
            raise InputError(f"the unknown duty names no duty of this worksheet ({_unknown_text(u)})", "unknown")
        duty = next(d for d in self.ws.duties if d.name == term.name)
        unit = duty.value.unit if duty.value is not None else DISPLAY_UNITS[self.system][heat_kind(self.basis)]
        return term, f"duty {term.name}", unit

    def _amount_unit(self, line: Line) -> str:
        if line.kind == "stream":
            q = next(s.flow for s in self.ws.streams if s.name == line.name)
        else:
            q = next(c.mass for v in self.ws.vessels if v.name == line.vessel for c in v.charges
                     if c.name == line.charge)
        return q.unit if q is not None else DISPLAY_UNITS[self.system][
            "mass_flow" if self.basis == "continuous" else "mass"]


def _unknown_text(u: Unknown) -> str:
    return ", ".join(f"{k}={v}" for k, v in u.model_dump(exclude_none=True).items())


def _the_unknown(ws: Worksheet) -> Unknown:
    if not ws.unknowns:
        raise InputError("no unknown: mark one quantity (a flow or mass, a temperature, or a duty) to solve for",
                         "unknown")
    if len(ws.unknowns) > 1:
        listed = "; ".join(_unknown_text(u) for u in ws.unknowns)
        raise InputError(f"{len(ws.unknowns)} unknowns ({listed}): a balance solves for exactly one; "
                         "give a value to all but one", "unknown")
    return ws.unknowns[0]


def _user_material(m: UserMaterial) -> TabulatedMaterial:
    where = f"material {m.name}"
    phases = []
    for i, p in enumerate(m.phases):
        cp0 = to_si(p.cp.value, p.cp.unit, "specific_heat", f"{where} {p.name} cp")
        scale = cp0 / p.cp.value if p.cp.value else 1.0
        if cp0 <= 0:
            raise InputError(f"cp must be positive ({p.cp})", f"{where} {p.name} cp")
        last = i == len(m.phases) - 1
        if not last and (p.up_to is None or p.latent_heat is None):
            raise InputError("every phase but the last needs 'up_to' (its transition temperature) and "
                             "'latent_heat'", f"{where} {p.name}")
        T_upper = to_si(p.up_to.value, p.up_to.unit, "temperature", f"{where} {p.name} up_to") if not last \
            else math.inf
        latent = 0.0 if last else to_si(p.latent_heat.value, p.latent_heat.unit, "specific_energy",
                                        f"{where} {p.name} latent heat")
        if latent < 0:
            raise InputError(f"a latent heat cannot be negative ({p.latent_heat})", f"{where} {p.name}")
        phases.append(Phase(p.name, (cp0, p.cp_per_kelvin * scale, p.cp_per_kelvin2 * scale), T_upper, latent))
    t_min = to_si(m.min_temperature.value, m.min_temperature.unit, "temperature", f"{where} min temperature")
    t_max = to_si(m.max_temperature.value, m.max_temperature.unit, "temperature", f"{where} max temperature")
    uppers = [p.T_upper for p in phases[:-1]]
    if not t_min < t_max or uppers != sorted(uppers) or any(not t_min <= T <= t_max for T in uppers):
        raise InputError("temperatures must rise: min temperature < each transition < max temperature", where)
    return TabulatedMaterial(m.name, tuple(phases), t_min, t_max, f"user-defined: {m.source}")


def build_problem(ws: Worksheet, system: str = "SI") -> Problem:
    """Check a worksheet and convert it to SI numbers."""
    return _Builder(ws, system).build()


# --------------------------------------------------------------------------- evaluation
def _transition_at(material: Material, P: float, T: float) -> Transition | None:
    return next((t for t in material.transitions(P) if abs(t.T - T) < T_TOL), None)


def _plateau_transition(material: Material, state: StateSpec) -> Transition:
    found = next((t for t in material.transitions(state.P) if t.kind == state.plateau), None)
    if found is None:
        raise InputError(f"{material.name} has no {state.plateau} plateau at {state.P / 1e5:.4g} bar(a) in its "
                         f"property data; give a temperature instead", state.label)
    return found


@dataclass
class Point:
    """Where a state sits: temperature, the upper-phase fraction on a plateau (or None), enthalpy."""

    T: float
    fraction: float | None
    h: float


def evaluate_state(material: Material, state: StateSpec, temperatures: dict, plateau_side: dict) -> Point:
    """Enthalpy of a state; ``plateau_side[var]`` gives the upper-phase fraction for a T on a plateau."""
    if state.plateau is not None:
        tr = _plateau_transition(material, state)
        return Point(tr.T, state.fraction, tr.h_lower + state.fraction * tr.latent)
    T = temperatures[state.var]
    material.check_range(T, state.label)
    if hasattr(material, "check_pressure"):
        material.check_pressure(state.P, state.label)
    fraction = plateau_side.get(state.var)
    if fraction is not None:
        tr = _transition_at(material, state.P, T)
        if tr is not None:
            return Point(T, fraction, tr.h_lower + fraction * tr.latent)
    return Point(T, None, material.enthalpy(T, state.P))


def _equipment_heat(e: EquipmentHeat, temperatures: dict, plateau_side: dict) -> float:
    T0 = temperatures[e.initial_var]
    T1 = evaluate_state(e.final_material, e.final, temperatures, {}).T if e.final.plateau else \
        temperatures[e.final.var]
    if e.heat_capacity is not None:
        return e.heat_capacity * (T1 - T0)
    e.material.check_range(T0, e.name)
    e.material.check_range(T1, e.name)
    return e.mass * (e.material.enthalpy(T1, ATMOSPHERE) - e.material.enthalpy(T0, ATMOSPHERE))


def _line_dh(line: Line, temperatures: dict, plateau_side: dict) -> float:
    h0 = evaluate_state(line.material, line.initial, temperatures, plateau_side).h
    h1 = evaluate_state(line.material, line.final, temperatures, plateau_side).h
    return h1 - h0


def _depends(line: Line, var: str) -> bool:
    return line.initial.var == var or line.final.var == var


# --------------------------------------------------------------------------- solving
def _solve_linear(p: Problem) -> None:
    """Solve an amount or duty unknown directly (they enter the balance linearly)."""
    temps = p.temperatures
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
                              p.unknown_label)
    if supplied == 0 and absorbed == 0:
        raise NoSolutionError(f"nothing else in the balance gives {target.name} heat or takes heat from it, so "
                              "its amount is undetermined: add the duty or the line that exchanges heat with it, "
                              "or solve for one of its temperatures instead", p.unknown_label)
    amount = (supplied - absorbed) / dh
    if amount < 0:
        raise NoSolutionError(_negative_amount_message(p, target, dh, supplied - absorbed), p.unknown_label)
    target.amount = amount


def _negative_amount_message(p: Problem, line: Line, dh: float, surplus: float) -> str:
    role = "absorbs heat" if dh > 0 else "gives up heat"
    other = "a heat surplus" if surplus > 0 else "a heat deficit"
    return (f"the balance would need a negative amount: {line.name} {role} "
            f"({specific_energy_text(abs(dh), p.system)}), but the rest of the worksheet already has {other} of "
            f"{heat_text(abs(surplus), p.basis, p.system)}. Check the states of this line and the duties.")


def _solve_temperature(p: Problem) -> float | None:
    """Solve a temperature unknown; return the upper-phase fraction if the answer is on a plateau."""
    var = p.unknown_target
    temps = dict(p.temperatures)
    dependent = [ln for ln in p.lines if _depends(ln, var)]
    equipment_dep = [e for e in p.equipment if var in (e.initial_var, e.final.var)]
    if not dependent and not equipment_dep:
        raise InputError("no line's state depends on this temperature", p.unknown_label)
    fixed = sum(ln.amount * _line_dh(ln, temps, {}) for ln in p.lines if not _depends(ln, var))
    fixed += sum(_equipment_heat(e, temps, {}) for e in p.equipment if e not in equipment_dep)
    fixed -= sum(t.heat for t in p.terms)

    def residual(T: float, side: float | None = None) -> float:
        temps[var] = T
        sides = {var: side} if side is not None else {}
        value = fixed + sum(ln.amount * _line_dh(ln, temps, sides) for ln in dependent)
        return value + sum(_equipment_heat(e, temps, sides) for e in equipment_dep)

    materials = [ln.material for ln in dependent] + [e.material for e in equipment_dep if e.material]
    low, high = max(m.t_min for m in materials), min(m.t_max for m in materials)
    if low >= high:
        raise NoSolutionError("the property data of the lines sharing this temperature do not overlap "
                              f"({', '.join(sorted({m.name for m in materials}))})", p.unknown_label)
    breaks = sorted({tr.T for ln in dependent for st in (ln.initial, ln.final) if st.var == var
                     for tr in ln.material.transitions(st.P) if low - T_TOL <= tr.T <= high + T_TOL})
    # (T, residual on its cold side, residual on its hot side) at each bound and phase change
    points = [(T, residual(T, 0.0), residual(T, 1.0)) for T in breaks]
    for bound in (low, high):
        if not any(abs(bound - T) < T_TOL for T in breaks):
            r = residual(bound)
            points.append((bound, r, r))
    points.sort()
    for i, (T, r_cold, r_hot) in enumerate(points):
        if r_cold == 0 or r_hot == 0:
            p.temperatures[var] = T
            return (0.0 if r_cold == 0 else 1.0) if r_cold != r_hot else None
        if r_cold * r_hot < 0:
            p.temperatures[var] = T
            return -r_cold / (r_hot - r_cold)
        if i + 1 < len(points) and r_hot * points[i + 1][1] < 0:
            p.temperatures[var] = _root_in_segment(residual, (T, r_hot), points[i + 1][:2])
            return None
    limits = {low: next(m.name for m in materials if m.t_min == low),
              high: next(m.name for m in materials if m.t_max == high)}
    raise NoSolutionError(_unreachable_message(p, points, limits), p.unknown_label)


def _root_in_segment(residual, left: tuple[float, float], right: tuple[float, float]) -> float:
    """Brent's method on one single-phase segment; its ends take the residual of the segment's side."""
    ends = dict((left, right))

    def on_segment(T: float) -> float:
        return ends[T] if T in ends else residual(T)

    return brentq(on_segment, left[0], right[0], xtol=1e-7, rtol=1e-12, maxiter=100)


def _unreachable_message(p: Problem, points, limits: dict[float, str]) -> str:
    (low, _, r_low), (high, r_high, _) = points[0], points[-1]
    too_much = r_low < 0 and r_high < 0
    gap = heat_text(min(abs(r_low), abs(r_high)), p.basis, p.system)
    bound = high if too_much else low
    T = partial(temperature_text, system=p.system)
    return (f"no temperature between {T(low)} and {T(high)} (the range of the property "
            f"data) closes the balance: even at {T(bound)} (the {'upper' if too_much else 'lower'} "
            f"limit of the data for {limits[bound]}) there is {'too much' if too_much else 'too little'} heat by "
            f"{gap}. Check the duties, the amounts and the other states.")


def solve(ws: Worksheet, system: str = "SI") -> Result:
    """Solve a worksheet for its one unknown.

    Parameters
    ----------
    ws : Worksheet
        A validated worksheet.
    system : str
        ``"SI"`` or ``"US"``: the display unit of an unknown that has no unit of its own.

    Returns
    -------
    Result
        The answer in the user's unit, each line's sensible and latent heat, each
        heat term, the closure residual, warnings, assumptions and data sources.

    Raises
    ------
    InputError
        A value, unit or state that cannot be used (the message says where).
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
    >>> solve(ws).answer.text
    '120 kW'
    """
    if system not in DISPLAY_UNITS:
        raise InputError(f"unit system must be one of {sorted(DISPLAY_UNITS)}", "units")
    p = build_problem(ws, system)
    fraction = _solve_temperature(p) if p.unknown.kind == "temperature" else _solve_linear(p)
    result = _result(p, fraction)
    result.screening = screen_worksheet(ws, p, result)
    return result


# --------------------------------------------------------------------------- the result
def _latent_content(material: Material, point: Point, P: float) -> float:
    """Latent heat held by a state: every transition below it, plus its own plateau fraction."""
    total = 0.0
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
                      line.initial.P, line.final.P, total - latent, latent)


def _answer(p: Problem, fraction: float | None) -> Answer:
    kind = p.unknown.kind
    if kind == "temperature":
        si_kind, value_si = "temperature", p.temperatures[p.unknown_target]
    elif kind == "amount":
        si_kind = "mass_flow" if p.basis == "continuous" else "mass"
        value_si = p.unknown_target.amount
    else:
        si_kind, value_si = heat_kind(p.basis), p.unknown_target.heat
    unit = p.unknown_unit
    try:
        check_unit(unit, si_kind)
    except UnitError:  # e.g. a rate typed for a batch amount: show the answer in the display unit
        unit = DISPLAY_UNITS[p.system][si_kind]
    if (p.system == "US") != is_us_customary(unit):
        unit = DISPLAY_UNITS[p.system][si_kind]
    value = from_si(value_si, unit, si_kind)
    plateau = None
    if fraction is not None:
        dependent = [ln for ln in p.lines if _depends(ln, p.unknown_target)]
        plateau = next(tr.kind for ln in dependent for st in (ln.initial, ln.final) if st.var == p.unknown_target
                       for tr in ln.material.transitions(st.P) if abs(tr.T - value_si) < T_TOL)
    return Answer(p.unknown_label, kind, si_kind, value_si, value, unit, fraction, plateau)


def _result(p: Problem, fraction: float | None) -> Result:
    sides = {p.unknown_target: fraction} if fraction is not None else {}
    lines = [_line_result(ln, p.temperatures, sides) for ln in p.lines]
    terms = [TermResult(t.name, t.kind, t.heat, t.detail) for t in p.terms]
    for e in p.equipment:
        terms.append(TermResult(e.name, "equipment", -_equipment_heat(e, p.temperatures, sides),
                                "heat taken up by the vessel and its internals"))
    residual = sum(ln.total for ln in lines) - sum(t.heat for t in terms)
    answer = _answer(p, fraction)
    warnings = list(p.warnings) + _second_law(p, lines, terms) + _phase_warnings(p, lines) \
        + _range_warnings(p, lines)
    sources = {ln.material_name: ln.material.source for ln in p.lines}
    sources.update({e.material.name: e.material.source for e in p.equipment if e.material})
    return Result(p.title, p.basis, answer, lines, terms, residual, warnings, p.assumptions, sources,
                  property_library_versions())


def _second_law(p: Problem, lines: list[LineResult], terms: list[TermResult]) -> list[str]:
    """Heat flows from hot to cold: refuse a line heated above every heat source, unless a duty can do it."""
    hot = [ln for ln in lines if ln.total < 0]
    cold = [ln for ln in lines if ln.total > 0]
    if not hot or not cold:
        return []
    warnings = []
    T = partial(temperature_text, system=p.system)
    source = max(hot, key=lambda ln: ln.initial_T)
    target = max(cold, key=lambda ln: ln.final_T)
    if target.final_T > source.initial_T + 1e-3:
        text = (f"{source.name} enters at {T(source.initial_T)}, so it cannot heat "
                f"{target.name} to {T(target.final_T)}: heat does not flow from cold to hot")
        if not any(t.heat > 0 for t in terms if t.kind in ("duty", "reaction")):
            raise NoSolutionError(text + ". Use a hotter heating medium (higher steam pressure), lower the "
                                  "target, or add a heater duty.", p.unknown_label)
        warnings.append("Temperature cross: " + text + " without the heater duty or reaction heat.")
    sink = min(cold, key=lambda ln: ln.initial_T)
    cooled = min(hot, key=lambda ln: ln.final_T)
    if cooled.final_T < sink.initial_T - 1e-3:
        text = (f"{sink.name} enters at {T(sink.initial_T)}, so it cannot cool "
                f"{cooled.name} to {T(cooled.final_T)}: heat does not flow from cold to hot")
        if not any(t.heat < 0 for t in terms if t.kind == "duty"):
            raise NoSolutionError(text + ". Use a colder cooling medium, raise the outlet temperature, or add "
                                  "a cooler duty.", p.unknown_label)
        warnings.append("Temperature cross: " + text + " without the cooler duty.")
    return warnings


def _phase_warnings(p: Problem, lines: list[LineResult]) -> list[str]:
    out = []
    for model, ln in zip(p.lines, lines):
        per_kg = ln.latent / max(ln.amount_si, 1e-300) / 1000
        if abs(per_kg) > LATENT_NOTICE_KJ_PER_KG:
            verb = "takes up" if per_kg > 0 else "gives up"
            out.append(f"{ln.name} changes phase ({ln.initial_phase} → {ln.final_phase}) and {verb} latent heat, "
                       f"{specific_energy_text(abs(per_kg) * 1000, p.system)}; included in the balance.")
        for T, P, label in ((ln.initial_T, ln.initial_P, "inlet"), (ln.final_T, ln.final_P, "outlet")):
            if isinstance(model.material, IncompressibleSolution):
                water_boils = get_material("water").transitions(P)
                if water_boils and T > water_boils[0].T:
                    out.append(f"{ln.name} {label} is above the boiling point of water at "
                               f"{pressure_text(P, p.system)}; boiling of the solution is not modelled.")
    return out


def _range_warnings(p: Problem, lines: list[LineResult]) -> list[str]:
    out = []
    for model, ln in zip(p.lines, lines):
        for T in (ln.initial_T, ln.final_T):
            if model.material.extrapolated(T):
                out.append(f"{ln.name}: {temperature_text(T, p.system, 1)} is outside the validated range of the "
                           f"data for {model.material.name} ({temperature_text(model.material.valid_min, p.system, 0)}"
                           f" to {temperature_text(model.material.valid_max, p.system, 0)}); the value is "
                           "extrapolated.")
                break
    for e in p.equipment:
        if e.material is not None:
            T1 = p.temperatures.get(e.final.var) if e.final.var else None
            for T in (p.temperatures[e.initial_var], T1):
                if T is not None and e.material.extrapolated(T):
                    out.append(f"{e.name}: {temperature_text(T, p.system, 1)} is outside the validated range of "
                               f"the data for {e.material.name}; the value is extrapolated.")
                    break
    return out


# --------------------------------------------------------------------------- for the page
def unknown_choices(ws: Worksheet) -> list[tuple[str, Unknown]]:
    """Every quantity of a worksheet that can be the unknown, with a label."""
    out: list[tuple[str, Unknown]] = []
    for s in ws.streams:
        out.append((f"{s.name}: flow", Unknown(kind="amount", line=s.name)))
        for end, state in (("inlet", s.inlet), ("outlet", s.outlet)):
            if state.common is None:
                out.append((f"{s.name}: {end} temperature", Unknown(kind="temperature", line=s.name, end=end)))
    for v in ws.vessels:
        if v.final.common is None:
            out.append((f"{v.name}: final temperature", Unknown(kind="temperature", line=v.name, end="final")))
        for c in v.charges:
            out.append((f"{v.name} / {c.name}: mass", Unknown(kind="amount", line=v.name, charge=c.name)))
            if c.initial.common is not None:
                continue  # its temperature is the shared one, offered as such
            out.append((f"{v.name} / {c.name}: initial temperature",
                        Unknown(kind="temperature", line=v.name, charge=c.name, end="initial")))
    for c in ws.common_temperatures:
        out.append((f"common temperature {c.name}", Unknown(kind="temperature", common=c.name)))
    for d in ws.duties:
        out.append((f"duty {d.name}", Unknown(kind="duty", term=d.name)))
    return out
