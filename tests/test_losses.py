"""Losses computed from a surface (heatbalance.losses): textbook and hand-calculated references, the balance
with a loss that moves with the solved temperature, addresses, and every refusal by its address."""
import copy
import json
import math

import pytest

from heatbalance import address
from heatbalance.analyses import solve_and_analyse
from heatbalance.balance import solve
from heatbalance.errors import InputError, WorksheetFormatError
from heatbalance.losses import (PERSONNEL_PROTECTION_LIMIT, Surface, heat_loss, insulation_conductivity,
                                insulation_table, protection_thickness, surface_loss, surface_temperature)
from heatbalance.present.losses import surface_loss_rows
from heatbalance.present.report import format_result, result_json
from heatbalance.worksheet import parse_worksheet

SIGMA = 5.670e-8  # W/(m²·K⁴), Stefan–Boltzmann constant (CODATA, 4 figures)
SAMPLE = "sample_data/insulated_hot_water_line.json"


def sample_data() -> dict:
    with open(SAMPLE, encoding="utf-8") as handle:
        return json.load(handle)


def with_surface(**changes) -> dict:
    data = sample_data()
    data["losses"][0]["surface"].update(changes)
    return data


# --------------------------------------------------------------------------- published and hand references
def test_bare_steam_pipe_incropera_example():
    """Incropera, DeWitt, Bergman & Lavine, Fundamentals of Heat and Mass Transfer, 6th ed., Example 9.3 (from
    memory): a horizontal steam pipe, D = 0.1 m, surface 165 °C, ε = 0.85, room air and walls at 23 °C.

    Hand calculation with the book's air at T_f = 367 K (Table A.4, from memory: ν = 22.8e-6 m²/s,
    k = 0.0314 W/(m·K), α = 32.8e-6 m²/s, Pr = 0.697, β = 1/367 K⁻¹):
    Ra_D = 9.8·(142/367)·0.1³/(22.8e-6·32.8e-6) = 5.07e6; Churchill–Chu
    Nu = {0.60 + 0.387·Ra^(1/6)/[1 + (0.559/Pr)^(9/16)]^(8/27)}² = 23.3; h = 23.3·0.0314/0.1 = 7.32 W/(m²·K);
    convection q' = 7.32·π·0.1·142 = 327 W/m; radiation q' = 0.85·π·0.1·σ·(438.15⁴ − 296.15⁴) = 441 W/m.
    """
    pipe = Surface("horizontal pipe", 0.1, 1.0, 0.85, ambient_T=296.15)
    record = surface_loss(pipe, 438.15)
    assert record.convection == pytest.approx(327.0, rel=0.03)  # property data differ by ~1-2 %
    radiation = 0.85 * math.pi * 0.1 * SIGMA * (438.15 ** 4 - 296.15 ** 4)  # hand calculation, 441 W/m
    assert radiation == pytest.approx(441.0, abs=1.0)
    assert record.radiation == pytest.approx(radiation, rel=1e-3)
    assert record.surface_T == 438.15  # bare: the surface is at the process temperature
    assert record.loss == pytest.approx(327.0 + 441.0, rel=0.02)


def test_insulated_pipe_hand_calculation():
    """DN80 pipe (88.9 mm) with 40 mm mineral wool at 140 °C in still 5 °C air, ε = 0.3.

    Hand calculation (one pass from a guessed surface of 21 °C): insulation, mean 80.5 °C, k = 0.038 +
    0.006·30.5/50 = 0.0417 W/(m·K) (our table): R' = ln(168.9/88.9)/(2π·0.0417) = 2.45 m·K/W.
    Outside, film 286 K (air ν = 14.7e-6 m²/s, α = 20.7e-6 m²/s, k = 0.0253 W/(m·K), Pr = 0.71, Incropera
    Table A.4, from memory): Ra_D = 9.81·(16/286)·0.1689³/(ν·α) = 8.65e6, Churchill–Chu Nu = 27.1,
    h_c = 27.1·0.0253/0.1689 = 4.06; h_r = εσ(T_s² + T_a²)(T_s + T_a) = 1.60 W/(m²·K);
    R'_out = 1/((4.06 + 1.60)·π·0.1689) = 0.333 m·K/W. q' = 135/(2.45 + 0.333) = 48.5 W/m,
    T_s = 5 + 48.5·0.333 = 21.2 °C.
    """
    pipe = Surface("horizontal pipe", 0.0889, 1.0, 0.3, "mineral wool", 0.040, ambient_T=278.15)
    record = surface_loss(pipe, 413.15)
    assert record.loss == pytest.approx(48.5, rel=0.02)
    assert record.surface_T - 273.15 == pytest.approx(21.2, abs=0.5)
    # the solved surface closes conduction = convection + radiation (hand formula for the conduction)
    k = insulation_conductivity("mineral wool", (413.15 + record.surface_T) / 2)
    conducted = 2 * math.pi * k * (413.15 - record.surface_T) / math.log(0.1689 / 0.0889)
    assert conducted == pytest.approx(record.convection + record.radiation, rel=1e-6)
    assert record.insulation_k == pytest.approx(k)


def test_insulated_roof_hand_calculation():
    """A 10 m tank roof with 50 mm mineral wool at 80 °C, 20 °C air: the insulation dominates, so
    q ≈ k·A·ΔT/t = 0.040·78.54·(80 − 22)/0.05 = 3.64 kW with the surface about 22 °C and k at 51 °C
    (0.038 + 0.006·1/50 ≈ 0.0381; hand: 0.0381·78.54·58/0.05 = 3.47 kW)."""
    roof = Surface("tank roof", 10.0, 0.0, 0.9, "mineral wool", 0.05, ambient_T=293.15)
    record = surface_loss(roof, 353.15)
    assert record.area == pytest.approx(math.pi * 25)
    assert record.loss == pytest.approx(3470, rel=0.05)


def test_wind_and_insulation_act_the_right_way():
    bare = Surface("vertical pipe", 0.2, 5.0, 0.9, ambient_T=293.15)
    windy = Surface("vertical pipe", 0.2, 5.0, 0.9, ambient_T=293.15, wind=5.0)
    insulated = Surface("vertical pipe", 0.2, 5.0, 0.9, "calcium silicate", 0.05, ambient_T=293.15)
    assert heat_loss(windy, 423.15) > heat_loss(bare, 423.15) > 5 * heat_loss(insulated, 423.15)
    assert "Churchill–Bernstein" in surface_loss(windy, 423.15).method
    assert "vertical plate" in surface_loss(bare, 423.15).method


def test_cold_process_gains_heat():
    pipe = Surface("horizontal pipe", 0.1, 1.0, 0.9, "polyurethane foam", 0.03, ambient_T=303.15)
    record = surface_loss(pipe, 263.15)
    assert record.loss < 0 and 263.15 < record.surface_T < 303.15
    assert any("heat gain" in note.text for note in record.notes)


def test_protection_thickness_meets_the_limit():
    """The thickness found keeps the outer surface at the limit in still air (60 °C, common practice)."""
    pipe = Surface("horizontal pipe", 0.1143, 1.0, 0.2, "calcium silicate", 0.0, ambient_T=308.15, wind=3.0)
    thickness = protection_thickness(pipe, 623.15, PERSONNEL_PROTECTION_LIMIT, "calcium silicate")
    assert 0.01 < thickness < 0.2
    still = Surface("horizontal pipe", 0.1143, 1.0, 0.2, "calcium silicate", thickness, ambient_T=308.15)
    assert surface_temperature(still, 623.15) == pytest.approx(PERSONNEL_PROTECTION_LIMIT, abs=0.05)
    assert protection_thickness(pipe, 323.15, PERSONNEL_PROTECTION_LIMIT, "mineral wool") == 0.0
    hot_air = Surface("horizontal pipe", 0.1, 1.0, 0.9, ambient_T=338.15)  # the air itself is above 60 °C
    assert protection_thickness(hot_air, 473.15, PERSONNEL_PROTECTION_LIMIT, "mineral wool") is None


def test_insulation_table_is_pinned_and_sourced():
    table = insulation_table()
    assert sorted(table) == ["calcium silicate", "cellular glass", "mineral wool", "polyurethane foam"]
    assert sum(len(points) for points, *_ in table.values()) == 28
    for points, low, high, source in table.values():
        assert source and "from memory" in source
        assert all(k > 0 for _, k in points) and [T for T, _ in points] == sorted(T for T, _ in points)
        assert low < high
    assert insulation_conductivity("calcium silicate", 373.15) == pytest.approx(0.060)  # the table's row


# --------------------------------------------------------------------------- in the balance
def test_sample_outlet_temperature_by_hand():
    """The sample's loss moves with the outlet: the answer closes with the loss at the solved run's log-mean
    temperature (its difference to the 5 °C air the log mean of the ends').

    Hand check: 4 t/h of water (cp ≈ 4.28 kJ/(kg·K) at 138 °C, IAPWS-IF97, from memory) losing about
    300 m × 52 W/m ≈ 15.5 kW cools by 15.5/(1.111·4.28) ≈ 3.3 K: about 136.7 °C."""
    result = solve(parse_worksheet(sample_data()))
    assert result.answer.value_si - 273.15 == pytest.approx(136.7, abs=0.1)
    loss = next(t for t in result.terms if t.kind == "loss")
    record = result.surface_losses[0]
    assert loss.heat == pytest.approx(-record.loss)
    a, b = 413.15 - 278.15, result.answer.value_si - 278.15  # the ends' differences to the air
    assert record.process_T == pytest.approx(278.15 + (a - b) / math.log(a / b))  # hand calculation
    assert abs(result.residual) < 1e-6 * abs(loss.heat)
    # the same loss typed as a fixed value gives the same outlet (the computed one was consistent)
    fixed = sample_data()
    fixed["losses"] = [{"name": "Yard line", "value": f"{record.loss} W"}]
    assert solve(parse_worksheet(fixed)).answer.value_si == pytest.approx(result.answer.value_si, abs=1e-5)


def test_computed_loss_in_an_amount_solve_and_in_batch():
    data = sample_data()
    data["unknowns"] = [{"kind": "amount", "line": "Hot water"}]
    data["losses"][0]["surface"].pop("line")
    data["losses"][0]["surface"]["process_temperature"] = "138 degC"
    data["streams"][0]["flow"] = "1 t/h"
    continuous = solve(parse_worksheet(data))
    per_hour = continuous.surface_losses[0].loss
    # flow = loss / (h(140 °C) − h(135 °C)) ≈ 15.5 kW / (5 K · 4.28 kJ/(kg·K)) ≈ 2.6 t/h, hand estimate
    assert continuous.answer.value_si * 3.6 == pytest.approx(2.6, rel=0.05)
    data["basis"] = {"kind": "batch", "duration": "2 h"}
    data["streams"][0]["flow"] = "1 t"
    batch = solve(parse_worksheet(data))
    loss = next(t for t in batch.terms if t.kind == "loss")
    assert loss.heat == pytest.approx(-per_hour * 7200)


def test_report_and_json_show_the_details_and_the_caution_once():
    result = solve(parse_worksheet(sample_data()))
    text = format_result(result)
    assert "SURFACE LOSSES" in text and "Churchill–Chu" in text and "personnel protection" in text
    assert text.count("a process hazard analysis") == 1
    with open("sample_data/glycol_hydration_screening.json", encoding="utf-8") as handle:  # with a screening too
        screened = json.load(handle)
    screened["losses"] = [{"name": "Shell", "surface": {"shape": "vessel wall", "diameter": "2 m", "length": "3 m",
                                                        "emissivity": 0.9, "process_temperature": "70 degC"}}]
    both = solve_and_analyse(parse_worksheet(screened))
    assert both.screening and both.surface_losses
    assert format_result(both).count("a process hazard analysis") == 1
    data = result_json(result, "US")
    assert data["surface_losses"][0]["address"] == "losses[Yard line].surface"
    assert data["surface_losses"][0]["surface_T"] == pytest.approx(result.surface_losses[0].surface_T)
    assert "in" in data["surface_losses"][0]["personnel_protection"]
    row = surface_loss_rows(result)[0]
    assert row["loss"] == "Yard line" and row["heat lost"].endswith("kW")


def test_every_geometry_input_has_an_address():
    ws = parse_worksheet(sample_data())
    listed = {i.address: i for i in address.inputs(ws)}
    for field in ("diameter", "length", "emissivity", "ambient_temperature", "wind_speed",
                  "insulation.thickness"):
        assert f"losses[Yard line].surface.{field}" in listed
    assert listed["losses[Yard line].surface.wind_speed"].kinds == ("velocity",)
    thicker = address.with_value(ws, "losses[Yard line].surface.insulation.thickness", "80 mm")
    assert solve(thicker).answer.value_si > solve(ws).answer.value_si  # less loss, warmer outlet
    renamed = address.rename(ws, "streams[Hot water]", "HW")
    assert renamed.losses[0].surface.line == "HW"


# --------------------------------------------------------------------------- refusals, by address
@pytest.mark.parametrize("changes, where, message", [
    ({"diameter": "-50 mm"}, "losses[Yard line].surface.diameter", "diameter must be positive, not -50 mm"),
    ({"length": "0 m"}, "losses[Yard line].surface.length", "length must be positive, not 0 m"),
    ({"insulation": {"material": "mineral wool", "thickness": "-1 mm"}},
     "losses[Yard line].surface.insulation.thickness", "insulation.thickness must be zero or more, not -1 mm"),
    ({"insulation": {"material": "straw", "thickness": "10 mm"}}, "losses[Yard line].surface.insulation.material",
     "no insulation called 'straw' (there are: mineral wool, calcium silicate, cellular glass, polyurethane foam)"),
    ({"insulation": {"material": "polyurethane foam", "thickness": "40 mm"}},
     "losses[Yard line].surface.insulation.material", "polyurethane foam serves from -50 °C to 120 °C; the process "
     "side reaches 140.0 °C"),
    ({"insulation": {"material": "mineral wool", "thickness": "0.01 mm"}},
     "losses[Yard line].surface.insulation.thickness", "insulation is 0 (bare) or at least 1 mm thick"),
    ({"ambient_temperature": "2500 degC"}, "losses[Yard line].surface",
     "film temperature"),
    ({"wind_speed": "-2 m/s"}, "losses[Yard line].surface.wind_speed", "wind speed must be zero or more"),
    ({"line": "Steam"}, "losses[Yard line].surface.line", "no stream or vessel called 'Steam' (there are: Hot water)"),
    ({"diameter": "50 kg"}, "losses[Yard line].surface.diameter", "a length"),
])
def test_refusals_of_the_geometry(changes, where, message):
    with pytest.raises(InputError) as caught:
        solve(parse_worksheet(with_surface(**changes)))
    assert caught.value.where == where
    assert message in caught.value.message


@pytest.mark.parametrize("changes, where, message", [
    ({"emissivity": 1.2}, "losses[Yard line].surface.emissivity", "less than or equal to 1"),
    ({"emissivity": -0.1}, "losses[Yard line].surface.emissivity", "greater than or equal to 0"),
    ({"shape": "sphere"}, "losses[Yard line].surface.shape", "horizontal pipe"),
    ({"process_temperature": "120 degC"}, "losses[Yard line].surface",
     "give the process side's 'process_temperature', or the 'line'"),
    ({"length": None}, "losses[Yard line].surface", "a horizontal pipe needs its 'length'"),
])
def test_refusals_of_the_document(changes, where, message):
    data = with_surface(**changes)
    data["losses"][0]["surface"] = {k: v for k, v in data["losses"][0]["surface"].items() if v is not None}
    with pytest.raises(WorksheetFormatError) as caught:
        parse_worksheet(data)
    assert caught.value.where == where
    assert message in caught.value.message


def test_a_loss_is_typed_or_computed_not_both():
    data = sample_data()
    both = copy.deepcopy(data)
    both["losses"][0]["value"] = "2 kW"
    with pytest.raises(WorksheetFormatError, match="a loss is entered as a 'value', or computed from a 'surface'"):
        parse_worksheet(both)


def test_batch_without_duration_refused():
    data = with_surface(process_temperature="138 degC")
    data["losses"][0]["surface"].pop("line")
    data["basis"] = {"kind": "batch"}
    data["streams"][0]["flow"] = "4 t"
    with pytest.raises(InputError) as caught:
        solve(parse_worksheet(data))
    assert caught.value.where == "basis.duration"
    assert "a computed loss is a power" in caught.value.message


def test_calculation_sheet_carries_the_computed_loss_and_the_caution():
    """The filed PDF (read back with pypdf) shows the surface-loss table and the one safety caution."""
    import io

    import pypdf

    from heatbalance.present.sheet import sheet_pdf_bytes

    ws = parse_worksheet(sample_data())
    pdf = sheet_pdf_bytes(ws, solve_and_analyse(ws))
    text = " ".join(" ".join((p.extract_text() or "").split()) for p in pypdf.PdfReader(io.BytesIO(pdf)).pages)
    assert "Surface losses (computed from geometry)" in text and "Yard line" in text
    assert text.count("a process hazard analysis") == 1


def test_vessel_wall_loss_follows_a_batch_heat_up():
    """A 5 t water batch heated from 20 °C with 300 kW for 1 h through a bare 2.5 m × 3 m wall: the wall loses
    heat at the mean of the start and the solved end temperature, over the hour (hand check: without the loss,
    ΔT = 1080 MJ / (5000 kg · 4.18 kJ/(kg·K)) = 51.7 K; with it, a little less)."""
    sheet = {"basis": {"kind": "batch", "duration": "1 h"},
             "vessels": [{"name": "V-1", "charges": [{"name": "Water", "material": "water", "mass": "5 t",
                                                      "initial": {"temperature": "20 degC"}}],
                          "final": {"temperature": "60 degC"}}],
             "duties": [{"name": "Heater", "value": "300 kW"}],
             "losses": [{"name": "Wall", "surface": {"shape": "vessel wall", "diameter": "2.5 m", "length": "3 m",
                                                     "emissivity": 0.9, "line": "V-1"}}],
             "unknowns": [{"kind": "temperature", "line": "V-1", "end": "final"}]}
    result = solve(parse_worksheet(sheet))
    T_end = result.answer.value_si
    record = result.surface_losses[0]
    assert record.process_T == pytest.approx((293.15 + T_end) / 2)
    loss = next(t for t in result.terms if t.kind == "loss")
    assert loss.heat == pytest.approx(-record.loss * 3600)
    assert 20 + 40 < T_end - 273.15 < 20 + 51.7  # the loss takes a few kelvin off
    assert abs(result.residual) < 1e-6 * 300e3 * 3600


def _long_run(length: str, flow: str, inlet: str) -> dict:
    """The sample's line, bare, in still 20 °C air."""
    doc = sample_data()
    doc["streams"][0].update(flow=flow, inlet={"temperature": inlet})
    surface = doc["losses"][0]["surface"]
    surface.update(length=length, ambient_temperature="20 degC")
    surface.pop("wind_speed")
    surface["insulation"]["thickness"] = "0 mm"
    return doc


@pytest.mark.parametrize("length", ["100 m", "400 m"])
def test_a_long_run_approaches_the_air_and_never_passes_it(length):
    """A run's loss is nearly in proportion to its difference to the air: the outlet follows
    θ_out = θ_in·exp(−UA/(m·cp)), and the loss taken at the log-mean difference is the run's own. Before, at the
    arithmetic mean, 400 m of bare 0.4 t/h line from 60 °C ended at 19.4 °C, below the 20 °C air."""
    result = solve(parse_worksheet(_long_run(length, "0.4 t/h", "60 degC")))
    T_out = result.answer.value_si
    # hand: march the bare 88.9 mm pipe (emissivity 0.3) metre by metre, each metre losing heat_loss at its own
    # temperature, water at cp 4.18 kJ/(kg·K) (IAPWS-IF97 near 40 °C, from memory)
    metre = Surface("horizontal pipe", 0.0889, 1.0, 0.3, ambient_T=293.15)
    T = 333.15
    for _ in range(int(length.split()[0])):
        T -= heat_loss(metre, T) / (0.4 / 3.6 * 4180.0)
    assert 293.15 < T_out and T_out == pytest.approx(T, abs=0.5)


def test_a_bare_hot_line_is_warned_beside_the_answer_as_a_hot_surface():
    doc = sample_data()
    doc["losses"][0]["surface"]["insulation"]["thickness"] = "0 mm"  # bare: the surface is the process's
    result = solve(parse_worksheet(doc))
    (warning,) = [w for w in result.warnings if w.text.startswith("Hot surface")]
    record = result.surface_losses[0]
    # a bare surface sits at the process temperature (inside film and wall neglected), far above 60 °C
    assert record.surface_T == pytest.approx(record.process_T) and record.surface_T > 273.15 + 100
    assert warning.address == "losses[Yard line].surface" and "above the 60 °C limit for personnel protection" in \
        warning.text
    assert not [w for w in solve(parse_worksheet(sample_data())).warnings if w.text.startswith("Hot surface")]


@pytest.mark.parametrize("field, value, address, words", [
    ("wind_speed", "400 m/s", "losses[Yard line].surface.wind_speed", "above hurricane force (32.7 m/s)"),
    ("emissivity", 0.0, "losses[Yard line].surface.emissivity", "emissivity 0 is below a polished metal's"),
])
def test_a_surface_no_plant_has_is_warned_at_its_field(field, value, address, words):
    # hurricane force: Beaufort 12 from 32.7 m/s (WMO); polished silver's emissivity about 0.02 (Incropera A.12,
    # from memory)
    doc = sample_data()
    doc["losses"][0]["surface"][field] = value
    (warning,) = [w for w in solve(parse_worksheet(doc)).warnings if w.address == address]
    assert words in warning.text
    assert not [w for w in solve(parse_worksheet(sample_data())).warnings if w.address.startswith("losses[")]
