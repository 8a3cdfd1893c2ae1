"""cp(T) of solids from sourced tables: piecewise-linear heat capacity, enthalpy as its exact integral.

The shipped tables (``data/solid_heat_capacity_tables.csv``) hold, per material, cp at rising
temperatures, each row naming its source: handbook tables for alloys, the NIST-JANAF tables (as shipped
in ``chemicals``) for pure elements and oxides. Between two rows cp is linear in T; beyond the first or
last row the end segment's line is continued (the material's validity range keeps that to a warned band).
Reading the numbers from a file keeps ``thermo``/``chemicals`` out of a solve (their import and first
property lookup take about a second on the reference machine).
"""
from __future__ import annotations

import csv
import math
from bisect import bisect_right
from dataclasses import dataclass, field
from functools import lru_cache
from importlib import resources

__all__ = ["TablePhase", "CpTable", "cp_tables", "CP_TABLES_FILE"]

CP_TABLES_FILE = "solid_heat_capacity_tables.csv"
KJ = 1000.0


@dataclass(frozen=True)
class CpTable:
    """cp [J/(kg·K)] at rising temperatures [K], with the source of each row."""

    temperatures: tuple[float, ...]
    cp_values: tuple[float, ...]
    sources: tuple[str, ...] = ()
    _cumulative: tuple[float, ...] = field(init=False, repr=False, compare=False)

    def __post_init__(self):
        T, c = self.temperatures, self.cp_values
        if len(T) < 2 or len(T) != len(c) or any(b <= a for a, b in zip(T, T[1:])):
            raise ValueError("a cp table needs two or more rows at strictly rising temperatures")
        cumulative = [0.0]
        for i in range(len(T) - 1):
            cumulative.append(cumulative[-1] + (T[i + 1] - T[i]) * (c[i] + c[i + 1]) / 2)
        object.__setattr__(self, "_cumulative", tuple(cumulative))

    def _segment(self, T: float) -> int:
        return min(max(bisect_right(self.temperatures, T) - 1, 0), len(self.temperatures) - 2)

    def cp(self, T: float) -> float:
        """cp at T [J/(kg·K)], linear between rows (and on the end segment's line beyond them)."""
        i = self._segment(T)
        (T0, T1), (c0, c1) = self.temperatures[i:i + 2], self.cp_values[i:i + 2]
        return c0 + (c1 - c0) * (T - T0) / (T1 - T0)

    def integral(self, T: float) -> float:
        """∫cp dT from the first row to T [J/kg] (exact for the piecewise-linear cp).

        Examples
        --------
        Hand calculation: cp 400 J/(kg·K) at 300 K rising to 600 at 400 K; from 300 to 350 K the mean cp is 450:

        >>> CpTable((300.0, 400.0), (400.0, 600.0)).integral(350.0)
        22500.0
        """
        i = self._segment(T)
        T0, c0 = self.temperatures[i], self.cp_values[i]
        return self._cumulative[i] + (T - T0) * (c0 + self.cp(T)) / 2


@dataclass(frozen=True)
class TablePhase:
    """A phase whose cp(T) is a :class:`CpTable`, up to ``T_upper`` (the interface of ``properties.Phase``)."""

    name: str
    table: CpTable
    T_upper: float = math.inf
    latent_to_next: float = 0.0

    def enthalpy_rise(self, T1: float, T2: float) -> float:
        """∫cp dT from T1 to T2 [J/kg]."""
        return self.table.integral(T2) - self.table.integral(T1)


@lru_cache(maxsize=1)
def cp_tables() -> dict[str, CpTable]:
    """The shipped cp(T) tables by material name (read once)."""
    rows: dict[str, list[tuple[float, float, str]]] = {}
    with resources.files(__package__).joinpath("data").joinpath(CP_TABLES_FILE).open(encoding="utf-8") as handle:
        for row in csv.DictReader(handle):
            rows.setdefault(row["name"], []).append((float(row["T_K"]), float(row["cp_kJ_kgK"]) * KJ, row["source"]))
    return {name: CpTable(tuple(r[0] for r in found), tuple(r[1] for r in found), tuple(r[2] for r in found))
            for name, found in rows.items()}
