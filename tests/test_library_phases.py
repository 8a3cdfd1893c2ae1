"""User materials that take a phase from the library (issue 13, item 5), and their default ranges."""
import re

import pytest
from iapws import IAPWS97

from heatbalance.balance import solve
from heatbalance.errors import InputError, WorksheetFormatError
from heatbalance.present.text import error_text, phrase_text
from heatbalance.worksheet import parse_worksheet
from sheet_factory import build, q, stream, temp

C = 273.15


def frozen_product(**changes):
    """Our own solid phase (cp 2.0 kJ/(kg·K), melting at 0 °C with 300 kJ/kg), water's liquid from the library."""
    material = {"name": "product", "source": "test material, hand calculation",
                "phases": [{"name": "solid", "cp": q(2.0, "kJ/(kg*K)"), "up_to": q(0, "degC"),
                            "latent_heat": q(300, "kJ/kg")},
                           {"name": "liquid", "from_library": "water"}],
                "min_temperature": q(-30, "degC")}
    material.update(changes)
    return material


def thawing(material, outlet=50):
    return build(materials=[material], streams=[stream("Thaw", "product", q(3.6, "t/h"), temp(-20), temp(outlet))],
                 duties=[{"name": "Heater"}], unknowns=[{"kind": "duty", "term": "Heater"}])


def test_own_solid_and_the_librarys_water_liquid():
    result = solve(thawing(frozen_product()))
    # hand calculation, 1 kg/s: 2.0 kJ/(kg·K) × 20 K + 300 kJ/kg + water's h(50 °C) − h(0 °C) at 1 atm
    # (IAPWS-IF97 via iapws; 0 °C is IF97's lowest temperature)
    water = (IAPWS97(P=0.101325, T=323.15).h - IAPWS97(P=0.101325, T=273.15).h) * 1e3
    assert result.answer.value_si == pytest.approx(40e3 + 300e3 + water, rel=1e-8)


def test_missing_max_temperature_defaults_to_the_library_phase_and_is_shown():
    result = solve(thawing(frozen_product()))
    (note,) = [w for w in result.warnings if w.address == "materials[product].max_temperature"]
    # water boils at 99.974 °C at 1 atm (IAPWS-IF97 via iapws: 373.124 K): the end of its liquid data there
    assert phrase_text(note, "SI") == ("product: no max temperature given; 99.97 °C is used, the upper end of "
                                       "water's liquid data at 1 atm.")
    assert "liquid phase: the library's water at 1 atm (CoolProp" in result.sources["product"]
    with pytest.raises(InputError) as beyond:  # the default bounds the material: 120 °C is outside it
        solve(thawing(frozen_product(), outlet=120))
    assert beyond.value.where == "streams[Thaw].outlet.temperature"
    assert error_text(beyond.value) == ("temperature 120.00 °C is outside the property data of product "
                                        "(-30.00 °C to 99.97 °C)")


def test_both_ends_from_the_library_default_both_temperatures():
    # steel's solid (library carbon steel, cp(T)) with nothing of our own but a name: both ends default
    steel = {"name": "my steel", "source": "the library's carbon steel",
             "phases": [{"name": "solid", "from_library": "carbon steel"}]}
    ws = build(basis={"kind": "batch"}, materials=[steel],
               vessels=[{"name": "Oven", "charges": [{"name": "Parts", "material": "my steel", "mass": q(1, "t"),
                                                      "initial": temp(20)}], "final": temp(150)}],
               duties=[{"name": "Heat"}], unknowns=[{"kind": "duty", "term": "Heat"}])
    result = solve(ws)
    notes = [phrase_text(w, "SI") for w in result.warnings if w.address.startswith("materials[my steel]")]
    # the carbon steel row's limits: -100 °C to 600 °C (heatbalance/data/solids_and_simple_liquids.csv)
    assert notes == ["my steel: no min temperature given; -100.00 °C is used, the lower end of carbon steel's "
                     "solid data at 1 atm.",
                     "my steel: no max temperature given; 600.00 °C is used, the upper end of carbon steel's "
                     "solid data at 1 atm."]
    library = build(basis={"kind": "batch"},
                    vessels=[{"name": "Oven", "charges": [{"name": "Parts", "material": "carbon steel",
                                                           "mass": q(1, "t"), "initial": temp(20)}],
                              "final": temp(150)}],
                    duties=[{"name": "Heat"}], unknowns=[{"kind": "duty", "term": "Heat"}])
    # the same data as the library's own material (hand: identical enthalpy path)
    assert result.answer.value_si == pytest.approx(solve(library).answer.value_si, rel=1e-12)


@pytest.mark.parametrize("phase, expected", [
    pytest.param({"name": "liquid", "from_library": "unobtainium"},
                 "unknown material 'unobtainium'; choose one of: water, air", id="unknown-library-material"),
    pytest.param({"name": "liquid", "from_library": "carbon steel"},
                 "carbon steel has no liquid phase at 1.013 bar(a) in the library's data (it has: solid)",
                 id="library-material-without-that-phase"),
])
def test_refusals_name_the_phase_address(phase, expected):
    material = frozen_product()
    material["phases"][1] = phase
    with pytest.raises(InputError) as caught:
        solve(thawing(material))
    assert caught.value.where == "materials[product].phases[liquid].from_library"
    assert error_text(caught.value).startswith(expected)


def refusal(material) -> tuple[str, str]:
    """Where and what: the refusal of a thawing line of ``material``."""
    with pytest.raises(InputError) as caught:
        solve(thawing(material))
    return caught.value.where, error_text(caught.value)


def test_a_phase_reaching_past_the_library_data_is_refused():
    # our solid melts at -5 °C into water's liquid, whose data begin at 0 °C (IAPWS-IF97's lowest temperature)
    material = frozen_product()
    material["phases"][0]["up_to"] = q(-5, "degC")
    assert refusal(material) == (
        "materials[product].phases[liquid].from_library",
        "water's liquid phase at 1 atm covers 0.00 °C to 99.97 °C; "
        "this phase would span -5.00 °C to 99.97 °C: move its transitions or the min/max temperature inside")


def test_own_data_at_an_end_needs_its_temperature():
    material = frozen_product()
    del material["min_temperature"]
    assert refusal(material) == (
        "materials[product].min_temperature",
        "give the min temperature: the solid phase is this worksheet's own data, "
        "so its range is not known (a phase taken from the library brings its own)")


@pytest.mark.parametrize("phase, message", [
    pytest.param({"name": "liquid"}, "a phase needs its cp, or 'from_library'", id="neither"),
    pytest.param({"name": "liquid", "from_library": "water", "cp": "4 kJ/(kg*K)"},
                 "a phase taken from the library ('from_library') has no cp of its own", id="both"),
])
def test_a_phase_gives_cp_or_a_library_material(phase, message):
    material = frozen_product()
    material["phases"][1] = phase
    with pytest.raises(WorksheetFormatError, match=re.escape(message)) as caught:
        parse_worksheet({"materials": [material]})
    assert caught.value.where.startswith("materials[product].phases")


def test_a_library_phase_survives_the_pages_table_round_trip():
    from webapp import grids

    ws = thawing(frozen_product())
    tables = grids.worksheet_to_tables(ws)
    assert [row["from library"] for row in tables["materials"]] == ["", "water"]
    back, problems = grids.tables_to_worksheet(tables, ws)
    assert problems == [] and back.model_dump() == ws.model_dump()
