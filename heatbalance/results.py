"""Result records of a solved balance, and their tables in display units.

All heats are SI: W on a continuous basis, J on a batch basis, positive into
the process for heat terms and positive when absorbed for lines.
"""
from __future__ import annotations

import math
from dataclasses import asdict, dataclass, field

from .units import DISPLAY_UNITS, display_unit, from_si

__all__ = ["SIGN_CONVENTION", "Answer", "LineResult", "TermResult", "Result", "heat_kind",
           "contribution_rows", "format_heat", "temperature_text", "pressure_text", "specific_energy_text",
           "heat_text"]

SIGN_CONVENTION = ("+ = heat into the process. Duties: heater +, cooler −. Reaction heat is + when "
                   "exothermic. Losses are heat leaving. Each line absorbs ΔH = m·(h_final − h_initial); "
                   "the balance closes when Σ ΔH_lines + equipment heat = duties + reaction heat − losses.")


@dataclass
class Answer:
    """The solved unknown, in SI and in the user's unit."""

    label: str
    kind: str  # amount | temperature | duty
    si_kind: str  # a key of units.KINDS
    value_si: float
    value: float
    unit: str
    phase_fraction: float | None = None  # fraction of the upper phase on a plateau
    plateau: str | None = None  # boiling | melting

    @property
    def text(self) -> str:
        """The answer in words: ``100 °C, 37 % vapour``."""
        number = f"{self.value:,.4g}" if abs(self.value) < 1e4 else f"{self.value:,.0f}"
        text = f"{number} {display_unit(self.unit)}"
        if self.phase_fraction is not None:
            if self.plateau == "boiling":
                text += f", {self.phase_fraction:.1%} vapour"
            else:
                text += f", {1 - self.phase_fraction:.1%} still solid"
        return text


@dataclass
class LineResult:
    """One line's states and the heat it absorbs (sensible + latent)."""

    name: str
    kind: str  # stream | charge
    material: str
    amount_si: float  # kg/s or kg
    initial_T: float
    final_T: float
    initial_phase: str
    final_phase: str
    initial_P: float
    final_P: float
    sensible: float
    latent: float

    @property
    def total(self) -> float:
        return self.sensible + self.latent


@dataclass
class TermResult:
    """A heat term, + into the process: a duty, a loss, reaction heat, or equipment."""

    name: str
    kind: str  # duty | loss | reaction | equipment
    heat: float
    detail: str = ""


@dataclass
class Result:
    """Everything a checker needs to see about one solved worksheet."""

    title: str
    basis: str  # continuous | batch
    answer: Answer
    lines: list[LineResult]
    terms: list[TermResult]
    residual: float
    warnings: list[str] = field(default_factory=list)
    assumptions: list[str] = field(default_factory=list)
    sources: dict[str, str] = field(default_factory=dict)
    versions: dict[str, str] = field(default_factory=dict)
    sign_convention: str = SIGN_CONVENTION
    screening: list = field(default_factory=list)  # reactor.Screening, one per vessel with a reaction

    @property
    def heat_si_unit(self) -> str:
        return "W" if self.basis == "continuous" else "J"

    def to_dict(self) -> dict:
        """Plain JSON-ready data, with the answer's text."""
        data = asdict(self)
        data["answer"]["text"] = self.answer.text
        data["heat_unit"] = self.heat_si_unit
        for line, record in zip(data["lines"], self.lines):
            line["total"] = record.total
        return data


def heat_kind(basis: str) -> str:
    """The unit kind of heat on a basis: power when continuous, energy in batch."""
    return "power" if basis == "continuous" else "energy"


def format_heat(value_si: float, basis: str, system: str = "SI") -> str:
    """A heat in the display unit of a unit system: ``1,234.5 kW``."""
    unit = DISPLAY_UNITS[system][heat_kind(basis)]
    return f"{from_si(value_si, unit, heat_kind(basis)):,.2f} {unit}"


def _state_text(T: float, phase: str, P: float, system: str) -> str:
    t_unit, p_unit = DISPLAY_UNITS[system]["temperature"], DISPLAY_UNITS[system]["pressure"]
    return (f"{from_si(T, t_unit, 'temperature'):.2f} {display_unit(t_unit)} {phase}, "
            f"{from_si(P, p_unit, 'pressure'):.4g} {display_unit(p_unit)}")


def _amount_text(value: float) -> str:
    """Four significant figures without scientific notation: 12,000 / 745.6 / 0.1234."""
    if value == 0:
        return "0"
    decimals = max(0, 3 - int(math.floor(math.log10(abs(value)))))
    return f"{round(value, decimals):,.{decimals}f}"


def temperature_text(T: float, system: str = "SI", digits: int = 2) -> str:
    """An absolute temperature [K] in the display unit: ``151.94 °C`` or ``305.49 °F``."""
    unit = DISPLAY_UNITS[system]["temperature"]
    return f"{from_si(T, unit, 'temperature'):.{digits}f} {display_unit(unit)}"


def pressure_text(P: float, system: str = "SI") -> str:
    """An absolute pressure [Pa] in the display unit: ``5.013 bar(a)`` or ``72.7 psia``."""
    unit = DISPLAY_UNITS[system]["pressure"]
    return f"{from_si(P, unit, 'pressure'):.4g} {display_unit(unit)}"


def specific_energy_text(value: float, system: str = "SI") -> str:
    """An energy per mass [J/kg] in the display unit: ``2,107.6 kJ/kg`` or ``906.1 Btu/lb``."""
    unit = DISPLAY_UNITS[system]["specific_energy"]
    return f"{from_si(value, unit, 'specific_energy'):,.1f} {unit}"


def heat_text(value: float, basis: str, system: str = "SI") -> str:
    """A heat in the display unit of the basis, 4 significant figures: ``440 kW``."""
    kind = heat_kind(basis)
    unit = DISPLAY_UNITS[system][kind]
    return f"{from_si(value, unit, kind):,.4g} {unit}"


def contribution_rows(result: Result, system: str = "SI") -> list[dict]:
    """One row per contribution, heats as *heat into the process* so the rows sum to −residual.

    Lines appear with −ΔH (a line that absorbs heat takes it from the balance).
    """
    kind = heat_kind(result.basis)
    unit = DISPLAY_UNITS[system][kind]
    amount_kind = "mass_flow" if result.basis == "continuous" else "mass"
    amount_unit = DISPLAY_UNITS[system][amount_kind]

    def convert(value: float) -> float:
        return from_si(value, unit, kind)

    rows = []
    for line in result.lines:
        rows.append({
            "item": line.name, "type": line.kind, "material": line.material,
            "amount": f"{_amount_text(from_si(line.amount_si, amount_unit, amount_kind))} {amount_unit}",
            "from": _state_text(line.initial_T, line.initial_phase, line.initial_P, system),
            "to": _state_text(line.final_T, line.final_phase, line.final_P, system),
            f"sensible absorbed [{unit}]": convert(line.sensible),
            f"latent absorbed [{unit}]": convert(line.latent),
            f"heat into process [{unit}]": -convert(line.total),
        })
    for term in result.terms:
        rows.append({
            "item": term.name, "type": term.kind, "material": "", "amount": "", "from": term.detail, "to": "",
            f"sensible absorbed [{unit}]": None, f"latent absorbed [{unit}]": None,
            f"heat into process [{unit}]": convert(term.heat),
        })
    return rows
