"""Water above 800 °C (issue 13, item 4): IAPWS-IF97 region 5, 800–2000 °C at pressures up to 50 MPa."""
import pytest
from iapws import IAPWS97

from heatbalance.balance import solve
from heatbalance.errors import InputError
from heatbalance.materials import get_material
from heatbalance.present.text import answer_value, error_text
from sheet_factory import build, q, stream, temp

C = 273.15
WATER = get_material("water")


@pytest.mark.parametrize("P_MPa, T1_C, T2_C", [
    pytest.param(0.1, 1200, 1500, id="1bar-1200-1500C"),
    pytest.param(0.1, 400, 1200, id="1bar-400-1200C-across-regions-2-and-5"),
    pytest.param(3.0, 900, 2000, id="30bar-900-2000C"),
    pytest.param(50.0, 850, 1900, id="50MPa-at-the-region-5-limit"),
])
def test_steam_above_800C_against_iapws(P_MPa, T1_C, T2_C):
    # IAPWS-IF97 via the iapws package (its own implementation of region 5)
    reference = (IAPWS97(P=P_MPa, T=T2_C + C).h - IAPWS97(P=P_MPa, T=T1_C + C).h) * 1e3
    dh = WATER.enthalpy(T2_C + C, P_MPa * 1e6) - WATER.enthalpy(T1_C + C, P_MPa * 1e6)
    assert dh == pytest.approx(reference, rel=1e-8)


def test_superheater_to_1200C_through_the_solver():
    # 1 t/h of steam at 1 bar(a) from 1200 to 1500 °C: duty = m·Δh, Δh from IAPWS-IF97 via iapws (hand calculation)
    ws = build(streams=[stream("Flue steam", "water", q(1, "t/h"), temp(1200), temp(1500), pressure=q(1, "bar"))],
               duties=[{"name": "Heater"}], unknowns=[{"kind": "duty", "term": "Heater"}])
    reference = 1000 / 3600 * (IAPWS97(P=0.1, T=1773.15).h - IAPWS97(P=0.1, T=1473.15).h)  # kW
    assert answer_value(solve(ws).answer) == pytest.approx(reference, rel=1e-8)


def outlet_for_duty(P_MPa: float, T_in_C: float, T_out_C: float) -> float:
    """The outlet [°C] solved for 1 t/h of water heated at P by the duty IAPWS-IF97 (iapws) gives from T_in to
    T_out: the answer should be T_out."""
    duty = 1000 / 3600 * (IAPWS97(P=P_MPa, T=T_out_C + C).h - IAPWS97(P=P_MPa, T=T_in_C + C).h)  # kW
    ws = build(streams=[stream("Steam", "water", q(1, "t/h"), temp(T_in_C), temp(20), pressure=q(P_MPa, "MPa"))],
               duties=[{"name": "Heater", "value": q(duty, "kW")}],
               unknowns=[{"kind": "temperature", "line": "Steam", "end": "outlet"}])
    return answer_value(solve(ws).answer)


def test_outlet_temperature_solved_in_region_5():
    # the same heater, its outlet the unknown: the duty found above gives back 1500 °C
    assert outlet_for_duty(0.1, 1200, 1500) == pytest.approx(1500, abs=1e-5)


def test_above_800C_over_50MPa_is_refused_with_the_limits():
    ws = build(streams=[stream("HP steam", "water", q(1, "t/h"), temp(500), temp(900), pressure=q(600, "bar"))],
               duties=[{"name": "Heater"}], unknowns=[{"kind": "duty", "term": "Heater"}])
    with pytest.raises(InputError) as caught:
        solve(ws)
    assert caught.value.where == "streams[HP steam].outlet.temperature"
    assert error_text(caught.value) == ("no IAPWS-IF97 data for water at 900.00 °C and 600 bar(a): above "
                                        "800.00 °C the formulation (region 5, to 2000.00 °C) covers pressures up to "
                                        "500 bar(a) only")


def test_solving_a_temperature_over_50MPa_stays_below_800C():
    # at 60 MPa the data end at 800 °C (regions 1-3): a temperature solve below it is not refused by the
    # region-5 limit; 1 t/h heated from 300 °C by the duty IAPWS-IF97 (iapws) gives to 700 °C (region 2)
    assert outlet_for_duty(60.0, 300, 700) == pytest.approx(700, abs=1e-5)
    assert WATER.t_max_at(60e6) == pytest.approx(1073.15) and WATER.t_max_at(5e6) == pytest.approx(2273.15)
