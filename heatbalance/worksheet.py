"""The worksheet: typed models of the versioned JSON document, and its loader.

Every quantity is stored as the user typed it: a number and a unit string.
A worksheet is one control volume over one basis (continuous or batch), a list
of streams and vessels, heat terms, and exactly one unknown.
"""
from __future__ import annotations

import json
import math
import re
from typing import Literal

from pydantic import BaseModel, ConfigDict, Field, ValidationError, field_validator, model_validator

from .errors import WorksheetFormatError
from .humid_air import HUMIDITY_FORMS
from .losses import SHAPES
from .migrations import CURRENT_VERSION, migrate

__all__ = [
    "SCHEMA_VERSION", "Quantity", "State", "Stream", "Charge", "Equipment", "Vessel", "Duty", "Loss", "LossSurface", "Insulation", "Humidity", "AirFlow",
    "Jacket", "ChargeChemical", "ScreeningInputs",
    "Reaction", "Mixing", "CommonTemperature", "PhaseSpec", "UserMaterial", "FreezingMaterial", "EnthalpyPoint", "Basis", "Unknown", "Override", "Case", "Tolerance", "SheetTags", "SiteAtmosphere", "Exchanger", "Utility", "ARRANGEMENTS", "UTILITY_KINDS", "Worksheet",
    "load_worksheet", "parse_worksheet", "dump_worksheet", "MAX_DOCUMENT_BYTES", "MAX_NESTING_DEPTH", "item_address",
    "plain_text_refusal",
]

SCHEMA_VERSION = CURRENT_VERSION  # one number, kept in migrations.py beside the migrations that reach it
MAX_DOCUMENT_BYTES = 1_000_000  # a worksheet larger than 1 MB is refused
MAX_NESTING_DEPTH = 20  # objects/lists nested deeper are refused (a real worksheet is about 7 deep)


class _Model(BaseModel):
    model_config = ConfigDict(extra="forbid", validate_assignment=True, allow_inf_nan=False)


# text a reader could be misled by: control characters (a line break forges a line of a report, ESC drives a
# terminal, NUL cannot be stored in PostgreSQL), the line separators editors break lines at, and the bidirectional
# overrides that show text reversed; a note may hold line breaks and tabs
_BIDI_CONTROLS = "\u202a-\u202e\u2066-\u2069"
_MISLEADING = re.compile(f"[\x00-\x1f\x7f-\x9f\u2028\u2029{_BIDI_CONTROLS}]")
_MISLEADING_IN_NOTES = re.compile(f"[\x00-\x08\x0b\x0c\x0e-\x1f\x7f-\x9f\u2028\u2029{_BIDI_CONTROLS}]")


def _visible(text: str) -> str:
    """Text with each control character written as its code (a refused name, shown in its address).

    >>> _visible("Glycol\\x1b[31m")
    'Glycol<U+001B>[31m'
    """
    return _MISLEADING.sub(lambda m: f"<U+{ord(m.group(0)):04X}>", text)


def plain_text_refusal(text: str, notes: bool = False) -> str:
    """Why ``text`` is refused as a name, title or unit (or, ``notes``, as a note), or '' when it is plain text.

    >>> plain_text_refusal("Steam, 4 barg"), plain_text_refusal("line 1\\nline 2", notes=True)
    ('', '')
    >>> plain_text_refusal("Heater\\nANSWER")
    'holds a control character (U+000A, a line break); names, titles and units are plain text on one line'
    """
    found = (_MISLEADING_IN_NOTES if notes else _MISLEADING).search(text)
    if found is None:
        return ""
    char = found.group(0)
    kind = "a line break" if char in "\n\r\u2028\u2029" else \
        "a control character" if ord(char) < 0xa0 else "a direction override"
    rule = "notes are plain text: line breaks and tabs only" if notes else \
        "names, titles and units are plain text on one line"
    return f"holds a control character (U+{ord(char):04X}, {kind}); {rule}"


def _check_texts(data: dict) -> None:
    """Refuse, at its field, the first text of a document that is not plain text (one walk, a compiled pattern per
    text: about as fast as reading the document)."""
    pending: list[tuple[object, tuple]] = [(data, ())]
    while pending:
        node, path = pending.pop()
        children = node.items() if isinstance(node, dict) else enumerate(node)
        for key, value in children:
            if isinstance(value, str):
                why = plain_text_refusal(value, notes=key == "notes")
                if why:
                    address, complete = _address_of(data, path + (key,))
                    place = ".".join(str(p) for p in path + (key,))
                    raise WorksheetFormatError(why if complete else f"{place}: {why}", address)
            elif isinstance(value, (dict, list)):
                pending.append((value, path + (key,)))


QUANTITY_TEXT = re.compile(r"^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(.*?)\s*$")


class Quantity(_Model):
    """A number with the unit the user typed: ``{"value": 12, "unit": "t/h"}`` (or ``"12 t/h"``)."""

    value: float
    unit: str

    @model_validator(mode="before")
    @classmethod
    def _from_text(cls, data):
        if isinstance(data, str):
            match = QUANTITY_TEXT.match(data)
            if not match:
                raise ValueError(f"'{data}' is not a number followed by a unit")
            return {"value": float(match.group(1)), "unit": match.group(2)}
        return data

    def __str__(self) -> str:
        return f"{self.value:g} {self.unit}"


class Humidity(_Model):
    """The humidity of humid air at a state, one way (see :mod:`heatbalance.humid_air`):
    ``relative_humidity`` (0–1), ``humidity_ratio`` (kg water per kg dry air), ``dew_point`` or ``wet_bulb``."""

    relative_humidity: float | None = None
    humidity_ratio: float | None = None
    dew_point: Quantity | None = None
    wet_bulb: Quantity | None = None

    @model_validator(mode="after")
    def _one_way(self):
        given = [k for k in HUMIDITY_FORMS if getattr(self, k) is not None]
        if len(given) != 1:
            raise ValueError(f"give the humidity one way: {', '.join(HUMIDITY_FORMS)}"
                             + (f" (not {' and '.join(given)})" if given else ""))
        return self


class AirFlow(_Model):
    """How a humid-air stream's flow is given (the balance counts kg of dry air): the stream's mass ``flow``
    is of ``dry air`` (default) or of ``humid air``; or instead a ``volume_flow`` of the humid air at
    ``volume_temperature`` (default: the inlet's) and the line's pressure."""

    mass_of: Literal["dry air", "humid air"] = "dry air"
    volume_flow: Quantity | None = None
    volume_temperature: Quantity | None = None


class State(_Model):
    """A line's state: a temperature, a phase fraction on a plateau, or a shared temperature.

    ``vapour_fraction`` places the state on the boiling plateau at the state's
    pressure (0 = saturated liquid, 1 = saturated vapour); ``solid_fraction`` on
    the melting plateau (1 = all solid). ``common`` names a shared temperature.
    ``pressure`` overrides the line's pressure for this state (a flash, a let-down).
    """

    temperature: Quantity | None = None
    vapour_fraction: float | None = Field(default=None, ge=0.0, le=1.0)
    solid_fraction: float | None = Field(default=None, ge=0.0, le=1.0)
    common: str | None = None
    pressure: Quantity | None = None
    humidity: Humidity | None = None  # humid air only: the inlet's humidity

    @model_validator(mode="after")
    def _one_way(self):
        given = [k for k in ("vapour_fraction", "solid_fraction", "common") if getattr(self, k) is not None]
        if len(given) > 1:
            raise ValueError(f"a state is given one way only, not by {' and '.join(given)}")
        return self


class PhaseSpec(_Model):
    """One phase of a user-defined material: cp = a + b·T + c·T² (T in K) up to a transition, or the phase of
    the same name of a library material (``from_library``, e.g. water's liquid)."""

    name: Literal["solid", "liquid", "vapour"]
    cp: Quantity | None = Field(default=None, description="constant specific heat, or the constant term a")
    cp_per_kelvin: float = 0.0  # b, in the cp unit per K
    cp_per_kelvin2: float = 0.0  # c, in the cp unit per K²
    from_library: str | None = Field(default=None, min_length=1, max_length=80)  # a library material's phase
    up_to: Quantity | None = None  # transition temperature to the next phase
    latent_heat: Quantity | None = None  # to the next phase

    @model_validator(mode="after")
    def _one_source(self):
        if self.cp is None and self.from_library is None:
            raise ValueError("a phase needs its cp, or 'from_library' naming the library material whose phase it takes")
        if self.from_library is not None and (self.cp is not None or self.cp_per_kelvin or self.cp_per_kelvin2):
            raise ValueError("a phase taken from the library ('from_library') has no cp of its own")
        return self


class UserMaterial(_Model):
    """A material defined in the worksheet by its cp per phase and transitions.

    ``min_temperature``/``max_temperature`` may be left out where the coldest/hottest phase is a library
    phase: they default to that phase's data range (the default is shown with the result)."""

    name: str = Field(min_length=1, max_length=80)
    phases: list[PhaseSpec] = Field(min_length=1, max_length=3)
    min_temperature: Quantity | None = None
    max_temperature: Quantity | None = None
    source: str = Field(min_length=1, max_length=300)


FOOD_COMPONENTS = ("water", "protein", "fat", "carbohydrate", "fibre", "ash")


class EnthalpyPoint(_Model):
    """One row of an enthalpy table: the specific enthalpy at a temperature (any reference)."""

    temperature: Quantity
    enthalpy: Quantity


class FreezingMaterial(_Model):
    """A material that freezes over a range (a food, a wet solid): by composition (mass fractions) with its
    initial freezing point, or by an enthalpy–temperature table (optionally with its initial freezing point)."""

    name: str = Field(min_length=1, max_length=80)
    composition: dict[Literal[FOOD_COMPONENTS], float] | None = None  # type: ignore[valid-type]
    initial_freezing_point: Quantity | None = None
    enthalpy_table: list[EnthalpyPoint] | None = Field(default=None, min_length=2, max_length=200)
    source: str = Field(min_length=1, max_length=300)

    @model_validator(mode="after")
    def _one_form(self):
        if (self.composition is None) == (self.enthalpy_table is None):
            raise ValueError("a freezing-range material is given by its 'composition' or by an 'enthalpy_table', "
                             "one of the two")
        if self.composition is not None and self.initial_freezing_point is None:
            raise ValueError("a material by composition needs its 'initial_freezing_point'")
        return self


class Stream(_Model):
    """A flowing line from an inlet state to an outlet state."""

    name: str = Field(min_length=1, max_length=80)
    material: str
    mass_fraction: float | None = Field(default=None, ge=0.0, le=1.0)
    flow: Quantity | None = None
    pressure: Quantity = Quantity(value=0, unit="barg")
    inlet: State
    outlet: State
    air_flow: AirFlow | None = None  # humid air only: what the flow counts, or a volume flow


class Charge(_Model):
    """A charge of a vessel: a mass at an initial state; all charges end at the vessel's final state."""

    name: str = Field(min_length=1, max_length=80)
    material: str
    mass_fraction: float | None = Field(default=None, ge=0.0, le=1.0)
    mass: Quantity | None = None
    initial: State


class Equipment(_Model):
    """What warms with the contents: a mass of a solid material, or a calibrated heat capacity."""

    material: str | None = None
    mass: Quantity | None = None
    heat_capacity: Quantity | None = None
    initial_temperature: Quantity | None = None  # default: the first charge's initial temperature

    @model_validator(mode="after")
    def _one_form(self):
        by_mass = self.mass is not None or self.material is not None
        if by_mass == (self.heat_capacity is not None):
            raise ValueError("equipment is given either as a mass and a material, or as a heat capacity")
        if by_mass and (self.mass is None or self.material is None):
            raise ValueError("equipment given by mass needs both the mass and the material")
        return self


class Jacket(_Model):
    """Heating or cooling the batch through a jacket with a utility at constant temperature.

    The heat-transfer coefficient times area is given as ``UA`` (e.g. ``"2.5 kW/K"``) or as
    ``U`` (``"400 W/(m^2*K)"``) and ``area`` (``"8 m^2"``). The batch starts at
    ``start_temperature`` (default: the process temperature) and must reach ``target_temperature``.
    """

    utility_temperature: Quantity
    target_temperature: Quantity
    start_temperature: Quantity | None = None
    UA: Quantity | None = None
    U: Quantity | None = None
    area: Quantity | None = None

    @model_validator(mode="after")
    def _one_form(self):
        if (self.UA is not None) == (self.U is not None or self.area is not None):
            raise ValueError("give the jacket's 'UA', or its 'U' and 'area'")
        if self.UA is None and (self.U is None or self.area is None):
            raise ValueError("a jacket given by U also needs its heat-transfer 'area' (and the reverse)")
        return self


class ChargeChemical(_Model):
    """What a charge is for the mixture's bubble point: the ``chemical`` (a name or CAS number the `chemicals`
    databases know) whose vapour pressure and UNIFAC groups it has, e.g. a material defined by its cp only."""

    charge: str = Field(min_length=1, max_length=80)
    chemical: str = Field(min_length=1, max_length=120)


class ScreeningInputs(_Model):
    """Optional inputs of the thermal screening of a vessel with a reaction (see :mod:`heatbalance.reactor`).

    ``accumulation``: fraction of the reaction heat still to come when cooling fails (1 = all of it).
    ``T_D24``: temperature at which the decomposition's time to maximum rate is 24 h (from calorimetry).
    ``MTT``: maximum technical temperature, overriding the boiling point from the property data.
    ``process_temperature``: overrides the vessel's final temperature as the temperature of the process.
    ``thermal_inertia``: divide ΔT_ad by φ for the MTSR (less conservative; off by default).
    ``components``: the chemical each charge is for the bubble point of the mixture (the MTT when not entered);
    a catalogue fluid or glycol solution needs none. ``activity_model``: ``UNIFAC`` (where every component has
    groups, else Raoult's law, said in the result) or ``ideal`` (Raoult's law).
    """

    accumulation: float = Field(default=1.0, ge=0.0, le=1.0)
    T_D24: Quantity | None = None
    MTT: Quantity | None = None
    process_temperature: Quantity | None = None
    thermal_inertia: bool = False
    jacket: Jacket | None = None
    components: list[ChargeChemical] = Field(default_factory=list, max_length=50)
    activity_model: Literal["UNIFAC", "ideal"] = "UNIFAC"

    @model_validator(mode="after")
    def _one_chemical_per_charge(self):
        named = [c.charge for c in self.components]
        repeated = sorted({n for n in named if named.count(n) > 1})
        if repeated:
            raise ValueError(f"a charge is one chemical; named more than once: {', '.join(repeated)}")
        return self


class Vessel(_Model):
    """A batch vessel: charges mixed in it end at one final state."""

    name: str = Field(min_length=1, max_length=80)
    pressure: Quantity = Quantity(value=0, unit="barg")
    charges: list[Charge] = Field(min_length=1)
    final: State
    equipment: Equipment | None = None
    screening: ScreeningInputs | None = None


class Duty(_Model):
    """Heat put into the process (+) or taken out of it (−): a power, or an energy in batch."""

    name: str = Field(min_length=1, max_length=80)
    value: Quantity | None = None


class Insulation(_Model):
    """Insulation around a surface: a material of the insulation table (:mod:`heatbalance.losses`) and its
    thickness."""

    material: str = Field(min_length=1, max_length=80)
    thickness: Quantity


class LossSurface(_Model):
    """A loss computed from geometry (:mod:`heatbalance.losses`): a bare or insulated surface in air.

    ``shape`` is one of :data:`heatbalance.losses.SHAPES`; ``diameter`` the bare pipe's or vessel's outside
    diameter (the roof's diameter); ``length`` the pipe's length or the wall's height (not for a roof);
    ``emissivity`` of the outer surface (0–1); ``wind_speed`` (none or 0: still air); the process side is at
    ``process_temperature``, or at the mean of the inlet and outlet temperatures of the stream named in
    ``line`` (a vessel: of its first charge's initial and its final temperature). ``protection_limit``: the
    warmest surface people may touch (default 60 °C, common practice).
    """

    shape: Literal[SHAPES]  # type: ignore[valid-type]
    diameter: Quantity
    length: Quantity | None = None
    emissivity: float = Field(ge=0.0, le=1.0)
    insulation: Insulation | None = None
    ambient_temperature: Quantity = Quantity(value=20, unit="degC")
    surroundings_temperature: Quantity | None = None
    wind_speed: Quantity | None = None
    process_temperature: Quantity | None = None
    line: str | None = Field(default=None, max_length=80)
    protection_limit: Quantity | None = None

    @model_validator(mode="after")
    def _complete(self):
        if (self.process_temperature is None) == (self.line is None):
            raise ValueError("give the process side's 'process_temperature', or the 'line' whose mean temperature "
                             "it is, one of them")
        if self.shape != "tank roof" and self.length is None:
            raise ValueError(f"a {self.shape} needs its 'length'")
        return self


class Loss(_Model):
    """Heat lost to the surroundings: entered as a positive ``value``, or computed from a ``surface``."""

    name: str = Field(min_length=1, max_length=80)
    value: Quantity | None = None
    surface: LossSurface | None = None

    @model_validator(mode="after")
    def _one_form(self):
        if (self.value is None) == (self.surface is None):
            raise ValueError("a loss is entered as a 'value', or computed from a 'surface', one of them")
        return self


class Reaction(_Model):
    """Heat of reaction: ΔH per mole of key reactant × moles reacted (= amount × conversion).

    ``amount`` is moles (or a molar flow) of the key reactant fed, or a mass
    (or mass flow) with ``molar_mass``. ΔH is negative for an exothermic reaction.

    ΔH is entered (``enthalpy``), or computed at 25 °C by Hess's law from a balanced
    ``equation`` with phases (``"propene(g) + H2(g) -> propane(g)"``, see
    :mod:`heatbalance.reactions`) per mole of ``key_reactant``. With both, the entered
    ΔH is used and the equation's value is reported beside it. With an equation,
    a mass ``amount`` needs no ``molar_mass`` (the key reactant's is used).

    ``temperature``: where the reaction runs, for ΔH from the equation at that temperature (Kirchhoff's law);
    default: its vessel's screening ``process_temperature``; neither: ΔH at 25 °C, said in the assumptions.
    """

    name: str = Field(min_length=1, max_length=80)
    enthalpy: Quantity | None = None
    amount: Quantity
    conversion: float = Field(default=1.0, ge=0.0, le=1.0)
    molar_mass: Quantity | None = None
    vessel: str | None = None
    equation: str | None = Field(default=None, max_length=500)
    key_reactant: str | None = Field(default=None, max_length=120)
    temperature: Quantity | None = None

    @model_validator(mode="after")
    def _heat_given(self):
        if self.enthalpy is None and self.equation is None:
            raise ValueError("give the heat of reaction ('enthalpy') or a balanced 'equation' to compute it from")
        return self


class Mixing(_Model):
    """A stated mixing: ``amount`` of solution A (solute mass fraction ``from_fraction``) mixed with B
    (``with_fraction``, 0 = water) to ``to_fraction``. Its heat (from integral heats of solution, see
    :mod:`heatbalance.mixing`) enters the balance as its own line. ``solute``: a name or formula of the table
    (``sulfuric acid``, ``NaOH``); ``amount``: A's mass (batch) or mass flow; ``vessel``: where it happens.
    """

    name: str = Field(min_length=1, max_length=80)
    solute: str = Field(min_length=1, max_length=80)
    amount: Quantity
    from_fraction: float = Field(ge=0.0, le=1.0)
    with_fraction: float = Field(default=0.0, ge=0.0, le=1.0)
    to_fraction: float = Field(ge=0.0, le=1.0)
    vessel: str | None = None


class CommonTemperature(_Model):
    """A temperature shared by several states (lines that end mixed in one outlet)."""

    name: str = Field(min_length=1, max_length=80)
    temperature: Quantity | None = None


class Basis(_Model):
    """Continuous (rates, powers) or batch (masses, energies; a duration for powers)."""

    kind: Literal["continuous", "batch"] = "continuous"
    duration: Quantity | None = None


class Unknown(_Model):
    """The one quantity to solve for.

    * ``{"kind": "amount", "line": "Steam"}``: a stream's flow;
      ``{"kind": "amount", "line": "Reactor", "charge": "Water"}``: a charge's mass;
    * ``{"kind": "temperature", "line": "Glycol", "end": "outlet"}`` (inlet/outlet of a stream,
      ``final`` of a vessel, ``initial`` of a charge), or ``{"kind": "temperature", "common": "Mix"}``;
    * ``{"kind": "duty", "term": "Heater"}``.
    """

    kind: Literal["amount", "temperature", "duty"]
    line: str | None = None
    charge: str | None = None
    end: Literal["inlet", "outlet", "initial", "final"] | None = None
    term: str | None = None
    common: str | None = None


class Override(_Model):
    """One input of a case, by its address (see :mod:`heatbalance.address`), and the value it takes there."""

    address: str = Field(min_length=1, max_length=500)
    value: Quantity | float


class Case(_Model):
    """A named what-if: the worksheet with a few inputs overridden (``"summer"``, ``"turndown 60 %"``)."""

    name: str = Field(min_length=1, max_length=80)
    overrides: list[Override] = Field(default_factory=list, max_length=200)
    notes: str = Field(default="", max_length=2000)


class Tolerance(_Model):
    """How sure an input is, by its address: ``± plus_minus`` (a unit of the input's kind; a temperature
    difference for a temperature, e.g. ``"0.5 K"``; a plain number for a fraction) or ``± percent`` of its value.

    ``distribution`` says what the ± means (GUM 4.3): ``rectangular`` (limits, e.g. an instrument's
    specification: u = a/√3), ``normal`` (a is one standard uncertainty: u = a), ``95 %`` (a is an expanded
    uncertainty at about 95 %, k = 2: u = a/2).
    """

    address: str = Field(min_length=1, max_length=500)
    plus_minus: Quantity | float | None = None
    percent: float | None = Field(default=None, ge=0.0, le=100.0)
    distribution: Literal["rectangular", "normal", "95 %"] = "rectangular"
    source: str = Field(default="", max_length=300)

    @model_validator(mode="after")
    def _one_form(self):
        if (self.plus_minus is None) == (self.percent is None):
            raise ValueError("give the tolerance as 'plus_minus' or as 'percent', one of them")
        size = self.plus_minus.value if isinstance(self.plus_minus, Quantity) else self.plus_minus
        if size is not None and size < 0:
            raise ValueError(f"a tolerance is a ± half-width and cannot be negative ({size:g})")
        return self


class SheetTags(_Model):
    """Where the calculation belongs, for the printed sheet: site, job (project or work order), equipment tag."""

    site: str = Field(default="", max_length=120)
    job: str = Field(default="", max_length=120)
    equipment: str = Field(default="", max_length=120)


class SiteAtmosphere(_Model):
    """The site's barometric pressure, the reference of every gauge pressure of the worksheet.

    ``barometric_pressure`` (absolute, e.g. ``"0.85 bar"``) or ``altitude`` (``"1500 m"``, converted by the
    ISO 2533 standard atmosphere); neither: the standard atmosphere at sea level, 1.01325 bar.
    """

    barometric_pressure: Quantity | None = None
    altitude: Quantity | None = None

    @model_validator(mode="after")
    def _one_form(self):
        if self.barometric_pressure is not None and self.altitude is not None:
            raise ValueError("give the site's 'barometric_pressure' or its 'altitude', not both")
        return self


ARRANGEMENTS = ("counter-current", "co-current", "shell-and-tube 1-2", "shell-and-tube N shells", "cross-flow")
UTILITY_KINDS = ("steam", "cooling water", "chilled water", "brine", "hot oil", "electric")


class Exchanger(_Model):
    """A heat exchanger pairing lines of the balance: its ``hot`` side gives heat to its ``cold`` side.

    ``hot``/``cold`` name streams (a utility line and one or more process lines). ``arrangement`` is one of
    :data:`ARRANGEMENTS` (``shells``: the number of shell passes for ``shell-and-tube N shells``).
    ``minimum_approach``: the smallest acceptable temperature difference anywhere inside (default 10 K,
    common practice for shell-and-tube liquid service, no source). An existing unit: ``UA``, or ``U``
    and ``area`` (rating); ``U`` alone gives the area needed (design). ``utility_side`` (``hot`` or
    ``cold``) names the side that is a utility: the utility table then offers each site utility for the
    other side's duty. ``sets`` (rating as a way of solving): the address of one more input (an outlet
    temperature, a flow) that the exchanger's UA sets, so that the duty it delivers closes the balance; the
    worksheet's unknown is still solved by the balance.
    """

    name: str = Field(min_length=1, max_length=80)
    hot: list[str] = Field(min_length=1, max_length=20)
    cold: list[str] = Field(min_length=1, max_length=20)
    arrangement: Literal[ARRANGEMENTS] = "counter-current"  # type: ignore[valid-type]
    shells: int = Field(default=1, ge=1, le=12)
    minimum_approach: Quantity | None = None
    U: Quantity | None = None
    area: Quantity | None = None
    UA: Quantity | None = None
    utility_side: Literal["hot", "cold"] | None = None
    sets: str | None = Field(default=None, min_length=1, max_length=300)

    @model_validator(mode="after")
    def _one_form(self):
        if self.UA is not None and (self.U is not None or self.area is not None):
            raise ValueError("give the exchanger's 'UA', or its 'U' (and 'area'), not both")
        if self.area is not None and self.U is None:
            raise ValueError("an exchanger's 'area' needs its 'U' (or give 'UA')")
        both = set(self.hot) & set(self.cold)
        if both:
            raise ValueError(f"a line is on one side only; on both: {', '.join(sorted(both))}")
        return self


class Utility(_Model):
    """A site utility: how a duty could be met, and what it costs (site data, with its source).

    ``kind`` is one of :data:`UTILITY_KINDS`. Steam: ``pressure`` (gauge), optional ``superheat`` (a
    temperature difference above saturation), ``condensate_temperature`` (default: leaves saturated).
    Cooling water, chilled water, brine: ``supply_temperature`` and ``return_limit`` (the warmest return);
    hot oil: ``supply_temperature`` and ``return_limit`` (the coldest return); brine and hot oil name their
    ``material`` (a catalogue material or one defined in the worksheet). Electric heating: no temperatures.
    ``price`` in the worksheet's currency ``per`` GJ delivered, MWh delivered, or tonne of utility;
    ``co2_kg_per_GJ``: kg of CO2 per GJ delivered. ``source``: where the price and factor come from.
    Steam's condensate is let down to ``flash_pressure`` (gauge or absolute; default the atmosphere) and part of it
    flashes; ``condensate`` says what becomes of that flash steam: ``flash recovered`` (into a lower header: its
    latent heat is credited at this utility's price and CO2 factor) or ``flash lost`` (vented: reported, no
    credit); not given: the flash is reported only.
    """

    name: str = Field(min_length=1, max_length=80)
    kind: Literal[UTILITY_KINDS]  # type: ignore[valid-type]
    pressure: Quantity | None = None
    superheat: Quantity | None = None
    condensate_temperature: Quantity | None = None
    supply_temperature: Quantity | None = None
    return_limit: Quantity | None = None
    material: str | None = Field(default=None, max_length=80)
    mass_fraction: float | None = Field(default=None, ge=0.0, le=1.0)
    price: float = Field(default=0.0, ge=0.0, le=1e9)
    per: Literal["GJ", "MWh", "t"] = "GJ"
    co2_kg_per_GJ: float = Field(default=0.0, ge=0.0, le=1e6)
    source: str = Field(default="site value", max_length=300)
    condensate: Literal["flash recovered", "flash lost"] | None = None
    flash_pressure: Quantity | None = None

    @model_validator(mode="after")
    def _fields_of_kind(self):
        needs = {"steam": ("pressure",), "cooling water": ("supply_temperature", "return_limit"),
                 "chilled water": ("supply_temperature", "return_limit"),
                 "brine": ("supply_temperature", "return_limit", "material"),
                 "hot oil": ("supply_temperature", "return_limit", "material"), "electric": ()}[self.kind]
        missing = [n for n in needs if getattr(self, n) is None]
        if missing:
            raise ValueError(f"a {self.kind} utility needs {', '.join(repr(m) for m in missing)}")
        if self.kind != "steam" and (self.condensate is not None or self.flash_pressure is not None):
            raise ValueError("'condensate' and 'flash_pressure' belong to a steam utility")
        if self.kind == "electric" and self.per == "t":
            raise ValueError("electric heating is priced per GJ or per MWh, not per tonne")
        return self


class Worksheet(_Model):
    """A whole worksheet, version :data:`SCHEMA_VERSION`."""

    schema_version: int = SCHEMA_VERSION
    title: str = Field(default="Untitled worksheet", max_length=200)
    notes: str = Field(default="", max_length=20_000)
    tags: SheetTags = SheetTags()
    basis: Basis = Basis()
    atmosphere: SiteAtmosphere = SiteAtmosphere()  # the reference of gauge pressures (default 1.01325 bar)
    materials: list[UserMaterial] = Field(default_factory=list, max_length=50)
    freezing_materials: list[FreezingMaterial] = Field(default_factory=list, max_length=50)
    common_temperatures: list[CommonTemperature] = Field(default_factory=list, max_length=50)
    streams: list[Stream] = Field(default_factory=list, max_length=500)
    vessels: list[Vessel] = Field(default_factory=list, max_length=50)
    duties: list[Duty] = Field(default_factory=list, max_length=100)
    losses: list[Loss] = Field(default_factory=list, max_length=100)
    reactions: list[Reaction] = Field(default_factory=list, max_length=50)
    mixings: list[Mixing] = Field(default_factory=list, max_length=50)
    unknowns: list[Unknown] = Field(default_factory=list, max_length=10)
    cases: list[Case] = Field(default_factory=list, max_length=50)
    tolerances: list[Tolerance] = Field(default_factory=list, max_length=500)
    exchangers: list[Exchanger] = Field(default_factory=list, max_length=50)
    utilities: list[Utility] = Field(default_factory=list, max_length=50)
    operating_hours: Quantity | None = None  # per year, for the annual cost and CO2 of utilities
    currency: str = Field(default="EUR", min_length=1, max_length=8)

    @field_validator("schema_version")
    @classmethod
    def _known_version(cls, version: int) -> int:
        if version != SCHEMA_VERSION:
            raise ValueError(f"schema_version {version} is not supported; this version reads {SCHEMA_VERSION}")
        return version

    @model_validator(mode="after")
    def _unique_names(self):
        names = [s.name for s in self.streams] + [v.name for v in self.vessels]
        terms = [t.name for t in (*self.duties, *self.losses, *self.reactions, *self.mixings)]
        groups = [("line", names), ("heat term", terms),
                  ("common temperature", [c.name for c in self.common_temperatures]),
                  ("material", [m.name for m in (*self.materials, *self.freezing_materials)]),
                  ("case", [c.name for c in self.cases]),
                  ("tolerance address", [t.address for t in self.tolerances]),
                  ("exchanger", [e.name for e in self.exchangers]), ("utility", [u.name for u in self.utilities])]
        groups += [(f"charge (in vessel {v.name})", [c.name for c in v.charges]) for v in self.vessels]
        for label, group in groups:
            repeated = sorted({n for n in group if group.count(n) > 1})
            if repeated:
                raise ValueError(f"{label} names must be unique; repeated: {', '.join(repeated)}")
        return self


def item_address(collection: str, name: str, *fields: str) -> str:
    """The address of a named list item and of fields under it (syntax: :mod:`heatbalance.address`)."""
    escaped = name.replace("\\", "\\\\").replace("]", "\\]")
    return ".".join((f"{collection}[{escaped}]", *fields))


def _address_of(data, loc: tuple) -> tuple[str, bool]:
    """The address of a pydantic error location in the raw document, items by name (``worksheet`` if none),
    and whether it reaches the whole location (a list item without a usable name stops it short)."""
    parts, node = [], data
    for key in loc:
        if isinstance(key, int):
            item = node[key] if isinstance(node, list) and key < len(node) else None
            name = item.get("name") if isinstance(item, dict) else None
            if not isinstance(name, str) or not parts:
                return ".".join(parts) or "worksheet", False
            parts[-1] = item_address(parts[-1], _visible(name))
            node = item
        elif isinstance(node, dict) and key in ("value", "unit") and {"value", "unit"} <= node.keys():
            break  # inside a typed quantity: the address is the quantity's
        elif isinstance(node, dict):
            parts.append(str(key))
            node = node.get(key)
        elif isinstance(node, str) and key in ("value", "unit"):
            break  # a quantity written as text ("1e999 kg/h")
        else:
            return ".".join(parts) or "worksheet", False
    return ".".join(parts) or "worksheet", True


def _refusal(error: ValidationError, data) -> WorksheetFormatError:
    first = error.errors()[0]
    loc = tuple(p for p in first["loc"] if not (isinstance(p, str) and p.startswith("function-")))
    message = first["msg"].removeprefix("Value error, ")
    more = len(error.errors()) - 1
    suffix = f" (and {more} more problem{'s' if more > 1 else ''})" if more else ""
    address, complete = _address_of(data, loc)
    place = ".".join(str(p) for p in loc)
    text = f"{place}: {message}{suffix}" if place and not complete else message + suffix
    return WorksheetFormatError(text, address, loc=loc)


def _check_shape(data) -> None:
    """Refuse nesting deeper than :data:`MAX_NESTING_DEPTH`, numbers that are not finite, text that is not Unicode."""
    pending = [(data, 1)]
    while pending:
        item, depth = pending.pop()
        if isinstance(item, (dict, list)):
            if depth > MAX_NESTING_DEPTH:
                raise WorksheetFormatError(f"the document is nested more than {MAX_NESTING_DEPTH} levels deep")
            children = item.values() if isinstance(item, dict) else item
            pending.extend((child, depth + 1) for child in children)
            if isinstance(item, dict):
                pending.extend((key, depth) for key in item)
        elif isinstance(item, str):
            try:
                item.encode("utf-8")
            except UnicodeEncodeError:
                raise WorksheetFormatError(f"text {item[:40]!r} is not valid Unicode (a lone surrogate)") from None
        elif isinstance(item, float) and not math.isfinite(item):
            raise WorksheetFormatError(f"{item} is not a finite number")


def _refuse_constant(name: str):
    raise WorksheetFormatError(f"{name} is not a number a worksheet can hold")


def parse_worksheet(data: dict, source: str = "file") -> Worksheet:
    """Validate a decoded JSON document as a worksheet, or raise :class:`WorksheetFormatError`.

    A refusal names the field's address; a problem with the whole document names ``source``
    (``file``, or ``link`` for a share link).

    Older ``schema_version``s are first brought up to date by :func:`heatbalance.migrations.migrate`.
    """
    if not isinstance(data, dict):
        raise WorksheetFormatError("a worksheet is a JSON object", source)
    try:
        data = migrate(data, Worksheet.model_fields)
    except WorksheetFormatError as exc:
        if exc.where:
            raise
        raise WorksheetFormatError(exc.phrase, source) from None
    _check_texts(data)
    try:
        return Worksheet.model_validate(data)
    except ValidationError as exc:
        raise _refusal(exc, data) from None


def load_worksheet(text: str | bytes, source: str = "file") -> Worksheet:
    """Read a worksheet from JSON text (size- and depth-limited), migrating older versions.

    A problem with the whole document (size, JSON, nesting, a number that is not finite) names ``source``.
    """
    if len(text) > MAX_DOCUMENT_BYTES:
        raise WorksheetFormatError(f"the document is {len(text):,} bytes; the limit is {MAX_DOCUMENT_BYTES:,}",
                                   source)
    try:
        data = json.loads(text, parse_constant=_refuse_constant)
        _check_shape(data)
    except WorksheetFormatError as exc:
        raise WorksheetFormatError(exc.phrase, source) from None
    except RecursionError:
        raise WorksheetFormatError(f"the document is nested more than {MAX_NESTING_DEPTH} levels deep",
                                   source) from None
    except ValueError as exc:  # JSONDecodeError, UnicodeDecodeError, too many digits
        raise WorksheetFormatError(f"not valid JSON ({exc.__class__.__name__}: {str(exc)[:120]})", source) from None
    return parse_worksheet(data, source)


def dump_worksheet(worksheet: Worksheet) -> str:
    """The worksheet as indented JSON, without empty optional fields; compact where indented it would be more than
    :func:`load_worksheet` reads (a large sheet the store saves must open again from its file)."""
    data = worksheet.model_dump(mode="json", exclude_none=True)
    text = json.dumps(data, indent=2, ensure_ascii=False)
    if len(text.encode("utf-8")) >= MAX_DOCUMENT_BYTES:  # a file ends with a newline
        text = json.dumps(data, ensure_ascii=False, separators=(",", ":"))
    return text
