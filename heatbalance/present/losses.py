"""Losses computed from a surface (:mod:`heatbalance.losses`) in a unit set: a table and the report block."""
from __future__ import annotations

from ..messages import Measure
from ..units import from_si
from ..reactor import CAUTION
from .text import measure_text, phrase_text

__all__ = ["surface_loss_rows", "protection_text", "surface_loss_report"]


def protection_text(record, system: str = "SI") -> str:
    """What it takes to keep the surface touchable: the thickness of insulation, in words."""
    limit = measure_text(Measure(record.protection_limit, "temperature", 0), system)
    if record.process_T <= record.protection_limit:
        return f"the process is at or below {limit}: no insulation needed for personnel protection"
    if record.protection_thickness is None:
        return f"no thickness of {record.protection_material} up to 1 m keeps the surface at or below {limit}"
    unit = "mm" if system == "SI" else "in"
    thickness = f"{from_si(record.protection_thickness, unit, 'length'):.{0 if unit == 'mm' else 1}f} {unit}"
    return f"{thickness} of {record.protection_material} keeps the surface at or below {limit} in still air"


def surface_loss_rows(result, system: str = "SI") -> list[dict]:
    """One row per computed loss: the heat and its parts, temperatures, coefficient, method, protection."""
    def text(value, kind: str, digits: int = 4) -> str:
        return "" if value is None else measure_text(Measure(value, kind, digits), system)

    return [{"loss": r.name, "heat lost": text(r.loss, "power"), "convection": text(r.convection, "power"),
             "radiation": text(r.radiation, "power"), "process side": text(r.process_T, "temperature", 1),
             "surface": text(r.surface_T, "temperature", 1),
             "h convection": text(r.h_convection, "heat_transfer_coefficient", 3),
             "area": text(r.area, "area", 4), "insulation k": text(r.insulation_k, "thermal_conductivity", 3),
             "method": r.method, "personnel protection": protection_text(r, system), "address": r.address}
            for r in result.surface_losses]


def surface_loss_report(result, system: str = "SI", caution: bool = True) -> list[str]:
    """The command line's block: each computed loss with its details, and the one safety caution (``caution=False``
    when the report shows it elsewhere)."""
    out = ["SURFACE LOSSES (computed from geometry, as powers)"]
    for row, record in zip(surface_loss_rows(result, system), result.surface_losses):
        out.append(f"  {row['loss']}: {row['heat lost']} = convection {row['convection']} + radiation "
                   f"{row['radiation']}")
        out.append(f"    process side {row['process side']}, outer surface {row['surface']}; area {row['area']}; "
                   f"h {row['h convection']}" + (f"; insulation k {row['insulation k']}" if row["insulation k"] else ""))
        out.append(f"    {row['method']}")
        out.append(f"    personnel protection: {row['personnel protection']}")
        out += [f"    ! {phrase_text(note, system)}" for note in record.notes]
    return out + ([f"  Safety: {CAUTION}"] if caution else [])
