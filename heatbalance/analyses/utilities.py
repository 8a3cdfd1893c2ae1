"""Which utility, and what does it cost? Utility flows, feasibility, cost and CO2 for each duty (SI).

A *duty* to meet is a heater or cooler duty term of the balance, or the process side of an exchanger whose
``utility_side`` is set. For each site utility of the right sense (hot utilities for heating, cold ones for
cooling) the flow is the duty divided by the heat one kilogram gives or takes, from the utility's own
property data at its pressure (water: IAPWS-IF97 through CoolProp):

* steam: h(T_sat + superheat, P) − h(condensate), the condensate saturated liquid at P or subcooled to its
  temperature; the condensate let down to the flash pressure (default the atmosphere) flashes a fraction
  x = (h_condensate − h_f) / h_fg there, reported as a flow (m·x). ``condensate: flash recovered``: that flash
  steam's latent heat m·x·h_fg is credited (it replaces this steam heat for heat, an assumption stated on the
  row), so cost and CO2 are paid on (duty − credit); ``flash lost``: vented, no credit;
* cooling water, chilled water, brine: h(T_return) − h(T_supply), the return no warmer than its limit nor than
  what the process allows at every point of its T–Q curve (counter-current: a coolant that has taken the share
  s of the duty must still be ΔT_min below the process there; a condensing plateau inside the range is where it
  usually pinches, and a note says so);
* hot oil: h(T_supply) − h(T_return), likewise ΔT_min above the process at every point, the return no colder
  than its limit;
* electric heating: the duty itself (resistive, efficiency 1, stated).

Feasibility is checked at the ends and at the condensing temperature (counter-current): steam must
condense at least ΔT_min above the process's hottest temperature and its condensate leave at least ΔT_min
above the process's coldest; a coolant's supply must be at least ΔT_min below the process's coldest
temperature (cooling water cannot cool below its supply plus the approach); a hot oil's supply ΔT_min above
the hottest. An infeasible utility is kept with its refusal (an :class:`~heatbalance.errors.InputError`
at the utility's field), never dropped silently. The exchanger check (:mod:`.exchangers`) draws the full
curves; this table is a first choice.

Cost per hour = price × (GJ or MWh delivered per hour, or tonnes of utility per hour) × (1 − credit/duty);
per year × the operating hours; CO2 per year = factor [kg/GJ] × GJ per year × (1 − credit/duty).
"""
from __future__ import annotations

from dataclasses import dataclass, field

from ..errors import HeatBalanceError, InputError
from ..address import item
from ..messages import Measure, Phrase
from ..problem import DEFAULT_MINIMUM_APPROACH, Problem, UtilityInputs
from ..results import Result
from ..worksheet import Utility
from .curves import composite, line_paths

__all__ = ["DEMO_UTILITIES", "demo_utilities", "Demand", "UtilityOption", "UtilityTable", "utility_option", "utility_tables", "demands", "HOT_KINDS",
           "COLD_KINDS", "ELECTRIC_NOTE", "FLASH_RECOVERED_NOTE", "FLASH_LOST_NOTE", "return_limit_warnings", "SAME_SUPPLY_K"]

HOT_KINDS = ("steam", "hot oil", "electric")
COLD_KINDS = ("cooling water", "chilled water", "brine")
ELECTRIC_NOTE = "resistive heating, efficiency 1; element surface temperature not checked"
FLASH_RECOVERED_NOTE = ("flash steam recovered: its latent heat at the flash pressure is credited at this steam's price "
                        "and CO2 factor (it replaces this steam heat for heat; an assumption)")
FLASH_LOST_NOTE = "flash steam lost (vented): no credit; its heat and water are lost"
_GJ = 1e9
_MWh = 3.6e9
_SAME_OUTLET_K = 0.01  # K: the rated outlet is the balance's (the rating closes it)
SAME_SUPPLY_K = 0.05  # K: a utility line entering within this of a utility's supply temperature is that utility
_DEMO = "demo value of our own invention, not a site's: replace with your site's"

#: A site utility list of our own invention, for the demo and the samples (prices in EUR, CO2 in kg/GJ delivered)
DEMO_UTILITIES: list[dict] = [
    {"name": "LP steam 4 barg", "kind": "steam", "pressure": "4 barg", "price": 28.0, "per": "t",
     "co2_kg_per_GJ": 70.0, "source": _DEMO},
    {"name": "MP steam 12 barg", "kind": "steam", "pressure": "12 barg", "superheat": "20 K", "price": 32.0, "per": "t",
     "co2_kg_per_GJ": 72.0, "source": _DEMO},
    {"name": "Cooling water", "kind": "cooling water", "supply_temperature": "27 degC", "return_limit": "40 degC",
     "price": 0.05, "per": "t", "co2_kg_per_GJ": 1.5, "source": _DEMO},
    {"name": "Chilled water", "kind": "chilled water", "supply_temperature": "6 degC", "return_limit": "14 degC",
     "price": 12.0, "per": "GJ", "co2_kg_per_GJ": 25.0, "source": _DEMO},
    {"name": "Brine -15 °C", "kind": "brine", "material": "calcium chloride brine", "mass_fraction": 0.25,
     "supply_temperature": "-15 degC", "return_limit": "-5 degC", "price": 30.0, "per": "GJ", "co2_kg_per_GJ": 60.0,
     "source": _DEMO},
    {"name": "Hot oil 250 °C", "kind": "hot oil", "material": "mineral heat-transfer oil (generic)",
     "supply_temperature": "250 degC", "return_limit": "180 degC", "price": 16.0, "per": "GJ", "co2_kg_per_GJ": 68.0,
     "source": _DEMO},
    {"name": "Electric heating", "kind": "electric", "price": 120.0, "per": "MWh", "co2_kg_per_GJ": 65.0,
     "source": _DEMO},
]


def demo_utilities():
    """The demo site list (:data:`DEMO_UTILITIES`) as worksheet models."""
    return [Utility.model_validate(u) for u in DEMO_UTILITIES]


@dataclass
class Demand:
    """A duty to meet (W, > 0) in a sense (``heating`` or ``cooling``) over a process temperature range (K)."""

    label: str
    address: str  # the duty term's or the exchanger's
    sense: str
    duty: float
    T_cold: float  # the process's coldest temperature (its inlet when heated, its outlet when cooled)
    T_hot: float
    minimum_approach: float = DEFAULT_MINIMUM_APPROACH
    current: str = ""  # the utility line(s) of an exchanger, as the balance has them
    # the process's T–Q curve: (share of its heat from its cold end, 0..1, T) along its lines' enthalpy paths
    curve: list[tuple[float, float]] = field(default_factory=list)

    def points(self) -> list[tuple[float, float]]:
        """The process curve's points, or its two ends when no curve is known."""
        return self.curve or [(0.0, self.T_cold), (1.0, self.T_hot)]


@dataclass
class UtilityOption:
    """One utility for one duty: its flow (kg/s; None for electric), cost and CO2, or why it cannot."""

    utility: str
    kind: str
    feasible: bool
    flow: float | None = None  # kg/s
    per_kg: float | None = None  # J/kg delivered per kg of utility
    supply_T: float | None = None  # K (steam: its saturation temperature)
    return_T: float | None = None  # K (steam: the condensate's)
    flash_fraction: float | None = None  # of the condensate let down to the flash pressure (default the atmosphere)
    flash_flow: float | None = None  # kg/s of flash steam
    flash_credit: float | None = None  # W: the recovered flash steam's latent heat, credited against the duty
    cost_per_hour: float | None = None  # currency
    cost_per_year: float | None = None
    co2_per_year: float | None = None  # kg
    refusal: HeatBalanceError | None = None
    source: str = ""
    notes: list[str] = field(default_factory=list)


@dataclass
class UtilityTable:
    """Every site utility of the right sense for one demand, side by side."""

    demand: Demand
    options: list[UtilityOption]
    currency: str
    operating_hours: float | None  # s per year


def _steam(u: UtilityInputs, d: Demand) -> tuple[float, float, float, float | None]:
    """(J/kg, T_sat, T_condensate, the condensate's enthalpy [J/kg])."""
    water = u.material
    boiling = water.transitions(u.P)
    if not boiling:
        raise InputError(Phrase("steam at {P} has no condensing plateau (supercritical)",
                                {"P": Measure(u.P, "pressure")}), f"{u.address}.pressure")
    tr = boiling[0]
    # a superheat below a millikelvin is saturated vapour (the property call there may land on either side)
    h_in = tr.h_upper if u.superheat < 1e-3 else max(_h(u, tr.T + u.superheat, "superheat"), tr.h_upper)
    if u.condensate_T is None:
        T_out, h_out = tr.T, tr.h_lower
    else:
        if u.condensate_T >= tr.T:
            raise InputError(Phrase("condensate at {T} is not below the saturation temperature {Ts} at {P}",
                                    {"T": Measure(u.condensate_T, "temperature", 1), "Ts": Measure(tr.T, "temperature", 1),
                                     "P": Measure(u.P, "pressure")}), f"{u.address}.condensate_temperature")
        T_out, h_out = u.condensate_T, _h(u, u.condensate_T, "condensate_temperature")
    if tr.T < d.T_hot + d.minimum_approach:
        raise InputError(Phrase(
            "steam at {P} condenses at {Ts}: it cannot heat the process to {T} with a {dT} approach (it would need "
            "to condense at {need} or above: a higher steam pressure)",
            {"P": Measure(u.P, "pressure"), "Ts": Measure(tr.T, "temperature", 1), "T": Measure(d.T_hot, "temperature", 1),
             "dT": Measure(d.minimum_approach, "temperature_difference", decimals=1),
             "need": Measure(d.T_hot + d.minimum_approach, "temperature", 1)}), f"{u.address}.pressure")
    if T_out < d.T_cold + d.minimum_approach:
        raise InputError(Phrase(
            "condensate subcooled to {T} meets the process's cold end at {Tp}: less than the {dT} approach; raise the "
            "condensate temperature", {"T": Measure(T_out, "temperature", 1), "Tp": Measure(d.T_cold, "temperature", 1),
                                       "dT": Measure(d.minimum_approach, "temperature_difference", decimals=1)}),
            f"{u.address}.condensate_temperature")
    return h_in - h_out, tr.T, T_out, h_out


def _flash(u: UtilityInputs, h_condensate: float) -> tuple[float, float]:
    """(fraction of the condensate that flashes when let down to the flash pressure, latent heat there [J/kg]):
    x = (h_condensate − h_f) / h_fg at the flash pressure (an adiabatic let-down, IAPWS-IF97 via CoolProp)."""
    P = u.flash_P
    where = f"{u.address}.flash_pressure"
    if not u.flash_stated and P >= u.P:  # steam below the atmosphere, none said: its condensate cannot flash to it
        return 0.0, 0.0
    if P >= u.P:
        raise InputError(Phrase("the condensate is let down to {P}: that is not below the steam's {Ps}",
                                {"P": Measure(P, "pressure"), "Ps": Measure(u.P, "pressure")}), where)
    u.material.check_pressure(P, where)
    boiling = u.material.transitions(P)
    if not boiling:
        raise InputError(Phrase("water has no boiling plateau at {P}", {"P": Measure(P, "pressure")}), where)
    low = boiling[0]
    return max(0.0, (h_condensate - low.h_lower) / low.latent), low.latent


def _sensible(u: UtilityInputs, d: Demand) -> tuple[float, float, float, float | None]:
    """(J/kg, supply T, return T, the process temperature inside its range that sets the flow, or None) of a
    coolant or a hot oil, counter-current.

    Every point of the process curve, not only its ends, keeps the approach: a coolant that has taken the share
    s of the duty has warmed by s·(heat per kg) and must still be ΔT_min below the process there (a condensing
    plateau inside the range is where it pinches); a hot oil likewise above. The heat per kg is the least any
    point allows, and never beyond the return limit.
    """
    where, dT = u.address, d.minimum_approach
    cooling = u.kind in COLD_KINDS
    if cooling and u.supply_T > d.T_cold - dT:
        raise InputError(Phrase(
            "{name} is supplied at {Ts}: it cannot cool the process below {limit} (supply + the {dT} approach), "
            "and the process must reach {T}", {"name": u.kind, "Ts": Measure(u.supply_T, "temperature", 1),
                                               "limit": Measure(u.supply_T + dT, "temperature", 1),
                                               "dT": Measure(dT, "temperature_difference", decimals=1),
                                               "T": Measure(d.T_cold, "temperature", 1)}), f"{where}.supply_temperature")
    if not cooling and u.supply_T < d.T_hot + dT:
        raise InputError(Phrase(
            "hot oil supplied at {Ts} cannot heat the process to {T} with a {dT} approach",
            {"Ts": Measure(u.supply_T, "temperature", 1), "T": Measure(d.T_hot, "temperature", 1),
             "dT": Measure(dT, "temperature_difference", decimals=1)}), f"{where}.supply_temperature")
    h_supply = _h(u, u.supply_T, "supply_temperature")
    allowed = []  # (heat per kg this point allows, the process temperature there)
    for share, T in d.points():
        span = share if cooling else 1.0 - share  # of the duty the utility has exchanged when it reaches this point
        if span <= 1e-12:
            continue
        T_utility = min(T - dT, u.return_T) if cooling else max(T + dT, u.return_T)
        reach = abs(_h(u, T_utility, "return_limit") - h_supply)
        allowed.append((reach / span, T))
    per_kg, pinch_T = min(allowed)
    if per_kg <= 0:
        raise InputError(Phrase("{name}: the approach leaves no temperature range between its supply {Ts} and the "
                                "process at {Tp}", {"name": u.name, "Ts": Measure(u.supply_T, "temperature", 1),
                                                    "Tp": Measure(pinch_T, "temperature", 1)}), f"{where}.return_limit")
    ret = _temperature_at(u, h_supply + per_kg if cooling else h_supply - per_kg)
    inside = d.T_cold + 1e-3 < pinch_T < d.T_hot - 1e-3
    return per_kg, u.supply_T, ret, pinch_T if inside else None


def _temperature_at(u: UtilityInputs, h: float) -> float:
    """The utility's temperature at the specific enthalpy h, between its supply and its return limit."""
    from scipy.optimize import brentq

    low, high = sorted((u.supply_T, u.return_T))
    ends = [_h(u, T, "return_limit") - h for T in (low, high)]
    if abs(ends[0]) < 1e-9 or abs(ends[1]) < 1e-9:
        return low if abs(ends[0]) <= abs(ends[1]) else high
    return brentq(lambda T: _h(u, T, "return_limit") - h, low, high, xtol=1e-6)


def _h(u: UtilityInputs, T: float, field: str) -> float:
    """The utility's specific enthalpy at T, its range checked first; any property refusal at its field."""
    where = f"{u.address}.{field}"
    u.material.check_range(T, where)
    try:
        return u.material.enthalpy(T, u.P)
    except HeatBalanceError as exc:
        raise exc.located(where)
    except ValueError as exc:  # the property library's own words, kept
        raise InputError(f"no property data for {u.material.name} at this temperature ({exc})", where) from None


def utility_option(u: UtilityInputs, d: Demand, operating_hours: float | None = None) -> UtilityOption:
    """The flow, cost and CO2 of one utility for one demand; raises the refusal when it cannot meet it."""
    option = UtilityOption(u.name, u.kind, True, source=u.source)
    if u.kind == "steam":
        option.per_kg, option.supply_T, option.return_T, h_condensate = _steam(u, d)
        option.flash_fraction, flash_latent = _flash(u, h_condensate)
    elif u.kind == "electric":
        option.notes.append(ELECTRIC_NOTE)
    else:
        option.per_kg, option.supply_T, option.return_T, pinch_T = _sensible(u, d)
        if pinch_T is not None:
            option.notes.append(Phrase("the flow is set by the approach where the process is at {T}, inside its "
                                       "range (a phase change or a bend of its curve), not at its ends",
                                       {"T": Measure(pinch_T, "temperature", 1)}))
    if option.per_kg is not None:
        if not option.per_kg > 0:
            raise InputError(f"{u.name} gives no heat per kilogram between its supply and return states",
                             u.address)
        option.flow = d.duty / option.per_kg
    share = 1.0  # of the gross cost and CO2 paid: less the recovered flash steam's heat
    if option.flash_fraction is not None:
        option.flash_flow = option.flow * option.flash_fraction
        if u.condensate == "flash recovered":
            option.flash_credit = option.flash_flow * flash_latent
            share = 1.0 - option.flash_credit / d.duty
            if not share > 0:
                raise InputError(Phrase("the flash steam's heat ({credit}) would be as much as the duty ({duty}): at "
                                        "this pressure the condensate carries more heat than the steam gives, and a "
                                        "heat-for-heat credit does not apply; price the flash steam separately",
                                        {"credit": Measure(option.flash_credit, "power"),
                                         "duty": Measure(d.duty, "power")}), f"{u.address}.condensate")
            option.notes.append(FLASH_RECOVERED_NOTE)
        elif u.condensate == "flash lost":
            option.notes.append(FLASH_LOST_NOTE)
    per_hour_GJ = d.duty * share * 3600.0 / _GJ
    if u.per == "GJ":
        option.cost_per_hour = u.price * per_hour_GJ
    elif u.per == "MWh":
        option.cost_per_hour = u.price * d.duty * share * 3600.0 / _MWh
    else:
        if option.flow is None:
            raise InputError("electric heating is priced per GJ or per MWh, not per tonne", f"{u.address}.per")
        option.cost_per_hour = u.price * option.flow * share * 3600.0 / 1000.0
    if operating_hours is not None:
        hours = operating_hours / 3600.0
        option.cost_per_year = option.cost_per_hour * hours
        option.co2_per_year = u.co2_kg_per_GJ * per_hour_GJ * hours
    return option


def _option_or_refusal(u: UtilityInputs, d: Demand, hours: float | None) -> UtilityOption:
    try:
        return utility_option(u, d, hours)
    except HeatBalanceError as exc:
        exc.located(u.address)
        return UtilityOption(u.name, u.kind, False, refusal=exc, source=u.source)


def _process_curve(problem: Problem, result: Result, indices: list[int], address: str) -> list[tuple[float, float]]:
    """The process lines' composite T–Q curve as (share of their heat from the cold end, T)."""
    pairs = [(problem.lines[i], result.lines[i]) for i in indices]
    points = composite(line_paths(problem, result, pairs, [], address))
    total = points[-1][0]
    return [(H / total, T) for H, T in points] if total > 0 else []


def demands(problem: Problem, result: Result) -> list[Demand]:
    """The duties to meet: each heater or cooler duty term, each exchanger with a utility side."""
    out = []
    takers = [i for i, ln in enumerate(result.lines) if ln.total > 0]
    givers = [i for i, ln in enumerate(result.lines) if ln.total < 0]
    for term in result.terms:
        if term.kind != "duty" or term.heat == 0:
            continue
        lines = takers if term.heat > 0 else givers
        if not lines:
            continue
        temps = [T for i in lines for T in (result.lines[i].initial_T, result.lines[i].final_T)]
        address = item("duties", term.name, "value")
        out.append(Demand(f"duty {term.name}", address, "heating" if term.heat > 0 else "cooling", abs(term.heat),
                          min(temps), max(temps), curve=_process_curve(problem, result, lines, address)))
    checks = {c.name: c for c in getattr(result, "exchangers", [])}
    for e in problem.exchangers:
        if e.utility_side is None or e.name not in checks:
            continue
        process = e.cold if e.utility_side == "hot" else e.hot
        lines = [i for i, ln in enumerate(result.lines) if ln.kind == "stream" and ln.name in process]
        temps = [T for i in lines for T in (result.lines[i].initial_T, result.lines[i].final_T)]
        utility = e.hot if e.utility_side == "hot" else e.cold
        out.append(Demand(f"exchanger {e.name}", e.address,
                          "heating" if e.utility_side == "hot" else "cooling", checks[e.name].duty,
                          min(temps), max(temps), e.minimum_approach, ", ".join(utility),
                          curve=_process_curve(problem, result, lines, e.address)))
    return out


def utility_tables(problem: Problem, result: Result) -> list[UtilityTable]:
    """For each demand, every site utility of its sense with its flow, cost and CO2, or its refusal."""
    if not problem.utilities:
        return []
    tables = []
    for d in demands(problem, result):
        kinds = HOT_KINDS if d.sense == "heating" else COLD_KINDS
        options = [_option_or_refusal(u, d, problem.operating_hours) for u in problem.utilities if u.kind in kinds]
        tables.append(UtilityTable(d, options, problem.currency, problem.operating_hours))
    return tables



def _utilities_of_line(problem: Problem, line, kinds: tuple[str, ...]) -> list[UtilityInputs]:
    """The site utilities a utility line of an exchanger is: the one of its name, else those of the right kinds
    supplied at its inlet temperature."""
    named = [u for u in problem.utilities if u.name == line.name and u.kind in kinds]
    if named:
        return named
    return [u for u in problem.utilities if u.kind in kinds and u.supply_T is not None
            and abs(u.supply_T - line.initial_T) <= SAME_SUPPLY_K]


def return_limit_warnings(problem: Problem, result: Result) -> list[tuple[str | None, Phrase]]:
    """(exchanger name, warning) for each utility line whose return passes its utility's return limit; the name
    is None for a utility's stream outside an exchanger with a utility side (its outlet in the balance alone).

    A coolant (cooling water, chilled water, brine) must return no warmer than its ``return_limit`` (scaling), a hot
    oil no colder than its own. Both the balance's outlet and, for a rated exchanger, the outlet its UA reaches
    with the balance's flows are checked: an exchanger larger than the duty needs warms a coolant further.
    """
    out = []
    checks = {c.name: c for c in getattr(result, "exchangers", [])}
    checked = {name for e in problem.exchangers if e.utility_side is not None and e.name in checks
               for name in getattr(e, e.utility_side)}
    for line in result.lines:  # a utility's stream outside an exchanger with a utility side: its outlet alone
        if line.kind != "stream" or line.name in checked or line.total == 0:
            continue
        cooling = line.total > 0  # a coolant takes heat up
        for u in _utilities_of_line(problem, line, COLD_KINDS if cooling else ("hot oil",)):
            if u.return_T is not None and (line.final_T - u.return_T if cooling else u.return_T - line.final_T) > 1e-6:
                out.append((None, _return_passed(line, "", line.final_T, "in the balance", u, cooling)))
    for e in problem.exchangers:
        if e.utility_side is None or e.name not in checks:
            continue
        check = checks[e.name]
        cooling = e.utility_side == "cold"
        kinds = COLD_KINDS if cooling else ("hot oil",)
        for line in (ln for ln in result.lines if ln.kind == "stream" and ln.name in getattr(e, e.utility_side)):
            outlets = [("in the balance", line.final_T)]
            if check.rating is not None:
                rated = check.rating.cold_outlet_T if cooling else check.rating.hot_outlet_T
                if abs(rated - line.final_T) <= _SAME_OUTLET_K:  # the rating closes the balance: said once
                    outlets = [("in the balance, as the exchanger's UA rates it", line.final_T)]
                else:
                    outlets.append(("as the exchanger's UA rates it", rated))
            for u in _utilities_of_line(problem, line, kinds):
                if u.return_T is None:
                    continue
                for how, T in outlets:
                    beyond = T - u.return_T if cooling else u.return_T - T
                    if beyond > 1e-6:
                        out.append((e.name, _return_passed(line, e.name, T, how, u, cooling)))
    return out


def _return_passed(line, exchanger: str, T: float, how: str, u: UtilityInputs, cooling: bool) -> Phrase:
    beyond = T - u.return_T if cooling else u.return_T - T
    return Phrase("RETURN LIMIT PASSED: {line} leaves{at} at {T} {how}, {side} {utility}'s return limit of {limit} "
                  "(by {by}){why}. Raise its flow, or check the limit with the site",
                  {"line": line.name, "at": f" {exchanger}" if exchanger else "", "T": Measure(T, "temperature", 1),
                   "how": how, "side": "above" if cooling else "below", "utility": u.name,
                   "limit": Measure(u.return_T, "temperature", 1),
                   "by": Measure(beyond, "temperature_difference", decimals=1),
                   "why": " (against scaling)" if u.kind == "cooling water" else ""}, f"{u.address}.return_limit")
