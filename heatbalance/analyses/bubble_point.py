"""The bubble point of a vessel's liquid mixture at its pressure: the MTT of its thermal screening.

    Σ x_i · γ_i(T, x) · P_sat,i(T) = P          solved for T (Brent's method)

P_sat,i from `thermo`'s vapour-pressure correlations (each component's method is named in the result), γ_i
from original UNIFAC (`thermo.unifac`, version 0: the published UNIFAC group parameters, groups assigned by the
DDBST as shipped with `thermo`) when every component has groups; else γ = 1, Raoult's law, and the result says
so. The composition is the vessel's charges as charged (mole fractions from their masses): those with liquid
in them as charged or at the end (a solvent the balance boils off stays in).

A charge's chemical comes from the catalogue (a pure fluid is itself; an aqueous glycol is water and the glycol
at its mass fraction) or from the vessel's screening ``components`` (a material defined by its cp only). A
charge the tool cannot place is refused at its address, never guessed: dissolved salts (Raoult's law does not
hold for electrolytes), a material with no chemical named, a chemical without vapour-pressure data, a
component above its critical temperature (a dissolved gas: Henry's law, not Raoult's).
"""
from __future__ import annotations

import math
from dataclasses import dataclass, field
from functools import lru_cache

from ..address import item
from ..errors import InputError
from ..materials import PURE_FLUIDS
from ..messages import Measure, Phrase
from ..mixing import ElectrolyteSolution

__all__ = ["BubblePoint", "mixture_components", "bubble_point", "catalogue_chemical", "GLYCOLS", "UNIFAC_NAME",
           "RAOULT_NAME"]

#: CoolProp incompressible code of an aqueous glycol -> the glycol, for its vapour pressure
GLYCOLS = {"MEG": "ethylene glycol", "MPG": "propylene glycol"}
UNIFAC_NAME = "original UNIFAC (thermo.unifac version 0, DDBST group assignments)"
RAOULT_NAME = "Raoult's law (ideal solution, γ = 1)"
_NOT_RAOULT = ("an electrolyte solution", "a solution of a dissolved gas (Henry's law, not Raoult's)")
_BLENDS = {"R-410A", "air"}  # catalogue fluids that are mixtures themselves
_TABLE_CHEMICALS = {"ice (melting to water)": "water"}  # rows of the shipped table that are one chemical
_CATALOGUE_IDS = {"R-32": "75-10-5"}  # catalogue names the `chemicals` search does not know: CAS (difluoromethane)


@dataclass
class BubblePoint:
    """The bubble point of a liquid mixture, SI (K, Pa); mole fractions by the chemical's name."""

    T: float
    P: float
    composition: dict[str, float]
    model: str
    vapour_pressure_methods: dict[str, str]
    major: str  # the component with the largest mole fraction
    T_major: float  # its pure boiling point at P, from the same vapour-pressure data
    volatile_share: float  # the part of P the other components supply at T
    notes: list[Phrase] = field(default_factory=list)


def catalogue_chemical(material: str) -> str | None:
    """The chemical (name or CAS for `chemicals`) a catalogue material is, or None (a blend, a solution, a solid).

    >>> catalogue_chemical("toluene"), catalogue_chemical("R-32"), catalogue_chemical("air")
    ('toluene', '75-10-5', None)
    """
    if material in PURE_FLUIDS and material not in _BLENDS:
        return _CATALOGUE_IDS.get(material, material)
    return _TABLE_CHEMICALS.get(material)


def mixture_components(lines: list, results: list, chemicals: dict[str, str], vessel: str) -> list[tuple]:
    """``(chemical, kg, address)`` of each liquid in a vessel's charges; a charge that cannot be placed is refused
    at its address (``InputError``).

    ``lines``/``results``: the vessel's charges (problem lines and their solved results, in the same order);
    ``chemicals``: charge name -> chemical, from the screening's ``components``.
    """
    out = []
    for line, solved in zip(lines, results):
        material, where = line.material, f"{line.address}.material"
        if not (_holds_liquid(solved.initial_phase) or _holds_liquid(solved.final_phase)) \
                and line.charge not in chemicals:
            continue  # a solid or a gas both as charged and at the end is not part of the boiling liquid
        if line.charge in chemicals:
            out.append((chemicals[line.charge], solved.amount_si, item("vessels", vessel, "screening",
                                                                       item("components", line.charge))))
        elif catalogue_chemical(line.material_name) is not None:
            out.append((catalogue_chemical(line.material_name), solved.amount_si, where))
        elif getattr(material, "code", None) in GLYCOLS:
            out.append(("water", solved.amount_si * (1.0 - material.fraction), where))
            out.append((GLYCOLS[material.code], solved.amount_si * material.fraction, where))
        elif isinstance(material, ElectrolyteSolution):
            raise InputError(f"{line.material_name} is {_NOT_RAOULT[material.solute.name == 'ammonia']}: Raoult's "
                             f"law does not hold, so the mixture's boiling point is not computed; enter MTT "
                             f"({item('vessels', vessel, 'screening', 'MTT')})", where)
        elif getattr(material, "code", None) is not None:
            raise InputError(f"{line.material_name} is a salt solution: Raoult's law does not hold for dissolved "
                             f"electrolytes, so the mixture's boiling point is not computed; enter MTT "
                             f"({item('vessels', vessel, 'screening', 'MTT')})", where)
        else:
            raise InputError(f"no vapour-pressure data for '{line.material_name}' (its data give cp only): name the "
                             f"chemical this charge is in {item('vessels', vessel, 'screening', 'components')}, or "
                             f"enter MTT ({item('vessels', vessel, 'screening', 'MTT')})", where)
    return out


def _holds_liquid(phase: str) -> bool:
    """Whether a state's phase has liquid in it: a liquid, saturated liquid, or a part-boiled or part-melted
    mixture (``17.6% vapour``, ``43.2% solid``). A solvent the balance boils off at the end was liquid as charged:
    it stays in the boiling liquid, which it makes boil lower (leaving it out put MTT on the unsafe side)."""
    return "liquid" in phase or "%" in phase


@lru_cache(maxsize=64)
def _constants(chemical: str):
    """(name, CAS, molar mass kg/mol, vapour-pressure correlation, UNIFAC groups) of a chemical, from `thermo`."""
    from thermo import ChemicalConstantsPackage, VaporPressure

    c = ChemicalConstantsPackage.constants_from_IDs([chemical])
    vp = VaporPressure(CASRN=c.CASs[0], Tb=c.Tbs[0], Tc=c.Tcs[0], Pc=c.Pcs[0], omega=c.omegas[0])
    return c.names[0], c.CASs[0], c.MWs[0] / 1000.0, c.Tcs[0], vp, (c.UNIFAC_groups or [None])[0] or {}


def _chemical(chemical: str, where: str):
    try:
        constants = _constants(chemical.strip())
    except Exception:  # noqa: BLE001 - thermo raises ValueError/KeyError for a name it does not know
        raise InputError(f"'{chemical}' is not a chemical the `chemicals` databases know (give its name or CAS "
                         f"number)", where) from None
    if constants[4].method is None:
        raise InputError(f"no vapour-pressure data for {constants[0]} (CAS {constants[1]}): enter MTT", where)
    return constants


def bubble_point(components: list[tuple], P: float, activity_model: str = "UNIFAC") -> BubblePoint:
    """The bubble point at ``P`` [Pa] of a liquid of ``components`` ``(chemical, kg, address)``.

    Raises
    ------
    InputError
        An unknown chemical or one without vapour-pressure data (at its address); a component above its critical
        temperature where the mixture would boil; no bubble point in the data's range.

    Examples
    --------
    >>> bp = bubble_point([("benzene", 39.06, ""), ("toluene", 46.07, "")], 101325.0)  # x = 0.5 each
    >>> round(bp.T - 273.15, 1)  # 92.4 °C: McCabe, Smith & Harriott's benzene-toluene table at 1 atm, from memory
    92.4
    """
    data: dict[str, list] = {}
    for chemical, kg, where in components:
        name, cas, M, Tc, vp, groups = _chemical(chemical, where)
        entry = data.setdefault(name, [0.0, M, Tc, vp, groups, where])
        entry[0] += kg / M
    total = sum(d[0] for d in data.values())
    if not total > 0:
        raise InputError("the vessel holds no liquid to boil", components[0][2] if components else "")
    names = list(data)
    xs = [data[n][0] / total for n in names]
    vps = [_checked(data[n][3], n, data[n][5]) for n in names]
    no_groups = [n for n in names if not data[n][4]]
    use_unifac = activity_model == "UNIFAC" and len(names) > 1 and not no_groups
    gammas = _gammas([data[n][4] for n in names], xs) if use_unifac else (lambda T: [1.0] * len(xs))

    def excess(T: float) -> float:
        return sum(x * g * vp(T) for x, g, vp in zip(xs, gammas(T), vps)) - P

    pure = {n: _pure_boiling(data[n][3], P, n, data[n][5]) for n in names}
    low, high = min(pure.values()) - 60.0, max(pure.values()) + 1.0
    T = _root(excess, low, high, data, names)
    major = names[max(range(len(xs)), key=lambda i: xs[i])]
    i_major = names.index(major)
    share = 1.0 - xs[i_major] * gammas(T)[i_major] * vps[i_major](T) / P
    for n in names:
        if T >= data[n][2]:
            raise InputError(f"{n} is above its critical temperature ({data[n][2]:.1f} K) where the mixture would "
                             "boil: a dissolved gas follows Henry's law, not Raoult's; enter MTT", data[n][5])
    notes = []
    if activity_model == "UNIFAC" and no_groups and len(names) > 1:
        notes.append(Phrase(f"No UNIFAC groups for {', '.join(no_groups)}: Raoult's law (γ = 1) is used; a real "
                            "mixture may boil lower (positive deviation) or higher."))
    return BubblePoint(T, P, dict(zip(names, xs)), UNIFAC_NAME if use_unifac else RAOULT_NAME,
                       {n: str(data[n][3].method) for n in names}, major, pure[major], share, notes)


def _checked(vp, name: str, where: str):
    """P_sat(T) [Pa] of a correlation, refusing (at ``where``) a temperature it gives no number at."""
    def P_sat(T: float) -> float:
        value = vp(T)
        if value is None or not math.isfinite(value):
            raise InputError(Phrase("no vapour pressure of {name} at {T} in its data: enter MTT",
                                    {"name": name, "T": Measure(T, "temperature", 1)}), where)
        return value
    return P_sat


def _gammas(groups: list[dict], xs: list[float]):
    from thermo.unifac import UNIFAC

    model = UNIFAC.from_subgroups(T=298.15, xs=xs, chemgroups=groups, version=0)
    return lambda T: model.to_T_xs(T, xs).gammas()


def _pure_boiling(vp, P: float, name: str, where: str) -> float:
    try:
        T = vp.solve_property(P)
    except Exception:  # noqa: BLE001 - thermo raises when P lies outside the correlation
        T = None
    if T is None or not math.isfinite(T):
        raise InputError(Phrase("the vapour-pressure data of {name} do not reach {P}: enter MTT",
                                {"name": name, "P": Measure(P, "pressure")}), where)
    return T


def _root(excess, low: float, high: float, data: dict, names: list[str]) -> float:
    from scipy.optimize import brentq

    try:
        lo, hi = excess(low), excess(high)
        if lo < 0 < hi:
            return brentq(excess, low, high, xtol=1e-6)
    except InputError:
        raise
    except (ArithmeticError, ValueError):  # a correlation failing inside the bracket: no root found
        pass
    where = data[names[0]][5]
    raise InputError("no bubble point found for this liquid between the components' boiling points: enter MTT",
                     where)
