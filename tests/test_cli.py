"""The command line: readable table, JSON, unit systems, one-line errors."""
import json
import os
import subprocess
import sys

import pytest
from iapws import IAPWS97

from heatbalance.cli import main

FLASH = "sample_data/condensate_flash.json"
HEATER = "sample_data/us_water_heater_duty.json"


def test_solve_prints_the_answer_and_every_contribution(capsys):
    assert main(["solve", FLASH]) == 0
    out = capsys.readouterr().out
    assert "ANSWER  Condensate return outlet temperature = 111.61 °C, 12.3% vapour" in out
    assert "+ = heat into the process" in out and "closure residual: 0.00 kW" in out
    assert "IAPWS-IF97" in out


@pytest.mark.parametrize("units", ["SI", "US"])
def test_a_heat_that_rounds_to_zero_is_written_without_a_sign(capsys, units):
    # the flash is adiabatic: the line's heat into the process is a rounding residue, -0.00 before the fix
    assert main(["solve", FLASH, "--units", units]) == 0
    out = capsys.readouterr().out
    row = next(line for line in out.splitlines() if line.startswith("Condensate return"))
    assert row.split()[-1] == "0.00" and "-0.00" not in out


def test_json_output_carries_the_full_result(capsys):
    assert main(["solve", FLASH, "--json"]) == 0
    data = json.loads(capsys.readouterr().out)
    # isenthalpic flash from 11.01325 bar(a), 175 °C to 1.51325 bar(a): IAPWS-IF97 via iapws
    h_in = IAPWS97(P=1.101325, T=448.15).h
    liquid, vapour = IAPWS97(P=0.151325, x=0), IAPWS97(P=0.151325, x=1)
    assert data["answer"]["phase_fraction"] == pytest.approx((h_in - liquid.h) / (vapour.h - liquid.h), rel=1e-6)
    assert data["heat_unit"] == "W" and data["lines"][0]["name"] == "Condensate return"
    assert set(data) >= {"warnings", "assumptions", "sources", "versions", "sign_convention", "residual"}


def test_us_units(capsys):
    assert main(["solve", HEATER, "--units", "US"]) == 0
    out = capsys.readouterr().out
    # hand calculation with IAPWS-IF97 via iapws: 20 000 lb/h × Δh(60 -> 220 °F at 64.7 psia)
    P = (50 + 14.6959488) * 0.00689475729  # MPa
    dh = IAPWS97(P=P, T=(220 - 32) / 1.8 + 273.15).h - IAPWS97(P=P, T=(60 - 32) / 1.8 + 273.15).h  # kJ/kg
    expected = 20000 * 0.45359237 * dh / 1.05505585262 / 1e6  # MMBtu/h
    assert f"duty Preheater = {expected:.4g} MMBtu/h" in out
    assert "[Btu/h]" in out


def test_materials_lists_the_catalogue(capsys):
    assert main(["materials"]) == 0
    out = capsys.readouterr().out
    assert "water" in out and "ethylene glycol (aq)" in out and "stainless steel 316" in out


def test_bad_input_is_one_line_and_exit_1(tmp_path, capsys):
    sheet = json.loads(open(FLASH, encoding="utf-8").read())
    sheet["streams"][0]["flow"] = {"value": 1.8, "unit": "kW"}
    path = tmp_path / "bad.json"
    path.write_text(json.dumps(sheet))
    assert main(["solve", str(path)]) == 1
    err = capsys.readouterr().err
    assert err == "error: streams[Condensate return].flow: unit 'kW' is not a mass flow (it measures power)\n"


def test_missing_file(capsys):
    assert main(["solve", "no/such/file.json"]) == 1
    assert capsys.readouterr().err == "error: no/such/file.json: cannot read it (No such file or directory)\n"


def test_module_entry_point_exit_status():
    done = subprocess.run([sys.executable, "-m", "heatbalance", "solve", "missing.json"], capture_output=True, text=True)
    assert done.returncode == 1 and done.stderr.count("\n") == 1


# --------------------------------------------------------------------------- refusals, one line each (issue 10)
def test_a_named_pipe_is_refused_without_waiting(tmp_path, capsys):
    pipe = tmp_path / "sheet.json"
    os.mkfifo(pipe)
    assert main(["solve", str(pipe)]) == 1  # opening the pipe would block: it is never opened
    assert capsys.readouterr().err == (f"error: {pipe}: not a regular file (a folder, a pipe or a device); "
                                       "give a worksheet .json file\n")


def test_a_file_over_the_limit_is_refused_before_it_is_read(tmp_path, capsys, monkeypatch):
    big = tmp_path / "big.json"
    with open(big, "wb") as handle:
        handle.truncate(2_000_000)  # sparse: 2 MB that would cost nothing to read, refused by its size
    read = []
    monkeypatch.setattr("builtins.open", lambda *a, **k: read.append(a) or (_ for _ in ()).throw(AssertionError))
    assert main(["solve", str(big)]) == 1
    assert read == []
    assert capsys.readouterr().err == f"error: {big}: the file is 2,000,000 bytes; the limit is 1,000,000\n"


def test_usage_errors_are_one_line_with_where_and_exit_2(capsys):
    assert main(["solve", FLASH, "--units", "metric"]) == 2
    assert capsys.readouterr().err == "error: --units: invalid choice: 'metric' (choose from 'SI', 'US')\n"
    assert main(["nonsense"]) == 2
    assert capsys.readouterr().err.startswith("error: command: invalid choice: 'nonsense'")
    assert main(["solve"]) == 2
    assert capsys.readouterr().err.count("\n") == 1


def test_every_error_line_names_where(tmp_path, capsys):
    bad_json = tmp_path / "bad.json"
    bad_json.write_text("{not json")
    for argv in (["solve", "no/such/file.json"], ["solve", str(tmp_path)], ["solve", str(bad_json)],
                 ["open", "not-a-link"], ["solve", FLASH, "--units", "x"]):
        main(argv)
        line = capsys.readouterr().err
        assert line.count("\n") == 1 and line.startswith("error: ")
        where, _, what = line.removeprefix("error: ").partition(": ")
        assert where and what, line


def test_a_closed_output_pipe_ends_quietly():
    done = subprocess.run(f"{sys.executable} -m heatbalance solve {FLASH} | head -1", shell=True,
                          capture_output=True, text=True)
    assert done.stdout.count("\n") == 1 and "Traceback" not in done.stderr and "Error" not in done.stderr


def test_save_refuses_a_parent_that_is_not_stored(tmp_path, capsys, monkeypatch):
    monkeypatch.setenv("HEATBALANCE_DB", str(tmp_path / "store.sqlite3"))
    monkeypatch.delenv("HEATBALANCE_DATABASE_URL", raising=False)
    assert main(["save", FLASH, "--parent", "0" * 24]) == 1
    assert capsys.readouterr().err.startswith(f"error: --parent: no saved worksheet has the id {'0' * 24}")
    assert main(["save", FLASH]) == 0
    first = capsys.readouterr().out.strip()
    assert main(["save", HEATER, "--parent", first]) == 0


def test_the_command_lines_size_limit_is_the_loaders():
    from heatbalance import cli, worksheet

    assert cli.MAX_DOCUMENT_BYTES == worksheet.MAX_DOCUMENT_BYTES


@pytest.mark.parametrize("command, absent", [
    (["materials"], {"CoolProp", "scipy.optimize", "plotly", "pandas", "sqlalchemy", "pint", "chemicals"}),
    (["solve", FLASH], {"plotly", "sqlalchemy", "pandas", "chemicals", "reportlab", "ht"}),  # pint loads uncertainties
])
def test_a_command_imports_only_what_it_needs(command, absent):
    """Start-up time (issue 16): what a command does not use is never imported."""
    probe = ("import sys, runpy; sys.argv = ['heatbalance', *%r]\n"
             "try:\n    runpy.run_module('heatbalance', run_name='__main__')\nexcept SystemExit:\n    pass\n"
             "print(sorted(m for m in %r if m in sys.modules))" % (command, sorted(absent)))
    done = subprocess.run([sys.executable, "-c", probe], capture_output=True, text=True)
    assert done.stdout.strip().splitlines()[-1] == "[]", done.stdout[-500:] + done.stderr[-500:]


def test_a_link_that_names_its_unit_set_opens_in_it_unless_units_is_given(capsys):
    from heatbalance.links import sheet_link
    from heatbalance.worksheet import load_worksheet

    link = sheet_link(load_worksheet(open(FLASH, "rb").read()), "http://plant.invalid/")
    # 111.606 °C = 232.91 °F (× 9/5 + 32, hand calculation)
    assert main(["open", link + "&units=US", "--solve"]) == 0
    assert "= 232.91 °F, 12.3% vapour" in capsys.readouterr().out
    assert main(["open", link + "&units=US", "--solve", "--units", "SI"]) == 0  # said on the command line: kept
    assert "= 111.61 °C, 12.3% vapour" in capsys.readouterr().out
    assert main(["open", link, "--solve"]) == 0  # a link without units= opens in SI, as links always did
    assert "= 111.61 °C, 12.3% vapour" in capsys.readouterr().out
    assert main(["open", link + "&units=metric", "--solve"]) == 1
    assert "error: units: the link's unit set 'metric' is neither SI nor US" in capsys.readouterr().err
