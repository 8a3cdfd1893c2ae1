"""Heat of reaction from a balanced equation, by Hess's law over standard heats of formation.

An equation is written in plain text, one line, with a phase on every species::

    C3H6(g) + H2(g) -> C3H8(g)
    CH4(g) + 2 O2(g) -> CO2(g) + 2 H2O(l)
    1/2 N2(g) + 3/2 H2(g) -> NH3(g)
    ethylene oxide(l) + water(l) -> ethylene glycol(l)

* Two sides separated by ``->`` (``=>`` and ``→`` are read the same way).
* Terms on a side separated by ``+`` with a space on each side (`` + ``).
* A term is an optional positive coefficient (``2``, ``0.5``, ``3/2``; a space
  after it is optional before a formula: ``2H2O(l)``), then the species, then
  its phase in brackets at the end: ``(g)`` gas, ``(l)`` liquid, ``(s)`` solid
  (``(gas)``, ``(liquid)``, ``(solid)``, ``(cr)`` are accepted too).
* The species is a formula (``H2O``), a name (``water``) or a CAS number
  (``7732-18-5``), looked up offline in the ``chemicals`` package's databases;
  the name and CAS number it resolved to are reported. A formula shared by
  several compounds of the database (``C3H6``: propene and cyclopropane;
  ``C2H6O``: ethanol and dimethyl ether) is refused: write the name or CAS.

The element balance is checked from the species' formulas. ΔH°rxn at 25 °C is
Σ ν·ΔHf° over the products minus the same over the reactants, with ΔHf° from the
``chemicals`` tables (``Hfg``/``Hfl``/``Hfs``) for the phase written; each value
reports the table it came from. An element in its reference state (H2 gas,
graphite, ...) has ΔHf° = 0 by definition where the tables have no row for it.
Aqueous species (ions, ``(aq)``) are not in these tables and are refused.
"""
from __future__ import annotations

import math
import re
from dataclasses import dataclass
from fractions import Fraction
from functools import lru_cache

from .errors import InputError

__all__ = ["PHASES", "TABLES", "Term", "Equation", "SpeciesHeat", "ReactionHeat", "parse_equation",
           "lookup_species", "heat_of_formation", "element_balance", "hess_law", "reaction_enthalpy"]

#: phase code -> words
PHASES = {"g": "gas", "l": "liquid", "s": "solid"}
_PHASE_ALIASES = {"g": "g", "gas": "g", "v": "g", "vap": "g", "l": "l", "liq": "l", "liquid": "l",
                  "s": "s", "solid": "s", "cr": "s", "c": "s"}

#: table (method) name in ``chemicals.reaction`` -> the published source behind it
TABLES = {
    "ATCT_G": "Active Thermochemical Tables (ATcT), Argonne National Laboratory, gas phase",
    "ATCT_L": "Active Thermochemical Tables (ATcT), Argonne National Laboratory, liquid phase",
    "CRC": "CRC Handbook of Chemistry and Physics, Standard Thermodynamic Properties of Chemical Substances",
    "WEBBOOK": "NIST Chemistry WebBook (NIST Standard Reference Database 69)",
    "JANAF": "NIST-JANAF Thermochemical Tables, 4th ed. (Chase, 1998)",
    "API_TDB_G": "API Technical Data Book, gas phase",
    "TRC": "TRC Thermodynamic Tables (Frenkel et al.)",
    "YAWS": "Yaws, Handbook of Thermodynamic and Physical Properties of Chemical Compounds",
    "JOBACK": "Joback group-contribution ESTIMATE (not a measured value)",
}
_ESTIMATES = ("JOBACK",)

#: elements whose reference state at 25 °C, 1 bar is the listed (formula, phase): ΔHf° = 0 by definition
_REFERENCE_STATES = {
    ("H2", "g"), ("O2", "g"), ("N2", "g"), ("F2", "g"), ("Cl2", "g"), ("Br2", "l"), ("I2", "s"),
    ("C", "s"), ("S", "s"), ("P", "s"), ("Si", "s"), ("Hg", "l"), ("He", "g"), ("Ne", "g"), ("Ar", "g"),
    ("Na", "s"), ("K", "s"), ("Li", "s"), ("Mg", "s"), ("Ca", "s"), ("Al", "s"), ("Fe", "s"), ("Cu", "s"),
    ("Zn", "s"), ("Ni", "s"), ("Cr", "s"), ("Ti", "s"), ("Ag", "s"), ("Pb", "s"), ("Sn", "s"),
}

_ARROW = re.compile(r"\s*(?:->|=>|→)\s*")
_PLUS = re.compile(r"\s+\+\s+")
_PHASE_AT_END = re.compile(r"^(?P<body>.*?)\s*\((?P<phase>[A-Za-z]+)\)\s*$")
_COEFFICIENT = re.compile(r"^(?P<num>\d+(?:\.\d+)?(?:/\d+)?|\.\d+)(?:\s+|(?=[A-Z\[]))(?P<rest>.+)$")


@dataclass(frozen=True)
class Term:
    """One species of an equation as written: coefficient (> 0), species text, phase code."""

    coefficient: float
    species: str
    phase: str

    def __str__(self) -> str:
        c = Fraction(self.coefficient).limit_denominator(100)
        number = "" if c == 1 else (f"{c} " if abs(float(c) - self.coefficient) < 1e-12 else f"{self.coefficient:g} ")
        return f"{number}{self.species}({self.phase})"


@dataclass(frozen=True)
class Equation:
    """A parsed equation: reactants and products, as written."""

    reactants: tuple[Term, ...]
    products: tuple[Term, ...]

    def __str__(self) -> str:
        return " + ".join(map(str, self.reactants)) + " -> " + " + ".join(map(str, self.products))


@dataclass(frozen=True)
class SpeciesHeat:
    """A species of the equation with what was looked up for it.

    ``nu`` is the signed stoichiometric coefficient (− reactant, + product);
    ``Hf`` the standard heat of formation at 25 °C [J/mol]; ``MW`` [kg/mol].
    """

    written: str
    phase: str
    nu: float
    name: str
    CAS: str
    formula: str
    MW: float
    Hf: float
    table: str
    source: str

    @property
    def text(self) -> str:
        """``H2O(l) = water (7732-18-5): ΔHf° −285.83 kJ/mol [ATCT_L]``."""
        return (f"{self.written}({self.phase}) = {self.name} ({self.CAS}): ΔHf° {self.Hf / 1000:.2f} kJ/mol "
                f"[{self.table}]")


@dataclass(frozen=True)
class ReactionHeat:
    """ΔH°rxn of an equation at 25 °C, as written and per mole of the key reactant."""

    equation: str
    species: tuple[SpeciesHeat, ...]
    dH: float  # J per mole of reaction as written
    key_reactant: str
    key_coefficient: float
    key_molar_mass: float  # kg/mol

    @property
    def dH_per_key(self) -> float:
        """ΔH°rxn per mole of key reactant [J/mol]."""
        return self.dH / self.key_coefficient

    @property
    def sources(self) -> dict[str, str]:
        """Table name -> published source, for the tables used."""
        return {s.table: s.source for s in self.species}

    @property
    def text(self) -> str:
        """One line for a report."""
        return (f"ΔH°rxn(25 °C) = {self.dH_per_key / 1000:,.2f} kJ per mol {self.key_reactant} for "
                f"{self.equation}, by Hess's law from " + "; ".join(s.text for s in self.species))


# --------------------------------------------------------------------------- parsing
def _coefficient(text: str, where: str) -> float:
    try:
        value = float(Fraction(text))
    except (ValueError, ZeroDivisionError):
        raise InputError(f"'{text}' is not a coefficient (write 2, 0.5 or 3/2)", where) from None
    if not value > 0 or not math.isfinite(value):
        raise InputError(f"a coefficient must be positive, not '{text}'", where)
    return value


def _term(text: str, where: str) -> Term:
    text = text.strip()
    if not text:
        raise InputError("an empty term: check for a doubled or trailing '+'", where)
    match = _PHASE_AT_END.match(text)
    phase_text = match.group("phase").lower() if match else None
    if match is None or phase_text not in _PHASE_ALIASES:
        if phase_text == "aq":
            raise InputError(f"'{text}': aqueous species are not in the heat-of-formation tables; write the pure "
                             "substances (e.g. NaOH(s) + HCl(g) -> NaCl(s) + H2O(l)) or enter ΔH yourself", where)
        raise InputError(f"'{text}' has no phase: end every species with (g), (l) or (s), e.g. H2O(l)", where)
    body = match.group("body").strip()
    coefficient = 1.0
    number = _COEFFICIENT.match(body)
    if number:
        coefficient = _coefficient(number.group("num"), where)
        body = number.group("rest").strip()
    if not body:
        raise InputError(f"'{text}' names no species", where)
    return Term(coefficient, body, _PHASE_ALIASES[phase_text])


def parse_equation(text: str, where: str = "equation") -> Equation:
    """Read an equation written as ``propene(g) + H2(g) -> propane(g)`` (the syntax is in the module notes).

    Parameters
    ----------
    text : str
        The equation, one line
    where : str
        The field it came from, for messages

    Returns
    -------
    Equation
        Reactants and products as written (coefficient, species, phase code)

    Raises
    ------
    InputError
        No arrow or more than one, an empty side, a term without a phase, ``(aq)``, a bad coefficient.

    Notes
    -----
    Only the text is read here: species are looked up, and the balance checked, by
    :func:`reaction_enthalpy`.

    Examples
    --------
    >>> str(parse_equation("CH4(g) + 2 O2(g) -> CO2(g) + 2H2O(l)"))
    'CH4(g) + 2 O2(g) -> CO2(g) + 2 H2O(l)'
    """
    if not isinstance(text, str) or not text.strip():
        raise InputError("the equation is empty: write e.g. C3H6(g) + H2(g) -> C3H8(g)", where)
    sides = _ARROW.split(text.strip())
    if len(sides) != 2:
        raise InputError(f"'{text}' needs exactly one arrow '->' between reactants and products", where)
    parts = []
    for side, label in zip(sides, ("reactants", "products")):
        if not side.strip():
            raise InputError(f"'{text}' has no {label}", where)
        parts.append(tuple(_term(t, where) for t in _PLUS.split(side.strip())))
    return Equation(parts[0], parts[1])


# --------------------------------------------------------------------------- data look-up
@lru_cache(maxsize=1024)
def lookup_species(species: str, where: str = "equation") -> tuple[str, str, str, float]:
    """(name, CAS, formula, molar mass [kg/mol]) of a formula, name or CAS number (offline).

    Parameters
    ----------
    species : str
        A formula (``H2O``), a name (``water``) or a CAS number (``7732-18-5``)
    where : str
        The field it came from, for messages

    Returns
    -------
    tuple
        (common name, CAS number, Hill formula, molar mass [kg/mol])

    Raises
    ------
    InputError
        The species is not in the ``chemicals`` databases, or it is a formula that several
        compounds of the databases share (the message lists them).

    Examples
    --------
    >>> lookup_species("H2O")  # CAS registry number of water: 7732-18-5
    ('water', '7732-18-5', 'H2O', 0.01801528)
    """
    from chemicals.identifiers import search_chemical

    try:
        meta = search_chemical(species)
    except (ValueError, KeyError, TypeError, IndexError):
        raise InputError(f"unknown species '{species}': not found by formula, name or CAS number in the "
                         "chemicals databases; check the spelling or write its CAS number", where) from None
    if _FORMULA.match(species):
        from chemicals.elements import atoms_to_Hill, nested_formula_parser

        try:
            hill = atoms_to_Hill(nested_formula_parser(species))
        except (ValueError, KeyError, TypeError):
            hill = ""
        isomers = _compounds_by_formula().get(hill, ())
        if meta.formula == hill and len(isomers) > 1:
            listed = ", ".join(isomers[:6]) + (f" and {len(isomers) - 6} more" if len(isomers) > 6 else "")
            raise InputError(f"'{species}' is the formula of several compounds ({listed}): write the name or "
                             "the CAS number of the one you mean", where)
    return meta.common_name, meta.CASs, meta.formula, meta.MW / 1000.0


_FORMULA = re.compile(r"^(?:[A-Z][a-z]?\d*|\((?:[A-Z][a-z]?\d*)+\)\d*)+$")


@lru_cache(maxsize=1)
def _compounds_by_formula() -> dict[str, tuple[str, ...]]:
    """Hill formula -> names of the compounds in the loaded ``chemicals`` database that have it.

    Spin isomers and other entries with placeholder CAS numbers (first group over 7 digits) are left out.
    """
    from chemicals import identifiers

    identifiers.search_chemical("water")  # loads the database
    found: dict[str, list[str]] = {}
    for meta in identifiers.pubchem_db.CAS_index.values():
        if len(str(meta.CASs).split("-", 1)[0]) <= 7:
            found.setdefault(meta.formula, []).append(meta.common_name)
    return {formula: tuple(sorted(names)) for formula, names in found.items()}


@lru_cache(maxsize=1024)  # the chemicals tables are pandas lookups; a worksheet re-solves often
def heat_of_formation(CAS: str, phase: str, prefer: str | None = None, species: str = "",
                      formula: str = "", where: str = "equation") -> tuple[float, str]:
    """Standard heat of formation at 25 °C [J/mol] of a species in a phase, and the table used.

    The ``chemicals`` package ranks its tables for each species; its first
    measured (non-estimated) table is taken, or ``prefer`` when that table has
    the species. An element in its reference state with no row is 0 (table ``"REFERENCE"``).

    Parameters
    ----------
    CAS : str
        CAS number of the species
    phase : str
        ``"g"``, ``"l"`` or ``"s"``
    prefer : str, optional
        A table of :data:`TABLES` to use when it has the species
    species, formula : str
        The species as written and its formula, for messages and the reference-state check
    where : str
        The field, for messages

    Returns
    -------
    tuple
        (ΔHf° [J/mol], table name)

    Raises
    ------
    InputError
        No table has the species in that phase (the message lists the phases that have data).

    Examples
    --------
    >>> heat_of_formation("7732-18-5", "l", prefer="CRC")  # CRC Handbook: H2O(l) -285.8 kJ/mol
    (-285800.0, 'CRC')
    """
    from chemicals import reaction as tables

    lookups = {"g": (tables.Hfg, tables.Hfg_methods), "l": (tables.Hfl, tables.Hfl_methods),
               "s": (tables.Hfs, tables.Hfs_methods)}
    if phase not in lookups:
        raise InputError(f"phase must be one of {sorted(PHASES)}, not '{phase}'", where)
    value_of, methods_of = lookups[phase]
    methods = [m for m in methods_of(CAS) if m in TABLES]
    measured = [m for m in methods if m not in _ESTIMATES]
    method = prefer if prefer in methods else (measured or methods or [None])[0]
    if method is None:
        if (formula, phase) in _REFERENCE_STATES:
            return 0.0, "REFERENCE"
        available = [PHASES[p] for p, (_, m) in lookups.items() if any(x in TABLES for x in m(CAS))]
        label = species or CAS
        hint = (f"; the tables have it as {' or '.join(available)}" if available
                else "; no heat of formation is tabulated for it: enter ΔH yourself")
        raise InputError(f"no heat of formation for {label} as {PHASES[phase]} ({label}({phase}))" + hint, where)
    return float(value_of(CAS, method=method)), method


def element_balance(equation: Equation, where: str = "equation") -> dict[str, float]:
    """Atoms of each element on the product side minus the reactant side (0 when balanced).

    Parameters
    ----------
    equation : Equation
        A parsed equation
    where : str
        The field, for messages

    Returns
    -------
    dict
        element symbol -> net atoms (products − reactants) [-]

    Raises
    ------
    InputError
        A species that cannot be looked up.

    Examples
    --------
    >>> element_balance(parse_equation("H2(g) + O2(g) -> H2O(l)"))  # hand count: O 1 - 2
    {'H': 0.0, 'O': -1.0}
    """
    from chemicals.elements import nested_formula_parser

    net: dict[str, float] = {}
    for terms, sign in ((equation.reactants, -1.0), (equation.products, 1.0)):
        for term in terms:
            _, _, formula, _ = lookup_species(term.species, where)
            for element, count in nested_formula_parser(formula).items():
                net[element] = net.get(element, 0.0) + sign * term.coefficient * count
    return net


def hess_law(coefficients: list[float], heats_of_formation: list[float]) -> float:
    """Heat of reaction by Hess's law.

    .. math::
        \\Delta H_{rxn} = \\sum_i \\nu_i \\Delta H_{f,i}

    Parameters
    ----------
    coefficients : list[float]
        Signed stoichiometric coefficients ν: negative for reactants, positive for products [-]
    heats_of_formation : list[float]
        Standard heats of formation of the same species, in their phases [J/mol]

    Returns
    -------
    float
        ΔH of the reaction as written [J per mole of reaction]

    Raises
    ------
    InputError
        The two lists differ in length.

    Notes
    -----
    At the reference temperature of the heats of formation (25 °C); no
    Kirchhoff correction for other temperatures. Negative = exothermic.

    Examples
    --------
    Methane burnt to liquid water, CRC Handbook ΔHf° (kJ/mol): CH4(g) −74.6,
    CO2(g) −393.5, H2O(l) −285.8 (from memory):

    >>> hess_law([-1, -2, 1, 2], [-74.6e3, 0.0, -393.5e3, -285.8e3])
    -890500.0

    References
    ----------
    .. [1] Hess, G. H. (1840). Thermochemische Untersuchungen. Annalen der Physik 126(6), 385-404.
    .. [2] Smith, Van Ness, Abbott. Introduction to Chemical Engineering Thermodynamics, 7th ed., ch. 4.
    """
    if len(coefficients) != len(heats_of_formation):
        raise InputError("one heat of formation is needed per coefficient", "equation")
    return float(sum(nu * h for nu, h in zip(coefficients, heats_of_formation)))


def _find_key(equation: Equation, key: str | None, resolved: dict[str, tuple], where: str) -> Term:
    reactants = equation.reactants
    if key is None or not key.strip():
        if len({t.species for t in reactants}) == 1:
            return reactants[0]
        names = ", ".join(t.species for t in reactants)
        raise InputError(f"name the key reactant (one of: {names}): ΔH is given per mole of it", where)
    wanted = key.strip()
    try:
        wanted_CAS = lookup_species(wanted, where)[1]
    except InputError:
        wanted_CAS = None
    for term in reactants:
        name, CAS, _, _ = resolved[term.species]
        if wanted in (term.species, CAS) or wanted.lower() == name.lower() or wanted_CAS == CAS:
            return term
    names = ", ".join(t.species for t in reactants)
    raise InputError(f"key reactant '{wanted}' is not a reactant of the equation; choose one of: {names}", where)


def reaction_enthalpy(equation: str | Equation, key_reactant: str | None = None, prefer: str | None = None,
                      where: str = "equation") -> ReactionHeat:
    """ΔH°rxn at 25 °C of a balanced equation, per mole of reaction and of the key reactant.

    .. math::
        \\Delta H_{rxn} = \\sum_{products} \\nu_i \\Delta H_{f,i}^\\circ
        - \\sum_{reactants} \\nu_i \\Delta H_{f,i}^\\circ

    Parameters
    ----------
    equation : str or Equation
        The balanced equation with phases, e.g. ``"C3H6(g) + H2(g) -> C3H8(g)"``
    key_reactant : str, optional
        The reactant ΔH is given per mole of, as written, by name or CAS; may be
        omitted when there is only one reactant
    prefer : str, optional
        A table of :data:`TABLES` to use wherever it has the species (e.g. ``"CRC"``)
    where : str
        The field the equation came from, for messages

    Returns
    -------
    ReactionHeat
        ΔH [J/mol reaction], ΔH per mol key reactant, each species' ΔHf° and table

    Raises
    ------
    InputError
        Unreadable equation, unknown species, no data for a species in its phase,
        an unbalanced equation (the message lists the elements), or a key that
        is not a reactant.

    Notes
    -----
    Standard state 25 °C, 1 bar; the phase written matters (H2O(l) and H2O(g)
    differ by water's heat of vaporisation at 25 °C, about 44 kJ/mol).
    Negative = exothermic.

    Examples
    --------
    Hydrogenation of propene, CRC Handbook ΔHf° (kJ/mol, from memory):
    propene(g) +20.0, propane(g) −103.8, so ΔH = −123.8 kJ/mol:

    >>> heat = reaction_enthalpy("propene(g) + H2(g) -> propane(g)", key_reactant="propene", prefer="CRC")
    >>> round(heat.dH_per_key / 1000, 1)
    -123.8

    References
    ----------
    .. [1] Haynes, W. M. (ed.). CRC Handbook of Chemistry and Physics, 95th ed., section 5,
       Standard Thermodynamic Properties of Chemical Substances.
    .. [2] Bell, C. et al. chemicals: chemical properties component of Chemical Engineering Design
       Library (ChEDL), https://github.com/CalebBell/chemicals
    """
    parsed = parse_equation(equation, where) if isinstance(equation, str) else equation
    resolved = {t.species: lookup_species(t.species, where) for t in (*parsed.reactants, *parsed.products)}
    net = element_balance(parsed, where)
    wrong = {e: n for e, n in net.items() if abs(n) > 1e-9 * max(1.0, *(abs(t.coefficient) for t in
                                                                        (*parsed.reactants, *parsed.products)))}
    if wrong:
        left, right = _side_counts(parsed, resolved)
        detail = "; ".join(f"{e}: {left.get(e, 0):g} on the left, {right.get(e, 0):g} on the right"
                           for e in sorted(wrong))
        involved = sorted({t.species for t in (*parsed.reactants, *parsed.products)
                           if set(_atoms(resolved[t.species][2])) & set(wrong)})
        raise InputError(f"the equation is not balanced ({detail}); check the coefficients of "
                         f"{', '.join(involved)}", where)
    species = []
    for terms, sign in ((parsed.reactants, -1.0), (parsed.products, 1.0)):
        for term in terms:
            name, CAS, formula, MW = resolved[term.species]
            Hf, table = heat_of_formation(CAS, term.phase, prefer, term.species, formula, where)
            source = TABLES.get(table, "element in its reference state: zero by definition")
            species.append(SpeciesHeat(term.species, term.phase, sign * term.coefficient, name, CAS, formula,
                                       MW, Hf, table, source))
    dH = hess_law([s.nu for s in species], [s.Hf for s in species])
    key = _find_key(parsed, key_reactant, resolved, where)
    key_total = sum(t.coefficient for t in parsed.reactants if t.species == key.species)
    return ReactionHeat(str(parsed), tuple(species), dH, key.species, key_total, resolved[key.species][3])


def _atoms(formula: str) -> dict[str, float]:
    from chemicals.elements import nested_formula_parser

    return nested_formula_parser(formula)


def _side_counts(equation: Equation, resolved: dict) -> tuple[dict, dict]:
    sides = []
    for terms in (equation.reactants, equation.products):
        count: dict[str, float] = {}
        for t in terms:
            for e, n in _atoms(resolved[t.species][2]).items():
                count[e] = count.get(e, 0.0) + t.coefficient * n
        sides.append(count)
    return sides[0], sides[1]
