"""The catalogue of materials: CoolProp fluids, aqueous solutions, and tabulated solids.

Names are the generic chemical names engineers use. Each material reports the
source of its property data (``Material.source``).
"""
from __future__ import annotations

import csv
from dataclasses import dataclass, replace
from functools import lru_cache
from importlib import resources

from .errors import InputError
from .humid_air import HUMID_AIR
from .mixing import solution_material, solution_names
from .properties import CoolPropFluid, IncompressibleSolution, Material, Phase, TabulatedMaterial
from .solids import TablePhase, cp_tables

__all__ = ["PURE_FLUIDS", "SOLUTIONS", "CORRELATED_LIQUIDS", "get_material", "solid_table", "catalogue",
           "MaterialInfo", "SOLIDS_FILE", "cragoe_cp"]

#: generic name -> (CoolProp fluid, backend)
PURE_FLUIDS: dict[str, tuple[str, str]] = {
    "water": ("Water", "IF97"),
    "air": ("Air", "HEOS"),
    "nitrogen": ("Nitrogen", "HEOS"),
    "oxygen": ("Oxygen", "HEOS"),
    "argon": ("Argon", "HEOS"),
    "hydrogen": ("Hydrogen", "HEOS"),
    "helium": ("Helium", "HEOS"),
    "carbon dioxide": ("CarbonDioxide", "HEOS"),
    "ammonia": ("Ammonia", "HEOS"),
    "methane": ("Methane", "HEOS"),
    "ethane": ("Ethane", "HEOS"),
    "propane": ("n-Propane", "HEOS"),
    "n-butane": ("n-Butane", "HEOS"),
    "n-hexane": ("n-Hexane", "HEOS"),
    "n-heptane": ("n-Heptane", "HEOS"),
    "cyclohexane": ("CycloHexane", "HEOS"),
    "benzene": ("Benzene", "HEOS"),
    "toluene": ("Toluene", "HEOS"),
    "methanol": ("Methanol", "HEOS"),
    "ethanol": ("Ethanol", "HEOS"),
    "acetone": ("Acetone", "HEOS"),
    "R-134a": ("R134a", "HEOS"),
    "R-32": ("R32", "HEOS"),
    "R-1234yf": ("R1234yf", "HEOS"),
    "R-410A": ("R410A", "HEOS"),
}

#: generic name -> (CoolProp incompressible code, largest mass fraction of its fit)
SOLUTIONS: dict[str, tuple[str, float]] = {
    "ethylene glycol (aq)": ("MEG", 0.60),
    "propylene glycol (aq)": ("MPG", 0.60),
    "calcium chloride brine": ("MCA", 0.30),
    "sodium chloride brine": ("MNA", 0.23),
}

BTU_PER_LB_F = 4186.8  # J/(kg·K) in 1 Btu/(lb·°F) (International Table Btu, exact)


def cragoe_cp(specific_gravity: float) -> tuple[float, float]:
    """(a, b) of cp = a + b·T [J/(kg·K), T in K] of a petroleum liquid by Cragoe's correlation.

    c = (0.388 + 0.00045·t) / √s  [Btu/(lb·°F), t in °F, s the specific gravity at 60/60 °F]; with
    t = 1.8·T − 459.67 this is a + b·T. Cragoe, C. S., *Thermal Properties of Petroleum Products*, US Bureau of
    Standards Misc. Publ. 97 (1929), as quoted in Kern, *Process Heat Transfer* (1950) (from memory).

    >>> a, b = cragoe_cp(0.87)
    >>> round((a + b * 373.15) / 1000, 4)  # kJ/(kg·K) at 100 °C
    2.1698
    """
    root = specific_gravity ** 0.5
    return (0.388 - 0.00045 * 459.67) * BTU_PER_LB_F / root, 0.00045 * 1.8 * BTU_PER_LB_F / root


_HOT_OIL_SG = 0.87  # a typical mineral heat-transfer oil at 60 °F (common practice, no source)

#: generic liquids with cp(T) from a published generic correlation (no trade names):
#: name -> (cp coefficients, valid min, valid max, limit min, limit max [°C], source)
CORRELATED_LIQUIDS: dict[str, tuple[tuple[float, float], float, float, float, float, str]] = {
    "mineral heat-transfer oil (generic)": (
        cragoe_cp(_HOT_OIL_SG), 0.0, 205.0, -10.0, 320.0,
        "Cragoe's correlation for petroleum liquids, cp = (0.388 + 0.00045 t[°F])/√s Btu/(lb·°F), US Bureau of "
        "Standards Misc. Publ. 97 (1929), as in Kern, Process Heat Transfer, from memory; s = 0.87 (a typical "
        "mineral oil, common practice, no source); published for 0–205 °C (from memory), extrapolated to 320 °C "
        "(a common upper film temperature of mineral heat-transfer oils, common practice, no source)"),
}

SOLIDS_FILE = "solids_and_simple_liquids.csv"
KJ = 1000.0


def _celsius(text: str) -> float:
    return float(text) + 273.15


@lru_cache(maxsize=1)
def solid_table() -> tuple[dict[str, str], ...]:
    """Rows of the shipped table of solids and simple liquids (read once)."""
    with resources.files(__package__).joinpath("data").joinpath(SOLIDS_FILE).open(encoding="utf-8") as handle:
        return tuple(csv.DictReader(handle))


def _tabulated(row: dict[str, str]) -> TabulatedMaterial:
    table = cp_tables().get(row["name"])  # cp(T) of the solid where a sourced table has it, else constant
    low: Phase | TablePhase = TablePhase("solid", table) if table else \
        Phase("solid", (float(row["cp_low_kJ_kgK"]) * KJ,))
    phases: tuple[Phase | TablePhase, ...] = (low,)
    if row["melting_point_C"]:
        low = replace(low, T_upper=_celsius(row["melting_point_C"]),
                      latent_to_next=float(row["latent_fusion_kJ_kg"]) * KJ)
        phases = (low, Phase("liquid", (float(row["cp_high_kJ_kgK"]) * KJ,)))
    material = TabulatedMaterial(row["name"], phases, _celsius(row["limit_min_C"]),
                                 _celsius(row["limit_max_C"]), row["source"])
    material.valid_min, material.valid_max = _celsius(row["valid_min_C"]), _celsius(row["valid_max_C"])
    return material


@lru_cache(maxsize=256)
def _library_material(name: str, mass_fraction: float | None) -> Material:
    if name in PURE_FLUIDS:
        fluid, backend = PURE_FLUIDS[name]
        return CoolPropFluid(name, fluid, backend)
    if name in SOLUTIONS:
        code, fraction_max = SOLUTIONS[name]
        if mass_fraction is None:
            raise InputError(f"{name} needs a mass fraction (0 to {fraction_max:g})")
        return IncompressibleSolution(name, code, mass_fraction, fraction_max)
    if name in CORRELATED_LIQUIDS:
        cp, valid_min, valid_max, limit_min, limit_max, source = CORRELATED_LIQUIDS[name]
        material = TabulatedMaterial(name, (Phase("liquid", cp),), _celsius(str(limit_min)),
                                     _celsius(str(limit_max)), source)
        material.valid_min, material.valid_max = _celsius(str(valid_min)), _celsius(str(valid_max))
        return material
    if name in solution_names():  # acids, bases, ammonia in water (heatbalance.mixing)
        return solution_material(name, mass_fraction)
    for row in solid_table():
        if row["name"] == name:
            return _tabulated(row)
    if name == HUMID_AIR:
        raise InputError("humid air is a stream's material, with its humidity given at the inlet")
    raise InputError(f"unknown material '{name}'; choose one of: {', '.join(library_names())}"
                     " or define it in the worksheet's materials")


def library_names() -> list[str]:
    """Every material name the library knows."""
    return [*PURE_FLUIDS, HUMID_AIR, *SOLUTIONS, *solution_names(), *CORRELATED_LIQUIDS,
            *(row["name"] for row in solid_table())]


def get_material(name: str, mass_fraction: float | None = None,
                 user_materials: dict[str, Material] | None = None, where: str = "") -> Material:
    """The material called ``name``: a user-defined one first, then the library (instances cached)."""
    if user_materials and name in user_materials:
        return user_materials[name]
    try:
        takes_fraction = name in SOLUTIONS or name in solution_names()
        return _library_material(name, mass_fraction if takes_fraction else None)
    except InputError as exc:
        raise InputError(exc.message, where) from None


@dataclass(frozen=True)
class MaterialInfo:
    """One catalogue entry, for listings."""

    name: str
    group: str
    data: str


def catalogue() -> list[MaterialInfo]:
    """What can be used, grouped, with the data behind each."""
    fluids = [MaterialInfo(name, "pure fluid", f"CoolProp {backend} ({fluid})")
              for name, (fluid, backend) in PURE_FLUIDS.items()]
    solutions = [MaterialInfo(name, "aqueous solution", f"CoolProp incompressible {code}, mass fraction 0-{x:g}")
                 for name, (code, x) in SOLUTIONS.items()]
    correlated = [MaterialInfo(name, "generic correlation", entry[-1]) for name, entry in CORRELATED_LIQUIDS.items()]
    solutions += [MaterialInfo(name, "aqueous solution", f"Laliberté heat capacity via thermo, mass fraction "
                               f"0-{s.max_fraction:g}; heats of solution table")
                  for name, s in solution_names().items()]
    tabulated = [MaterialInfo(row["name"], "tabulated solid or simple liquid", row["source"])
                 for row in solid_table()]
    humid = [MaterialInfo(HUMID_AIR, "humid air (streams)", "CoolProp HAPropsSI (ASHRAE RP-1485); per kg of dry air")]
    return fluids + humid + solutions + correlated + tabulated
