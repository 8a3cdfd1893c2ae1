"""How sure is the number (issue 15, part 1): GUM propagation of the inputs' tolerances, checked by hand.

References: JCGM 100:2008 (GUM) 4.3.7 (rectangular: u = a/√3) and 5.1.2 (the law of propagation);
water enthalpies and cp from IAPWS-IF97 via the independent ``iapws`` package.
"""
from __future__ import annotations

import json
import math

import pytest
from iapws import IAPWS97

from heatbalance import address as A
from heatbalance.analyses import solve_and_analyse
from heatbalance.analyses.uncertainty import propagate, suggested_tolerances
from heatbalance.cli import main
from heatbalance.errors import AddressError, InputError, WorksheetFormatError
from heatbalance.present.uncertainty import contribution_rows, uncertainty_text
from heatbalance.worksheet import Quantity, load_worksheet, parse_worksheet

P = 0.301325  # MPa: 2 barg


def cooling_water(tolerances):
    """10 kg/s of cooling water from 20 to 30 °C at 2 barg: what duty does it take? (our own scenario)"""
    return parse_worksheet({
        "streams": [{"name": "CW", "material": "water", "flow": "36 t/h", "pressure": "2 barg",
                     "inlet": {"temperature": "20 degC"}, "outlet": {"temperature": "30 degC"}}],
        "duties": [{"name": "Cooler"}], "unknowns": [{"kind": "duty", "term": "Cooler"}],
        "tolerances": tolerances})


TOLERANCES = [{"address": "streams[CW].flow", "percent": 1.0, "distribution": "normal"},
              {"address": "streams[CW].inlet.temperature", "plus_minus": "0.5 K"},
              {"address": "streams[CW].outlet.temperature", "plus_minus": "0.9 degF"}]  # = 0.5 K


def test_the_cooling_water_duty_uncertainty_equals_the_analytic_propagation():
    u = propagate(cooling_water(TOLERANCES))
    # by hand (GUM 5.1.2): Q = m·(h2 − h1); ∂Q/∂m = h2 − h1; ∂Q/∂T1 = −m·cp(T1); ∂Q/∂T2 = m·cp(T2)
    h1, h2 = IAPWS97(T=293.15, P=P), IAPWS97(T=303.15, P=P)
    m = 10.0
    u_m = 0.01 * m  # ±1 % given as one standard uncertainty
    u_T = 0.5 / math.sqrt(3)  # ±0.5 K limits, rectangular (GUM 4.3.7)
    parts = {"streams[CW].flow": (h2.h - h1.h) * 1e3 * u_m, "streams[CW].inlet.temperature": m * h1.cp * 1e3 * u_T,
             "streams[CW].outlet.temperature": m * h2.cp * 1e3 * u_T}
    expected = math.sqrt(sum(p * p for p in parts.values()))
    assert u.value == pytest.approx(m * (h2.h - h1.h) * 1e3, rel=1e-5)
    assert u.standard == pytest.approx(expected, rel=1e-3)
    assert u.expanded == pytest.approx(2 * expected, rel=1e-3)
    for c in u.contributions:
        assert c.contribution == pytest.approx(parts[c.address], rel=1e-3), c.address
    assert [c.address for c in u.contributions][-1] == "streams[CW].flow"  # ranked: the thermometers dominate
    assert sum(c.share for c in u.contributions) == pytest.approx(1.0, rel=1e-9)


def test_monte_carlo_agrees_with_the_linear_result_on_a_linear_case():
    u = propagate(cooling_water(TOLERANCES), monte_carlo=4000)
    mc = u.monte_carlo
    assert mc.solved == 4000
    # sampling error of a standard deviation from n draws: about s/√(2(n−1)) = 1.1 %; allow 4 of them
    assert mc.standard == pytest.approx(u.standard, rel=0.045)
    assert mc.mean == pytest.approx(u.value, abs=4 * u.standard / math.sqrt(4000))
    assert mc.low < u.value - u.standard < u.value + u.standard < mc.high


def test_the_report_writes_the_answer_with_its_expanded_uncertainty():
    result = solve_and_analyse(cooling_water(TOLERANCES))
    text = uncertainty_text(result.uncertainty, "SI", result.answer)
    Q, U = result.uncertainty.value / 1e3, result.uncertainty.expanded / 1e3
    # GUM 7.2.6: U to two significant figures, the answer to the same decimal place, each within half of it
    value_text, rest = text.split(" ± ")
    u_text = rest.split(" ")[0]
    assert rest.endswith(" kW (k = 2, about 95 %)")
    digits = u_text.replace(",", "").replace(".", "").lstrip("0")
    assert len(digits if "." in u_text else digits.rstrip("0")) <= 2  # '2,400' and '10' are two figures too
    decimals = len(u_text.partition(".")[2])
    assert len(value_text.partition(".")[2]) == decimals
    half = 0.5 * 10.0 ** -decimals
    assert abs(float(value_text.replace(",", "")) - Q) <= half and abs(float(u_text.replace(",", "")) - U) <= half
    rows = contribution_rows(result.uncertainty, "US", result.answer)
    assert rows[0]["tolerance"] in ("± 0.5 K (rectangular)", "± 0.9 °F (rectangular)")
    assert rows[0]["contribution [Btu/h]"] == pytest.approx(result.uncertainty.contributions[0].contribution
                                                            / 0.29307107, rel=1e-6)  # 1 Btu/h = 0.29307107 W


@pytest.mark.parametrize("tolerance, error, message", [
    ({"address": "streams[CW].flow", "percent": -1}, WorksheetFormatError, "greater than or equal to 0"),
    ({"address": "streams[CW].flow", "plus_minus": "-1 t/h"}, WorksheetFormatError, "cannot be negative"),
    ({"address": "streams[CW].inlet.temperature", "plus_minus": "0.5 kg"}, InputError,
     r"^streams\[CW\]\.inlet\.temperature: tolerance '0.5 kg': unit 'kg' is not a temperature difference"),
    ({"address": "streams[CW].flow", "plus_minus": "1 kW"}, InputError, r"^streams\[CW\]\.flow: tolerance '1 kW'"),
    ({"address": "duties[Cooler].value", "percent": 2}, InputError, r"^duties\[Cooler\]\.value: this is the unknown"),
    ({"address": "streams[Nope].flow", "percent": 2}, AddressError, r"no stream called 'Nope'"),
    ({"address": "streams[CW].material", "percent": 2}, AddressError, r"not a numeric input"),
])
def test_bad_tolerances_are_refused_with_their_address(tolerance, error, message):
    with pytest.raises(error, match=message):
        propagate(cooling_water([tolerance]))


def test_the_screening_temperature_has_an_uncertainty_too():
    ws = load_worksheet(open("sample_data/glycol_hydration_screening.json", "rb").read())
    ws = ws.model_copy(update={"tolerances": suggested_tolerances(ws)})
    u = propagate(ws, output="screening[R-7].MTSR")
    assert u.kind == "temperature" and u.standard > 0
    # the heat of reaction is computed from the equation (not an input), so the charges and the jacket dominate
    assert u.contributions[0].address in {c.address for c in u.contributions}


def test_suggested_tolerances_name_their_source_and_leave_out_the_unknown():
    ws = load_worksheet(open("sample_data/steam_heater_glycol.json", "rb").read())
    suggested = suggested_tolerances(ws)
    assert "streams[Steam].flow" not in {t.address for t in suggested}  # the unknown
    assert all("common practice" in t.source for t in suggested)
    assert {t.address for t in suggested} >= {"streams[Glycol].flow", "streams[Glycol].inlet.temperature"}


def test_a_rename_carries_the_tolerances():
    ws = cooling_water(TOLERANCES)
    renamed = A.rename(ws, "streams[CW]", "Cooling water")
    assert [t.address for t in renamed.tolerances][0] == "streams[Cooling water].flow"
    assert propagate(renamed).standard == pytest.approx(propagate(ws).standard, rel=1e-12)


def test_the_cli_prints_the_uncertainty_and_its_json(tmp_path, capsys):
    path = tmp_path / "cw.json"
    path.write_text(cooling_water(TOLERANCES).model_dump_json())
    assert main(["solve", str(path)]) == 0
    out = capsys.readouterr().out
    assert "UNCERTAINTY" in out and "Cooler = " in out and "± " in out and "(k = 2, about 95 %)" in out
    assert main(["solve", str(path), "--json"]) == 0
    data = json.loads(capsys.readouterr().out)
    assert data["uncertainty"]["expanded"] == pytest.approx(2 * data["uncertainty"]["standard"])


def test_a_tolerance_that_cannot_be_used_keeps_the_answer_and_says_so():
    ws = cooling_water([{"address": "streams[CW].inlet.temperature", "plus_minus": "0.5 kg"}])
    result = solve_and_analyse(ws)
    assert result.uncertainty is None and result.answer.value_si > 0
    assert result.uncertainty_error.where == "streams[CW].inlet.temperature"
    assert any("uncertainty cannot be given" in w.text and w.address == "streams[CW].inlet.temperature"
               for w in result.warnings)


def test_making_an_input_the_unknown_drops_its_tolerance():
    ws = cooling_water(TOLERANCES)
    switched = A.with_unknown(ws, "streams[CW].flow", Quantity(value=1000, unit="kW"))
    assert "streams[CW].flow" not in {t.address for t in switched.tolerances}
    assert len(switched.tolerances) == 2


def test_check_tolerance_refuses_without_solving():
    from heatbalance.analyses.uncertainty import check_tolerance
    from heatbalance.worksheet import Tolerance

    ws = cooling_water([])
    assert check_tolerance(ws, Tolerance(address="streams[CW].outlet.temperature", plus_minus="0.9 degF")) == \
        pytest.approx(0.5)  # 0.9 °F = 0.5 K, in the °C typed there
    with pytest.raises(InputError, match="this is the unknown"):
        check_tolerance(ws, Tolerance(address="duties[Cooler].value", percent=2))


def test_the_screening_temperature_is_reported_with_its_uncertainty():
    from heatbalance.present.report import format_result

    ws = load_worksheet(open("sample_data/glycol_hydration_screening.json", "rb").read())
    ws = ws.model_copy(update={"tolerances": suggested_tolerances(ws)})
    result = solve_and_analyse(ws)
    u = result.output_uncertainties["screening[R-7].MTSR"]
    assert u.value == pytest.approx(result.screening[0].MTSR, rel=1e-12) and u.standard > 0
    assert f"R-7: MTSR = {uncertainty_text(u, 'SI')}" in format_result(result, "SI")


@pytest.mark.parametrize("tolerance, expected_barg", [("0.1 bar", 0.1), ("0.1 barg", 0.1), ("10 kPa", 0.1),
                                                      ("1.450377 psi", 0.1)])
def test_a_tolerance_on_a_gauge_pressure_is_a_difference_not_an_absolute_pressure(tolerance, expected_barg):
    from heatbalance.analyses.uncertainty import check_tolerance
    from heatbalance.worksheet import Tolerance

    ws = load_worksheet(open("sample_data/steam_heater_glycol.json", "rb").read())  # Steam at 4 barg
    # ±0.1 bar on a pressure typed in barg is ±0.1 barg (hand calculation: 1 bar = 1 barg as a difference;
    # 1 psi = 6894.757 Pa); before, one barg was taken as 2.01325 bar and the tolerance came out halved
    half_width = check_tolerance(ws, Tolerance(address="streams[Steam].pressure", plus_minus=tolerance))
    assert half_width == pytest.approx(expected_barg, rel=1e-6)


def test_a_tolerance_typed_with_a_made_up_unit_is_echoed_in_quotes():
    from heatbalance.present.report import format_result

    data = json.loads(open("sample_data/steam_heater_glycol.json", "rb").read())
    data["tolerances"] = [{"address": "streams[Glycol].flow", "plus_minus": {"value": 1, "unit": "nan"}}]
    result = solve_and_analyse(parse_worksheet(data))  # the answer stands; the tolerance is a warning
    (line,) = [ln for ln in format_result(result, "SI").splitlines() if "uncertainty cannot be given" in ln]
    # what the user typed is quoted, so no bare 'nan' reads as a number the tool computed (found by the fuzzer)
    assert "tolerance '1 nan': unit 'nan' is not a mass flow" in line


def test_an_answer_on_a_phase_change_carries_the_uncertainty_of_its_fraction():
    import json

    from heatbalance.present.report import format_result

    doc = json.loads(open("sample_data/ice_melting_tank.json", "rb").read())
    doc["tolerances"] = [{"address": "vessels[Tank T-5].charges[Ice].mass", "percent": 0.5},
                         {"address": "vessels[Tank T-5].charges[Process water].initial.temperature",
                          "plus_minus": "0.5 K"}]
    result = solve_and_analyse(load_worksheet(json.dumps(doc).encode()))
    fraction = result.output_uncertainties["answer.phase_fraction"]
    # hand (GUM, rectangular): the water's 1 t × 4.18 kJ/(kg·K) × 0.289 K = 1,207 kJ melts 3.62 kg of the 400 kg
    # (333.5 kJ/kg): u = 0.0090; with f = Q/(L·M) − c_ice·10 K/L, df/dM = −(f + c_ice·10 K/L)/M
    # = −(0.568 + 0.061)/400 per kg, × 1.155 kg: u = 0.0018; u_c ≈ 0.0092, U = 2·u_c ≈ 0.0185
    assert fraction.value == pytest.approx(result.answer.phase_fraction, rel=1e-9)
    assert abs(fraction.expanded) == pytest.approx(0.0185, rel=0.03)
    assert "Tank T-5 final temperature: liquid (melted) fraction = 56.8% ± 1.8% (k = 2" in format_result(result)


def test_no_thermometer_tolerance_is_suggested_for_a_temperature_no_thermometer_reads():
    """A shift engineer's finding: 'Fill in suggested tolerances' put thermometer tolerances on a material's data
    limits. Data limits, a freezing point from data, T_D24, MTT and a set point are no plant readings."""
    from heatbalance.analyses.uncertainty import suggested_tolerances

    for name in ("batch_reactor_exotherm", "glycol_hydration_screening", "berry_freezing_tunnel"):
        suggested = [t.address for t in suggested_tolerances(load_worksheet(open(f"sample_data/{name}.json",
                                                                                 "rb").read()))]
        assert not any(a.endswith(("min_temperature", "max_temperature", "initial_freezing_point", "T_D24",
                                   "target_temperature")) for a in suggested), suggested
        assert any(a.endswith("initial.temperature") or a.endswith("inlet.temperature") for a in suggested)


def test_a_pressure_tolerance_and_its_u_are_written_as_differences():
    """A plant engineer's finding: '± 0.015 bar(a)' beside 'u(input) 0.00866 barg': a difference of pressures is
    neither absolute nor gauge (rectangular: u = a/√3, 0.015/√3 = 0.00866, hand calculation)."""
    doc = json.loads(open("sample_data/steam_heater_glycol.json", "rb").read())
    doc["tolerances"] = [{"address": "streams[Steam].pressure", "plus_minus": "0.015 bar"}]
    result = solve_and_analyse(parse_worksheet(doc))
    row = next(r for r in contribution_rows(result.uncertainty) if r["address"] == "streams[Steam].pressure")
    assert row["tolerance"] == "± 0.015 bar (rectangular)" and row["u(input)"] == "0.00866 bar"
