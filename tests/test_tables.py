"""The page's tables <-> worksheet conversion (heatbalance.tables), tested directly.

AppTest cannot type into a table, so everything a table edit does is checked here.
References: the bundled samples (scenarios of our own), hand calculations, and IAPWS-IF97
through the `iapws` package for water.
"""
from pathlib import Path

import pytest
from iapws import IAPWS97

from heatbalance import solve
from heatbalance import tables as tb
from heatbalance.worksheet import Quantity, Unknown, load_worksheet

SAMPLES = sorted((Path(__file__).resolve().parent.parent / "sample_data").glob("*.json"))


def sample(name: str):
    return load_worksheet((SAMPLES[0].parent / name).read_bytes())


def edited(ws, table, edits):
    """What a table edit does on the page: apply the edits, read every table back."""
    tables = tb.worksheet_to_tables(ws)
    tables[table] = tb.apply_edits(tables[table], edits, tb.COLUMNS[table])
    return tb.tables_to_worksheet(tables, ws)


@pytest.mark.parametrize("path", SAMPLES, ids=[p.stem for p in SAMPLES])
def test_every_sample_survives_the_round_trip_unchanged(path):
    ws = load_worksheet(path.read_bytes())
    back, problems = tb.tables_to_worksheet(tb.worksheet_to_tables(ws), ws)
    assert problems == []
    assert back.model_dump() == ws.model_dump()


def test_cells_read_as_an_engineer_writes_them():
    rows = tb.worksheet_to_tables(sample("steam_heater_glycol.json"))["streams"]
    glycol, steam = rows
    assert glycol["flow"] == "12 t/h" and glycol["pressure"] == "3 barg" and glycol["pressure is"] == "gauge"
    assert glycol["inlet"] == "5 °C" and glycol["outlet"] == "40 °C"
    # the unknown's cell shows '?' with its unit; plateau states in words
    assert steam["flow"] == "? kg/h"
    assert (steam["inlet"], steam["outlet"]) == ("saturated vapour", "saturated liquid")


@pytest.mark.parametrize("text, fields", [
    ("55 °C", {"temperature": Quantity(value=55, unit="degC")}),
    ("131 degF", {"temperature": Quantity(value=131, unit="degF")}),
    ("saturated vapour", {"vapour_fraction": 1.0}),
    ("Saturated Liquid", {"vapour_fraction": 0.0}),
    ("vapour fraction 0.3", {"vapour_fraction": 0.3}),
    ("vapor 30%", {"vapour_fraction": 0.3}),
    ("solid fraction 0.5", {"solid_fraction": 0.5}),
    ("shared: Mix", {"common": "Mix"}),
])
def test_state_cells(text, fields):
    assert tb.parse_state(text, "outlet") == fields


@pytest.mark.parametrize("cell, message", [
    ("12 kW", "unit 'kW' is not a mass flow (it measures power)"),
    ("12", "'12' has no unit: write it with one, e.g. '12 t/h'"),
    ("twelve t/h", "'twelve t/h' is not a number followed by a unit (e.g. '12 t/h')"),
    ("12 t/fortnightly", "unit 't/fortnightly' is not a mass flow (not a unit this tool knows)"),
    ("? kg/h", "'?' marks the unknown: pick this quantity under 'Solve for', or enter a value"),
])
def test_a_bad_flow_cell_is_reported_where_it_is(cell, message):
    ws, problems = edited(sample("steam_heater_glycol.json"), "streams", {"edited_rows": {0: {"flow": cell}}})
    assert ws is None
    assert problems == [tb.CellProblem("streams", 0, "flow", message)]
    assert problems[0].text == f"Streams, row 1, flow: {message}"


def test_a_phase_fraction_above_one_is_refused():
    _, problems = edited(sample("condensate_flash.json"), "streams",
                         {"edited_rows": {0: {"outlet": "vapour fraction 1.2"}}})
    assert problems == [tb.CellProblem("streams", 0, "outlet",
                                       "a phase fraction lies between 0 and 1 (or 0 % and 100 %), not 1.2")]


def test_every_bad_cell_is_reported_not_only_the_first():
    _, problems = edited(sample("steam_heater_glycol.json"), "streams",
                         {"edited_rows": {0: {"flow": "12 kW"}, 1: {"pressure": "4 kg"}}})
    assert [(p.row, p.column) for p in problems] == [(0, "flow"), (1, "pressure")]


def test_a_charge_needs_an_existing_vessel_and_a_vessel_a_charge():
    ws = sample("hot_condensate_quench.json")
    _, problems = edited(ws, "charges", {"edited_rows": {0: {"vessel": "Pit 2"}, 1: {"vessel": "Pit 2"}}})
    assert tb.CellProblem("charges", 0, "vessel", "no vessel called 'Pit 2'; vessels: Quench pit") in problems
    assert tb.CellProblem("vessels", 0, None, "vessel Quench pit has no charges: add at least one in "
                                              "Vessel charges") in problems


def test_repeated_names_are_refused_on_their_table():
    _, problems = edited(sample("steam_heater_glycol.json"), "streams", {"edited_rows": {0: {"name": "Steam"}}})
    assert len(problems) == 1 and problems[0].table == "worksheet"
    assert "line names must be unique; repeated: Steam" in problems[0].message


def test_apply_edits_edits_adds_and_deletes_rows():
    rows = [{"name": "A", "heat": "1 kW"}, {"name": "B", "heat": "2 kW"}]
    out = tb.apply_edits(rows, {"edited_rows": {"0": {"heat": "5 kW"}}, "deleted_rows": [1],
                                "added_rows": [{"name": "C"}]}, ["name", "heat"])
    assert out == [{"name": "A", "heat": "5 kW"}, {"name": "C", "heat": None}]
    assert rows[0]["heat"] == "1 kW"  # the input rows are not changed


def test_blank_added_rows_are_ignored():
    ws = sample("steam_heater_glycol.json")
    back, problems = edited(ws, "streams", {"added_rows": [{}]})
    assert problems == [] and back.model_dump() == ws.model_dump()


def test_a_new_line_may_leave_its_unknown_open_and_the_engine_says_where():
    from heatbalance import HeatBalanceError, unknown_choices
    ws = tb.empty_worksheet()
    tables = tb.worksheet_to_tables(ws)
    tables["streams"] = [{"name": "Water", "material": "water", "flow": "", "inlet": "20 °C", "outlet": ""}]
    built, problems = tb.tables_to_worksheet(tables, ws)
    assert problems == [] and built.streams[0].flow is None
    assert [label for label, _ in unknown_choices(built)] == ["Water: flow", "Water: inlet temperature",
                                                              "Water: outlet temperature"]
    with pytest.raises(HeatBalanceError) as refused:
        solve(built.model_copy(update={"unknowns": [Unknown(kind="amount", line="Water")]}))
    assert refused.value.where == "stream Water outlet temperature"
    assert tb.locate(refused.value.where, built).column == "outlet"


def test_a_worksheet_built_from_tables_alone_solves_against_iapws():
    """A new sheet typed row by row: 1000 kg/h of water heated from 20 to 80 °C at 1 atm; the duty?"""
    ws = tb.empty_worksheet()
    tables = tb.worksheet_to_tables(ws)
    tables["streams"] = [{"name": "Water", "material": "water", "flow": "1000 kg/h", "pressure": "0 barg",
                          "inlet": "20 °C", "outlet": "80 °C"}]
    tables["duties"] = [{"name": "Heater", "heat": "? kW"}]
    base = ws.model_copy(update={"unknowns": [Unknown(kind="duty", term="Heater")]})
    built, problems = tb.tables_to_worksheet(tables, base)
    assert problems == []
    # IAPWS-IF97 through the iapws package: h(80 °C) − h(20 °C) at 0.101325 MPa, kJ/kg
    dh = IAPWS97(T=353.15, P=0.101325).h - IAPWS97(T=293.15, P=0.101325).h
    assert solve(built).answer.value == pytest.approx(1000 / 3600 * dh, rel=1e-6)  # ≈ 69.72 kW


def test_choosing_a_new_unknown_frees_the_old_one_with_its_answer():
    ws = sample("steam_heater_glycol.json")
    first = solve(ws).answer  # Steam flow ≈ 745.6 kg/h
    switched = tb.set_unknown(ws, Unknown(kind="temperature", line="Glycol", end="outlet"), first)
    assert switched.unknowns == [Unknown(kind="temperature", line="Glycol", end="outlet")]
    assert switched.streams[1].flow == Quantity(value=float(f"{first.value:.6g}"), unit="kg/h")
    # solving the same balance the other way gives back the sample's 40 °C outlet
    assert solve(switched).answer.value == pytest.approx(40.0, abs=1e-3)


def test_freeing_a_plateau_answer_keeps_its_phase_fraction():
    ws = sample("condensate_flash.json")
    answer = solve(ws).answer  # on the boiling plateau at 0.5 barg
    switched = tb.set_unknown(ws, Unknown(kind="temperature", line="Condensate return", end="inlet"), answer)
    outlet = switched.streams[0].outlet
    assert outlet.vapour_fraction == pytest.approx(answer.phase_fraction, abs=1e-6)
    assert outlet.pressure == Quantity(value=0.5, unit="barg")
    # solving back for the inlet temperature gives the sample's 175 °C
    assert solve(switched).answer.value == pytest.approx(175.0, abs=1e-3)


def test_without_an_answer_the_old_unknown_keeps_what_it_had():
    ws = sample("steam_heater_glycol.json")
    switched = tb.set_unknown(ws, Unknown(kind="temperature", line="Glycol", end="outlet"))
    assert switched.streams[1].flow == Quantity(value=500, unit="kg/h")


def test_unknown_label_names_the_picked_choice():
    from heatbalance import unknown_choices
    ws = sample("batch_reactor_exotherm.json")
    assert tb.unknown_label(ws, unknown_choices(ws)) == "R-2: final temperature"
    two = ws.model_copy(update={"unknowns": ws.unknowns * 2})
    assert tb.unknown_label(two, unknown_choices(two)) is None


def test_renaming_the_unknown_line_keeps_it_the_unknown():
    ws = sample("steam_heater_glycol.json")
    tables = tb.worksheet_to_tables(ws)
    edits = {"edited_rows": {1: {"name": "LP steam"}}}
    renames = tb.renamed(tables["streams"], edits)
    tables["streams"] = tb.apply_edits(tables["streams"], edits, tb.COLUMNS["streams"])
    base, tables = tb.follow_renames(ws, tables, "streams", renames)
    built, problems = tb.tables_to_worksheet(tables, base)
    assert renames == {"Steam": "LP steam"} and problems == []
    assert built.unknowns == [Unknown(kind="amount", line="LP steam")]
    assert solve(built).answer.value == pytest.approx(solve(ws).answer.value, rel=1e-12)


def test_renaming_a_vessel_follows_into_its_charges():
    ws = sample("batch_reactor_exotherm.json")
    tables = tb.worksheet_to_tables(ws)
    edits = {"edited_rows": {0: {"name": "R-3"}}}
    renames = tb.renamed(tables["vessels"], edits)
    tables["vessels"] = tb.apply_edits(tables["vessels"], edits, tb.COLUMNS["vessels"])
    base, tables = tb.follow_renames(ws, tables, "vessels", renames)
    built, problems = tb.tables_to_worksheet(tables, base)
    assert problems == [] and built.vessels[0].name == "R-3" and built.reactions[0].vessel == "R-3"
    assert solve(built).answer.value == pytest.approx(solve(ws).answer.value, rel=1e-12)


@pytest.mark.parametrize("where, place", [
    ("stream Glycol flow", ("streams", 0, "flow")),
    ("stream Steam outlet pressure", ("streams", 1, "outlet pressure")),
    ("Steam flow", ("streams", 1, "flow")),
    ("loss Shell losses", ("losses", 0, "heat")),
    ("unknown", ("unknown", None, None)),
    ("basis duration", ("basis", None, None)),
])
def test_engine_messages_are_placed_on_their_row(where, place):
    found = tb.locate(where, sample("steam_heater_glycol.json"))
    assert (found.table, found.row, found.column) == place


@pytest.mark.parametrize("where, place", [
    ("vessel R-2, charge Reagent mass", ("charges", 1, "mass")),
    ("vessel R-2 equipment mass", ("equipment", 0, "mass")),
    ("vessel R-2 final temperature", ("vessels", 0, "final")),
    ("reaction Main reaction amount", ("reactions", 0, "amount")),
    ("material reagent solution liquid cp", ("materials", 0, None)),
])
def test_batch_messages_are_placed_on_their_row(where, place):
    found = tb.locate(where, sample("batch_reactor_exotherm.json"))
    assert (found.table, found.row, found.column) == place


@pytest.mark.parametrize("text, reference", [("4 barg", "gauge"), ("50 psig", "gauge"), ("2 bara", "absolute"),
                                             ("300 kPa", "absolute"), ("4 kg", ""), ("", "")])
def test_pressure_reference_is_said(text, reference):
    assert tb.pressure_reference(text) == reference


def test_material_picker_lists_own_materials_first_then_the_catalogue():
    names = tb.material_names(sample("batch_reactor_exotherm.json"))
    assert names[0] == "reagent solution"
    assert {"water", "ethylene glycol (aq)", "stainless steel 316"} <= set(names)


def test_an_edit_keeps_the_reaction_equation_and_the_screening_inputs():
    ws = sample("glycol_hydration_screening.json")
    back, problems = edited(ws, "duties", {"edited_rows": {"0": {"heat": "-80 kW"}}})
    assert problems == []
    assert back.reactions[0].equation == "ethylene oxide(l) + water(l) -> ethylene glycol(l)"
    assert back.reactions[0].enthalpy is None and back.reactions[0].key_reactant == "ethylene oxide"
    assert back.vessels[0].screening == ws.vessels[0].screening
    assert back.duties[0].value == Quantity(value=-80, unit="kW")


def test_a_reaction_needs_a_heat_or_an_equation():
    ws = sample("glycol_hydration_screening.json")
    back, problems = edited(ws, "reactions", {"edited_rows": {"0": {"equation": None}}})
    assert back is None
    # without the equation, ΔH must be typed, and a mass amount needs a molar mass
    assert [(p.table, p.column) for p in problems] == [("reactions", "heat of reaction"), ("reactions", "amount")]
    assert problems[0].message.startswith("empty: give a value with its unit")
    assert "is not an amount of substance or a molar flow" in problems[1].message
