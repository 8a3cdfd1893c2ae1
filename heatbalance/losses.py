"""Heat lost from a surface to the air around it, computed from its geometry; SI only.

A bare or insulated pipe (horizontal or vertical), a vessel wall or a tank roof loses heat by convection
(natural, or driven by wind) and by radiation to its surroundings::

    q = h_c·A·(T_s − T_air) + ε·σ·A·(T_s⁴ − T_surr⁴)

A bare surface is at the process temperature (the inside film and the metal wall are neglected: the loss is
slightly overstated). Through insulation of conductivity k(T_mean) the same heat is conducted,
``2πkL·(T_p − T_s)/ln(D_o/D_i)`` for a cylinder (``k·A·(T_p − T_s)/t`` for a roof), and the outer surface
temperature T_s that makes both equal is found with Brent's method (scipy ``brentq``).

Convection, from ``ht`` (each method by its authors' name):

* natural: horizontal pipe ``Nu_horizontal_cylinder_Churchill_Chu`` (length D); vertical pipe and vessel
  wall ``Nu_vertical_plate_Churchill`` (length: the height; the thin-cylinder correction is neglected);
  tank roof ``Nu_horizontal_plate_McAdams`` (length A/perimeter = D/4, hot side up);
* wind: across a cylinder ``Nu_cylinder_Churchill_Bernstein`` (length D); along a roof
  ``Nu_external_horizontal_plate`` (length D);
* with wind, natural and forced are combined as Nu³ = Nu_N³ + Nu_F³ (Incropera et al., 6th ed., §9.9
  mixed convection, from memory);
* radiation: ``ht.radiation.q_rad`` (grey surface in large surroundings).

Air properties at the film temperature from CoolProp (:func:`heatbalance.properties.air_transport`),
β = 1/T_film (ideal gas). Insulation conductivity from ``data/insulation.csv`` (each row names its source).

The insulation thickness for personnel protection is the thinnest that keeps the outer surface at or below
the limit in still air, 60 °C by default (:data:`PERSONNEL_PROTECTION_LIMIT`: common practice, no source; follow local
codes).
"""
from __future__ import annotations

import csv
import math
from dataclasses import dataclass
from functools import lru_cache
from importlib import resources

from .errors import InputError
from .messages import Measure, Phrase
from .properties import air_transport

__all__ = ["SHAPES", "INSULATION_FILE", "PERSONNEL_PROTECTION_LIMIT", "MIN_INSULATION", "MAX_THICKNESS", "Surface", "SurfaceLoss", "insulation_table",
           "insulation_names", "insulation_conductivity", "convection_coefficient", "surface_temperature",
           "heat_loss", "surface_loss", "protection_thickness", "check_service"]

SHAPES = ("horizontal pipe", "vertical pipe", "vessel wall", "tank roof")
INSULATION_FILE = "insulation.csv"
#: K: 60 °C, the usual limit for surfaces people can touch (common practice, no source; follow local codes)
PERSONNEL_PROTECTION_LIMIT = 333.15
GRAVITY = 9.80665  # m/s², standard gravity (CGPM 1901)
MAX_THICKNESS = 1.0  # m: the thickest insulation the protection search tries
MIN_INSULATION = 1e-3  # m: thinner insulation is refused (0 is bare)
_CYLINDERS = ("horizontal pipe", "vertical pipe", "vessel wall")


@dataclass(frozen=True)
class Surface:
    """A surface losing heat, SI: diameters and lengths in m, temperatures in K, wind in m/s, P in Pa.

    ``diameter`` is the bare pipe's or vessel's outside diameter (the roof's diameter); ``length`` the pipe's
    length or the wall's height (unused for a roof). ``insulation`` names a row group of the insulation table.
    """

    shape: str
    diameter: float
    length: float
    emissivity: float
    insulation: str | None = None
    thickness: float = 0.0
    ambient_T: float = 293.15
    surroundings_T: float | None = None  # radiation; None: the air's temperature
    wind: float = 0.0
    P: float = 101325.0

    @property
    def outer_diameter(self) -> float:
        return self.diameter + 2 * self.thickness if self.shape in _CYLINDERS else self.diameter

    @property
    def area(self) -> float:
        """Outer area [m²]: the insulation's outside for a cylinder."""
        if self.shape == "tank roof":
            return math.pi * self.diameter ** 2 / 4
        return math.pi * self.outer_diameter * self.length


@dataclass
class SurfaceLoss:
    """A computed loss, SI: heat leaving [W] (+ out), its parts, the outer surface temperature [K], the
    convection coefficient [W/(m²·K)] and the method, the insulation's k at its mean temperature [W/(m·K)],
    and the insulation thickness that keeps the surface at the protection limit [m] (``None``: not reachable
    within :data:`MAX_THICKNESS`; 0: the bare surface is already below it)."""

    loss: float
    convection: float
    radiation: float
    surface_T: float
    process_T: float
    h_convection: float
    method: str
    area: float
    insulation_k: float | None
    protection_limit: float
    protection_thickness: float | None
    protection_material: str
    notes: list[Phrase]
    name: str = ""  # the loss's name and address, set by the solver
    address: str = ""


# --------------------------------------------------------------------------- insulation data
@lru_cache(maxsize=1)
def insulation_table() -> dict[str, tuple[tuple[tuple[float, float], ...], float, float, str]]:
    """material -> ((mean T [K], k [W/(m·K)]) rising, service min [K], service max [K], source)."""
    rows: dict[str, list[dict[str, str]]] = {}
    with resources.files(__package__).joinpath("data").joinpath(INSULATION_FILE).open(encoding="utf-8") as f:
        for row in csv.DictReader(f):
            rows.setdefault(row["material"], []).append(row)
    return {name: (tuple(sorted((float(r["mean_temperature_C"]) + 273.15, float(r["k_W_mK"])) for r in group)),
                   float(group[0]["service_min_C"]) + 273.15, float(group[0]["service_max_C"]) + 273.15,
                   group[0]["source"]) for name, group in rows.items()}


def insulation_names() -> tuple[str, ...]:
    return tuple(insulation_table())


def insulation_conductivity(material: str, T_mean: float) -> float:
    """k [W/(m·K)] at a mean temperature [K], linear between the table's rows (and past its ends).

    >>> round(insulation_conductivity("mineral wool", 273.15 + 125), 4)  # halfway 0.044 .. 0.051, from the table
    0.0475
    """
    points = insulation_table()[material][0]
    i = 1
    while i < len(points) - 1 and points[i][0] < T_mean:
        i += 1
    (T0, k0), (T1, k1) = points[i - 1], points[i]
    return k0 + (k1 - k0) * (T_mean - T0) / (T1 - T0)


# --------------------------------------------------------------------------- convection and radiation
def _air(T_film: float, P: float) -> tuple[float, float, float]:
    """Kinematic viscosity [m²/s], conductivity [W/(m·K)] and Prandtl number of air."""
    rho, mu, k, cp = air_transport(T_film, P)
    return mu / rho, k, cp * mu / k


def convection_coefficient(s: Surface, T_s: float) -> tuple[float, str]:
    """Mean convection coefficient [W/(m²·K)] of the outer surface at T_s [K], and the method(s) used."""
    from ht.conv_external import Nu_cylinder_Churchill_Bernstein, Nu_external_horizontal_plate
    from ht.conv_free_immersed import (Nu_horizontal_cylinder_Churchill_Chu, Nu_horizontal_plate_McAdams,
                                       Nu_vertical_plate_Churchill)

    T_film = (T_s + s.ambient_T) / 2
    nu, k, Pr = _air(T_film, s.P)
    D = s.outer_diameter
    L_free = {"horizontal pipe": D, "tank roof": D / 4}.get(s.shape, s.length)
    Gr = GRAVITY * abs(T_s - s.ambient_T) / T_film * L_free ** 3 / nu ** 2
    if s.shape == "horizontal pipe":
        Nu_n, method = Nu_horizontal_cylinder_Churchill_Chu(Pr, Gr), "Churchill–Chu (horizontal cylinder)"
    elif s.shape == "tank roof":
        Nu_n = Nu_horizontal_plate_McAdams(Pr, Gr, buoyancy=T_s >= s.ambient_T)
        method = "McAdams (horizontal plate)"
    else:
        Nu_n, method = Nu_vertical_plate_Churchill(Pr, Gr), "Churchill–Chu (vertical plate)"
    h_n = Nu_n * k / L_free
    if s.wind <= 0:
        return h_n, f"natural convection, {method}"
    Re = s.wind * D / nu
    if s.shape == "tank roof":
        h_f, forced = Nu_external_horizontal_plate(Re, Pr, L=D) * k / D, "flat plate in parallel flow"
    else:
        h_f, forced = Nu_cylinder_Churchill_Bernstein(Re, Pr) * k / D, "Churchill–Bernstein (cylinder in cross-flow)"
    return (h_n ** 3 + h_f ** 3) ** (1 / 3), f"wind: {forced} combined with {method} (Nu³ = Nu_N³ + Nu_F³)"


def _outward(s: Surface, T_s: float) -> tuple[float, float, float, str]:
    """Heat leaving the outer surface at T_s by convection and by radiation [W], h [W/(m²·K)], method."""
    from ht.radiation import q_rad

    h, method = convection_coefficient(s, T_s)
    T_surr = s.ambient_T if s.surroundings_T is None else s.surroundings_T
    return h * s.area * (T_s - s.ambient_T), q_rad(s.emissivity, T_s, T_surr) * s.area, h, method


def _conducted(s: Surface, T_p: float, T_s: float) -> float:
    """Heat conducted through the insulation [W] from the process side at T_p to the outside at T_s."""
    k = insulation_conductivity(s.insulation, (T_p + T_s) / 2)
    if s.shape == "tank roof":
        return k * s.area * (T_p - T_s) / s.thickness
    return 2 * math.pi * k * s.length * (T_p - T_s) / math.log(s.outer_diameter / s.diameter)


def surface_temperature(s: Surface, T_p: float) -> float:
    """The outer surface temperature [K] for a process at T_p [K]: T_p when bare, else the root of
    conducted = convected + radiated (Brent's method between the coldest and hottest of T_p, air, surroundings)."""
    if s.insulation is None or s.thickness <= 0:
        return T_p
    from scipy.optimize import brentq

    def gap(T_s: float) -> float:
        convection, radiation, _, _ = _outward(s, T_s)
        return _conducted(s, T_p, T_s) - convection - radiation

    temperatures = (T_p, s.ambient_T, s.ambient_T if s.surroundings_T is None else s.surroundings_T)
    low, high = min(temperatures), max(temperatures)
    if high - low < 1e-9:
        return T_p
    return brentq(gap, low, high, xtol=1e-6, rtol=1e-12, maxiter=200)


def heat_loss(s: Surface, T_p: float) -> float:
    """Heat leaving [W] (+ out; − when the surroundings are warmer) for a process at T_p [K].

    Examples
    --------
    Incropera et al., 6th ed., Example 9.3 (from memory): a bare horizontal steam pipe, D = 0.1 m, surface at
    165 °C, ε = 0.85, air and walls at 23 °C; by hand with the book's air data, convection 327 W/m and
    radiation 441 W/m (see tests/test_losses.py):

    >>> s = Surface("horizontal pipe", 0.1, 1.0, 0.85, ambient_T=296.15)
    >>> round(heat_loss(s, 438.15), -1)
    770.0
    """
    convection, radiation, _, _ = _outward(s, surface_temperature(s, T_p))
    return convection + radiation


def protection_thickness(s: Surface, T_p: float, limit: float, material: str) -> float | None:
    """Thinnest insulation of ``material`` [m] keeping the outer surface at or below ``limit`` [K], in still
    air (wind cools the surface; without it is the conservative case).

    0 when the bare surface already is; ``None`` when no thickness up to :data:`MAX_THICKNESS` gets there
    (e.g. the air itself is warmer than the limit).
    """
    from scipy.optimize import brentq

    def excess(thickness: float) -> float:
        trial = Surface(s.shape, s.diameter, s.length, s.emissivity, material, thickness, s.ambient_T,
                        s.surroundings_T, 0.0, s.P)
        return surface_temperature(trial, T_p) - limit

    if T_p <= limit:
        return 0.0
    if excess(MAX_THICKNESS) > 0:
        return None
    if excess(MIN_INSULATION) <= 0:
        return MIN_INSULATION
    return brentq(excess, MIN_INSULATION, MAX_THICKNESS, xtol=1e-5, maxiter=200)


def surface_loss(s: Surface, T_p: float, limit: float = PERSONNEL_PROTECTION_LIMIT) -> SurfaceLoss:
    """The loss with its details: parts, surface temperature, coefficient, and the protection thickness (of the
    surface's insulation; of mineral wool for a bare surface)."""
    check_service(s, T_p)
    T_s = surface_temperature(s, T_p)
    convection, radiation, h, method = _outward(s, T_s)
    insulated = s.insulation is not None and s.thickness > 0
    k = insulation_conductivity(s.insulation, (T_p + T_s) / 2) if insulated else None
    material = s.insulation or "mineral wool"
    notes = []
    if T_s > limit:
        notes.append(Phrase("the outer surface is at {T_s}, above the personnel-protection limit {limit} "
                            "(common practice; follow local codes)", {"T_s": Measure(T_s, "temperature", 1),
                                                                      "limit": Measure(limit, "temperature", 0)}))
    if T_p < s.ambient_T:
        notes.append(Phrase("the process is colder than the air: the loss is a heat gain (condensation or icing "
                            "on the surface is not modelled)"))
    thickness = protection_thickness(s, T_p, limit, material) if not T_p < s.ambient_T else 0.0
    return SurfaceLoss(convection + radiation, convection, radiation, T_s, T_p, h, method, s.area, k, limit,
                       thickness, material, notes)


def check_service(s: Surface, T_p: float, where: str = "") -> None:
    """Refuse a process temperature outside the insulation's service range (the table's)."""
    if s.insulation is None:
        return
    _, low, high, _ = insulation_table()[s.insulation]
    if not low <= T_p <= high:
        raise InputError(Phrase("{material} serves from {low} to {high}; the process side reaches {T}: choose "
                                "another insulation", {"material": s.insulation, "low": Measure(low, "temperature", 0),
                                               "high": Measure(high, "temperature", 0),
                                               "T": Measure(T_p, "temperature", 1)}), where)

