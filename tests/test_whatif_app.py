"""The what-if panel (webapp/whatif_panel.py) through Streamlit's AppTest, on the real app.py.

A sweep's table is checked number by number against the public solve at each point
(``heatbalance.solve`` on the sheet with that value set by address); the case table against the
engine's ``run_cases``. Refusals (a point, a unit of another kind, too many points, a bad override)
are shown in words with the address at fault. Case edits land in the worksheet the page holds.
"""
import json
import math
import re

import pytest
from page_helpers import errors, held, page, sample, unescaped
from streamlit.testing.v1 import AppTest

from heatbalance import solve
from heatbalance.address import rename, with_value
from heatbalance.analyses.cases import AS_TYPED, run_cases
from heatbalance.analyses.sweep import MAX_POINTS
from heatbalance.units import from_si
from heatbalance.worksheet import Case, Override, Quantity
from webapp.state import KEY

GLYCOL = "steam_heater_glycol.json"
CONDENSER = "solvent_condenser_cooling_water.json"
OUTLET = "streams[Glycol].outlet.temperature"
CW_INLET = "streams[Cooling water].inlet.temperature"


def no_exception(at):
    assert not at.exception, [e.value for e in at.exception]


def markdown(at) -> str:
    return unescaped("\n".join(m.value for m in at.markdown))


def sweep_table(at):
    return next(d.value for d in at.dataframe if "refused at" in d.value.columns)


def case_table(at):
    return next(d.value for d in at.dataframe if d.value.index.name == "output")


def set_range(at, n, address, start, stop, count, unit):
    at.selectbox(key=f"whatif_axis_{n}").set_value(address).run()
    at.number_input(key=f"whatif_from_{n}").set_value(start)
    at.number_input(key=f"whatif_to_{n}").set_value(stop)
    at.number_input(key=f"whatif_count_{n}").set_value(count)
    at.text_input(key=f"whatif_unit_{n}").input(unit)
    return at.run()


def run(at) -> AppTest:
    at.button(key="whatif_run").click().run()
    no_exception(at)
    return at


# --------------------------------------------------------------------------- sweeps
def test_a_sweep_table_equals_the_public_solve_at_each_point():
    ws = sample(GLYCOL)
    at = page(ws)
    set_range(at, 0, OUTLET, 20.0, 100.0, 5, "°C")
    table = sweep_table(run(at))
    assert list(table["Glycol outlet temperature [°C]"]) == [20.0, 40.0, 60.0, 80.0, 100.0]
    assert (table["refused at"] == "").all()
    for T, shown in zip(table["Glycol outlet temperature [°C]"], table["Steam flow [kg/h]"]):
        expected = from_si(solve(with_value(ws, OUTLET, (T, "degC"))).answer.value_si, "kg/h", "mass_flow")
        assert shown == pytest.approx(expected, rel=1e-9)
    # the typed outlet (40 °C) gives the page's own answer: 500 kg/h is only the stored guess
    assert table["Steam flow [kg/h]"][1] == pytest.approx(
        from_si(solve(ws).answer.value_si, "kg/h", "mass_flow"), rel=1e-9)


def test_a_grid_of_two_inputs_has_every_point_and_each_equals_the_public_solve():
    ws = sample(GLYCOL)
    at = page(ws)
    set_range(at, 0, OUTLET, 30.0, 50.0, 3, "degC")
    at.selectbox(key="whatif_axis_1").set_value("streams[Glycol].flow").run()
    set_range(at, 1, "streams[Glycol].flow", 6.0, 12.0, 2, "t/h")
    assert at.button(key="whatif_run").label == "Run the sweep (6 points)"
    table = sweep_table(run(at))
    assert len(table) == 6
    for _, row in table.iterrows():
        point = with_value(with_value(ws, OUTLET, (row["Glycol outlet temperature [°C]"], "degC")),
                           "streams[Glycol].flow", (row["Glycol flow [t/h]"], "t/h"))
        expected = from_si(solve(point).answer.value_si, "kg/h", "mass_flow")
        assert row["Steam flow [kg/h]"] == pytest.approx(expected, rel=1e-9)


def test_outputs_in_the_view_units_and_a_second_output():
    ws = sample(GLYCOL)
    at = page(ws)
    at.radio(key="unit_system").set_value("US customary (°F, lb, Btu)").run()
    set_range(at, 0, OUTLET, 30.0, 50.0, 3, "degC")
    at.multiselect(key="whatif_outputs").select("lines[Glycol].heat").run()
    table = sweep_table(run(at))
    header = "Glycol: heat absorbed [Btu/h]"
    for T, shown in zip(table["Glycol outlet temperature [°C]"], table[header]):
        line = next(ln for ln in solve(with_value(ws, OUTLET, (T, "degC"))).lines if ln.name == "Glycol")
        assert shown == pytest.approx(from_si(line.total, "Btu/h", "power"), rel=1e-9)
    assert "Steam flow [lb/h]" in table.columns  # as the US view's answer: kg/h typed is the view's to choose


def test_a_refused_point_is_listed_with_its_address_and_the_others_are_solved():
    ws = sample(GLYCOL)
    at = page(ws)
    set_range(at, 0, OUTLET, 60.0, 120.0, 4, "degC")  # the glycol data end at 100 °C
    table = sweep_table(run(at))
    refused = table[table["refused at"] != ""]
    assert list(refused["Glycol outlet temperature [°C]"]) == [120.0]
    assert list(refused["refused at"]) == [OUTLET]
    assert math.isnan(refused["Steam flow [kg/h]"].iloc[0])
    assert "outside the property data" in refused["reason"].iloc[0]
    listed = markdown(at)
    assert f"Glycol outlet temperature = 120 °C: {OUTLET}: temperature 120.00 °C is outside the property data" \
        in listed
    assert "1 of 4 points were refused" in "\n".join(w.value for w in at.warning)
    solved = table[table["refused at"] == ""]
    assert len(solved) == 3 and solved["Steam flow [kg/h]"].notna().all()


def test_a_unit_of_another_kind_is_refused_with_its_address_and_no_traceback():
    at = page(sample(GLYCOL))
    set_range(at, 0, OUTLET, 20.0, 100.0, 5, "kW")
    run(at)
    text = errors(at)
    assert f"This sweep cannot be run: {OUTLET}: unit 'kW' is not a temperature" in text
    assert not [d for d in at.dataframe if "refused at" in d.value.columns]


def test_too_many_points_is_refused_with_the_address_and_the_limit():
    at = page(sample(GLYCOL))
    set_range(at, 0, OUTLET, 20.0, 100.0, 1000, "degC")
    at.selectbox(key="whatif_axis_1").set_value("streams[Glycol].flow").run()
    set_range(at, 1, "streams[Glycol].flow", 6.0, 12.0, 101, "t/h")
    run(at)
    assert f"streams[Glycol].flow: 101,000 points is more than a sweep may have ({MAX_POINTS:,})" in errors(at)


def test_the_unknown_is_not_offered_and_a_changed_sheet_hides_the_old_sweep():
    ws = sample(GLYCOL)
    at = page(ws)
    assert "streams[Steam].flow" not in at.selectbox(key="whatif_axis_0").options
    assert "Glycol outlet temperature" in at.selectbox(key="whatif_axis_0").options
    set_range(at, 0, OUTLET, 30.0, 50.0, 3, "degC")
    run(at)
    at.session_state[KEY].set_worksheet(with_value(ws, "streams[Glycol].flow", (10, "t/h")))
    at.run()
    assert not [d for d in at.dataframe if "refused at" in d.value.columns]
    assert any("The worksheet changed since the last sweep" in i.value for i in at.info)


# --------------------------------------------------------------------------- cases
def test_the_case_table_shows_the_condenser_cases_with_the_numbers_of_run_cases():
    ws = sample(CONDENSER)
    at = page(ws)
    no_exception(at)
    table = case_table(at)
    frame = run_cases(ws)
    names = [AS_TYPED] + [c.name for c in ws.cases]
    assert names[1:4] == ["winter", "design", "summer"]
    assert list(table.columns[:len(names)]) == names
    answer_row = next(r for r in table.index if r.startswith("Cooling water flow"))
    unit = re.search(r"\[(.*)\]$", answer_row).group(1)
    for name in names:
        assert table.loc[answer_row, name] == pytest.approx(
            from_si(frame.loc["answer", name], unit, "mass_flow"), rel=1e-9)
        each = solve(with_value(ws, CW_INLET, ws.cases[names.index(name) - 1].overrides[0].value)) \
            if name in ("winter", "design", "summer") else None
        if each is not None:  # a case is the public solve with its overrides set
            assert table.loc[answer_row, name] == pytest.approx(from_si(each.answer.value_si, unit, "mass_flow"),
                                                                 rel=1e-9)
    # warmer supply water, less temperature rise: more water
    assert table.loc[answer_row, "winter"] < table.loc[answer_row, "design"] < table.loc[answer_row, "summer"]
    assert table.loc[answer_row, f"summer − {AS_TYPED}"] == pytest.approx(
        table.loc[answer_row, "summer"] - table.loc[answer_row, AS_TYPED], rel=1e-9)


def test_the_base_case_picker_changes_the_differences():
    ws = sample(CONDENSER)
    at = page(ws)
    at.selectbox(key="whatif_base").set_value("design").run()
    table = case_table(at)
    frame = run_cases(ws, base="design")
    assert "summer − design" in table.columns and f"{AS_TYPED} − design" in table.columns
    answer_row = next(r for r in table.index if r.startswith("Cooling water flow"))
    unit = re.search(r"\[(.*)\]$", answer_row).group(1)
    assert table.loc[answer_row, "summer − design"] == pytest.approx(
        from_si(frame.loc["answer", "summer"], unit, "mass_flow")
        - from_si(frame.loc["answer", "design"], unit, "mass_flow"), rel=1e-9)


def test_a_refused_case_is_listed_with_its_reason_and_address():
    ws = sample(CONDENSER)
    hot = Case(name="hot supply", overrides=[Override(address=CW_INLET, value=Quantity(value=60, unit="degC"))])
    ws = ws.model_copy(update={"cases": [*ws.cases, hot]})
    at = page(ws)
    no_exception(at)
    assert "hot supply" in case_table(at).columns
    refused = "\n".join(w.value for w in at.warning)
    assert "1 case(s) cannot be solved" in refused
    listed = markdown(at)
    assert "- hot supply: " in listed
    assert str(run_cases(ws).attrs["refusals"]["hot supply"].where) in listed


def test_adding_a_case_and_an_override_on_the_page_puts_them_in_the_worksheet():
    ws = sample(GLYCOL)
    at = page(ws)
    assert at.selectbox(key="whatif_case").value == -1  # no case yet: "a new case"
    at.text_input(key="whatif_case_name").input("hot return")
    at.button(key="whatif_case_add").click().run()
    no_exception(at)
    assert [c.name for c in held(at).cases] == ["hot return"]
    at.selectbox(key="whatif_override_address").set_value(OUTLET).run()
    assert at.text_input(key="whatif_override_value").value == "40 °C"  # the typed value to start from
    at.text_input(key="whatif_override_value").input("55 °C")
    at.button(key="whatif_override_set").click().run()
    no_exception(at)
    assert held(at).cases == [Case(name="hot return",
                                   overrides=[Override(address=OUTLET, value=Quantity(value=55, unit="degC"))])]
    table = case_table(at)
    expected = from_si(solve(with_value(ws, OUTLET, (55, "degC"))).answer.value_si, "kg/h", "mass_flow")
    assert table.loc["Steam flow [kg/h]", "hot return"] == pytest.approx(expected, rel=1e-9)
    # the case table follows the page's worksheet and the grids keep the sheet as typed
    assert solve(held(at)).answer.value_si == pytest.approx(solve(ws).answer.value_si, rel=1e-12)


def test_renaming_removing_an_override_and_deleting_a_case():
    ws = sample(CONDENSER)
    at = page(ws)
    at.selectbox(key="whatif_case").set_value(2).run()  # summer
    at.text_input(key="whatif_case_name").input("peak summer")
    at.button(key="whatif_case_rename").click().run()
    assert [c.name for c in held(at).cases][2] == "peak summer"
    assert "peak summer" in case_table(at).columns
    at.selectbox(key="whatif_case").set_value(3).run()  # summer, return 42 °C: two overrides
    at.button(key="whatif_override_remove_1").click().run()
    assert [o.address for o in held(at).cases[3].overrides] == [CW_INLET]
    at.button(key="whatif_case_delete").click().run()
    no_exception(at)
    assert [c.name for c in held(at).cases] == ["winter", "design", "peak summer"]


def test_bad_case_input_is_refused_with_its_address_and_the_worksheet_kept():
    ws = sample(CONDENSER)
    at = page(ws)
    at.selectbox(key="whatif_case").set_value(0).run()
    at.selectbox(key="whatif_override_address").set_value(CW_INLET).run()
    at.text_input(key="whatif_override_value").input("25 kW")
    at.button(key="whatif_override_set").click().run()
    no_exception(at)
    assert f"{CW_INLET}: unit 'kW' is not a temperature" in errors(at)
    assert held(at).cases == ws.cases
    at.text_input(key="whatif_case_name").input("design")
    at.button(key="whatif_case_rename").click().run()
    assert "cases[design]: there is already a case called 'design'" in errors(at)
    assert held(at).cases == ws.cases


def test_case_names_are_shown_as_plain_text():
    ws = sample(GLYCOL)
    at = page(ws)
    name = "**bold** <b>x</b> [link](http://e.invalid)"
    at.text_input(key="whatif_case_name").input(name)
    at.button(key="whatif_case_add").click().run()
    assert held(at).cases[0].name == name
    assert name in case_table(at).columns
    at.selectbox(key="whatif_case").set_value(-1).run()  # the same name again: refused, quoted as typed
    at.text_input(key="whatif_case_name").input(name)
    at.button(key="whatif_case_add").click().run()
    shown = [e.value for e in at.error]
    assert any(unescaped(s) == f"cases[{name}]: there is already a case called '{name}'; choose another name"
               for s in shown)
    assert all("**bold**" not in s and "<b>" not in s for s in shown)  # escaped, not Markdown or HTML


def chart(at) -> dict:
    """The what-if chart's figure as the page sends it to the browser."""
    figure = next(c for c in at.get("plotly_chart") if c.proto.id.endswith("whatif_figure"))
    return json.loads(figure.proto.spec)


def test_names_in_the_chart_are_plotly_text_escaped():
    ws = rename(sample(GLYCOL), "streams[Glycol]", "<b>Gly&co</b>")
    at = page(ws)
    run(at)
    line = chart(at)
    assert line["layout"]["xaxis"]["title"]["text"] == "&lt;b&gt;Gly&amp;co&lt;/b&gt; flow [t/h]"
    assert line["data"][0]["hovertemplate"].startswith("&lt;b&gt;Gly&amp;co&lt;/b&gt; flow [t/h]: %{x")
    assert "<br>" in line["data"][0]["hovertemplate"]  # plotly's own markup is kept
    at.selectbox(key="whatif_axis_1").set_value("streams[<b>Gly&co</b>].outlet.temperature").run()
    at.multiselect(key="whatif_outputs").select("lines[<b>Gly&co</b>].heat").run()
    run(at)
    at.selectbox(key="whatif_chart_output").set_value("lines[<b>Gly&co</b>].heat").run()
    grid = chart(at)
    heat = "&lt;b&gt;Gly&amp;co&lt;/b&gt;: heat absorbed [kW]"
    assert grid["data"][0]["type"] == "heatmap"
    assert grid["data"][0]["colorbar"]["title"]["text"] == heat
    assert grid["layout"]["title"]["text"] == "What if: &lt;b&gt;Gly&amp;co&lt;/b&gt;: heat absorbed"
    assert grid["layout"]["yaxis"]["title"]["text"] == "&lt;b&gt;Gly&amp;co&lt;/b&gt; outlet temperature [°C]"
    assert "<b>Gly" not in json.dumps(grid)


def test_a_new_unit_converts_the_range_the_panel_filled_and_keeps_one_the_user_typed():
    at = page(sample(GLYCOL))
    at.selectbox(key="whatif_axis_0").set_value(OUTLET).run()
    start, stop = at.number_input(key="whatif_from_0").value, at.number_input(key="whatif_to_0").value
    at.text_input(key="whatif_unit_0").input("°F").run()
    # the panel's own range follows the unit: T[°F] = 1.8·T[°C] + 32 (exact); it was reread as °F before
    assert at.number_input(key="whatif_from_0").value == pytest.approx(1.8 * start + 32, rel=1e-9)
    assert at.number_input(key="whatif_to_0").value == pytest.approx(1.8 * stop + 32, rel=1e-9)
    # a range the user typed is theirs: a unit typed after it does not convert it (product rule, no source)
    at.number_input(key="whatif_from_0").set_value(100.0)
    at.number_input(key="whatif_to_0").set_value(160.0)
    at.text_input(key="whatif_unit_0").input("°C").run()
    assert (at.number_input(key="whatif_from_0").value, at.number_input(key="whatif_to_0").value) == (100.0, 160.0)
    no_exception(at)


def test_a_case_name_with_a_tab_is_refused_at_its_case_not_a_traceback():
    """A plant engineer's finding: 'Sommer<TAB>32 °C' pasted from a spreadsheet into the case name showed pydantic's
    traceback. Now refused at the case's address, the sheet unchanged."""
    ws = sample(GLYCOL)
    at = page(ws)
    at.text_input(key="whatif_case_name").input("Sommer\t32 °C")
    at.button(key="whatif_case_add").click().run()
    no_exception(at)
    assert held(at).cases == []
    assert any("holds a control character (U+0009" in unescaped(e.value) for e in at.error)
