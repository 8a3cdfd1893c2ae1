"""The worksheet as editable tables and back: pure functions for the page (no user-interface import).

Each table is a list of row dicts. Quantity cells hold text as an engineer writes it
(``"12 t/h"``, ``"4 barg"``, ``"55 °C"``); a state cell holds a temperature, ``"saturated vapour"``,
``"vapour fraction 0.3"``, ``"solid fraction 0.5"`` or ``"shared: Mix"``. The unknown's cell shows
``"?"``. A flow, mass, duty or state may be left empty: the table reads, and the engine then asks for
that value unless it is picked as the unknown (so a new line's unknown can be picked). Reading the tables back checks every cell and reports each bad one where it is
(:class:`CellProblem`: table, row, column, message) so the page can mark it and keep the rest.
"""
from __future__ import annotations

import math
import re
from dataclasses import dataclass

from .errors import HeatBalanceError, InputError, WorksheetFormatError
from .materials import catalogue
from .units import KINDS, check_unit, kind_of
from .worksheet import QUANTITY_TEXT, Quantity, State, Unknown, Worksheet, parse_worksheet

__all__ = [
    "TABLES", "TABLE_TITLES", "COLUMNS", "CellProblem", "worksheet_to_tables", "tables_to_worksheet",
    "apply_edits", "renamed", "follow_renames", "set_unknown", "unknown_label", "locate", "material_names", "pressure_reference",
    "format_quantity", "parse_quantity", "format_state", "parse_state", "empty_worksheet",
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
    "materials": ["material", "phase", "cp", "cp per K", "cp per K²", "up to", "latent heat",
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
NUMBER_COLUMNS = frozenset({"mass fraction", "conversion", "cp per K", "cp per K²"})  # plain-number cells
_GAUGE_UNITS = ("barg", "psig", "kPag", "MPag")
_PRETTY_UNITS = {"degC": "°C", "degF": "°F", "degR": "°R"}
_STORED_UNITS = {pretty: unit for unit, pretty in _PRETTY_UNITS.items()}
_FRACTION_TEXT = re.compile(r"^(vapou?r|solid)(?:\s+(?:fraction|quality))?\s*[:=]?\s*([-+]?[\d.]+)\s*(%?)$")


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
    """A cell that cannot be read; ``where`` is its column."""

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
    return f"{_number_text(q.value)} {_PRETTY_UNITS.get(q.unit, q.unit)}".strip()


def parse_quantity(text: str, kinds: tuple[str, ...], column: str) -> Quantity:
    """Read ``"12 t/h"`` and check that the unit measures one of ``kinds``.

    >>> parse_quantity("12 t/h", ("mass_flow",), "flow")
    Quantity(value=12.0, unit='t/h')
    """
    match = QUANTITY_TEXT.match(text.replace("−", "-"))
    if not match:
        raise _CellError(column, f"'{text}' is not a number followed by a unit (e.g. {_example(kinds)})")
    value, unit = float(match.group(1)), match.group(2)
    if not unit:
        raise _CellError(column, f"'{text}' has no unit: write it with one, e.g. {_example(kinds)}")
    try:
        check_unit(unit, kinds[0], column) if len(kinds) == 1 else kind_of(unit, kinds, column)
    except HeatBalanceError as exc:
        raise _CellError(column, exc.message) from None
    return Quantity(value=value, unit=_STORED_UNITS.get(unit, unit))


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
        return {_fraction_field(match.group(1)): _fraction(match.group(2), match.group(3), column)}
    return {"temperature": parse_quantity(text, ("temperature",), column)}


def _fraction_field(phase: str) -> str:
    return "solid_fraction" if phase == "solid" else "vapour_fraction"


def _fraction(number: str, percent: str, column: str) -> float:
    try:
        value = float(number) / (100.0 if percent else 1.0)
    except ValueError:
        raise _CellError(column, f"'{number}' is not a number") from None
    if not 0.0 <= value <= 1.0:
        raise _CellError(column, f"a phase fraction lies between 0 and 1 (or 0 % and 100 %), not {number}{percent}")
    return value


def pressure_reference(text) -> str:
    """``gauge`` or ``absolute`` for a pressure cell (empty if unreadable).

    >>> pressure_reference("4 barg"), pressure_reference("2.1 bar")
    ('gauge', 'absolute')
    """
    match = QUANTITY_TEXT.match(_text(text))
    if not match or not match.group(2):
        return ""
    unit = match.group(2)
    if unit in _GAUGE_UNITS:
        return "gauge"
    try:
        kind_of(unit, ("pressure",))
    except HeatBalanceError:
        return ""
    return "absolute"


def material_names(ws: Worksheet) -> list[str]:
    """Every material a line can use: those defined in the worksheet first, then the catalogue."""
    own = [m.name for m in ws.materials]
    return own + [m.name for m in catalogue() if m.name not in own]


# --------------------------------------------------------------------------- worksheet -> tables
def _is_unknown_amount(ws: Worksheet, line: str, charge: str | None = None) -> bool:
    return any(u.kind == "amount" and u.line == line and u.charge == charge for u in ws.unknowns)


def _is_unknown_temperature(ws: Worksheet, line: str | None, end: str | None, charge: str | None = None,
                            common: str | None = None) -> bool:
    for u in ws.unknowns:
        if u.kind != "temperature":
            continue
        if common is not None and u.common == common:
            return True
        if common is None and u.common is None and u.line == line and u.charge == charge and \
                (u.end == end or (charge is not None and u.end in (None, "initial"))):
            return True
    return False


def _unknown_cell(q: Quantity | None) -> str:
    unit = _PRETTY_UNITS.get(q.unit, q.unit) if q is not None else ""
    return f"{UNKNOWN_MARK} {unit}".strip()


def _state_cell(ws: Worksheet, state: State, unknown: bool) -> str:
    return _unknown_cell(state.temperature) if unknown else format_state(state)


def worksheet_to_tables(ws: Worksheet) -> dict[str, list[dict]]:
    """Every table of a worksheet, as rows of cells; the unknown's cell shows ``?``."""
    tables: dict[str, list[dict]] = {name: [] for name in TABLES}
    for s in ws.streams:
        pressure = format_quantity(s.pressure)
        tables["streams"].append({
            "name": s.name, "material": s.material, "mass fraction": s.mass_fraction,
            "flow": _unknown_cell(s.flow) if _is_unknown_amount(ws, s.name) else format_quantity(s.flow),
            "pressure": pressure, "pressure is": pressure_reference(pressure),
            "inlet": _state_cell(ws, s.inlet, _is_unknown_temperature(ws, s.name, "inlet")),
            "inlet pressure": format_quantity(s.inlet.pressure),
            "outlet": _state_cell(ws, s.outlet, _is_unknown_temperature(ws, s.name, "outlet")),
            "outlet pressure": format_quantity(s.outlet.pressure),
        })
    for v in ws.vessels:
        pressure = format_quantity(v.pressure)
        tables["vessels"].append({
            "name": v.name, "pressure": pressure, "pressure is": pressure_reference(pressure),
            "final": _state_cell(ws, v.final, _is_unknown_temperature(ws, v.name, "final"))})
        for c in v.charges:
            tables["charges"].append({
                "vessel": v.name, "name": c.name, "material": c.material, "mass fraction": c.mass_fraction,
                "mass": _unknown_cell(c.mass) if _is_unknown_amount(ws, v.name, c.name) else format_quantity(c.mass),
                "initial": _state_cell(ws, c.initial, _is_unknown_temperature(ws, v.name, "initial", c.name))})
        if v.equipment is not None:
            e = v.equipment
            tables["equipment"].append({
                "vessel": v.name, "material": e.material, "mass": format_quantity(e.mass),
                "heat capacity": format_quantity(e.heat_capacity),
                "initial temperature": format_quantity(e.initial_temperature)})
    for d in ws.duties:
        unknown = any(u.kind == "duty" and u.term == d.name for u in ws.unknowns)
        tables["duties"].append({"name": d.name,
                                 "heat": _unknown_cell(d.value) if unknown else format_quantity(d.value)})
    for loss in ws.losses:
        tables["losses"].append({"name": loss.name, "heat": format_quantity(loss.value)})
    for r in ws.reactions:
        tables["reactions"].append({
            "name": r.name, "heat of reaction": format_quantity(r.enthalpy), "equation": r.equation,
            "key reactant": r.key_reactant, "amount": format_quantity(r.amount), "conversion": r.conversion, "molar mass": format_quantity(r.molar_mass), "vessel": r.vessel})
    for c in ws.common_temperatures:
        unknown = _is_unknown_temperature(ws, None, None, common=c.name)
        tables["shared"].append({"name": c.name, "temperature": _unknown_cell(c.temperature) if unknown
                                 else format_quantity(c.temperature)})
    for m in ws.materials:
        for p in m.phases:
            tables["materials"].append({
                "material": m.name, "phase": p.name, "cp": format_quantity(p.cp), "cp per K": p.cp_per_kelvin,
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

    def number(self, column: str, default: float | None = None) -> float | None:
        cell = self.row.get(column)
        if _blank(cell):
            return default
        try:
            return float(cell)
        except (TypeError, ValueError):
            self.report(column, f"'{cell}' is not a number")
            return None


def _row_is_blank(row: dict) -> bool:
    return all(_blank(row.get(c)) for c in row if c not in DERIVED)


def _rows(tables: dict, name: str):
    for index, row in enumerate(tables.get(name) or []):
        if not _row_is_blank(row):
            yield index, row


def _amount_kinds(basis: str) -> tuple[str, ...]:
    return ("mass_flow",) if basis == "continuous" else ("mass", "mass_flow")


def _heat_kinds(basis: str) -> tuple[str, ...]:
    return ("power",) if basis == "continuous" else ("energy", "power")


def _with_pressure(state: dict | None, pressure: Quantity | None) -> dict | None:
    if state is None:
        return None
    return {**state, "pressure": pressure} if pressure is not None else state


def _streams(tables, ws: Worksheet, problems) -> list[dict]:
    out, kept = [], {s.name: s for s in ws.streams}
    for index, row in _rows(tables, "streams"):
        r = _Reader("streams", index, row, problems)
        name = r.text("name", required=True)
        old = kept.get(name)
        out.append({
            "name": name, "material": r.text("material", required=True),
            "mass_fraction": r.number("mass fraction"),
            "flow": r.quantity("flow", _amount_kinds(ws.basis.kind), old.flow if old else None, required=False,
                               unknown=_is_unknown_amount(ws, name)),
            "pressure": r.quantity("pressure", ("pressure",), required=False) or Quantity(value=0, unit="barg"),
            "inlet": _with_pressure(r.state("inlet", _is_unknown_temperature(ws, name, "inlet"),
                                            old.inlet if old else None),
                                    r.quantity("inlet pressure", ("pressure",), required=False)),
            "outlet": _with_pressure(r.state("outlet", _is_unknown_temperature(ws, name, "outlet"),
                                             old.outlet if old else None),
                                     r.quantity("outlet pressure", ("pressure",), required=False)),
        })
    return out


def _vessels(tables, ws: Worksheet, problems) -> list[dict]:
    kept = {v.name: v for v in ws.vessels}
    vessels = []
    for index, row in _rows(tables, "vessels"):
        r = _Reader("vessels", index, row, problems)
        name = r.text("name", required=True)
        old = kept.get(name)
        vessels.append({
            "name": name,
            "pressure": r.quantity("pressure", ("pressure",), required=False) or Quantity(value=0, unit="barg"),
            "final": r.state("final", _is_unknown_temperature(ws, name, "final"), old.final if old else None),
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
    kept = {(v.name, c.name): c for v in ws.vessels for c in v.charges}
    for index, row in _rows(tables, "charges"):
        r = _Reader("charges", index, row, problems)
        vessel, name = r.text("vessel", required=True), r.text("name", required=True)
        old = kept.get((vessel, name))
        charge = {
            "name": name, "material": r.text("material", required=True),
            "mass_fraction": r.number("mass fraction"),
            "mass": r.quantity("mass", _amount_kinds(ws.basis.kind), old.mass if old else None, required=False,
                               unknown=_is_unknown_amount(ws, vessel, name)),
            "initial": r.state("initial", _is_unknown_temperature(ws, vessel, "initial", name),
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
    kept = {d.name: d for d in ws.duties}
    out = []
    for index, row in _rows(tables, "duties"):
        r = _Reader("duties", index, row, problems)
        name = r.text("name", required=True)
        unknown = any(u.kind == "duty" and u.term == name for u in ws.unknowns)
        old = kept.get(name)
        out.append({"name": name, "value": r.quantity("heat", _heat_kinds(ws.basis.kind),
                                                      old.value if old else None, required=False,
                                                      unknown=unknown)})
    return out


def _losses(tables, ws: Worksheet, problems) -> list[dict]:
    out = []
    for index, row in _rows(tables, "losses"):
        r = _Reader("losses", index, row, problems)
        out.append({"name": r.text("name", required=True),
                    "value": r.quantity("heat", _heat_kinds(ws.basis.kind))})
    return out


def _is_mass(cell: str) -> bool:
    """True when an amount cell is a mass or mass flow (an equation gives the key reactant's molar mass)."""
    try:
        return parse_quantity(cell, ("mass", "mass_flow"), "amount") is not None
    except (_CellError, HeatBalanceError):
        return False


def _reactions(tables, ws: Worksheet, problems) -> list[dict]:
    out = []
    for index, row in _rows(tables, "reactions"):
        r = _Reader("reactions", index, row, problems)
        molar_mass = r.quantity("molar mass", ("molar_mass",), required=False)
        equation = r.text("equation") or None
        by_mass = molar_mass is not None or (equation is not None and _is_mass(r.text("amount")))
        amount_kinds = ("mass", "mass_flow") if by_mass else ("amount", "molar_flow")
        if ws.basis.kind == "continuous":
            amount_kinds = amount_kinds[1:]
        out.append({"name": r.text("name", required=True),
                    "enthalpy": r.quantity("heat of reaction", ("molar_energy",), required=equation is None),
                    "equation": equation, "key_reactant": r.text("key reactant") or None,
                    "amount": r.quantity("amount", amount_kinds), "conversion": r.number("conversion", 1.0),
                    "molar_mass": molar_mass, "vessel": r.text("vessel") or None})
    return out


def _shared(tables, ws: Worksheet, problems) -> list[dict]:
    kept = {c.name: c for c in ws.common_temperatures}
    out = []
    for index, row in _rows(tables, "shared"):
        r = _Reader("shared", index, row, problems)
        name = r.text("name", required=True)
        old = kept.get(name)
        unknown = _is_unknown_temperature(ws, None, None, common=name)
        out.append({"name": name, "temperature": r.quantity("temperature", ("temperature",),
                                                            old.temperature if old else None, required=False,
                                                            unknown=unknown)})
    return out


def _materials(tables, problems) -> list[dict]:
    materials: dict[str, dict] = {}
    for index, row in _rows(tables, "materials"):
        r = _Reader("materials", index, row, problems)
        name = r.text("material", required=True)
        phase = {"name": r.text("phase", required=True), "cp": r.quantity("cp", ("specific_heat",)),
                 "cp_per_kelvin": r.number("cp per K", 0.0), "cp_per_kelvin2": r.number("cp per K²", 0.0),
                 "up_to": r.quantity("up to", ("temperature",), required=False),
                 "latent_heat": r.quantity("latent heat", ("specific_energy",), required=False)}
        if phase["name"] and phase["name"] not in ("solid", "liquid", "vapour"):
            r.report("phase", f"'{phase['name']}' is not a phase: solid, liquid or vapour")
        if name not in materials:
            materials[name] = {"name": name, "phases": [],
                               "min_temperature": r.quantity("min temperature", ("temperature",)),
                               "max_temperature": r.quantity("max temperature", ("temperature",)),
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
        return parse_worksheet(document), []
    except WorksheetFormatError as exc:
        return None, [_format_problem(exc.message)]


def _plain(value):
    """Quantities and nested parts as plain JSON data, without empty fields."""
    if isinstance(value, Quantity):
        return value.model_dump()
    if isinstance(value, dict):
        return {k: _plain(v) for k, v in value.items() if v is not None}
    if isinstance(value, list):
        return [_plain(v) for v in value]
    return value


_PART_TABLES = {"streams": "streams", "vessels": "vessels", "duties": "duties", "losses": "losses",
                "reactions": "reactions", "common_temperatures": "shared", "materials": "materials"}


def _format_problem(message: str) -> CellProblem:
    """Place a worksheet-format message (``streams.1.name: ...``) on its table and row when it can."""
    match = re.match(r"^(\w+)\.(\d+)\.(\w+)", message)
    if match and match.group(1) in _PART_TABLES and match.group(1) != "vessels":
        column = match.group(3).replace("_", " ")
        return CellProblem(_PART_TABLES[match.group(1)], int(match.group(2)), column, message)
    return CellProblem("worksheet", None, None, message)


# --------------------------------------------------------------------------- edits
def apply_edits(rows: list[dict], edits: dict, columns: list[str]) -> list[dict]:
    """Apply the changes an editable table reports (edited, added and deleted rows) to its rows.

    ``edits`` = ``{"edited_rows": {row: {column: value}}, "added_rows": [{column: value}],
    "deleted_rows": [row]}``, rows numbered as in ``rows``.

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
    for row in out:
        if "pressure is" in columns:
            row["pressure is"] = pressure_reference(row.get("pressure"))
    return out


def renamed(rows: list[dict], edits: dict, column: str = "name") -> dict[str, str]:
    """Names changed by an edit, old -> new (rows numbered as before the edit).

    >>> renamed([{"name": "A"}, {"name": "B"}], {"edited_rows": {1: {"name": "C"}}})
    {'B': 'C'}
    """
    out = {}
    for index, changes in (edits.get("edited_rows") or {}).items():
        index = int(index)
        if column in changes and 0 <= index < len(rows):
            old, new = _text(rows[index].get(column)), _text(changes[column])
            if old and new and old != new:
                out[old] = new
    return out


def follow_renames(ws: Worksheet, tables: dict[str, list[dict]], table: str,
                   renames: dict[str, str]) -> tuple[Worksheet, dict[str, list[dict]]]:
    """Keep the unknown and the references to a renamed line, vessel, charge or heat term."""
    if not renames:
        return ws, tables
    unknowns = []
    for u in ws.unknowns:
        data = u.model_dump()
        if table in ("streams", "vessels") and u.line in renames:
            data["line"] = renames[u.line]
        elif table == "charges" and u.charge in renames:
            data["charge"] = renames[u.charge]
        elif table == "duties" and u.term in renames:
            data["term"] = renames[u.term]
        elif table == "shared" and u.common in renames:
            data["common"] = renames[u.common]
        unknowns.append(data)
    tables = {name: [dict(row) for row in rows] for name, rows in tables.items()}
    if table == "vessels":
        for name in ("charges", "equipment", "reactions"):
            for row in tables.get(name, []):
                if _text(row.get("vessel")) in renames:
                    row["vessel"] = renames[_text(row["vessel"])]
    data = ws.model_dump(mode="json", exclude_none=True)
    data["unknowns"] = [{k: v for k, v in u.items() if v is not None} for u in unknowns]
    return parse_worksheet(data), tables


# --------------------------------------------------------------------------- the unknown
def unknown_label(ws: Worksheet, choices: list[tuple[str, Unknown]]) -> str | None:
    """The label of the worksheet's one unknown among ``choices`` (None if not exactly one matches)."""
    if len(ws.unknowns) != 1:
        return None
    target = _key(ws.unknowns[0])
    return next((label for label, u in choices if _key(u) == target), None)


def _key(u: Unknown) -> tuple:
    end = u.end if u.kind == "temperature" and u.charge is None else None
    return (u.kind, u.line, u.charge, end, u.term, u.common)


def set_unknown(ws: Worksheet, new: Unknown, answer=None) -> Worksheet:
    """Make ``new`` the one unknown; the old unknown takes the last answer (if any) as its value.

    ``answer`` is the :class:`~heatbalance.results.Answer` of the last solve of ``ws``.
    """
    data = ws.model_dump(mode="json", exclude_none=True)
    if answer is not None and len(ws.unknowns) == 1:
        _fill(data, ws.unknowns[0], answer)
    data["unknowns"] = [new.model_dump(exclude_none=True)]
    return parse_worksheet(data)


def _answer_quantity(answer) -> dict:
    return {"value": float(f"{answer.value:.6g}"), "unit": answer.unit}


def _answer_state(answer, old: dict) -> dict:
    state = {"pressure": old["pressure"]} if "pressure" in old else {}
    if answer.phase_fraction is not None and answer.plateau == "boiling":
        state["vapour_fraction"] = round(answer.phase_fraction, 6)
    elif answer.phase_fraction is not None:
        state["solid_fraction"] = round(1.0 - answer.phase_fraction, 6)
    else:
        state["temperature"] = _answer_quantity(answer)
    return state


def _fill(data: dict, old: Unknown, answer) -> None:
    """Write the answer into the field the old unknown names (JSON data, in place)."""
    streams = {s["name"]: s for s in data.get("streams", [])}
    vessels = {v["name"]: v for v in data.get("vessels", [])}
    if old.kind == "duty":
        for d in data.get("duties", []):
            if d["name"] == old.term:
                d["value"] = _answer_quantity(answer)
    elif old.kind == "amount" and old.charge is None and old.line in streams:
        streams[old.line]["flow"] = _answer_quantity(answer)
    elif old.kind == "amount" and old.line in vessels:
        for c in vessels[old.line]["charges"]:
            if c["name"] == old.charge:
                c["mass"] = _answer_quantity(answer)
    elif old.kind == "temperature" and old.common is not None:
        for c in data.get("common_temperatures", []):
            if c["name"] == old.common:
                c["temperature"] = _answer_quantity(answer)
    elif old.kind == "temperature" and old.charge is not None and old.line in vessels:
        for c in vessels[old.line]["charges"]:
            if c["name"] == old.charge:
                c["initial"] = _answer_state(answer, c["initial"])
    elif old.kind == "temperature" and old.line in streams and old.end in ("inlet", "outlet"):
        streams[old.line][old.end] = _answer_state(answer, streams[old.line][old.end])
    elif old.kind == "temperature" and old.line in vessels:
        vessels[old.line]["final"] = _answer_state(answer, vessels[old.line]["final"])


# --------------------------------------------------------------------------- where -> table
_COLUMN_WORDS = (("inlet pressure", "inlet pressure"), ("outlet pressure", "outlet pressure"),
                 ("equipment", None), ("pressure", "pressure"), ("flow", "flow"), ("mass", "mass"),
                 ("inlet", "inlet"), ("outlet", "outlet"), ("final", "final"), ("initial", "initial"),
                 ("heat of reaction", "heat of reaction"), ("molar mass", "molar mass"), ("amount", "amount"))


def locate(where: str, ws: Worksheet) -> CellProblem:
    """Place an engine message's ``where`` on a table, row and column of the page (an empty message).

    >>> from heatbalance.worksheet import parse_worksheet
    >>> ws = parse_worksheet({"duties": [{"name": "Heater"}]})
    >>> locate("duty Heater", ws)
    CellProblem(table='duties', row=0, column='heat', message='')
    """
    candidates: list[tuple[str, str, int, str | None]] = []  # (prefix, table, row, column)
    for i, s in enumerate(ws.streams):
        candidates += [(f"stream {s.name}", "streams", i, None), (f"{s.name} flow", "streams", i, "flow")]
    charge_row = 0
    for i, v in enumerate(ws.vessels):
        candidates.append((f"vessel {v.name}", "vessels", i, None))
        for c in v.charges:
            candidates += [(f"vessel {v.name}, charge {c.name}", "charges", charge_row, None),
                           (f"{v.name} / {c.name}", "charges", charge_row, None)]
            charge_row += 1
    equipment = [v for v in ws.vessels if v.equipment is not None]
    candidates += [(f"vessel {v.name} equipment", "equipment", i, None) for i, v in enumerate(equipment)]
    for word, table, terms, column in (("duty", "duties", ws.duties, "heat"), ("loss", "losses", ws.losses, "heat"),
                                       ("reaction", "reactions", ws.reactions, None)):
        candidates += [(f"{word} {t.name}", table, i, column) for i, t in enumerate(terms)]
    candidates += [(f"common temperature '{c.name}'", "shared", i, "temperature")
                   for i, c in enumerate(ws.common_temperatures)]
    candidates += [(f"material {m.name}", "materials", _material_row(ws, m.name), None) for m in ws.materials]
    matches = [c for c in candidates if where == c[0] or where.startswith(c[0] + " ") or
               where.startswith(c[0] + ",")]
    if not matches:
        table = "basis" if where.startswith("basis") else "unknown" if where == "unknown" else "worksheet"
        return CellProblem(table, None, None, "")
    prefix, table, row, column = max(matches, key=lambda c: len(c[0]))
    return CellProblem(table, row, column or _column_of(where[len(prefix):], table), "")


def _material_row(ws: Worksheet, name: str) -> int:
    row = 0
    for m in ws.materials:
        if m.name == name:
            return row
        row += len(m.phases)
    return row


def _column_of(rest: str, table: str) -> str | None:
    rest = rest.lower()
    for word, column in _COLUMN_WORDS:
        if word in rest and column in COLUMNS.get(table, []):
            return column
    return None


def empty_worksheet() -> Worksheet:
    """A new worksheet with nothing in it yet."""
    return Worksheet(title="New worksheet")
