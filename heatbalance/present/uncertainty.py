"""An output's uncertainty in a unit set: ``value ± U`` and the ranked contributions (reads analyses.uncertainty)."""
from __future__ import annotations

import math
from typing import TYPE_CHECKING

from ..address import label
from ..results import Answer
from ..units import from_si, pressure_difference_unit
from .text import UNIT_SETS, answer_unit, display_unit

if TYPE_CHECKING:  # the analysis (numpy, uncertainties) is loaded only when a sheet has tolerances
    from ..analyses.uncertainty import Uncertainty

__all__ = ["uncertainty_unit", "uncertainty_text", "contribution_rows", "monte_carlo_text", "tolerance_text",
           "output_uncertainty_lines"]


def uncertainty_unit(u: Uncertainty, system: str = "SI", answer: Answer | None = None) -> str:
    """The answer's own unit (as on the answer), else the view's unit of the output's kind."""
    if u.output == "answer" and answer is not None:
        return answer_unit(answer, system)
    return UNIT_SETS[system].get(u.kind, "")


def _value(x: float, unit: str, kind: str) -> float:
    return from_si(x, unit, kind) if unit else x


def _difference(x: float, unit: str, kind: str) -> float:
    """A difference (an uncertainty) in ``unit``: the offset of °C or °F cancels."""
    return from_si(x, unit, kind) - from_si(0.0, unit, kind) if unit else x


# a difference (a tolerance, a standard uncertainty) of temperatures is in K or °F; of pressures neither gauge nor
# absolute (units.pressure_difference_unit)
_DIFFERENCE_SHOWN = {"degC": "K", "°C": "K", "C": "K", "degF": "°F", "°F": "°F", "F": "°F"}


def _difference_unit(unit: str) -> str:
    """The unit a difference in ``unit`` is written in: '0.015 bar', not 'bar(a)' nor 'barg'; K for °C."""
    return _DIFFERENCE_SHOWN.get(unit.strip()) or pressure_difference_unit(unit) or display_unit(unit)


def _number(x: float) -> str:
    return f"{x:,.4g}" if abs(x) < 1e5 else f"{x:,.0f}"


def uncertainty_text(u: Uncertainty, system: str = "SI", answer: Answer | None = None) -> str:
    """``28,300 ± 2,400 kg/h (k = 2, about 95 %)``: U to two significant figures, the value to the same place."""
    unit = uncertainty_unit(u, system, answer)
    value, expanded = _value(u.value, unit, u.kind), abs(_difference(u.expanded, unit, u.kind))
    value_text, expanded_text = value_and_uncertainty(value, expanded)
    return f"{value_text} ± {expanded_text} {display_unit(unit)}".rstrip() + f" (k = {u.coverage:g}, about 95 %)"


def value_and_uncertainty(value: float, expanded: float) -> tuple[str, str]:
    """A value and its expanded uncertainty as written: U to two significant figures and the value to the same
    decimal place (GUM, JCGM 100:2008, 7.2.6: no more digits than the uncertainty carries).

    >>> value_and_uncertainty(130.96, 1.463), value_and_uncertainty(28_310.0, 2_370.0)
    (('131.0', '1.5'), ('28,300', '2,400'))
    >>> value_and_uncertainty(54.978, 0.813), value_and_uncertainty(131.04, 9.96), value_and_uncertainty(-0.04, 1.5)
    (('54.98', '0.81'), ('131', '10'), ('0.0', '1.5'))
    """
    if not expanded > 0 or not math.isfinite(expanded):
        return _number(value), _number(expanded)
    place = math.floor(math.log10(expanded)) - 1  # the power of ten of U's second significant figure
    if round(expanded, -place) >= 10.0 ** (place + 2):  # 9.96 rounds to 10.0: two figures are "10"
        place += 1
    decimals = max(0, -place)
    return f"{round(value, -place) + 0.0:,.{decimals}f}", f"{round(expanded, -place):,.{decimals}f}"


def tolerance_text(c) -> str:
    """``± 0.5 K (rectangular)``, ``± 1.5 % (rectangular)``."""
    t = c.tolerance
    size = f"{t.percent:g} %" if t.percent is not None else \
        (f"{t.plus_minus.value:g} {_difference_unit(t.plus_minus.unit)}" if hasattr(t.plus_minus, "unit")
         else f"{t.plus_minus:g}")
    return f"± {size} ({t.distribution})"


def contribution_rows(u: Uncertainty, system: str = "SI", answer: Answer | None = None) -> list[dict]:
    """One row per input, largest contribution first: the input as typed, its tolerance, u(x), its part."""
    unit = uncertainty_unit(u, system, answer)
    shown = display_unit(unit)
    rows = []
    for c in u.contributions:
        rows.append({
            "input": label(c.address), "address": c.address,
            "value": f"{c.value:g} {display_unit(c.unit)}".rstrip(),
            "tolerance": tolerance_text(c), "source": c.tolerance.source,
            "u(input)": f"{c.standard:.3g} {_difference_unit(c.unit)}".rstrip(),
            f"contribution [{shown}]": _difference(c.contribution, unit, u.kind),
            "share": f"{c.share:.1%}",
            "note": "one-sided (a side cannot be solved)" if c.refused is not None else
                    "non-linear over the tolerance" if c.nonlinear else "",
        })
    return rows


def monte_carlo_text(u: Uncertainty, system: str = "SI", answer: Answer | None = None) -> str:
    """The Monte Carlo check in words, beside the linear result."""
    mc = u.monte_carlo
    if mc is None:
        return ""
    unit = uncertainty_unit(u, system, answer)
    if mc.solved < 2:
        return f"Monte Carlo: {mc.solved} of {mc.draws:,} draws solved; no check possible."
    low, high = (_value(x, unit, u.kind) for x in (mc.low, mc.high))
    return (f"Monte Carlo ({mc.solved:,} of {mc.draws:,} draws solved): mean {_number(_value(mc.mean, unit, u.kind))}, "
            f"standard deviation {_number(abs(_difference(mc.standard, unit, u.kind)))}, 95 % of draws between "
            f"{_number(low)} and {_number(high)} {display_unit(unit)}; linear: u = "
            f"{_number(abs(_difference(u.standard, unit, u.kind)))}".rstrip())


PLATEAU_FRACTION = "answer.phase_fraction"  # an answer on a plateau: the fraction carries its uncertainty


def output_uncertainty_lines(result, system: str = "SI") -> list[str]:
    """Other outputs with their uncertainty (each screening's MTSR): ``R-7: MTSR = 91.2 ± 3.1 °C (k = 2, ...)``."""
    def label_of(name: str) -> str:  # screening[R-7].MTSR -> R-7: MTSR
        head, _, field = name.rpartition(".")
        return f"{head[head.index('[') + 1:-1]}: {field}" if "[" in head else name

    return [plateau_fraction_text(result) if name == PLATEAU_FRACTION else
            f"{label_of(name)} = {uncertainty_text(u, system)}"
            for name, u in (getattr(result, "output_uncertainties", None) or {}).items()]


def plateau_fraction_text(result) -> str | None:
    """An answer on a phase change: its temperature is fixed there, the uncertainty is in the fraction changed:
    ``… liquid (melted) fraction = 56.8% ± 1.8% (k = 2, …)``; None otherwise."""
    u = (getattr(result, "output_uncertainties", None) or {}).get(PLATEAU_FRACTION)
    if u is None:
        return None
    upper = "vapour" if result.answer.plateau == "boiling" else "liquid (melted)"
    value, expanded = value_and_uncertainty(100 * u.value, 100 * abs(u.expanded))
    return (f"{result.answer.label}: {upper} fraction = {value}% ± {expanded}% (k = {u.coverage:g}, "
            "about 95 %; on the phase change the temperature is fixed)")
