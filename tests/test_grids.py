"""The page's grids <-> worksheet conversion (webapp.grids), tested directly.

AppTest cannot type into a table, so everything a table edit does is checked here.
References: the bundled samples (scenarios of our own), hand calculations, and IAPWS-IF97
through the `iapws` package for water.
"""
from pathlib import Path

import pytest
from iapws import IAPWS97

from heatbalance import address, solve
from heatbalance.worksheet import Quantity, Unknown, load_worksheet
from webapp import grids as tb

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
    assert tb.parse_quantity(glycol["inlet"], ("temperature",), "inlet") == Quantity(value=5, unit="degC")
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
    assert [label for _, label in unknown_choices(built)] == ["Water: flow", "Water: inlet temperature",
                                                              "Water: outlet temperature"]
    with pytest.raises(HeatBalanceError) as refused:
        solve(built.model_copy(update={"unknowns": [Unknown(kind="amount", line="Water")]}))
    assert refused.value.address == "streams[Water].outlet.temperature"
    assert tb.cell_of(refused.value.address, built) == tb.CellProblem("streams", 0, "outlet", "")


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
    assert solve(built).answer.value_si == pytest.approx(1000 / 3600 * dh * 1000, rel=1e-6)  # ≈ 69.72 kW


def test_choosing_a_new_unknown_frees_the_old_one_with_its_answer():
    """What the page's 'Solve for' does (webapp.state.PageState.pick_unknown), through the engine's addresses."""
    ws = sample("steam_heater_glycol.json")
    first = solve(ws).answer  # Steam flow ≈ 745.6 kg/h
    switched = address.with_unknown(ws, "streams[Glycol].outlet.temperature", address.answer_value(ws, first))
    assert switched.unknowns == [Unknown(kind="temperature", line="Glycol", end="outlet")]
    assert switched.streams[1].flow == Quantity(value=745.627, unit="kg/h")  # 6 significant figures, unit typed
    rows = tb.worksheet_to_tables(switched)["streams"]
    assert rows[0]["outlet"] == "? °C" and rows[1]["flow"] == "745.627 kg/h"
    # solving the same balance the other way gives back the sample's 40 °C outlet (313.15 K)
    assert solve(switched).answer.value_si == pytest.approx(313.15, abs=1e-3)


def test_freeing_a_plateau_answer_keeps_its_phase_fraction():
    ws = sample("condensate_flash.json")
    answer = solve(ws).answer  # on the boiling plateau at 0.5 barg
    switched = address.with_unknown(ws, "streams[Condensate return].inlet.temperature",
                                    address.answer_value(ws, answer))
    outlet = switched.streams[0].outlet
    assert outlet.vapour_fraction == pytest.approx(answer.phase_fraction, abs=1e-6)
    assert outlet.pressure == Quantity(value=0.5, unit="barg")
    assert tb.worksheet_to_tables(switched)["streams"][0]["outlet"].startswith("vapour fraction 0.12")
    # solving back for the inlet temperature gives the sample's 175 °C
    assert solve(switched).answer.value_si == pytest.approx(175.0 + 273.15, abs=1e-3)


def _rename(ws, table, row, new_name):
    """What a rename in a grid does on the page: the edit, the renames followed, the grids read back."""
    tables = tb.worksheet_to_tables(ws)
    before = tables[table]
    tables[table] = tb.apply_edits(before, {"edited_rows": {row: {"name": new_name}}}, tb.COLUMNS[table])
    renames = tb.renamed(before, tables[table])
    base, tables = tb.follow_renames(ws, tables, table, renames)
    return renames, tables, tb.tables_to_worksheet(tables, base)


def test_renaming_the_unknown_line_keeps_it_the_unknown():
    ws = sample("steam_heater_glycol.json")
    renames, _, (built, problems) = _rename(ws, "streams", 1, "LP steam")
    assert renames == {(None, "Steam"): "LP steam"} and problems == []
    assert built.unknowns == [Unknown(kind="amount", line="LP steam")]
    assert solve(built).answer.value_si == pytest.approx(solve(ws).answer.value_si, rel=1e-12)


def test_renaming_a_vessel_follows_into_its_charges():
    ws = sample("batch_reactor_exotherm.json")
    _, tables, (built, problems) = _rename(ws, "vessels", 0, "R-3")
    assert problems == [] and built.vessels[0].name == "R-3" and built.reactions[0].vessel == "R-3"
    assert {r["vessel"] for r in tables["charges"]} == {"R-3"}
    assert solve(built).answer.value_si == pytest.approx(solve(ws).answer.value_si, rel=1e-12)


def test_renaming_a_charge_that_is_the_unknown_keeps_it_the_unknown():
    ws = sample("hot_condensate_quench.json")
    unknown = address.unknown_address(ws.unknowns[0])
    charge = address.parse(unknown)[1][1]
    row = [r["name"] for r in tb.worksheet_to_tables(ws)["charges"]].index(charge)
    _, _, (built, problems) = _rename(ws, "charges", row, "Cold water")
    assert problems == [] and address.unknown_address(built.unknowns[0]) == unknown.replace(charge, "Cold water")


def test_rows_added_or_deleted_are_no_rename():
    assert tb.renamed([{"name": "A"}, {"name": "B"}], [{"name": "B"}]) == {}
    assert tb.renamed([{"name": "A"}], [{"name": "A"}, {"name": "C"}]) == {}


@pytest.mark.parametrize("where, place", [
    ("streams[Glycol].flow", ("streams", 0, "flow")),
    ("streams[Steam].outlet.pressure", ("streams", 1, "outlet pressure")),
    ("streams[Steam].inlet.temperature", ("streams", 1, "inlet")),
    ("streams[Steam].outlet.vapour_fraction", ("streams", 1, "outlet")),
    ("streams[Glycol].pressure", ("streams", 0, "pressure")),
    ("streams[Glycol].mass_fraction", ("streams", 0, "mass fraction")),
    ("streams[Glycol]", ("streams", 0, None)),
    ("streams[Nowhere].flow", ("streams", None, "flow")),
    ("losses[Shell losses].value", ("losses", 0, "heat")),
    ("unknown", ("unknown", None, None)),
    ("basis.duration", ("basis", None, "duration")),
    ("worksheet", ("worksheet", None, None)),
    ("", ("worksheet", None, None)),
    ("not an address!", ("worksheet", None, None)),
])
def test_a_refusals_address_marks_its_cell(where, place):
    found = tb.cell_of(where, sample("steam_heater_glycol.json"))
    assert (found.table, found.row, found.column) == place


@pytest.mark.parametrize("where, place", [
    ("vessels[R-2].charges[Reagent].mass", ("charges", 1, "mass")),
    ("vessels[R-2].charges[Batch].initial.temperature", ("charges", 0, "initial")),
    ("vessels[R-2].charges[Batch].mass_fraction", ("charges", 0, "mass fraction")),
    ("vessels[R-2].equipment.mass", ("equipment", 0, "mass")),
    ("vessels[R-2].equipment.heat_capacity", ("equipment", 0, "heat capacity")),
    ("vessels[R-2].final.temperature", ("vessels", 0, "final")),
    ("vessels[R-2].final.pressure", ("vessels", 0, "pressure")),
    ("vessels[R-2].pressure", ("vessels", 0, "pressure")),
    ("vessels[R-2].screening.jacket.UA", ("vessels", 0, None)),
    ("duties[Jacket cooling].value", ("duties", 0, "heat")),
    ("reactions[Main reaction].amount", ("reactions", 0, "amount")),
    ("reactions[Main reaction].enthalpy", ("reactions", 0, "heat of reaction")),
    ("reactions[Main reaction].vessel", ("reactions", 0, "vessel")),
    ("reactions[Main reaction].equation", ("reactions", 0, "equation")),
    ("materials[reagent solution].phases[liquid].cp", ("materials", 0, "cp")),
    ("materials[reagent solution].min_temperature", ("materials", 0, "min temperature")),
])
def test_a_batch_refusals_address_marks_its_cell(where, place):
    ws = sample("batch_reactor_exotherm.json")
    assert [r["name"] for r in tb.worksheet_to_tables(ws)["charges"]] == ["Batch", "Reagent"]  # the sample's rows
    found = tb.cell_of(where, ws)
    assert (found.table, found.row, found.column) == place


def test_a_shared_temperature_address_marks_its_cell():
    def charge(name, kg):
        return {"name": name, "material": "water", "mass": f"{kg} kg", "initial": {"temperature": "20 degC"}}
    ws = tb.tables_to_worksheet({}, tb.empty_worksheet())[0].model_validate({
        "common_temperatures": [{"name": "Mix", "temperature": "30 degC"}],
        "vessels": [{"name": "A", "final": {"common": "Mix"}, "charges": [charge("x", 1), charge("y", 2)]},
                    {"name": "B", "final": {"common": "Mix"}, "charges": [charge("z", 3)]}]})
    assert tb.cell_of("common_temperatures[Mix].temperature", ws) == tb.CellProblem("shared", 0, "temperature", "")
    # charges are numbered across vessels, in the order the grid shows them
    assert tb.cell_of("vessels[B].charges[z].mass", ws) == tb.CellProblem("charges", 2, "mass", "")
    assert [r["name"] for r in tb.worksheet_to_tables(ws)["charges"]] == ["x", "y", "z"]


def test_every_engine_refusal_over_the_samples_lands_on_a_cell_the_grids_have():
    """Each input's address maps to a column of its grid (where the grids show that field)."""
    for path in SAMPLES:
        ws = load_worksheet(path.read_bytes())
        tables = tb.worksheet_to_tables(ws)
        for field in address.inputs(ws):
            cell = tb.cell_of(field.address, ws)
            if ".screening." in field.address or field.address in ("basis.duration", "operating_hours") \
                    or field.address.startswith(("exchangers[", "utilities[", "mixings[", "freezing_materials[")):
                continue  # not in a grid: the screening panel, the basis line, the exchanger, mixing and
                # freezing-range materials panels, the file
            assert cell.table in tb.COLUMNS and cell.row is not None and cell.row < len(tables[cell.table]), \
                (path.name, field.address, cell)
            assert cell.column in tb.COLUMNS[cell.table], (path.name, field.address, cell)


def test_screen_units_read_back_as_stored():
    assert tb.format_quantity(Quantity(value=3.2, unit="kJ/(kg*K)")) == "3.2 kJ/(kg·K)"
    assert tb.parse_quantity("3.2 kJ/(kg·K)", ("specific_heat",), "cp") == Quantity(value=3.2, unit="kJ/(kg*K)")
    assert tb.parse_quantity("2 bar(a)", ("pressure",), "pressure") == Quantity(value=2, unit="bar")
    assert tb.parse_quantity("30 psia", ("pressure",), "pressure") == Quantity(value=30, unit="psia")  # as typed
    assert tb.parse_quantity("328 K", ("temperature",), "inlet") == Quantity(value=328, unit="K")


def test_the_grids_read_each_basis_with_the_engines_rule():
    from heatbalance.units import basis_kinds
    ws = sample("batch_reactor_exotherm.json")
    assert basis_kinds("amount", "batch") == ("mass", "mass_flow")
    # a continuous sheet refuses a batch mass; a batch sheet takes a mass
    _, problems = edited(sample("steam_heater_glycol.json"), "streams", {"edited_rows": {0: {"flow": "12 t"}}})
    assert problems == [tb.CellProblem("streams", 0, "flow", "unit 't' is not a mass flow (it measures mass)")]
    back, problems = edited(ws, "charges", {"edited_rows": {0: {"mass": "7 t"}}})
    assert problems == [] and back.vessels[0].charges[0].mass == Quantity(value=7, unit="t")


def test_editor_cells_compare_as_shown():
    columns = tb.COLUMNS["duties"]
    assert tb.same_rows([{"name": "A", "heat": ""}], [{"name": "A", "heat": None}], columns)
    assert not tb.same_rows([{"name": "A", "heat": "1 kW"}], [{"name": "A", "heat": "2 kW"}], columns)
    # derived cells stay as given until the grid is redrawn
    rows = [{"name": "S", "pressure": "2 bar", "pressure is": "absolute"}]
    assert tb.apply_edits(rows, {"edited_rows": {0: {"pressure": "2 barg"}}}, tb.COLUMNS["streams"],
                          derive=False)[0]["pressure is"] == "absolute"


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


def test_a_number_beyond_any_float_is_refused_in_its_cell():
    """A shift engineer's finding: '1e400 t' read as infinity and the page showed a traceback."""
    from heatbalance import HeatBalanceError

    with pytest.raises(HeatBalanceError, match=r"'1e400 t' is beyond any number a worksheet can hold"):
        tb.parse_quantity("1e400 t", ("mass",), "mass")
