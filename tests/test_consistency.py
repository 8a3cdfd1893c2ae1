"""Property-based checks (hypothesis): one sheet solved for each of its quantities agrees with itself.

A random worksheet (a water line that may boil or condense, a constant-cp liquid line and a duty) is solved for
its duty; the answer is put back and the sheet solved for each other quantity in turn, which must give back the
value it started with, and every solve must close the balance.
"""
import pytest
from hypothesis import HealthCheck, assume, given, settings
from hypothesis import strategies as st

from heatbalance.balance import solve
from heatbalance.present.text import answer_value
from heatbalance.errors import NoSolutionError
from sheet_factory import build, constant_cp_material, q, stream, temp

A = constant_cp_material("liquid A", cp=2.5, t_min=-40, t_max=350)

temperatures = st.floats(min_value=5.0, max_value=330.0, allow_nan=False)
flows = st.floats(min_value=50.0, max_value=20_000.0, allow_nan=False)
pressures = st.floats(min_value=0.0, max_value=15.0, allow_nan=False)


def water_sheet(p_barg, m_water, t1, t2, m_liquid, t3, t4, duty_kw, unknown):
    return build(materials=[A],
                 streams=[stream("Water", "water", q(m_water, "kg/h"), temp(t1), temp(t2), pressure=q(p_barg, "barg")),
                          stream("Liquid", "liquid A", q(m_liquid, "kg/h"), temp(t3), temp(t4))],
                 duties=[{"name": "Duty", "value": q(duty_kw, "kW")}], unknowns=[unknown])


def away_from_boiling(p_barg, *temps_c):
    tsat = solve(build(streams=[stream("W", "water", q(1, "kg/h"), {"vapour_fraction": 0}, temp(20),
                                       pressure=q(p_barg, "barg"))], duties=[{"name": "D", "value": q(0, "kW")}],
                       unknowns=[{"kind": "duty", "term": "D"}])).lines[0].initial_T - 273.15
    return all(abs(t - tsat) > 0.05 for t in temps_c)


@settings(max_examples=40, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(p=pressures, m1=flows, t1=temperatures, t2=temperatures, m2=flows, t3=temperatures, t4=temperatures)
def test_solving_for_each_quantity_gives_back_the_sheet(p, m1, t1, t2, m2, t3, t4):
    assume(abs(t1 - t2) > 1.0 and abs(t3 - t4) > 1.0 and away_from_boiling(p, t1, t2))
    try:
        duty = solve(water_sheet(p, m1, t1, t2, m2, t3, t4, 0.0, {"kind": "duty", "term": "Duty"}))
    except NoSolutionError:
        assume(False)  # a second-law refusal: no sheet to check
    D = answer_value(duty.answer)
    scale = max(abs(ln.total) for ln in duty.lines)
    assert abs(duty.residual) <= 1e-9 * scale

    checks = [({"kind": "amount", "line": "Water"}, m1, 1e-7),
              ({"kind": "amount", "line": "Liquid"}, m2, 1e-7),
              ({"kind": "temperature", "line": "Water", "end": "outlet"}, t2, 1e-5),
              ({"kind": "temperature", "line": "Water", "end": "inlet"}, t1, 1e-5),
              ({"kind": "temperature", "line": "Liquid", "end": "outlet"}, t4, 1e-5)]
    for unknown, expected, tol in checks:
        result = solve(water_sheet(p, m1, t1, t2, m2, t3, t4, D, unknown))
        assert answer_value(result.answer) == pytest.approx(expected, rel=tol, abs=tol), unknown
        assert abs(result.residual) <= 1e-6 * scale
        assert result.answer.phase_fraction is None


@settings(max_examples=30, deadline=None)
@given(m_water=st.floats(min_value=100, max_value=5000), t_water=st.floats(min_value=1, max_value=90),
       m_ice=st.floats(min_value=10, max_value=2000), t_ice=st.floats(min_value=-25, max_value=-0.5))
def test_ice_and_water_mixing_closes_and_ends_where_the_heat_says(m_water, t_water, m_ice, t_ice):
    ws = build(basis={"kind": "batch"},
               vessels=[{"name": "T", "charges": [
                   {"name": "Water", "material": "water", "mass": q(m_water, "kg"), "initial": temp(t_water)},
                   {"name": "Ice", "material": "ice (melting to water)", "mass": q(m_ice, "kg"), "initial": temp(t_ice)}],
                   "final": temp(10)}],
               unknowns=[{"kind": "temperature", "line": "T", "end": "final"}])
    # hand calculation: the water can give at most m·cp·(t − 0) before it would freeze (cp ≈ 4.2 kJ/(kg·K),
    # common practice); the ice needs m·2.05·(0 − t) to reach 0 °C (ice cp, CRC Handbook, from memory).
    # "water" has no ice phase in its data (IAPWS-IF97 starts at 0 °C), so freezing it is refused.
    available, needed = m_water * 4.2 * t_water, m_ice * 2.05 * -t_ice
    if available < 0.97 * needed:
        with pytest.raises(NoSolutionError, match=r"even at 0\.00 °C \(the lower limit of the data for water\) "
                                                  r"there is too little heat"):
            solve(ws)
        return
    assume(available > 1.03 * needed)
    result = solve(ws)
    assert abs(result.residual) <= 1e-6 * max(abs(ln.total) for ln in result.lines)
    if result.answer.phase_fraction is not None:  # on the plateau: 0 °C and a fraction between 0 and 1
        assert answer_value(result.answer) == pytest.approx(0.0, abs=1e-9)
        assert 0.0 <= result.answer.phase_fraction <= 1.0
    water, ice = result.lines
    assert water.total == pytest.approx(-ice.total, rel=1e-6)  # heat lost by the water = heat gained by the ice
