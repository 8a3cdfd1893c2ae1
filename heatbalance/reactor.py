"""Batch-reactor thermal screening: what happens to a batch with a reaction if cooling fails.

Published methods, usual names (Stoessel [1]_):

* adiabatic temperature rise ΔT_ad = Q_r / (m·cp), and with the vessel taking part,
  ΔT_ad / φ with the thermal inertia factor φ = 1 + m_vessel·cp_vessel / (m·cp);
* MTSR, the maximum temperature of the synthesis reaction: T_process + X_acc·ΔT_ad;
* MTT, the maximum technical temperature (here the boiling point at the vessel's pressure);
* T_D24, where a decomposition's time to maximum rate under adiabatic conditions is 24 h;
* the criticality class 1-5 from the order of T_process, MTSR, MTT and T_D24;
* the time to heat or cool a batch through a jacket with a utility at constant temperature.

The functions take and return plain SI floats (K, J, kg, J/(kg·K), W/K, s).
:func:`screen_worksheet` builds the screening of every vessel with a reaction from a
solved worksheet; :func:`screening_figure` draws it; :func:`screening_report` writes it.

Every number here is a screening estimate: see :data:`CAUTION`.
"""
from __future__ import annotations

import math
from dataclasses import dataclass, field

from .errors import InputError, NoSolutionError
from .results import temperature_text
from .units import ATMOSPHERE, DISPLAY_UNITS, display_unit, from_si, to_si

__all__ = ["CAUTION", "CLASS_MEANINGS", "thermal_inertia_factor", "adiabatic_temperature_rise", "mtsr",
           "criticality_class", "jacket_time", "jacket_temperature", "JacketTime", "Screening",
           "screen_worksheet", "screening_figure", "screening_report"]

CAUTION = ("A screening estimate, not a substitute for reaction calorimetry or a process hazard analysis; "
           "defer to local codes and licensed practice.")

#: Stoessel's criticality classes, in plain words (our wording of [1]_, section 3.3)
CLASS_MEANINGS = {
    1: "Class 1: if cooling fails the batch neither boils (MTSR < MTT) nor starts decomposing (MTSR < T_D24), "
       "and boiling would come before decomposition; no special measures beyond normal practice.",
    2: "Class 2: MTSR stays below MTT and T_D24, but T_D24 is not above MTT: safe if cooling returns, but the "
       "batch must not be held hot for long, since boiling would not stop a decomposition.",
    3: "Class 3: the batch reaches its boiling point (MTT) but not T_D24: safety rests on evaporative cooling; "
       "the condenser, reflux and vent must take the boil-up.",
    4: "Class 4: MTSR is above T_D24 but the boiling point comes first: evaporative cooling is the only "
       "barrier against decomposition and must be reliable and large enough.",
    5: "Class 5: T_D24 is below the boiling point and MTSR reaches it: a decomposition can start before "
       "boiling can stop the rise. Critical: change the process (less accumulation, controlled dosing) "
       "or provide emergency measures.",
}


# --------------------------------------------------------------------------- checks
def _positive(value: float, name: str, unit: str, where: str = "") -> None:
    if not isinstance(value, (int, float)) or not math.isfinite(value) or value <= 0:
        raise InputError(f"{name} must be a positive number of {unit}, not {value!r}", where or name)


def _finite(value: float, name: str, where: str = "") -> None:
    if not isinstance(value, (int, float)) or not math.isfinite(value):
        raise InputError(f"{name} must be a finite number, not {value!r}", where or name)


def _temperature(value: float, name: str, where: str = "") -> None:
    _finite(value, name, where)
    if value <= 0:
        raise InputError(f"{name} must be an absolute temperature above 0 K, not {value!r} K", where or name)


# --------------------------------------------------------------------------- published relations
def thermal_inertia_factor(m: float, cp: float, m_vessel: float = 0.0, cp_vessel: float = 0.0,
                           C_vessel: float | None = None) -> float:
    """Thermal inertia factor of a vessel and its contents.

    .. math::
        \\phi = 1 + \\frac{m_{vessel} c_{p,vessel}}{m c_p}

    Parameters
    ----------
    m : float
        Mass of the reaction mass [kg]
    cp : float
        Specific heat capacity of the reaction mass [J/(kg·K)]
    m_vessel : float
        Mass of the vessel parts that warm with the contents [kg]
    cp_vessel : float
        Their specific heat capacity [J/(kg·K)]
    C_vessel : float, optional
        Their heat capacity m_vessel·cp_vessel [J/K], instead of the two above

    Returns
    -------
    float
        φ ≥ 1 [-]

    Raises
    ------
    InputError
        m or cp not positive, a negative vessel mass, cp or heat capacity.

    Notes
    -----
    φ = 1 ignores the vessel (the conservative choice for large vessels, where φ is close to 1).

    Examples
    --------
    Our own numbers, by hand: 8 t at 4.0 kJ/(kg·K) in 3.5 t of steel at 0.50 kJ/(kg·K):
    φ = 1 + 1750/32000 = 1.0546875

    >>> thermal_inertia_factor(8000.0, 4000.0, 3500.0, 500.0)
    1.0546875

    References
    ----------
    .. [1] Stoessel, F. Thermal Safety of Chemical Processes: Risk Assessment and Process Design.
       Wiley-VCH, Weinheim, 2008, chapters 2-3.
    """
    _positive(m, "the mass of the reaction mass", "kg")
    _positive(cp, "the specific heat of the reaction mass", "J/(kg·K)")
    if C_vessel is None:
        for value, name in ((m_vessel, "the vessel mass"), (cp_vessel, "the vessel's specific heat")):
            _finite(value, name)
            if value < 0:
                raise InputError(f"{name} cannot be negative ({value:g})", name)
        C_vessel = m_vessel * cp_vessel
    _finite(C_vessel, "the vessel's heat capacity")
    if C_vessel < 0:
        raise InputError(f"the vessel's heat capacity cannot be negative ({C_vessel:g} J/K)",
                         "the vessel's heat capacity")
    return 1.0 + C_vessel / (m * cp)


def adiabatic_temperature_rise(Q: float, m: float, cp: float, phi: float = 1.0) -> float:
    """Adiabatic temperature rise of a reaction mass.

    .. math::
        \\Delta T_{ad} = \\frac{Q_r}{\\phi\\, m\\, c_p}

    Parameters
    ----------
    Q : float
        Heat released by the reaction, positive when exothermic [J]
    m : float
        Mass of the reaction mass [kg]
    cp : float
        Specific heat capacity of the reaction mass [J/(kg·K)]
    phi : float
        Thermal inertia factor, 1 to leave the vessel out [-]

    Returns
    -------
    float
        ΔT_ad [K]; negative for an endothermic reaction

    Raises
    ------
    InputError
        m or cp not positive, φ below 1, Q not finite.

    Notes
    -----
    Constant cp over the rise, no heat loss, no boiling: the adiabatic, closed-vessel bound.

    Examples
    --------
    Our own numbers, by hand: 85 kJ/mol on 4.5 kmol = 382.5 MJ into 8 t at 4.0 kJ/(kg·K):
    ΔT_ad = 382.5e6 / 32e6 = 11.953125 K

    >>> adiabatic_temperature_rise(382.5e6, 8000.0, 4000.0)
    11.953125

    References
    ----------
    .. [1] Stoessel, F. Thermal Safety of Chemical Processes. Wiley-VCH, 2008, section 2.4.
    """
    _finite(Q, "the reaction heat")
    _positive(m, "the mass of the reaction mass", "kg")
    _positive(cp, "the specific heat of the reaction mass", "J/(kg·K)")
    _finite(phi, "the thermal inertia factor")
    if phi < 1.0:
        raise InputError(f"the thermal inertia factor φ must be at least 1, not {phi:g}", "phi")
    return Q / (phi * m * cp)


def mtsr(T_process: float, dT_ad: float, accumulation: float = 1.0) -> float:
    """Maximum temperature of the synthesis reaction.

    .. math::
        MTSR = T_{process} + X_{acc}\\, \\Delta T_{ad}

    Parameters
    ----------
    T_process : float
        Process temperature when cooling fails [K]
    dT_ad : float
        Adiabatic temperature rise of the whole reaction [K]
    accumulation : float
        Fraction of the reaction heat not yet released when cooling fails, 0 to 1 [-]

    Returns
    -------
    float
        MTSR [K]; T_process for an endothermic reaction (no rise)

    Raises
    ------
    InputError
        An accumulation outside 0 to 1, a temperature not above 0 K.

    Examples
    --------
    Our own numbers, by hand: 60 °C, ΔT_ad 40 K, 30 % accumulated: 333.15 + 12 = 345.15 K

    >>> mtsr(333.15, 40.0, 0.30)
    345.15

    References
    ----------
    .. [1] Stoessel, F. Thermal Safety of Chemical Processes. Wiley-VCH, 2008, section 3.3.
    """
    _temperature(T_process, "the process temperature")
    _finite(dT_ad, "the adiabatic temperature rise")
    _finite(accumulation, "the accumulation")
    if not 0.0 <= accumulation <= 1.0:
        raise InputError(f"the accumulation is a fraction from 0 to 1, not {accumulation:g}", "accumulation")
    return T_process + accumulation * max(dT_ad, 0.0)


def criticality_class(T_process: float, MTSR: float, MTT: float, T_D24: float) -> int:
    """Stoessel's criticality class of a runaway scenario, from the order of four temperatures.

    ====== ==========================================
    class  order
    ====== ==========================================
    1      T_process ≤ MTSR < MTT < T_D24
    2      T_process ≤ MTSR < T_D24 ≤ MTT
    3      T_process ≤ MTT ≤ MTSR < T_D24
    4      T_process ≤ MTT < T_D24 ≤ MTSR
    5      T_D24 ≤ MTSR and T_D24 ≤ MTT
    ====== ==========================================

    Parameters
    ----------
    T_process : float
        Process temperature [K]
    MTSR : float
        Maximum temperature of the synthesis reaction [K]
    MTT : float
        Maximum technical temperature, e.g. the boiling point at the vessel's pressure [K]
    T_D24 : float
        Temperature at which the decomposition's time to maximum rate is 24 h [K]

    Returns
    -------
    int
        1 (least critical) to 5 (most critical); :data:`CLASS_MEANINGS` says each in words

    Raises
    ------
    InputError
        A temperature not above 0 K, or MTSR below the process temperature.

    Notes
    -----
    Ties count against safety: reaching a temperature exactly counts as reaching it, and
    T_D24 equal to MTT counts as T_D24 below MTT.

    Examples
    --------
    Our own numbers: 60 °C process, MTSR 80 °C, MTT 100 °C, T_D24 150 °C: class 1

    >>> criticality_class(333.15, 353.15, 373.15, 423.15)
    1

    References
    ----------
    .. [1] Stoessel, F. Thermal Safety of Chemical Processes. Wiley-VCH, 2008, section 3.3.3.
    .. [2] Stoessel, F. Design thermally safe semibatch reactors. Chem. Eng. Prog. 91(9), 1995, 46-53.
    """
    for value, name in ((T_process, "the process temperature"), (MTSR, "MTSR"), (MTT, "MTT"),
                        (T_D24, "T_D24")):
        _temperature(value, name)
    if MTSR < T_process - 1e-9:
        raise InputError(f"MTSR ({MTSR:.2f} K) cannot be below the process temperature ({T_process:.2f} K)",
                         "MTSR")
    reaches_mtt = MTSR >= MTT
    reaches_td24 = MTSR >= T_D24
    td24_first = T_D24 <= MTT
    if not reaches_mtt and not reaches_td24:
        return 2 if td24_first else 1
    if not reaches_td24:
        return 3
    return 5 if td24_first else 4


def jacket_time(T1: float, T2: float, T_utility: float, m: float, cp: float, UA: float | None = None,
                U: float | None = None, A: float | None = None) -> float:
    """Time to heat or cool a stirred batch from T1 to T2 through a jacket at constant utility temperature.

    .. math::
        \\ln\\frac{T_u - T_1}{T_u - T_2} = \\frac{U A\\, t}{m\\, c_p}

    Parameters
    ----------
    T1 : float
        Batch temperature at the start [K]
    T2 : float
        Batch temperature to reach [K]
    T_utility : float
        Utility temperature, constant (condensing steam, a large coolant flow) [K]
    m : float
        Mass of the batch [kg] (or 1 with cp a heat capacity)
    cp : float
        Specific heat capacity of the batch [J/(kg·K)]
    UA : float, optional
        Overall heat-transfer coefficient times area [W/K]
    U : float, optional
        Overall heat-transfer coefficient [W/(m²·K)], with A
    A : float, optional
        Heat-transfer area [m²], with U

    Returns
    -------
    float
        t [s]

    Raises
    ------
    InputError
        Neither UA nor U and A (or both), a value not positive, a temperature not above 0 K.
    NoSolutionError
        The utility cannot bring the batch to T2: T2 is not between T1 and the utility temperature
        (it would need infinite time, or heat flowing from cold to hot).

    Notes
    -----
    Well-mixed batch, constant U, cp and utility temperature, no reaction heat or losses.

    Examples
    --------
    Our own numbers, by hand: 5 t at 4.0 kJ/(kg·K) from 20 to 80 °C with steam at 150 °C, UA = 4 kW/K:
    t = 20e6/4e3 · ln(130/70) = 5000 · 0.6190392 = 3095.196 s

    >>> round(jacket_time(293.15, 353.15, 423.15, 5000.0, 4000.0, UA=4000.0), 2)
    3095.2

    References
    ----------
    .. [1] Kern, D. Q. Process Heat Transfer. McGraw-Hill, 1950, ch. 18 (batch heating, isothermal medium).
    .. [2] Stoessel, F. Thermal Safety of Chemical Processes. Wiley-VCH, 2008, section 2.5.
    """
    if (UA is None) == (U is None and A is None):
        raise InputError("give UA, or U and A (not both)", "UA")
    if UA is None:
        if U is None or A is None:
            raise InputError("U needs the area A, and A needs U", "U" if U is None else "A")
        _positive(U, "U", "W/(m²·K)")
        _positive(A, "the area A", "m²")
        UA = U * A
    _positive(UA, "UA", "W/K")
    _positive(m, "the batch mass", "kg")
    _positive(cp, "the batch specific heat", "J/(kg·K)")
    for value, name in ((T1, "the start temperature"), (T2, "the target temperature"),
                        (T_utility, "the utility temperature")):
        _temperature(value, name)
    if T1 == T2:
        return 0.0
    first, last = T_utility - T1, T_utility - T2
    if first * last <= 0 or abs(last) >= abs(first):
        verb = "heat" if T2 > T1 else "cool"
        raise NoSolutionError(
            f"a utility at {T_utility - 273.15:.2f} °C cannot {verb} the batch from {T1 - 273.15:.2f} to "
            f"{T2 - 273.15:.2f} °C: the target must lie between the start and the utility temperature "
            f"(it is approached, never reached or passed). Use a {'hotter' if verb == 'heat' else 'colder'} "
            "utility or a less ambitious target.", "jacket target temperature")
    return m * cp / UA * math.log(first / last)


def jacket_temperature(t: float, T1: float, T_utility: float, m: float, cp: float, UA: float) -> float:
    """Batch temperature after heating or cooling for a time t through a jacket (inverse of :func:`jacket_time`).

    .. math::
        T(t) = T_u - (T_u - T_1)\\, e^{-U A t / (m c_p)}

    Parameters
    ----------
    t : float
        Time [s], ≥ 0
    T1 : float
        Batch temperature at t = 0 [K]
    T_utility : float
        Utility temperature [K]
    m : float
        Batch mass [kg]
    cp : float
        Specific heat capacity [J/(kg·K)]
    UA : float
        Heat-transfer coefficient times area [W/K]

    Returns
    -------
    float
        T(t) [K]

    Raises
    ------
    InputError
        A negative time, a value not positive.

    Examples
    --------
    By hand: one time constant (m·cp/UA = 5000 s) from 20 °C towards 150 °C:
    T = 423.15 − 130·e⁻¹ = 423.15 − 47.8243 = 375.3257 K

    >>> round(jacket_temperature(5000.0, 293.15, 423.15, 5000.0, 4000.0, 4000.0), 4)
    375.3257

    References
    ----------
    .. [1] Kern, D. Q. Process Heat Transfer. McGraw-Hill, 1950, ch. 18.
    """
    _finite(t, "the time")
    if t < 0:
        raise InputError(f"the time cannot be negative ({t:g} s)", "time")
    _positive(m, "the batch mass", "kg")
    _positive(cp, "the batch specific heat", "J/(kg·K)")
    _positive(UA, "UA", "W/K")
    return T_utility - (T_utility - T1) * math.exp(-UA * t / (m * cp))


# --------------------------------------------------------------------------- records
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
    """The thermal screening of one vessel with a reaction, SI (K, J, kg, J/(kg·K), J/K)."""

    vessel: str
    reactions: list[str]
    T_process: float
    Q_reaction: float  # J released by the reactions (+ exothermic)
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
    MTT_source: str
    T_D24: float | None  # K
    criticality_class: int | None
    class_meaning: str
    alarms: list[str] = field(default_factory=list)
    notes: list[str] = field(default_factory=list)
    jacket: JacketTime | None = None
    caution: str = CAUTION

    @property
    def alarm(self) -> bool:
        """MTSR at or above MTT or T_D24 (or the process already there)."""
        return bool(self.alarms)


# --------------------------------------------------------------------------- from a solved worksheet
_T_STEP = 0.5  # K: half-width of the enthalpy difference that gives cp


def _cp_at(material, T: float, P: float) -> float:
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
        raise InputError(f"no cp of {material.name} at {T - 273.15:.2f} °C in its property data",
                         "screening")
    return (material.enthalpy(hi, P) - material.enthalpy(lo, P)) / (hi - lo)


def _t(T: float, system: str) -> str:
    return temperature_text(T, system, 1)


def _dt(dT: float, system: str) -> str:
    unit = DISPLAY_UNITS[system]["temperature_difference"]
    return f"{from_si(dT, unit, 'temperature_difference'):.1f} {display_unit(unit)}"


def _vessel_reactions(ws, vessel_names: list[str]) -> dict[str, list]:
    found: dict[str, list] = {name: [] for name in vessel_names}
    for r in ws.reactions:
        if r.vessel is None:
            if len(vessel_names) == 1:
                found[vessel_names[0]].append(r)
            continue
        if r.vessel not in found:
            raise InputError(f"names vessel '{r.vessel}', which is not a vessel of this worksheet "
                             f"(vessels: {', '.join(vessel_names)})", f"reaction {r.name} vessel")
        found[r.vessel].append(r)
    return found


def screen_worksheet(ws, problem, result) -> list[Screening]:
    """The thermal screening of every vessel of a solved worksheet that has a reaction.

    A reaction belongs to the vessel it names, or to the only vessel when it names none.

    Parameters
    ----------
    ws : Worksheet
        The worksheet (its vessels' optional ``screening`` inputs are used)
    problem : balance.Problem
        The solved problem (its materials and equipment)
    result : Result
        The solved result (masses, the process temperature, the reaction heats)

    Returns
    -------
    list[Screening]
        One per vessel with a reaction, in the worksheet's order

    Raises
    ------
    InputError
        A reaction naming no vessel of the worksheet; a bad screening input (the field is named).
    NoSolutionError
        A jacket target the utility cannot reach.
    """
    if not ws.vessels:
        return []
    system = getattr(problem, "system", "SI")
    by_vessel = _vessel_reactions(ws, [v.name for v in ws.vessels])
    if len(ws.vessels) > 1:
        for r in ws.reactions:
            if r.vessel is None:
                result.warnings.append(f"Reaction {r.name} names no vessel and the worksheet has "
                                       f"{len(ws.vessels)}: it gets no thermal screening. Set its vessel.")
    out = []
    for vessel in ws.vessels:
        if by_vessel[vessel.name]:
            out.append(_screen_vessel(vessel, by_vessel[vessel.name], problem, result, system))
    return out


def _screen_vessel(vessel, reactions: list, problem, result, system: str) -> Screening:
    where = f"vessel {vessel.name} screening"
    inputs = vessel.screening
    charges = [(model, line) for model, line in zip(problem.lines, result.lines) if model.vessel == vessel.name]
    P = charges[0][1].final_P
    T_final = charges[0][1].final_T
    notes: list[str] = []
    if inputs is not None and inputs.process_temperature is not None:
        q = inputs.process_temperature
        T_process = to_si(q.value, q.unit, "temperature", f"{where} process temperature")
        notes.append(f"Process temperature entered: {_t(T_process, system)}.")
    else:
        T_process = T_final
        notes.append(f"Process temperature = the vessel's final temperature, {_t(T_process, system)}.")
    names = {r.name for r in reactions}
    Q = sum(t.heat for t in result.terms if t.kind == "reaction" and t.name in names)
    mass = sum(line.amount_si for _, line in charges)
    if mass <= 0:
        raise InputError("the vessel holds no mass: the screening needs the charges' masses", where)
    cp = sum(line.amount_si * _cp_at(model.material, T_process, line.final_P) for model, line in charges) / mass
    cp_unit = DISPLAY_UNITS[system]["specific_heat"]
    notes.append(f"cp of the reaction mass at the process temperature, mass-weighted from the property data: "
                 f"{from_si(cp, cp_unit, 'specific_heat'):.3f} {display_unit(cp_unit)}; ΔT_ad assumes it "
                 "constant over the rise.")
    C_vessel = 0.0
    for e in problem.equipment:
        if e.name == f"{vessel.name} equipment":
            C_vessel = e.heat_capacity if e.heat_capacity is not None else \
                e.mass * _cp_at(e.material, T_process, ATMOSPHERE)
    phi = thermal_inertia_factor(mass, cp, C_vessel=C_vessel)
    dT_ad = adiabatic_temperature_rise(Q, mass, cp)
    dT_ad_phi = adiabatic_temperature_rise(Q, mass, cp, phi)
    accumulation = inputs.accumulation if inputs is not None else 1.0
    use_phi = bool(inputs is not None and inputs.thermal_inertia)
    MTSR = mtsr(T_process, dT_ad_phi if use_phi else dT_ad, accumulation)
    notes.append(f"MTSR = T_process + {accumulation:.0%} accumulation × ΔT_ad"
                 + (" / φ (thermal inertia of the vessel included)." if use_phi
                    else " (vessel left out, φ = 1: conservative)."))
    if Q <= 0:
        notes.append("The reaction heat is not exothermic: loss of cooling does not raise the temperature "
                     "through this reaction (MTSR = process temperature).")
    # MTT
    MTT, MTT_source = None, "not available: enter MTT (e.g. the boiling point of the reaction mass)"
    if inputs is not None and inputs.MTT is not None:
        MTT = to_si(inputs.MTT.value, inputs.MTT.unit, "temperature", f"{where} MTT")
        MTT_source = "entered"
    else:
        boiling = [(tr.T, model.material) for model, line in charges
                   for tr in model.material.transitions(line.final_P) if tr.kind == "boiling"]
        if boiling:
            MTT, material = min(boiling, key=lambda b: b[0])
            MTT_source = (f"boiling point of {material.name} at {P / 1e5:.4g} bar(a), the lowest among the "
                          f"charges ({material.source})")
            if len({model.material_name for model, _ in charges}) > 1:
                notes.append("MTT is the lowest boiling point of the pure charges; a mixture boils elsewhere: "
                             "enter MTT from data for the mixture if it matters.")
    T_D24 = None
    if inputs is not None and inputs.T_D24 is not None:
        T_D24 = to_si(inputs.T_D24.value, inputs.T_D24.unit, "temperature", f"{where} T_D24")
    # class and alarms
    klass, meaning = None, ""
    if MTT is not None and T_D24 is not None:
        klass = criticality_class(T_process, MTSR, MTT, T_D24)
        meaning = CLASS_MEANINGS[klass]
    else:
        missing = " and ".join(n for n, v in (("MTT", MTT), ("T_D24 (from calorimetry)", T_D24)) if v is None)
        meaning = f"No criticality class: enter {missing} to classify."
    alarms = []
    if MTT is not None and MTSR >= MTT:
        alarms.append(f"MTSR {_t(MTSR, system)} reaches MTT {_t(MTT, system)}: if cooling fails the batch boils "
                      "(pressure rise, boil-up); the condenser, vent and relief must cope.")
    if T_D24 is not None and MTSR >= T_D24:
        alarms.append(f"MTSR {_t(MTSR, system)} reaches T_D24 {_t(T_D24, system)}: if cooling fails a "
                      "decomposition can be triggered (time to maximum rate under 24 h).")
    if MTT is not None and T_process >= MTT:
        alarms.append(f"The process temperature {_t(T_process, system)} is already at or above MTT.")
    if T_D24 is not None and T_process >= T_D24:
        alarms.append(f"The process temperature {_t(T_process, system)} is already at or above T_D24.")
    jacket = None
    if inputs is not None and inputs.jacket is not None:
        jacket = _jacket(inputs.jacket, T_process, mass * cp + C_vessel, f"{where} jacket")
        notes.append("Jacket time: m·cp of the contents plus the vessel's heat capacity, no reaction heat "
                     "or losses during it.")
    return Screening(vessel.name, sorted(names), T_process, Q, mass, cp, C_vessel, phi, dT_ad, dT_ad_phi,
                     accumulation, use_phi, MTSR, MTT, MTT_source, T_D24, klass, meaning, alarms, notes, jacket)


def _jacket(j, T_process: float, heat_capacity: float, where: str) -> JacketTime:
    Tu = to_si(j.utility_temperature.value, j.utility_temperature.unit, "temperature",
               f"{where} utility temperature")
    T2 = to_si(j.target_temperature.value, j.target_temperature.unit, "temperature", f"{where} target temperature")
    T1 = T_process if j.start_temperature is None else \
        to_si(j.start_temperature.value, j.start_temperature.unit, "temperature", f"{where} start temperature")
    if j.UA is not None:
        UA = to_si(j.UA.value, j.UA.unit, "thermal_conductance", f"{where} UA")
    else:
        U = to_si(j.U.value, j.U.unit, "heat_transfer_coefficient", f"{where} U")
        A = to_si(j.area.value, j.area.unit, "area", f"{where} area")
        _positive(U, "U", "W/(m²·K)", f"{where} U")
        _positive(A, "the area", "m²", f"{where} area")
        UA = U * A
    _positive(UA, "UA", "W/K", f"{where} UA")
    try:
        time = jacket_time(T1, T2, Tu, 1.0, heat_capacity, UA=UA)
    except NoSolutionError as exc:
        raise NoSolutionError(exc.message, f"{where} target temperature") from None
    return JacketTime("heating" if T2 >= T1 else "cooling", T1, T2, Tu, UA, heat_capacity, time)


# --------------------------------------------------------------------------- report and figure
def screening_report(screenings: list[Screening], system: str = "SI") -> list[str]:
    """Lines of text for the command line: the numbers, the class, the alarms and the caution.

    Parameters
    ----------
    screenings : list[Screening]
        From ``Result.screening``
    system : str
        ``"SI"`` or ``"US"``: the display units

    Returns
    -------
    list[str]
        The report, one line each; an alarm line starts with ``!!! ALARM:``
    """
    out: list[str] = []
    for s in screenings:
        title = f"THERMAL SCREENING  vessel {s.vessel} ({', '.join(s.reactions)})"
        out += [title, "-" * len(title), f"  caution: {s.caution}"]
        for alarm in s.alarms:
            out.append(f"  !!! ALARM: {alarm}")
        kind = "energy"
        unit = DISPLAY_UNITS[system][kind]
        out += [
            f"  reaction heat released     {from_si(s.Q_reaction, unit, kind):,.1f} {display_unit(unit)}",
            f"  reaction mass              {from_si(s.mass, DISPLAY_UNITS[system]['mass'], 'mass'):,.1f} "
            f"{DISPLAY_UNITS[system]['mass']}, cp {from_si(s.cp, DISPLAY_UNITS[system]['specific_heat'], 'specific_heat'):.3f} "
            f"{display_unit(DISPLAY_UNITS[system]['specific_heat'])}",
            f"  thermal inertia factor φ   {s.phi:.4f}",
            f"  ΔT_ad (φ = 1)              {_dt(s.dT_ad, system)}",
            f"  ΔT_ad / φ                  {_dt(s.dT_ad_phi, system)}",
            f"  T_process                  {_t(s.T_process, system)}",
            f"  MTSR ({s.accumulation:.0%} accumulation)   {_t(s.MTSR, system)}",
            f"  MTT                        {_t(s.MTT, system) if s.MTT is not None else 'not available'}"
            f"  [{s.MTT_source}]",
            f"  T_D24                      {_t(s.T_D24, system) if s.T_D24 is not None else 'not entered'}",
            f"  criticality class          {s.criticality_class if s.criticality_class else '-'}: "
            f"{s.class_meaning}",
        ]
        if s.jacket is not None:
            j = s.jacket
            out.append(f"  jacket {j.direction} time        {j.time / 60:,.1f} min from {_t(j.start_T, system)} to "
                       f"{_t(j.target_T, system)} with the utility at {_t(j.utility_T, system)}, "
                       f"UA {j.UA / 1000:,.3g} kW/K")
        out += [f"  note: {n}" for n in s.notes]
        out.append("")
    return out


def screening_figure(screening: Screening, system: str = "SI"):
    """One bar chart of T_process, MTSR, MTT and T_D24, with MTT and T_D24 as dashed limits.

    Parameters
    ----------
    screening : Screening
        One vessel's screening
    system : str
        ``"SI"`` (°C) or ``"US"`` (°F)

    Returns
    -------
    plotly.graph_objects.Figure
        Bars in the order T_process, MTSR, MTT, T_D24 (those known); MTSR red and "ALARM" in
        the title when it reaches MTT or T_D24; the caution written under the plot.
    """
    import plotly.graph_objects as go

    unit = DISPLAY_UNITS[system]["temperature"]

    def shown(T: float) -> float:
        return from_si(T, unit, "temperature")

    s = screening
    reaches = (s.MTT is not None and s.MTSR >= s.MTT) or (s.T_D24 is not None and s.MTSR >= s.T_D24)
    bars = [("T_process", s.T_process, "#7f8c8d"), ("MTSR", s.MTSR, "#c0392b" if reaches else "#e67e22")]
    if s.MTT is not None:
        bars.append(("MTT", s.MTT, "#2980b9"))
    if s.T_D24 is not None:
        bars.append(("T_D24", s.T_D24, "#8e44ad"))
    figure = go.Figure(go.Bar(x=[b[0] for b in bars], y=[shown(b[1]) for b in bars],
                              marker_color=[b[2] for b in bars],
                              text=[f"{shown(b[1]):.1f} {display_unit(unit)}" for b in bars],
                              textposition="outside", name="temperature"))
    for label, T, color in bars[2:]:
        figure.add_hline(y=shown(T), line_dash="dash", line_color=color, annotation_text=label,
                         annotation_position="top left")
    low = min(shown(b[1]) for b in bars)
    high = max(shown(b[1]) for b in bars)
    figure.update_layout(title=f"Thermal screening: {s.vessel}" + ("  (ALARM)" if reaches else ""),
                         yaxis_title=f"temperature [{display_unit(unit)}]", showlegend=False,
                         yaxis_range=[low - 0.15 * (high - low + 10), high + 0.15 * (high - low + 10)],
                         margin={"t": 60, "b": 80, "l": 60, "r": 20}, height=400)
    figure.add_annotation(text=CAUTION.replace("; defer", ";<br>defer"), xref="paper", yref="paper", x=0,
                          y=-0.12, xanchor="left", yanchor="top", showarrow=False, font={"size": 10},
                          align="left")
    return figure
