"""Humid air: dry air carrying water, counted per kg of dry air; SI only.

A humid-air line carries ``W`` kg of water per kg of dry air (its humidity ratio at the inlet, conserved along
the line). Its enthalpy per kg of dry air at T, P::

    h(T) = h_moist(T, min(W, W_s(T, P))) + max(0, W − W_s(T, P))·h_condensate(T)

``h_moist`` from CoolProp's humid-air functions (``HAPropsSI``: Herrmann, Kretzschmar & Gatley, ASHRAE
RP-1485, real-gas moist air), ``W_s`` the humidity ratio at saturation. Below the dew point the water the air
cannot hold leaves as condensate at the air's temperature: liquid water (IAPWS-IF97 via CoolProp, whose
reference agrees with ``HAPropsSI``'s vapour to 0.02 %) above 0 °C; below it frost (ice: the liquid at 0 °C less
the heat of fusion 333.55 kJ/kg, cp 2.09 kJ/(kg·K), CRC Handbook, from memory). The condensate's latent heat is
reported as the line's latent heat; the condensate flow and its heat in :class:`HumidAirLine`.

The humidity of the inlet is given with its temperature as one of: relative humidity (0–1), humidity ratio
(kg/kg dry air), dew point, wet-bulb temperature (:func:`humidity_ratio`).
"""
from __future__ import annotations

import math
from dataclasses import dataclass

from .errors import InputError, PropertyRangeError
from .messages import Measure, Phrase
from .properties import Material, coolprop

__all__ = ["HUMID_AIR", "HUMIDITY_FORMS", "HumidAir", "HumidAirLine", "humidity_ratio", "relative_humidity",
           "volume_per_dry_air", "humid_air_line", "RH_ROUND_OFF"]

HUMID_AIR = "humid air"
HUMIDITY_FORMS = ("relative_humidity", "humidity_ratio", "dew_point", "wet_bulb")
T_MIN, T_MAX = 213.15, 623.15  # K: −60 to 350 °C, inside HAPropsSI's range (−143 to 350 °C)
P_MIN, P_MAX = 10e3, 10e6  # Pa: HAPropsSI's range (to 10 MPa)
T_TRIPLE = 273.16  # K, triple point of water (IAPWS)
FUSION = 333.55e3  # J/kg, ice at 0 °C, CRC Handbook, from memory
CP_ICE = 2.09e3  # J/(kg·K), ice near 0 °C, CRC Handbook, from memory
RH_ROUND_OFF = 1e-6  # a relative humidity up to 1 + this is saturation (round-off: 1e-15 to 1e-10 seen); beyond, refused
EPSILON = 0.621945  # molar mass of water / dry air, as in CoolProp's HumidAirProp (ASHRAE RP-1485)
CP_VAPOUR = 1.86e3  # J/(kg·K), water vapour, ASHRAE Handbook Fundamentals ch. 1 (h_g ≈ 2501 + 1.86 t), from memory


def _ha(output: str, T: float, P: float, key: str, value: float) -> float:
    try:
        return coolprop().HAPropsSI(output, "T", T, "P", P, key, value)
    except ValueError as exc:
        raise InputError(Phrase("humid air has no property data at {T}, {P} ({detail})",
                                {"T": Measure(T, "temperature"), "P": Measure(P, "pressure"),
                                 "detail": str(exc).split("::")[0].strip()})) from None


def saturation_ratio(T: float, P: float) -> float:
    """Humidity ratio of saturated air [kg/kg dry air] at T [K], P [Pa]; infinite where water's vapour pressure
    reaches P (no condensation: the air can hold any water)."""
    try:
        return coolprop().HAPropsSI("W", "T", T, "P", P, "R", 1.0)
    except ValueError:  # near or above water's boiling point at P: HAPropsSI's mole-fraction limit
        p_ws = coolprop().PropsSI("P", "T", min(T, 647.0), "Q", 0, "IF97::Water")
        return 0.621945 * p_ws / (P - p_ws) if p_ws < P else math.inf  # ASHRAE Fundamentals ch. 1, eq. 22


def relative_humidity(T: float, P: float, W: float, where: str = "") -> float:
    """Relative humidity (0–1) of air at T [K], P [Pa] holding ``W`` kg of vapour per kg of dry air.

    RH = ψ_w·P/(f·p_ws) (ASHRAE RP-1485, as in ``HAPropsSI``), so at a given T, P it is the ratio of the vapour's
    mole fraction ψ_w = W/(ε + W) to that at saturation. Air within ``RH_ROUND_OFF`` of saturation, above it
    included (the round-off of W carried through a condensation), is saturated: 1. Air holding more is refused
    (at ``where``): humid air cannot hold more water than at saturation.

    >>> W_s = saturation_ratio(286.15, 101325.0)
    >>> relative_humidity(286.15, 101325.0, W_s * (1 + 1e-12))  # saturated, a round-off above: 1
    1.0
    >>> round(relative_humidity(303.15, 101325.0, humidity_ratio("relative_humidity", 0.6, 303.15, 101325.0)), 12)
    0.6
    """
    saturated = saturation_ratio(T, P)
    if math.isfinite(saturated) and saturated > 0:
        ratio = (W / (EPSILON + W)) / (saturated / (EPSILON + saturated))
        if ratio > 1.0 + RH_ROUND_OFF:
            raise InputError(Phrase("humid air at {T} holds {W} kg of water per kg of dry air, more than at "
                                    "saturation ({saturated} kg/kg): relative humidity {rh}, above 1",
                                    {"T": Measure(T, "temperature"), "W": f"{W:.4g}", "saturated": f"{saturated:.4g}",
                                     "rh": f"{ratio:.6g}"}), where)
        if ratio >= 1.0 - RH_ROUND_OFF:
            return 1.0
    try:
        return min(1.0, _ha("R", T, P, "W", W))
    except InputError as exc:
        raise exc.located(where)


def humidity_ratio(form: str, value: float, T: float, P: float, where: str = "") -> float:
    """See :func:`_humidity_ratio`; a refusal names ``where``."""
    try:
        return _humidity_ratio(form, value, T, P, where)
    except InputError as exc:
        raise exc.located(where)


def _humidity_ratio(form: str, value: float, T: float, P: float, where: str = "") -> float:
    """The humidity ratio [kg water/kg dry air] of air at T [K], P [Pa] with its humidity given as ``form``.

    ``relative_humidity`` (0–1), ``humidity_ratio`` (kg/kg), ``dew_point`` or ``wet_bulb`` [K]. Refused (at
    ``where``) above saturation: a relative humidity over 1, a dew point or wet bulb above the dry bulb.

    >>> round(humidity_ratio("relative_humidity", 0.8, 303.15, 101325.0), 4)  # Çengel & Boles Ex. 14-8: 0.0216
    0.0217
    """
    if not (T_MIN <= T <= T_MAX):
        raise PropertyRangeError(HUMID_AIR, "temperature", T, T_MIN, T_MAX, "temperature", where)
    if not (P_MIN <= P <= P_MAX):
        raise PropertyRangeError(HUMID_AIR, "pressure", P, P_MIN, P_MAX, "pressure", where)
    if form == "relative_humidity":
        if not 0.0 <= value <= 1.0:
            raise InputError(f"a relative humidity lies between 0 and 1 (0 to 100 %), not {value:g}", where)
        return _ha("W", T, P, "R", value)
    if form == "humidity_ratio":
        saturated = saturation_ratio(T, P)
        if not 0.0 <= value <= saturated:
            raise InputError(Phrase("a humidity ratio lies between 0 and saturation ({saturated} kg/kg at {T}), not "
                                    "{value} kg/kg", {"saturated": f"{saturated:.4g}", "value": f"{value:g}",
                                                      "T": Measure(T, "temperature")}), where)
        return value
    if value > T + 1e-9:
        raise InputError(Phrase("the {what} ({value}) cannot be above the dry-bulb temperature ({T})",
                                {"what": form.replace("_", " "), "value": Measure(value, "temperature"),
                                 "T": Measure(T, "temperature")}), where)
    if value < T_MIN:
        raise PropertyRangeError(HUMID_AIR, form.replace("_", " "), value, T_MIN, T, "temperature", where)
    return _ha("W", T, P, "D" if form == "dew_point" else "B", value)


def volume_per_dry_air(T: float, P: float, W: float) -> float:
    """Volume of humid air per kg of its dry air [m³/kg] at T [K], P [Pa], humidity ratio W."""
    return _ha("Vda", T, P, "W", W)


class HumidAir(Material):
    """Humid air of humidity ratio ``W`` (total water per kg of dry air): enthalpy per kg of dry air."""

    lowest_phase = "humid air"

    def __init__(self, W: float):
        self.W = W
        self.name = HUMID_AIR
        self.t_min, self.t_max = T_MIN, T_MAX
        self.source = "CoolProp HAPropsSI (ASHRAE RP-1485 real-gas moist air); condensate IAPWS-IF97 via CoolProp"

    def check_pressure(self, P: float, where: str = "") -> None:
        if not P_MIN <= P <= P_MAX:
            raise PropertyRangeError(self.name, "pressure", P, P_MIN, P_MAX, "pressure", where)

    def condensed(self, T: float, P: float) -> float:
        """Water condensed [kg/kg dry air] at T, P: the part of W above saturation."""
        return max(0.0, self.W - saturation_ratio(T, P))

    def vapour(self, T: float, P: float) -> float:
        """Water left as vapour [kg/kg dry air] at T, P: W, or the saturation ratio below the dew point (taken as
        it is, not as W less the condensate, whose round-off could put it above saturation)."""
        return min(self.W, saturation_ratio(T, P))

    def _condensate(self, T: float) -> float:
        """Enthalpy of the condensate [J/kg]: liquid water above the triple point, ice below."""
        cp = coolprop()
        if T >= T_TRIPLE:
            return cp.PropsSI("H", "T", T, "Q", 0, "IF97::Water")
        return cp.PropsSI("H", "T", T_TRIPLE, "Q", 0, "IF97::Water") - FUSION + CP_ICE * (T - T_TRIPLE)

    def _vapour(self, T: float) -> float:
        """Enthalpy of water vapour [J/kg] at T (the condensate's latent heat is the difference): saturated vapour
        above the triple point, below it that less cp_vapour = 1.86 kJ/(kg·K) (ASHRAE Fundamentals ch. 1)."""
        h = coolprop().PropsSI("H", "T", max(T, T_TRIPLE), "Q", 1, "IF97::Water")
        return h if T >= T_TRIPLE else h - CP_VAPOUR * (T_TRIPLE - T)

    def enthalpy(self, T: float, P: float) -> float:
        vapour = self.vapour(T, P)
        water = self.W - vapour
        h = _ha("H", T, P, "W", vapour)
        return h + water * self._condensate(T) if water > 0 else h

    def latent_content(self, T: float, P: float) -> float:
        """Latent heat held [J/kg dry air], relative to all water as vapour: − condensed × (h_vapour − h_condensate)."""
        water = self.condensed(T, P)
        return -water * (self._vapour(T) - self._condensate(T)) if water > 0 else 0.0

    def phase_name(self, T: float, P: float) -> str:
        if self.condensed(T, P) > 0:
            return "saturated air + " + ("condensate" if T >= T_TRIPLE else "frost")
        return f"humid air, RH {relative_humidity(T, P, self.W):.0%}"


@dataclass
class HumidAirLine:
    """A humid-air line's water, SI: dry-air flow [kg/s or kg], humidity ratios in and out (vapour), the inlet's
    dew point [K], relative humidity in and out, condensate [kg/s or kg] and the heat it gives up condensing
    [W or J, + released]."""

    name: str
    address: str
    dry_air: float
    W_in: float
    W_out: float
    dew_point_in: float
    rh_in: float
    rh_out: float
    condensate: float
    condensate_heat: float


def humid_air_line(name: str, address: str, material: HumidAir, amount: float, T_in: float, P_in: float,
                   T_out: float, P_out: float) -> HumidAirLine:
    """The water side of a solved humid-air line (condensate > 0 only where more condenses than at the inlet).

    ``address`` is the line's (``streams[S]``); a refusal names the end's temperature
    (``streams[S].inlet.temperature`` or ``.outlet.temperature``)."""
    try:
        W_in, rh_in = material.vapour(T_in, P_in), relative_humidity(T_in, P_in, material.vapour(T_in, P_in))
        dew = min(T_in, _ha("D", T_in, P_in, "W", W_in)) if W_in > 1e-7 else T_MIN  # bone-dry: below any data
        latent_in = material.latent_content(T_in, P_in)
    except InputError as exc:
        raise exc.located(f"{address}.inlet.temperature")
    try:
        W_out = material.vapour(T_out, P_out)
        rh_out = relative_humidity(T_out, P_out, W_out)
        latent_out = material.latent_content(T_out, P_out)
    except InputError as exc:
        raise exc.located(f"{address}.outlet.temperature")
    condensate = amount * (W_in - W_out)
    heat = -amount * (latent_out - latent_in)
    return HumidAirLine(name, address, amount, W_in, W_out, dew, rh_in, rh_out, condensate, heat)
