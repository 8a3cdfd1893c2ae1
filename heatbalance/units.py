"""The one unit registry, and conversion of typed quantities to plain SI floats.

The engine works in SI floats (K, Pa, kg, kg/s, J, W, s, mol). Units live only
at the edge: :func:`to_si` reads what the user typed, :func:`from_si` writes a
result back in a unit the user chose.

Gauge pressures (``barg``, ``psig``, ``kPag``, ``MPag``) are taken relative to
the site's barometric pressure (``gauge_reference``), by default the standard
atmosphere at sea level, 1.01325 bar (ISO 2533). A site at altitude states its own
(:func:`standard_atmosphere_pressure` converts an altitude).
"""
from __future__ import annotations

import math
import re
from functools import lru_cache
from pathlib import Path

from .errors import InputError, UnitError
from .unit_cache import kept

__all__ = [
    "registry", "ATMOSPHERE", "KINDS", "BOUNDS", "to_si", "from_si", "kind_of", "check_unit",
    "basis_kinds", "heat_kind", "is_gauge", "absolute_unit", "pressure_difference_unit", "standard_atmosphere_pressure",
    "STANDARD_ATMOSPHERE_ALTITUDES",
]

@lru_cache(maxsize=1)
def registry():
    """The one unit registry, built on first use (building it costs a noticeable part of a second)."""
    import pint

    ureg = pint.UnitRegistry(autoconvert_offset_to_baseunit=True, case_sensitive=True)
    # kcal as plant heat duties use it: the International Table calorie (1 kcal/h = 1.163 W), not pint's
    # thermochemical default.
    ureg.define("kcal = 1000 * international_calorie")
    ureg.define("MMBtu = 1e6 * Btu")
    ureg.define("lbmol = 453.59237 * mol = pound_mole")  # exact: a pound of substance in grams-per-mole
    ureg.define("MBtu = 1e3 * Btu")
    ureg.define("TR = ton_of_refrigeration")
    ureg.define("tonne_per_hour = tonne / hour = tph")
    ureg.define("gpm = gallon / minute")  # US gallons per minute, as pumps and meters are rated
    ureg.define("lbm = pound")  # pound-mass, as US process data write it (lbm/h)
    return ureg


def __getattr__(name: str):
    """``units.ureg`` and ``units.Q_``: the registry and its Quantity, built on first use."""
    if name == "ureg":
        return registry()
    if name == "Q_":
        return registry().Quantity
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")

ATMOSPHERE = 101325.0  # Pa, standard atmosphere (ISO 2533): the reference of every gauge pressure

#: kind -> (SI unit, words used in messages)
KINDS: dict[str, tuple[str, str]] = {
    "temperature": ("K", "a temperature"),
    "temperature_difference": ("delta_degC", "a temperature difference"),
    "pressure": ("Pa", "a pressure"),
    "mass": ("kg", "a mass"),
    "mass_flow": ("kg/s", "a mass flow"),
    "energy": ("J", "an energy"),
    "power": ("W", "a power"),
    "duration": ("s", "a duration"),
    "amount": ("mol", "an amount of substance"),
    "molar_flow": ("mol/s", "a molar flow"),
    "molar_energy": ("J/mol", "an energy per mole"),
    "heat_capacity": ("J/K", "a heat capacity"),
    "specific_heat": ("J/(kg*K)", "a specific heat capacity"),
    "specific_energy": ("J/kg", "an energy per unit mass"),
    "molar_mass": ("kg/mol", "a molar mass"),
    "thermal_conductance": ("W/K", "a heat-transfer coefficient times area (e.g. kW/K)"),
    "heat_transfer_coefficient": ("W/(m**2*K)", "a heat-transfer coefficient (e.g. W/(m^2*K))"),
    "area": ("m**2", "an area (e.g. m^2)"),
    "length": ("m", "a length (e.g. mm, m, in)"),
    "velocity": ("m/s", "a speed (e.g. m/s, km/h)"),
    "thermal_conductivity": ("W/(m*K)", "a thermal conductivity (e.g. W/(m*K))"),
    "volume_flow": ("m**3/s", "a volume flow (e.g. m^3/h)"),
}

#: kind -> the largest magnitude accepted, in SI: physically generous, but finite (refused beyond, with the bound)
BOUNDS: dict[str, float] = {
    "temperature": 1e5,  # K
    "temperature_difference": 1e5,  # K
    "pressure": 1e10,  # Pa (100,000 bar)
    "mass": 1e12,  # kg
    "mass_flow": 1e7,  # kg/s (36 Mt/h)
    "energy": 1e18,  # J
    "power": 1e13,  # W
    "duration": 1e10,  # s (about 300 years)
    "amount": 1e15,  # mol
    "molar_flow": 1e10,  # mol/s
    "molar_energy": 1e8,  # J/mol
    "heat_capacity": 1e15,  # J/K
    "specific_heat": 1e6,  # J/(kg·K)
    "specific_energy": 1e9,  # J/kg
    "molar_mass": 1e3,  # kg/mol
    "thermal_conductance": 1e12,  # W/K
    "heat_transfer_coefficient": 1e7,  # W/(m²·K)
    "area": 1e8,  # m²
    "length": 1e5,  # m (100 km of pipe)
    "velocity": 1e3,  # m/s
    "thermal_conductivity": 1e4,  # W/(m·K)
    "volume_flow": 1e7,  # m³/s
}

_GAUGE = {"barg": "bar", "mbarg": "mbar", "psig": "psi", "kPag": "kPa", "MPag": "MPa"}
_ABSOLUTE_ALIASES = {"bara": "bar", "mbara": "mbar", "psia": "psi", "kPaa": "kPa", "MPaa": "MPa"}
_CASE_SLIPS = {name.lower(): name for name in (*_GAUGE, *_ABSOLUTE_ALIASES)}  # PSIG -> psig, BARG -> barg
_TEMPERATURE_ALIASES = {"C": "degC", "°C": "degC", "degC": "degC", "F": "degF", "°F": "degF",
                        "degF": "degF", "K": "K", "R": "degR", "°R": "degR", "degR": "degR"}
_DIFFERENCE_ALIASES = {"K": "K", "degC": "delta_degC", "°C": "delta_degC", "C": "delta_degC",
                       "degF": "delta_degF", "°F": "delta_degF", "F": "delta_degF",
                       "R": "delta_degF", "°R": "delta_degF", "degR": "delta_degF"}


_POWER_OF_LENGTH = re.compile(r"\b(m|dm|cm|mm|ft|in)([23])\b")  # an area or volume typed without "^"


def _normalise(unit: str) -> str:
    """Write typographic forms the way pint reads them: ``kJ/(kg·K)`` -> ``kJ/(kg*K)``."""
    text = unit.strip().replace("·", "*").replace("⋅", "*").replace("²", "**2").replace("³", "**3")
    text = text.replace("°", "deg").replace("deg C", "degC").replace("deg F", "degF").replace("deg R", "degR")
    text = _POWER_OF_LENGTH.sub(r"\1**\2", text)  # m3/h -> m**3/h
    return re.sub(r"\s+", " ", text)


@lru_cache(maxsize=512)
def _unit(text: str):
    return registry().parse_units(text)


def _parse(unit: str, kind: str, where: str) -> tuple:
    """Return (pint unit, offset in Pa for gauge pressures) for a unit typed for ``kind``."""
    text = unit.strip()
    offset = 0.0
    if kind == "temperature":
        text = _TEMPERATURE_ALIASES.get(text, _TEMPERATURE_ALIASES.get(_normalise(text), text))
    elif kind == "temperature_difference":
        text = _DIFFERENCE_ALIASES.get(text, _DIFFERENCE_ALIASES.get(_normalise(text), text))
    elif kind == "pressure":
        if text in _GAUGE:
            text, offset = _GAUGE[text], ATMOSPHERE
        text = _ABSOLUTE_ALIASES.get(text, text)
    try:
        parsed = _unit(_normalise(text))
    except Exception as exc:  # noqa: BLE001 - pint's parser raises many types ("kg/0", "(", "kg**(1/0)")
        meant = _CASE_SLIPS.get(text.lower()) if kind == "pressure" else None
        detail = "not a unit this tool knows" + (f"; units are case-sensitive: write '{meant}'" if meant else "")
        raise UnitError(unit, KINDS[kind][1], where, detail=detail) from exc
    return parsed, offset


# units a plant reads two ways: refused with the choices, never read one way silently
_TON = re.compile(r"(?<![\w.])[kM]?tons?(?![\w.])")  # pint: a US short ton; plants also mean a tonne or a long ton
_AMBIGUOUS_TON = ("'ton' is read three ways: write t for a metric tonne (1000 kg), short_ton (907.2 kg) or long_ton "
                  "(1016 kg)")
_TON_FOR = {"power": "'ton' for a duty is a ton of refrigeration: write TR (12,000 Btu/h = 3.517 kW)",
            "energy": "'ton' is a mass or a cooling rate (TR), not an energy: give it in kJ, kWh or Btu"}
_AMBIGUOUS_PSI = "'psi' does not say gauge or absolute: write psig (above the atmosphere) or psia (absolute)"
# a gauge or absolute pressure unit written apart ('bar g', 'psi(a)', 'kPa_gauge'): pint reads 'psi g' as psi × gram
# ('barü': Überdruck, gauge, as German plants write it)
_PRESSURE_BASES = {base.lower(): base for base in _GAUGE.values()}  # bar, mbar, psi, kPa, MPa (case-blind match)
_PRESSURE_APART = re.compile(rf"^({'|'.join(_PRESSURE_BASES.values())})"
                             r"(?:(?:\s+|_|\s*\()(g|gauge|ü|ue|a|abs|absolute)\)?|(ü|ue))$", re.IGNORECASE)
# kg/cm² as plants write it: 'kg/cm2' (a mass per area to pint), or with a gauge or absolute mark
_KG_PER_CM2 = re.compile(r"^kg(f?)\s*/\s*cm(?:2|\*\*2|\^2|²)\s*(?:[_(]\s*|\s+)?(g|a|gauge|abs)?\)?$", re.IGNORECASE)


def _pressure_spelling(unit: str) -> str:
    """Advice for a pressure unit plants write in a form this tool does not read ('' for any other).

    >>> _pressure_spelling("psi g")[:28], _pressure_spelling("barg"), _pressure_spelling("kgf/cm2")
    ("'psi g' is a gauge pressure:", '', '')
    """
    text = unit.strip()
    apart = _PRESSURE_APART.match(text)
    if apart and text not in _GAUGE and text not in _ABSOLUTE_ALIASES:  # 'barg' and 'bara' are written right
        base = _PRESSURE_BASES[apart.group(1).lower()]
        gauge = (apart.group(2) or apart.group(3)).lower() in ("g", "gauge", "ü", "ue")  # Überdruck: gauge
        return (f"'{text}' is a gauge pressure: write {base}g, in one word (above the atmosphere)" if gauge else
                f"'{text}' is an absolute pressure: write {base}a, in one word")
    kg = _KG_PER_CM2.match(text)
    if kg and (kg.group(2) or not kg.group(1)):
        return (f"'{text}': give a pressure in kg/cm² as barg (gauge) or bar (absolute): 1 kgf/cm² = 0.980665 bar "
                "(kgf/cm2 alone is read as absolute)")
    return ""


# a prefix on an hour, a minute, a day or a tonne is a typing slip in a plant, never meant: 't/hh' reads as tonnes per
# hecto-hour (100 h), 'dt' as a decitonne; a carat ('ct') is no plant mass; a megabar, no plant pressure
_NO_PREFIX = frozenset({"hour", "minute", "day", "week", "month", "year", "metric_ton"})
_ALLOWED_PREFIXES = {"bar": {"milli", "kilo"}}
# a process temperature in mK is a slip; a small temperature difference (a tolerance) in mK is not
_TEMPERATURE_BASES = frozenset({"kelvin", "degree_Celsius", "degree_Fahrenheit", "degree_Rankine"})
_NOT_PLANT_UNITS = frozenset({"carat"})


@lru_cache(maxsize=512)
def _slip(unit: str, kind: str = "") -> str:
    """Why ``unit`` is most likely a typing slip ('' when it is not): a unit pint reads, but through a prefix no plant
    puts there (hecto-hour, decitonne, megabar, millikelvin) or a unit no plant uses (carat).

    >>> _slip("t/hh")[:40], _slip("t/h"), _slip("mbar"), _slip("kWh"), _slip("mK", "temperature_difference")
    ("'hh' reads as hectohour (100 × its hour)", '', '', '', '')
    """
    try:
        names = list(_unit(_normalise(unit))._units)
    except Exception:  # noqa: BLE001 - not a unit at all: refused elsewhere, with its own words
        return ""
    for name in names:
        for prefix, base, _ in registry().parse_unit_name(name):
            allowed = set() if kind == "temperature" and base in _TEMPERATURE_BASES else _ALLOWED_PREFIXES.get(base)
            if base in _NOT_PLANT_UNITS:
                return f"'{name}' is no unit a plant weighs in (a slip for t?)"
            if prefix and (base in _NO_PREFIX or (allowed is not None and prefix not in allowed)):
                typed = next((t for t in re.findall(r"[A-Za-z_µ]+", unit) if _reads_as(t, name)), name)
                factor = registry().Quantity(1, f"{prefix}{base}").to(base).magnitude
                return f"'{typed}' reads as {name} ({factor:g} × its {base.replace('_', ' ')}): a prefix no plant " \
                       f"puts there, most likely a typing slip"
    return ""


def _reads_as(token: str, name: str) -> bool:
    """Whether the typed ``token`` is pint's unit ``name`` (a token pint cannot read is not)."""
    try:
        return _unit(token) == _unit(name)
    except Exception:  # noqa: BLE001 - pint's parser raises many types
        return False


def _ambiguity(unit: str, kind: str) -> str:
    """Why ``unit`` cannot be read for ``kind`` without a guess ('' when it can).

    >>> _ambiguity("ton/h", "mass_flow")[:5], _ambiguity("t/h", "mass_flow"), _ambiguity("psi", "pressure")[:6]
    ("'ton'", '', "'psi' ")
    """
    if kind == "pressure" and unit.strip() == "psi":
        return _AMBIGUOUS_PSI
    if kind == "pressure" and _pressure_spelling(unit):
        return _pressure_spelling(unit)
    if not _TON.search(unit):
        return ""
    return _TON_FOR.get(kind, _AMBIGUOUS_TON)


def check_unit(unit: str, kind: str, where: str = "") -> None:
    """Raise :class:`UnitError` unless ``unit`` measures ``kind``."""
    ambiguity = _ambiguity(unit, kind)
    if ambiguity:
        raise UnitError(unit, "clear", where, detail=ambiguity)
    if not _measures(unit, kind):
        _check_by_pint(unit, kind, where)  # the refusal, with what the unit measures instead


def _check_by_pint(unit: str, kind: str, where: str = "") -> None:
    slip = _slip(unit, kind)  # (here, not with the ambiguities: only a unit met for the first time loads pint)
    if slip:
        raise UnitError(unit, "clear", where, detail=slip)
    parsed, _ = _parse(unit, kind, where)
    if parsed.dimensionality != _unit(KINDS[kind][0]).dimensionality:
        detail = f"it measures {_describe(parsed)}"
        if kind in ("mass", "mass_flow") and parsed.dimensionality in (_unit("m**3").dimensionality,
                                                                       _unit("m**3/s").dimensionality):
            detail += _VOLUME_HINT[kind]
        raise UnitError(unit, KINDS[kind][1], where, detail=detail)


# a volume typed where a mass is needed: the tool does not guess a density (common-practice figures for water)
_VOLUME_HINT = {"mass_flow": "; give the mass flow, e.g. kg/h, t/h or lb/h: for water near 20 °C, 1 m³/h is "
                             "about 998 kg/h and 1 US gpm about 500 lb/h",
                "mass": "; give the mass, e.g. kg, t or lb: for water near 20 °C, 1 m³ is about 998 kg"}


@lru_cache(maxsize=1024)
def _measures(unit: str, kind: str) -> bool:
    """Whether ``unit`` measures ``kind``: as kept from an earlier run, else asked of pint and kept."""
    memo = kept(Path(__file__))
    known = memo.measures.get(memo.key(unit, kind))
    if known is None:
        try:
            _check_by_pint(unit, kind)
            known = True
        except UnitError:
            known = False
        memo.keep_measures(unit, kind, known)
    return known


def kind_of(unit: str, candidates: tuple[str, ...], where: str = "") -> str:
    """The first kind in ``candidates`` that ``unit`` measures, or a :class:`UnitError`."""
    for kind in candidates:
        if _ambiguity(unit, kind):
            check_unit(unit, kind, where)  # the refusal, with the choices
        if _measures(unit, kind):
            return kind
    slip = _slip(unit, candidates[0])
    if slip:
        raise UnitError(unit, "clear", where, detail=slip)
    expected = " or ".join(KINDS[k][1] for k in candidates)
    raise UnitError(unit, expected, where)


def _describe(unit) -> str:
    dims = unit.dimensionality
    for kind, (si, words) in KINDS.items():
        if _unit(si).dimensionality == dims:
            return words[words.index(" ") + 1:] if " " in words else words
    named = next((words for si, words in _OTHER_DIMENSIONS.items() if _unit(si).dimensionality == dims), None)
    return named or (str(dims) if dims else "a pure number")


_OTHER_DIMENSIONS = {"m**3": "volume (e.g. m^3)", "kg/m**3": "density (e.g. kg/m^3)"}  # named in refusals only


def to_si(value: float, unit: str, kind: str, where: str = "", gauge_reference: float = ATMOSPHERE) -> float:
    """Convert ``value unit`` of the given kind to a plain SI float.

    Parameters
    ----------
    value : float
        The number as typed.
    unit : str
        The unit as typed (``"t/h"``, ``"barg"``, ``"°F"``, ``"Btu/(lb*degF)"``).
    kind : str
        One of :data:`KINDS`.
    where : str
        The field, for messages.
    gauge_reference : float
        The site's barometric pressure [Pa] a gauge pressure is relative to (default: 1.01325 bar).

    Returns
    -------
    float
        The value in the SI unit of ``kind`` (absolute pressure in Pa, temperature in K).

    Raises
    ------
    UnitError
        The unit is unknown or of another dimension.
    InputError
        The number is not finite, its magnitude exceeds :data:`BOUNDS` for its kind, a temperature is
        below absolute zero, or a pressure is below vacuum.

    Examples
    --------
    >>> to_si(4, "barg", "pressure")  # 4 bar above the standard atmosphere
    501325.0
    >>> to_si(4, "barg", "pressure", gauge_reference=85000.0)  # 4 bar above a site's 0.85 bar
    485000.0
    >>> round(to_si(212, "degF", "temperature"), 2)
    373.15
    """
    if not isinstance(value, (int, float)) or not math.isfinite(value):
        raise InputError(f"{value!r} is not a finite number", where)
    try:
        if _ambiguity(unit, kind):
            raise UnitError(unit, "clear")
        scale, offset = _affine(unit, kind)
    except UnitError:
        check_unit(unit, kind, where)  # the same refusal, naming the field
        raise
    si = value * scale + offset
    if gauge_reference != ATMOSPHERE and kind == "pressure" and is_gauge(unit):
        si += gauge_reference - ATMOSPHERE
    if not abs(si) <= BOUNDS[kind]:
        bound = from_si(BOUNDS[kind], unit, kind) if kind not in ("temperature", "pressure") else None
        limit = f"{bound:.3g} {unit}" if bound is not None else f"{BOUNDS[kind]:g} {KINDS[kind][0]}"
        raise InputError(f"{value:g} {unit} is beyond any plant scale: {KINDS[kind][1]} is accepted up to "
                         f"{limit}", where)
    if kind == "temperature" and si < 0:
        raise InputError(f"{value:g} {unit} is below absolute zero (0 K = -273.15 °C = -459.67 °F)", where)
    if kind == "pressure" and si <= 0:
        raise InputError(f"{value:g} {unit} is at or below a perfect vacuum (absolute pressure must be > 0;"
                         f" gauge units are relative to {gauge_reference / 1e5:.5g} bar)", where)
    return float(si)


@lru_cache(maxsize=1024)
def _affine(unit: str, kind: str) -> tuple[float, float]:
    """(scale, offset) with SI = value·scale + offset; every kind here is affine in its unit (cached)."""
    memo = kept(Path(__file__))
    found = memo.get_affine(unit, kind)
    if found is None:
        found = _affine_by_pint(unit, kind)
        memo.keep_affine(unit, kind, *found)
    return found


def _affine_by_pint(unit: str, kind: str) -> tuple[float, float]:
    if not _measures(unit, kind):  # (an ambiguous unit is refused where a value is read, not here)
        _check_by_pint(unit, kind)
    parsed, gauge = _parse(unit, kind, "")
    si_unit = KINDS[kind][0]
    quantity = registry().Quantity
    offset = quantity(0.0, parsed).to(si_unit).magnitude
    scale = quantity(1.0, parsed).to(si_unit).magnitude - offset
    return float(scale), float(offset + gauge)


def from_si(value: float, unit: str, kind: str, gauge_reference: float = ATMOSPHERE) -> float:
    """Convert an SI float of the given kind to ``unit`` (the inverse of :func:`to_si`)."""
    scale, offset = _affine(unit, kind)
    if gauge_reference != ATMOSPHERE and kind == "pressure" and is_gauge(unit):
        offset += gauge_reference - ATMOSPHERE
    return (value - offset) / scale


def pressure_difference_unit(unit: str) -> str | None:
    """The unit a difference of pressures typed in ``unit`` is written in: neither gauge nor absolute (``barg``,
    ``bara`` -> ``bar``; ``psig``, ``psia`` -> ``psi``); None for a unit that is no pressure unit of the gauge table.

    >>> pressure_difference_unit("barg"), pressure_difference_unit("psia"), pressure_difference_unit("kPa")
    ('bar', 'psi', 'kPa')
    """
    text = unit.strip()
    return _GAUGE.get(text) or _ABSOLUTE_ALIASES.get(text) or (text if text in _GAUGE.values() else None)


def absolute_unit(gauge: str) -> str:
    """The absolute pressure unit to write for a gauge one (``barg`` -> ``bar``; ``psig`` -> ``psia``, for a bare
    ``psi`` is refused); ``bar`` for a unit that is no gauge unit.

    >>> absolute_unit("psig"), absolute_unit("kPag"), absolute_unit("bar")
    ('psia', 'kPa', 'bar')
    """
    base = _GAUGE.get(gauge.strip(), "bar")
    return "psia" if base == "psi" else base


def is_gauge(unit: str) -> bool:
    """Whether a pressure unit is a gauge unit (relative to the site's barometric pressure).

    >>> is_gauge("barg"), is_gauge(" psig"), is_gauge("bar"), is_gauge("psia")
    (True, True, False, False)
    """
    return unit.strip() in _GAUGE


#: m: the altitudes the standard atmosphere's troposphere relation is used over (ISO 2533: the troposphere
#: reaches 11 km; below sea level to the lowest inhabited land, about -430 m at the Dead Sea, with a margin)
STANDARD_ATMOSPHERE_ALTITUDES = (-500.0, 11000.0)


def standard_atmosphere_pressure(altitude: float) -> float:
    """Barometric pressure at an altitude by the ISO 2533 (ICAO) standard atmosphere, troposphere.

    p = 101325 Pa · (1 − 2.25577·10⁻⁵ · h)^5.25588   (h in m)

    Parameters
    ----------
    altitude : float
        Height above mean sea level [m].

    Returns
    -------
    float
        Pressure [Pa].

    Raises
    ------
    InputError
        Outside :data:`STANDARD_ATMOSPHERE_ALTITUDES` (the relation holds in the troposphere only).

    Notes
    -----
    The standard atmosphere is a yearly mean at mid-latitudes (15 °C at sea level, lapse rate 6.5 K/km);
    the weather moves the real barometric pressure by a few percent. A site that measures its own enters
    the barometric pressure instead.

    Examples
    --------
    >>> round(standard_atmosphere_pressure(0.0))  # ISO 2533: sea level
    101325
    >>> round(standard_atmosphere_pressure(1500.0))  # ISO 2533 table: 84.56 kPa at 1500 m, from memory
    84556

    References
    ----------
    ISO 2533:1975, Standard Atmosphere; ICAO Doc 7488/3, Manual of the ICAO Standard Atmosphere (1993).
    """
    low, high = STANDARD_ATMOSPHERE_ALTITUDES
    if not low <= altitude <= high:
        raise InputError(f"the standard atmosphere (ISO 2533, troposphere) is used from {low:g} m to {high:g} m,"
                         f" not {altitude:g} m: enter the site's barometric pressure instead", "atmosphere.altitude")
    return 101325.0 * (1.0 - 2.25577e-5 * altitude) ** 5.25588


#: role -> (kind of a total, kind of a rate): what a field of that role measures
_ROLES = {"amount": ("mass", "mass_flow"), "heat": ("energy", "power"), "moles": ("amount", "molar_flow")}


def basis_kinds(role: str, basis: str) -> tuple[str, ...]:
    """The kinds a field takes on a basis, the one results are in first: the one rule for basis -> unit kind.

    Continuous: rates only. Batch: a total, or a rate applied over the batch duration.

    >>> basis_kinds("amount", "continuous"), basis_kinds("heat", "batch")
    (('mass_flow',), ('energy', 'power'))
    """
    total, rate = _ROLES[role]
    return (rate,) if basis == "continuous" else (total, rate)


def heat_kind(basis: str) -> str:
    """The unit kind of heat on a basis: power when continuous, energy in batch."""
    return basis_kinds("heat", basis)[0]
