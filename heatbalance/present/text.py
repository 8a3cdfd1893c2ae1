"""Text in a unit set: the only place SI numbers are written for people.

A *unit set* (``"SI"`` or ``"US"``) is a view: it never changes a typed value. The answer
is written in the unit the user typed for its field when there is one (a duty typed in
MMBtu/h is answered in MMBtu/h), otherwise in the view's unit for its kind.
"""
from __future__ import annotations

import math

from ..errors import HeatBalanceError, UnitError
from ..messages import NOT_APPLICABLE, Measure, Phrase, significant_text
from ..results import Answer
from ..units import check_unit, from_si, heat_kind

__all__ = ["UNIT_SETS", "display_unit", "measure_text", "phrase_text", "error_text",
           "temperature_text", "pressure_text", "heat_text", "format_heat", "shown_unit", "answer_unit",
           "answer_value", "answer_text", "amount_text", "no_negative_zero", "significant_text", "percent_text",
           "NOT_APPLICABLE", "average_power_text"]

#: Display units of each unit set, per kind.
UNIT_SETS: dict[str, dict[str, str]] = {
    "SI": {"temperature": "degC", "temperature_difference": "K", "pressure": "bar", "mass": "kg",
           "mass_flow": "kg/h", "energy": "kJ", "power": "kW", "duration": "min",
           "specific_heat": "kJ/(kg*K)", "heat_capacity": "kJ/K", "amount": "kmol",
           "molar_flow": "kmol/h", "molar_energy": "kJ/mol", "specific_energy": "kJ/kg",
           "molar_mass": "g/mol", "thermal_conductance": "kW/K", "heat_transfer_coefficient": "W/(m**2*K)",
           "area": "m**2", "length": "m", "velocity": "m/s", "thermal_conductivity": "W/(m*K)",
           "volume_flow": "m**3/h"},
    "US": {"temperature": "degF", "temperature_difference": "delta_degF", "pressure": "psia",
           "mass": "lb", "mass_flow": "lb/h", "energy": "Btu", "power": "Btu/h", "duration": "min",
           "specific_heat": "Btu/(lb*delta_degF)", "heat_capacity": "Btu/delta_degF",
           "amount": "lbmol", "molar_flow": "lbmol/h", "molar_energy": "Btu/lbmol",
           "specific_energy": "Btu/lb", "molar_mass": "lb/lbmol", "thermal_conductance": "Btu/(h*delta_degF)",
           "heat_transfer_coefficient": "Btu/(h*ft**2*delta_degF)", "area": "ft**2",
           "length": "ft", "velocity": "ft/s", "thermal_conductivity": "Btu/(h*ft*delta_degF)",
           "volume_flow": "ft**3/min"},
}

_PRETTY = {"degC": "°C", "degF": "°F", "degR": "°R", "delta_degF": "°F", "delta_degC": "K",
           "kJ/(kg*K)": "kJ/(kg·K)", "Btu/(lb*delta_degF)": "Btu/(lb·°F)", "Btu/delta_degF": "Btu/°F",
           "bar": "bar(a)", "psi": "psia", "m**2": "m²", "ft**2": "ft²", "W/(m**2*K)": "W/(m²·K)",
           "Btu/(h*delta_degF)": "Btu/(h·°F)", "Btu/(h*ft**2*delta_degF)": "Btu/(h·ft²·°F)",
           "W/(m*K)": "W/(m·K)", "m**3/h": "m³/h", "ft**3/min": "ft³/min", "Btu/(h*ft*delta_degF)": "Btu/(h·ft·°F)"}


def display_unit(unit: str) -> str:
    """How a unit is written on screen: ``degC`` -> ``°C``, ``bar`` -> ``bar(a)``."""
    return _PRETTY.get(unit, unit)


def _unit_set(system: str) -> dict[str, str]:
    if system not in UNIT_SETS:
        raise ValueError(f"unit set must be one of {sorted(UNIT_SETS)}, not {system!r}")
    return UNIT_SETS[system]


def measure_text(measure: Measure, system: str = "SI") -> str:
    """A measure in the view's unit: temperatures with ``digits`` decimals, the rest significant figures."""
    unit = _unit_set(system).get(measure.kind)
    if unit is None:
        return significant_text(measure.value, 6)
    value = from_si(measure.value, unit, measure.kind)
    if not math.isfinite(value):
        return f"{NOT_APPLICABLE} {display_unit(unit)}"  # never a non-finite number shown
    if measure.decimals is not None:
        return f"{value:,.{measure.decimals}f} {display_unit(unit)}"
    if measure.kind == "temperature":
        return f"{value:.{min(measure.digits, 2)}f} {display_unit(unit)}"
    return f"{significant_text(value, measure.digits)} {display_unit(unit)}"


def percent_text(fraction: float, decimals: int = 1) -> str:
    """A fraction as a percentage; a small one that would round to zero keeps two significant figures.

    >>> percent_text(0.1753), percent_text(0.00018), percent_text(0.0)
    ('17.5%', '0.018%', '0.0%')
    """
    if fraction != 0 and abs(fraction) * 100 < 0.5 * 10 ** -decimals:
        return f"{significant_text(fraction * 100, 2)}%"
    return no_negative_zero(f"{fraction * 100:.{decimals}f}") + "%"


def phrase_text(phrase: Phrase | str, system: str = "SI") -> str:
    """A phrase written in a unit set (plain text passes through)."""
    if isinstance(phrase, str):
        return phrase
    return phrase.render(lambda m: measure_text(m, system))


def error_text(error: HeatBalanceError, system: str = "SI") -> str:
    """A refusal's message (without its address) in a unit set."""
    return phrase_text(error.phrase, system)


def temperature_text(T: float, system: str = "SI", digits: int = 2) -> str:
    """An absolute temperature [K] in the view's unit: ``151.94 °C`` or ``305.49 °F``."""
    return measure_text(Measure(T, "temperature", digits), system)


def pressure_text(P: float, system: str = "SI") -> str:
    """An absolute pressure [Pa] in the view's unit: ``5.013 bar(a)`` or ``72.7 psia``."""
    return measure_text(Measure(P, "pressure"), system)


def heat_text(value: float, basis: str, system: str = "SI") -> str:
    """A heat in the view's unit of the basis, 4 significant figures: ``440 kW``."""
    return measure_text(Measure(value, heat_kind(basis)), system)


def no_negative_zero(text: str) -> str:
    """``-0.00 kW`` -> ``0.00 kW``."""
    return text[1:] if text.startswith("-") and not text.strip("-0.,").split(" ")[0] else text


def format_heat(value_si: float, basis: str, system: str = "SI") -> str:
    """A heat with two decimals in the view's unit: ``1,234.50 kW``."""
    kind = heat_kind(basis)
    unit = _unit_set(system)[kind]
    return no_negative_zero(f"{from_si(value_si, unit, kind):,.2f} {display_unit(unit)}")


def amount_text(value: float) -> str:
    """Four significant figures without scientific notation: 12,000 / 745.6 / 0.1234."""
    if value == 0 or not math.isfinite(value):
        return f"{value:g}"
    decimals = max(0, 3 - int(math.floor(math.log10(abs(value)))))
    return f"{round(value, decimals):,.{decimals}f}"


def shown_unit(typed_unit: str | None, kind: str, system: str = "SI") -> str:
    """The unit a result of ``kind`` is shown in: a unit of its own typed for it (MMBtu/h, t/h) if it
    measures that kind, else the view's; a unit set's own unit (kg/h, lb/h, °C) is the view's to choose.

    >>> shown_unit("kg/h", "mass_flow", "US"), shown_unit("t/h", "mass_flow", "US"), shown_unit(None, "power")
    ('lb/h', 't/h', 'kW')
    """
    view = _unit_set(system)[kind]
    if not typed_unit or typed_unit in {units[kind] for units in UNIT_SETS.values()}:
        return view
    try:
        check_unit(typed_unit, kind)
        return typed_unit
    except UnitError:  # e.g. a rate typed for a batch amount
        return view


def answer_unit(answer: Answer, system: str = "SI") -> str:
    """The unit the answer is shown in (:func:`shown_unit` of the unit typed in its '?' cell)."""
    return shown_unit(answer.typed_unit, answer.si_kind, system)


def answer_value(answer: Answer, system: str = "SI") -> float:
    """The answer's number in :func:`answer_unit`."""
    return from_si(answer.value_si, answer_unit(answer, system), answer.si_kind)


def answer_text(answer: Answer, system: str = "SI") -> str:
    """The answer in words: ``100 °C, 37.0% vapour`` or ``1,643 lb/h``."""
    value = answer_value(answer, system)
    if answer.si_kind == "temperature":  # to 0.01 K: 130.96 °F is not "131 °F" (a batch that ended below its start)
        number = no_negative_zero(f"{value:,.2f}".rstrip("0").rstrip("."))
    else:
        number = f"{value:,.4g}" if abs(value) < 1e4 else f"{value:,.0f}"
    text = f"{number} {display_unit(answer_unit(answer, system))}"
    if answer.phase_fraction is not None:
        if answer.plateau == "boiling":
            text += f", {answer.phase_fraction:.1%} vapour"
        else:
            text += f", {1 - answer.phase_fraction:.1%} still solid"
    return text


def average_power_text(result, system: str = "SI") -> str | None:
    """A batch duty's mean power over the batch duration, for sizing the jacket or heater: ``-50.03 kW on average
    over the batch's 2 h`` (None when the answer is not a batch duty or no duration is given). The peak, set by
    the dosing or heating rate, is higher."""
    answer = result.answer
    if result.basis != "batch" or not result.duration or answer.kind != "duty":
        return None
    power = Measure(answer.value_si / result.duration, "power")
    hours = Measure(result.duration, "duration")
    return f"{measure_text(power, system)} on average over the batch's {measure_text(hours, system)}"
