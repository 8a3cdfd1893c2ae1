"""The worksheet as editable grids and back: pure functions of the page (no streamlit import).

Each grid (table) is a list of row dicts. Quantity cells hold text as an engineer writes it
(``"12 t/h"``, ``"4 barg"``, ``"55 °C"``); a state cell holds a temperature, ``"saturated vapour"``,
``"vapour fraction 0.3"``, ``"solid fraction 0.5"`` or ``"shared: Mix"``. The unknown's cell shows
``"?"`` and its unit. A flow, mass, duty or state may be left empty: the grid reads, and the engine
then asks for that value unless it is picked as the unknown. Reading the grids back checks every
cell and reports each bad one where it is (:class:`CellProblem`: table, row, column, message).

The engine's rules are used, not restated: which field is the unknown comes from
:mod:`heatbalance.address`, basis -> unit kinds from :func:`heatbalance.units.basis_kinds`, and a
refusal's address is mapped to its cell by :func:`cell_of`.
"""
from __future__ import annotations

import math
import re
from dataclasses import dataclass

from heatbalance import address as addr
from heatbalance.errors import HeatBalanceError, InputError, WorksheetFormatError
from heatbalance.materials import catalogue
from heatbalance.present.text import UNIT_SETS, display_unit, shown_unit
from heatbalance.units import ATMOSPHERE, KINDS, basis_kinds, check_unit, kind_of, to_si
from heatbalance.worksheet import QUANTITY_TEXT, Quantity, State, Worksheet, parse_worksheet

__all__ = [
    "TABLES", "TABLE_TITLES", "COLUMNS", "DERIVED", "NUMBER_COLUMNS", "CellProblem", "worksheet_to_tables",
    "in_view", "exists", "tables_to_worksheet", "apply_edits", "cell_values", "same_rows", "renamed",
    "follow_renames", "cell_of", "material_names", "pressure_reference", "format_quantity", "parse_quantity",
    "format_state", "parse_state", "empty_worksheet", "typed_cell", "typed_into_unknown", "TYPED_INTO_UNKNOWN",
    "FRACTION_COLUMNS", "format_fraction", "parse_fraction", "typed_names",
]

UNKNOWN_MARK = "?"

#: table -> its columns, in order
COLUMNS: dict[str, list[str]] = {
    "streams": ["name", "material", "mass fraction", "flow", "pressure", "pressure is", "inlet", "outlet",
                "inlet pressure", "outlet pressure"],
    "vessels": ["name", "pressure", "pressure is", "final"],
    "charges": ["vessel", "name", "material", "mass fraction", "mass", "initial"],
    "duties": ["name", "heat"],
    "losses": ["name", "heat"],
    "reactions": ["name", "heat of reaction", "equation", "key reactant", "amount", "conversion", "molar mass",
                  "vessel"],
    "equipment": ["vessel", "material", "mass", "heat capacity", "initial temperature"],
    "shared": ["name", "temperature"],
    "materials": ["material", "phase", "from library", "cp", "cp per K", "cp per K²", "up to", "latent heat",
                  "min temperature", "max temperature", "source"],
}
TABLES = tuple(COLUMNS)
TABLE_TITLES = {
    "streams": "Streams", "vessels": "Vessels", "charges": "Vessel charges", "duties": "Duties",
    "losses": "Losses", "reactions": "Reaction heat", "equipment": "Equipment heat capacity",
    "shared": "Shared temperatures", "materials": "Materials defined in this worksheet",
    "worksheet": "Worksheet", "basis": "Basis", "unknown": "Unknown",
}
#: columns the page shows read-only (derived from other cells)
DERIVED = {"pressure is"}
NUMBER_COLUMNS = frozenset({"cp per K", "cp per K²"})  # plain-number cells (no limits: nothing to clamp)
#: fraction cells, as text: a number from 0 to 1 or a percentage; -> an example of each
FRACTION_COLUMNS = {"mass fraction": ("0.98", "98 %"), "conversion": ("0.9", "90 %")}
_FRACTION_TEXT = re.compile(r"^(vapou?r|solid)(?:\s+(?:fraction|quality))?\s*[:=]?\s*([-+]?[\d.]+)\s*(%?)$")


def _stored_units() -> dict[str, str]:
    """Screen forms of units (``°C``, ``kJ/(kg·K)``, ``bar(a)``) -> the unit stored, from ``display_unit``.

    Only forms that are not plain ASCII unit names are mapped back, so ``psia`` typed stays ``psia``;
    differences are left out (a grid cell holds no temperature difference; ``K`` stays kelvin).
    """
    units = {u for unit_set in UNIT_SETS.values() for u in unit_set.values()} | {"degC", "degF", "degR"}
    out = {}
    for unit in sorted(units):
        shown = display_unit(unit)
        if shown != unit and "delta" not in unit and (not shown.isascii() or shown.endswith("(a)")):
            out[shown] = unit
    return out


_STORED_UNITS = _stored_units()


@dataclass(frozen=True)
class CellProblem:
    """A cell (or a whole row, ``column=None``; or a whole table, ``row=None``) that cannot be used."""

    table: str
    row: int | None
    column: str | None
    message: str

    @property
    def place(self) -> str:
        """Where, in words: ``Streams, row 2, flow``."""
        parts = [TABLE_TITLES.get(self.table, self.table)]
        if self.row is not None:
            parts.append(f"row {self.row + 1}")
        if self.column:
            parts.append(self.column)
        return ", ".join(parts)

    @property
    def text(self) -> str:
        return f"{self.place}: {self.message}"


class _CellError(InputError):
    """A cell that cannot be read; ``column`` is its column."""

    def __init__(self, column: str, message: str):
        super().__init__(message, column)
        self.column = column


# --------------------------------------------------------------------------- cells
def _blank(cell) -> bool:
    return cell is None or (isinstance(cell, float) and math.isnan(cell)) or (isinstance(cell, str)
                                                                           and not cell.strip())


def _text(cell) -> str:
    return "" if _blank(cell) else str(cell).strip()


def _number_text(value: float) -> str:
    return f"{value:.10g}"


def format_quantity(q: Quantity | None) -> str:
    """A quantity as a cell: ``12 t/h``, ``55 °C``."""
    if q is None:
        return ""
    return f"{_number_text(q.value)} {display_unit(q.unit)}".strip()


def parse_quantity(text: str, kinds: tuple[str, ...], column: str) -> Quantity:
    """Read ``"12 t/h"`` and check that the unit measures one of ``kinds``.

    >>> parse_quantity("12 t/h", ("mass_flow",), "flow")
    Quantity(value=12.0, unit='t/h')
    >>> parse_quantity("55 °C", ("temperature",), "outlet")
    Quantity(value=55.0, unit='degC')
    """
    text = text.replace("−", "-")
    comma = _DECIMAL_COMMA.match(text)
    if comma:
        raise _CellError(column, _comma_message(text, comma))
    match = QUANTITY_TEXT.match(text)
    if not match:
        raise _CellError(column, f"'{text}' is not a number followed by a unit (e.g. {_example(kinds)})")
    value, unit = float(match.group(1)), match.group(2)
    if not math.isfinite(value):  # 1e400 reads as infinity
        raise _CellError(column, f"'{text}' is beyond any number a worksheet can hold")
    if not unit:
        raise _CellError(column, f"'{text}' has no unit: write it with one, e.g. {_example(kinds)}")
    unit = _STORED_UNITS.get(unit, unit)
    try:
        check_unit(unit, kinds[0], column) if len(kinds) == 1 else kind_of(unit, kinds, column)
    except HeatBalanceError as exc:
        raise _CellError(column, exc.message) from None
    return Quantity(value=value, unit=unit)


_DECIMAL_COMMA = re.compile(r"^\s*([-+]?\d*),(\d+)\s*(.*?)\s*$")


def _comma_message(text: str, match: re.Match) -> str:
    """A number written with a comma: say so, with what was typed and what to write instead."""
    whole, part, unit = match.groups()
    point = f"{whole or '0'}.{part} {unit}".strip()
    if len(part) == 3 and whole.lstrip("+-"):  # 50,000 reads two ways: thousands (US, UK) or a decimal comma
        thousands = f"{whole}{part} {unit}".strip()
        return (f"'{text}' has a comma in the number, which reads two ways: write '{thousands}' if the comma "
                f"separates thousands, or '{point}' if it is a decimal comma")
    return f"'{text}' has a comma in the number: use a decimal point, e.g. '{point}'"


_EXAMPLES = {"mass_flow": "12 t/h", "mass": "3.5 t", "pressure": "4 barg", "temperature": "40 °C",
             "power": "150 kW", "energy": "500 MJ", "molar_energy": "-92 kJ/mol", "amount": "4.2 kmol",
             "molar_flow": "3 kmol/h", "molar_mass": "58 g/mol", "heat_capacity": "1600 kJ/K",
             "specific_heat": "2.1 kJ/(kg*K)", "specific_energy": "250 kJ/kg", "duration": "40 min"}


def _example(kinds: tuple[str, ...]) -> str:
    return f"'{_EXAMPLES.get(kinds[0], KINDS[kinds[0]][0])}'"


def format_state(state: State) -> str:
    """A state as a cell: ``55 °C``, ``saturated vapour``, ``vapour fraction 0.3``, ``shared: Mix``."""
    if state.common is not None:
        return f"shared: {state.common}"
    if state.vapour_fraction is not None:
        named = {1.0: "saturated vapour", 0.0: "saturated liquid"}
        return named.get(state.vapour_fraction, f"vapour fraction {_number_text(state.vapour_fraction)}")
    if state.solid_fraction is not None:
        return f"solid fraction {_number_text(state.solid_fraction)}"
    return format_quantity(state.temperature)


def parse_state(text: str, column: str) -> dict:
    """Read a state cell into the fields of a :class:`State` (without its pressure).

    >>> parse_state("vapour fraction 0.25", "outlet")
    {'vapour_fraction': 0.25}
    >>> parse_state("shared: Mix", "outlet")
    {'common': 'Mix'}
    """
    low = " ".join(text.lower().split())
    if not low:
        raise _CellError(column, "empty: give a temperature (e.g. '40 °C') or a phase "
                                 "('saturated vapour', 'saturated liquid', 'vapour fraction 0.3', "
                                 "'solid fraction 0.5')")
    if low in ("saturated vapour", "saturated vapor", "dry saturated vapour", "dry saturated steam"):
        return {"vapour_fraction": 1.0}
    if low in ("saturated liquid", "saturated condensate"):
        return {"vapour_fraction": 0.0}
    if low.startswith("shared"):
        name = text.strip()[len("shared"):].lstrip(" :=").strip()
        if not name:
            raise _CellError(column, "'shared' needs the name of a shared temperature, e.g. 'shared: Mix'")
        return {"common": name}
    match = _FRACTION_TEXT.match(low)
    if match:
        field = "solid_fraction" if match.group(1) == "solid" else "vapour_fraction"
        return {field: _fraction(match.group(2), match.group(3), column)}
    return {"temperature": parse_quantity(text, ("temperature",), column)}


def _fraction(number: str, percent: str, column: str) -> float:
    try:
        value = float(number) / (100.0 if percent else 1.0)
    except ValueError:
        raise _CellError(column, f"'{number}' is not a number") from None
    if not 0.0 <= value <= 1.0:
        raise _CellError(column, f"a phase fraction lies between 0 and 1 (or 0 % and 100 %), not {number}{percent}")
    return value


_FRACTION_CELL = re.compile(r"^([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(%?)$")


def format_fraction(value: float | None) -> str:
    """A fraction as a cell, every digit kept: ``0.98``; ``1``.

    >>> format_fraction(0.98), format_fraction(1.0), format_fraction(None)
    ('0.98', '1', '')
    """
    if value is None:
        return ""
    text = repr(float(value))
    return text[:-2] if text.endswith(".0") else text


def parse_fraction(text: str, column: str) -> float:
    """Read a fraction cell: a number from 0 to 1 (``0.98``) or a percentage (``98 %``).

    A bare number above 1 is refused with the two ways to write it, never clamped nor read as a percentage
    (``98`` may be 98 % or a slip).

    >>> parse_fraction("0.98", "mass fraction"), parse_fraction("98 %", "mass fraction")
    (0.98, 0.98)
    """
    text = text.strip().replace("−", "-")
    comma = _DECIMAL_COMMA.match(text)
    if comma:
        raise _CellError(column, _comma_message(text, comma))
    match = _FRACTION_CELL.match(text)
    value = float(match.group(1)) if match else math.nan
    if match and match.group(2):
        if 0.0 <= value <= 100.0:
            return value / 100.0
        raise _CellError(column, f"'{text}' is not a {column}: a percentage lies between 0 % and 100 %")
    if 0.0 <= value <= 1.0:
        return value
    if 1.0 < value <= 100.0:
        number = _number_text(value)
        raise _CellError(column, f"'{text}' is not a {column} (0 to 1): for {number} % type "
                                 f"{_number_text(value / 100.0)} or {number} %")
    fraction, percent = FRACTION_COLUMNS.get(column, ("0.5", "50 %"))
    raise _CellError(column, f"'{text}' is not a {column}: type a number from 0 to 1 ({fraction}) "
                             f"or a percentage ({percent})")


def pressure_reference(text) -> str:
    """``gauge`` or ``absolute`` for a pressure cell (empty if unreadable), by the engine's reading.

    >>> pressure_reference("4 barg"), pressure_reference("2.1 bar")
    ('gauge', 'absolute')
    """
    try:
        q = parse_quantity(_text(text), ("pressure",), "pressure")
    except HeatBalanceError:
        return ""
    try:  # the engine's one table of gauge units decides: zero gauge is one atmosphere, zero absolute a vacuum
        return "gauge" if to_si(0.0, q.unit, "pressure") == ATMOSPHERE else "absolute"
    except HeatBalanceError:
        return "absolute"


def typed_names(rows: list[dict], column: str = "name") -> list[str]:
    """The names typed in one column of a grid, each once, in order; a row that does not read yet counts.

    >>> typed_names([{"name": "V-1"}, {"name": " "}, {"name": "V-2 "}, {"name": "V-1"}])
    ['V-1', 'V-2']
    """
    return list(dict.fromkeys(name for name in (_text(row.get(column)) for row in rows) if name))


def material_names(ws: Worksheet, own_rows: list[dict] | None = None) -> list[str]:
    """Every material a line can use: the worksheet's own first (as typed in its materials grid, ``own_rows``,
    when given), its freezing-range materials, then the catalogue."""
    defined = typed_names(own_rows, "material") if own_rows is not None else [m.name for m in ws.materials]
    own = list(dict.fromkeys([*defined, *(m.name for m in ws.freezing_materials)]))
    return own + [m.name for m in catalogue() if m.name not in own]


# --------------------------------------------------------------------------- worksheet -> tables
def _unknowns(ws: Worksheet) -> set[str]:
    """The addresses of the worksheet's unknown(s)."""
    return {addr.unknown_address(u) for u in ws.unknowns}


def _unknown_cell(q: Quantity | None) -> str:
    unit = display_unit(q.unit) if q is not None else ""
    return f"{UNKNOWN_MARK} {unit}".strip()


def _quantity_cell(q: Quantity | None, unknown: bool) -> str:
    return _unknown_cell(q) if unknown else format_quantity(q)


def _state_cell(state: State, unknown: bool) -> str:
    return _unknown_cell(state.temperature) if unknown else format_state(state)


def in_view(table: str, rows: list[dict], ws: Worksheet, system: str) -> list[dict]:
    """The rows of ``table`` as a view shows them: an unknown's '?' cell in the unit its answer is shown in
    (``? kg/h`` reads ``? lb/h`` in the US view; a unit of its own, ``? t/h``, stays). Only the shown text
    changes: the typed rows, and so the worksheet, keep the unit typed."""
    shown = rows
    for where in _unknowns(ws):
        cell = typed_cell({table: shown}, where, ws) if exists(ws, where) else None
        typed = addr.get(ws, where) if cell is not None else None
        if not isinstance(typed, Quantity) or not str(shown[cell[1]].get(cell[2]) or "").startswith(UNKNOWN_MARK):
            continue
        unit = shown_unit(typed.unit, addr.kinds_of(where, ws.basis.kind)[0], system)
        shown = [dict(r) for r in shown]
        shown[cell[1]][cell[2]] = _unknown_cell(typed.model_copy(update={"unit": unit}))
    return shown


def exists(ws: Worksheet, where: str) -> bool:
    """True when the worksheet has a field at ``where``."""
    try:
        addr.get(ws, where)
    except HeatBalanceError:
        return False
    return True


def worksheet_to_tables(ws: Worksheet) -> dict[str, list[dict]]:
    """Every table of a worksheet, as rows of cells; the unknown's cell shows ``?``."""
    unknown = _unknowns(ws)
    item = addr.item
    tables: dict[str, list[dict]] = {name: [] for name in TABLES}
    for s in ws.streams:
        pressure = format_quantity(s.pressure)
        tables["streams"].append({
            "name": s.name, "material": s.material, "mass fraction": format_fraction(s.mass_fraction),
            "flow": _quantity_cell(s.flow, item("streams", s.name, "flow") in unknown),
            "pressure": pressure, "pressure is": pressure_reference(pressure),
            "inlet": _state_cell(s.inlet, item("streams", s.name, "inlet", "temperature") in unknown),
            "inlet pressure": format_quantity(s.inlet.pressure),
            "outlet": _state_cell(s.outlet, item("streams", s.name, "outlet", "temperature") in unknown),
            "outlet pressure": format_quantity(s.outlet.pressure),
        })
    for v in ws.vessels:
        pressure = format_quantity(v.pressure)
        tables["vessels"].append({
            "name": v.name, "pressure": pressure, "pressure is": pressure_reference(pressure),
            "final": _state_cell(v.final, item("vessels", v.name, "final", "temperature") in unknown)})
        for c in v.charges:
            charge = item("vessels", v.name, item("charges", c.name))
            tables["charges"].append({
                "vessel": v.name, "name": c.name, "material": c.material,
                "mass fraction": format_fraction(c.mass_fraction),
                "mass": _quantity_cell(c.mass, f"{charge}.mass" in unknown),
                "initial": _state_cell(c.initial, f"{charge}.initial.temperature" in unknown)})
        if v.equipment is not None:
            e = v.equipment
            tables["equipment"].append({
                "vessel": v.name, "material": e.material, "mass": format_quantity(e.mass),
                "heat capacity": format_quantity(e.heat_capacity),
                "initial temperature": format_quantity(e.initial_temperature)})
    for d in ws.duties:
        tables["duties"].append({"name": d.name,
                                 "heat": _quantity_cell(d.value, item("duties", d.name, "value") in unknown)})
    for loss in ws.losses:
        heat = COMPUTED_LOSS if loss.surface is not None else format_quantity(loss.value)
        tables["losses"].append({"name": loss.name, "heat": heat})
    for r in ws.reactions:
        tables["reactions"].append({
            "name": r.name, "heat of reaction": format_quantity(r.enthalpy), "equation": r.equation,
            "key reactant": r.key_reactant, "amount": format_quantity(r.amount),
            "conversion": format_fraction(r.conversion),
            "molar mass": format_quantity(r.molar_mass), "vessel": r.vessel})
    for c in ws.common_temperatures:
        is_unknown = item("common_temperatures", c.name, "temperature") in unknown
        tables["shared"].append({"name": c.name, "temperature": _quantity_cell(c.temperature, is_unknown)})
    for m in ws.materials:
        for p in m.phases:
            tables["materials"].append({
                "material": m.name, "phase": p.name, "from library": p.from_library or "",
                "cp": format_quantity(p.cp), "cp per K": p.cp_per_kelvin,
                "cp per K²": p.cp_per_kelvin2, "up to": format_quantity(p.up_to),
                "latent heat": format_quantity(p.latent_heat), "min temperature": format_quantity(m.min_temperature),
                "max temperature": format_quantity(m.max_temperature), "source": m.source})
    return tables


# --------------------------------------------------------------------------- tables -> worksheet
class _Reader:
    """Reads the cells of one row; each bad cell becomes a :class:`CellProblem`."""

    def __init__(self, table: str, index: int, row: dict, problems: list[CellProblem]):
        self.table, self.index, self.row, self.problems = table, index, row, problems

    def report(self, column: str | None, message: str) -> None:
        self.problems.append(CellProblem(self.table, self.index, column, message))

    def text(self, column: str, required: bool = False) -> str:
        value = _text(self.row.get(column))
        if required and not value:
            self.report(column, f"empty: give the {column}")
        return value

    def quantity(self, column: str, kinds: tuple[str, ...], keep: Quantity | None = None,
                 required: bool = True, unknown: bool = False) -> Quantity | None:
        """A quantity cell; ``?`` (the unknown) keeps the worksheet's value ``keep`` with the unit given."""
        value = self.text(column)
        try:
            if value.startswith(UNKNOWN_MARK):
                return self._unknown_quantity(column, value, kinds, keep, unknown)
            if not value:
                if required and not unknown:
                    raise _CellError(column, f"empty: give a value with its unit, e.g. {_example(kinds)}")
                return None
            return parse_quantity(value, kinds, column)
        except _CellError as exc:
            self.report(exc.column, exc.message)
            return None

    def _unknown_quantity(self, column, value, kinds, keep, unknown) -> Quantity | None:
        if not unknown:
            raise _CellError(column, "'?' marks the unknown: pick this quantity under 'Solve for', or enter a value")
        unit = value[len(UNKNOWN_MARK):].strip()
        if unit:
            number = keep.value if keep is not None else 0.0
            return parse_quantity(f"{number!r} {unit}", kinds, column)
        return keep

    def state(self, column: str, unknown: bool, keep: State | None) -> dict | None:
        value = self.text(column)
        try:
            if value.startswith(UNKNOWN_MARK):
                if not unknown:
                    raise _CellError(column, "'?' marks the unknown: pick this temperature under 'Solve for', "
                                             "or enter a value")
                kept = keep.model_dump(exclude_none=True, exclude={"pressure"}) if keep is not None else {}
                unit = value[len(UNKNOWN_MARK):].strip()
                if unit:
                    number = keep.temperature.value if keep is not None and keep.temperature else 25.0
                    kept = {"temperature": parse_quantity(f"{number!r} {unit}", ("temperature",), column)}
                return kept
            if not value:  # left open: the engine asks for it unless it becomes the unknown
                return {}
            return parse_state(value, column)
        except _CellError as exc:
            self.report(exc.column, exc.message)
            return None

    def fraction(self, column: str, default: float | None = None) -> float | None:
        """A fraction cell (:func:`parse_fraction`); a bad one is reported as typed, never changed."""
        cell = self.row.get(column)
        if _blank(cell):
            return default
        try:
            return parse_fraction(format_fraction(cell) if isinstance(cell, (int, float)) else str(cell), column)
        except _CellError as exc:
            self.report(exc.column, exc.message)
            return None

    def number(self, column: str, default: float | None = None) -> float | None:
        cell = self.row.get(column)
        if _blank(cell):
            return default
        try:
            return float(cell)
        except (TypeError, ValueError):
            self.report(column, f"'{cell}' is not a number")
            return None


#: the start of the message for a value typed into the unknown's cell (the page offers what to do)
TYPED_INTO_UNKNOWN = "is typed into the cell being solved for"


def typed_into_unknown(value: str) -> str:
    """The message for a value typed where the unknown's ``?`` was: the value is kept, never dropped."""
    return (f"'{value}' {TYPED_INTO_UNKNOWN}: to keep this value, pick another quantity under 'Solve for'; "
            "to solve for this one again, type ?")


def _row_is_blank(row: dict) -> bool:
    return all(_blank(row.get(c)) for c in row if c not in DERIVED)


def _rows(tables: dict, name: str):
    for index, row in enumerate(tables.get(name) or []):
        if not _row_is_blank(row):
            yield index, row


def _with_pressure(state: dict | None, pressure: Quantity | None) -> dict | None:
    if state is None:
        return None
    return {**state, "pressure": pressure} if pressure is not None else state


def _streams(tables, ws: Worksheet, problems) -> list[dict]:
    out, kept, unknown = [], {s.name: s for s in ws.streams}, _unknowns(ws)
    for index, row in _rows(tables, "streams"):
        r = _Reader("streams", index, row, problems)
        name = r.text("name", required=True)
        old = kept.get(name)
        at = lambda *fields: addr.item("streams", name, *fields) in unknown  # noqa: E731
        out.append({
            "name": name, "material": r.text("material", required=True),
            "mass_fraction": r.fraction("mass fraction"),
            "flow": r.quantity("flow", basis_kinds("amount", ws.basis.kind), old.flow if old else None,
                               required=False, unknown=at("flow")),
            "pressure": r.quantity("pressure", ("pressure",), required=False) or Quantity(value=0, unit="barg"),
            "inlet": _with_pressure(r.state("inlet", at("inlet", "temperature"), old.inlet if old else None),
                                    r.quantity("inlet pressure", ("pressure",), required=False)),
            "outlet": _with_pressure(r.state("outlet", at("outlet", "temperature"), old.outlet if old else None),
                                     r.quantity("outlet pressure", ("pressure",), required=False)),
            "air_flow": old.air_flow if old else None,  # humid air: not in the grid, kept from the model
        })
        if old is not None and old.inlet.humidity is not None and out[-1]["inlet"] is not None:
            out[-1]["inlet"] = {**out[-1]["inlet"], "humidity": old.inlet.humidity}
    return out


def _vessels(tables, ws: Worksheet, problems) -> list[dict]:
    kept, unknown = {v.name: v for v in ws.vessels}, _unknowns(ws)
    vessels = []
    for index, row in _rows(tables, "vessels"):
        r = _Reader("vessels", index, row, problems)
        name = r.text("name", required=True)
        old = kept.get(name)
        vessels.append({
            "name": name,
            "pressure": r.quantity("pressure", ("pressure",), required=False) or Quantity(value=0, unit="barg"),
            "final": r.state("final", addr.item("vessels", name, "final", "temperature") in unknown,
                             old.final if old else None),
            "screening": old.screening if old else None,  # not a table: kept from the model
            "charges": [], "_row": index})
    by_name = {v["name"]: v for v in vessels}
    _charges(tables, ws, by_name, problems)
    _equipment(tables, by_name, problems)
    for v in vessels:
        if not v["charges"]:
            problems.append(CellProblem("vessels", v["_row"], None,
                                        f"vessel {v['name']} has no charges: add at least one in Vessel charges"))
        del v["_row"]
    return vessels


def _charges(tables, ws: Worksheet, vessels: dict, problems) -> None:
    kept, unknown = {(v.name, c.name): c for v in ws.vessels for c in v.charges}, _unknowns(ws)
    for index, row in _rows(tables, "charges"):
        r = _Reader("charges", index, row, problems)
        vessel, name = r.text("vessel", required=True), r.text("name", required=True)
        old = kept.get((vessel, name))
        charge_address = addr.item("vessels", vessel, addr.item("charges", name))
        charge = {
            "name": name, "material": r.text("material", required=True),
            "mass_fraction": r.fraction("mass fraction"),
            "mass": r.quantity("mass", basis_kinds("amount", ws.basis.kind), old.mass if old else None,
                               required=False, unknown=f"{charge_address}.mass" in unknown),
            "initial": r.state("initial", f"{charge_address}.initial.temperature" in unknown,
                               old.initial if old else None)}
        if vessel in vessels:
            vessels[vessel]["charges"].append(charge)
        elif vessel:
            r.report("vessel", f"no vessel called '{vessel}'; vessels: {', '.join(vessels) or 'none yet'}")


def _equipment(tables, vessels: dict, problems) -> None:
    for index, row in _rows(tables, "equipment"):
        r = _Reader("equipment", index, row, problems)
        vessel = r.text("vessel", required=True)
        equipment = {"material": r.text("material") or None,
                     "mass": r.quantity("mass", ("mass",), required=False),
                     "heat_capacity": r.quantity("heat capacity", ("heat_capacity",), required=False),
                     "initial_temperature": r.quantity("initial temperature", ("temperature",), required=False)}
        by_mass = equipment["material"] is not None or equipment["mass"] is not None
        if by_mass == (equipment["heat_capacity"] is not None) or \
                (by_mass and (equipment["material"] is None or equipment["mass"] is None)):
            r.report(None, "give either a material and a mass, or a heat capacity (e.g. '1600 kJ/K')")
        if vessel in vessels:
            vessels[vessel]["equipment"] = equipment
        elif vessel:
            r.report("vessel", f"no vessel called '{vessel}'; vessels: {', '.join(vessels) or 'none yet'}")


def _duties(tables, ws: Worksheet, problems) -> list[dict]:
    kept, unknown = {d.name: d for d in ws.duties}, _unknowns(ws)
    out = []
    for index, row in _rows(tables, "duties"):
        r = _Reader("duties", index, row, problems)
        name = r.text("name", required=True)
        old = kept.get(name)
        out.append({"name": name, "value": r.quantity("heat", basis_kinds("heat", ws.basis.kind),
                                                      old.value if old else None, required=False,
                                                      unknown=addr.item("duties", name, "value") in unknown)})
    return out


#: the heat cell of a loss computed from its surface (its geometry is edited in the surface-losses panel)
COMPUTED_LOSS = "computed (surface losses panel)"


def _losses(tables, ws: Worksheet, problems) -> list[dict]:
    surfaces = {loss.name: loss.surface for loss in ws.losses if loss.surface is not None}
    out = []
    for index, row in _rows(tables, "losses"):
        r = _Reader("losses", index, row, problems)
        name = r.text("name", required=True)
        if r.text("heat").startswith("computed"):
            if name in surfaces:
                out.append({"name": name, "surface": surfaces[name].model_dump(mode="json", exclude_none=True)})
            else:
                r.report("heat", "a computed loss is set up in the surface losses panel; here, give a heat")
            continue
        out.append({"name": name, "value": r.quantity("heat", basis_kinds("heat", ws.basis.kind))})
    return out


def _is_mass(cell: str) -> bool:
    """True when an amount cell is a mass or mass flow (an equation gives the key reactant's molar mass)."""
    try:
        return parse_quantity(cell, ("mass", "mass_flow"), "amount") is not None
    except HeatBalanceError:
        return False


def _reactions(tables, ws: Worksheet, problems) -> list[dict]:
    out, kept = [], {r.name: r for r in ws.reactions}
    for index, row in _rows(tables, "reactions"):
        r = _Reader("reactions", index, row, problems)
        molar_mass = r.quantity("molar mass", ("molar_mass",), required=False)
        equation = r.text("equation") or None
        by_mass = molar_mass is not None or (equation is not None and _is_mass(r.text("amount")))
        amount_kinds = basis_kinds("amount" if by_mass else "moles", ws.basis.kind)
        out.append({"name": r.text("name", required=True),
                    "enthalpy": r.quantity("heat of reaction", ("molar_energy",), required=equation is None),
                    "equation": equation, "key_reactant": r.text("key reactant") or None,
                    "amount": r.quantity("amount", amount_kinds), "conversion": r.fraction("conversion", 1.0),
                    "molar_mass": molar_mass, "vessel": r.text("vessel") or None,
                    "temperature": getattr(kept.get(r.text("name")), "temperature", None)})  # not a column: kept
    return out


def _shared(tables, ws: Worksheet, problems) -> list[dict]:
    kept, unknown = {c.name: c for c in ws.common_temperatures}, _unknowns(ws)
    out = []
    for index, row in _rows(tables, "shared"):
        r = _Reader("shared", index, row, problems)
        name = r.text("name", required=True)
        old = kept.get(name)
        is_unknown = addr.item("common_temperatures", name, "temperature") in unknown
        out.append({"name": name, "temperature": r.quantity("temperature", ("temperature",),
                                                            old.temperature if old else None, required=False,
                                                            unknown=is_unknown)})
    return out


def _materials(tables, problems) -> list[dict]:
    materials: dict[str, dict] = {}
    for index, row in _rows(tables, "materials"):
        r = _Reader("materials", index, row, problems)
        name = r.text("material", required=True)
        library = r.text("from library") or None  # the phase of a library material: no cp of its own
        phase = {"name": r.text("phase", required=True), "from_library": library,
                 "cp": r.quantity("cp", ("specific_heat",), required=library is None),
                 "cp_per_kelvin": r.number("cp per K", 0.0), "cp_per_kelvin2": r.number("cp per K²", 0.0),
                 "up_to": r.quantity("up to", ("temperature",), required=False),
                 "latent_heat": r.quantity("latent heat", ("specific_energy",), required=False)}
        if phase["name"] and phase["name"] not in ("solid", "liquid", "vapour"):
            r.report("phase", f"'{phase['name']}' is not a phase: solid, liquid or vapour")
        if name not in materials:
            materials[name] = {"name": name, "phases": [],
                               # may be left out: a library phase at that end brings its range
                               "min_temperature": r.quantity("min temperature", ("temperature",), required=False),
                               "max_temperature": r.quantity("max temperature", ("temperature",), required=False),
                               "source": r.text("source", required=True)}
        materials[name]["phases"].append(phase)
    return list(materials.values())


def tables_to_worksheet(tables: dict[str, list[dict]], base: Worksheet) -> tuple[Worksheet | None,
                                                                                  list[CellProblem]]:
    """Read every table back into a worksheet; ``base`` gives the title, basis, unknown and kept values.

    Returns the worksheet, or ``None`` and every problem found (each where it is).
    """
    problems: list[CellProblem] = []
    parts = {"streams": _streams(tables, base, problems), "vessels": _vessels(tables, base, problems),
             "duties": _duties(tables, base, problems), "losses": _losses(tables, base, problems),
             "reactions": _reactions(tables, base, problems),
             "common_temperatures": _shared(tables, base, problems), "materials": _materials(tables, problems)}
    if problems:
        return None, problems
    document = base.model_dump(mode="json", exclude_none=True)
    document.update(_plain(parts))
    try:
        worksheet = parse_worksheet(document)
    except WorksheetFormatError as exc:
        if exc.address and exc.address != "worksheet":  # the refusal's address names its cell
            cell = cell_of(exc.address, base)
            if cell.table in COLUMNS:
                return None, [CellProblem(cell.table, cell.row, cell.column, exc.message)]
        return None, [_format_problem(exc.message)]
    typed = _value_in_unknown(tables, worksheet)
    return (None, [typed]) if typed else (worksheet, [])


def _value_in_unknown(tables: dict[str, list[dict]], ws: Worksheet) -> CellProblem | None:
    """A value typed where the unknown's ``?`` was: kept in its cell and marked, never silently dropped."""
    for unknown in ws.unknowns:
        where = addr.unknown_address(unknown)
        try:
            cell = typed_cell(tables, where, ws)
        except HeatBalanceError:
            continue
        if cell is not None:
            table, row, column = cell
            value = _text(tables[table][row].get(column))
            if value and not value.startswith(UNKNOWN_MARK):
                return CellProblem(table, row, column, typed_into_unknown(value))
    return None


def _plain(value):
    """Quantities and nested parts as plain JSON data, without empty fields."""
    if isinstance(value, Quantity):
        return value.model_dump()
    if isinstance(value, dict):
        return {k: _plain(v) for k, v in value.items() if v is not None}
    if isinstance(value, list):
        return [_plain(v) for v in value]
    return value


_PART_TABLES = {"streams": "streams", "duties": "duties", "losses": "losses", "reactions": "reactions",
                "common_temperatures": "shared", "materials": "materials"}


def _format_problem(message: str) -> CellProblem:
    """Place a worksheet-format message (``streams.1.name: ...``) on its table and row when it can."""
    match = re.match(r"^(\w+)\.(\d+)\.(\w+)", message)
    if match and match.group(1) in _PART_TABLES:
        column = match.group(3).replace("_", " ")
        return CellProblem(_PART_TABLES[match.group(1)], int(match.group(2)), column, message)
    return CellProblem("worksheet", None, None, message)


# --------------------------------------------------------------------------- edits
def apply_edits(rows: list[dict], edits: dict, columns: list[str], derive: bool = True) -> list[dict]:
    """Apply the changes an editable table reports (edited, added and deleted rows) to its rows.

    ``edits`` = ``{"edited_rows": {row: {column: value}}, "added_rows": [{column: value}],
    "deleted_rows": [row]}``, rows numbered as in ``rows`` (the editor reports every edit since its
    data was given, so ``rows`` is that data). ``derive=False`` leaves the derived cells as they were
    (what the browser shows until the grid is redrawn).

    >>> apply_edits([{"name": "A"}], {"edited_rows": {0: {"name": "B"}}, "added_rows": [{"name": "C"}]}, ["name"])
    [{'name': 'B'}, {'name': 'C'}]
    """
    out = [dict(row) for row in rows]
    for index, changes in (edits.get("edited_rows") or {}).items():
        index = int(index)
        if 0 <= index < len(out):
            out[index].update({k: v for k, v in changes.items() if k in columns})
    deleted = {int(i) for i in edits.get("deleted_rows") or []}
    out = [row for i, row in enumerate(out) if i not in deleted]
    for added in edits.get("added_rows") or []:
        out.append({c: added.get(c) for c in columns})
    for row in out if derive else []:
        if "pressure is" in columns:
            row["pressure is"] = pressure_reference(row.get("pressure"))
    return out


def cell_values(rows: list[dict], columns: list[str]) -> list[list]:
    """The cells as an editor holds them: numbers in number columns, text (or None) elsewhere."""
    def cell(column, value):
        if column in NUMBER_COLUMNS:
            return float(value) if isinstance(value, (int, float)) and not _blank(value) else None
        return None if _blank(value) else str(value)
    return [[cell(c, row.get(c)) for c in columns] for row in rows]


def same_rows(a: list[dict], b: list[dict], columns: list[str]) -> bool:
    """True when two versions of a table show the same cells."""
    return cell_values(a, columns) == cell_values(b, columns)


def renamed(before: list[dict], after: list[dict], column: str = "name") -> dict[tuple[str | None, str], str]:
    """Names changed between two versions of a table, (the row's vessel or None, old) -> new (only when no row was
    added or deleted): a charge's name is its vessel's own, two vessels may each have a 'Water'.

    >>> renamed([{"name": "A"}, {"name": "B"}], [{"name": "A"}, {"name": "C"}])
    {(None, 'B'): 'C'}
    """
    if len(before) != len(after):
        return {}
    out = {}
    for old_row, new_row in zip(before, after):
        old, new = _text(old_row.get(column)), _text(new_row.get(column))
        if old and new and old != new:
            out[_text(old_row.get("vessel")) or None, old] = new
    return out


_RENAMED_ITEMS = {"streams": "streams", "vessels": "vessels", "duties": "duties", "losses": "losses",
                  "reactions": "reactions", "shared": "common_temperatures"}


def _item_address(table: str, vessel: str | None, name: str) -> str | None:
    if table in _RENAMED_ITEMS:
        return addr.item(_RENAMED_ITEMS[table], name)
    if table == "charges" and vessel:
        return addr.item("vessels", vessel, addr.item("charges", name))
    return None


def follow_renames(ws: Worksheet, tables: dict[str, list[dict]], table: str,
                   renames: dict[tuple[str | None, str], str]) -> tuple[Worksheet, dict[str, list[dict]]]:
    """Carry renames into the worksheet (its unknown and references, by :func:`heatbalance.address.rename`)
    and into the vessel column of the other tables; a rename the engine refuses is left to the reading."""
    if not renames:
        return ws, tables
    for (vessel, old), new in renames.items():
        where = _item_address(table, vessel, old)
        if where is None:
            continue
        try:
            ws = addr.rename(ws, where, new)
        except HeatBalanceError:
            continue  # e.g. a name already taken: reading the tables reports it on its row
    tables = {name: [dict(row) for row in rows] for name, rows in tables.items()}
    if table == "vessels":
        vessels = {old: new for (_, old), new in renames.items()}
        for name in ("charges", "equipment", "reactions"):
            for row in tables.get(name, []):
                if _text(row.get("vessel")) in vessels:
                    row["vessel"] = vessels[_text(row["vessel"])]
    return ws, tables


# --------------------------------------------------------------------------- address -> cell
#: a field of an address -> the column that shows it
_FIELD_COLUMNS = {
    "flow": "flow", "mass": "mass", "pressure": "pressure", "mass_fraction": "mass fraction",
    "material": "material", "name": "name", "value": "heat", "enthalpy": "heat of reaction",
    "equation": "equation", "key_reactant": "key reactant", "amount": "amount", "conversion": "conversion",
    "molar_mass": "molar mass", "vessel": "vessel", "heat_capacity": "heat capacity",
    "initial_temperature": "initial temperature", "temperature": "temperature", "cp": "cp",
    "cp_per_kelvin": "cp per K", "cp_per_kelvin2": "cp per K²", "up_to": "up to", "latent_heat": "latent heat",
    "min_temperature": "min temperature", "max_temperature": "max temperature", "source": "source",
    "surface": "heat",  # a computed loss's geometry: its heat cell says "computed"
    "air_flow": "flow",  # humid air's volume flow: its flow cell
    "from_library": "from library",
}
_ENDS = ("inlet", "outlet", "initial", "final")


def _index(items, name) -> int | None:
    return next((i for i, x in enumerate(items) if x.name == name), None)


def _column(table: str, fields: list[str]) -> str | None:
    """The column for the fields after the item (``["inlet", "temperature"]`` -> ``inlet``)."""
    if not fields:
        return None
    if fields[0] in _ENDS:
        if len(fields) > 1 and fields[1] == "pressure":
            column = f"{fields[0]} pressure" if table == "streams" else "pressure"
        else:
            column = fields[0]
    else:
        column = _FIELD_COLUMNS.get(fields[-1] if table == "equipment" else fields[0])
    return column if column in COLUMNS.get(table, []) else None


def cell_of(address: str, ws: Worksheet) -> CellProblem:
    """The table, row and column of the page that show the field at ``address`` (an empty message).

    A refusal carries the address of the field at fault; this marks its cell.

    >>> from heatbalance.worksheet import parse_worksheet
    >>> cell_of("duties[Heater].value", parse_worksheet({"duties": [{"name": "Heater"}]}))
    CellProblem(table='duties', row=0, column='heat', message='')
    """
    try:
        steps = addr.parse(address) if address else []
    except HeatBalanceError:
        steps = []
    head = steps[0][0] if steps else ""
    if head == "basis":
        return CellProblem("basis", None, steps[-1][0] if len(steps) > 1 else None, "")
    if head == "unknown" or head == "unknowns":
        return CellProblem("unknown", None, None, "")
    name = steps[0][1] if steps else None
    fields = [f for f, n in steps[1:] if n is None]
    if head == "vessels" and len(steps) > 1 and steps[1][0] == "charges" and steps[1][1] is not None:
        rows = [(v.name, c.name) for v in ws.vessels for c in v.charges]
        row = next((i for i, key in enumerate(rows) if key == (name, steps[1][1])), None)
        return CellProblem("charges", row, _column("charges", [f for f, _ in steps[2:]]), "")
    if head == "vessels" and len(steps) > 1 and steps[1][0] == "equipment":
        rows = [v.name for v in ws.vessels if v.equipment is not None]
        row = rows.index(name) if name in rows else None
        return CellProblem("equipment", row, _column("equipment", [f for f, _ in steps[2:]]), "")
    if head == "materials":
        row, count = None, 0
        for m in ws.materials:
            phase = steps[1][1] if len(steps) > 1 and steps[1][0] == "phases" else None
            for p in m.phases:
                if m.name == name and (phase is None or p.name == phase):
                    row = count if row is None else row
                count += 1
        return CellProblem("materials", row, _column("materials", [f for f, _ in steps[1:] if f != "phases"]), "")
    tables = {"streams": ("streams", ws.streams), "vessels": ("vessels", ws.vessels),
              "duties": ("duties", ws.duties), "losses": ("losses", ws.losses),
              "reactions": ("reactions", ws.reactions), "common_temperatures": ("shared", ws.common_temperatures)}
    if head in tables:
        table, items = tables[head]
        if head == "vessels" and fields[:1] == ["screening"]:
            return CellProblem("vessels", _index(items, name), None, "")
        return CellProblem(table, _index(items, name), _column(table, fields), "")
    return CellProblem("worksheet", None, None, "")


def typed_cell(tables: dict[str, list[dict]], address: str, ws: Worksheet) -> tuple[str, int, str] | None:
    """The (table, row, column) of the typed rows that hold the field at ``address`` of ``ws``, found by
    the item's name (typed rows may hold rows the worksheet does not have yet); None when not there.

    >>> from heatbalance.worksheet import parse_worksheet
    >>> typed_cell({"duties": [{}, {"name": "Heater"}]}, "duties[Heater].value",
    ...            parse_worksheet({"duties": [{"name": "Heater"}]}))
    ('duties', 1, 'heat')
    """
    cell = cell_of(address, ws)
    if cell.table not in COLUMNS or cell.column is None:
        return None
    steps = addr.parse(address)
    wanted = {"name": steps[0][1]}
    if cell.table == "charges":
        wanted = {"vessel": steps[0][1], "name": steps[1][1]}
    for index, row in enumerate(tables.get(cell.table) or []):
        if all(_text(row.get(k)) == v for k, v in wanted.items()):
            return cell.table, index, cell.column
    return None


def empty_worksheet() -> Worksheet:
    """A new worksheet with nothing in it yet."""
    return Worksheet(title="New worksheet")
