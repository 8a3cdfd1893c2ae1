"""Units engineers type, against exact conversion factors."""
import json

import pytest

from heatbalance.errors import InputError, UnitError
from heatbalance.units import check_unit, from_si, kind_of, to_si

CASES = [
    # value, unit, kind, SI value, source of the factor
    pytest.param(12, "t/h", "mass_flow", 12000 / 3600, id="t/h"),  # definition of the tonne
    pytest.param(1, "lb/h", "mass_flow", 0.45359237 / 3600, id="lb/h"),  # international pound (exact)
    pytest.param(1, "kg/s", "mass_flow", 1.0, id="kg/s"),
    pytest.param(1, "lb", "mass", 0.45359237, id="lb"),  # exact
    pytest.param(100, "degC", "temperature", 373.15, id="degC"),  # definition of the Celsius scale
    pytest.param(100, "°C", "temperature", 373.15, id="°C"),
    pytest.param(212, "°F", "temperature", 373.15, id="°F"),  # exact
    pytest.param(671.67, "°R", "temperature", 373.15, id="°R"),  # exact
    pytest.param(4, "barg", "pressure", 501325.0, id="barg"),  # ISO 2533 standard atmosphere 101325 Pa
    pytest.param(0, "psig", "pressure", 101325.0, id="psig"),
    pytest.param(14.695948775, "psia", "pressure", 101325.0, id="psia"),  # 1 atm = 14.6959 psi
    pytest.param(1, "MPa", "pressure", 1e6, id="MPa"),
    pytest.param(1, "atm", "pressure", 101325.0, id="atm"),
    pytest.param(1, "kW", "power", 1000.0, id="kW"),
    pytest.param(1, "Btu/h", "power", 1055.05585262 / 3600, id="Btu/h"),  # International Table Btu
    pytest.param(1, "MMBtu/h", "power", 1055.05585262e6 / 3600, id="MMBtu/h"),
    pytest.param(1, "kcal/h", "power", 4186.8 / 3600, id="kcal/h"),  # International Table calorie
    pytest.param(1, "TR", "power", 12000 * 1055.05585262 / 3600, id="TR"),  # refrigeration ton = 12000 Btu/h
    pytest.param(1, "kWh", "energy", 3.6e6, id="kWh"),
    pytest.param(1, "Btu", "energy", 1055.05585262, id="Btu"),
    pytest.param(1, "Btu/(lb·°F)", "specific_heat", 4186.8, id="Btu/(lb·°F)"),  # = 1 kcal_IT/(kg·K)
    pytest.param(1, "kcal/(kg·°C)", "specific_heat", 4186.8, id="kcal/(kg·°C)"),
    pytest.param(10, "°C", "temperature_difference", 10.0, id="delta-°C"),
    pytest.param(18, "°F", "temperature_difference", 10.0, id="delta-°F"),
]


@pytest.mark.parametrize("value, unit, kind, expected", CASES)
def test_units_engineers_type(value, unit, kind, expected):
    assert to_si(value, unit, kind) == pytest.approx(expected, rel=2e-6)


@pytest.mark.parametrize("value, unit, kind", [(55, "degC", "temperature"), (3, "barg", "pressure"),
                                               (7, "t/h", "mass_flow"), (2.5, "MMBtu/h", "power")])
def test_round_trip(value, unit, kind):
    assert from_si(to_si(value, unit, kind), unit, kind) == pytest.approx(value)


def test_wrong_dimension_names_the_field_and_what_it_measures():
    with pytest.raises(UnitError, match=r"^stream Glycol flow: unit 'kW' is not a mass flow \(it measures power\)$"):
        to_si(5, "kW", "mass_flow", "stream Glycol flow")


def test_unknown_unit():
    with pytest.raises(UnitError, match=r"unit 'blorps' is not a temperature \(not a unit this tool knows\)"):
        to_si(5, "blorps", "temperature", "x")


def test_below_absolute_zero():
    with pytest.raises(InputError, match=r"^stream A inlet: -300 degC is below absolute zero"):
        to_si(-300, "degC", "temperature", "stream A inlet")
    with pytest.raises(InputError, match="below absolute zero"):
        to_si(-500, "°F", "temperature")


def test_gauge_pressure_below_vacuum():
    with pytest.raises(InputError, match=r"at or below a perfect vacuum"):
        to_si(-1.5, "barg", "pressure", "vessel pressure")


def test_not_a_number():
    with pytest.raises(InputError, match="is not a finite number"):
        to_si(float("nan"), "kg", "mass", "charge mass")


def test_kind_of_picks_mass_or_flow():
    assert kind_of("kg/h", ("mass", "mass_flow")) == "mass_flow"
    assert kind_of("t", ("mass", "mass_flow")) == "mass"
    with pytest.raises(UnitError, match=r"is not a mass or a mass flow"):
        kind_of("kW", ("mass", "mass_flow"), "x")


@pytest.mark.parametrize("unit", ["m3/h", "m³/h", "m^3/h", "gpm", "gal/min", "L/min"])
def test_a_volume_flow_where_a_mass_flow_is_needed_is_refused_with_the_way_to_give_it(unit):
    with pytest.raises(UnitError) as refused:
        check_unit(unit, "mass_flow", "streams[Water].flow")
    assert refused.value.where == "streams[Water].flow"
    assert "it measures volume flow" in refused.value.message and "give the mass flow, e.g. kg/h" in refused.value.message


def test_volume_flows_typed_the_ways_engineers_type_them():
    # 1 US gallon = 3.785411784 L exactly (NIST SP 811); humid air's flows are volume flows
    assert to_si(100, "gpm", "volume_flow") == pytest.approx(100 * 3.785411784e-3 / 60, rel=1e-12)
    assert to_si(3600, "m3/h", "volume_flow") == pytest.approx(1.0, rel=1e-12)
    assert to_si(3600, "m³/h", "volume_flow") == pytest.approx(1.0, rel=1e-12)


def test_a_volume_where_a_mass_is_needed_is_named_a_volume():
    with pytest.raises(UnitError) as refused:
        check_unit("m3", "mass", "vessels[V].charges[W].mass")
    assert "it measures volume (e.g. m^3); give the mass, e.g. kg" in refused.value.message


# --------------------------------------------------------------------------- units read two ways
@pytest.mark.parametrize("value, unit, kind", [(12, "ton/h", "mass_flow"), (7.5, "ton", "mass"), (3, "tons", "mass"),
                                               (4, "psi", "pressure")])
def test_a_unit_plants_read_two_ways_is_refused_with_the_choices(value, unit, kind):
    # pint reads 'ton' as a US short ton (907.2 kg) and 'psi' as absolute; a plant may mean a tonne, a long ton,
    # or a gauge pressure: 12 ton/h of glycol read as short tons is 9 % off a tonne (common practice, no source)
    for refuse in (lambda: to_si(value, unit, kind, "streams[Glycol].flow"),
                   lambda: check_unit(unit, kind, "streams[Glycol].flow"),
                   lambda: kind_of(unit, (kind,), "streams[Glycol].flow")):
        with pytest.raises(UnitError) as refused:
            refuse()
        assert refused.value.where == "streams[Glycol].flow"
        assert ("write t for a metric tonne (1000 kg), short_ton (907.2 kg) or long_ton (1016 kg)" if "ton" in unit
                else "write psig (above the atmosphere) or psia (absolute)") in refused.value.message


@pytest.mark.parametrize("unit, kind, words", [
    ("ton", "power", "'ton' for a duty is a ton of refrigeration: write TR (12,000 Btu/h = 3.517 kW)"),
    ("ton", "energy", "not an energy: give it in kJ, kWh or Btu"),
    ("kton", "mass", "write t for a metric tonne"),  # pint: a kilo short ton, 907 t
])
def test_a_ton_is_refused_with_the_advice_of_its_field(unit, kind, words):
    with pytest.raises(UnitError) as refused:
        to_si(50, unit, kind, "duties[Chiller].value")
    assert words in refused.value.message and refused.value.where == "duties[Chiller].value"


def test_the_unambiguous_forms_are_read():
    # 1 short ton = 2000 lb, 1 long ton = 2240 lb (exact, international pound); 1 TR = 12000 Btu/h
    assert to_si(1, "short_ton", "mass") == pytest.approx(2000 * 0.45359237, rel=1e-12)
    assert to_si(1, "long_ton", "mass") == pytest.approx(2240 * 0.45359237, rel=1e-12)
    assert to_si(1, "tonne/h", "mass_flow") == pytest.approx(1000 / 3600, rel=1e-12)
    assert to_si(1, "ton_of_refrigeration", "power") == pytest.approx(12000 * 1055.05585262 / 3600, rel=1e-6)
    assert to_si(0, "psig", "pressure") == 101325.0 and from_si(101325.0, "psi", "pressure") == pytest.approx(
        14.695948775, rel=1e-9)  # the view writes 'psi' as psia: converting out is not reading


def test_a_worksheet_with_a_ton_flow_is_refused_at_its_address():
    from heatbalance.balance import solve
    from heatbalance.worksheet import load_worksheet

    doc = json.loads(open("sample_data/steam_heater_glycol.json", "rb").read())
    glycol = next(s for s in doc["streams"] if s["name"] == "Glycol")
    glycol["flow"] = "12 ton/h"
    with pytest.raises(InputError) as refused:
        solve(load_worksheet(json.dumps(doc).encode()))
    assert refused.value.where == "streams[Glycol].flow" and "'ton' is read three ways" in refused.value.message


def test_pound_mass_and_a_case_slip_in_a_gauge_unit():
    assert to_si(3600, "lbm/h", "mass_flow") == pytest.approx(0.45359237, rel=1e-12)  # lbm = lb (exact)
    with pytest.raises(UnitError) as refused:
        to_si(150, "PSIG", "pressure", "streams[Steam].pressure")
    assert refused.value.where == "streams[Steam].pressure"
    assert "units are case-sensitive: write 'psig'" in refused.value.message


@pytest.mark.parametrize("unit, words", [
    ("psi g", "'psi g' is a gauge pressure: write psig, in one word"),  # pint would read psi × gram
    ("bar g", "write barg, in one word"),
    ("psi(g)", "write psig, in one word"),
    ("kPa_gauge", "write kPag, in one word"),
    ("bar a", "'bar a' is an absolute pressure: write bara, in one word"),
    ("psi abs", "write psia, in one word"),
    ("kg/cm2g", "as barg (gauge) or bar (absolute): 1 kgf/cm² = 0.980665 bar"),  # CGPM 1901, standard gravity
    ("kg/cm2", "as barg (gauge) or bar (absolute)"),  # pint: a mass per area
])
def test_a_pressure_unit_written_apart_is_refused_with_its_spelling(unit, words):
    for refuse in (lambda: to_si(150, unit, "pressure", "streams[Steam].pressure"),
                   lambda: check_unit(unit, "pressure", "streams[Steam].pressure")):
        with pytest.raises(UnitError) as refused:
            refuse()
        assert words in refused.value.message and refused.value.where == "streams[Steam].pressure"


def test_kgf_per_cm2_alone_is_read_as_absolute():
    assert to_si(1, "kgf/cm2", "pressure") == pytest.approx(98066.5, rel=1e-12)  # 1 kgf/cm² (exact, by definition)


@pytest.mark.parametrize("unit, kind, words", [
    ("t/hh", "mass_flow", "'hh' reads as hectohour (100 × its hour)"),  # 12 t/hh had given a 100× smaller flow
    ("kg/hh", "mass_flow", "hectohour"),
    ("dt/h", "mass_flow", "decimetric_ton"),
    ("ct/h", "mass_flow", "'carat' is no unit a plant weighs in"),
    ("t/yh", "mass_flow", "yoctohour"),
    ("Mbar", "pressure", "megabar"),
    ("mK", "temperature", "millikelvin"),
])
def test_a_unit_read_through_a_prefix_no_plant_uses_is_refused_as_a_slip(unit, kind, words):
    """A plant engineer's finding: '12 t/hh' was read as 12 t per hecto-hour and the steam flow came out 100× too
    small, with no warning (hand: 12 t/100 h = 120 kg/h)."""
    with pytest.raises(UnitError) as refused:
        to_si(12, unit, kind, "streams[Glycol].flow")
    assert words in refused.value.message
    assert refused.value.where == "streams[Glycol].flow"


def test_the_units_plants_use_are_read():
    # exact conversions (definitions): 1 mbar = 100 Pa, 1 kWh = 3.6 MJ, 1 klb = 453.59237 kg, 50 mK = 0.05 K
    assert to_si(3, "mbar", "pressure") == pytest.approx(300.0, rel=1e-12)
    assert to_si(5, "kWh", "energy") == pytest.approx(18e6, rel=1e-12)
    assert to_si(3600, "klb/h", "mass_flow") == pytest.approx(453.59237, rel=1e-12)
    assert to_si(50, "mK", "temperature_difference") == pytest.approx(0.05, rel=1e-12)
    assert to_si(2, "ms", "duration") == pytest.approx(0.002, rel=1e-12)


def test_millibar_gauge_and_absolute_are_read_and_a_german_gauge_mark_is_spelled():
    # hand: 4 mbarg = 101,325 + 400 Pa at the standard atmosphere; 4 mbara = 400 Pa
    assert to_si(4, "mbarg", "pressure") == pytest.approx(101_725.0, rel=1e-12)
    assert to_si(4, "mbara", "pressure") == pytest.approx(400.0, rel=1e-12)
    for unit in ("barü", "bar(ü)", "bar ü"):  # Überdruck: gauge
        with pytest.raises(UnitError, match="is a gauge pressure: write barg"):
            to_si(4, unit, "pressure", "vessels[R].pressure")


def test_a_slip_is_refused_with_its_words_where_several_kinds_are_taken():
    # an amount field takes a mass or a mass flow: the slip is named, not only "not a mass or a mass flow"
    with pytest.raises(UnitError) as refused:
        kind_of("t/hh", ("mass", "mass_flow"), "streams[Glycol].flow")
    assert "'hh' reads as hectohour" in refused.value.message and refused.value.where == "streams[Glycol].flow"
