"""Words with SI numbers in them: what the engine says, kept as data until it is shown.

The engine never formats a number in a display unit set. A warning, a refusal or a
detail that mentions a temperature or a heat is a :class:`Phrase`: a template with
named :class:`Measure` values in SI. The presentation layer writes it in the view's
units (``heatbalance.present.text.phrase_text``); :attr:`Phrase.text` is a plain SI
fallback (°C, bar(a), kJ/kg, kW) for logs and ``str(error)``.

This module imports nothing from the package, so the errors can use it.
"""
from __future__ import annotations

import math
from dataclasses import dataclass, field

__all__ = ["Measure", "Phrase", "fallback_text", "significant_text", "NOT_APPLICABLE"]

#: What is written where a number does not apply or is not finite (an electric utility's flow).
NOT_APPLICABLE = "—"


@dataclass(frozen=True)
class Measure:
    """An SI value and the kind of quantity it is (a key of ``units.KINDS``)."""

    value: float
    kind: str
    digits: int = 4  # significant figures when written (temperatures: decimals, at most 2)
    decimals: int | None = None  # write with this many decimals instead


# kind -> (unit written, scale, offset, how many decimals for temperatures): SI value * scale + offset
_FALLBACK = {
    "temperature": ("°C", 1.0, -273.15), "temperature_difference": ("K", 1.0, 0.0),
    "pressure": ("bar(a)", 1e-5, 0.0), "specific_energy": ("kJ/kg", 1e-3, 0.0), "power": ("kW", 1e-3, 0.0),
    "energy": ("kJ", 1e-3, 0.0), "mass": ("kg", 1.0, 0.0), "mass_flow": ("kg/h", 3600.0, 0.0),
    "amount": ("kmol", 1e-3, 0.0), "molar_flow": ("kmol/h", 3.6, 0.0), "specific_heat": ("kJ/(kg·K)", 1e-3, 0.0),
    "heat_capacity": ("kJ/K", 1e-3, 0.0), "duration": ("min", 1 / 60, 0.0), "molar_energy": ("kJ/mol", 1e-3, 0.0),
    "length": ("m", 1.0, 0.0), "velocity": ("m/s", 1.0, 0.0), "thermal_conductivity": ("W/(m·K)", 1.0, 0.0),
    "volume_flow": ("m³/h", 3600.0, 0.0), "heat_transfer_coefficient": ("W/(m²·K)", 1.0, 0.0),
}


def fallback_text(measure: Measure) -> str:
    """A measure in plain SI engineering units, without the presentation layer: ``151.9 °C``."""
    unit, scale, offset = _FALLBACK.get(measure.kind, ("", 1.0, 0.0))
    value = measure.value * scale + offset
    if not math.isfinite(value):
        return f"{significant_text(value)} {unit}".strip()
    if measure.decimals is not None:
        return f"{value:,.{measure.decimals}f} {unit}"
    if measure.kind == "temperature":
        return f"{value:.{min(measure.digits, 2)}f} {unit}"
    return f"{significant_text(value, measure.digits)} {unit}".strip()


def significant_text(value: float, digits: int = 4) -> str:
    """``value`` to ``digits`` significant figures, never in exponent form, trailing zeros dropped
    (a dash for a non-finite value).

    >>> significant_text(1708123.0), significant_text(745.63), significant_text(15.0), significant_text(0.00001234)
    ('1,708,000', '745.6', '15', '0.00001234')
    """
    if not math.isfinite(value):
        return NOT_APPLICABLE  # never a non-finite number shown
    if value == 0:
        return "0"  # never "-0"
    rounded = float(f"{value:.{digits - 1}e}")  # 9999.5 -> 10000: the exponent after rounding
    decimals = max(0, digits - 1 - math.floor(math.log10(abs(rounded))))
    text = f"{rounded:,.{decimals}f}"
    return text.rstrip("0").rstrip(".") if decimals else text


@dataclass(frozen=True)
class Phrase:
    """A sentence with SI measures in it: ``Phrase("{name} leaves at {T}", {"name": "Steam", "T": Measure(...)})``.

    ``address`` names the input the sentence is about (empty when it is about the whole sheet).
    """

    template: str
    values: dict = field(default_factory=dict)
    address: str = ""

    def render(self, write_measure) -> str:
        """The sentence with each measure written by ``write_measure(measure) -> str``."""
        if not self.values:
            return self.template
        words = {k: write_measure(v) if isinstance(v, Measure) else v for k, v in self.values.items()}
        return self.template.format(**words)

    @property
    def text(self) -> str:
        """The sentence in plain SI engineering units."""
        return self.render(fallback_text)

    def __str__(self) -> str:
        return self.text
