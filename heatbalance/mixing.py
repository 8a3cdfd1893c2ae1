"""Heats of solution, dilution and neutralisation in water, and the heat capacity of the solutions (SI).

The integral heat of solution ΔH_s(n) [J per mol of solute] is the enthalpy change when one mole of the pure
solute (in its own state: H2SO4 liquid, NaOH solid, HCl gas, …) dissolves in n mol of water at 25 °C. It is
shipped in ``data/heats_of_solution.csv``, every row naming its source, and interpolated linearly in the
solute's mole fraction z = 1/(1 + n) (z = 0 is infinite dilution, z = 1 the pure solute).

Mixing solution A (mass m_A, solute mass fraction x1) with B (x2) to x3, by difference of integral heats:

    m_B = m_A·(x1 − x3)/(x3 − x2),  n_i = m_i·x_i/M,
    ΔH_mix = (n_A + n_B)·ΔH_s(x3) − n_A·ΔH_s(x1) − n_B·ΔH_s(x2),  heat released = −ΔH_mix

A pure liquid solute is the table's n = 0 row; a pure solid or gas (x = 1) is the reference state itself
(ΔH_s = 0 by definition) and the table starts at its most concentrated solution. Concentrations beyond the
table are refused, naming the field's address.

Heat capacity of the solutions: Laliberté's model (J. Chem. Eng. Data 54 (2009) 1725–1760) through
``thermo.electrochem``, inside its fitted range of mass fraction; above it, for the liquid solutes only, a
straight line in mass fraction to the pure liquid's cp (each value's source beside it).
"""
from __future__ import annotations

import csv
import math
from dataclasses import dataclass
from functools import lru_cache
from importlib import resources

from .errors import InputError
from .messages import Phrase
from .properties import Material

__all__ = ["Solute", "SOLUTES", "TABLE_FILE", "HeatRow", "heat_table", "solute_named", "water_per_solute",
           "integral_heat", "sources", "MixingHeat", "mixing_heat", "NEUTRALISATION_J_PER_MOL", "NEUTRALISATION_SOURCE",
           "ElectrolyteSolution", "solution_names", "solution_material", "solute_of_material", "M_WATER",
           "molar_mass", "pure_state", "released_at", "solution_cps"]

TABLE_FILE = "heats_of_solution.csv"
M_WATER = 0.018015  # kg/mol (IUPAC atomic weights)
REFERENCE_T = 298.15  # K: the table's temperature (25 °C)

#: J per mol of water formed: H+(aq) + OH−(aq) -> H2O(l), strong acid by strong base, infinitely dilute
NEUTRALISATION_J_PER_MOL = -55.84e3
NEUTRALISATION_SOURCE = ("NBS Tables of Chemical Thermodynamic Properties (Wagman et al. 1982): ΔfH° H2O(l) −285.83, "
                         "OH−(aq) −229.99, H+(aq) 0 kJ/mol, 25 °C, from memory (measured values 55.8–57.3 kJ/mol)")


@dataclass(frozen=True)
class Solute:
    """A solute of the heats table: ``material`` is its aqueous solution in the catalogue.

    ``cp_pure``: cp of the pure liquid solute [J/(kg·K)] for the bridge above Laliberté's range (liquids only);
    ``protons``/``hydroxides``: what one mole gives when neutralised (strong acids and bases only).
    """

    name: str
    formula: str
    cas: str
    material: str
    max_fraction: float
    t_min: float  # K: below, refused (the fit's lower end)
    t_max: float  # K: above, refused (boiling or gas release is not modelled)
    cp_pure: float | None = None
    cp_pure_source: str = ""
    protons: int = 0
    hydroxides: int = 0
    words: tuple[str, ...] = ()  # words in a material's name that mean this solute


SOLUTES: dict[str, Solute] = {s.name: s for s in (
    Solute("sulfuric acid", "H2SO4", "7664-93-9", "sulfuric acid (aq)", 1.0, 253.15, 373.15,
           1416.0, "138.9 J/(mol·K) for H2SO4(l) at 25 °C, CRC Handbook, from memory", protons=2,
           words=("sulfuric", "sulphuric", "oleum", "h2so4")),
    Solute("sodium hydroxide", "NaOH", "1310-73-2", "sodium hydroxide (aq)", 0.30, 277.15, 373.15,
           hydroxides=1, words=("sodium hydroxide", "caustic", "naoh")),
    Solute("hydrogen chloride", "HCl", "7647-01-0", "hydrochloric acid (aq)", 0.065, 278.15, 373.15,
           protons=1, words=("hydrochloric", "hydrogen chloride", "muriatic", "hcl")),
    Solute("nitric acid", "HNO3", "7697-37-2", "nitric acid (aq)", 1.0, 278.15, 353.15,
           1744.0, "109.9 J/(mol·K) for HNO3(l) at 25 °C, CRC Handbook, from memory", protons=1,
           words=("nitric", "hno3")),
    # 25 % aqueous ammonia boils at about 38 °C at 1 atm (from memory): kept below that, and no stronger
    Solute("ammonia", "NH3", "7664-41-7", "ammonia (aq)", 0.25, 260.15, 308.15,
           words=("ammonia", "ammonium hydroxide", "nh3")),
    Solute("potassium hydroxide", "KOH", "1310-58-3", "potassium hydroxide (aq)", 0.46, 277.15, 373.15,
           hydroxides=1, words=("potassium hydroxide", "caustic potash", "koh")),
)}


@dataclass(frozen=True)
class HeatRow:
    """One row of the table: n mol water per mol solute (``math.inf``: infinitely dilute), ΔH_s [J/mol]."""

    n: float
    dH: float
    source: str

    @property
    def z(self) -> float:
        return 0.0 if math.isinf(self.n) else 1.0 / (1.0 + self.n)


@lru_cache(maxsize=1)
def _table() -> tuple[dict[str, tuple[HeatRow, ...]], dict[str, float], dict[str, str]]:
    rows: dict[str, list[HeatRow]] = {}
    molar_mass, state = {}, {}
    with resources.files(__package__).joinpath("data").joinpath(TABLE_FILE).open(encoding="utf-8") as handle:
        for row in csv.DictReader(handle):
            name = row["solute"]
            n = math.inf if row["water_per_solute_mol"] == "inf" else float(row["water_per_solute_mol"])
            rows.setdefault(name, []).append(HeatRow(n, float(row["integral_heat_kJ_mol"]) * 1e3, row["source"]))
            molar_mass[name] = float(row["molar_mass_g_mol"]) / 1e3
            state[name] = row["pure_state"]
    ordered = {name: tuple(sorted(found, key=lambda r: r.z)) for name, found in rows.items()}
    return ordered, molar_mass, state


def heat_table(solute: str) -> tuple[HeatRow, ...]:
    """The rows of one solute, from infinite dilution to the most concentrated."""
    return _table()[0][solute]


def molar_mass(solute: str) -> float:
    """kg/mol."""
    return _table()[1][solute]


def pure_state(solute: str) -> str:
    return _table()[2][solute]


def solute_named(text: str, where: str = "") -> Solute:
    """A solute by its name or formula (any case); refused with the list of known solutes."""
    key = text.strip().lower()
    for s in SOLUTES.values():
        if key in (s.name, s.formula.lower(), s.material.lower()) or key in s.words:
            return s
    known = ", ".join(f"{s.name} ({s.formula})" for s in SOLUTES.values())
    raise InputError(f"no heats of solution for '{text}'; the table has: {known}", where)


def water_per_solute(solute: str, x: float) -> float:
    """n, mol water per mol solute, of a solution of solute mass fraction x (0 < x ≤ 1)."""
    return (1.0 - x) / M_WATER / (x / molar_mass(solute))


def _fraction_of(solute: str, n: float) -> float:
    """Solute mass fraction of a solution of n mol water per mol solute."""
    M = molar_mass(solute)
    return M / (M + n * M_WATER)


def integral_heat(solute: str, x: float, where: str = "") -> float:
    """Integral heat of solution ΔH_s of one mole of solute to a solution of mass fraction x [J/mol].

    x = 0 gives the infinitely dilute value; x = 1 the pure solute (0 by definition).

    >>> round(integral_heat("sulfuric acid", 98.079 / (98.079 + 10 * 18.015)) / 1e3, 2)  # n = 10, Table B.11
    -67.03
    """
    rows = heat_table(solute)
    if not 0.0 <= x <= 1.0:
        raise InputError(f"a mass fraction lies between 0 and 1, not {x:g}", where)
    if x == 1.0 and pure_state(solute) != "liquid":
        return 0.0
    z = 1.0 if x == 1.0 else (0.0 if x == 0.0 else 1.0 / (1.0 + water_per_solute(solute, x)))
    top = rows[-1]
    if z > top.z + 1e-12:
        raise InputError(Phrase("{x} {solute} is more concentrated than the heats-of-solution table reaches "
                                "({top}, {n} mol water per mol): the heat of mixing cannot be computed there",
                                {"x": f"{x:.1%}", "solute": solute, "top": f"{_fraction_of(solute, top.n):.1%}",
                                 "n": f"{top.n:g}"}), where)
    for low, high in zip(rows, rows[1:]):
        if low.z <= z <= high.z:
            share = (z - low.z) / (high.z - low.z)
            return low.dH + share * (high.dH - low.dH)
    return rows[0].dH  # z == 0: infinitely dilute


def sources(solute: str) -> list[str]:
    """The sources of a solute's rows, each once."""
    return list(dict.fromkeys(r.source for r in heat_table(solute)))


@dataclass(frozen=True)
class MixingHeat:
    """The heat of mixing A with B to x3: ``released`` [J, or W on a rate basis] is + when heat is given off."""

    solute: str
    released: float
    mass_a: float  # kg (or kg/s) of A
    mass_b: float  # kg (or kg/s) of B the mass balance needs
    moles_a: float
    moles_b: float
    dH1: float
    dH2: float
    dH3: float
    x1: float
    x2: float
    x3: float


def mixing_heat(solute: str, mass_a: float, x1: float, x2: float, x3: float, where: str = "") -> MixingHeat:
    """Heat released when ``mass_a`` of solution A (x1) is mixed with B (x2) to a final mass fraction x3.

    Parameters
    ----------
    solute : str  A solute of :data:`SOLUTES`
    mass_a : float  Mass of A [kg] (or its flow [kg/s]: the heat is then a power [W])
    x1, x2, x3 : float  Solute mass fractions of A, B and the mixture [-]
    where : str  The address of the statement (refusals name ``where.from_fraction`` etc.)

    Returns
    -------
    MixingHeat  ``released`` = −ΔH_mix [J or W], + when exothermic

    Raises
    ------
    InputError  x3 not strictly between x1 and x2; a fraction beyond the table; a negative amount.

    Examples
    --------
    1 kg of pure H2SO4 to 50 mol water per mol (Table B.11: −73.34 kJ/mol), 10.196 mol → 747.8 kJ:

    >>> x3 = 98.079 / (98.079 + 50 * 18.015)
    >>> round(mixing_heat("sulfuric acid", 1.0, 1.0, 0.0, x3).released / 1e3, 1)
    747.8
    """
    fields = {"x1": f"{where}.from_fraction", "x2": f"{where}.with_fraction", "x3": f"{where}.to_fraction"}
    if mass_a < 0:
        raise InputError(f"the amount of A cannot be negative ({mass_a:g})", f"{where}.amount")
    if not (min(x1, x2) < x3 < max(x1, x2)):
        raise InputError(f"the final mass fraction {x3:.4g} must lie strictly between those of A ({x1:.4g}) "
                         f"and B ({x2:.4g})", fields["x3"])
    M = molar_mass(solute)
    dH1 = integral_heat(solute, x1, fields["x1"])
    dH2 = integral_heat(solute, x2, fields["x2"])
    dH3 = integral_heat(solute, x3, fields["x3"])
    mass_b = mass_a * (x1 - x3) / (x3 - x2)
    n_a, n_b = mass_a * x1 / M, mass_b * x2 / M
    dH_mix = (n_a + n_b) * dH3 - n_a * dH1 - n_b * dH2
    return MixingHeat(solute, -dH_mix, mass_a, mass_b, n_a, n_b, dH1, dH2, dH3, x1, x2, x3)


# --------------------------------------------------------------------------- the solutions' heat capacity
def _laliberte(solute: Solute):
    from thermo.electrochem import Laliberte_heat_capacity_i, Laliberte_heat_capacity_w, _load_electrochem_data

    _load_electrochem_data()
    from thermo.electrochem import Laliberte_data

    row = Laliberte_data.loc[solute.cas]
    coefficients = tuple(float(row[f"a{i}"]) for i in range(1, 7))
    return Laliberte_heat_capacity_w, Laliberte_heat_capacity_i, coefficients, float(row["Max w.2"]), \
        float(row["Min T.2"]) + 273.15, float(row["Max T.2"]) + 273.15


_GAUSS = ((-0.8611363115940526, 0.3478548451374538), (-0.3399810435848563, 0.6521451548625461),
          (0.3399810435848563, 0.6521451548625461), (0.8611363115940526, 0.3478548451374538))


class ElectrolyteSolution(Material):
    """An aqueous solution of a tabled solute at a mass fraction: liquid only, cp from Laliberté (2009).

    h(T) = ∫ cp dT from 25 °C (4-point Gauss–Legendre). Inside the fit's temperatures the data are used as
    published; between them and [t_min, t_max] extrapolated (a warning); outside, refused. Above the fit's
    largest mass fraction a liquid solute's cp runs linearly to the pure liquid's (said in ``source``).
    """

    def __init__(self, solute: Solute, fraction: float):
        if not 0.0 <= fraction <= solute.max_fraction:
            raise InputError(f"{solute.material} is modelled from 0 to {solute.max_fraction:g} mass fraction "
                             f"(the heat capacity's fitted range), not {fraction:g}; define a more concentrated "
                             "solution as a worksheet material with its cp")
        cp_w, cp_i, coefficients, w_max, fit_low, fit_high = _laliberte(solute)
        self.name, self.solute, self.fraction = solute.material, solute, fraction
        self._cp_w, self._cp_i, self._a, self._w_max = cp_w, cp_i, coefficients, w_max
        self.t_min, self.t_max = solute.t_min, solute.t_max
        self.valid_min, self.valid_max = max(fit_low, self.t_min), min(fit_high, self.t_max)
        self.source = (f"Laliberté (J. Chem. Eng. Data 54, 2009) heat capacity via thermo, {solute.formula} "
                       f"w ≤ {w_max:.3g}, {fit_low - 273.15:.0f} to {fit_high - 273.15:.0f} °C")
        self.bridged = fraction > w_max
        if self.bridged:
            self.source += (f"; above w = {w_max:.3g} a straight line in w to the pure liquid's cp "
                            f"({solute.cp_pure_source})")
        self.source += "; boiling and gas release not modelled"

    def cp(self, T: float) -> float:
        """J/(kg·K) at T [K]."""
        w = self.fraction
        if w <= self._w_max:
            return self._mix(T, w)
        share = (w - self._w_max) / (1.0 - self._w_max)
        return (1.0 - share) * self._mix(T, self._w_max) + share * self.solute.cp_pure

    def _mix(self, T: float, w: float) -> float:
        return (1.0 - w) * self._cp_w(T) + w * self._cp_i(T, 1.0 - w, *self._a)

    def enthalpy(self, T: float, P: float) -> float:
        half, middle = (T - REFERENCE_T) / 2.0, (T + REFERENCE_T) / 2.0
        return half * sum(weight * self.cp(middle + half * node) for node, weight in _GAUSS)


def solution_names() -> dict[str, Solute]:
    """Catalogue name of each solution -> its solute."""
    return {s.material: s for s in SOLUTES.values()}


def solution_material(name: str, fraction: float | None) -> ElectrolyteSolution:
    solute = solution_names()[name]
    if fraction is None:
        raise InputError(f"{name} needs a mass fraction of {solute.formula} (0 to {solute.max_fraction:g})")
    return ElectrolyteSolution(solute, fraction)


def solute_of_material(material: Material, name: str) -> tuple[Solute | None, float | None]:
    """The tabled solute a line's material carries and its mass fraction (None when not known from the data):
    a catalogue solution, pure ammonia, or a worksheet material whose name says it (fraction unknown)."""
    if isinstance(material, ElectrolyteSolution):
        return material.solute, material.fraction
    lowered = name.lower()
    if lowered == "ammonia":
        return SOLUTES["ammonia"], 1.0
    for s in SOLUTES.values():
        if any(word in lowered.replace("-", " ").split() or (" " in word and word in lowered) for word in s.words):
            return s, None
    return None, None



# --------------------------------------------------------------------------- the heat of mixing at temperature
@lru_cache(maxsize=256)
def _solutions(solute: str, strengths: tuple[float, ...]) -> tuple[ElectrolyteSolution, ...] | None:
    try:
        return tuple(ElectrolyteSolution(SOLUTES[solute], x) for x in strengths)
    except InputError:
        return None


def released_at(heat: MixingHeat, T: float) -> float | None:
    """Heat released by the mixing when it happens at T [K] rather than at 25 °C: Kirchhoff's law.

    released(T) = released(25 °C) − [(m_A + m_B)·h(x3, T) − m_A·h(x1, T) − m_B·h(x2, T)]

    with h(x, T) the solution's enthalpy from 25 °C (Laliberté's cp, :class:`ElectrolyteSolution`): the path
    mixes the parts at 25 °C and heats the mixed solution with its own cp, as the enthalpy-table method for
    solutions does (Felder & Rousseau, ch. 8, reference states at 25 °C). The balance's lines heat their
    parts with their own cps, so the difference is the mixing's.

    Parameters
    ----------
    heat : MixingHeat  The mixing at 25 °C (:func:`mixing_heat`)
    T : float  The mixture's temperature [K]

    Returns
    -------
    float or None  [J, or W on a rate basis], + when heat is given off; None where the solutions' cp data
    do not reach a strength (a solid or gaseous solute, a caustic beyond Laliberté's fit) or T.
    """
    parts = _solutions_at(heat, T)
    if parts is None:
        return None
    h1, h2, h3 = (s.enthalpy(T, 101325.0) for s in parts)
    return heat.released - ((heat.mass_a + heat.mass_b) * h3 - heat.mass_a * h1 - heat.mass_b * h2)


def solution_cps(heat: MixingHeat, T: float) -> tuple[float, float, float] | None:
    """cp [J/(kg·K)] at T [K] of the mixing's A, B and mixed solution (Laliberté); None where the solutions' data
    do not reach a strength or T (as for :func:`released_at`)."""
    parts = _solutions_at(heat, T)
    return None if parts is None else tuple(s.cp(T) for s in parts)


def _solutions_at(heat: MixingHeat, T: float) -> tuple[ElectrolyteSolution, ...] | None:
    """A, B and the mixed solution as materials, when their data reach T and every strength."""
    solute = SOLUTES[heat.solute]
    if not solute.t_min <= T <= solute.t_max:
        return None
    return _solutions(heat.solute, (heat.x1, heat.x2, heat.x3))
