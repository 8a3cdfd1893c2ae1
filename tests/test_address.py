"""Addresses: every input and every possible unknown has one; list -> get -> set -> solve on every sample.

Expected numbers are hand calculations (written beside them) or the engine's own answer on the
untouched sample (a consistency check, labelled as such).
"""
from __future__ import annotations

import glob
import math

import pytest

from heatbalance import address as A
from heatbalance.balance import solve
from heatbalance.errors import AddressError, HeatBalanceError, InputError
from heatbalance.present.text import answer_text
from heatbalance.worksheet import Quantity, load_worksheet
from sheet_factory import build, constant_cp_material, q, stream, temp

SAMPLES = sorted(glob.glob("sample_data/*.json"))
IDS = [p.split("/")[-1].removesuffix(".json") for p in SAMPLES]


def sample(path: str):
    return load_worksheet(open(path, "rb").read())


@pytest.mark.parametrize("path", SAMPLES, ids=IDS)
def test_every_listed_input_reads_back_and_sets_to_itself(path):
    ws = sample(path)
    listed = A.inputs(ws)
    assert len({i.address for i in listed}) == len(listed)  # unique
    for entry in listed:
        assert A.get(ws, entry.address) == entry.value
        if entry.value is not None:
            assert A.with_value(ws, entry.address, entry.value) == ws  # setting a value to itself changes nothing


@pytest.mark.parametrize("path", SAMPLES, ids=IDS)
def test_a_set_value_is_what_is_solved(path):
    """Nudge each numeric input by +1 % in its own unit: the sheet then solves (or refuses clearly) with it."""
    ws = sample(path)
    first = solve(ws).answer
    base = (first.value_si, first.phase_fraction)
    changed = 0
    for entry in A.inputs(ws):
        if entry.is_unknown or not isinstance(entry.value, Quantity) or entry.value.value == 0:
            continue
        nudged = Quantity(value=entry.value.value * 1.01, unit=entry.value.unit)
        moved = A.with_value(ws, entry.address, nudged)
        assert A.get(moved, entry.address) == nudged
        assert [i.address for i in A.inputs(moved)] == [i.address for i in A.inputs(ws)]
        try:
            answer = solve(moved).answer
        except HeatBalanceError as exc:
            assert exc.where  # e.g. a temperature nudged out of the data: refused, named
            continue
        changed += (answer.value_si, answer.phase_fraction) != base
        assert math.isfinite(answer.value_si)
    assert changed > 0  # at least one input moves the answer


@pytest.mark.parametrize("path", SAMPLES, ids=IDS)
def test_the_unknown_round_trips_through_its_address(path):
    ws = sample(path)
    (unknown,) = ws.unknowns
    address = A.unknown_address(unknown)
    assert A.unknown_at(address) == unknown
    assert address in [a for a, _ in A.unknown_choices(ws)]
    assert solve(ws).answer.address == address
    for choice, label in A.unknown_choices(ws):
        assert A.unknown_address(A.unknown_at(choice)) == choice and label


@pytest.mark.parametrize("path", SAMPLES, ids=IDS)
def test_switching_the_unknown_and_back_keeps_the_answer(path):
    """Solve, make another field the unknown (the old one keeps its answer), solve, switch back: same answer."""
    ws = sample(path)
    first = solve(ws)
    refusals = []
    for other, _ in A.unknown_choices(ws):
        if other == first.answer.address:
            continue
        try:
            switched = A.with_unknown(ws, other, A.answer_value(ws, first.answer))
            second = solve(switched)
        except HeatBalanceError as exc:
            refusals.append(exc)  # e.g. the flow of a line alone is undetermined
            continue
        back = A.with_unknown(switched, first.answer.address, A.answer_value(switched, second.answer))
        assert solve(back).answer.value_si == pytest.approx(first.answer.value_si, rel=1e-4, abs=1e-4)
        return
    # the ice tank ends on a melting plateau of two materials, which only its temperature can be solved for:
    # every other choice is refused, at the field at fault
    assert refusals and all(r.where == "vessels[Tank T-5].final" for r in refusals)


def test_the_stored_answer_does_not_depend_on_any_view():
    """Regression: the page stored 745.627 kg/h on the SI view but 1643.83 lb/h on the US view."""
    ws = sample("sample_data/steam_heater_glycol.json")
    result = solve(ws)
    stored = A.answer_value(ws, result.answer)
    assert stored == Quantity(value=745.627, unit="kg/h")  # the unit typed in the sample's flow cell
    switched = A.with_unknown(ws, "streams[Glycol].outlet.temperature", stored)
    assert A.get(switched, "streams[Steam].flow") == stored
    assert A.get(switched, "streams[Glycol].inlet.temperature") == Quantity(value=5, unit="degC")  # as typed


def test_an_answer_without_a_typed_unit_takes_the_sheets_unit_for_that_kind():
    oil = constant_cp_material("oil", cp=0.5, unit="Btu/(lb*degF)")
    ws = build(materials=[oil],
               streams=[stream("Oil", "oil", q(10000, "lb/h"), temp(70, "degF"), temp(250, "degF"))],
               duties=[{"name": "Heater", "value": None}], unknowns=[{"kind": "duty", "term": "Heater"}])
    result = solve(ws)
    # hand calculation: 10 000 lb/h × 0.5 Btu/(lb·°F) × 180 °F = 900 000 Btu/h; no heat unit typed anywhere
    assert A.answer_value(ws, result.answer) == Quantity(value=263.764, unit="kW")  # × 0.29307107 W per Btu/h
    assert A.storage_unit(ws, "streams[Oil].outlet.temperature", "temperature") == "degF"


def test_the_us_samples_duty_is_answered_in_the_unit_typed_for_it():
    """Regression: the duty typed in MMBtu/h was answered in kW on the SI view."""
    result = solve(sample("sample_data/us_water_heater_duty.json"))
    assert result.answer.typed_unit == "MMBtu/h"
    assert answer_text(result.answer, "SI") == answer_text(result.answer, "US") == "3.202 MMBtu/h"


@pytest.mark.parametrize("address, steps", [
    ("streams[Steam].flow", [("streams", "Steam"), ("flow", None)]),
    ("vessels[R-1].charges[Water].initial.temperature",
     [("vessels", "R-1"), ("charges", "Water"), ("initial", None), ("temperature", None)]),
    (r"streams[odd \] name\\].flow", [("streams", "odd ] name\\"), ("flow", None)]),
    ("materials[oil].phases[liquid].cp", [("materials", "oil"), ("phases", "liquid"), ("cp", None)]),
])
def test_addresses_parse(address, steps):
    assert A.parse(address) == steps
    head, name = steps[0]
    assert A.item(head, name, *[f for f, n in steps[1:] if n is None]) == address or "[" in address[len(head):].split(".", 1)[1]


@pytest.mark.parametrize("bad", ["", "streams[Steam", "streams..flow", "streams[Steam]flow", "streams[Steam].in let"])
def test_text_that_is_not_an_address_is_refused(bad):
    with pytest.raises(AddressError, match="address"):
        A.parse(bad)


def test_an_address_that_names_nothing_says_what_there_is():
    ws = sample("sample_data/steam_heater_glycol.json")
    with pytest.raises(AddressError, match=r"no stream called 'Stem' \(there are: Glycol, Steam\)"):
        A.get(ws, "streams[Stem].flow")
    with pytest.raises(AddressError, match=r"this field takes a plain number between 0 and 1"):
        A.with_value(ws, "streams[Glycol].mass_fraction", "0.4 kg")
    with pytest.raises(AddressError, match=r"unit 'kW' is not a mass flow"):
        A.with_value(ws, "streams[Glycol].flow", "12 kW")
    with pytest.raises(AddressError, match=r"cannot be the unknown"):
        A.unknown_at("streams[Glycol].pressure")


def test_a_value_in_another_unit_is_stored_as_typed():
    ws = sample("sample_data/steam_heater_glycol.json")
    moved = A.with_value(ws, "streams[Glycol].flow", "26455 lb/h")
    assert A.get(moved, "streams[Glycol].flow") == Quantity(value=26455, unit="lb/h")
    # 26 455 lb/h = 12.0000 t/h (1 lb = 0.45359237 kg, exact): the answer barely moves
    assert solve(moved).answer.value_si == pytest.approx(solve(ws).answer.value_si, rel=1e-4)


def test_a_state_temperature_replaces_a_phase_fraction():
    ws = sample("sample_data/steam_heater_glycol.json")
    moved = A.with_value(ws, "streams[Steam].outlet.temperature", "120 degC")  # subcooled condensate
    state = moved.streams[1].outlet
    assert state.temperature == Quantity(value=120, unit="degC") and state.vapour_fraction is None


def test_a_rename_carries_the_unknown_and_the_references():
    ws = sample("sample_data/batch_reactor_exotherm.json")
    vessel = ws.vessels[0].name
    renamed = A.rename(ws, A.item("vessels", vessel), "Reactor 2")
    assert [v.name for v in renamed.vessels] == ["Reactor 2"]
    assert A.unknown_address(renamed.unknowns[0]) == "vessels[Reactor 2].final.temperature"
    assert all(r.vessel in (None, "Reactor 2") for r in renamed.reactions)
    assert solve(renamed).answer.value_si == pytest.approx(solve(ws).answer.value_si, rel=1e-12)
    kept = f"vessels[{vessel}].charges[{ws.vessels[0].charges[0].name}].mass"
    moved = A.follow_rename(kept, A.item("vessels", vessel), "Reactor 2")
    assert A.get(renamed, moved) == A.get(ws, kept)
    with pytest.raises(AddressError, match="already the name"):
        A.rename(A.rename(ws, "duties[" + ws.duties[0].name + "]", "X"), "losses[" + ws.losses[0].name + "]", "X") \
            if ws.losses else A.rename(ws, A.item("vessels", vessel), vessel)


def test_a_renamed_shared_temperature_follows_into_the_states():
    ws = build(common_temperatures=[{"name": "Mix"}],
               streams=[stream("A", "water", q(1, "t/h"), temp(20), {"common": "Mix"}),
                        stream("B", "water", q(1, "t/h"), temp(80), {"common": "Mix"})],
               unknowns=[{"kind": "temperature", "common": "Mix"}])
    renamed = A.rename(ws, "common_temperatures[Mix]", "Header")
    assert renamed.streams[0].outlet.common == "Header" and renamed.unknowns[0].common == "Header"
    # hand calculation: equal flows of water at 20 and 80 °C mix at ≈ 50 °C (cp nearly constant)
    assert solve(renamed).answer.value_si - 273.15 == pytest.approx(50.0, abs=0.1)


@pytest.mark.parametrize("address, kinds", [
    ("streams[S].flow", ("mass_flow",)), ("vessels[V].charges[C].mass", ("mass", "mass_flow")),
    ("duties[D].value", ("energy", "power")), ("reactions[R].amount", ("amount", "molar_flow", "mass", "mass_flow")),
    ("vessels[V].screening.jacket.UA", ("thermal_conductance",)), ("streams[S].inlet.vapour_fraction", ("fraction",)),
])
def test_the_kind_of_each_field_follows_the_one_basis_rule(address, kinds):
    basis = "continuous" if address.startswith("streams") else "batch"
    assert A.kinds_of(address, basis) == kinds


def test_every_refusal_of_a_bad_cell_names_a_field_that_exists():
    """A refusal's address is data the page can act on: it resolves to the field (or the item) at fault."""
    ws = sample("sample_data/batch_reactor_exotherm.json")
    charge = ws.vessels[0].charges[0]
    address = f"vessels[{ws.vessels[0].name}].charges[{charge.name}].mass"
    bad = A.with_value(ws, address, Quantity(value=-5, unit="kg"))
    with pytest.raises(InputError) as refusal:
        solve(bad)
    assert refusal.value.where == address
    assert A.get(bad, refusal.value.where) == Quantity(value=-5, unit="kg")


@pytest.mark.parametrize("path", SAMPLES, ids=IDS)
def test_addresses_survive_a_share_link_and_the_store(path, tmp_path):
    from heatbalance.links import decode_sheet, parse_link, sheet_link
    from heatbalance.store import WorksheetStore

    ws = sample(path)
    kind, payload = parse_link(sheet_link(ws, "https://sheets.example.invalid/"))
    reopened = decode_sheet(payload)
    with WorksheetStore(f"sqlite:///{tmp_path / 'store.sqlite3'}") as store:
        saved = store.open(store.save(ws).id).worksheet
    for other in (reopened, saved):
        assert [(i.address, i.value) for i in A.inputs(other)] == [(i.address, i.value) for i in A.inputs(ws)]
        assert A.unknown_address(other.unknowns[0]) == A.unknown_address(ws.unknowns[0])


def test_renaming_an_item_that_does_not_exist_is_refused_at_its_address():
    ws = sample("sample_data/batch_reactor_exotherm.json")
    with pytest.raises(AddressError) as refusal:
        A.rename(ws, "vessels[R-9].charges[Batch]", "X")
    assert refusal.value.where == "vessels[R-9].charges[Batch]"
    with pytest.raises(AddressError, match="no stream called 'Nope'"):
        A.rename(ws, "streams[Nope]", "X")
