"""Heat of reaction at temperature by Kirchhoff's law, from the species' heat capacities.

    ΔH(T) = ΔH(298.15 K) + ∫_{298.15 K}^{T} Δcp dT,     Δcp = Σ ν_i · cp_i(T)  (products +, reactants −)

Each species keeps the phase written in the equation; its cp(T) is `thermo`'s correlation for that phase
(``HeatCapacityGas``, ``HeatCapacityLiquid``, ``HeatCapacitySolid``: the method `thermo` ranks first for the
species, named in the result) and the integral is taken by `thermo` (analytically where the correlation allows).
A species with no cp correlation in its phase leaves ΔH at its 25 °C value, and the result names it.
"""
from __future__ import annotations

from dataclasses import dataclass

from .reactions import ReactionHeat

__all__ = ["T_STANDARD", "KirchhoffHeat", "reaction_enthalpy_at", "CORRELATIONS", "correlation_source"]

T_STANDARD = 298.15  # K, the temperature of the standard heats of formation

#: thermo's cp method names -> the published source behind them
CORRELATIONS = {
    "HEOS_FIT": "fit to the ideal-gas or saturated-liquid cp of CoolProp's Helmholtz equation of state",
    "TRCIG": "TRC ideal-gas cp polynomials (Frenkel et al., TRC Thermodynamic Tables)",
    "POLING_POLY": "Poling, Prausnitz & O'Connell, The Properties of Gases and Liquids, 5th ed., ideal-gas polynomial",
    "POLING_CONST": "Poling, Prausnitz & O'Connell, 5th ed., constant cp at 298.15 K",
    "CRCSTD": "CRC Handbook, constant cp at 298.15 K",
    "WEBBOOK_SHOMATE": "NIST Chemistry WebBook, Shomate equation",
    "JANAF": "NIST-JANAF Thermochemical Tables, 4th ed.",
    "JANAF_FIT": "fit to the NIST-JANAF Thermochemical Tables, 4th ed.",
    "COOLPROP": "CoolProp",
    "VDI_TABULAR": "VDI Heat Atlas, tabulated",
    "ZABRANSKY_SPLINE_C": "Zabransky et al., heat capacity of liquids, spline",
    "ZABRANSKY_SPLINE": "Zabransky et al., heat capacity of liquids, spline",
    "PERRY151": "Perry's Handbook, Table 2-151 (inorganic solids)",
    "DADGOSTAR_SHAW": "Dadgostar & Shaw estimate (not measured)",
    "LASTOVKA_SHAW": "Lastovka & Shaw estimate (not measured)",
    "JOBACK": "Joback group-contribution estimate (not measured)",
}


def correlation_source(method: str) -> str:
    """The published source of a thermo cp method (``WEBBOOK_SHOMATE_1`` -> the NIST WebBook's Shomate equation).

    >>> correlation_source("ZABRANSKY_SPLINE_C_2")
    'Zabransky et al., heat capacity of liquids, spline'
    """
    return CORRELATIONS.get(method) or CORRELATIONS.get(method.rstrip("_0123456789"), "thermo, method as named")


@dataclass(frozen=True)
class KirchhoffHeat:
    """ΔH of an equation at 25 °C and at ``T`` [K], per mole of reaction as written [J/mol]."""

    T: float
    dH_standard: float
    dH_T: float
    correlations: dict  # species as written -> the cp method used
    missing: tuple[str, ...] = ()  # species without cp data in their phase (then dH_T = dH_standard)
    extrapolated: tuple[str, ...] = ()  # species whose correlation does not reach T
    beyond: tuple[tuple[str, float], ...] = ()  # liquids and solids above their data's top [K]: not in that phase

    @property
    def corrected(self) -> bool:
        return not self.missing


def _cp_correlation(CAS: str, phase: str, MW: float, T: float):
    """thermo's cp(T) of a species in a phase: the first method thermo ranks that covers 25 °C to T, else its
    first method (then extrapolated); None without any."""
    from thermo import HeatCapacityGas, HeatCapacityLiquid, HeatCapacitySolid

    kind = {"g": HeatCapacityGas, "l": HeatCapacityLiquid, "s": HeatCapacitySolid}[phase]
    try:
        correlation = kind(CASRN=CAS, MW=MW * 1000.0)
    except Exception:  # noqa: BLE001 - thermo raises for a CAS it has no row of
        return None
    if correlation.method is None:
        return None
    span = (min(T, T_STANDARD), max(T, T_STANDARD))
    for method in getattr(correlation, "ranked_methods", []):
        low, high = correlation.T_limits.get(method, (float("inf"), 0.0))
        if method in correlation.all_methods and low <= span[0] and span[1] <= high:
            correlation.method = method
            break
    return correlation


def reaction_enthalpy_at(heat: ReactionHeat, T: float) -> KirchhoffHeat:
    """ΔH of an equation at ``T`` [K] by Kirchhoff's law from the species' cp correlations.

    Parameters
    ----------
    heat : ReactionHeat
        The equation's Hess's-law result at 25 °C (:func:`heatbalance.reactions.reaction_enthalpy`)
    T : float
        The process temperature [K]

    Returns
    -------
    KirchhoffHeat
        ΔH at 25 °C and at T [J/mol reaction], the correlation of each species, the species without data
        (ΔH then stays at its 25 °C value) and those whose correlation is extrapolated to reach T.

    Examples
    --------
    Ammonia synthesis, ½ N2 + 3/2 H2 -> NH3 (gas), ΔfH°(NH3) = −45.90 kJ/mol at 298.15 K and −53.72 kJ/mol at
    800 K (NIST-JANAF Thermochemical Tables, ammonia, from memory):

    >>> from heatbalance.reactions import reaction_enthalpy
    >>> standard = reaction_enthalpy("1/2 N2(g) + 3/2 H2(g) -> NH3(g)", "N2", prefer="JANAF")
    >>> hot = reaction_enthalpy_at(standard, 800.0)
    >>> abs(hot.dH_T / 1000 - (-53.72)) < 0.15
    True

    References
    ----------
    Smith, Van Ness & Abbott, Introduction to Chemical Engineering Thermodynamics, 7th ed., section 4.6
    (temperature dependence of ΔH°). Bell, C. et al., thermo (ChEDL), heat-capacity correlations.
    """
    correlations, missing, extrapolated, beyond, integral = {}, [], [], [], 0.0
    for s in heat.species:
        written = f"{s.written}({s.phase})"
        correlation = _cp_correlation(s.CAS, s.phase, s.MW, T)
        part = None if correlation is None else correlation.T_dependent_property_integral(T_STANDARD, T)
        if part is None:  # no correlation in its phase, or none that integrates to T
            missing.append(written)
            continue
        correlations[written] = correlation.method
        low, high = correlation.T_limits.get(correlation.method, (0.0, float("inf")))
        if min(T, T_STANDARD) < low or max(T, T_STANDARD) > high:
            extrapolated.append(written)
            if s.phase != "g" and T > high:  # a liquid's or solid's data end where that phase ends
                beyond.append((written, high))
        integral += s.nu * part
    dH_T = heat.dH if missing else heat.dH + integral
    return KirchhoffHeat(T, heat.dH, dH_T, correlations, tuple(missing), tuple(extrapolated), tuple(beyond))
