"""No green light on a wrong answer: equipment on a phase change, the closure check, bounds on every input.

Expected numbers are hand calculations written beside them (scenarios of our own), with water from the
independent ``iapws`` package (IAPWS-IF97) and ice from the shipped table's row (CRC Handbook, from memory).
"""
from __future__ import annotations

import json

import pytest
from iapws import IAPWS97

from heatbalance import balance
from heatbalance.balance import solve
from heatbalance.errors import InputError, NoSolutionError, WorksheetFormatError
from heatbalance.present.text import answer_text
from heatbalance.units import BOUNDS, to_si
from heatbalance.worksheet import load_worksheet, parse_worksheet
from sheet_factory import build, constant_cp_material, q, stream, temp

P_ATM = 0.101325  # MPa


def ice_as_equipment(ice_kg: float):
    return build(basis={"kind": "batch"},
                 vessels=[{"name": "T", "charges": [{"name": "W", "material": "water", "mass": q(1000, "kg"),
                                                     "initial": temp(60)}],
                           "final": temp(10),
                           "equipment": {"material": "ice (melting to water)", "mass": q(ice_kg, "kg"),
                                         "initial_temperature": q(-10, "degC")}}],
                 unknowns=[{"kind": "temperature", "line": "T", "end": "final"}])


def test_equipment_that_melts_is_split_on_its_plateau():
    """Regression: 800 kg of ice as equipment answered '0 °C' with a residual 4x the largest term."""
    result = solve(ice_as_equipment(800))
    # hand: water 60 -> 0 °C gives 1000 × (h(60) − h(0.01)) (IAPWS-IF97 via iapws);
    # ice takes 800 × 2.05 × 10 (sensible) and melts f × 800 × 333.55 kJ (table row)
    water_gives = 1000 * (IAPWS97(T=333.15, P=P_ATM).h - IAPWS97(T=273.16, P=P_ATM).h)
    melted = (water_gives - 800 * 2.05 * 10) / (800 * 333.55)
    assert result.answer.value_si == pytest.approx(273.15, abs=1e-9)
    assert result.answer.plateau == "melting"
    assert 1 - result.answer.phase_fraction == pytest.approx(1 - melted, abs=2e-3)  # water 0.00 vs 0.01 °C
    assert answer_text(result.answer) == f"0 °C, {1 - result.answer.phase_fraction:.1%} still solid"
    largest = max(abs(t.heat) for t in result.terms)
    assert abs(result.residual) <= 1e-6 * largest


def test_little_equipment_ice_melts_completely():
    result = solve(ice_as_equipment(100))
    # hand: 100 kg ice −10 -> 0 °C and melting take 100 × (20.5 + 333.55) = 35.4 MJ, well under the
    # water's 251 MJ from 60 °C: the end is above 0 °C, single phase
    assert result.answer.phase_fraction is None and result.answer.value_si > 273.15 + 40
    assert abs(result.residual) <= 1e-6 * max(abs(t.heat) for t in result.terms)


def test_a_balance_that_does_not_close_is_refused(monkeypatch):
    """The closure check itself: a result whose contributions do not add up never leaves the solver."""
    real = balance._line_result

    def off_by_a_kilowatt(line, temps, sides):
        record = real(line, temps, sides)
        record.sensible += 1000.0
        return record

    monkeypatch.setattr(balance, "_line_result", off_by_a_kilowatt)
    ws = build(streams=[stream("Feed", "water", q(1, "t/h"), temp(20), temp(80))],
               duties=[{"name": "Heater"}], unknowns=[{"kind": "duty", "term": "Heater"}])
    with pytest.raises(NoSolutionError, match=r"^duties\[Heater\]\.value: the balance does not close: 1 kW is "
                                              r"left over"):
        solve(ws)


def test_a_non_finite_number_is_never_returned(monkeypatch):
    real = balance._line_result

    def infinite(line, temps, sides):
        record = real(line, temps, sides)
        record.latent = float("inf")
        return record

    monkeypatch.setattr(balance, "_line_result", infinite)
    ws = build(streams=[stream("Feed", "water", q(1, "t/h"), temp(20), temp(80))],
               duties=[{"name": "Heater"}], unknowns=[{"kind": "duty", "term": "Heater"}])
    with pytest.raises(NoSolutionError, match="not finite"):
        solve(ws)


@pytest.mark.parametrize("kind, value, unit", [
    ("mass", 1e300, "t"), ("mass_flow", 1e9, "t/h"), ("pressure", 1e308, "barg"),
    ("specific_heat", 1e150, "kJ/(kg*K)"), ("power", 1e20, "kW"), ("temperature", 1e6, "degC"),
    ("energy", 1e30, "MJ"), ("duration", 1e12, "h"), ("amount", 1e20, "kmol"),
])
def test_magnitudes_beyond_any_plant_are_refused_with_the_bound(kind, value, unit):
    with pytest.raises(InputError, match=r"^field: .* is beyond any plant scale: .* is accepted up to"):
        to_si(value, unit, kind, "field")


def test_every_kind_has_a_bound():
    from heatbalance.units import KINDS
    assert set(BOUNDS) == set(KINDS)


def test_a_huge_flow_is_refused_at_its_field_not_answered_as_infinity():
    ws = build(streams=[stream("Feed", "water", q(1e300, "t/h"), temp(20), temp(80))],
               duties=[{"name": "Heater"}], unknowns=[{"kind": "duty", "term": "Heater"}])
    with pytest.raises(InputError, match=r"^streams\[Feed\]\.flow: 1e\+300 t/h is beyond any plant scale"):
        solve(ws)


@pytest.mark.parametrize("flow", [{"value": "nan", "unit": "kg/h"}, "1e999 kg/h", {"value": "1" * 400, "unit": "kg/h"},
                                  {"value": "Infinity", "unit": "kg/h"}, {"value": "-inf", "unit": "kg/h"}])
def test_the_loader_refuses_non_finite_numbers_in_any_spelling(flow):
    doc = {"streams": [{"name": "Feed", "material": "water", "flow": flow, "inlet": temp(20), "outlet": temp(80)}]}
    with pytest.raises(WorksheetFormatError) as refusal:
        parse_worksheet(doc)
    assert refusal.value.where == "streams[Feed].flow"
    with pytest.raises(WorksheetFormatError):
        load_worksheet(json.dumps(doc))


def test_a_cp_coefficient_must_be_finite():
    oil = constant_cp_material("oil", cp=2.0)
    oil["phases"][0]["cp_per_kelvin"] = "nan"
    with pytest.raises(WorksheetFormatError, match="finite") as refusal:
        parse_worksheet({"materials": [oil]})
    assert refusal.value.where == "materials[oil].phases[liquid].cp_per_kelvin"


def test_an_analysis_never_returns_an_infinite_number():
    """Found by the fuzz: a jacket UA of 2e-311 kW/K gave an infinite heating time in the JSON."""
    from heatbalance.address import with_value
    from heatbalance.analyses import solve_and_analyse

    ws = load_worksheet(open("sample_data/glycol_hydration_screening.json", "rb").read())
    tiny = with_value(ws, "vessels[R-7].screening.jacket.UA", (2.2e-311, "kW/K"))
    with pytest.raises(NoSolutionError, match=r"^vessels\[R-7\]\.screening: the thermal screening gives a number "
                                              r"that is not finite"):
        solve_and_analyse(tiny)
    assert solve_and_analyse(ws).screening[0].jacket.time > 0  # the sample itself is fine
