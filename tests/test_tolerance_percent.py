"""Percent tolerances on values whose zero is arbitrary (heatbalance.analyses.uncertainty): a percent of a temperature
or of a gauge pressure is refused at the tolerance's address; the suggestions never give one (a gauge pressure gets
±1 % of its absolute value as a pressure difference, so 0 barg is not ± 0)."""
import json
import pathlib

import pytest

from heatbalance import address as A
from heatbalance.analyses import solve_and_analyse
from heatbalance.analyses.uncertainty import check_tolerance, propagate, suggested_tolerances
from heatbalance.cli import main
from heatbalance.errors import InputError
from heatbalance.units import check_unit, is_gauge
from heatbalance.worksheet import Quantity, Tolerance, load_worksheet, parse_worksheet

CONDENSER = "sample_data/solvent_condenser_cooling_water.json"  # cooling water in at 28 °C, at 3.5 barg
CW_IN = "streams[Cooling water].inlet.temperature"
CW_P = "streams[Cooling water].pressure"
SAMPLES = sorted(pathlib.Path("sample_data").glob("*.json"))


def condenser(cw_inlet=None, tolerances=None):
    data = json.loads(open(CONDENSER, "rb").read())
    data.pop("cases")
    if cw_inlet is not None:
        data["streams"][1]["inlet"]["temperature"] = cw_inlet
    if tolerances is not None:
        data["tolerances"] = tolerances
    return data


@pytest.mark.parametrize("typed", [
    pytest.param({"value": 28, "unit": "degC"}, id="degC"),
    pytest.param({"value": 82.4, "unit": "degF"}, id="degF"),
    pytest.param({"value": 301.15, "unit": "K"}, id="K"),
    pytest.param({"value": 0, "unit": "degC"}, id="0-degC"),
])
def test_a_percent_on_a_temperature_is_refused_at_the_tolerance(typed):
    data = condenser(typed, [{"address": CW_IN, "percent": 5}])
    with pytest.raises(InputError, match=r"temperature difference, e\.g\. '0\.5 K' \(or '1 °F' difference\)") as e:
        propagate(parse_worksheet(data))
    assert e.value.address == CW_IN
    assert "± 5 % of a temperature has no meaning" in e.value.message
    result = solve_and_analyse(parse_worksheet(data))  # the answer stands, the tolerance is what is refused
    assert result.answer is not None and result.uncertainty is None and result.uncertainty_error.address == CW_IN


def test_the_cli_says_so_without_a_traceback(tmp_path, capsys):
    path = tmp_path / "sheet.json"
    path.write_text(json.dumps(condenser(None, [{"address": CW_IN, "percent": 5}])), encoding="utf-8")
    assert main(["solve", str(path)]) == 0
    out = capsys.readouterr().out
    assert f"uncertainty cannot be given ({CW_IN}): ± 5 % of a temperature" in out and "Traceback" not in out


def test_a_temperature_tolerance_in_kelvin_does_not_depend_on_the_unit_typed():
    """28 °C = 82.4 °F = 301.15 K (hand calculation); ± 0.5 K is ± 0.9 °F: the same U in every unit."""
    tolerance = [{"address": CW_IN, "plus_minus": {"value": 0.5, "unit": "K"}}]
    U = [propagate(parse_worksheet(condenser(t, tolerance))).expanded
         for t in ({"value": 28, "unit": "degC"}, {"value": 82.4, "unit": "degF"}, {"value": 301.15, "unit": "K"})]
    assert U[0] > 0 and U[1] == pytest.approx(U[0], rel=1e-6) and U[2] == pytest.approx(U[0], rel=1e-6)


@pytest.mark.parametrize("sample", SAMPLES, ids=[p.stem for p in SAMPLES])
def test_suggestions_never_give_a_percent_of_a_temperature_or_of_a_gauge_pressure(sample):
    ws = load_worksheet(sample.read_bytes())
    typed = {i.address: i.value for i in A.inputs(ws)}
    for t in suggested_tolerances(ws):
        kinds = A.kinds_of(t.address, ws.basis.kind)
        value = typed[t.address]
        if "temperature" in kinds:
            assert t.percent is None and isinstance(t.plus_minus, Quantity), t
            check_unit(t.plus_minus.unit, "temperature_difference")
        if kinds == ("pressure",) and is_gauge(value.unit):
            assert t.percent is None and isinstance(t.plus_minus, Quantity) and t.plus_minus.value > 0, t
            assert not is_gauge(t.plus_minus.unit) and "absolute pressure" in t.source
        check_tolerance(ws, t)  # each suggestion is usable as it stands


@pytest.mark.parametrize("barg, expected_bar", [
    pytest.param(0.0, 0.010, id="0-barg"),  # hand calculation: 1 % of 1.01325 bar = 0.0101 bar -> 0.010
    pytest.param(3.5, 0.045, id="3.5-barg"),  # 1 % of 4.51325 bar = 0.0451 bar -> 0.045
    pytest.param(-0.5, 0.0051, id="vacuum"),  # 1 % of 0.51325 bar = 0.00513 bar -> 0.0051
])
def test_the_suggestion_for_a_gauge_pressure_is_a_pressure_difference(barg, expected_bar):
    data = condenser()
    data["streams"][1]["pressure"] = {"value": barg, "unit": "barg"}
    ws = parse_worksheet(data)
    (t,) = [t for t in suggested_tolerances(ws) if t.address == CW_P]
    assert t.plus_minus == Quantity(value=expected_bar, unit="bar")
    assert check_tolerance(ws, t) == pytest.approx(expected_bar, rel=1e-12)  # in barg, the typed unit: not ± 0


def test_the_gauge_suggestion_follows_the_site_atmosphere():
    """A site at 0.85 bar: 0 barg is 0.85 bar absolute, ± 1 % = 0.0085 bar (hand calculation)."""
    data = condenser()
    data["streams"][1]["pressure"] = {"value": 0, "unit": "barg"}
    data["atmosphere"] = {"barometric_pressure": {"value": 0.85, "unit": "bar"}}
    (t,) = [t for t in suggested_tolerances(parse_worksheet(data)) if t.address == CW_P]
    assert t.plus_minus == Quantity(value=0.0085, unit="bar")


def test_the_gauge_suggestion_in_psig_is_written_in_psia():
    """30 psig + 14.696 psi = 44.696 psia; 1 % = 0.447 -> 0.45 psia (hand calculation, 1 atm = 14.696 psi)."""
    data = condenser()
    data["streams"][1]["pressure"] = {"value": 30, "unit": "psig"}
    ws = parse_worksheet(data)
    (t,) = [t for t in suggested_tolerances(ws) if t.address == CW_P]
    assert t.plus_minus == Quantity(value=0.45, unit="psia")
    assert check_tolerance(ws, t) == pytest.approx(0.45, rel=1e-9)  # ± 0.45 psig as a difference


@pytest.mark.parametrize("barg", [0.0, 3.5])
def test_a_percent_on_a_gauge_pressure_is_refused_at_the_tolerance(barg):
    data = condenser(None, [{"address": CW_P, "percent": 1}])
    data["streams"][1]["pressure"] = {"value": barg, "unit": "barg"}
    with pytest.raises(InputError, match=r"pressure difference, e\.g\. '0\.05 bar', or the pressure as absolute"
                       ) as e:
        propagate(parse_worksheet(data))
    assert e.value.address == CW_P and f"({barg:g} barg)" in e.value.message


def test_a_percent_on_an_absolute_pressure_stays_a_percent_of_it():
    """4.51325 bar absolute ± 1 % = ± 0.0451325 bar (hand calculation)."""
    data = condenser()
    data["streams"][1]["pressure"] = {"value": 4.51325, "unit": "bar"}
    ws = parse_worksheet(data)
    assert check_tolerance(ws, Tolerance(address=CW_P, percent=1)) == pytest.approx(0.0451325, rel=1e-12)
    (t,) = [t for t in suggested_tolerances(ws) if t.address == CW_P]
    assert t.percent == 1.0  # the same ± as 1 % of the absolute pressure


def test_a_percent_on_a_flow_is_unchanged():
    """2.4 t/h ± 1.5 % = ± 0.036 t/h (hand calculation)."""
    ws = parse_worksheet(condenser())
    tolerance = Tolerance(address="streams[Toluene overhead].flow", percent=1.5)
    assert check_tolerance(ws, tolerance) == pytest.approx(0.036, rel=1e-12)
