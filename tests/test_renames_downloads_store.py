"""Nothing the user saved is lost or misfiled: renames that follow the right vessel's charge, a downloaded file
that opens again, a title the team server's store can hold (a review's findings, each test failing before its
fix)."""
from __future__ import annotations

import json

import pytest

from heatbalance import address
from heatbalance.worksheet import load_worksheet, parse_worksheet


def _charge(name: str, mass: str) -> dict:
    return {"name": name, "material": "water", "mass": mass, "initial": {"temperature": "20 degC"}}


def _two_vessels(unknown: dict) -> dict:
    """Two vessels, each with a charge called 'Water' (charge names are unique per vessel only)."""
    return {"basis": {"kind": "batch"},
            "vessels": [{"name": "R-1", "pressure": "0 barg", "charges": [_charge("Water", "1 t")],
                         "final": {"temperature": "50 degC"}},
                        {"name": "R-2", "pressure": "0 barg", "charges": [_charge("Water", "2 t")],
                         "final": {"temperature": "50 degC"}}],
            "duties": [{"name": "H", "value": "100 MJ"}],
            "tolerances": [{"address": "vessels[R-1].charges[Water].mass", "percent": 1.0},
                           {"address": "vessels[R-2].charges[Water].mass", "percent": 2.0}],
            "unknowns": [unknown]}


# ------------------------------------------------------------------------------------------------- renames
def test_renaming_a_charge_leaves_the_unknown_on_another_vessels_charge_of_that_name():
    """heatbalance/address.py:541 (_rename_references): the unknown's charge is renamed when its name matches,
    whatever its vessel: renaming R-1's 'Water' moves the unknown 'R-2 / Water mass' to R-2's 'Acid', which does
    not exist, and the sheet no longer solves."""
    ws = parse_worksheet(_two_vessels({"kind": "amount", "line": "R-2", "charge": "Water"}))
    renamed = address.rename(ws, "vessels[R-1].charges[Water]", "Acid")
    assert address.unknown_address(renamed.unknowns[0]) == "vessels[R-2].charges[Water].mass"


def test_renaming_a_charge_in_the_grid_moves_the_references_of_that_vessels_charge_only():
    """webapp/grids.py:844 (_item_address): a renamed charge row is looked up by its name alone, so renaming
    R-2's 'Water' to 'Acid' renames R-1's 'Water' in the engine: R-1's tolerance is moved to 'R-1 / Acid' (which
    does not exist) and R-2's stays on 'R-2 / Water' (which no longer exists). Both tolerances the user typed
    now name nothing."""
    from webapp.state import PageState

    ws = parse_worksheet(_two_vessels({"kind": "temperature", "line": "R-1", "end": "final"}))
    state = PageState.opened(ws)
    assert [(r["vessel"], r["name"]) for r in state.rows["charges"]] == [("R-1", "Water"), ("R-2", "Water")]
    state.apply_table_edit("charges", {"edited_rows": {1: {"name": "Acid"}}})
    assert state.problems == []
    assert [(v.name, [c.name for c in v.charges]) for v in state.worksheet.vessels] == \
        [("R-1", ["Water"]), ("R-2", ["Acid"])]
    assert [(t.address, t.percent) for t in state.worksheet.tolerances] == \
        [("vessels[R-1].charges[Water].mass", 1.0), ("vessels[R-2].charges[Acid].mass", 2.0)]


# ----------------------------------------------------------------------------------------- downloaded files
def _large_worksheet():
    """500 streams with tolerances and 50 cases: inside every documented limit, its canonical JSON (what the
    store saves) about 690 kB."""
    streams, tolerances = [], []
    for i in range(500):
        name = f"Stream {i:03d} " + "x" * 60
        streams.append({"name": name, "material": "water", "flow": "12.5 t/h", "pressure": "3 barg",
                        "inlet": {"temperature": "20 degC"}, "outlet": {"temperature": "60.5 degC"}})
        tolerances.append({"address": f"streams[{name}].flow", "percent": 1.5,
                           "source": "flow meter datasheet FT-101 rev B, calibration 2024"})
    names = [s["name"] for s in streams]
    cases = [{"name": f"case {k}", "notes": "c" * 500,
              "overrides": [{"address": f"streams[{names[(k * 37 + j) % 500]}].flow", "value": f"{10 + j} t/h"}
                            for j in range(60)]} for k in range(50)]
    return parse_worksheet({"streams": streams, "tolerances": tolerances, "cases": cases,
                            "duties": [{"name": "H"}], "unknowns": [{"kind": "duty", "term": "H"}],
                            "notes": "n" * 20_000})


def test_a_worksheet_the_store_saves_downloads_as_a_file_that_opens_again(tmp_path):
    """heatbalance/present/exports.py (worksheet_json_bytes) writes indented JSON (about 1.6 times the compact
    text) while the loader refuses a document over 1,000,000 bytes (heatbalance/worksheet.py, load_worksheet):
    a worksheet the store accepts (and the page holds) downloads as a 1.07 MB file that no upload, CLI command
    or loader opens again: "the document is 1,072,330 bytes; the limit is 1,000,000"."""
    from heatbalance.present.exports import worksheet_json_bytes
    from heatbalance.store import WorksheetStore

    ws = _large_worksheet()
    with WorksheetStore(f"sqlite:///{tmp_path / 'big.sqlite3'}") as store:
        store.save(ws)  # accepted: within the store's limit
    assert load_worksheet(worksheet_json_bytes(ws)) == ws


# ------------------------------------------------------------------------------------ the team server's store
def test_a_title_with_a_nul_character_saves_on_postgresql_or_is_refused_at_the_title(request):
    """heatbalance/store.py (save) / heatbalance/worksheet.py: the loader accepts a NUL character in a title
    (a file, a ?sheet= link); SQLite saves it, PostgreSQL cannot store it in the title column and the save
    fails with "the worksheet database at postgresql://... failed: PostgreSQL text fields cannot contain NUL
    (0x00) bytes", at 'save', not naming the field. The same worksheet must save on both stores, or be refused
    at 'title' when it is read."""
    from heatbalance.errors import HeatBalanceError
    from heatbalance.store import WorksheetStore

    try:
        ws = load_worksheet(json.dumps({"title": "Heater\u0000rev 2"}))
    except HeatBalanceError as exc:
        assert exc.where == "title"
        return
    url = request.getfixturevalue("postgres_url")
    store = WorksheetStore(url)
    try:
        saved = store.save(ws)
        assert store.open(saved.id).worksheet == ws
    except HeatBalanceError as exc:
        assert exc.where == "title", f"{exc.where}: {exc}"
    finally:
        store.close()


from pg_server import postgres_url  # noqa: E402,F401  (a fixture; skips without a PostgreSQL install)
