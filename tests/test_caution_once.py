"""The one safety caution (``reactor.CAUTION``): once in the command line's report and once, at the top level, in
its JSON, wherever a result bears on safety by the calculation sheet's rule (vessels, reactions, computed surface
losses), and nowhere else. Scenarios of our own; the samples are ours too."""
import json
import re
from pathlib import Path

import pytest

from heatbalance.analyses import solve_and_analyse
from heatbalance.cli import main
from heatbalance.present.report import format_result, result_json
from heatbalance.present.screening import bears_on_safety
from heatbalance.reactor import CAUTION
from heatbalance.worksheet import load_worksheet
from sheet_factory import constant_cp_material, q, sheet, temp

SAMPLES = Path(__file__).resolve().parent.parent / "sample_data"


def _vessel(name):
    return {"name": name, "pressure": q(0, "barg"),
            "charges": [{"name": f"Mass {name}", "material": "liquid A", "mass": q(8, "t"), "initial": temp(60)}],
            "final": temp(60), "equipment": {"heat_capacity": q(1750, "kJ/K")}}


def two_vessels(reactions):
    """Two reactors of 8 t of liquid A held at 60 °C; the jacket's duty is solved."""
    return sheet(basis={"kind": "batch"}, materials=[constant_cp_material("liquid A", cp=4.0, t_max=300)],
                 vessels=[_vessel("R1"), _vessel("R2")], duties=[{"name": "Jacket"}], reactions=reactions,
                 unknowns=[{"kind": "duty", "term": "Jacket"}])


TWO_SCREENED = two_vessels([
    {"name": "Rx1", "enthalpy": q(-85, "kJ/mol"), "amount": q(4.5, "kmol"), "vessel": "R1"},
    {"name": "Rx2", "enthalpy": q(-60, "kJ/mol"), "amount": q(3, "kmol"), "vessel": "R2"}])
UNPLACED_REACTION = two_vessels([{"name": "Rx", "enthalpy": q(-85, "kJ/mol"), "amount": q(4.5, "kmol")}])


def _sample(name):
    return json.loads((SAMPLES / name).read_text(encoding="utf-8"))


# (document, shows the caution, screenings expected)
CASES = [
    pytest.param(_sample("batch_reactor_exotherm.json"), True, 1, id="one-vessel-screened"),
    pytest.param(TWO_SCREENED, True, 2, id="two-vessels-two-reactions-screened"),
    pytest.param(UNPLACED_REACTION, True, 0, id="two-vessels-reaction-naming-no-vessel"),
    pytest.param(_sample("ice_melting_tank.json"), True, 0, id="vessel-no-screening"),
    pytest.param(_sample("insulated_hot_water_line.json"), True, 0, id="hot-surface"),
    pytest.param(_sample("steam_heater_glycol.json"), False, 0, id="plain-steam-heater"),
]


def _worksheet(document):
    return load_worksheet(json.dumps(document))


def _sheet_rule(ws) -> bool:
    """The calculation sheet's rule (``present/sheet.py``), read from the worksheet."""
    return bool(ws.vessels or ws.reactions or any(loss.surface is not None for loss in ws.losses))


@pytest.mark.parametrize("document, shown, screened", CASES)
def test_the_rule_read_from_the_result_is_the_sheets(document, shown, screened):
    ws = _worksheet(document)
    result = solve_and_analyse(ws)
    assert len(result.screening) == screened
    assert bears_on_safety(result) is _sheet_rule(ws) is shown


@pytest.mark.parametrize("system", ["SI", "US"])
@pytest.mark.parametrize("document, shown, screened", CASES)
def test_report_and_json_carry_the_caution_once(document, shown, screened, system):
    result = solve_and_analyse(_worksheet(document))
    text = format_result(result, system)
    assert text.count(CAUTION) == int(shown)
    assert text.count("a process hazard analysis") == int(shown)  # no other wording of it either
    assert len(re.findall(r"^safety: ", text, flags=re.M)) == int(shown)
    data = result_json(result, system)
    assert data["caution"] == (CAUTION if shown else None)
    assert json.dumps(data, ensure_ascii=False).count(CAUTION) == int(shown)
    assert all("caution" not in record for record in data["screening"])  # not per vessel
    assert len(data["screening"]) == screened


@pytest.mark.parametrize("document, shown, screened", CASES)
def test_the_command_line_prints_it_once(document, shown, screened, tmp_path, capsys):
    path = tmp_path / "sheet.json"
    path.write_text(json.dumps(document), encoding="utf-8")
    assert main(["solve", str(path)]) == 0
    out = capsys.readouterr().out
    assert out.count(CAUTION) == int(shown)
    assert out.count("THERMAL SCREENING") == screened
    assert main(["solve", str(path), "--json"]) == 0
    out = capsys.readouterr().out
    assert out.count(CAUTION) == int(shown)
    assert json.loads(out)["caution"] == (CAUTION if shown else None)


def test_screening_and_surface_loss_together_still_once():
    document = _sample("glycol_hydration_screening.json")
    document["losses"] = [{"name": "Shell", "surface": {"shape": "vessel wall", "diameter": "2 m", "length": "3 m",
                                                        "emissivity": 0.9, "process_temperature": "70 degC"}}]
    result = solve_and_analyse(_worksheet(document))
    assert result.screening and result.surface_losses
    assert format_result(result).count(CAUTION) == 1
    assert json.dumps(result_json(result), ensure_ascii=False).count(CAUTION) == 1


def test_the_readme_quotes_the_one_wording():
    readme = (SAMPLES.parent / "README.md").read_text(encoding="utf-8")
    safety = readme.split("## Safety", 1)[1].split("\n## ", 1)[0]
    assert CAUTION in " ".join(safety.split())
