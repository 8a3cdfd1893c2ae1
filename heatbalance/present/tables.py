"""Tables of a solved balance in a unit set: the contribution table (page, CLI, CSV)."""
from __future__ import annotations

from ..results import LineResult, Result
from ..units import basis_kinds, from_si, heat_kind
from .text import UNIT_SETS, amount_text, display_unit, phrase_text

__all__ = ["contribution_rows", "state_text"]


def state_text(T: float, phase: str, P: float | None, system: str = "SI", digits: int = 2) -> str:
    """A state in words: ``151.84 °C saturated vapour, 5.013 bar(a)`` (without the pressure when ``P`` is None)."""
    t_unit = UNIT_SETS[system]["temperature"]
    text = f"{from_si(T, t_unit, 'temperature'):.{digits}f} {display_unit(t_unit)} {phase}"
    if P is None:
        return text
    p_unit = UNIT_SETS[system]["pressure"]
    return f"{text}, {from_si(P, p_unit, 'pressure'):.4g} {display_unit(p_unit)}"


def _line_states(line: LineResult, system: str) -> tuple[str, str]:
    return (state_text(line.initial_T, line.initial_phase, line.initial_P, system),
            state_text(line.final_T, line.final_phase, line.final_P, system))


def contribution_rows(result: Result, system: str = "SI") -> list[dict]:
    """One row per contribution, heats as *heat into the process* so the rows sum to −residual.

    Lines appear with −ΔH (a line that absorbs heat takes it from the balance).
    """
    kind = heat_kind(result.basis)
    unit = UNIT_SETS[system][kind]
    amount_kind = basis_kinds("amount", result.basis)[0]
    amount_unit = UNIT_SETS[system][amount_kind]

    def convert(value: float) -> float:
        return from_si(value, unit, kind)

    rows = []
    for line in result.lines:
        start, end = _line_states(line, system)
        rows.append({
            "item": line.name, "type": line.kind, "material": line.material,
            "amount": f"{amount_text(from_si(line.amount_si, amount_unit, amount_kind))} {amount_unit}",
            "from": start, "to": end,
            f"sensible absorbed [{unit}]": convert(line.sensible),
            f"latent absorbed [{unit}]": convert(line.latent),
            f"heat into process [{unit}]": -convert(line.total),
        })
    for term in result.terms:
        rows.append({
            "item": term.name, "type": term.kind, "material": "", "amount": "",
            "from": phrase_text(term.detail, system), "to": "",
            f"sensible absorbed [{unit}]": None, f"latent absorbed [{unit}]": None,
            f"heat into process [{unit}]": convert(term.heat),
        })
    return rows
