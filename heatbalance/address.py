"""Addresses: a stable, readable name for every input and every possible unknown of a worksheet.

An address is a path through the worksheet by names, the JSON keys joined with dots and
list items picked by their name in brackets::

    basis.duration
    streams[Steam].flow
    streams[Steam].inlet.temperature          streams[Steam].outlet.vapour_fraction
    vessels[Reactor].charges[Water].mass      vessels[Reactor].final.temperature
    vessels[Reactor].equipment.heat_capacity  vessels[Reactor].screening.jacket.UA
    duties[Heater].value    losses[Shell].value    reactions[Hydration].conversion
    common_temperatures[Mix].temperature      materials[oil].phases[liquid].cp

A name holding ``]`` or ``\\`` writes it as ``\\]`` or ``\\\\``. Addresses name items by
name, not position, so they survive a save and a reload, and a reordering; a rename made
through :func:`rename` carries the references (unknown, a reaction's vessel, shared
temperatures) with it, and :func:`follow_rename` moves an address kept elsewhere.

The unknown is named by the address of the field it stands for (``streams[Steam].flow``);
:func:`unknown_address` and :func:`unknown_at` go back and forth.

Refusals carry the address of the field at fault in ``HeatBalanceError.where``.
"""
from __future__ import annotations

import re
from dataclasses import dataclass
from functools import lru_cache

from .errors import AddressError, HeatBalanceError, InputError
from .humid_air import HUMIDITY_FORMS
from .units import basis_kinds, check_unit, from_si, kind_of
from .worksheet import Quantity, Unknown, Worksheet, item_address, parse_worksheet

__all__ = ["Input", "item", "parse", "inputs", "get", "with_value", "unknown_address", "unknown_at",
           "unknown_choices", "with_unknown", "answer_value", "storage_unit", "rename", "follow_rename", "kinds_of", "label", "FRACTION"]

FRACTION = "fraction"  # the kind of a plain number between 0 and 1
_COLLECTIONS = {"streams", "vessels", "charges", "duties", "losses", "reactions", "common_temperatures",
                "materials", "phases", "exchangers", "utilities", "freezing_materials", "mixings"}
_STATE_ENDS = ("inlet", "outlet", "initial", "final")
_STEP = re.compile(r"(\w+)(?:\[((?:[^\]\\]|\\.)*)\])?")


@dataclass(frozen=True)
class Input:
    """One addressable input: its address, the kinds of quantity it takes, and its value as typed."""

    address: str
    kinds: tuple[str, ...]  # keys of units.KINDS, or FRACTION
    value: Quantity | float | None
    is_unknown: bool = False

    @property
    def unit(self) -> str | None:
        return self.value.unit if isinstance(self.value, Quantity) else None


# --------------------------------------------------------------------------- syntax
def item(collection: str, name: str, *rest: str) -> str:
    """The address of a named item, and of fields under it: ``item("streams", "Steam", "flow")``.

    >>> item("vessels", "R-1", item("charges", "Water [dry]", "mass"))
    'vessels[R-1].charges[Water [dry\\\\]].mass'
    """
    return item_address(collection, name, *rest)


def parse(address: str) -> list[tuple[str, str | None]]:
    """An address as steps ``(field, name or None)``; refuses text that is not an address.

    >>> parse("vessels[Reactor].charges[Water].mass")
    [('vessels', 'Reactor'), ('charges', 'Water'), ('mass', None)]
    """
    return list(_parse(address))


@lru_cache(maxsize=4096)
def _parse(address: str) -> tuple[tuple[str, str | None], ...]:
    steps, pos = [], 0
    text = address.strip()
    while pos < len(text):
        match = _STEP.match(text, pos)
        if not match or match.end() == pos:
            raise AddressError(f"'{address}' is not an address (e.g. streams[Steam].flow)", "address")
        name = match.group(2)
        steps.append((match.group(1), None if name is None else re.sub(r"\\(.)", r"\1", name)))
        pos = match.end()
        if pos < len(text):
            if text[pos] != ".":
                raise AddressError(f"'{address}' is not an address: '.' expected at character {pos + 1}",
                                   "address")
            pos += 1
    if not steps:
        raise AddressError("an empty address names nothing", "address")
    return tuple(steps)


def _pattern(steps: list[tuple[str, str | None]]) -> str:
    """The address with names left out: ``streams[].inlet.temperature``."""
    return ".".join(f"{f}[]" if n is not None else f for f, n in steps)


def label(address: str) -> str:
    """The address in words, for headings: ``streams[Steam].inlet.temperature`` -> ``Steam inlet temperature``.

    >>> label("vessels[R-1].charges[Water].mass"), label("duties[Heater].value")
    ('R-1 / Water mass', 'duty Heater')
    """
    steps = parse(address)
    names = " / ".join(n for _, n in steps if n is not None)
    fields = [f for f, n in steps if n is None]
    if steps[0][0] == "duties" and fields == ["value"]:
        return f"duty {names}"
    if steps[0][0] == "losses" and fields == ["value"]:
        return f"loss {names}"
    if steps[0][0] == "common_temperatures":
        return f"shared temperature {names}"
    words = " ".join(f.replace("_", " ") for f in fields)
    return f"{names} {words}".strip()


# --------------------------------------------------------------------------- kinds
_FIXED_KINDS: dict[str, tuple[str, ...]] = {
    "basis.duration": ("duration",),
    "streams[].pressure": ("pressure",),
    "streams[].mass_fraction": (FRACTION,),
    "vessels[].pressure": ("pressure",),
    "vessels[].charges[].mass_fraction": (FRACTION,),
    "vessels[].equipment.mass": ("mass",),
    "vessels[].equipment.heat_capacity": ("heat_capacity",),
    "vessels[].equipment.initial_temperature": ("temperature",),
    "vessels[].screening.accumulation": (FRACTION,),
    "vessels[].screening.T_D24": ("temperature",),
    "vessels[].screening.MTT": ("temperature",),
    "vessels[].screening.process_temperature": ("temperature",),
    "vessels[].screening.jacket.utility_temperature": ("temperature",),
    "vessels[].screening.jacket.target_temperature": ("temperature",),
    "vessels[].screening.jacket.start_temperature": ("temperature",),
    "vessels[].screening.jacket.UA": ("thermal_conductance",),
    "vessels[].screening.jacket.U": ("heat_transfer_coefficient",),
    "vessels[].screening.jacket.area": ("area",),
    "reactions[].enthalpy": ("molar_energy",),
    "reactions[].conversion": (FRACTION,),
    "reactions[].molar_mass": ("molar_mass",),
    "mixings[].from_fraction": (FRACTION,),
    "mixings[].with_fraction": (FRACTION,),
    "mixings[].to_fraction": (FRACTION,),
    "reactions[].temperature": ("temperature",),
    "common_temperatures[].temperature": ("temperature",),
    "materials[].min_temperature": ("temperature",),
    "materials[].max_temperature": ("temperature",),
    "materials[].phases[].cp": ("specific_heat",),
    "materials[].phases[].up_to": ("temperature",),
    "materials[].phases[].latent_heat": ("specific_energy",),
    "freezing_materials[].initial_freezing_point": ("temperature",),
    "exchangers[].minimum_approach": ("temperature_difference",),
    "exchangers[].U": ("heat_transfer_coefficient",),
    "exchangers[].area": ("area",),
    "exchangers[].UA": ("thermal_conductance",),
    "utilities[].pressure": ("pressure",),
    "utilities[].superheat": ("temperature_difference",),
    "utilities[].condensate_temperature": ("temperature",),
    "utilities[].supply_temperature": ("temperature",),
    "utilities[].return_limit": ("temperature",),
    "utilities[].flash_pressure": ("pressure",),
    "utilities[].mass_fraction": (FRACTION,),
    "operating_hours": ("duration",),
    "streams[].inlet.humidity.relative_humidity": (FRACTION,),
    "streams[].inlet.humidity.humidity_ratio": (FRACTION,),
    "streams[].inlet.humidity.dew_point": ("temperature",),
    "streams[].inlet.humidity.wet_bulb": ("temperature",),
    "streams[].air_flow.volume_flow": ("volume_flow",),
    "streams[].air_flow.volume_temperature": ("temperature",),
    "losses[].surface.diameter": ("length",),
    "losses[].surface.length": ("length",),
    "losses[].surface.emissivity": (FRACTION,),
    "losses[].surface.insulation.thickness": ("length",),
    "losses[].surface.ambient_temperature": ("temperature",),
    "losses[].surface.surroundings_temperature": ("temperature",),
    "losses[].surface.wind_speed": ("velocity",),
    "losses[].surface.process_temperature": ("temperature",),
    "losses[].surface.protection_limit": ("temperature",),
    "atmosphere.barometric_pressure": ("pressure",),
    "atmosphere.altitude": ("length",),
}
#: the numeric fields of a computed loss's surface (``losses[L].surface.<field>``)
SURFACE_FIELDS = ("diameter", "length", "emissivity", "ambient_temperature", "surroundings_temperature",
                  "wind_speed", "process_temperature", "protection_limit")
_STATE_KINDS = {"temperature": ("temperature",), "pressure": ("pressure",), "vapour_fraction": (FRACTION,),
                "solid_fraction": (FRACTION,)}


def kinds_of(address: str, basis: str = "continuous") -> tuple[str, ...]:
    """The kinds of quantity a field takes on a basis (the first is the one a total is in).

    >>> kinds_of("streams[Steam].flow"), kinds_of("duties[Heater].value", "batch")
    (('mass_flow',), ('energy', 'power'))
    """
    pattern = _pattern(parse(address))
    if pattern in _FIXED_KINDS:
        return _FIXED_KINDS[pattern]
    if pattern in ("streams[].flow", "vessels[].charges[].mass", "mixings[].amount"):
        return basis_kinds("amount", basis)
    if pattern in ("duties[].value", "losses[].value"):
        return basis_kinds("heat", basis)
    if pattern == "reactions[].amount":
        return basis_kinds("moles", basis) + basis_kinds("amount", basis)
    head, _, last = pattern.rpartition(".")
    if head.rpartition(".")[2] in _STATE_ENDS and last in _STATE_KINDS:
        return _STATE_KINDS[last]
    raise AddressError(f"'{address}' is not a numeric input of a worksheet", address)


# --------------------------------------------------------------------------- reading
def _names(items) -> str:
    return ", ".join(getattr(i, "name", "?") for i in items) or "none"


def _walk(ws: Worksheet, steps: list[tuple[str, str | None]], address: str):
    """(the model holding the last field, the last field's name)."""
    node = ws
    for i, (field, name) in enumerate(steps):
        last = i == len(steps) - 1
        if not hasattr(node, field) or (name is None) == (field in _COLLECTIONS):
            raise AddressError(f"'{address}' names no field of a worksheet ('{field}')", address)
        if last and name is None:
            return node, field
        value = getattr(node, field)
        if name is not None:
            found = next((x for x in value if x.name == name), None)
            if found is None:
                raise AddressError(f"no {field.rstrip('s').replace('_', ' ')} called '{name}' "
                                   f"(there are: {_names(value)})", address)
            value = found
        if value is None:
            raise AddressError(f"'{address}': the worksheet has no {field.replace('_', ' ')} here", address)
        node = value
    raise AddressError(f"'{address}' names a whole item, not one of its numbers", address)


def get(ws: Worksheet, address: str):
    """The value at an address, as typed: a :class:`Quantity`, a number, or ``None`` (not given)."""
    node, field = _walk(ws, parse(address), address)
    return getattr(node, field)


def inputs(ws: Worksheet) -> list[Input]:
    """Every numeric input of a worksheet that holds a value (or is the unknown), in worksheet order."""
    unknown = unknown_address(ws.unknowns[0]) if len(ws.unknowns) == 1 else None
    out: list[Input] = []

    def add(address: str, value) -> None:
        if value is not None or address == unknown:
            out.append(Input(address, kinds_of(address, ws.basis.kind), value, address == unknown))

    def state(prefix: str, s) -> None:
        for name in _STATE_KINDS:
            add(f"{prefix}.{name}", getattr(s, name))
        if s.humidity is not None:  # humid air's inlet
            for name in HUMIDITY_FORMS:
                add(f"{prefix}.humidity.{name}", getattr(s.humidity, name))

    add("basis.duration", ws.basis.duration)
    add("atmosphere.barometric_pressure", ws.atmosphere.barometric_pressure)
    add("atmosphere.altitude", ws.atmosphere.altitude)
    for m in ws.materials:
        add(item("materials", m.name, "min_temperature"), m.min_temperature)
        add(item("materials", m.name, "max_temperature"), m.max_temperature)
        for p in m.phases:
            for name in ("cp", "up_to", "latent_heat"):
                add(item("materials", m.name, item("phases", p.name, name)), getattr(p, name))
    for f in ws.freezing_materials:
        add(item("freezing_materials", f.name, "initial_freezing_point"), f.initial_freezing_point)
    for c in ws.common_temperatures:
        add(item("common_temperatures", c.name, "temperature"), c.temperature)
    for s in ws.streams:
        for name in ("flow", "pressure", "mass_fraction"):
            add(item("streams", s.name, name), getattr(s, name))
        state(item("streams", s.name, "inlet"), s.inlet)
        state(item("streams", s.name, "outlet"), s.outlet)
        if s.air_flow is not None:
            for name in ("volume_flow", "volume_temperature"):
                add(item("streams", s.name, "air_flow", name), getattr(s.air_flow, name))
    for v in ws.vessels:
        add(item("vessels", v.name, "pressure"), v.pressure)
        state(item("vessels", v.name, "final"), v.final)
        for c in v.charges:
            charge = item("vessels", v.name, item("charges", c.name))
            add(f"{charge}.mass", c.mass)
            add(f"{charge}.mass_fraction", c.mass_fraction)
            state(f"{charge}.initial", c.initial)
        if v.equipment is not None:
            for name in ("mass", "heat_capacity", "initial_temperature"):
                add(item("vessels", v.name, "equipment", name), getattr(v.equipment, name))
        if v.screening is not None:
            for name in ("accumulation", "T_D24", "MTT", "process_temperature"):
                add(item("vessels", v.name, "screening", name), getattr(v.screening, name))
            if v.screening.jacket is not None:
                for name in ("utility_temperature", "target_temperature", "start_temperature", "UA", "U", "area"):
                    add(item("vessels", v.name, "screening", "jacket", name), getattr(v.screening.jacket, name))
    for d in ws.duties:
        add(item("duties", d.name, "value"), d.value)
    for loss in ws.losses:
        add(item("losses", loss.name, "value"), loss.value)
        if loss.surface is not None:
            for name in SURFACE_FIELDS:
                add(item("losses", loss.name, "surface", name), getattr(loss.surface, name))
            if loss.surface.insulation is not None:
                add(item("losses", loss.name, "surface", "insulation", "thickness"), loss.surface.insulation.thickness)
    for r in ws.reactions:
        for name in ("enthalpy", "amount", "conversion", "molar_mass", "temperature"):
            add(item("reactions", r.name, name), getattr(r, name))
    for m in ws.mixings:
        for name in ("amount", "from_fraction", "with_fraction", "to_fraction"):
            add(item("mixings", m.name, name), getattr(m, name))
    for e in ws.exchangers:
        for name in ("minimum_approach", "U", "area", "UA"):
            add(item("exchangers", e.name, name), getattr(e, name))
    for u in ws.utilities:
        for name in ("pressure", "superheat", "condensate_temperature", "supply_temperature", "return_limit",
                     "mass_fraction", "flash_pressure"):
            add(item("utilities", u.name, name), getattr(u, name))
    add("operating_hours", ws.operating_hours)
    return out


# --------------------------------------------------------------------------- writing
def check_fraction(value: float, address: str) -> None:
    """Refuse a fraction (a phase fraction, a mass fraction, an accumulation) outside 0 to 1, at its address: the
    same words whether it is set by address or at a sweep's point."""
    if not 0.0 <= value <= 1.0:
        raise AddressError(f"{value:g} is not between 0 and 1", address)


def _as_value(value, kinds: tuple[str, ...], address: str):
    """A typed value for a field: a Quantity (from a Quantity, ``"12 t/h"`` or ``(12, "t/h")``) or a fraction."""
    if kinds == (FRACTION,):
        if isinstance(value, Quantity) or isinstance(value, str) or not isinstance(value, (int, float)):
            raise AddressError(f"{value!r}: this field takes a plain number between 0 and 1", address)
        check_fraction(float(value), address)
        return float(value)
    if isinstance(value, tuple) and len(value) == 2:
        value = {"value": value[0], "unit": value[1]}
    try:
        q = value if isinstance(value, Quantity) else Quantity.model_validate(value)
    except Exception:  # noqa: BLE001 - pydantic raises its own ValidationError; refused in words below
        raise AddressError(f"{value!r} is not a number with a unit (e.g. '12 t/h')", address) from None
    try:
        check_unit(q.unit, kinds[0], address) if len(kinds) == 1 else kind_of(q.unit, kinds, address)
    except HeatBalanceError as exc:
        raise AddressError(exc.message, address) from None
    return q


def with_value(ws: Worksheet, address: str, value) -> Worksheet:
    """A copy of the worksheet with the input at ``address`` set to ``value`` (in any unit of its kind).

    A state's temperature replaces a phase fraction or shared temperature given there (and the reverse); the
    site's altitude replaces its barometric pressure (and the reverse).
    """
    steps = parse(address)
    kinds = kinds_of(address, ws.basis.kind)
    node, field = _walk(ws, steps, address)  # the item must exist
    new = _as_value(value, kinds, address)
    data = ws.model_dump(mode="json", exclude_none=True)
    target = data
    for name, key in steps[:-1]:
        target = target.setdefault(name, {}) if key is None else next(x for x in target[name] if x["name"] == key)
    if field in _STATE_KINDS and field != "pressure" and steps[-2][0] in _STATE_ENDS:
        for other in ("temperature", "vapour_fraction", "solid_fraction", "common"):
            target.pop(other, None)
    if len(steps) > 1 and steps[-2][0] == "humidity":  # a humidity is given one way
        for other in HUMIDITY_FORMS:
            target.pop(other, None)
    if steps[0][0] == "atmosphere":  # the site is given one way: a pressure or an altitude
        target.pop("barometric_pressure", None), target.pop("altitude", None)
    target[field] = new.model_dump() if isinstance(new, Quantity) else new
    try:
        return parse_worksheet(data)
    except HeatBalanceError as exc:
        raise InputError(exc.message, address) from None


# --------------------------------------------------------------------------- the unknown
def unknown_address(u: Unknown) -> str:
    """The address of the field an unknown stands for.

    >>> unknown_address(Unknown(kind="temperature", line="Glycol", end="outlet"))
    'streams[Glycol].outlet.temperature'
    """
    if u.kind == "duty":
        return item("duties", u.term or "", "value")
    if u.kind == "temperature" and u.common is not None:
        return item("common_temperatures", u.common, "temperature")
    if u.charge is not None:
        field = "mass" if u.kind == "amount" else "initial.temperature"
        return item("vessels", u.line or "", item("charges", u.charge, field))
    if u.kind == "amount":
        return item("streams", u.line or "", "flow")
    if u.end == "final":
        return item("vessels", u.line or "", "final", "temperature")
    return item("streams", u.line or "", u.end or "outlet", "temperature")


def unknown_at(address: str) -> Unknown:
    """The unknown that stands for the field at ``address`` (the inverse of :func:`unknown_address`)."""
    steps = parse(address)
    pattern = _pattern(steps)
    names = [n for _, n in steps if n is not None]
    forms = {
        "streams[].flow": lambda: Unknown(kind="amount", line=names[0]),
        "vessels[].charges[].mass": lambda: Unknown(kind="amount", line=names[0], charge=names[1]),
        "streams[].inlet.temperature": lambda: Unknown(kind="temperature", line=names[0], end="inlet"),
        "streams[].outlet.temperature": lambda: Unknown(kind="temperature", line=names[0], end="outlet"),
        "vessels[].final.temperature": lambda: Unknown(kind="temperature", line=names[0], end="final"),
        "vessels[].charges[].initial.temperature":
            lambda: Unknown(kind="temperature", line=names[0], charge=names[1], end="initial"),
        "common_temperatures[].temperature": lambda: Unknown(kind="temperature", common=names[0]),
        "duties[].value": lambda: Unknown(kind="duty", term=names[0]),
    }
    if pattern not in forms:
        raise AddressError(f"'{address}' cannot be the unknown: a flow or mass, a state's temperature, a shared "
                           "temperature or a duty can", address)
    return forms[pattern]()


def unknown_choices(ws: Worksheet) -> list[tuple[str, str]]:
    """Every field of a worksheet that can be the unknown: ``(address, label)``, in worksheet order."""
    out: list[tuple[str, str]] = []
    for s in ws.streams:
        out.append((item("streams", s.name, "flow"), f"{s.name}: flow"))
        for end, state in (("inlet", s.inlet), ("outlet", s.outlet)):
            if state.common is None:
                out.append((item("streams", s.name, end, "temperature"), f"{s.name}: {end} temperature"))
    for v in ws.vessels:
        if v.final.common is None:
            out.append((item("vessels", v.name, "final", "temperature"), f"{v.name}: final temperature"))
        for c in v.charges:
            charge = item("vessels", v.name, item("charges", c.name))
            out.append((f"{charge}.mass", f"{v.name} / {c.name}: mass"))
            if c.initial.common is None:  # else its temperature is the shared one, offered as such
                out.append((f"{charge}.initial.temperature", f"{v.name} / {c.name}: initial temperature"))
    for c in ws.common_temperatures:
        out.append((item("common_temperatures", c.name, "temperature"), f"shared temperature {c.name}"))
    for d in ws.duties:
        out.append((item("duties", d.name, "value"), f"duty {d.name}"))
    return out


#: the unit an answer is stored in when its field has no unit and no other field of its kind has one
_STORAGE_UNITS = {"mass_flow": "kg/h", "mass": "kg", "temperature": "degC", "power": "kW", "energy": "kJ"}


def storage_unit(ws: Worksheet, address: str, kind: str) -> str:
    """The unit a value for ``address`` is written in, whatever the view: the unit typed there if it
    measures ``kind``, else the first unit of that kind typed elsewhere in the worksheet, else SI's."""
    candidates = [get(ws, address)] + [i.value for i in inputs(ws) if i.address != address]
    for q in candidates:
        if isinstance(q, Quantity):
            try:
                check_unit(q.unit, kind)
                return q.unit
            except HeatBalanceError:
                continue
    return _STORAGE_UNITS.get(kind, "")


def answer_value(ws: Worksheet, answer) -> Quantity | dict:
    """A solved :class:`~heatbalance.results.Answer` as the value its field stores, independent of any view.

    A plateau answer is the state's phase fraction (``{"vapour_fraction": 0.123}``); anything else a
    Quantity in :func:`storage_unit`, to 6 significant figures.
    """
    if answer.phase_fraction is not None:
        if answer.plateau == "boiling":
            return {"vapour_fraction": round(answer.phase_fraction, 6)}
        return {"solid_fraction": round(1.0 - answer.phase_fraction, 6)}
    unit = storage_unit(ws, answer.address, answer.si_kind)
    return Quantity(value=float(f"{from_si(answer.value_si, unit, answer.si_kind):.6g}"), unit=unit)


def with_unknown(ws: Worksheet, address: str, old_value=None) -> Worksheet:
    """A copy with the field at ``address`` as the one unknown; the old unknown's field takes ``old_value``.

    ``old_value`` (a Quantity, or for a state on a plateau a fraction field as ``{"vapour_fraction": x}``)
    is usually the last answer, so the sheet still balances; ``None`` leaves the old field as it was.
    """
    new = unknown_at(address)
    _walk(ws, parse(address), address)  # the field must exist
    if old_value is not None and len(ws.unknowns) == 1:
        old = unknown_address(ws.unknowns[0])
        if isinstance(old_value, dict):  # a plateau state
            (field, fraction), = old_value.items()
            ws = with_value(ws, old.rpartition(".")[0] + "." + field, fraction)
        else:
            ws = with_value(ws, old, old_value)
    # the unknown is solved for: a tolerance it had as an input no longer applies
    tolerances = [t for t in ws.tolerances if t.address != address]
    return ws.model_copy(update={"unknowns": [new], "tolerances": tolerances})


# --------------------------------------------------------------------------- renames
def rename(ws: Worksheet, address: str, new_name: str) -> Worksheet:
    """A copy with the item at ``address`` (``streams[Steam]``) renamed; references follow it.

    The unknown, a reaction's ``vessel``, states that name a shared temperature, an exchanger's hot and cold
    lines and a utility's material are updated.
    A name already used in the same list is refused.
    """
    steps = parse(address)
    if steps[-1][1] is None:
        raise AddressError(f"'{address}' names a field, not an item to rename", address)
    collection, old_name = steps[-1]
    new_name = new_name.strip()
    data = ws.model_dump(mode="json", exclude_none=True)
    holder = data
    for name, key in steps[:-1]:
        found = holder.get(name) if key is None else next((x for x in holder.get(name, []) if x["name"] == key), None)
        if not isinstance(found, dict):
            raise AddressError(f"'{address}' names nothing in this worksheet (no {name} {key or ''})".rstrip(")")
                               + ")", address)
        holder = found
    items = holder.get(collection, [])
    if not any(x["name"] == old_name for x in items):
        raise AddressError(f"no {collection.rstrip('s')} called '{old_name}'", address)
    if any(x["name"] == new_name for x in items):
        raise AddressError(f"'{new_name}' is already the name of another {collection.rstrip('s')}", address)
    next(x for x in items if x["name"] == old_name)["name"] = new_name
    _rename_references(data, [s[0] for s in steps], old_name, new_name, address)
    return parse_worksheet(data)


def _rename_references(data: dict, path: list[str], old: str, new: str, item_address: str = "") -> None:
    top = path[0]
    for case in data.get("cases", []):
        for override in case.get("overrides", []):
            override["address"] = follow_rename(override["address"], item_address, new)
    for tolerance in data.get("tolerances", []):
        tolerance["address"] = follow_rename(tolerance["address"], item_address, new)
    for exchanger in data.get("exchangers", []):
        if exchanger.get("sets"):
            exchanger["sets"] = follow_rename(exchanger["sets"], item_address, new)
    for u in data.get("unknowns", []):
        if top in ("streams", "vessels") and len(path) == 1 and u.get("line") == old:
            u["line"] = new
        elif path == ["vessels", "charges"] and u.get("charge") == old and u.get("line") == parse(item_address)[0][1]:
            u["charge"] = new  # the unknown on this vessel's charge (another vessel may have a charge of that name)
        elif top == "duties" and u.get("term") == old:
            u["term"] = new
        elif top == "common_temperatures" and u.get("common") == old:
            u["common"] = new
    if path == ["vessels", "charges"]:  # the chemical a charge is for the bubble point follows it
        vessel = parse(item_address)[0][1]
        for v in data.get("vessels", []):
            for component in (v.get("screening") or {}).get("components", []) if v["name"] == vessel else []:
                if component.get("charge") == old:
                    component["charge"] = new
    if path == ["vessels"]:
        for r in data.get("reactions", []) + data.get("mixings", []):
            if r.get("vessel") == old:
                r["vessel"] = new
    if path == ["common_temperatures"]:
        states = [s[e] for s in data.get("streams", []) for e in ("inlet", "outlet")]
        states += [v["final"] for v in data.get("vessels", [])]
        states += [c["initial"] for v in data.get("vessels", []) for c in v["charges"]]
        for state in states:
            if state.get("common") == old:
                state["common"] = new
    if top in ("streams", "vessels") and len(path) == 1:
        for loss in data.get("losses", []):
            if loss.get("surface", {}).get("line") == old:
                loss["surface"]["line"] = new
    if path == ["streams"]:
        for exchanger in data.get("exchangers", []):
            for side in ("hot", "cold"):
                exchanger[side] = [new if name == old else name for name in exchanger.get(side, [])]
    if path == ["materials"]:
        for utility in data.get("utilities", []):
            if utility.get("material") == old:
                utility["material"] = new
        lines = data.get("streams", []) + [c for v in data.get("vessels", []) for c in v["charges"]]
        lines += [v["equipment"] for v in data.get("vessels", []) if v.get("equipment")]
        for line in lines:
            if line.get("material") == old:
                line["material"] = new


def follow_rename(address: str, item_address: str, new_name: str) -> str:
    """An address kept elsewhere (a sweep, a case) moved after :func:`rename` of ``item_address``.

    >>> follow_rename("streams[Steam].inlet.temperature", "streams[Steam]", "HP steam")
    'streams[HP steam].inlet.temperature'
    """
    try:
        steps, renamed = parse(address), parse(item_address)
    except AddressError:
        return address  # not an address (refused when the case is run), left as typed
    if steps[:len(renamed)] != renamed:
        return address
    collection = renamed[-1][0]
    head = ".".join(item(f, n) if n is not None else f for f, n in renamed[:-1])
    moved = item(collection, new_name)
    rest = ".".join(item(f, n) if n is not None else f for f, n in steps[len(renamed):])
    return ".".join(p for p in (head, moved, rest) if p)
