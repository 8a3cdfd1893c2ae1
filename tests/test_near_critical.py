"""The near-critical warning (issue 12, item 5): it fires at a line state near its fluid's critical point and not
elsewhere. Critical points: CO2 304.13 K, 7.3773 MPa (Span & Wagner 1996); water 647.096 K, 22.064 MPa
(IAPWS-95); both from memory."""
import pytest

from heatbalance.analyses import solve_and_analyse
from heatbalance.analyses.critical import near_critical
from heatbalance.materials import get_material
from tests.sheet_factory import build, q, stream, temp


def near_critical_warnings(result):
    return [w for w in result.warnings if w.text.startswith("Near the critical point")]


def co2_cooler(P_bar: float, T_in: float, T_out: float):
    """1 t/h of CO2 cooled at a given absolute pressure; the duty is the unknown (our own scenario)."""
    return build(streams=[stream("CO2", "carbon dioxide", q(1, "t/h"), temp(T_in), temp(T_out), pressure=q(P_bar, "bar"))],
                 duties=[{"name": "Cooler"}], unknowns=[{"kind": "duty", "term": "Cooler"}])


def test_the_library_critical_points_are_the_published_ones():
    co2, water = get_material("carbon dioxide"), get_material("water")
    assert (co2.T_critical, co2.p_critical) == (pytest.approx(304.13, abs=0.01), pytest.approx(7.3773e6, rel=1e-4))
    assert (water.T_critical, water.p_critical) == (pytest.approx(647.096, abs=1e-3), pytest.approx(22.064e6, rel=1e-5))


def test_fires_above_0_97_of_the_critical_pressure_at_each_state():
    result = solve_and_analyse(co2_cooler(72.0, 60, 50))  # 72/73.773 = 0.976 p_c, 20 K above T_c
    warned = near_critical_warnings(result)
    assert [w.address for w in warned] == ["streams[CO2].inlet", "streams[CO2].outlet"]
    assert "carbon dioxide at 60.0 °C and 72 bar(a) (streams[CO2].inlet) is close to its critical point " \
           "(31.0 °C, 73.77 bar(a))" in warned[0].text


def test_fires_within_a_few_kelvin_of_the_critical_temperature_when_dense():
    result = solve_and_analyse(co2_cooler(50.0, 40, 29))  # 0.68 p_c; the outlet 2 K below T_c
    assert [w.address for w in near_critical_warnings(result)] == ["streams[CO2].outlet"]


@pytest.mark.parametrize("P_bar, T_in, T_out", [
    pytest.param(70.0, 60, 40, id="0.949-p_c-far-from-T_c"),
    pytest.param(10.0, 40, 29, id="a-gas-at-T_c"),
])
def test_does_not_fire_away_from_the_critical_point(P_bar, T_in, T_out):
    assert near_critical_warnings(solve_and_analyse(co2_cooler(P_bar, T_in, T_out))) == []


def test_boiling_water_near_the_critical_point_and_ordinary_steam():
    near = build(streams=[stream("Water", "water", q(1, "t/h"), temp(300), {"vapour_fraction": 0.5},
                                 pressure=q(210, "bar"))],  # 0.952 p_c; boils at 642.98 K (iapws), 4.1 K below T_c
                 duties=[{"name": "Boiler"}], unknowns=[{"kind": "duty", "term": "Boiler"}])
    assert [w.address for w in near_critical_warnings(solve_and_analyse(near))] == ["streams[Water].outlet"]
    ordinary = build(streams=[stream("Water", "water", q(1, "t/h"), temp(20), {"vapour_fraction": 0.5},
                                     pressure=q(4, "barg"))],
                     duties=[{"name": "Boiler"}], unknowns=[{"kind": "duty", "term": "Boiler"}])
    assert near_critical_warnings(solve_and_analyse(ordinary)) == []


@pytest.mark.parametrize("T, P, expected", [
    pytest.param(290.0, 0.97 * 7.3773e6, True, id="exactly-0.97-p_c"),
    pytest.param(290.0, 0.969 * 7.3773e6, False, id="just-below"),
    pytest.param(304.13 + 5.0, 0.5 * 7.3773e6, True, id="T_c-plus-5K-at-half-p_c"),
    pytest.param(304.13 + 5.1, 0.9 * 7.3773e6, False, id="T_c-plus-5.1K"),
])
def test_the_rule_at_its_edges(T, P, expected):
    assert near_critical(T, P, 304.13, 7.3773e6) == expected


def test_a_sweep_warns_at_the_near_critical_points_only():
    from heatbalance.analyses.sweep import WARNINGS, Axis, sweep

    # 60 bar is 0.81 p_c, 72 bar 0.976 p_c (the rule's 0.97, above); the warning rides with each point
    frame = sweep(co2_cooler(60.0, 60, 50), [Axis("streams[CO2].pressure", (60.0, 72.0), "bar")])
    far, near = ([w.text for w in ws if w.text.startswith("Near the critical point")] for ws in frame[WARNINGS])
    assert far == [] and len(near) == 2


@pytest.mark.parametrize("P_bar, T_in, T_out", [(400, 900, 1000), (220, 25, 50)],
                         ids=["hot-supercritical-gas", "cold-compressed-liquid"])
def test_no_warning_far_from_the_critical_temperature_at_a_high_pressure(P_bar, T_in, T_out):
    # water's T_c = 373.9 °C (IAPWS): 900-1000 °C is T/T_c ≥ 1.81, 25-50 °C is ≤ 0.50; outside 0.9-1.2, where
    # formulations agree (a checker compared IF97 to 0.0002 % at 400 bar and 1000 °C)
    ws = build(streams=[stream("Water", "water", q(1, "t/h"), temp(T_in), temp(T_out), pressure=q(P_bar, "bar"))],
               duties=[{"name": "Heater"}], unknowns=[{"kind": "duty", "term": "Heater"}])
    assert near_critical_warnings(solve_and_analyse(ws)) == []
