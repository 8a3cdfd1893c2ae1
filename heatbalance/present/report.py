"""The command line's report of a solved worksheet, and its JSON, in a unit set."""
from __future__ import annotations

from ..reactor import CAUTION
from ..results import SIGN_CONVENTION, Result
from .exchangers import exchanger_report
from .humid_air import humid_air_report
from .losses import protection_text, surface_loss_report
from .screening import bears_on_safety, screening_report
from .tables import contribution_rows
from .text import (answer_text, answer_unit, answer_value, average_power_text, format_heat, no_negative_zero,
                   phrase_text)
from .uncertainty import contribution_rows as uncertainty_rows
from .uncertainty import monte_carlo_text, output_uncertainty_lines, uncertainty_text

__all__ = ["format_result", "result_json"]


def _table(rows: list[dict], columns: list[str]) -> str:
    def cell(value) -> str:
        if value is None:
            return ""
        return no_negative_zero(f"{value:,.2f}") if isinstance(value, float) else str(value)

    cells = [[cell(r.get(c)) for c in columns] for r in rows]
    widths = [max(len(c), *(len(row[i]) for row in cells)) for i, c in enumerate(columns)]
    lines = ["  ".join(c.ljust(w) for c, w in zip(columns, widths)), "  ".join("-" * w for w in widths)]
    lines += ["  ".join(v.rjust(w) if i >= 4 else v.ljust(w) for i, (v, w) in enumerate(zip(row, widths)))
              for row in cells]
    return "\n".join(lines)


def format_result(result: Result, system: str = "SI") -> str:
    """A readable report of a solved worksheet in a unit set."""
    rows = contribution_rows(result, system)
    columns = ["item", "type", "from", "to", *[k for k in rows[0] if "[" in k]]
    average = average_power_text(result, system)
    out = [result.title, "=" * len(result.title),
           f"ANSWER  {result.answer.label} = {answer_text(result.answer, system)}"
           + (f"  ({average})" if average else ""), "",
           _table(rows, columns), "",
           f"closure residual: {format_heat(result.residual, result.basis, system)}",
           f"sign convention: {SIGN_CONVENTION}", "", "assumptions:"]
    out += [f"  - {phrase_text(a, system)}" for a in result.assumptions]
    out += ["property data:"] + [f"  - {name}: {src}" for name, src in result.sources.items()]
    out += ["warnings:"] + ([f"  ! {phrase_text(w, system)}" for w in result.warnings] or ["  (none)"])
    if bears_on_safety(result):  # the one caution, once, whatever the blocks below (the sheet's rule)
        out.append(f"safety: {CAUTION}")
    if result.uncertainty is not None:
        out += [""] + uncertainty_report(result.uncertainty, system, result.answer, result)
    if result.screening:
        out += [""] + screening_report(result.screening, system, caution=False)  # said once above
    if result.exchangers or result.utilities:
        out += [""] + exchanger_report(result, system)
    if result.surface_losses:
        out += [""] + surface_loss_report(result, system, caution=False)  # said once above
    if result.humid_air:
        out += [""] + humid_air_report(result, system)
    out.append("versions: " + ", ".join(f"{k} {v}" for k, v in result.versions.items()))
    return "\n".join(out)


def uncertainty_report(u, system: str, answer, result: Result | None = None) -> list[str]:
    """The answer ± U and its contributors, for the command line."""
    rows = uncertainty_rows(u, system, answer)
    out = ["UNCERTAINTY (GUM: linear propagation of the inputs' tolerances)",
           f"  {answer.label} = {uncertainty_text(u, system, answer)}"]
    out += [f"  {line}" for line in output_uncertainty_lines(result, system)] if result is not None else []
    if rows:
        columns = [c for c in rows[0] if c not in ("address", "source")]
        out += ["  " + line for line in _table(rows, columns).splitlines()]
    out += [f"  note: {phrase_text(n, system)}" for n in u.notes]
    if u.monte_carlo is not None:
        out.append("  " + monte_carlo_text(u, system, answer))
    return out


def result_json(result: Result, system: str = "SI") -> dict:
    """The full result as JSON-ready data: SI numbers, words in the unit set, the answer also as shown.

    ``caution`` (top level) is :data:`~heatbalance.reactor.CAUTION` when the result bears on safety
    (:func:`~heatbalance.present.screening.bears_on_safety`), else null: the one caution, once, not per vessel.
    """
    data = result.to_dict(lambda phrase: phrase_text(phrase, system))
    data["caution"] = CAUTION if bears_on_safety(result) else None
    for record in data.get("screening", []):
        record.pop("caution", None)  # said once at the top level
    data["answer"].update(text=answer_text(result.answer, system), unit=answer_unit(result.answer, system),
                          value=answer_value(result.answer, system))
    data["units"] = system
    for loss, record in zip(data.get("surface_losses", []), result.surface_losses):
        loss["personnel_protection"] = protection_text(record, system)
    if result.uncertainty is not None:
        data["uncertainty"].update(expanded=result.uncertainty.expanded,
                                   text=uncertainty_text(result.uncertainty, system, result.answer))
    return data
