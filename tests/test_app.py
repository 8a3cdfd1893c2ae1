"""The page, driven through Streamlit's AppTest: the real app.py, no browser.

AppTest cannot type into a table, so a test calls the page state's own ``apply_table_edit`` (the
method the editor's callback calls) through the one session key, then reruns. Every expected
answer is the engine's own (heatbalance.solve, written by heatbalance.present.text) for the worksheet
the page holds; the samples are our own scenarios; water from scratch is checked against IAPWS-IF97
through the `iapws` package.
"""
import functools
import json
import re
import string
import subprocess
import sys
from pathlib import Path

import pytest
from iapws import IAPWS97
from streamlit.testing.v1 import AppTest

from heatbalance import load_worksheet, solve
from heatbalance.analyses import solve_and_analyse
from heatbalance.present.text import answer_text as written
from heatbalance.reactor import CAUTION
from heatbalance.worksheet import Quantity, Unknown
from webapp.common import WORD_JOINER, plain
from webapp.state import KEY, PageState

from page_helpers import answer_value, edit, errors, held, no_traceback, shown_answer, unescaped

ROOT = Path(__file__).resolve().parent.parent
APP = str(ROOT / "app.py")
SAMPLES = {p.name: p for p in sorted((ROOT / "sample_data").glob("*.json"))}
US = "US customary (°F, lb, Btu)"


def sample(name):
    return load_worksheet(SAMPLES[name].read_bytes())


def page(name=None) -> AppTest:
    at = AppTest.from_file(APP, default_timeout=60)
    if name is not None:
        at.session_state[KEY] = PageState.opened(sample(name))
    return at.run()


def held(at):
    """The worksheet the page holds."""
    return at.session_state[KEY].worksheet


def rows(at, table):
    """A grid's rows as the user left them."""
    return at.session_state[KEY].rows[table]


def engine(ws, system="SI") -> str:
    """The engine's answer for ``ws`` as the page gets it (an exchanger's rating may set an input), written as the
    page writes it."""
    return written(solve_and_analyse(ws).answer, system)


answer_text = answer_value


def contributions(at):
    """The results table (the one data frame that is not an editable table)."""
    return next(d for d in at.dataframe if not (d.key or "").startswith("editor_")).value


def grid(at, table):
    """The frame the editor of a grid was given (its 'check' column marks bad cells)."""
    return next(d for d in at.dataframe if (d.key or "").startswith(f"editor_{table}_")).value


def test_the_page_opens_on_a_solved_sample():
    at = page()
    no_traceback(at)
    assert answer_text(at) == engine(sample("steam_heater_glycol.json")) == "745.6 kg/h"  # engine's answer
    assert shown_answer(at)[0] == "Answer: Steam flow"
    assert at.selectbox(key="unknown_picker").value == "Steam: flow"
    assert errors(at) == ""
    # the page's editing state is one object under one key (no back-door keys for tests)
    assert [k for k in at.session_state if k.startswith("hb_") and not k.startswith(("hb_share_", "hb_screening_"))] \
        == [KEY]


@pytest.mark.parametrize("name", list(SAMPLES))
def test_the_picker_loads_every_sample_solved(name):
    at = page()
    title = sample(name).title
    at.selectbox(key="sample_picker").select(title).run()
    no_traceback(at)
    assert unescaped(at.title[0].value) == title
    assert held(at) == sample(name)
    assert answer_text(at) == engine(sample(name))


def test_the_contribution_table_closes_the_balance():
    at = page("batch_reactor_exotherm.json")
    table = contributions(at)
    heat = [float(cell.replace(",", "")) for cell in table["heat into process [kJ]"]]  # shown as 1,234.57
    assert list(table["item"]) == ["R-2 / Batch", "R-2 / Reagent", "Jacket cooling", "Main reaction", "R-2 equipment"]
    # reaction heat: 92 kJ/mol × 4.2 kmol = 386,400 kJ released (the sample's own numbers)
    assert heat[3] == pytest.approx(386_400, abs=0.005)
    # jacket: 110 kW for 40 min = 264,000 kJ removed
    assert heat[2] == pytest.approx(-264_000, abs=0.005)
    assert sum(heat) == pytest.approx(0.0, abs=0.03)  # five cells rounded to 0.01 kJ
    assert list(table["latent absorbed [kJ]"])[2:] == ["", "", ""]  # blank where it does not apply


def test_editing_an_amount_changes_the_answer_to_the_engines():
    at = page()
    key = at.session_state[KEY].editor_key("streams")
    edit(at, "streams", {"edited_rows": {0: {"flow": "15 t/h"}}})
    no_traceback(at)
    ws = held(at)
    assert ws.streams[0].flow == Quantity(value=15, unit="t/h")
    assert answer_text(at) == engine(ws)
    # steam scales with the glycol duty: 15/12 of the glycol part plus the same 2 kW of losses
    before = solve(sample("steam_heater_glycol.json")).answer.value_si
    assert 1.24 * before < solve(ws).answer.value_si < 1.25 * before
    assert rows(at, "streams")[0]["flow"] == "15 t/h"
    assert at.session_state[KEY].editor_key("streams") == key  # an edit does not re-key the editor


def test_switching_the_unknown_from_a_temperature_to_a_flow_solves_the_other_way():
    at = page()
    at.selectbox(key="unknown_picker").select("Glycol: outlet temperature").run()
    no_traceback(at)
    assert held(at).unknowns == [Unknown(kind="temperature", line="Glycol", end="outlet")]
    assert answer_text(at) == engine(held(at)) == "40 °C"  # the sample's outlet, solved back
    edit(at, "streams", {"edited_rows": {1: {"flow": "900 kg/h"}}})  # more steam: a hotter outlet
    hotter = solve(held(at)).answer
    assert answer_text(at) == written(hotter, "SI") and hotter.value_si > 273.15 + 45
    at.selectbox(key="unknown_picker").select("Steam: flow").run()
    ws = held(at)
    assert ws.unknowns == [Unknown(kind="amount", line="Steam")]
    assert ws.streams[0].outlet.temperature.unit == "degC"
    assert ws.streams[0].outlet.temperature.value == pytest.approx(hotter.value_si - 273.15, rel=1e-5)
    assert solve(ws).answer.value_si * 3600 == pytest.approx(900, rel=1e-4)  # back to the flow that was typed
    assert answer_text(at) == engine(ws)


def _switch_and_back(system_label):
    """On the glycol heater, in a view: solve for the outlet temperature, then for the steam flow again."""
    at = page()
    at.radio(key="unit_system").set_value(system_label).run()
    at.selectbox(key="unknown_picker").select("Glycol: outlet temperature").run()
    stored_flow = held(at).streams[1].flow
    at.selectbox(key="unknown_picker").select("Steam: flow").run()
    no_traceback(at)
    return at, stored_flow


def test_switching_the_unknown_stores_the_same_value_whatever_the_view():
    """Issue 9: the US view stored 1643.83 lb/h and rewrote the outlet in °F; the SI view 745.627 kg/h."""
    si, si_flow = _switch_and_back("SI (°C, kg, kW)")
    us, us_flow = _switch_and_back(US)
    assert si_flow == us_flow == Quantity(value=745.627, unit="kg/h")  # in the unit of the field, 6 figures
    assert held(us) == held(si)
    assert held(us).streams[0].outlet.temperature == Quantity(value=40.0, unit="degC")  # stays as typed
    assert rows(us, "streams")[0]["outlet"] == "40 °C"
    # issue 17: the answer is a result, in the view's unit: 745.627 kg/h / 0.45359237 kg/lb (exact, NIST SP 811)
    assert answer_text(si) == "745.6 kg/h" and answer_text(us) == "1,644 lb/h"


def test_the_unknowns_cell_shows_the_views_unit_and_the_typed_unit_is_kept():
    """Issue 17: in the US view the unknown's cell read '? kg/h' and the answer stayed in kg/h."""
    at = page()
    at.radio(key="unit_system").set_value(US).run()
    no_traceback(at)
    assert grid(at, "streams")["flow"].tolist() == ["12 t/h", "? lb/h"]  # a typed value stays as typed
    assert rows(at, "streams")[1]["flow"] == "? kg/h" and held(at) == sample("steam_heater_glycol.json")
    assert answer_text(at) == "1,644 lb/h"  # 745.627 kg/h / 0.45359237 kg/lb (exact, NIST SP 811)
    edit(at, "streams", {"edited_rows": {0: {"flow": "6 t/h"}}})  # an edit elsewhere keeps the '?' cell's unit
    assert held(at).streams[1].flow.unit == "kg/h" and grid(at, "streams")["flow"].tolist() == ["6 t/h", "? lb/h"]
    at.selectbox(key="unknown_picker").select("Glycol: outlet temperature").run()
    assert grid(at, "streams")["outlet"][0] == "? °F"
    at.radio(key="unit_system").set_value("SI (°C, kg, kW)").run()
    assert grid(at, "streams")["outlet"][0] == "? °C"


def test_a_typed_celsius_value_stays_celsius_when_the_view_changes():
    at = page()
    edit(at, "streams", {"edited_rows": {0: {"outlet": "45 °C"}}})
    at.radio(key="unit_system").set_value(US).run()
    no_traceback(at)
    assert held(at).streams[0].outlet.temperature == Quantity(value=45.0, unit="degC")
    assert rows(at, "streams")[0]["outlet"] == "45 °C"
    assert grid(at, "streams")["outlet"][0] == "45 °C"
    assert "heat into process [Btu/h]" in contributions(at).columns  # the results follow the view


def test_the_us_sample_is_answered_in_the_unit_typed_for_its_duty():
    at = page("us_water_heater_duty.json")
    no_traceback(at)
    assert at.radio(key="unit_system").value == "SI (°C, kg, kW)"
    ws = sample("us_water_heater_duty.json")
    assert ws.duties[0].value.unit == "MMBtu/h"
    assert answer_text(at).endswith(" MMBtu/h") and answer_text(at) == engine(ws) == "3.202 MMBtu/h"
    # 3.20183 MMBtu/h × 293.07107 W per kBtu/h (1 Btu = 1055.05585 J, IT) = 938.4 kW
    assert "= 938.4 kW" in [unescaped(c.value) for c in at.caption]


def test_the_display_unit_system_converts_the_results_not_the_inputs():
    at = page()
    at.radio(key="unit_system").set_value(US).run()
    no_traceback(at)
    assert answer_text(at) == "1,644 lb/h"  # the answer is a result: 745.627 kg/h / 0.45359237 kg/lb (NIST SP 811)
    assert "heat into process [Btu/h]" in contributions(at).columns
    typed = sample("steam_heater_glycol.json")
    assert held(at).streams[0] == typed.streams[0] and held(at).duties == typed.duties  # the inputs as typed


def test_a_wrong_unit_is_marked_and_the_inputs_are_kept():
    at = page()
    edit(at, "streams", {"edited_rows": {0: {"flow": "12 kW"}}})
    no_traceback(at)
    assert "Streams, row 1, flow: unit 'kW' is not a mass flow (it measures power)" in errors(at)
    assert shown_answer(at) is None  # no answer that would not match the page
    typed = rows(at, "streams")
    assert typed[0]["flow"] == "12 kW" and typed[1]["flow"] == "? kg/h" and typed[0]["outlet"] == "40 °C"
    assert list(grid(at, "streams")["check"]) == ["⚠ flow", ""]
    # the model is untouched, and fixing the cell solves again
    assert held(at).streams[0].flow.unit == "t/h"
    edit(at, "streams", {"edited_rows": {0: {"flow": "12 t/h"}}})
    assert answer_text(at) == "745.6 kg/h" and errors(at) == ""
    assert "check" not in [c for c in grid(at, "streams").columns if grid(at, "streams")[c].any()]


def test_a_bad_cell_is_kept_when_the_title_or_basis_changes():
    at = page()
    edit(at, "streams", {"edited_rows": {0: {"flow": "12 kW"}}})
    at.text_input(key="title_input").input("Glycol heater, revised").run()
    no_traceback(at)
    assert held(at).title == "Glycol heater, revised"
    assert rows(at, "streams")[0]["flow"] == "12 kW"  # not reverted to the last good value
    assert "unit 'kW' is not a mass flow" in errors(at)
    # "Solve for" stays usable (issue 17): moving the unknown changes its two cells, the bad cell stays as typed
    picker = at.selectbox(key="unknown_picker")
    assert not picker.disabled
    picker.select("Glycol: outlet temperature").run()
    typed = rows(at, "streams")
    assert typed[0]["flow"] == "12 kW" and typed[0]["outlet"] == "? °C"
    assert typed[1]["flow"] == "745.627 kg/h"  # the last answer, 6 figures (solved before the bad edit)
    assert "unit 'kW' is not a mass flow" in errors(at)


def test_a_negative_mass_is_refused_by_the_engine_and_its_cell_is_marked():
    at = page("hot_condensate_quench.json")
    edit(at, "charges", {"edited_rows": {0: {"mass": "-3 t"}}})
    no_traceback(at)
    message = "a mass or flow cannot be negative (-3 t)"  # the engine's refusal
    assert f"Quench pit / Hot condensate mass: {message}" in errors(at)  # the refusal's address, in words
    assert f"Vessel charges, row 1, mass: {message}" in errors(at)  # placed on its cell
    assert list(grid(at, "charges")["check"]) == ["⚠ mass", ""]
    typed = rows(at, "charges")
    assert [r["mass"] for r in typed] == ["-3 t", "? t"]
    assert [r["initial"] for r in typed] == ["95 °C", "12 °C"]


def test_two_unknowns_show_their_message_and_keep_the_inputs():
    ws = sample("steam_heater_glycol.json")
    two = ws.model_copy(update={"unknowns": [Unknown(kind="amount", line="Steam"),
                                             Unknown(kind="temperature", line="Glycol", end="outlet")]})
    at = AppTest.from_file(APP, default_timeout=60)
    at.session_state[KEY] = PageState.opened(two)
    at.run()
    no_traceback(at)
    assert "2 unknowns" in errors(at) and "give a value to all but one" in errors(at)
    assert at.selectbox(key="unknown_picker").value is None
    typed = rows(at, "streams")
    assert [r["flow"] for r in typed] == ["12 t/h", "? kg/h"] and typed[0]["outlet"] == "? °C"
    at.selectbox(key="unknown_picker").select("Steam: flow").run()  # picking one frees the other
    assert answer_text(at) == "745.6 kg/h"


def test_a_bad_batch_duration_is_marked_and_kept():
    at = page("batch_reactor_exotherm.json")
    at.text_input(key="basis_duration").input("40 kW").run()
    no_traceback(at)
    assert "Batch duration: unit 'kW' is not a duration (it measures power)" in errors(at)
    assert at.text_input(key="basis_duration").value == "40 kW"
    at.text_input(key="basis_duration").input("60 min").run()
    ws = held(at)
    assert ws.basis.duration == Quantity(value=60, unit="min") and answer_text(at) == engine(ws)


def test_a_refused_batch_duration_leaves_no_answer_and_no_save_of_another_sheet(db):
    """A shift engineer's finding: with 'abc' refused in the batch duration, the answer of the last duration that
    read stayed on screen as if current, and Save stored that other sheet. Now: not solved, and not saved."""
    at = page("batch_reactor_exotherm.json")
    at.text_input(key="basis_duration").input("60 min").run()
    assert shown_answer(at) is not None  # 51.35 °C (hand: 54.98 °C at 40 min less 20 min more of 110 kW cooling)
    saved_before = held(at)
    at.text_input(key="basis_duration").input("abc").run()
    no_traceback(at)
    assert shown_answer(at) is None
    assert "Not solved" in unescaped(" ".join([e.value for e in at.markdown] + [e.value for e in at.error]))
    at.button(key="share_save").click().run()
    assert "Not saved: a value on the page is refused (Batch duration: 'abc' is not a number" in errors(at)
    assert held(at) == saved_before  # the worksheet keeps the last duration that read, unsaved


def test_a_sample_with_its_own_material_shows_the_materials_table():
    at = page()
    assert at.toggle(key="show_own_tables").value is False  # the glycol heater uses library materials only
    load = at.session_state[KEY].load
    at.selectbox(key="sample_picker").select(sample("batch_reactor_exotherm.json").title).run()
    assert at.toggle(key="show_own_tables").value is True
    assert at.session_state[KEY].load == load + 1  # another worksheet: every editor starts afresh
    assert any((d.key or "") == f"editor_materials_{load + 1}" for d in at.dataframe)  # the table is drawn
    assert [(r["material"], r["cp"]) for r in rows(at, "materials")] == [("reagent solution", "3.2 kJ/(kg·K)")]


def test_batch_results_carry_the_one_safety_caution_once():
    at = page("batch_reactor_exotherm.json")
    shown = [w.value for w in at.warning] + [unescaped(c.value) for c in at.caption] + [m.value for m in at.markdown]
    assert sum(CAUTION in text for text in shown) == 1
    assert not any("follow local codes" in text for text in shown)  # the old second wording is gone


def test_a_continuous_sheet_without_reaction_has_no_caution():
    at = page()
    assert not any(CAUTION in w.value for w in at.warning)


def test_a_new_worksheet_starts_empty_without_an_error():
    at = page()
    at.button(key="new_worksheet").click().run()
    no_traceback(at)
    assert held(at).streams == [] and errors(at) == ""
    assert "Nothing to solve yet" in "\n".join(i.value for i in at.info)


def test_a_worksheet_built_from_scratch_solves_for_the_picked_unknown():
    at = page()
    at.button(key="new_worksheet").click().run()
    state = at.session_state[KEY]
    state.apply_table_edit("streams", {"added_rows": [{"name": "Water", "material": "water", "flow": "",
                                                        "pressure": "0 barg", "inlet": "20 °C", "outlet": "80 °C"}]})
    state.apply_table_edit("duties", {"added_rows": [{"name": "Heater", "heat": "50 kW"}]})
    at.run()
    no_traceback(at)
    assert "no unknown: mark one quantity" in errors(at)
    at.selectbox(key="unknown_picker").select("Water: flow").run()
    assert errors(at) == ""
    # IAPWS-IF97 (iapws package): h(80 °C) − h(20 °C) at 1.01325 bar = 250.98 kJ/kg; 50 kW / Δh in kg/h
    dh = IAPWS97(T=353.15, P=0.101325).h - IAPWS97(T=293.15, P=0.101325).h
    answer = solve(held(at)).answer
    assert answer.value_si * 3600 == pytest.approx(50 / dh * 3600, rel=1e-6)  # ≈ 717.2 kg/h
    assert answer_text(at) == written(answer, "SI") and answer_text(at).endswith(" kg/h")


def test_user_text_is_shown_as_plain_text():
    at = page()
    at.text_input(key="title_input").input("**Bold** _heater_ [link](x)").run()
    no_traceback(at)
    assert at.title[0].value == "\\*\\*Bold\\*\\* \\_heater\\_ \\[link\\]\\(x\\)"


def test_plain_escapes_every_markdown_and_html_form_and_breaks_autolinks():
    for typed in ("[x](http://e.invalid)", "![i](u.png)", "<img src=u>", "&amp;", "`c`", ":red[r]", "$x$",
                  "# h", "1. item", "- item", "a | b", "~~s~~", "www.e.invalid", "a@e.invalid", "HTTPS://e"):
        written_ = plain(typed)
        assert unescaped(written_) == typed
        bare = re.sub(r"\\.", "", written_)  # what is left once every escaped character is taken out
        assert not any(c in string.punctuation for c in bare), written_
    assert "http\\:" + WORD_JOINER + "\\/\\/" in plain("http://e") and WORD_JOINER + "\\@" in plain("a@e")
    assert "www" + WORD_JOINER in plain("WWW.e".lower())


_ANSWER_FIRST = """
import json, sys
from streamlit.testing.v1 import AppTest
import webapp.answer as answer

loaded = {}
draw = answer._render_answer_value

def recording(*args):
    loaded.update({name: name in sys.modules for name in ("pandas", "sqlalchemy", "scipy")})
    draw(*args)

answer._render_answer_value = recording
at = AppTest.from_file(sys.argv[1], default_timeout=120)
at.run()
import gc
print(json.dumps({"loaded": loaded, "exceptions": [e.value for e in at.exception],
                  "frozen": gc.get_freeze_count(), "tracked": len(gc.get_objects())}))
"""


@functools.cache
def _fresh_page_report() -> dict:
    """One run of the page in a fresh Python process: what was loaded when the answer was drawn, the garbage
    collector's counts after the run."""
    run = subprocess.run([sys.executable, "-c", _ANSWER_FIRST, APP], capture_output=True, text=True, cwd=ROOT,
                         timeout=300)
    assert run.returncode == 0, run.stderr[-2000:]
    return json.loads(run.stdout.strip().splitlines()[-1])


def test_the_answer_is_drawn_before_the_rest_of_the_pages_libraries_are_loaded():
    """Issue 16: a fresh server sends the answer before it imports pandas (the grids), SQLAlchemy (the store)
    and scipy; measured, this took the first answer from 5.1 s to 2.2 s after server start."""
    report = _fresh_page_report()
    assert report["exceptions"] == []
    assert report["loaded"] == {"pandas": False, "sqlalchemy": False, "scipy": False}


def test_the_loaded_libraries_are_left_out_of_the_collections_after_each_run():
    """Issue 16: streamlit's full garbage collection after every run walked ~196,000 library objects (65-100 ms,
    holding the interpreter); after the first run they are frozen, and a pass walks only what the runs make."""
    report = _fresh_page_report()
    assert report["frozen"] > 100_000  # the libraries' objects (pandas, CoolProp, plotly…)
    assert report["tracked"] < 20_000  # what the collector still walks


def _markdown_values(at) -> list[str]:
    """Every text the page gives a Markdown-rendering element, with where it went."""
    out = []
    for kind in ("title", "header", "subheader", "markdown", "caption", "error", "warning", "info", "success"):
        out += [(kind, e.value) for e in getattr(at, kind)]
    out += [("metric label", m.label) for m in at.metric]  # none today: the answer is Markdown
    return out


def test_user_text_from_a_sheet_link_reaches_every_markdown_element_escaped():
    """Title, notes, names, a material and its source holding links, images, HTML and autolinks: every
    element that renders Markdown gets them escaped, and the text reads as typed (solved and refused)."""
    from heatbalance.links import encode_sheet
    from test_plain_text_browser import MATERIAL, NOTES, SOURCE, TITLE, VESSEL, hostile_worksheet, \
        refused_worksheet

    solved = (TITLE, NOTES, f"Vessel {VESSEL}", f"**{MATERIAL}**: user-defined: {SOURCE}")
    refused = (TITLE, NOTES, f"{VESSEL} / Reagent", f"is outside the property data of {MATERIAL}")
    for worksheet, expected in ((hostile_worksheet(), solved), (refused_worksheet(), refused)):
        at = AppTest.from_file(APP, default_timeout=60)
        at.query_params["sheet"] = encode_sheet(worksheet)
        at.run()
        no_traceback(at)
        values = _markdown_values(at)
        for kind, value in values:
            assert re.search(r"http://|www\.|\w@example|(?<!\\)<(a|img|b|script)\b|(?<!\\)\]\(|(?<!\\)!\[",
                             value) is None, (kind, value)
        shown = "\n".join(unescaped(v) for _, v in values)
        for typed in expected:
            assert typed in shown, typed


def test_an_engine_failure_is_a_plain_message_not_a_traceback(monkeypatch):
    import heatbalance.analyses as analyses

    def broken(*args, **kwargs):
        raise ZeroDivisionError("float division by zero")

    monkeypatch.setattr(analyses, "build_problem", broken)
    at = page()
    no_traceback(at)
    assert "the engine failed unexpectedly (ZeroDivisionError)" in errors(at)
    assert "Traceback" not in errors(at)


# -- exposure: the page listens on loopback unless told otherwise -----------------------------------------------
def _listening(port: int) -> set[str]:
    """Local addresses with a listening TCP socket on ``port`` (Linux /proc/net/tcp and tcp6, hex)."""
    found = set()
    for table in ("/proc/net/tcp", "/proc/net/tcp6"):
        try:
            lines = Path(table).read_text().splitlines()[1:]
        except OSError:
            continue
        for line in lines:
            local, state = line.split()[1], line.split()[3]
            address, hex_port = local.rsplit(":", 1)
            if state == "0A" and int(hex_port, 16) == port:  # 0A: LISTEN
                found.add(address)
    return found


def test_the_project_config_listens_on_loopback_and_keeps_the_tests_settings():
    import tomllib

    config = tomllib.loads((ROOT / ".streamlit" / "config.toml").read_text())
    assert config["server"]["address"] == "127.0.0.1"
    assert config["server"]["headless"] is True  # no browser opened by `streamlit run` on a server
    assert config["browser"]["gatherUsageStats"] is False


@pytest.mark.skipif(not Path("/proc/net/tcp").exists(), reason="reads Linux's /proc/net/tcp")
def test_streamlit_run_app_py_as_the_readme_says_listens_on_127_0_0_1_only(tmp_path):
    """`streamlit run app.py` with no address given (the README's command): one listening socket, loopback."""
    import subprocess
    import sys
    import time

    from conftest import _answers, _free_port, _stop

    port = _free_port()
    with open(tmp_path / "server.log", "wb") as log:
        process = subprocess.Popen([sys.executable, "-m", "streamlit", "run", "app.py", "--server.port", str(port),
                                    "--server.fileWatcherType", "none"], cwd=ROOT, stdout=log,
                                   stderr=subprocess.STDOUT)
        try:
            deadline = time.monotonic() + 90
            while not _answers(f"http://127.0.0.1:{port}"):
                assert process.poll() is None, (tmp_path / "server.log").read_text()
                assert time.monotonic() < deadline, "the app server did not answer"
                time.sleep(0.25)
            assert _listening(port) == {"0100007F"}  # 127.0.0.1, and not 0.0.0.0 nor :: (every interface)
        finally:
            _stop(process)
