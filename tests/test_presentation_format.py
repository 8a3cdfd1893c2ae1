"""How numbers are written for people (heatbalance/present): the exchanger, zone and utility tables as text in the
view's units (thousands separated, decimals per quantity, a dash where a quantity does not apply, never "None"),
large heats without exponent form, small percentages with their digits, the case table with one number of
decimals per output. Expectations are the records' own SI values converted by hand; the samples are our own."""
from __future__ import annotations

import re
from pathlib import Path

import pytest
from streamlit.testing.v1 import AppTest

from heatbalance.analyses import solve_and_analyse
from heatbalance.analyses.cases import run_cases
from heatbalance.links import encode_sheet
from heatbalance.messages import Measure
from heatbalance.present.exchangers import exchanger_rows, number_columns, utility_rows, zone_rows
from heatbalance.present.text import NOT_APPLICABLE, measure_text, percent_text, significant_text
from heatbalance.present.whatif import case_table, case_table_text
from heatbalance.worksheet import Case, Override, Quantity, load_worksheet
from webapp.common import UNIT_SYSTEMS

ROOT = Path(__file__).resolve().parent.parent
STEAM_HEATER = ROOT / "sample_data" / "steam_heater_subcooled_condensate.json"
CONDENSER = ROOT / "sample_data" / "solvent_condenser_cooling_water.json"
BTU_PER_H = 1055.05585262 / 3600  # W per Btu/h (International Table Btu, as in test_units.py)
LB = 0.45359237  # kg
NUMBER = re.compile(r"-?\d{1,3}(,\d{3})*(\.\d+)?")  # thousands separated, never an exponent


def sample(path: Path):
    return load_worksheet(path.read_bytes())


def number(text: str) -> float:
    assert NUMBER.fullmatch(text), text
    return float(text.replace(",", ""))


def decimals(text: str) -> int:
    return len(text.partition(".")[2])


@pytest.fixture(scope="module")
def steam_heater():
    return solve_and_analyse(sample(STEAM_HEATER))


# --------------------------------------------------------------------------- large and small numbers
@pytest.mark.parametrize("value, digits, expected", [
    pytest.param(1_708_123.0, 4, "1,708,000", id="large-no-exponent"),
    pytest.param(9_999.6, 4, "10,000", id="rounds-up-a-decade"),
    pytest.param(1_627.3, 4, "1,627", id="thousands"),
    pytest.param(44.0, 4, "44", id="trailing-zeros-dropped"),
    pytest.param(0.00001234, 4, "0.00001234", id="small-no-exponent"),
    pytest.param(-0.0, 4, "0", id="no-negative-zero"),
    pytest.param(float("nan"), 4, NOT_APPLICABLE, id="never-nan"),
])
def test_significant_figures_are_written_plainly(value, digits, expected):
    assert significant_text(value, digits) == expected


def test_a_large_us_heat_is_written_in_full_not_in_exponent_form():
    assert measure_text(Measure(1_708_123 * BTU_PER_H, "power"), "US") == "1,708,000 Btu/h"
    assert measure_text(Measure(9_999_600.0, "power"), "SI") == "10,000 kW"  # was "1e+04 kW"
    assert "nan" not in measure_text(Measure(float("nan"), "power"), "SI")


def test_a_message_read_without_a_unit_set_writes_large_values_in_full():
    from heatbalance.messages import Phrase

    # Phrase.text (logs, str(error)) is the plain SI fallback: it used ",.4g", which wrote 10 MW as "1e+04 kW"
    assert Phrase("duty {Q}", {"Q": Measure(9_999_600.0, "power")}).text == "duty 10,000 kW"
    assert Phrase("{Q}", {"Q": Measure(1_708_123.0, "energy")}).text == "1,708 kJ"
    assert Phrase("{Q}", {"Q": Measure(float("inf"), "power")}).text == f"{NOT_APPLICABLE} kW"


def test_the_us_exchanger_rows_write_the_duty_without_an_exponent(steam_heater):
    check = steam_heater.exchangers[0]
    rows = exchanger_rows(check, "US")
    assert not [r for r in rows if "e+" in r["value"] + r["note"]]
    duty = next(r["value"] for r in rows if r["quantity"] == "duty")
    assert duty.endswith(" Btu/h")
    assert number(duty.removesuffix(" Btu/h")) == pytest.approx(check.duty / BTU_PER_H, rel=5e-4)  # 4 figures


@pytest.mark.parametrize("fraction, expected", [(0.1753, "17.5%"), (0.000181, "0.018%"), (0.0, "0.0%")])
def test_a_small_percentage_keeps_its_digits(fraction, expected):
    assert percent_text(fraction) == expected


def test_a_small_condensate_flash_is_not_shown_as_zero_percent(steam_heater):
    lp = steam_heater.utilities[0].options[0]  # 100 °C condensate let down to the atmosphere: a trace flashes
    assert 0 < lp.flash_fraction < 0.0005 and lp.flash_flow > 0
    note = utility_rows(steam_heater.utilities[0])[0]["note"]
    assert f"condensate flashes {lp.flash_fraction * 100:.2g}% ({lp.flash_flow * 3600:.4g} kg/h" in note
    assert "flashes 0.0%" not in note


# --------------------------------------------------------------------------- the page's tables
@pytest.mark.parametrize("system", ["SI", "US"])
def test_zone_rows_are_text_in_the_view_units(steam_heater, system):
    check = steam_heater.exchangers[0]
    rows = zone_rows(check, system)
    power, conductance = ("kW", "kW/K") if system == "SI" else ("Btu/h", "Btu/(h·°F)")
    to_power = 1e3 if system == "SI" else BTU_PER_H
    to_conductance = 1e3 if system == "SI" else BTU_PER_H / (5 / 9)  # W/K per Btu/(h·°F)
    for row, zone in zip(rows, check.zones):
        assert all(isinstance(row[c], str) for c in number_columns(rows))
        assert number(row[f"duty [{power}]"]) == pytest.approx(zone.duty / to_power, rel=5e-4)
        assert number(row[f"UA [{conductance}]"]) == pytest.approx(zone.UA / to_conductance, rel=5e-4)
        assert decimals(row["F"]) == 3 and number(row["F"]) == pytest.approx(zone.F, abs=5e-4)
        lmtd = next(c for c in row if c.startswith("ΔT_lm"))
        shown = zone.lmtd if system == "SI" else zone.lmtd * 9 / 5
        assert decimals(row[lmtd]) == 1 and number(row[lmtd]) == pytest.approx(shown, abs=0.05)


@pytest.mark.parametrize("system, flow_unit, per_kg", [("SI", "kg/h", 1.0), ("US", "lb/h", 1 / LB)])
def test_utility_rows_write_flows_money_and_co2_as_text_with_a_dash_for_none(steam_heater, system, flow_unit,
                                                                             per_kg):
    table = steam_heater.utilities[0]
    rows = utility_rows(table, system)
    for row, option in zip(rows, table.options):
        flow = row[f"flow [{flow_unit}]"]
        if option.flow is None:  # electric heating has no utility flow
            assert flow == NOT_APPLICABLE
        else:
            assert number(flow) == pytest.approx(option.flow * 3600 * per_kg, rel=5e-4)
        assert row["cost [EUR/h]"] == f"{option.cost_per_hour:,.2f}"
        assert row["cost [EUR/year]"] == f"{option.cost_per_year:,.0f}"
        assert number(row["CO2 [t/year]"]) == pytest.approx(option.co2_per_year / 1000, rel=5e-4)
    assert [r["utility"] for r in rows if r[f"flow [{flow_unit}]"] == NOT_APPLICABLE] == ["Electric heating"]
    assert not [r for r in rows for c in number_columns(rows) if r[c] in ("None", "nan", "")]


def test_the_page_shows_the_us_utility_and_zone_tables_as_text():
    at = AppTest.from_file(str(ROOT / "app.py"), default_timeout=120)
    at.query_params["sheet"] = encode_sheet(sample(STEAM_HEATER))
    at.run()
    at.radio(key="unit_system").set_value(list(UNIT_SYSTEMS)[1]).run()  # the US view
    assert not at.exception
    frames = [d.value for d in at.dataframe]
    utilities = next(f for f in frames if "utility" in f.columns)
    zones = next(f for f in frames if "hot side" in f.columns)
    quantities = next(f for f in frames if "quantity" in f.columns)
    assert list(utilities["flow [lb/h]"])[-1] == NOT_APPLICABLE  # the electric utility: no flow, never "None"
    for frame in (utilities, zones):
        for column in number_columns(frame.to_dict("records")):
            assert all(isinstance(v, str) and (v == NOT_APPLICABLE or NUMBER.fullmatch(v)) for v in frame[column])
    assert not [v for v in quantities["value"] if "e+" in v]


# --------------------------------------------------------------------------- the case table
def test_the_case_table_writes_each_output_with_one_number_of_decimals():
    ws = sample(CONDENSER)
    refused = Case(name="too hot", overrides=[Override(address="streams[Cooling water].inlet.temperature",
                                                       value=Quantity(value=50, unit="degC"))])
    frame = run_cases(ws.model_copy(update={"cases": [*ws.cases, refused]}))
    assert "too hot" in frame.attrs["refusals"]
    for system in ("SI", "US"):
        numbers, text = case_table(frame, system), case_table_text(frame, system)
        for output in text.index:
            shown = [v for v in text.loc[output] if v != NOT_APPLICABLE]
            assert len({decimals(v) for v in shown}) == 1, (output, shown)  # was 28.3125 beside 47.192
            places = decimals(shown[0])
            for case, value in text.loc[output].items():
                if value != NOT_APPLICABLE:
                    assert number(value) == pytest.approx(numbers.loc[output, case], abs=0.51 * 10 ** -places)
        assert text.loc["Cooling water flow [t/h]", "too hot"] == NOT_APPLICABLE
    us = case_table_text(frame, "US")
    heat = next(i for i in us.index if i.startswith("Cooling water: heat absorbed"))
    assert "," in us.loc[heat, "design"] and decimals(us.loc[heat, "design"]) == 0  # 1,121,299 Btu/h
