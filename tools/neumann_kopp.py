"""cp(T) rows of refractories and glasses by the Neumann–Kopp rule, written into the shipped cp(T) table.

cp_mix(T) = Σ w_i · cp_i(T): the mass-weighted sum of the constituent oxides' cp, each from data shipped in
``chemicals`` 1.5.2: Perry's Table 2-151 (Kelley's cp = 4.184·(a + bT + c/T²) J/(mol·K), evaluated with
``chemicals.heat_capacity.Perry_151``, coefficients from ``Cp_dict_PerryI``) for vitreous SiO2 and Al2O3, and
the NIST-JANAF tables (``Cp_dict_JANAF_solid``, linear between the tabulated rows) for the other oxides.
The solve never runs this: it reads the rows this writes (``python -m tools.neumann_kopp --write`` from the repo
root; without ``--write`` it only says whether the shipped table matches).
"""
from __future__ import annotations

import argparse
import csv
import io
import sys
from bisect import bisect_left
from dataclasses import dataclass
from functools import lru_cache
from pathlib import Path

TABLE = Path(__file__).resolve().parent.parent / "heatbalance" / "data" / "solid_heat_capacity_tables.csv"
PERRY = "Perry's Chemical Engineers' Handbook 8th ed. Table 2-151 (Kelley)"
JANAF = "NIST-JANAF Thermochemical Tables 4th ed. (Chase 1998)"

# oxide: (CAS, molar mass g/mol, data set, Perry phase)
OXIDES = {
    "SiO2": ("7631-86-9", 60.0843, "perry", "gls"),  # vitreous silica
    "Al2O3": ("39377-45-2", 101.9613, "perry", "c"),  # CAS as Perry's table (and chemicals) files it
    "Fe2O3": ("1317-60-8", 159.6882, "janaf", ""),  # hematite
    "TiO2": ("1317-80-2", 79.8658, "janaf", ""),  # rutile
    "CaO": ("1305-78-8", 56.0774, "janaf", ""),
    "MgO": ("1309-48-4", 40.3044, "janaf", ""),
    "Na2O": ("1313-59-3", 61.9789, "janaf", ""),
    "B2O3": ("1303-86-2", 69.6202, "janaf", ""),  # crystal to 723 K (the table is the liquid above)
}


@dataclass(frozen=True)
class Blend:
    """A material as mass fractions of oxides, tabulated at ``temperatures`` [K]."""

    name: str
    fractions: dict[str, float]
    temperatures: tuple[float, ...]
    composition_source: str


def _grid(top: float) -> tuple[float, ...]:
    fine = (273.15, 300.0, 350.0, 400.0, 450.0, 500.0, 600.0)  # 50 K steps where Kelley's c/T² bends most
    return tuple(T for T in fine if T <= top) + tuple(float(T) for T in range(700, int(top) + 1, 100)) + \
        ((top,) if top % 100 and top > 600 else ())


# Alkalis (Na2O + K2O) are counted as Na2O: JANAF's K2O starts at 298.15 K.
BLENDS = (
    Blend("fireclay brick", {"SiO2": 0.54, "Al2O3": 0.40, "Fe2O3": 0.02, "TiO2": 0.02, "CaO": 0.005, "MgO": 0.005,
                             "Na2O": 0.01}, _grid(1673.15),
          "typical analysis of a high-duty fireclay brick (SiO2 54, Al2O3 40, Fe2O3 2, TiO2 2, CaO 0.5, MgO 0.5, "
          "Na2O + K2O 1 % by mass), from memory of handbook ranges"),
    Blend("borosilicate glass", {"SiO2": 0.806, "B2O3": 0.13, "Na2O": 0.042, "Al2O3": 0.022}, _grid(723.15),
          "typical composition of borosilicate glass 3.3 (SiO2 80.6, B2O3 13, Na2O + K2O 4.2, Al2O3 2.2 % by mass), "
          "from memory"),
    Blend("glass fibre insulation", {"SiO2": 0.64, "Al2O3": 0.04, "CaO": 0.08, "MgO": 0.03, "B2O3": 0.05,
                                     "Na2O": 0.16}, _grid(723.15),
          "typical composition of insulation glass wool (SiO2 64, Na2O + K2O 16, CaO 8, B2O3 5, Al2O3 4, MgO 3 % "
          "by mass), from memory; the organic binder is not counted"),
)


@lru_cache(maxsize=1)
def _perry_coefficients() -> dict:
    from chemicals import heat_capacity
    heat_capacity._load_Cp_data()  # chemicals loads this table lazily
    return heat_capacity.Cp_dict_PerryI


def oxide_cp(oxide: str, T: float) -> float:
    """cp of one oxide at T [J/(kg·K)] from the data set named in ``OXIDES``."""
    from chemicals.heat_capacity import Cp_dict_JANAF_solid, Perry_151
    cas, molar_mass, data, phase = OXIDES[oxide]
    if data == "perry":
        c = _perry_coefficients()[cas][phase]
        molar = Perry_151(T, c["Const"], c["Lin"], c["Quadinv"], c["Quad"])
    else:
        temps, values = Cp_dict_JANAF_solid[cas]
        i = min(max(bisect_left(temps, T), 1), len(temps) - 1)
        (T0, T1), (c0, c1) = temps[i - 1:i + 1], values[i - 1:i + 1]
        molar = c0 + (c1 - c0) * (T - T0) / (T1 - T0)
    return molar / molar_mass * 1000.0


def blend_cp(fractions: dict[str, float], T: float) -> float:
    """Neumann–Kopp: Σ w_i · cp_i(T) [J/(kg·K)]."""
    return sum(w * oxide_cp(oxide, T) for oxide, w in fractions.items())


def _source(blend: Blend) -> str:
    perry = [o for o in blend.fractions if OXIDES[o][2] == "perry"]
    janaf = [o for o in blend.fractions if OXIDES[o][2] == "janaf"]
    return (f"Neumann-Kopp sum of oxide cp (tools/neumann_kopp.py) for a {blend.composition_source}; "
            f"{', '.join(perry)}: {PERRY}, {', '.join(janaf)}: {JANAF}, both as shipped in chemicals 1.5.2")


def rows() -> list[list[str]]:
    """The CSV rows (name, T_K, cp_kJ_kgK, source) of every blend."""
    return [[b.name, f"{T:g}", f"{blend_cp(b.fractions, T) / 1000:.5g}", _source(b)]
            for b in BLENDS for T in b.temperatures]


def rewrite_table(path: Path = TABLE) -> str:
    """The table's text with every blend's rows replaced by freshly computed ones."""
    names = {b.name for b in BLENDS}
    with path.open(encoding="utf-8", newline="") as handle:
        kept = [r for r in csv.reader(handle) if r[0] not in names]
    out = io.StringIO()
    csv.writer(out, lineterminator="\n").writerows(kept + rows())
    return out.getvalue()


def _parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(
        prog="python -m tools.neumann_kopp",
        description="Neumann-Kopp cp(T) rows of " + ", ".join(b.name for b in BLENDS) + f" in {TABLE.name}. "
                    "Without --write: say whether the table matches them (exit status 1 when it does not).")
    parser.add_argument("--write", action="store_true", help="rewrite those rows of the table (other rows are kept)")
    return parser


def main(argv: list[str] | None = None) -> int:
    """The command line: check the table (exit status 1 when out of date), or rewrite it with ``--write``."""
    args = _parser().parse_args(argv)
    fresh = rewrite_table(TABLE)
    if args.write:
        TABLE.write_text(fresh, encoding="utf-8")
        print(f"wrote {TABLE}")
        return 0
    if TABLE.read_text(encoding="utf-8") == fresh:
        print(f"{TABLE.name} matches the Neumann-Kopp rows")
        return 0
    print(f"{TABLE.name} differs from the Neumann-Kopp rows: run with --write to rewrite them", file=sys.stderr)
    return 1


if __name__ == "__main__":
    raise SystemExit(main())
