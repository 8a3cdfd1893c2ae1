"""The site's barometric pressure as the reference of every gauge pressure (issue 12, item 3).

References: the ISO 2533 / ICAO standard atmosphere (its troposphere relation written out here by hand, and
printed table values from memory), IAPWS-IF97 saturation through the independent `iapws` package.
"""
import json
from pathlib import Path

import pytest
from iapws import IAPWS97

from heatbalance import address
from heatbalance.analyses import solve_and_analyse
from heatbalance.analyses.sweep import Axis, sweep
from heatbalance.balance import solve
from heatbalance.errors import HeatBalanceError
from heatbalance.links import canonical_json, revision_id
from heatbalance.present.report import format_result, result_json
from heatbalance.problem import build_problem
from heatbalance.units import standard_atmosphere_pressure, to_si
from heatbalance.worksheet import load_worksheet, parse_worksheet
from tests.sheet_factory import q, sheet, stream, temp

SAMPLES = sorted(Path(__file__).parent.parent.joinpath("sample_data").glob("*.json"))


def hand_standard_atmosphere(h_m: float) -> float:
    """ISO 2533 troposphere, written out: p = p0 (1 - L h / T0)^(g M / (R L)), p0 = 101325 Pa, T0 = 288.15 K,
    L = 0.0065 K/m, g M / (R L) = 5.25588 (ISO 2533 constants)."""
    return 101325.0 * (1.0 - 0.0065 * h_m / 288.15) ** 5.25588


@pytest.mark.parametrize("h, kPa", [
    pytest.param(0.0, 101.325, id="ISO2533-sea-level"),
    pytest.param(1000.0, 89.875, id="ISO2533-1000m"),  # ISO 2533 table: 89.875 kPa, from memory
    pytest.param(1500.0, 84.556, id="ISO2533-1500m"),  # ISO 2533 table: 84.556 kPa, from memory
    pytest.param(2000.0, 79.495, id="ISO2533-2000m"),  # ISO 2533 table: 79.495 kPa, from memory
    pytest.param(11000.0, 22.632, id="ISO2533-tropopause"),  # ISO 2533: 226.32 hPa at 11 km, from memory
])
def test_standard_atmosphere_against_iso_2533(h, kPa):
    assert standard_atmosphere_pressure(h) == pytest.approx(kPa * 1e3, rel=2e-5)
    assert standard_atmosphere_pressure(h) == pytest.approx(hand_standard_atmosphere(h), rel=1e-5)


def test_gauge_units_take_the_site_reference_and_absolute_units_do_not():
    assert to_si(0, "barg", "pressure", gauge_reference=84556.0) == pytest.approx(84556.0)  # hand calculation
    assert to_si(4, "barg", "pressure", gauge_reference=84556.0) == pytest.approx(484556.0)
    assert to_si(10, "psig", "pressure", gauge_reference=84556.0) == pytest.approx(84556.0 + 68947.57, rel=1e-7)
    assert to_si(1, "bar", "pressure", gauge_reference=84556.0) == 1e5
    assert to_si(0, "barg", "pressure") == 101325.0  # old call sites: the standard atmosphere


def boiling_sheet(atmosphere: dict | None = None, pressure="0 barg"):
    """1 t/h of water at 20 °C takes 300 kW: more than the ~92 kW to reach boiling, less than to boil it all,
    so its outlet sits on the boiling plateau at the line's pressure (a scenario of our own)."""
    doc = sheet(streams=[stream("Water", "water", q(1, "t/h"), temp(20), temp(90), pressure=pressure)],
                duties=[{"name": "Heater", "value": q(300, "kW")}],
                unknowns=[{"kind": "temperature", "line": "Water", "end": "outlet"}])
    if atmosphere is not None:
        doc["atmosphere"] = atmosphere
    return parse_worksheet(doc)


@pytest.mark.parametrize("atmosphere, P_site", [
    pytest.param({"altitude": q(1500, "m")}, hand_standard_atmosphere(1500.0), id="1500m"),
    pytest.param({"altitude": q(2240, "m")}, hand_standard_atmosphere(2240.0), id="2240m"),
    pytest.param({"altitude": q(5000, "ft")}, hand_standard_atmosphere(1524.0), id="5000ft"),
    pytest.param({"barometric_pressure": q(0.9, "bar")}, 90000.0, id="0.9bar-entered"),
    pytest.param(None, 101325.0, id="sea-level-default"),
])
def test_water_boils_at_0_barg_at_the_site_pressure(atmosphere, P_site):
    result = solve(boiling_sheet(atmosphere))
    T_sat = IAPWS97(P=P_site / 1e6, x=0.0).T  # IAPWS-IF97 via iapws, at the standard atmosphere's pressure
    assert result.answer.plateau == "boiling"
    assert result.answer.value_si == pytest.approx(T_sat, abs=0.01)
    assert result.lines[0].final_P == pytest.approx(P_site, rel=1e-7)  # 0.0065/288.15 = 2.25577e-5 to 6 digits


def test_at_1500_m_water_boils_about_5_K_lower():
    sea, high = solve(boiling_sheet()), solve(boiling_sheet({"altitude": q(1500, "m")}))
    # IAPWS-IF97 via iapws: 100.0 °C at 101.325 kPa, 95.0 °C at 84.56 kPa
    assert sea.answer.value_si - 273.15 == pytest.approx(99.97, abs=0.02)
    assert high.answer.value_si - 273.15 == pytest.approx(95.0, abs=0.1)


def test_every_gauge_pressure_of_the_sheet_uses_the_site_and_absolute_ones_do_not():
    ws = boiling_sheet({"altitude": q(1500, "m")}, pressure="2 barg")
    p = build_problem(ws)
    site = hand_standard_atmosphere(1500.0)
    assert p.atmosphere == pytest.approx(site, rel=1e-7)
    assert p.lines[0].initial.P == pytest.approx(site + 2e5, rel=1e-7)
    absolute = build_problem(boiling_sheet({"altitude": q(1500, "m")}, pressure="3 bar"))
    assert absolute.lines[0].initial.P == 3e5


def test_the_assumption_names_the_site_pressure_and_how_it_was_found():
    text = format_result(solve(boiling_sheet({"altitude": q(1500, "m")})))
    assert "Gauge pressures are relative to 0.84556 bar(a): the ISO 2533 standard atmosphere at the site's " \
           "altitude, 1500 m." in text
    default = format_result(solve(boiling_sheet()))
    assert "Gauge pressures are relative to 1.01325 bar(a): the standard atmosphere at sea level" in default
    us = result_json(solve(boiling_sheet({"barometric_pressure": q(12.5, "psia")})), "US")
    assert "Gauge pressures are relative to 12.5 psia: the site's barometric pressure as entered." in us["assumptions"]


@pytest.mark.parametrize("atmosphere, where, words", [
    pytest.param({"altitude": q(12000, "m")}, "atmosphere.altitude", "not 12000 m", id="above-troposphere"),
    pytest.param({"altitude": q(-1000, "m")}, "atmosphere.altitude", "from -500 m to 11000 m", id="too-low"),
    pytest.param({"altitude": q(1500, "kg")}, "atmosphere.altitude", "a length", id="not-a-length"),
    pytest.param({"barometric_pressure": q(-0.2, "barg")}, "atmosphere.barometric_pressure",
                 "the barometric pressure is absolute", id="gauge-barometer"),
    pytest.param({"barometric_pressure": q(3, "bar")}, "atmosphere.barometric_pressure", "between 0.2 and 1.1 bar",
                 id="too-high"),
    pytest.param({"barometric_pressure": q(0.9, "bar"), "altitude": q(900, "m")}, "atmosphere",
                 "not both", id="both"),
])
def test_refusals_name_the_address(atmosphere, where, words):
    with pytest.raises(HeatBalanceError) as caught:
        build_problem(boiling_sheet(atmosphere))
    assert caught.value.where == where
    assert words in caught.value.message


@pytest.mark.parametrize("path", SAMPLES, ids=lambda p: p.stem)
def test_saved_worksheets_keep_their_id(path):
    """The field is optional with a default: a sheet without it has the same canonical JSON (so the same id)
    as before, and stating the default explicitly gives the same id."""
    ws = load_worksheet(path.read_text())
    assert '"atmosphere"' not in canonical_json(ws)
    data = json.loads(path.read_text())
    data["atmosphere"] = {}
    assert revision_id(parse_worksheet(data)) == revision_id(ws)


def test_the_site_is_addressable_swept_and_switched():
    ws = boiling_sheet({"barometric_pressure": q(0.95, "bar")})
    listed = {i.address: i for i in address.inputs(ws)}
    assert listed["atmosphere.barometric_pressure"].kinds == ("pressure",)
    moved = address.with_value(ws, "atmosphere.altitude", "1500 m")  # an altitude replaces the pressure
    assert moved.atmosphere.barometric_pressure is None and str(moved.atmosphere.altitude) == "1500 m"
    table = sweep(moved, [Axis("atmosphere.altitude", [0.0, 1500.0, 3000.0], "m")], ["answer"])
    temperatures = list(table["answer"])
    expected = [IAPWS97(P=hand_standard_atmosphere(h) / 1e6, x=0.0).T for h in (0.0, 1500.0, 3000.0)]  # iapws
    assert temperatures == pytest.approx(expected, abs=0.01)


def test_screening_mtt_is_the_boiling_point_at_the_site():
    doc = json.loads(Path(__file__).parent.parent.joinpath("sample_data", "batch_reactor_exotherm.json").read_text())
    sea = solve_and_analyse(parse_worksheet(doc)).screening[0]
    doc["atmosphere"] = {"altitude": q(1500, "m")}
    high = solve_and_analyse(parse_worksheet(doc)).screening[0]
    assert sea.MTT - high.MTT == pytest.approx(IAPWS97(P=0.101325, x=0).T - IAPWS97(P=0.084556, x=0).T, abs=0.05)


def test_the_results_csv_and_the_pdf_sheet_carry_the_site_pressure():
    from heatbalance.present.exports import results_csv_bytes
    from heatbalance.present.sheet import sheet_pdf_bytes

    ws = boiling_sheet({"altitude": q(1500, "m")})
    result = solve(ws)
    csv_text = results_csv_bytes(result).decode("utf-8-sig")
    assert "# assumption: Gauge pressures are relative to 0.84556 bar(a): the ISO 2533 standard atmosphere" in csv_text
    import io

    import pypdf

    pdf = pypdf.PdfReader(io.BytesIO(sheet_pdf_bytes(ws, result, "US")))  # read back by an independent library
    text = " ".join(" ".join((page.extract_text() or "").split()) for page in pdf.pages)
    assert "Gauge pressures are relative to 12.2638 psia: the ISO 2533 standard atmosphere" in text
    assert "atmosphere altitude 1500 m atmosphere.altitude" in text  # the inputs as typed, with its address
