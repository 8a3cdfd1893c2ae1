"""Materials that freeze over a range (issue 13, item 2): by composition and by enthalpy table."""
import pytest

from heatbalance.balance import solve
from heatbalance.errors import InputError, WorksheetFormatError
from heatbalance.present.text import answer_value, error_text
from heatbalance.worksheet import parse_worksheet
from sheet_factory import build, q, stream, temp

C = 273.15
# Strawberries: ASHRAE Handbook—Refrigeration, "Thermal Properties of Foods", Table 3 (USDA composition, from
# memory): water 91.57 %, protein 0.61 %, fat 0.37 %, carbohydrate 7.02 % of which fibre 2.30 %, ash 0.43 %;
# initial freezing point −0.78 °C.
STRAWBERRIES = {"name": "strawberries", "source": "ASHRAE Handbook—Refrigeration, Table 3, from memory",
                "composition": {"water": 0.9157, "protein": 0.0061, "fat": 0.0037, "carbohydrate": 0.0472,
                                "fibre": 0.0230, "ash": 0.0043},
                "initial_freezing_point": q(-0.78, "degC")}


def freezer(material=STRAWBERRIES, outlet=temp(-20), duty=None):
    unknown = {"kind": "duty", "term": "Freezer"} if duty is None else \
        {"kind": "temperature", "line": "Berries", "end": "outlet"}
    return build(freezing_materials=[material],
                 streams=[stream("Berries", material["name"], q(3.6, "t/h"), temp(5), outlet)],
                 duties=[{"name": "Freezer", **({"value": duty} if duty is not None else {})}],
                 unknowns=[unknown])


def chen_enthalpy(t):
    """Chen (1985) enthalpy of a food [kJ/kg], zero at −40 °C, as given in ASHRAE Handbook—Refrigeration,
    "Thermal Properties of Foods" (from memory): below the initial freezing point t_f,
    H = (t − t_r)·(1.55 + 1.26·x_s + x_s·R·T_o²/(M_s·t_r·t)) with x_s·R·T_o²/M_s = −(x_wo − x_b)·L_o·t_f;
    above it H = H_f + (t − t_f)·(4.19 − 2.30·x_s − 0.628·x_s³). t_r = −40 °C, L_o = 333.6 kJ/kg, x_b = 0.4·x_p."""
    x_wo, x_b, t_f, t_r = 0.9157, 0.4 * 0.0061, -0.78, -40.0
    x_s = 1 - x_wo
    if t <= t_f:
        return (t - t_r) * (1.55 + 1.26 * x_s - (x_wo - x_b) * 333.6 * t_f / (t_r * t))
    return chen_enthalpy(t_f) + (t - t_f) * (4.19 - 2.30 * x_s - 0.628 * x_s ** 3)


def test_freezing_heat_of_strawberries_against_chens_model():
    result = solve(freezer())
    heat = -result.answer.value_si / 1.0 / 1e3  # kJ per kg (1 kg/s)
    # Chen's (1985) model, a separate published method (above): 347.7 kJ/kg from +5 to −20 °C. The two agree
    # to 1.7 % here: Chen's frozen-state sensible term (1.55 + 1.26·x_s) is a fit, the Choi–Okos sum of
    # components is not; 3 % is that spread, not a margin found by trial.
    assert heat == pytest.approx(chen_enthalpy(5) - chen_enthalpy(-20), rel=0.03)


def test_ice_fraction_and_the_phase_shown():
    result = solve(freezer())
    # hand calculation (Miles/Schwartzberg): x_ice = (0.9157 − 0.4 × 0.0061) × (1 − (−0.78)/(−20)) = 0.87765
    assert result.lines[0].final_phase == "partly frozen (88% ice)"
    assert result.lines[0].initial_phase == "unfrozen"
    # the latent part: the ice formed × L₀ = 0.87765 × 333.6 kJ/kg per kg (hand calculation, 1 kg/s)
    assert result.lines[0].latent == pytest.approx(-(0.9157 - 0.4 * 0.0061) * (1 - 0.78 / 20) * 333.6e3, rel=1e-9)


def test_outlet_temperature_solved_inside_the_freezing_range():
    heat = solve(freezer(outlet=temp(-10))).answer.value_si  # W, negative
    answer = solve(freezer(outlet=temp(20), duty=q(heat / 1e3, "kW"))).answer
    assert answer_value(answer) == pytest.approx(-10.0, abs=1e-6)


TABLE = {"name": "dough", "source": "test table of our own",
         "enthalpy_table": [{"temperature": q(-30, "degC"), "enthalpy": q(0, "kJ/kg")},
                            {"temperature": q(-5, "degC"), "enthalpy": q(60, "kJ/kg")},
                            {"temperature": q(-1, "degC"), "enthalpy": q(220, "kJ/kg")},
                            {"temperature": q(20, "degC"), "enthalpy": q(280, "kJ/kg")}],
         "initial_freezing_point": q(-1, "degC")}


def test_enthalpy_table_material():
    ws = build(freezing_materials=[TABLE], streams=[stream("Dough", "dough", q(3.6, "t/h"), temp(10), temp(-10))],
               duties=[{"name": "Freezer"}], unknowns=[{"kind": "duty", "term": "Freezer"}])
    result = solve(ws)
    # hand calculation, linear between rows: h(10 °C) = 220 + 60·11/21 = 251.43; h(−10 °C) = 0 + 60·20/25 = 48
    assert result.answer.value_si == pytest.approx(-(220 + 60 * 11 / 21 - 48) * 1e3, rel=1e-12)
    assert result.lines[0].final_phase == "partly frozen"
    with pytest.raises(InputError) as outside:  # the table is the data: no extrapolation
        solve(build(freezing_materials=[TABLE],
                    streams=[stream("Dough", "dough", q(3.6, "t/h"), temp(10), temp(-40))],
                    duties=[{"name": "Freezer"}], unknowns=[{"kind": "duty", "term": "Freezer"}]))
    assert outside.value.where == "streams[Dough].outlet.temperature"


def refused(material):
    with pytest.raises(InputError) as caught:
        solve(freezer(material))
    return caught.value


def test_composition_must_add_up_to_one():
    error = refused({**STRAWBERRIES, "composition": {"water": 0.9, "protein": 0.05}})
    assert error.where == "freezing_materials[strawberries].composition"
    assert error_text(error) == "the mass fractions must not be negative and must add up to 1 (they add up to 0.95)"


def test_initial_freezing_point_below_zero():
    error = refused({**STRAWBERRIES, "initial_freezing_point": q(2, "degC")})
    assert error.where == "freezing_materials[strawberries].initial_freezing_point"
    assert error_text(error) == ("the initial freezing point must lie between -40.00 °C (the Choi–Okos correlations' "
                                 "lower limit) and 0.00 °C, not 2.00 °C")


def test_no_freezable_water_is_refused():
    error = refused({**STRAWBERRIES, "composition": {"water": 0.1, "protein": 0.9}})
    assert error.where == "freezing_materials[strawberries].composition"
    assert error_text(error).startswith("the water fraction must exceed the bound water (0.4 × protein")


def test_table_must_rise():
    rows = [dict(r) for r in TABLE["enthalpy_table"]]
    rows[2]["enthalpy"] = q(50, "kJ/kg")
    error = refused({**TABLE, "enthalpy_table": rows})
    assert error.where == "freezing_materials[dough].enthalpy_table"
    assert error_text(error) == ("rows 2 and 3: temperature and enthalpy must both rise from row to row "
                                 "(-5 degC, 60 kJ/kg then -1 degC, 50 kJ/kg)")


@pytest.mark.parametrize("changes, message", [
    pytest.param({"enthalpy_table": TABLE["enthalpy_table"]}, "by its 'composition' or by an 'enthalpy_table'",
                 id="both-forms"),
    pytest.param({"initial_freezing_point": None}, "needs its 'initial_freezing_point'", id="no-freezing-point"),
    pytest.param({"composition": {"water": 0.9, "sugar": 0.1}}, "composition", id="unknown-component"),
])
def test_format_refusals(changes, message):
    with pytest.raises(WorksheetFormatError, match=message) as caught:
        parse_worksheet({"freezing_materials": [{**STRAWBERRIES, **changes}]})
    assert caught.value.where.startswith("freezing_materials")


def test_names_are_unique_across_both_kinds_of_material():
    own = {"name": "strawberries", "source": "x", "phases": [{"name": "liquid", "cp": "4 kJ/(kg*K)"}],
           "min_temperature": "0 degC", "max_temperature": "50 degC"}
    with pytest.raises(WorksheetFormatError, match="material names must be unique; repeated: strawberries"):
        parse_worksheet({"materials": [own], "freezing_materials": [STRAWBERRIES]})
