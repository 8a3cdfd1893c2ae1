"""Named cases (analyses.cases.run_cases, present.whatif.case_table, ``cases`` on the command line and the page):
a checker's four defects.

1. A difference column is in exactly the unit of its value columns (a temperature shown in °F differs in °F).
2. A case that hits a material's data limit is refused (address and reason), the others solved, no traceback.
3. An override of the worksheet's unknown is refused at the case's address.
4. Two overrides of one input in a case are refused at the case's address.
"""
import copy
import json
import math
import pickle
import re

import pytest
from page_helpers import page, sample, unescaped

from heatbalance.analyses import solve_and_analyse
from heatbalance.address import with_value
from heatbalance.analyses.cases import AS_TYPED, difference_column, run_cases
from heatbalance.cli import main
from heatbalance.errors import AddressError, PropertyRangeError, UnitError
from heatbalance.present.whatif import case_table
from heatbalance.units import to_si
from heatbalance.worksheet import Case, Override, Quantity

ICE = "ice_melting_tank.json"
ICE_FINAL = "vessels[Tank T-5].final.temperature"
ICE_MASS = "vessels[Tank T-5].charges[Ice].mass"
GLYCOL_RATED = "glycol_cooler_rated.json"
GLYCOL_INLET = "streams[Glycol].inlet.temperature"
CONDENSER = "solvent_condenser_cooling_water.json"
CW_INLET = "streams[Cooling water].inlet.temperature"
CW_FLOW = "streams[Cooling water].flow"  # the condenser's unknown
US_DUTY = "us_water_heater_duty.json"


def with_cases(ws, *cases):
    return ws.model_copy(update={"cases": [*ws.cases, *cases]})


def case(name, *overrides):
    return Case(name=name, overrides=[Override(address=a, value=Quantity(value=v, unit=u)) for a, v, u in overrides])


def unit_of(header: str) -> str:
    return re.search(r"\[(.*)\]$", header).group(1)


def answer_row(frame, table) -> str:
    """The table's row of the answer (the table's rows follow the frame's outputs)."""
    return table.index[list(frame.attrs["kinds"]).index("answer")]


def assert_differences_are_of_the_values_shown(frame, table):
    """Every difference cell is its case's value minus the base's value, both as shown in that row."""
    base = frame.attrs["base"]
    for name in frame.attrs["cases"]:
        if name == base:
            continue
        column = difference_column(name, base)
        for row in table.index:
            shown, expected = table.loc[row, column], table.loc[row, name] - table.loc[row, base]
            if math.isnan(expected):
                assert math.isnan(shown)
            else:  # hand calculation: a difference of the two values shown, in their unit
                assert shown == pytest.approx(expected, rel=1e-9, abs=1e-9 * max(1.0, abs(table.loc[row, name])))


def ice_in_fahrenheit():
    """The ice tank with its final temperature (the unknown) typed in °F, and a case with half the ice."""
    ws = with_value(sample(ICE), ICE_FINAL, (41, "degF"))
    return with_cases(ws, case("less ice", (ICE_MASS, 200, "kg")))


# --------------------------------------------------------------------------- 1. the difference's unit
def test_a_temperature_answer_typed_in_degF_differs_in_degF_in_the_US_view():
    ws = ice_in_fahrenheit()
    frame = run_cases(ws)
    table = case_table(frame, "US")
    row = answer_row(frame, table)
    assert unit_of(row) == "°F"  # the view's, as on the answer (a unit set's own unit: DEVELOPERS.md, Engine rules)
    # hand calculation: 1 t of water cooling 20 -> 0 °C gives ~84 MJ, less than the ~141 MJ that warms and melts
    # 400 kg of ice at -10 °C, so the tank ends on the melting plateau: 0 °C = 32 °F
    assert table.loc[row, AS_TYPED] == pytest.approx(32.0, abs=0.01)
    # hand calculation: a difference of temperatures in °F is 1.8 times the difference in kelvin
    delta_K = frame.loc["answer", "less ice"] - frame.loc["answer", AS_TYPED]
    assert delta_K > 0  # hand calculation: less ice, less cooling: a warmer tank
    assert table.loc[row, f"less ice − {AS_TYPED}"] == pytest.approx(1.8 * delta_K, rel=1e-9)
    assert_differences_are_of_the_values_shown(frame, table)


def test_a_temperature_answer_typed_in_degF_differs_in_kelvin_in_the_SI_view():
    ws = ice_in_fahrenheit()
    frame = run_cases(ws)
    table = case_table(frame, "SI")
    row = answer_row(frame, table)
    assert unit_of(row) == "°C"  # the view's, as the answer itself shows it (typed °F is a unit set's own unit)
    delta_K = frame.loc["answer", "less ice"] - frame.loc["answer", AS_TYPED]
    # hand calculation: a difference in °C is the difference in kelvin
    assert table.loc[row, f"less ice − {AS_TYPED}"] == pytest.approx(delta_K, rel=1e-9)
    assert_differences_are_of_the_values_shown(frame, table)


@pytest.mark.parametrize("system", ["SI", "US"])
def test_flows_and_heats_in_their_own_units_differ_in_those_units(system):
    """The condenser's answer is typed in t/h, the heats are in the view's units; the feedwater duty in MMBtu/h."""
    condenser = sample(CONDENSER)
    duty = with_cases(sample(US_DUTY), case("hotter", ("streams[Feedwater].outlet.temperature", 240, "degF")))
    for ws in (condenser, duty):
        frame = run_cases(ws)
        table = case_table(frame, system)
        assert_differences_are_of_the_values_shown(frame, table)
    row = answer_row(frame, table)
    assert unit_of(row) == "MMBtu/h"  # as typed in the unknown's field
    # hand calculation: 20,000 lb/h × 20 °F more × cp ≈ 1 Btu/(lb·°F) ≈ 0.40 MMBtu/h (cp of hot water within 2 %)
    assert table.loc[row, f"hotter − {AS_TYPED}"] == pytest.approx(0.40, rel=0.02)
    # hand calculation: the SI difference (W) written in MMBtu/h
    assert table.loc[row, f"hotter − {AS_TYPED}"] == pytest.approx(
        (frame.loc["answer", "hotter"] - frame.loc["answer", AS_TYPED]) / to_si(1.0, "MMBtu/h", "power"), rel=1e-9)


def test_the_command_line_shows_the_difference_in_degF(tmp_path, capsys):
    path = tmp_path / "ice.json"
    ws = ice_in_fahrenheit()
    path.write_text(ws.model_dump_json())
    assert main(["cases", str(path), "--json", "--units", "US"]) == 0
    shown = json.loads(capsys.readouterr().out)
    row = shown["index"].index(next(r for r in shown["index"] if r.startswith("Tank T-5 final temperature")))
    values = dict(zip(shown["columns"], shown["data"][row]))
    frame = run_cases(ws)
    # hand calculation: Δ°F = 1.8 × ΔK
    assert values[f"less ice − {AS_TYPED}"] == pytest.approx(
        1.8 * (frame.loc["answer", "less ice"] - frame.loc["answer", AS_TYPED]), rel=1e-9)
    assert values[f"less ice − {AS_TYPED}"] == pytest.approx(values["less ice"] - values[AS_TYPED], rel=1e-9)


# --------------------------------------------------------------------------- 2. a case at a data limit
def glycol_too_cold():
    return with_cases(sample(GLYCOL_RATED), case("too cold", (GLYCOL_INLET, -20, "degC")),
                      case("warmer", (GLYCOL_INLET, 65, "degC")))


def test_errors_with_fields_survive_a_copy_and_pickle():
    """pandas deep-copies a frame's attrs (where run_cases keeps each refusal) on every row it hands out."""
    errors = [PropertyRangeError("water", "temperature", 26.0, 273.16, 2273.15, "temperature", CW_INLET),
              UnitError("kg", "a temperature unit", CW_INLET)]
    for error in errors:
        for copied in (copy.copy(error), copy.deepcopy(error), pickle.loads(pickle.dumps(error))):
            # the definition of a copy: the same class, fields, address and words
            assert type(copied) is type(error) and vars(copied) == vars(error) and str(copied) == str(error)


def test_a_case_below_the_glycol_data_is_refused_and_the_others_solved():
    ws = glycol_too_cold()
    frame = run_cases(ws)
    refusal = frame.attrs["refusals"]["too cold"]
    assert isinstance(refusal, PropertyRangeError) and refusal.where == GLYCOL_INLET
    # hand calculation: -20 °C = 253.15 K, below the lowest temperature of the data
    assert refusal.value == pytest.approx(253.15) and refusal.value < refusal.low
    assert set(frame.attrs["refusals"]) == {"too cold"}
    table = case_table(frame, "SI")  # raised TypeError when pandas copied the refusal
    assert table[["too cold", f"too cold − {AS_TYPED}"]].isna().all().all()
    # the public solve (with the exchanger's rating) of the sheet with the override set (DEVELOPERS.md: a case
    # is the sheet with its overrides set)
    expected = solve_and_analyse(with_value(ws.model_copy(update={"cases": []}), GLYCOL_INLET,
                                            (65, "degC"))).answer.value_si
    assert frame.loc["answer", "warmer"] == pytest.approx(expected, rel=1e-9)


@pytest.mark.parametrize("fmt", [[], ["--json"], ["--csv"]])
def test_the_command_line_lists_a_case_at_a_data_limit_without_a_traceback(tmp_path, capsys, fmt):
    path = tmp_path / "glycol.json"
    path.write_text(glycol_too_cold().model_dump_json())
    assert main(["cases", str(path), *fmt]) == 0  # the documented exit status of a run that ends
    out, err = capsys.readouterr()
    listed = err if fmt else out  # with --json/--csv the table stays data: the reason goes to standard error
    assert f"refused: too cold: {GLYCOL_INLET}: temperature" in listed and "outside the property data" in listed
    assert "Traceback" not in out + err
    if fmt == ["--json"]:
        assert "too cold" in json.loads(out)["columns"]


def test_a_temperature_far_below_any_data_is_refused_with_its_address():
    ws = with_cases(sample(CONDENSER), case("cryogenic", (CW_INLET, 26, "K")))
    frame = run_cases(ws)
    refusal = frame.attrs["refusals"]["cryogenic"]
    assert refusal.where == CW_INLET and refusal.value == pytest.approx(26.0)  # as typed: 26 K
    assert set(frame.attrs["refusals"]) == {"cryogenic"}  # the sample's own cases are solved
    case_table(frame, "US")


def test_the_page_lists_a_case_at_a_data_limit_without_a_traceback():
    at = page(glycol_too_cold())
    assert not at.exception, [e.value for e in at.exception]
    table = next(d.value for d in at.dataframe if d.value.index.name == "output")
    assert "too cold" in table.columns and table["too cold"].isna().all()
    assert "1 case(s) cannot be solved" in "\n".join(w.value for w in at.warning)
    listed = unescaped("\n".join(m.value for m in at.markdown))
    assert f"- too cold: {GLYCOL_INLET}: temperature" in listed


# --------------------------------------------------------------------------- 3. the unknown overridden
def test_an_override_of_the_unknown_is_refused_at_the_case():
    ws = with_cases(sample(CONDENSER), case("more water", (CW_FLOW, 50, "t/h")))
    frame = run_cases(ws)
    refusal = frame.attrs["refusals"]["more water"]
    # the address convention of a bad override (tests/test_whatif.py): the case, then the override's address
    assert refusal.where == "cases[more water]"
    assert refusal.message.startswith(f"override of {CW_FLOW}: this is the unknown: the balance solves for it")
    assert math.isnan(frame.loc["answer", "more water"])
    assert set(frame.attrs["refusals"]) == {"more water"}


def test_the_command_line_and_the_page_list_the_override_of_the_unknown(tmp_path, capsys):
    ws = with_cases(sample(CONDENSER), case("more water", (CW_FLOW, 50, "t/h")))
    path = tmp_path / "condenser.json"
    path.write_text(ws.model_dump_json())
    assert main(["cases", str(path)]) == 0
    assert (f"refused: more water: cases[more water]: override of {CW_FLOW}: this is the unknown"
            in capsys.readouterr().out)
    at = page(ws)
    assert not at.exception, [e.value for e in at.exception]
    assert f"- more water: cases[more water]: override of {CW_FLOW}: this is the unknown" in unescaped(
        "\n".join(m.value for m in at.markdown))


# --------------------------------------------------------------------------- 4. one input set twice
def test_two_overrides_of_one_input_are_refused_at_the_case():
    twice = case("twice", (CW_INLET, 20, "degC"), ("streams[Cooling water].outlet.temperature", 40, "degC"),
                 (CW_INLET, 22, "degC"))
    frame = run_cases(with_cases(sample(CONDENSER), twice))
    refusal = frame.attrs["refusals"]["twice"]
    assert refusal.where == "cases[twice]"
    assert refusal.message.startswith(f"override of {CW_INLET}: this case already sets this input")
    assert set(frame.attrs["refusals"]) == {"twice"}


def test_the_same_input_written_with_other_spacing_is_the_same_input():
    twice = case("twice", (CW_INLET, 20, "degC"), (f" {CW_INLET} ", 22, "degC"))
    frame = run_cases(with_cases(sample(CONDENSER), twice))
    assert "this case already sets this input" in frame.attrs["refusals"]["twice"].message


def test_the_command_line_lists_the_duplicate_override(tmp_path, capsys):
    twice = case("twice", (CW_INLET, 20, "degC"), (CW_INLET, 22, "degC"))
    path = tmp_path / "condenser.json"
    path.write_text(with_cases(sample(CONDENSER), twice).model_dump_json())
    assert main(["cases", str(path)]) == 0
    assert (f"refused: twice: cases[twice]: override of {CW_INLET}: this case already sets this input"
            in capsys.readouterr().out)


# --------------------------------------------------------------------------- a case named like another column
@pytest.mark.parametrize("name", [AS_TYPED, f"winter − {AS_TYPED}"])
def test_a_case_named_like_another_column_is_refused(name):
    """Its column would stand for the sheet as typed (or for winter's difference) with another case's numbers."""
    ws = with_cases(sample(CONDENSER), case(name, (CW_INLET, 10, "degC")))
    with pytest.raises(AddressError) as refused:
        run_cases(ws)
    # the address of a case (tests/test_whatif.py), and what the name clashes with
    assert refused.value.where == f"cases[{name}]" and "give the case another name" in refused.value.message
