"""Worksheet as typed -> problem in SI: the one place where typed units become plain floats.

Every refusal raised here carries the address of the field at fault (see
:mod:`heatbalance.address`). The problem holds each line, equipment heat and heat
term in SI, the temperature variables, the unknown (as an address and a target),
and the SI inputs of any vessel's thermal screening.
"""
from __future__ import annotations

import math
from dataclasses import dataclass, field
from functools import cached_property

from .address import get as get_input
from .address import item, unknown_address
from .address import label as address_label
from .errors import InputError
from .humid_air import HUMID_AIR, HUMIDITY_FORMS, HumidAir, humidity_ratio, volume_per_dry_air
from .losses import MIN_INSULATION, PERSONNEL_PROTECTION_LIMIT, Surface, insulation_names
from .freezing import BOUND_WATER_PER_PROTEIN, FOOD_T_MIN, EnthalpyTable, FoodByComposition
from .library_phases import LibraryPhase, library_phase
from .materials import get_material
from .messages import Measure, Phrase
from .mixing import MixingHeat, mixing_heat, solute_named
from .mixing import sources as heat_sources
from .properties import Material, Phase, TabulatedMaterial
from .reactions import reaction_enthalpy
from .units import ATMOSPHERE, basis_kinds, is_gauge, kind_of, standard_atmosphere_pressure, to_si
from .worksheet import FreezingMaterial, Quantity, State, Unknown, UserMaterial, Worksheet

__all__ = ["StateSpec", "Line", "EquipmentHeat", "HeatTerm", "ComputedLoss", "JacketInputs", "ScreeningInputs", "ExchangerInputs",
           "UtilityInputs", "DEFAULT_MINIMUM_APPROACH", "Problem",
           "build_problem", "basis_si", "typed_si", "site_atmosphere", "freezing_material", "ASSUMPTIONS"]

ASSUMPTIONS = [
    "Ideal mixing: no heat of mixing or solution unless stated as a mixing (heats of solution table) or entered "
    "as a duty.",
    "Losses: a typed loss as entered; a computed one from its surface (its own assumptions below).",
    "Reaction heat: an entered ΔH as entered; ΔH from an equation at the process temperature (Kirchhoff) where known.",
]  # and the reference of gauge pressures, with the site's value (site_atmosphere)


# --------------------------------------------------------------------------- the problem model
@dataclass
class StateSpec:
    """A state in SI: either on a temperature variable, or on a plateau at a fraction.

    ``label`` is the state's address (``streams[Steam].inlet``).
    """

    label: str
    P: float
    var: str | None = None
    plateau: str | None = None  # boiling | melting
    fraction: float | None = None  # of the upper phase
    pressure_address: str = ""  # the field its pressure comes from: its own, or its line's or vessel's

    @cached_property
    def temperature_address(self) -> str:
        return f"{self.label}.temperature"


@dataclass
class Line:
    name: str
    kind: str  # stream | charge
    material_name: str
    material: Material
    amount: float | None  # kg/s or kg (None: the unknown)
    initial: StateSpec
    final: StateSpec
    address: str = ""  # of the line: streams[S] or vessels[V].charges[C]
    vessel: str | None = None  # for a charge: its vessel and its own name
    charge: str | None = None

    @property
    def amount_address(self) -> str:
        return f"{self.address}.{'flow' if self.kind == 'stream' else 'mass'}"


@dataclass
class EquipmentHeat:
    name: str
    vessel: str
    initial_var: str
    final: StateSpec  # the vessel's final state (its temperature)
    final_material: Material
    heat_capacity: float | None = None  # J/K
    material: Material | None = None
    mass: float = 0.0

    @property
    def address(self) -> str:
        return item("vessels", self.vessel, "equipment")


@dataclass
class HeatTerm:
    name: str
    kind: str  # duty | loss | reaction | mixing
    heat: float | None  # + into the process; None: the unknown
    detail: Phrase = field(default_factory=lambda: Phrase(""))
    vessel: str | None = None  # a reaction's vessel, as named
    computed: ComputedLoss | None = None  # a loss computed from its surface (heat set by the solver)
    mixing: MixingHeat | None = None  # a stated mixing: its solute, strengths and amounts (heatbalance.mixing)
    mixing_T: float | None = None  # K: that mixing's final temperature, set by the solver (None: not known)
    mixing_at_25: bool = True  # its heat is the 25 °C one (the solutions' cp data do not reach, or no mixing_T)
    potential: float | None = None  # a reaction's heat at full conversion (what the screening counts)


@dataclass
class ComputedLoss:
    """A loss computed from geometry (:mod:`heatbalance.losses`), SI: the surface, the process side's
    temperature [K] or the line whose mean temperature it is, the protection limit [K], and the factor that
    turns the power into the term's heat (1, or the batch duration [s])."""

    surface: Surface
    address: str  # losses[L].surface
    process_T: float | None = None
    line: Line | None = None
    limit: float = PERSONNEL_PROTECTION_LIMIT
    per_power: float = 1.0


@dataclass
class JacketInputs:
    """A jacket heating or cooling the batch, SI (K, W/K)."""

    utility_T: float
    target_T: float
    start_T: float | None
    UA: float


@dataclass
class ScreeningInputs:
    """A vessel's optional screening inputs, SI (K); ``None`` where not entered."""

    accumulation: float = 1.0
    T_D24: float | None = None
    MTT: float | None = None
    T_process: float | None = None
    thermal_inertia: bool = False
    jacket: JacketInputs | None = None
    chemicals: dict[str, str] = field(default_factory=dict)  # charge -> the chemical it is for the bubble point
    activity_model: str = "UNIFAC"


#: K: the minimum approach when none is entered: about 10 K for shell-and-tube liquid service (common practice,
#: no source; 3–5 K for plate exchangers, 20 K or more where one side is a gas; sites set their own)
DEFAULT_MINIMUM_APPROACH = 10.0


@dataclass
class ExchangerInputs:
    """An exchanger in SI: its hot and cold lines (by name), arrangement, minimum approach [K], U [W/(m²·K)],
    area [m²], UA [W/K] (``None`` where not entered)."""

    name: str
    hot: list[str]
    cold: list[str]
    arrangement: str
    shells: int
    minimum_approach: float
    approach_entered: bool
    U: float | None = None
    area: float | None = None
    UA: float | None = None
    utility_side: str | None = None
    sets: str | None = None  # the address of the input its rating sets (rating as a way of solving)

    @property
    def address(self) -> str:
        return item("exchangers", self.name)


@dataclass
class UtilityInputs:
    """A site utility in SI (K, Pa absolute); prices and CO2 factors as entered (currency per GJ/MWh/t, kg/GJ)."""

    name: str
    kind: str
    material: Material | None = None
    P: float | None = None  # Pa absolute (steam; the coolant's pressure)
    superheat: float = 0.0  # K above saturation
    condensate_T: float | None = None  # K (None: saturated)
    supply_T: float | None = None
    return_T: float | None = None
    price: float = 0.0
    per: str = "GJ"
    co2_kg_per_GJ: float = 0.0
    source: str = "site value"
    condensate: str | None = None  # flash recovered | flash lost | None (reported only)
    flash_P: float = ATMOSPHERE  # Pa absolute the condensate is let down to: the site's barometric pressure
    #                              unless the utility names its flash pressure
    flash_stated: bool = False  # the utility names its flash pressure (else the site's atmosphere)

    @property
    def address(self) -> str:
        return item("utilities", self.name)


@dataclass
class Problem:
    """A worksheet in plain SI numbers."""

    title: str
    basis: str
    lines: list[Line]
    equipment: list[EquipmentHeat]
    terms: list[HeatTerm]
    temperatures: dict[str, float | None]
    var_addresses: dict[str, str]  # temperature variable -> the address of its field
    unknown: Unknown
    unknown_target: object  # a Line, a HeatTerm, or a temperature variable key
    unknown_address: str
    unknown_typed_unit: str | None = None  # the unit typed in the unknown's field (None: none typed)
    unknown_label: str = ""  # the unknown's field in words
    vessels: list[str] = field(default_factory=list)
    screening: dict[str, ScreeningInputs] = field(default_factory=dict)  # vessel -> its inputs
    warnings: list[Phrase] = field(default_factory=list)
    assumptions: list[str | Phrase] = field(default_factory=list)
    duration: float | None = None  # s, the batch duration a rate is applied over
    exchangers: list[ExchangerInputs] = field(default_factory=list)
    utilities: list[UtilityInputs] = field(default_factory=list)
    operating_hours: float | None = None  # s per year
    currency: str = "EUR"
    atmosphere: float = ATMOSPHERE  # Pa: the site's barometric pressure, the reference of every gauge pressure


# --------------------------------------------------------------------------- building
def _si(q: Quantity, kind: str, where: str, atmosphere: float = ATMOSPHERE) -> float:
    return to_si(q.value, q.unit, kind, where, gauge_reference=atmosphere)


def typed_si(value: float, unit: str, kind: str, where: str, atmosphere: float = ATMOSPHERE) -> float:
    """A typed value in SI, with the refusals of any input (bounds, absolute zero, vacuum): for analyses that
    write typed values into a built problem (a sweep's points). ``atmosphere``: the problem's site pressure,
    the reference of a gauge pressure."""
    return to_si(value, unit, kind, where, gauge_reference=atmosphere)


#: Pa: the barometric pressures a site may enter (the standard atmosphere from 11 km up to 500 m below sea
#: level spans 22.6 to 107.5 kPa; the weather adds a few percent)
SITE_PRESSURES = (20e3, 110e3)


def site_atmosphere(ws: Worksheet) -> tuple[float, Phrase]:
    """The site's barometric pressure [Pa] and the assumption that states it: entered, from the altitude by the
    ISO 2533 standard atmosphere, or the standard atmosphere at sea level (1.01325 bar)."""
    site = ws.atmosphere
    if site.barometric_pressure is not None:
        where = "atmosphere.barometric_pressure"
        if is_gauge(site.barometric_pressure.unit):
            raise InputError(f"the barometric pressure is absolute; {site.barometric_pressure} is a gauge pressure "
                             "(use bar, kPa, psia, …)", where)
        P = _si(site.barometric_pressure, "pressure", where)
        if not SITE_PRESSURES[0] <= P <= SITE_PRESSURES[1]:
            raise InputError(f"a site's barometric pressure lies between {SITE_PRESSURES[0] / 1e5:g} and "
                             f"{SITE_PRESSURES[1] / 1e5:g} bar, not {site.barometric_pressure}", where)
        how = Phrase("the site's barometric pressure as entered")
    elif site.altitude is not None:
        h = _si(site.altitude, "length", "atmosphere.altitude")
        P = standard_atmosphere_pressure(h)
        how = Phrase("the ISO 2533 standard atmosphere at the site's altitude, {h}", {"h": str(site.altitude)})
    else:
        P, how = ATMOSPHERE, Phrase("the standard atmosphere at sea level; no site pressure or altitude entered")
    return P, Phrase("Gauge pressures are relative to {P}: " + how.template + ".",
                     {"P": Measure(P, "pressure", digits=6), **how.values})


def basis_si(value: float, unit: str, role: str, basis: str, duration: float | None,
             where: str) -> tuple[float, bool]:
    """A typed value of a role (``amount``, ``heat``, ``moles``) on a basis, in SI, and whether a rate was
    applied over the batch duration (continuous: rates only; batch: a total, or a rate times the duration)."""
    kinds = basis_kinds(role, basis)
    kind = kinds[0] if len(kinds) == 1 else kind_of(unit, kinds, where)
    si = to_si(value, unit, kind, where)
    if basis == "batch" and kind == kinds[1]:
        if duration is None:
            raise InputError(f"{value:g} {unit} is a rate; a batch worksheet needs a duration to apply it", where)
        return si * duration, True
    return si, False


class _Builder:
    """Turns a validated :class:`Worksheet` into a :class:`Problem`."""

    def __init__(self, ws: Worksheet):
        self.ws = ws
        self.basis = ws.basis.kind
        self.duration = self._duration()
        self.warnings: list[Phrase] = []  # defaults a checker should see (a user material's range)
        self.user_materials = {m.name: _user_material(m, self.warnings) for m in ws.materials}
        self.user_materials.update({f.name: freezing_material(f) for f in ws.freezing_materials})
        self.temperatures: dict[str, float | None] = {}
        self.var_addresses: dict[str, str] = {}
        self.atmosphere, atmosphere_assumption = site_atmosphere(ws)
        self.assumptions = [*ASSUMPTIONS, atmosphere_assumption]
        self.unknown = _the_unknown(ws)

    def _duration(self) -> float | None:
        q = self.ws.basis.duration
        if q is None:
            return None
        value = _si(q, "duration", "basis.duration")
        if value <= 0:
            raise InputError(f"the duration must be positive, not {q}", "basis.duration")
        return value

    # -- quantities on the basis
    def basis_value(self, q: Quantity, role: str, where: str) -> float:
        """A total (batch) or a rate (continuous); a rate in batch is applied over the duration."""
        value, over_duration = basis_si(q.value, q.unit, role, self.basis, self.duration, where)
        if over_duration:
            self.assumptions.append(f"{where}: {q} applied over the batch duration {self.ws.basis.duration}.")
        return value

    def amount(self, q: Quantity | None, where: str, is_unknown: bool) -> float | None:
        if is_unknown:
            return None
        if q is None:
            raise InputError("no value given, and it is not the unknown: enter it or make it the unknown",
                             where)
        value = self.basis_value(q, "amount", where)
        if value < 0:
            raise InputError(f"a mass or flow cannot be negative ({q})", where)
        return value

    def material(self, name: str, fraction: float | None, where: str) -> Material:
        return get_material(name, fraction, self.user_materials, where)

    # -- temperatures and states
    def variable(self, key: str, address: str, q: Quantity | None) -> str:
        is_unknown = self.unknown.kind == "temperature" and self._unknown_var == key
        if q is None and not is_unknown:
            raise InputError("no temperature given, and it is not the unknown: enter it or make it the unknown",
                             address)
        self.temperatures[key] = None if is_unknown else _si(q, "temperature", address)
        self.var_addresses[key] = address
        return key

    def state(self, state: State, key: str, address: str, line_pressure: float) -> StateSpec:
        """``line_pressure``: the line's (or vessel's) pressure, used unless the state has its own."""
        if state.pressure:
            P, P_address = self.pressure(state.pressure, f"{address}.pressure"), f"{address}.pressure"
        else:
            P, P_address = line_pressure, f"{address.rpartition('.')[0]}.pressure"
        if "].charges[" in address and not state.pressure:  # a charge is at its vessel's pressure
            P_address = f"{address.partition('.charges[')[0]}.pressure"
        is_unknown = self.unknown.kind == "temperature" and self._unknown_var == key
        if state.common is not None and not is_unknown:
            spec = StateSpec(address, P, var=self._common_key(state.common, address))
        elif not is_unknown and state.vapour_fraction is not None:
            spec = StateSpec(address, P, plateau="boiling", fraction=state.vapour_fraction)
        elif not is_unknown and state.solid_fraction is not None:
            spec = StateSpec(address, P, plateau="melting", fraction=1.0 - state.solid_fraction)
        else:
            spec = StateSpec(address, P, var=self.variable(key, f"{address}.temperature", state.temperature))
        spec.pressure_address = P_address
        return spec

    def pressure(self, q: Quantity, where: str) -> float:
        """A typed pressure in Pa absolute, a gauge pressure relative to the site's barometric pressure."""
        return _si(q, "pressure", where, self.atmosphere)

    def _common_key(self, name: str, where: str) -> str:
        key = f"common:{name}"
        if key not in self.temperatures:
            raise InputError(f"no shared temperature called '{name}'", f"{where}.common")
        return key

    # -- the unknown
    @cached_property
    def _unknown_var(self) -> str | None:
        u = self.unknown
        if u.kind != "temperature":
            return None
        if u.common is not None:
            return f"common:{u.common}"
        if u.charge is not None:
            charge = next((c for v in self.ws.vessels if v.name == u.line for c in v.charges if c.name == u.charge),
                          None)
            if charge is not None:
                common = charge.initial.common
                return f"common:{common}" if common else f"charge:{u.line}/{u.charge}:initial"
        stream = next((s for s in self.ws.streams if s.name == u.line), None)
        if stream is not None and u.end in ("inlet", "outlet"):
            state = stream.inlet if u.end == "inlet" else stream.outlet
            return f"common:{state.common}" if state.common else f"stream:{u.line}:{u.end}"
        vessel = next((v for v in self.ws.vessels if v.name == u.line), None)
        if vessel is not None and u.end == "final":
            return f"common:{vessel.final.common}" if vessel.final.common else f"vessel:{u.line}:final"
        raise InputError(f"the unknown names no field of this worksheet ({unknown_address(u)})", "unknown")

    # -- the whole problem
    def build(self) -> Problem:
        ws = self.ws
        if ws.vessels and self.basis == "continuous":
            raise InputError("vessels hold batch charges: switch the basis to batch, or model the vessel's "
                             "feeds as streams", item("vessels", ws.vessels[0].name))
        if not ws.streams and not ws.vessels:
            raise InputError("the worksheet has no streams or vessels", "worksheet")
        unknown_var = self._unknown_var
        for common in ws.common_temperatures:
            self.variable(f"common:{common.name}", item("common_temperatures", common.name, "temperature"),
                          common.temperature)
        lines = [self._stream(s) for s in ws.streams]
        equipment = []
        for vessel in ws.vessels:
            vessel_lines, vessel_equipment = self._vessel(vessel)
            lines += vessel_lines
            equipment += vessel_equipment
        self.lines = lines
        terms = self._terms()
        target, address = self._target(lines, terms, unknown_var)
        screening = {v.name: self._screening(v) for v in ws.vessels}
        typed = get_input(ws, address)
        hours = None
        if ws.operating_hours is not None:
            hours = _si(ws.operating_hours, "duration", "operating_hours")
            if not 0 < hours <= 366 * 86400:
                raise InputError(f"operating hours are per year: more than 0 and at most 8784 h, not "
                                 f"{ws.operating_hours}", "operating_hours")
        return Problem(ws.title, self.basis, lines, equipment, terms, self.temperatures, self.var_addresses,
                       self.unknown, target, address, typed.unit if isinstance(typed, Quantity) else None,
                       address_label(address), [v.name for v in ws.vessels], screening, warnings=self.warnings,
                       assumptions=self.assumptions, duration=self.duration,
                       exchangers=[self._exchanger(e) for e in ws.exchangers],
                       utilities=[self._utility(u) for u in ws.utilities], operating_hours=hours,
                       currency=ws.currency, atmosphere=self.atmosphere)

    def _exchanger(self, e) -> ExchangerInputs:
        where = item("exchangers", e.name)
        if self.basis != "continuous":
            raise InputError("an exchanger is checked on a continuous basis (flows and powers); this worksheet is "
                             "a batch", where)
        streams = [s.name for s in self.ws.streams]
        for side in ("hot", "cold"):
            for name in getattr(e, side):
                if name not in streams:
                    raise InputError(f"no stream called '{name}' (there are: {', '.join(streams) or 'none'})",
                                     f"{where}.{side}")

        def positive(q: Quantity | None, kind: str, name: str) -> float | None:
            if q is None:
                return None
            value = _si(q, kind, f"{where}.{name}")
            if not value > 0:
                raise InputError(f"{name} must be positive, not {q}", f"{where}.{name}")
            return value

        approach = DEFAULT_MINIMUM_APPROACH
        if e.minimum_approach is not None:
            approach = _si(e.minimum_approach, "temperature_difference", f"{where}.minimum_approach")
            if approach < 0:
                raise InputError(f"a minimum approach cannot be negative ({e.minimum_approach})",
                                 f"{where}.minimum_approach")
        U, area, UA = (positive(e.U, "heat_transfer_coefficient", "U"), positive(e.area, "area", "area"),
                       positive(e.UA, "thermal_conductance", "UA"))
        if U is not None and not U_PLAUSIBLE[0] <= U <= U_PLAUSIBLE[1]:
            self.warnings.append(Phrase("Exchanger {name}: U {typed} is {U}, outside what exchangers have ({low}, gas "
                                        "to gas, to {high}, condensing steam): check its unit (W or kW, m² or ft²).",
                                        {"name": e.name, "typed": str(e.U), "U": Measure(U, "heat_transfer_coefficient"),
                                         "low": Measure(U_PLAUSIBLE[0], "heat_transfer_coefficient"),
                                         "high": Measure(U_PLAUSIBLE[1], "heat_transfer_coefficient")}, f"{where}.U"))
        if UA is None and U is not None and area is not None:
            UA = U * area
        return ExchangerInputs(e.name, list(e.hot), list(e.cold), e.arrangement, e.shells, approach,
                               e.minimum_approach is not None, U, area, UA, e.utility_side, e.sets)

    def _utility(self, u) -> UtilityInputs:
        where = item("utilities", u.name)

        def temperature(name: str) -> float | None:
            q = getattr(u, name)
            return None if q is None else _si(q, "temperature", f"{where}.{name}")

        out = UtilityInputs(u.name, u.kind, price=u.price, per=u.per, co2_kg_per_GJ=u.co2_kg_per_GJ, source=u.source,
                           flash_P=self.atmosphere)
        if u.pressure is not None:
            out.P = self.pressure(u.pressure, f"{where}.pressure")
        if u.superheat is not None:
            out.superheat = _si(u.superheat, "temperature_difference", f"{where}.superheat")
            if out.superheat < 0:
                raise InputError(f"superheat cannot be negative ({u.superheat})", f"{where}.superheat")
        out.condensate = u.condensate
        if u.flash_pressure is not None:
            out.flash_P = self.pressure(u.flash_pressure, f"{where}.flash_pressure")
            out.flash_stated = True
        out.condensate_T, out.supply_T, out.return_T = (temperature("condensate_temperature"),
                                                        temperature("supply_temperature"), temperature("return_limit"))
        if u.kind in ("steam", "cooling water", "chilled water"):
            out.material = self.material("water", None, f"{where}.kind")
        elif u.material is not None:
            out.material = self.material(u.material, u.mass_fraction, f"{where}.material")
        if out.P is None and out.material is not None:
            out.P = self.atmosphere + 3e5  # a coolant or oil loop at 3 barg (its enthalpy hardly depends on it)
        cold = u.kind in ("cooling water", "chilled water", "brine")
        if out.supply_T is not None and out.return_T is not None:
            if cold and not out.return_T > out.supply_T:
                raise InputError(f"a coolant's return limit must be warmer than its supply ({u.return_limit} vs "
                                 f"{u.supply_temperature})", f"{where}.return_limit")
            if u.kind == "hot oil" and not out.return_T < out.supply_T:
                raise InputError(f"a hot oil's return limit must be colder than its supply ({u.return_limit} vs "
                                 f"{u.supply_temperature})", f"{where}.return_limit")
        return out

    def _stream(self, s) -> Line:
        where = item("streams", s.name)
        P = self.pressure(s.pressure, f"{where}.pressure")
        is_unknown = self.unknown.kind == "amount" and self.unknown.line == s.name and self.unknown.charge is None
        if s.material == HUMID_AIR:
            return self._humid_air_stream(s, where, P, is_unknown)
        for end in ("inlet", "outlet"):
            if getattr(s, end).humidity is not None:
                raise InputError(f"a humidity belongs to humid air; {s.material} has none", f"{where}.{end}.humidity")
        return Line(s.name, "stream", s.material, self.material(s.material, s.mass_fraction, f"{where}.material"),
                    self.amount(s.flow, f"{where}.flow", is_unknown),
                    self.state(s.inlet, f"stream:{s.name}:inlet", f"{where}.inlet", P),
                    self.state(s.outlet, f"stream:{s.name}:outlet", f"{where}.outlet", P), address=where)

    def _humid_air_stream(self, s, where: str, P: float, is_unknown: bool) -> Line:
        """A humid-air stream: its humidity ratio from the inlet's humidity, its flow counted as dry air."""
        if s.outlet.humidity is not None:
            raise InputError("the outlet's humidity follows from the inlet's (the water stays with the air; below "
                             "the dew point it condenses): give the humidity at the inlet only",
                             f"{where}.outlet.humidity")
        if s.inlet.humidity is None:
            raise InputError(f"humid air needs the inlet's humidity: one of {', '.join(HUMIDITY_FORMS)}",
                             f"{where}.inlet.humidity")
        inlet = self.state(s.inlet, f"stream:{s.name}:inlet", f"{where}.inlet", P)
        outlet = self.state(s.outlet, f"stream:{s.name}:outlet", f"{where}.outlet", P)
        form = next(k for k in HUMIDITY_FORMS if getattr(s.inlet.humidity, k) is not None)
        field_where = f"{where}.inlet.humidity.{form}"
        value = getattr(s.inlet.humidity, form)
        value = _si(value, "temperature", field_where) if isinstance(value, Quantity) else value
        T_in = self.temperatures.get(inlet.var) if inlet.var else None
        T_humid = T_in  # the temperature the humidity is read at
        if T_in is None and form == "dew_point":
            T_humid, form, value = value, "relative_humidity", 1.0  # saturated at its dew point: the same water
        elif T_in is None and form != "humidity_ratio":
            raise InputError(f"a {form.replace('_', ' ')} needs the inlet's temperature: give it, or give the "
                             "humidity as a humidity ratio or a dew point", field_where)
        probe = HumidAir(0.0)  # the inlet's own range refusals come first, at their fields
        probe.check_pressure(inlet.P, inlet.pressure_address)
        if inlet.var is not None and self.temperatures.get(inlet.var) is not None:
            probe.check_range(T_in, self.var_addresses[inlet.var])
        W = humidity_ratio(form, value, T_humid if T_humid is not None else 293.15, inlet.P, field_where)
        material = HumidAir(W)
        amount = self._air_amount(s, where, W, T_in, inlet.P, is_unknown)
        self.assumptions.append(f"{where}: humid air, counted per kg of dry air (humidity ratio {W:.5f} kg/kg); "
                                "water it cannot hold condenses and leaves at the air's temperature.")
        return Line(s.name, "stream", s.material, material, amount, inlet, outlet, address=where)

    def _air_amount(self, s, where: str, W: float, T_in: float | None, P: float, is_unknown: bool) -> float | None:
        """The dry-air flow of a humid-air stream from its mass flow (dry or humid air) or its volume flow."""
        air = s.air_flow
        if air is None or air.volume_flow is None:
            amount = self.amount(s.flow, f"{where}.flow", is_unknown)
            if air is not None and air.mass_of == "humid air":
                if amount is None:
                    raise InputError("a solved flow is of dry air: set 'mass_of' to dry air", f"{where}.air_flow")
                amount /= 1.0 + W
            return amount
        volume_where = f"{where}.air_flow.volume_flow"
        if s.flow is not None or is_unknown:
            raise InputError("give the flow one way: a mass 'flow' (or the unknown), or this volume flow",
                             volume_where)
        if self.basis != "continuous":
            raise InputError("a volume flow is for a continuous worksheet; give the batch's mass", volume_where)
        V = _si(air.volume_flow, "volume_flow", volume_where)
        if V < 0:
            raise InputError(f"a volume flow cannot be negative ({air.volume_flow})", volume_where)
        T = T_in if air.volume_temperature is None else \
            _si(air.volume_temperature, "temperature", f"{where}.air_flow.volume_temperature")
        if T is None:
            raise InputError("give the temperature the volume flow is measured at (the inlet's is the unknown)",
                             f"{where}.air_flow.volume_temperature")
        try:
            return V / volume_per_dry_air(T, P, W)
        except InputError as exc:
            raise InputError(exc.phrase, f"{where}.air_flow.volume_temperature") from None

    def _vessel(self, v) -> tuple[list[Line], list[EquipmentHeat]]:
        where = item("vessels", v.name)
        P = self.pressure(v.pressure, f"{where}.pressure")
        final = self.state(v.final, f"vessel:{v.name}:final", f"{where}.final", P)
        lines = []
        for c in v.charges:
            cw = f"{where}.{item('charges', c.name)}"
            if c.material == HUMID_AIR or c.initial.humidity is not None:
                raise InputError("humid air is modelled for streams; a batch of air is a charge of 'air'",
                                 f"{cw}.{'material' if c.material == HUMID_AIR else 'initial.humidity'}")
            is_unknown = (self.unknown.kind == "amount" and self.unknown.line == v.name
                          and self.unknown.charge == c.name)
            lines.append(Line(f"{v.name} / {c.name}", "charge", c.material,
                              self.material(c.material, c.mass_fraction, f"{cw}.material"),
                              self.amount(c.mass, f"{cw}.mass", is_unknown),
                              self.state(c.initial, f"charge:{v.name}/{c.name}:initial", f"{cw}.initial", P),
                              final, address=cw, vessel=v.name, charge=c.name))
        if final.plateau and len({line.material_name for line in lines}) > 1:
            raise InputError("a final phase fraction needs all charges of one material; give a temperature",
                             f"{where}.final")
        return lines, ([self._equipment(v, lines, final)] if v.equipment else [])

    def _equipment(self, v, lines: list[Line], final: StateSpec) -> EquipmentHeat:
        e, where = v.equipment, item("vessels", v.name, "equipment")
        if e.initial_temperature is not None:
            initial = self.variable(f"equipment:{v.name}:initial", f"{where}.initial_temperature",
                                    e.initial_temperature)
        elif lines[0].initial.var is not None:
            initial = lines[0].initial.var
            self.assumptions.append(f"{where}: starts at the temperature of the vessel's first charge, "
                                    f"{lines[0].charge} (give equipment.initial_temperature to set it).")
        else:
            raise InputError("give the equipment's initial temperature (the first charge starts on a plateau)",
                             f"{where}.initial_temperature")
        heat = EquipmentHeat(f"{v.name} equipment", v.name, initial, final, lines[0].material)
        if e.heat_capacity is not None:
            heat.heat_capacity = _si(e.heat_capacity, "heat_capacity", f"{where}.heat_capacity")
            if heat.heat_capacity < 0:
                raise InputError(f"a heat capacity cannot be negative ({e.heat_capacity})", f"{where}.heat_capacity")
        else:
            heat.material = self.material(e.material, None, f"{where}.material")
            heat.mass = _si(e.mass, "mass", f"{where}.mass")
            if heat.mass < 0:
                raise InputError(f"a mass cannot be negative ({e.mass})", f"{where}.mass")
        return heat

    def _terms(self) -> list[HeatTerm]:
        terms = []
        for d in self.ws.duties:
            where = item("duties", d.name, "value")
            is_unknown = self.unknown.kind == "duty" and self.unknown.term == d.name
            if d.value is None and not is_unknown:
                raise InputError("no value given, and it is not the unknown", where)
            value = None if is_unknown else self.basis_value(d.value, "heat", where)
            terms.append(HeatTerm(d.name, "duty", value, Phrase("heater +, cooler −")))
        for loss in self.ws.losses:
            if loss.surface is not None:
                terms.append(self._computed_loss(loss))
                continue
            where = item("losses", loss.name, "value")
            value = self.basis_value(loss.value, "heat", where)
            if value < 0:
                raise InputError(f"enter a loss as a positive amount of heat leaving ({loss.value})", where)
            terms.append(HeatTerm(loss.name, "loss", -value, Phrase(f"{loss.value} lost")))
        for r in self.ws.reactions:
            terms.append(self._reaction(r))
        terms += [self._mixing(m) for m in self.ws.mixings]
        return terms

    def _computed_loss(self, loss) -> HeatTerm:
        """A loss computed from its surface: geometry in SI, refused field by field."""
        s, where = loss.surface, item("losses", loss.name, "surface")

        def positive(q: Quantity, kind: str, name: str, zero: bool = False) -> float:
            value = _si(q, kind, f"{where}.{name}")
            if value < 0 or (value == 0 and not zero):
                raise InputError(f"{name.replace('_', ' ')} must be {'zero or more' if zero else 'positive'}, "
                                 f"not {q}", f"{where}.{name}")
            return value

        def temperature(q: Quantity | None, name: str) -> float | None:
            return None if q is None else _si(q, "temperature", f"{where}.{name}")

        insulation, thickness = None, 0.0
        if s.insulation is not None:
            insulation = s.insulation.material
            if insulation not in insulation_names():
                raise InputError(f"no insulation called '{insulation}' (there are: {', '.join(insulation_names())})",
                                 f"{where}.insulation.material")
            thickness = positive(s.insulation.thickness, "length", "insulation.thickness", zero=True)
            if 0 < thickness < MIN_INSULATION:
                raise InputError(f"insulation is 0 (bare) or at least 1 mm thick, not {s.insulation.thickness}",
                                 f"{where}.insulation.thickness")
        surface = Surface(s.shape, positive(s.diameter, "length", "diameter"),
                          0.0 if s.length is None else positive(s.length, "length", "length"), s.emissivity,
                          insulation, thickness, temperature(s.ambient_temperature, "ambient_temperature"),
                          temperature(s.surroundings_temperature, "surroundings_temperature"),
                          0.0 if s.wind_speed is None else positive(s.wind_speed, "velocity", "wind_speed", zero=True))
        self.warnings.extend(_implausible_surface(surface, s, where))
        computed = ComputedLoss(surface, where, temperature(s.process_temperature, "process_temperature"))
        if s.protection_limit is not None:
            computed.limit = temperature(s.protection_limit, "protection_limit")
        if s.line is not None:
            lines = [ln for ln in self.lines if ln.name == s.line or ln.vessel == s.line]
            if not lines:
                names = [ln.name for ln in self.lines if ln.kind == "stream"] + list(dict.fromkeys(
                    ln.vessel for ln in self.lines if ln.vessel))
                raise InputError(f"no stream or vessel called '{s.line}' (there are: {', '.join(names)})",
                                 f"{where}.line")
            computed.line = lines[0]
        if self.basis == "batch":
            if self.duration is None:
                raise InputError("a computed loss is a power: a batch worksheet needs its duration to apply it",
                                 "basis.duration")
            computed.per_power = self.duration
            self.assumptions.append(f"{where}: the computed loss applies over the batch duration "
                                    f"{self.ws.basis.duration}, at the mean of the start and end temperatures.")
        self.assumptions.append(f"{where}: the inside film and the metal wall are neglected (the bare surface, or "
                                "the insulation's inner face, is at the process temperature).")
        return HeatTerm(loss.name, "loss", 0.0, Phrase("computed from its surface"), computed=computed)

    def _mixing(self, m) -> HeatTerm:
        where = item("mixings", m.name)
        solute = solute_named(m.solute, f"{where}.solute")
        if m.vessel is not None and m.vessel not in [v.name for v in self.ws.vessels]:
            raise InputError(f"no vessel called '{m.vessel}' (there are: "
                             f"{', '.join(v.name for v in self.ws.vessels) or 'none'})", f"{where}.vessel")
        amount = self.amount(m.amount, f"{where}.amount", False)
        heat = mixing_heat(solute.name, amount, m.from_fraction, m.with_fraction, m.to_fraction, where)
        self.assumptions.append(f"{where}: heat of mixing from integral heats of solution at 25 °C, taken to the "
                                "mixture's final temperature by Kirchhoff's law with the solutions' cp (Laliberté): "
                                "the mixed solution's cp in place of its parts' where their data reach, else at "
                                "25 °C with a warning. Table: " + "; ".join(heat_sources(solute.name)) + ".")
        amount_kind = basis_kinds("amount", self.basis)[0]
        detail = Phrase("{solute}: {x1} mixed with {mass_b} at {x2} to {x3}; ΔH_s from {h1} to {h3} "
                        "(integral heats of solution at {T})",
                        {"solute": solute.formula, "x1": f"{m.from_fraction:.1%}", "x2": f"{m.with_fraction:.1%}",
                         "x3": f"{m.to_fraction:.1%}", "mass_b": Measure(heat.mass_b, amount_kind),
                         "h1": Measure(heat.dH1, "molar_energy"), "h3": Measure(heat.dH3, "molar_energy"),
                         "T": Measure(298.15, "temperature", 0)})
        return HeatTerm(m.name, "mixing", heat.released, detail, vessel=m.vessel, mixing=heat)

    def _reaction(self, r) -> HeatTerm:
        where = item("reactions", r.name)
        hess = None if r.equation is None else reaction_enthalpy(r.equation, r.key_reactant,
                                                                 where=f"{where}.equation")
        dH = _si(r.enthalpy, "molar_energy", f"{where}.enthalpy") if r.enthalpy is not None else hess.dH_per_key
        if hess is not None:
            used = "the entered ΔH is used; the equation gives " if r.enthalpy is not None else ""
            tables = "; ".join(f"{name} = {source}" for name, source in hess.sources.items())
            self.assumptions.append(f"{where}: {used}{hess.text}. Tables: {tables}.")
        at_temperature = None
        if hess is not None and r.enthalpy is None:
            at_temperature = self._kirchhoff(r, hess, where)
            dH = at_temperature.dH_T / hess.key_coefficient if at_temperature else dH
        if r.enthalpy is not None:
            self.warnings.extend(_typed_reaction_heat_checks(r, dH, hess, where))
        moles = self._moles(r, hess, f"{where}.amount")
        reacted = moles * r.conversion
        entered = str(r.enthalpy) if r.enthalpy is not None else \
            f"{hess.dH_per_key / 1000:.2f} kJ/mol {hess.key_reactant} (Hess's law, 25 °C)"
        amount_kind = basis_kinds("moles", "batch")[0] if self.basis == "batch" else "molar_flow"
        values = {"entered": entered, "reacted": Measure(reacted, amount_kind), "conversion": f"{r.conversion:.0%}"}
        template = "ΔH = {entered} × {reacted} reacted (conversion {conversion})"
        if at_temperature is not None and at_temperature.corrected:
            template = "ΔH = {entered} at {T} (Kirchhoff; {standard} at 25 °C by Hess's law) × {reacted} reacted " \
                       "(conversion {conversion})"
            values.update(entered=f"{dH / 1000:.2f} kJ/mol {hess.key_reactant}", T=Measure(at_temperature.T,
                          "temperature", 1), standard=f"{hess.dH_per_key / 1000:.2f} kJ/mol")
        detail = Phrase(template, values)
        return HeatTerm(r.name, "reaction", -dH * reacted, detail, vessel=r.vessel, potential=-dH * moles)

    def _reaction_temperature(self, r) -> tuple[float | None, str]:
        """K and the field it comes from: the reaction's own, else its vessel's screening process temperature; None
        when neither is entered (not the vessel's final temperature: the answer must not depend on which field is
        the unknown)."""
        where = item("reactions", r.name)
        if r.temperature is not None:
            return _si(r.temperature, "temperature", f"{where}.temperature"), f"{where}.temperature"
        vessels = [v for v in self.ws.vessels if v.name == r.vessel or (r.vessel is None and len(self.ws.vessels) == 1)]
        if not vessels:
            return None, ""
        v = vessels[0]
        if v.screening is not None and v.screening.process_temperature is not None:
            address = item("vessels", v.name, "screening", "process_temperature")
            return _si(v.screening.process_temperature, "temperature", address), address
        return None, ""

    def _kirchhoff(self, r, hess, where: str):
        """ΔH of the equation at the process temperature (Kirchhoff), with its assumption or warning; None when no
        process temperature is known (ΔH at 25 °C, said)."""
        from .kirchhoff import correlation_source, reaction_enthalpy_at

        T, source = self._reaction_temperature(r)
        if T is None:
            self.assumptions.append(f"{where}: ΔH at 25 °C (no Kirchhoff correction): no reaction temperature "
                                    f"entered ({where}.temperature)")
            return None
        if not 100.0 <= T <= 3000.0:
            raise InputError(Phrase("ΔH at temperature (Kirchhoff's law over the species' cp correlations) is taken "
                                    "from 100 K to 3000 K, not at {T}", {"T": Measure(T, "temperature", 1)}), source)
        result = reaction_enthalpy_at(hess, T)
        if result.beyond:
            species, top = result.beyond[0]
            raise InputError(Phrase("{species} is written as a liquid or a solid, but its heat-capacity data in that "
                                    "phase end at {top}, below the reaction temperature {T}: it is not in that phase "
                                    "there. Write the species in its phase at {T} (e.g. (g)), or give ΔH at "
                                    "temperature yourself", {"species": species, "top": Measure(top, "temperature", 1),
                                                             "T": Measure(T, "temperature", 1)}), source)
        if not math.isfinite(result.dH_T):
            raise InputError(Phrase("the species' cp correlations give no finite ΔH at {T}",
                                    {"T": Measure(T, "temperature", 1)}), source)
        if result.missing:
            self.warnings.append(Phrase(
                "Reaction {name}: no heat-capacity data for {species}: ΔH is applied at its 25 °C value, not at the "
                "process temperature {T} (no Kirchhoff correction). Enter ΔH at temperature if it matters.",
                {"name": r.name, "species": ", ".join(result.missing), "T": Measure(T, "temperature", 1)},
                address=f"{where}.equation"))
            return result
        words = "; ".join(f"{s} = {m} ({correlation_source(m)})" for s, m in result.correlations.items())
        extrapolated = f"; extrapolated beyond its data: {', '.join(result.extrapolated)}" \
            if result.extrapolated else ""
        self.assumptions.append(Phrase(
            "{where}: ΔH at {T} ({source}) by Kirchhoff's law, ΔH(T) = ΔH(25 °C) + ∫Δcp dT with each species in its "
            "written phase: {dH_T} vs {dH_25} at 25 °C per mol {key}. cp(T) from thermo: {words}{extrapolated}.",
            {"where": where, "T": Measure(T, "temperature", 1), "source": source,
             "dH_T": Measure(result.dH_T / hess.key_coefficient, "molar_energy"),
             "dH_25": Measure(hess.dH_per_key, "molar_energy"), "key": hess.key_reactant, "words": words,
             "extrapolated": extrapolated}))
        return result

    def _moles(self, r, hess, where: str) -> float:
        by_mass = r.molar_mass is not None or (
            hess is not None and kind_of(r.amount.unit, basis_kinds("moles", self.basis)
                                         + basis_kinds("amount", self.basis), where) in ("mass", "mass_flow"))
        if not by_mass:
            moles = self.basis_value(r.amount, "moles", where)
        else:
            mass = self.basis_value(r.amount, "amount", where)
            if r.molar_mass is None:
                M = hess.key_molar_mass
            else:
                M = _si(r.molar_mass, "molar_mass", f"{where.rpartition('.')[0]}.molar_mass")
                if M <= 0:
                    raise InputError(f"a molar mass must be positive ({r.molar_mass})",
                                     f"{where.rpartition('.')[0]}.molar_mass")
            moles = mass / M
        if moles < 0:
            raise InputError(f"the amount reacted cannot be negative ({r.amount})", where)
        return moles

    def _screening(self, v) -> ScreeningInputs:
        s, where = v.screening, item("vessels", v.name, "screening")
        if s is None:
            return ScreeningInputs()

        def temperature(name: str) -> float | None:
            q = getattr(s, name)
            return None if q is None else _si(q, "temperature", f"{where}.{name}")

        charges = [c.name for c in v.charges]
        for c in s.components:
            if c.charge not in charges:
                raise InputError(f"no charge called '{c.charge}' in vessel {v.name} (charges: {', '.join(charges)})",
                                 f"{where}.{item('components', c.charge)}")
        return ScreeningInputs(s.accumulation, temperature("T_D24"), temperature("MTT"),
                               temperature("process_temperature"), s.thermal_inertia,
                               None if s.jacket is None else _jacket(s.jacket, f"{where}.jacket"),
                               {c.charge: c.chemical for c in s.components}, s.activity_model)

    def _target(self, lines: list[Line], terms: list[HeatTerm], var: str | None) -> tuple[object, str]:
        u = self.unknown
        if u.kind == "temperature":
            if var not in self.var_addresses:
                raise InputError(f"the unknown names no temperature of this worksheet ({unknown_address(u)})",
                                 "unknown")
            return var, unknown_address(u)
        if u.kind == "amount":
            line = next((ln for ln in lines if ln.amount is None), None)
            if line is None:
                raise InputError(f"the unknown names no line of this worksheet ({unknown_address(u)})", "unknown")
            return line, line.amount_address
        term = next((t for t in terms if t.heat is None), None)
        if term is None:
            raise InputError(f"the unknown names no duty of this worksheet ({unknown_address(u)})", "unknown")
        return term, item("duties", term.name, "value")


def _jacket(j, where: str) -> JacketInputs:
    def positive(q: Quantity, kind: str, name: str) -> float:
        value = _si(q, kind, f"{where}.{name}")
        if not value > 0:
            raise InputError(f"{name} must be positive, not {q}", f"{where}.{name}")
        return value

    UA = positive(j.UA, "thermal_conductance", "UA") if j.UA is not None else \
        positive(j.U, "heat_transfer_coefficient", "U") * positive(j.area, "area", "area")
    start = None if j.start_temperature is None else \
        _si(j.start_temperature, "temperature", f"{where}.start_temperature")
    return JacketInputs(_si(j.utility_temperature, "temperature", f"{where}.utility_temperature"),
                        _si(j.target_temperature, "temperature", f"{where}.target_temperature"), start, UA)


def _the_unknown(ws: Worksheet) -> Unknown:
    if not ws.unknowns:
        raise InputError("no unknown: mark one quantity (a flow or mass, a temperature, or a duty) to solve for",
                         "unknown")
    if len(ws.unknowns) > 1:
        listed = "; ".join(unknown_address(u) for u in ws.unknowns)
        raise InputError(f"{len(ws.unknowns)} unknowns ({listed}): a balance solves for exactly one; "
                         "give a value to all but one", "unknown")
    return ws.unknowns[0]


# cp a process material has [J/(kg·K)]: lead 130 to hydrogen gas 14,300; a liquid at most about 5,000 (water 4,180,
# ammonia 4,700): common practice, no source. Outside, a unit slip (J for kJ, kcal for kJ) is the likelier cause.
CP_PLAUSIBLE = (100.0, 15_000.0)
LIQUID_CP_MAX = 5_000.0
# U of an exchanger [W/(m²·K)]: about 5 (gas to gas, natural convection) to 15,000 (condensing steam on a plate
# exchanger): common practice, no source. Outside, a unit slip (kW for W) is the likelier cause.
U_PLAUSIBLE = (5.0, 15_000.0)
# a latent heat [J/kg]: about 10 kJ/kg (some waxes, helium) to 2,500 (water near 0 °C): common practice, no source
LATENT_PLAUSIBLE = (1_000.0, 5_000_000.0)
# |ΔH| of a reaction [J/mol]: weak neutralisations and isomerisations from a few kJ/mol, combustion of large
# molecules to several thousand: common practice, no source
REACTION_DH_PLAUSIBLE = (1_000.0, 10_000_000.0)


def _checked_cp(material: str, phase: Phase, typed, low: float, high: float, where: str) -> list[Phrase]:
    """A phase's cp(T) = a + b·T + c·T² over its range [low, high]: refused where it is not positive, a warning
    where it leaves what process materials have (a unit slip is the likelier cause)."""
    a, b, c = (tuple(phase.cp) + (0.0, 0.0))[:3]
    temperatures = [low, high] + ([-b / (2 * c)] if c and low < -b / (2 * c) < high else [])
    values = {T: a + b * T + c * T * T for T in temperatures}
    T_least = min(values, key=values.get)
    if values[T_least] <= 0:
        raise InputError(Phrase("cp = a + b·T + c·T² of the {phase} phase falls to {cp} at {T}: it must stay positive "
                                "from {low} to {high}; check the temperature coefficients",
                                {"phase": phase.name, "cp": Measure(values[T_least], "specific_heat"),
                                 "T": Measure(T_least, "temperature", 1), "low": Measure(low, "temperature", 1),
                                 "high": Measure(high, "temperature", 1)}), where)
    limit = LIQUID_CP_MAX if "liquid" in phase.name.lower() else CP_PLAUSIBLE[1]
    if CP_PLAUSIBLE[0] <= min(values.values()) and max(values.values()) <= limit:
        return []
    shown = min(values.values()) if min(values.values()) < CP_PLAUSIBLE[0] else max(values.values())
    return [Phrase("{material}, {phase} phase: cp {typed} reaches {cp}, outside what {what} have ({low} to {high}): "
                   "check the unit (J or kJ, kcal or kJ).",
                   {"material": material, "phase": phase.name, "typed": str(typed), "cp": Measure(shown, "specific_heat"),
                    "what": "liquids" if limit == LIQUID_CP_MAX else "process materials",
                    "low": Measure(CP_PLAUSIBLE[0], "specific_heat"), "high": Measure(limit, "specific_heat")}, where)]


# wind above hurricane force (Beaufort 12, 32.7 m/s; WMO) and emissivities below polished silver's (about 0.02,
# Incropera Table A.12, from memory) are likelier a slip (km/h for m/s, 0 for 0.9) than a plant's surface
STORM_WIND = 32.7
LEAST_EMISSIVITY = 0.02


def _implausible_surface(surface: Surface, typed, where: str) -> list[Phrase]:
    out = []
    if surface.wind > STORM_WIND:
        out.append(Phrase("wind {typed} is above hurricane force ({storm}): check the value and its unit (km/h or "
                          "m/s)", {"typed": str(typed.wind_speed), "storm": Measure(STORM_WIND, "velocity")},
                          f"{where}.wind_speed"))
    if surface.emissivity < LEAST_EMISSIVITY:
        out.append(Phrase("emissivity {e} is below a polished metal's (about {least}): the surface then loses no heat "
                          "by radiation; check the value (paint and cladding: 0.1 to 0.95)",
                          {"e": f"{surface.emissivity:g}", "least": f"{LEAST_EMISSIVITY:g}"}, f"{where}.emissivity"))
    return out


def _typed_reaction_heat_checks(r, dH: float, hess, where: str) -> list[Phrase]:
    """A typed ΔH of an implausible size (a unit slip), or of the opposite sign to its own equation's."""
    out = []
    if not REACTION_DH_PLAUSIBLE[0] <= abs(dH) <= REACTION_DH_PLAUSIBLE[1]:
        out.append(Phrase("Reaction {name}: ΔH {typed} is {dH} in magnitude, outside what reactions worth a balance "
                          "release ({low} to {high}): check the unit (J/mol or kJ/mol).",
                          {"name": r.name, "typed": str(r.enthalpy), "dH": Measure(abs(dH), "molar_energy"),
                           "low": Measure(REACTION_DH_PLAUSIBLE[0], "molar_energy"),
                           "high": Measure(REACTION_DH_PLAUSIBLE[1], "molar_energy")}, f"{where}.enthalpy"))
    if hess is not None and dH * hess.dH_per_key < 0:
        out.append(Phrase("Reaction {name}: the typed ΔH {typed} has the opposite sign to its equation's {hess} "
                          "(Hess's law): an exothermic reaction has a negative ΔH. The typed value is used; check "
                          "its sign.", {"name": r.name, "typed": str(r.enthalpy),
                                        "hess": Measure(hess.dH_per_key, "molar_energy")}, f"{where}.enthalpy"))
    return out


_PHASE_RANK = {"solid": 0, "ice": 0, "liquid": 1, "vapour": 2, "vapor": 2, "gas": 2}  # coldest first


def _phase_names(m: UserMaterial, where: str, warnings: list[Phrase]) -> None:
    """Each phase named once (its address names it); a warning when the names read hotter before colder."""
    names = [p.name for p in m.phases]
    twice = next((n for n in names if names.count(n) > 1), None)
    if twice is not None:
        raise InputError(f"two phases are called '{twice}': name each phase once (its address names it)",
                         f"{where}.phases")
    ranks = [_PHASE_RANK.get(n.strip().lower()) for n in names]
    known = [(r, n) for r, n in zip(ranks, names) if r is not None]
    backwards = next(((a, b) for (ra, a), (rb, b) in zip(known, known[1:]) if rb < ra), None)
    if backwards is not None:
        warnings.append(Phrase("{material}: phases go coldest first, and '{hot}' comes before '{cold}': check their "
                               "order (each phase ends at its 'up_to' with the latent heat to the next)",
                               {"material": m.name, "hot": backwards[0], "cold": backwards[1]}, f"{where}.phases"))


def _user_material(m: UserMaterial, warnings: list[Phrase]) -> TabulatedMaterial:
    where = item("materials", m.name)
    _phase_names(m, where, warnings)
    phases, spans = [], []  # spans: the library phase's range, or None for a phase of the user's own data
    for i, p in enumerate(m.phases):
        pw = f"{where}.{item('phases', p.name)}"
        last = i == len(m.phases) - 1
        if not last and (p.up_to is None or p.latent_heat is None):
            raise InputError("every phase but the last needs 'up_to' (its transition temperature) and "
                             "'latent_heat'", f"{pw}.{'up_to' if p.up_to is None else 'latent_heat'}")
        T_upper = _si(p.up_to, "temperature", f"{pw}.up_to") if not last else math.inf
        latent = 0.0 if last else _si(p.latent_heat, "specific_energy", f"{pw}.latent_heat")
        if latent < 0:
            raise InputError(f"a latent heat cannot be negative ({p.latent_heat})", f"{pw}.latent_heat")
        if 0 < latent < LATENT_PLAUSIBLE[0] or latent > LATENT_PLAUSIBLE[1]:
            warnings.append(Phrase("{material}: the latent heat {typed} above the {phase} phase is {latent}, outside "
                                   "what materials have ({low} to {high}): check the unit (J/kg or kJ/kg).",
                                   {"material": m.name, "typed": str(p.latent_heat), "phase": p.name,
                                    "latent": Measure(latent, "specific_energy"),
                                    "low": Measure(LATENT_PLAUSIBLE[0], "specific_energy"),
                                    "high": Measure(LATENT_PLAUSIBLE[1], "specific_energy")}, f"{pw}.latent_heat"))
        if p.from_library is not None:
            library, span = library_phase(p.from_library, p.name, f"{pw}.from_library")
            phases.append(LibraryPhase(p.name, library, span, T_upper=T_upper, latent_to_next=latent))
            spans.append(span)
            continue
        cp0 = _si(p.cp, "specific_heat", f"{pw}.cp")
        scale = cp0 / p.cp.value if p.cp.value else 1.0
        if cp0 <= 0:
            raise InputError(f"cp must be positive ({p.cp})", f"{pw}.cp")
        phases.append(Phase(p.name, (cp0, p.cp_per_kelvin * scale, p.cp_per_kelvin2 * scale), T_upper, latent))
        spans.append(None)
    t_min = _end_temperature(m, "min_temperature", spans[0], warnings)
    t_max = _end_temperature(m, "max_temperature", spans[-1], warnings)
    uppers = [p.T_upper for p in phases[:-1]]
    if not t_min < t_max or uppers != sorted(uppers) or any(not t_min <= T <= t_max for T in uppers):
        raise InputError("temperatures must rise: min temperature < each transition < max temperature",
                         f"{where}.max_temperature")
    for phase, typed, span, low, high in zip(phases, m.phases, spans, [t_min, *uppers], [*uppers, t_max]):
        if span is None:
            warnings.extend(_checked_cp(m.name, phase, typed.cp, low, high, f"{where}.{item('phases', phase.name)}.cp"))
        if span is not None and not (span.T_low - 1e-6 <= low and high <= span.T_high + 1e-6):
            raise InputError(Phrase("{library}'s {phase} phase at 1 atm covers {low} to {high}; this phase would "
                                    "span {from} to {to}: move its transitions or the min/max temperature inside",
                                    {"library": phase.material.name, "phase": phase.name,
                                     "low": Measure(span.T_low, "temperature"),
                                     "high": Measure(span.T_high, "temperature"),
                                     "from": Measure(low, "temperature"), "to": Measure(high, "temperature")}),
                             f"{where}.{item('phases', phase.name)}.from_library")
    borrowed = "".join(f"; {p.name} phase: the library's {p.material.name} at 1 atm ({p.material.source})"
                       for p in phases if isinstance(p, LibraryPhase))
    material = TabulatedMaterial(m.name, tuple(phases), t_min, t_max, f"user-defined: {m.source}{borrowed}")
    material.valid_min = spans[0].valid_low if spans[0] is not None else None
    material.valid_max = spans[-1].valid_high if spans[-1] is not None else None
    return material


def _end_temperature(m: UserMaterial, field_name: str, span, warnings: list[Phrase]) -> float:
    """A user material's min or max temperature: as typed, else the end of its end phase's library data."""
    where = f"{item('materials', m.name)}.{field_name}"
    typed = getattr(m, field_name)
    if typed is not None:
        return _si(typed, "temperature", where)
    end = "lower" if field_name == "min_temperature" else "upper"
    phase = m.phases[0] if end == "lower" else m.phases[-1]
    if span is None:
        raise InputError(f"give the {field_name.replace('_', ' ')}: the {phase.name} phase is this worksheet's own "
                         "data, so its range is not known (a phase taken from the library brings its own)", where)
    T = span.T_low if end == "lower" else span.T_high
    warnings.append(Phrase("{material}: no {field} given; {T} is used, the {end} end of {library}'s {phase} data "
                           "at 1 atm.", {"material": m.name, "field": field_name.replace("_", " "),
                                         "T": Measure(T, "temperature"), "end": end, "library": phase.from_library,
                                         "phase": phase.name}, where))
    return T


def freezing_material(f: FreezingMaterial) -> Material:
    """A material that freezes over a range, by composition or by its enthalpy table (issue 13, item 2)."""
    where = item("freezing_materials", f.name)
    T_freeze = None if f.initial_freezing_point is None else \
        _si(f.initial_freezing_point, "temperature", f"{where}.initial_freezing_point")
    if f.enthalpy_table is not None:
        return _enthalpy_table(f, T_freeze, f"{where}.enthalpy_table")
    fractions = dict(f.composition)
    total = sum(fractions.values())
    if any(x < 0 for x in fractions.values()) or abs(total - 1.0) > 1e-3:
        raise InputError(f"the mass fractions must not be negative and must add up to 1 (they add up to {total:.4g})",
                         f"{where}.composition")
    if fractions.get("water", 0.0) <= BOUND_WATER_PER_PROTEIN * fractions.get("protein", 0.0):
        raise InputError("the water fraction must exceed the bound water (0.4 × protein, Schwartzberg 1976): "
                         "with no freezable water the material does not freeze", f"{where}.composition")
    if not FOOD_T_MIN < T_freeze < 273.15:
        raise InputError(Phrase("the initial freezing point must lie between {low} (the Choi–Okos correlations' lower "
                                "limit) and {high}, not {T}", {"low": Measure(FOOD_T_MIN, "temperature"),
                                                               "high": Measure(273.15, "temperature"),
                                                               "T": Measure(T_freeze, "temperature")}),
                         f"{where}.initial_freezing_point")
    return FoodByComposition(f.name, fractions, T_freeze, f"user-defined: {f.source}")


def _enthalpy_table(f: FreezingMaterial, T_freeze: float | None, where: str) -> EnthalpyTable:
    temperatures = [_si(row.temperature, "temperature", where) for row in f.enthalpy_table]
    enthalpies = [_si(row.enthalpy, "specific_energy", where) for row in f.enthalpy_table]
    for i in range(1, len(temperatures)):
        if not (temperatures[i] > temperatures[i - 1] and enthalpies[i] > enthalpies[i - 1]):
            raise InputError(f"rows {i} and {i + 1}: temperature and enthalpy must both rise from row to row "
                             f"({f.enthalpy_table[i - 1].temperature}, {f.enthalpy_table[i - 1].enthalpy} then "
                             f"{f.enthalpy_table[i].temperature}, {f.enthalpy_table[i].enthalpy})", where)
    return EnthalpyTable(f.name, tuple(temperatures), tuple(enthalpies), f.source, T_freeze)


def build_problem(ws: Worksheet) -> Problem:
    """Check a worksheet and convert it to SI numbers (refusals name the field's address)."""
    return _Builder(ws).build()
