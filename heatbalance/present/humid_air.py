"""Humid-air lines (:mod:`heatbalance.humid_air`) in a unit set: their water, condensate and its heat."""
from __future__ import annotations

from ..humid_air import T_MIN
from ..messages import Measure
from ..units import basis_kinds, heat_kind
from .text import measure_text

__all__ = ["humid_air_rows", "humid_air_report"]


def humid_air_rows(result, system: str = "SI") -> list[dict]:
    """One row per humid-air line: dry air, humidity ratios (g/kg dry air), dew point, RH, condensate, its heat."""
    amount_kind, heat = basis_kinds("amount", result.basis)[0], heat_kind(result.basis)

    def text(value: float, kind: str, digits: int = 4) -> str:
        return measure_text(Measure(value, kind, digits), system)

    return [{"line": r.name, "dry air": text(r.dry_air, amount_kind),
             "humidity ratio in [g/kg]": f"{r.W_in * 1000:.2f}", "humidity ratio out [g/kg]": f"{r.W_out * 1000:.2f}",
             "dew point in": text(r.dew_point_in, "temperature", 1) if r.dew_point_in > T_MIN
             else "below " + text(T_MIN, "temperature", 0), "RH in": f"{r.rh_in:.0%}",
             "RH out": f"{r.rh_out:.0%}", "condensate": text(_positive(r.condensate), amount_kind),
             "condensing heat released": text(_positive(r.condensate_heat), heat), "address": r.address}
            for r in result.humid_air]


def _positive(value: float) -> float:
    """Condensate and its heat as shown: an amount that evaporates (a negative one) is shown as none."""
    return value if value > 0 else 0.0


def humid_air_report(result, system: str = "SI") -> list[str]:
    """The command line's block for humid-air lines."""
    out = ["HUMID AIR (per kg of dry air; CoolProp HAPropsSI)"]
    for row, record in zip(humid_air_rows(result, system), result.humid_air):
        out.append(f"  {row['line']}: dry air {row['dry air']}; humidity ratio {row['humidity ratio in [g/kg]']} -> "
                   f"{row['humidity ratio out [g/kg]']} g/kg; dew point in {row['dew point in']}; RH {row['RH in']} -> "
                   f"{row['RH out']}")
        if record.condensate > 0:
            out.append(f"    below its dew point: condensate {row['condensate']}, giving up "
                       f"{row['condensing heat released']} (in the balance)")
        else:
            out.append("    no condensation")
    return out
