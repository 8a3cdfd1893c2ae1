"""Batch-reactor thermal screening: what happens to a batch with a reaction if cooling fails.

Published methods, usual names (Stoessel [1]_):

* adiabatic temperature rise ΔT_ad = Q_r / (m·cp), and with the vessel taking part,
  ΔT_ad / φ with the thermal inertia factor φ = 1 + m_vessel·cp_vessel / (m·cp);
* MTSR, the maximum temperature of the synthesis reaction: T_process + X_acc·ΔT_ad;
* MTT, the maximum technical temperature (here the boiling point at the vessel's pressure);
* T_D24, where a decomposition's time to maximum rate under adiabatic conditions is 24 h;
* the criticality class 1-5 from the order of T_process, MTSR, MTT and T_D24;
* the time to heat or cool a batch through a jacket with a utility at constant temperature.

The functions take and return plain SI floats (K, J, kg, J/(kg·K), W/K, s). The screening
of a solved worksheet is :mod:`heatbalance.analyses.screening`; its report and figure are in
:mod:`heatbalance.present.screening`.

Every number here is a screening estimate: see :data:`CAUTION`.
"""
from __future__ import annotations

import math

from .errors import InputError, NoSolutionError
from .messages import Measure, Phrase

__all__ = ["CAUTION", "CLASS_MEANINGS", "thermal_inertia_factor", "adiabatic_temperature_rise", "mtsr",
           "criticality_class", "jacket_time", "jacket_temperature"]

#: The one wording of the safety caution, shown once wherever a result bears on safety.
CAUTION = ("A screening estimate, not a substitute for reaction calorimetry, a process hazard analysis or "
           "licensed engineering; defer to local codes.")

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
        raise NoSolutionError(Phrase(
            "a utility at {Tu} cannot {verb} the batch from {T1} to {T2}: the target must lie between the start and "
            "the utility temperature (it is approached, never reached or passed). Use a {other} utility or a less "
            "ambitious target.", {"Tu": Measure(T_utility, "temperature"), "T1": Measure(T1, "temperature"),
                                  "T2": Measure(T2, "temperature"), "verb": verb,
                                  "other": "hotter" if verb == "heat" else "colder"}), "jacket target temperature")
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
