"""Thermal screening of every vessel with a reaction or a stated heat of mixing, on a solved balance (SI only).

The published relations are in :mod:`heatbalance.reactor`; this module gathers their
inputs from the solved problem and result (reaction heat, heat of mixing, masses, cp at the process
temperature, the vessel's equipment, boiling points) and returns typed records. The
report and the figure are :mod:`heatbalance.present.screening`.

A reaction or a mixing belongs to the vessel it names in ``vessel``, or to the only vessel. A heat of mixing
(dilution, solution, neutralisation) is released as the liquids meet, like a fast reaction: on loss of cooling it
raises the temperature the same way, so it counts in ΔT_ad beside the reaction heat.
"""
from __future__ import annotations

from dataclasses import dataclass, field

from ..address import item
from ..errors import HeatBalanceError, InputError, NoSolutionError
from ..messages import Measure, Phrase
from ..mixing import SOLUTES, solution_cps
from ..problem import JacketInputs, Problem
from ..reactor import (CAUTION, CLASS_MEANINGS, adiabatic_temperature_rise, criticality_class, jacket_time, mtsr,
                       thermal_inertia_factor)
from ..results import Result
from ..units import ATMOSPHERE, heat_kind
from .bubble_point import GLYCOLS, RAOULT_NAME, bubble_point, mixture_components

__all__ = ["JacketTime", "Screening", "screen", "cp_at"]

_T_STEP = 0.5  # K: half-width of the enthalpy difference that gives cp


@dataclass
class JacketTime:
    """Heating or cooling time through the jacket, SI."""

    direction: str  # heating | cooling
    start_T: float  # K
    target_T: float  # K
    utility_T: float  # K
    UA: float  # W/K
    heat_capacity: float  # J/K: contents m·cp plus the vessel's heat capacity
    time: float  # s


@dataclass
class Screening:
    """The thermal screening of one vessel with a reaction or a heat of mixing, SI (K, J, kg, J/(kg·K), J/K)."""

    vessel: str
    reactions: list[str]  # the reactions' and the mixings' names
    T_process: float
    Q_reaction: float  # J released by the reactions and the mixings (+ exothermic): what ΔT_ad is made of
    mass: float  # kg of reaction mass (all charges)
    cp: float  # J/(kg·K), mass-weighted at the process temperature
    heat_capacity_vessel: float  # J/K
    phi: float
    dT_ad: float  # K, without the vessel (φ = 1)
    dT_ad_phi: float  # K, with the vessel (ΔT_ad / φ)
    accumulation: float
    thermal_inertia_used: bool
    MTSR: float  # K
    MTT: float | None  # K
    MTT_source: Phrase
    T_D24: float | None  # K
    criticality_class: int | None
    class_meaning: str
    alarms: list[Phrase] = field(default_factory=list)
    notes: list[Phrase] = field(default_factory=list)
    jacket: JacketTime | None = None
    caution: str = CAUTION
    MTT_composition: dict = field(default_factory=dict)  # mole fractions when MTT is the mixture's bubble point
    MTT_model: str = ""  # the activity model of that bubble point
    Q_mixing: float = 0.0  # J of Q_reaction released by stated heats of mixing
    class_caveats: list[Phrase] = field(default_factory=list)  # what the class rests on that may not hold

    @property
    def alarm(self) -> bool:
        """MTSR at or above MTT or T_D24 (or the process already there)."""
        return bool(self.alarms)


def cp_at(material, T: float, P: float, where: str = "") -> float:
    """cp [J/(kg·K)] of the phase present just at or below T, by a centred enthalpy difference."""
    lo, hi = T - _T_STEP, T + _T_STEP
    for tr in material.transitions(P):
        if lo - 1e-9 <= tr.T <= hi + 1e-9:
            if tr.T >= T - 1e-6:  # on or just above T: stay below the transition
                hi = min(T, tr.T) - 1e-4
                lo = hi - 2 * _T_STEP
            else:
                lo = tr.T + 1e-4
                hi = lo + 2 * _T_STEP
    lo, hi = max(lo, material.t_min), min(hi, material.t_max)
    if hi - lo < 1e-3:
        raise InputError(Phrase("no cp of {name} at {T} in its property data",
                                {"name": material.name, "T": Measure(T, "temperature")}), where)
    return (material.enthalpy(hi, P) - material.enthalpy(lo, P)) / (hi - lo)


_RELEASES = {"reaction": "reactions", "mixing": "mixings"}  # the terms a screening counts -> their list


def _vessel_releases(problem: Problem) -> dict[str, list]:
    """Each vessel's reactions and stated mixings (a term naming no vessel belongs to the only one)."""
    found: dict[str, list] = {name: [] for name in problem.vessels}
    for term in (t for t in problem.terms if t.kind in _RELEASES):
        if term.vessel is None:
            if len(problem.vessels) == 1:
                found[problem.vessels[0]].append(term)
            continue
        if term.vessel not in found:
            raise InputError(f"names vessel '{term.vessel}', which is not a vessel of this worksheet "
                             f"(vessels: {', '.join(problem.vessels)})", item(_RELEASES[term.kind], term.name,
                                                                               "vessel"))
        found[term.vessel].append(term)
    return found


def screen(problem: Problem, result: Result) -> list[Screening]:
    """The thermal screening of every vessel of a solved balance that has a reaction or a stated heat of mixing.

    Parameters
    ----------
    problem : Problem
        The solved problem (materials, equipment, each vessel's SI screening inputs)
    result : Result
        Its result (masses, the process temperature, the reaction heats); a reaction that names
        no vessel on a sheet with several gets a warning added to ``result.warnings``

    Returns
    -------
    list[Screening]
        One per vessel with a reaction, in the worksheet's order

    Raises
    ------
    InputError
        A reaction or a mixing naming no vessel of the worksheet (at ``reactions[R].vessel``,
        ``mixings[M].vessel``).
    NoSolutionError
        A jacket target the utility cannot reach (at ``vessels[V].screening.jacket.target_temperature``).
    """
    if not problem.vessels:
        return []
    by_vessel = _vessel_releases(problem)
    if len(problem.vessels) > 1:
        for term in problem.terms:
            if term.kind in _RELEASES and term.vessel is None:
                what = "Reaction" if term.kind == "reaction" else "Mixing"
                result.warnings.append(Phrase(
                    f"{what} {term.name} names no vessel and the worksheet has {len(problem.vessels)}: it gets no "
                    "thermal screening. Set its vessel.", address=item(_RELEASES[term.kind], term.name, "vessel")))
    return [_located(_screen_vessel, name, by_vessel[name], problem, result)
            for name in problem.vessels if by_vessel[name]]


def _located(screen_vessel, vessel: str, *args) -> Screening:
    """A refusal of the published relations (which name their own arguments) placed at the vessel's screening."""
    try:
        return screen_vessel(vessel, *args)
    except HeatBalanceError as exc:
        if not exc.where.startswith(("vessels[", "reactions[", "mixings[")):
            exc.address = item("vessels", vessel, "screening")
        raise


def _reaction_heat_screened(reactions: list, basis: str, notes: list[Phrase]) -> float:
    """The reaction heat ΔT_ad is made of, on the safe side: each exothermic reaction at full conversion (what
    the balance leaves unreacted can still react when cooling fails), no endothermic one credited against them
    (it may not run then); each departure from the balance's heat said in a note."""
    kind, total = heat_kind(basis), 0.0
    for t in reactions:
        if t.potential <= 0:
            notes.append(Phrase("Reaction {name} is endothermic ({Q}): it is not credited against the exothermic "
                                "heat in ΔT_ad (it may not run when cooling fails).",
                                {"name": t.name, "Q": Measure(t.potential, kind)}))
            continue
        total += t.potential
        if t.potential > t.heat * (1 + 1e-9):
            notes.append(Phrase("ΔT_ad counts all of reaction {name}, {Q}: the balance's conversion leaves {left} "
                                "unreacted, which can still react when cooling fails.",
                                {"name": t.name, "Q": Measure(t.potential, kind),
                                 "left": Measure(t.potential - t.heat, kind)}))
    return total


def _screen_vessel(vessel: str, releases: list, problem: Problem, result: Result) -> Screening:
    where = item("vessels", vessel, "screening")
    inputs = problem.screening[vessel]
    charges = [(model, line) for model, line in zip(problem.lines, result.lines) if model.vessel == vessel]
    notes: list[Phrase] = []
    if inputs.T_process is not None:
        T_process = inputs.T_process
        notes.append(Phrase("Process temperature entered: {T}.", {"T": Measure(T_process, "temperature", 1)}))
    else:
        T_process = charges[0][1].final_T
        notes.append(Phrase("Process temperature = the vessel's final temperature, {T}.",
                            {"T": Measure(T_process, "temperature", 1)}))
        if _solved_without_cooling(problem, result, charges[0][0].final.var):
            result.warnings.append(_solved_process_temperature(vessel, T_process))
    names = {t.name for t in releases}
    Q_mixing = sum(t.heat for t in result.terms if t.kind == "mixing" and t.name in names)
    Q = Q_mixing + _reaction_heat_screened([t for t in releases if t.kind == "reaction"], result.basis, notes)
    if any(t.kind == "mixing" for t in releases):
        notes.append(_mixing_note(Q_mixing, result.basis))
    mass = sum(line.amount_si for _, line in charges)
    if mass <= 0:
        raise InputError("the vessel holds no mass: the screening needs the charges' masses", where)
    capacity = sum(line.amount_si * cp_at(model.material, T_process, line.final_P, where) for model, line in charges)
    result.warnings.extend(_boiled_at_process_temperature(charges, T_process, where))
    cp = (capacity + _mixed_solution_capacity(releases, T_process, notes)) / mass
    notes.append(Phrase("cp of the reaction mass at the process temperature, mass-weighted from the property data: "
                        "{cp}; ΔT_ad assumes it constant over the rise.", {"cp": Measure(cp, "specific_heat")}))
    C_vessel = _vessel_heat_capacity(problem, vessel, T_process, where)
    phi = thermal_inertia_factor(mass, cp, C_vessel=C_vessel)
    dT_ad = adiabatic_temperature_rise(Q, mass, cp)
    dT_ad_phi = adiabatic_temperature_rise(Q, mass, cp, phi)
    MTSR = mtsr(T_process, dT_ad_phi if inputs.thermal_inertia else dT_ad, inputs.accumulation)
    notes.append(Phrase(f"MTSR = T_process + {inputs.accumulation:.0%} accumulation × ΔT_ad"
                        + (" / φ (thermal inertia of the vessel included)." if inputs.thermal_inertia
                           else " (vessel left out, φ = 1: conservative).")))
    if Q <= 0:
        notes.append(Phrase("The heat released is not exothermic: loss of cooling does not raise the temperature "
                            "through it (MTSR = process temperature)."))
    bubble = None
    if inputs.MTT is None and _is_mixture(charges, inputs.chemicals):
        MTT, MTT_source, bubble = _mixture_mtt(vessel, inputs, charges, notes, result.warnings)
    else:
        MTT, MTT_source = _mtt(inputs.MTT, charges, notes)
    if MTT is not None:
        result.warnings.extend(_charged_above_mtt(charges, MTT, entered=inputs.MTT is not None))
    T_D24 = inputs.T_D24
    caveats = []
    if MTT is not None and T_D24 is not None:
        klass = criticality_class(T_process, MTSR, MTT, T_D24)
        meaning = CLASS_MEANINGS[klass]
        caveats = _class_caveats(inputs.MTT is not None, bubble)
    else:
        klass = None
        missing = " and ".join(n for n, v in (("MTT", MTT), ("T_D24 (from calorimetry)", T_D24)) if v is None)
        meaning = f"No criticality class: enter {missing} to classify."
    jacket = None
    if inputs.jacket is not None:
        jacket = _jacket(inputs.jacket, T_process, mass * cp + C_vessel, f"{where}.jacket")
        notes.append(Phrase("Jacket time: m·cp of the contents plus the vessel's heat capacity, no reaction heat "
                            "or losses during it."))
        released = sum(t.heat for t in result.terms if t.kind in _RELEASES and t.name in names)
        result.warnings.extend(_jacket_too_small(inputs.jacket, vessel, T_process, released, result.duration, where))
    return Screening(vessel, sorted(names), T_process, Q, mass, cp, C_vessel, phi, dT_ad, dT_ad_phi,
                     inputs.accumulation, inputs.thermal_inertia, MTSR, MTT, MTT_source, T_D24, klass, meaning,
                     _alarms(T_process, MTSR, MTT, T_D24, where), notes, jacket,
                     MTT_composition=bubble.composition if bubble else {}, MTT_model=bubble.model if bubble else "",
                     Q_mixing=Q_mixing, class_caveats=caveats)


def _class_caveats(MTT_entered: bool, bubble) -> list[Phrase]:
    """What a class from a computed MTT rests on: the vessel venting at its pressure; Raoult's law, if used."""
    if MTT_entered:
        return []
    caveats = [Phrase("MTT is the boiling point at the vessel's pressure, as for a vessel that vents there; for a "
                      "closed vessel it is the temperature at which the pressure reaches the relief set pressure: "
                      "enter that MTT.")]
    if bubble is not None and bubble.model == RAOULT_NAME and len(bubble.composition) > 1:  # one liquid: no mixture
        caveats.append(Phrase("MTT comes from Raoult's law (γ = 1), for want of activity-model data for a "
                              "component: a real mixture may boil lower, and this class rests on it."))
    return caveats


def _mixed_solution_capacity(releases: list, T: float, notes: list[Phrase]) -> float:
    """Δ(m·cp) [J/K] of each stated mixing at T: its mixed solution's m·cp (Laliberté's cp at the final strength)
    in place of its two parts' (each at its own strength), as the parts' own data would count them."""
    change = 0.0
    for heat in (t.mixing for t in releases if t.kind == "mixing" and t.mixing is not None):
        solute = SOLUTES[heat.solute]
        cps = solution_cps(heat, T)
        if cps is None:
            notes.append(Phrase("cp of the mixed {solute} solution is not in its data here ({x3} at {T}): the "
                                "charges' own cps are used, which may overstate the mixture's and understate "
                                "ΔT_ad.", {"solute": solute.formula, "x3": f"{heat.x3:.1%}",
                                           "T": Measure(T, "temperature", 1)}))
            continue
        cp_a, cp_b, cp_mixed = cps
        change += (heat.mass_a + heat.mass_b) * cp_mixed - heat.mass_a * cp_a - heat.mass_b * cp_b
        notes.append(Phrase("The mixed {solute} solution ({x3}) counts with its own cp, {cp} (Laliberté, 2009), in "
                            "place of its parts' ({x1}: {cp_a}; {x2}: {cp_b}).",
                            {"solute": solute.formula, "x3": f"{heat.x3:.1%}", "x1": f"{heat.x1:.1%}",
                             "x2": f"{heat.x2:.1%}", "cp": Measure(cp_mixed, "specific_heat"),
                             "cp_a": Measure(cp_a, "specific_heat"), "cp_b": Measure(cp_b, "specific_heat")}))
    return change


def _mixing_note(Q_mixing: float, basis: str) -> Phrase:
    return Phrase("The stated heat of mixing ({Q}) counts in ΔT_ad with any reaction heat: it is released as the "
                  "liquids meet, so on loss of cooling it heats the batch like a fast reaction. The accumulation "
                  "applies to it too: 100 % is all of it released with no cooling (everything mixed at once, or "
                  "dosing that goes on after the cooling has failed); dosing stopped when cooling fails releases "
                  "no more.",
                  {"Q": Measure(Q_mixing, heat_kind(basis), decimals=0)})


def _solved_without_cooling(problem: Problem, result: Result, final_var: str | None) -> bool:
    """Whether the vessel's final temperature is the solved unknown of a balance that no duty cools: it is then
    where the released heat took the batch, not a temperature the cooling holds."""
    solved = problem.unknown.kind == "temperature" and final_var is not None and problem.unknown_target == final_var
    return solved and not any(t.kind == "duty" and t.heat < 0 for t in result.terms)


def _solved_process_temperature(vessel: str, T: float) -> Phrase:
    return Phrase("Vessel {vessel}: the screening's process temperature is the final temperature the balance solved "
                  "for with no cooling ({T}), which already holds the heat released in the balance; MTSR adds ΔT_ad "
                  "on top, so that heat counts twice (on the safe side, but not a temperature the batch can "
                  "reach). Enter the temperature the cooling holds as the process temperature (T_process).",
                  {"vessel": vessel, "T": Measure(T, "temperature", 1)},
                  address=item("vessels", vessel, "screening", "process_temperature"))


def _vessel_heat_capacity(problem: Problem, vessel: str, T: float, where: str) -> float:
    equipment = next((e for e in problem.equipment if e.vessel == vessel), None)
    if equipment is None:
        return 0.0
    if equipment.heat_capacity is not None:
        return equipment.heat_capacity
    return equipment.mass * cp_at(equipment.material, T, ATMOSPHERE, where)


def _mtt(entered: float | None, charges: list, notes: list[Phrase]) -> tuple[float | None, Phrase]:
    if entered is not None:
        return entered, Phrase("entered")
    boiling = [(tr.T, model.material, line.final_P) for model, line in charges
               for tr in model.material.transitions(line.final_P) if tr.kind == "boiling"]
    if not boiling:
        return None, Phrase("not available: enter MTT (e.g. the boiling point of the reaction mass)")
    T, material, P = min(boiling, key=lambda b: b[0])
    if len({model.material_name for model, _ in charges}) > 1:
        notes.append(Phrase("MTT is the lowest boiling point of the pure charges; a mixture boils elsewhere: "
                            "enter MTT from data for the mixture if it matters."))
    return T, Phrase("boiling point of {name} at {P}, the lowest among the charges ({source})",
                     {"name": material.name, "P": Measure(P, "pressure"), "source": material.source})


def _is_mixture(charges: list, chemicals: dict) -> bool:
    """Whether the vessel's liquid is a mixture: charges of several materials, an aqueous glycol, or charges
    given as chemicals."""
    return bool(chemicals) or len({model.material_name for model, _ in charges}) > 1 or \
        any(getattr(model.material, "code", None) in GLYCOLS for model, _ in charges)


def _mixture_mtt(vessel: str, inputs, charges: list, notes: list[Phrase], warnings: list):
    """MTT = the bubble point of the vessel's liquid at its pressure; a charge that cannot be placed leaves MTT to
    be entered, said loudly at its address."""
    P = charges[0][1].final_P
    try:
        components = mixture_components([m for m, _ in charges], [line for _, line in charges], inputs.chemicals,
                                        vessel)
        bubble = bubble_point(components, P, inputs.activity_model)
    except InputError as exc:
        warnings.append(Phrase("Vessel {vessel}: no MTT from the mixture's bubble point ({where}): {reason}",
                               {"vessel": vessel, "where": exc.where, "reason": exc.phrase.text}, address=exc.where))
        return None, Phrase("{reason} (at {where})", {"reason": exc.phrase.text, "where": exc.where},
                            address=exc.where), None
    from thermo import __version__ as thermo_version

    composition = ", ".join(f"{name} {x:.4f}" for name, x in sorted(bubble.composition.items(), key=lambda c: -c[1]))
    methods = ", ".join(f"{name}: {method}" for name, method in bubble.vapour_pressure_methods.items())
    source = Phrase("bubble point of the liquid mixture at {P}, {model}; mole fractions as charged: {composition}; "
                    "vapour pressures from thermo {version} ({methods})",
                    {"P": Measure(P, "pressure"), "model": bubble.model, "composition": composition,
                     "version": thermo_version, "methods": methods})
    notes.extend(bubble.notes)
    if bubble.T < bubble.T_major - 0.05:
        others = ", ".join(n for n in bubble.composition if n != bubble.major)
        notes.append(Phrase(
            "The mixture boils {dT} below pure {major} ({T_major} at the same pressure), its main component: the "
            "more volatile components ({others}) supply {share} of the vapour pressure at {T} (Σ x·γ·P_sat = P). The composition "
            "is as charged: reaction products are not counted.",
            {"dT": Measure(bubble.T_major - bubble.T, "temperature_difference", decimals=1), "major": bubble.major,
             "T_major": Measure(bubble.T_major, "temperature", 1), "others": others,
             "share": f"{bubble.volatile_share:.0%}", "T": Measure(bubble.T, "temperature", 1)}))
    return bubble.T, source, bubble


def _boiled_at_process_temperature(charges: list, T_process: float, where: str) -> list[Phrase]:
    """A charge that is liquid at the end of the balance but above its boiling point at the process temperature: its
    cp there is its vapour's (about half of the liquid's for water), so ΔT_ad and MTSR are off: said."""
    out = []
    for model, line in charges:
        boiling = next((t for t in model.material.transitions(line.final_P) if t.kind == "boiling"), None)
        if boiling is not None and T_process > boiling.T + 1e-6 and "liquid" in line.final_phase:
            out.append(Phrase("ΔT_ad takes {name} at the process temperature {T}, above its boiling point {T_b} at "
                              "{P}: its cp there is the vapour's, not the liquid's of the balance, so ΔT_ad and MTSR "
                              "are not those of the liquid batch. Enter a process temperature below the boiling "
                              "point.", {"name": line.name, "T": Measure(T_process, "temperature", 1),
                                         "T_b": Measure(boiling.T, "temperature", 1),
                                         "P": Measure(line.final_P, "pressure")},
                              f"{where}.process_temperature"))
    return out


def _charged_above_mtt(charges: list, MTT: float, entered: bool) -> list[Phrase]:
    """A charge whose material has no boiling in its data (cp only, a table) charged above MTT: above the computed
    boiling point it would boil as charged, above an entered limit it is past that limit; the balance counts it as
    a hot liquid either way (a material with a boiling point says 'vapour as charged')."""
    out = []
    meaning = "the limit entered for the vessel" if entered else "it would boil as it is charged"
    for model, line in charges:
        boils = any(t.kind == "boiling" for t in model.material.transitions(line.initial_P))
        if line.initial_T > MTT + 0.05 and not boils:
            out.append(Phrase("{name} is charged at {T}, above MTT {MTT}: {meaning}. Its material's data have no "
                              "boiling, so the balance counts it as a hot liquid and any flash is not modelled: check "
                              "its temperature.",
                              {"name": line.name, "T": Measure(line.initial_T, "temperature", 1),
                               "MTT": Measure(MTT, "temperature", 1), "meaning": meaning},
                              model.initial.temperature_address))
    return out


def _alarms(T_process: float, MTSR: float, MTT: float | None, T_D24: float | None, where: str) -> list[Phrase]:
    def t(T: float) -> Measure:
        return Measure(T, "temperature", 1)

    alarms = []
    if MTT is not None and MTSR >= MTT:
        alarms.append(Phrase("MTSR {MTSR} reaches MTT {MTT}: if cooling fails the batch boils (pressure rise, "
                             "boil-up); the condenser, vent and relief must cope.",
                             {"MTSR": t(MTSR), "MTT": t(MTT)}, f"{where}.MTT"))
    if T_D24 is not None and MTSR >= T_D24:
        alarms.append(Phrase("MTSR {MTSR} reaches T_D24 {T_D24}: if cooling fails a decomposition can be "
                             "triggered (time to maximum rate under 24 h).",
                             {"MTSR": t(MTSR), "T_D24": t(T_D24)}, f"{where}.T_D24"))
    if MTT is not None and T_process >= MTT:
        alarms.append(Phrase("The process temperature {T} is already at or above MTT.", {"T": t(T_process)},
                             f"{where}.MTT"))
    if T_D24 is not None and T_process >= T_D24:
        alarms.append(Phrase("The process temperature {T} is already at or above T_D24.", {"T": t(T_process)},
                             f"{where}.T_D24"))
    return alarms


def _jacket_too_small(j: JacketInputs, vessel: str, T_process: float, released: float, duration: float | None,
                      where: str) -> list[Phrase]:
    """A cooling jacket that cannot remove, at the process temperature, the heat the batch's reactions and mixings
    release on average over its duration: it cannot hold that temperature (the peak is higher still)."""
    if not duration or released <= 0 or j.utility_T >= T_process:
        return []
    capacity, average = j.UA * (T_process - j.utility_T), released / duration
    if capacity >= average:
        return []
    return [Phrase("Jacket of {vessel} too small: at the process temperature {T} it removes at most {cap} (UA × {dT} to "
                   "its utility), less than the {avg} the batch releases on average over {time}, so it cannot hold "
                   "that temperature (the peak release is higher still).",
                   {"vessel": vessel, "T": Measure(T_process, "temperature", 1), "cap": Measure(capacity, "power"),
                    "dT": Measure(T_process - j.utility_T, "temperature_difference", decimals=1),
                    "avg": Measure(average, "power"), "time": Measure(duration, "duration")}, f"{where}.jacket.UA")]


def _jacket(j: JacketInputs, T_process: float, heat_capacity: float, where: str) -> JacketTime:
    T1 = T_process if j.start_T is None else j.start_T
    try:
        time = jacket_time(T1, j.target_T, j.utility_T, 1.0, heat_capacity, UA=j.UA)
    except NoSolutionError as exc:
        raise NoSolutionError(exc.phrase, f"{where}.target_temperature") from None
    return JacketTime("heating" if j.target_T >= T1 else "cooling", T1, j.target_T, j.utility_T, j.UA,
                      heat_capacity, time)
