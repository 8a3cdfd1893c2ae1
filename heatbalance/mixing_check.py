"""Loud warnings when a balance mixes an acid, a base or ammonia with water and no heat of mixing is stated.

Lines mix when they end at one temperature: the charges of a vessel, or streams whose final states share a
temperature. When such a group holds a solute of the heats-of-solution table (:mod:`heatbalance.mixing`)
together with water (or the same solute at another strength), and the worksheet states no mixing of that
solute there, the result carries a warning with an estimate of the missing heat (integral heats of solution
at 25 °C) and the temperature rise it implies. An acid meeting a base with no reaction stated gets the same
for the heat of neutralisation. Never silence: a concentration the table cannot reach still warns, saying why.
"""
from __future__ import annotations

from dataclasses import dataclass

from .address import item
from .errors import HeatBalanceError
from .messages import Measure, Phrase
from .mixing import NEUTRALISATION_J_PER_MOL, Solute, integral_heat, molar_mass, solute_of_material
from .problem import Line, Problem
from .results import LineResult
from .units import heat_kind

__all__ = ["unstated_mixing", "mixing_groups", "Suggestion", "suggested_mixings"]


def mixing_groups(p: Problem) -> list[tuple[str | None, list[int]]]:
    """Groups of line indices that end mixed: (the vessel or None, indices), each group once."""
    groups: dict[str, tuple[str | None, list[int]]] = {}
    for i, line in enumerate(p.lines):
        if line.vessel is not None:
            groups.setdefault(f"vessel:{line.vessel}", (line.vessel, []))[1].append(i)
        elif line.final.var is not None and line.final.var.startswith("common:"):
            groups.setdefault(line.final.var, (None, []))[1].append(i)
    unique: dict[frozenset, tuple[str | None, list[int]]] = {}
    for vessel, members in groups.values():
        unique.setdefault(frozenset(members), (vessel, members))
    return [g for g in unique.values() if len(g[1]) > 1]


def _heat_capacity(line: Line, result: LineResult) -> float | None:
    """m·cp at the line's final state [J/K] (or W/K), from its property data; None where the data stop."""
    T, m = result.final_T, line.material
    low, high = max(T - 0.5, m.t_min), min(T + 0.5, m.t_max)
    try:
        return result.amount_si * (m.enthalpy(high, result.final_P) - m.enthalpy(low, result.final_P)) / (high - low)
    except (HeatBalanceError, ValueError, ZeroDivisionError):
        return None


def _released(solute: Solute, parts: list[tuple[float, float]]) -> tuple[float, float]:
    """Heat released mixing (mass, fraction) parts, and the final fraction."""
    total = sum(m for m, _ in parts)
    x3 = sum(m * x for m, x in parts) / total
    M = molar_mass(solute.name)
    before = sum(m * x / M * integral_heat(solute.name, x) for m, x in parts if m * x > 0)
    after = sum(m * x for m, x in parts) / M * integral_heat(solute.name, x3)
    return before - after, x3


def unstated_mixing(p: Problem, lines: list[LineResult]) -> list[Phrase]:
    """A warning per group that mixes a tabled solute with water (or an acid with a base) with no heat stated;
    a stated mixing the lines do not make; a solution's cp taken beyond its fitted strength."""
    out = [Phrase("{name}: the heat capacity of {material} at {x} lies beyond Laliberté's fitted strength; it is "
                  "interpolated to the pure liquid's and may be off by several percent.",
                  {"name": line.name, "material": line.material.name, "x": f"{line.material.fraction:.1%}"},
                  line.address)
           for line in p.lines if getattr(line.material, "bridged", False)]
    kind = heat_kind(p.basis)
    for vessel, members in mixing_groups(p):
        found = {i: solute_of_material(p.lines[i].material, p.lines[i].material_name) for i in members}
        if all(solute is None for solute, _ in found.values()):
            continue  # nothing here has a heat of solution (and no property call is spent finding that out)
        water = [i for i in members if p.lines[i].material_name == "water"]
        address = p.lines[members[0]].address if vessel is None else item("vessels", vessel)
        capacity = [_heat_capacity(p.lines[i], lines[i]) for i in members]
        total_capacity = None if None in capacity else sum(capacity)
        for solute in {s.name: s for s, _ in found.values() if s is not None}.values():
            carriers = [i for i in members if found[i][0] is solute]
            fractions = {found[i][1] for i in carriers}
            if (not water and len(fractions) < 2) or fractions == {0.0}:
                continue  # one strength and no water, or no solute at all
            if any(t.mixing is not None and t.mixing.solute == solute.name and t.vessel in (None, vessel)
                   for t in p.terms):
                continue
            out.append(_missing(solute, [lines[i] for i in carriers + water],
                                [(lines[i].amount_si, found[i][1]) for i in carriers]
                                + [(lines[i].amount_si, 0.0) for i in water], kind, total_capacity, address))
        out += _stated_against_lines(p, vessel, members, found)
        neutralisation = _neutralisation(p, vessel, members, found, lines, kind, total_capacity, address)
        if neutralisation is not None:
            out.append(neutralisation)
    return out


def _stated_against_lines(p: Problem, vessel: str | None, members: list[int], found: dict) -> list[Phrase]:
    """A stated mixing whose final strength differs from what the group's lines make (mass balance)."""
    out = []
    for term in (t for t in p.terms if t.mixing is not None and t.vessel in (None, vessel)):
        carriers = [i for i in members if found[i][0] is not None and found[i][0].name == term.mixing.solute]
        waters = [i for i in members if p.lines[i].material_name == "water"]
        parts = [(p.lines[i].amount, found[i][1]) for i in carriers] + [(p.lines[i].amount, 0.0) for i in waters]
        if not carriers or any(m is None or x is None for m, x in parts) or sum(m for m, _ in parts) <= 0:
            continue
        x3 = sum(m * x for m, x in parts) / sum(m for m, _ in parts)
        where = item("mixings", term.name)
        if abs(x3 - term.mixing.x3) > 0.005:
            out.append(Phrase("The stated mixing {name} ends at {stated}, but the lines mixed here make {made} "
                              "(mass balance): its heat may not be this balance's. Check its strengths and amount.",
                              {"name": term.name, "stated": f"{term.mixing.x3:.1%}", "made": f"{x3:.1%}"}, where))
            continue
        same = [i for i in carriers if abs(found[i][1] - term.mixing.x1) < 1e-9]
        amount = sum(p.lines[i].amount for i in same)
        if same and abs(amount - term.mixing.mass_a) > 0.01 * max(amount, term.mixing.mass_a):
            out.append(Phrase("The stated mixing {name} mixes {stated} of A, but the lines here hold {held} at that "
                              "strength: its heat is in proportion to the amount of A. Check its amount.",
                              {"name": term.name, "stated": Measure(term.mixing.mass_a, _amount_kind(p)),
                               "held": Measure(amount, _amount_kind(p))}, f"{where}.amount"))
    return out


def _amount_kind(p: Problem) -> str:
    return "mass" if p.basis == "batch" else "mass_flow"


def _missing(solute: Solute, group: list[LineResult], parts: list[tuple[float, float | None]], kind: str,
             capacity: float | None, address: str) -> Phrase:
    names = ", ".join(ln.name for ln in group)
    values = {"lines": names, "solute": f"{solute.name} ({solute.formula})"}
    reason = None
    if any(x is None for _, x in parts):
        reason = "the strength of a worksheet material is not known; use the catalogue solution with its mass fraction"
    elif sum(m for m, _ in parts) <= 0:
        reason = "the amounts are zero"
    else:
        try:
            released, x3 = _released(solute, parts)
        except HeatBalanceError as exc:
            reason = exc.message
    if reason is not None:
        values["reason"] = reason
        return Phrase("HEAT OF MIXING NOT IN THE BALANCE: {lines} bring {solute} together with water, and no "
                      "mixing is stated; its heat could not be estimated ({reason}). Dilution heats of strong acids "
                      "and bases can raise a batch by tens of kelvin: state the mixing (mixings) or a duty.",
                      values, address)
    values.update(Q=Measure(released, kind), x3=f"{x3:.1%}", T=Measure(298.15, "temperature", 0),
                  rise=Measure(released / capacity, "temperature_difference", 3) if capacity else "an unknown amount")
    return Phrase("HEAT OF MIXING NOT IN THE BALANCE: {lines} bring {solute} together with water (to about {x3}) "
                  "and no mixing is stated. Mixing releases about {Q} (integral heats of solution at {T}), enough "
                  "to raise these lines by about {rise} (without the vessel); the answer does not include it. State "
                  "the mixing (mixings) so it enters the balance.", values, address)


def _neutralisation(p: Problem, vessel: str | None, members: list[int], found: dict, lines: list[LineResult],
                    kind: str, capacity: float | None, address: str) -> Phrase | None:
    """Warn when a strong acid meets a strong base in one group and no reaction is stated there."""
    acids = [i for i in members if found[i][0] is not None and found[i][0].protons]
    bases = [i for i in members if found[i][0] is not None and found[i][0].hydroxides]
    if not acids or not bases:
        return None
    if any(t.kind == "reaction" and t.vessel in (None, vessel) for t in p.terms):
        return None

    def equivalents(indices: list[int], per_mole: str) -> float | None:
        if any(found[i][1] is None for i in indices):
            return None
        return sum(lines[i].amount_si * found[i][1] / molar_mass(found[i][0].name) * getattr(found[i][0], per_mole)
                   for i in indices)

    h, oh = equivalents(acids, "protons"), equivalents(bases, "hydroxides")
    names = ", ".join(lines[i].name for i in acids + bases)
    if h is None or oh is None:
        return Phrase("HEAT OF NEUTRALISATION NOT IN THE BALANCE: {lines} bring a strong acid and a strong base "
                      "together and no reaction is stated (about 56 kJ per mol of water formed).",
                      {"lines": names}, address)
    released = -NEUTRALISATION_J_PER_MOL * min(h, oh)
    values = {"lines": names, "Q": Measure(released, kind),
              "rise": Measure(released / capacity, "temperature_difference", 3) if capacity else "an unknown amount"}
    return Phrase("HEAT OF NEUTRALISATION NOT IN THE BALANCE: {lines} bring a strong acid and a strong base together "
                  "and no reaction is stated. Neutralisation releases about {Q} (55.84 kJ per mol of water formed, "
                  "NBS tables), enough to raise these lines by about {rise}; enter it as a reaction.", values, address)


@dataclass(frozen=True)
class Suggestion:
    """A mixing the lines imply: one solution (``amount_address``) into water, in ``vessel`` (None: streams)."""

    vessel: str | None
    solute: str
    amount_address: str
    from_fraction: float
    to_fraction: float


def suggested_mixings(p: Problem) -> list[Suggestion]:
    """Each group where one line of a tabled solute (strength known) meets water, with the final strength from
    the mass balance of the problem's amounts (lines whose amount is the unknown are left out)."""
    out = []
    for vessel, members in mixing_groups(p):
        found = {i: solute_of_material(p.lines[i].material, p.lines[i].material_name) for i in members}
        if all(solute is None for solute, _ in found.values()):
            continue  # nothing here has a heat of solution (and no property call is spent finding that out)
        water = [i for i in members if p.lines[i].material_name == "water"]
        carriers = [i for i in members if found[i][0] is not None]
        if len(carriers) != 1 or not water or found[carriers[0]][1] is None:
            continue
        (a,) = carriers
        amounts = [p.lines[i].amount for i in [a, *water]]
        if None in amounts or sum(amounts) <= 0:
            continue
        x1 = found[a][1]
        out.append(Suggestion(vessel, found[a][0].name, p.lines[a].amount_address, x1,
                              round(p.lines[a].amount * x1 / sum(amounts), 6)))
    return out
