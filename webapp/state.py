"""The page's editing state: one object, under one session key (:data:`KEY`).

It holds the worksheet (the last one that reads: what is solved), the grids as the user typed them
(bad cells included), their problems, the last result and the per-load token of the editors' keys.
The callbacks call its methods; tests may call them too, through ``st.session_state[KEY]``, or put
a :meth:`PageState.opened` state there before the first run.

Editors keep their key while the worksheet stays loaded: each editor is given the rows it was last
*based* on, and reports every edit since as one cumulative set (``apply_table_edit``). A grid is
re-based (and so redrawn, losing the cursor) only when what it should show differs from what the
browser shows: a problem mark appears or goes, the unknown's ``?`` moves, a vessel rename reaches
the charges. Loading another worksheet bumps the token, so every editor starts afresh.
"""
from __future__ import annotations

from dataclasses import dataclass, field

from heatbalance import address
from heatbalance.analyses import solve_and_analyse
from heatbalance.errors import HeatBalanceError
from heatbalance.results import Result
from heatbalance.worksheet import Worksheet

from . import grids

__all__ = ["KEY", "PageState", "WIDGET_KEYS"]

KEY = "hb_page"  # the one session key of the page's editing state

#: model-bound widgets, set from the worksheet when one is loaded
WIDGET_KEYS = ("title_input", "basis_kind", "basis_duration", "sample_picker", "show_own_tables")


@dataclass
class PageState:
    """What the page is editing; see the module docstring."""

    worksheet: Worksheet
    rows: dict[str, list[dict]]
    problems: list[grids.CellProblem] = field(default_factory=list)
    basis_problem: str = ""  # message for a bad duration (the typed text stays in its widget)
    result: Result | None = None  # the last solve's result: the old unknown takes its answer
    error: HeatBalanceError | None = None  # the last solve's refusal
    load: int = 0  # bumped when another worksheet is loaded: the editors' keys carry it
    base: dict[str, list[dict]] = field(default_factory=dict)  # the rows each editor was given
    base_marks: dict[str, list[str]] = field(default_factory=dict)  # the check marks it was given
    widgets_stale: bool = True  # the model-bound widgets must be set from the worksheet

    # ------------------------------------------------------------------ loading
    @classmethod
    def opened(cls, worksheet: Worksheet) -> "PageState":
        """A state with ``worksheet`` loaded."""
        state = cls(worksheet=worksheet, rows={})
        state.replace(worksheet)
        return state

    def replace(self, worksheet: Worksheet) -> None:
        """Put another worksheet on the page (a sample, a new sheet, an upload, a link)."""
        self.worksheet = worksheet
        self.rows = grids.worksheet_to_tables(worksheet)
        self.problems, self.basis_problem = [], ""
        self.result = self.error = None
        self.load += 1
        self.base = {t: [dict(r) for r in rows] for t, rows in self.rows.items()}
        self.base_marks = {}
        self.widgets_stale = True

    def widget_values(self) -> dict:
        """The model-bound widgets' values for the loaded worksheet."""
        ws = self.worksheet
        return {"title_input": ws.title, "basis_kind": ws.basis.kind,
                "basis_duration": grids.format_quantity(ws.basis.duration), "sample_picker": None,
                "show_own_tables": bool(ws.materials or ws.common_temperatures)}

    def set_worksheet(self, worksheet: Worksheet) -> None:
        """A change made outside the grids (a panel's inputs, e.g. screening): the rows stay as typed."""
        self.worksheet = worksheet

    # ------------------------------------------------------------------ editing
    def editor_key(self, table: str) -> str:
        """The widget key of a grid's editor: stable while this worksheet stays loaded."""
        return f"editor_{table}_{self.load}"

    def apply_table_edit(self, table: str, edits: dict) -> None:
        """A grid's edits, as its editor reports them (every edit since its rows were given), onto the model."""
        before = self.rows[table]
        after = grids.apply_edits(self.base.get(table, before), edits or {}, grids.COLUMNS[table])
        rows = {**self.rows, table: after}
        base, rows = grids.follow_renames(self.worksheet, rows, table, grids.renamed(before, after))
        worksheet, self.problems = grids.tables_to_worksheet(rows, base)
        self.rows = rows
        if worksheet is not None:
            self.worksheet = worksheet

    def commit(self, base: Worksheet) -> None:
        """Read the grids, as the user left them, onto ``base`` (a new title or basis); bad cells stay."""
        worksheet, self.problems = grids.tables_to_worksheet(self.rows, base)
        self.worksheet = worksheet if worksheet is not None else base

    def set_title(self, text: str) -> None:
        title = (text or "").strip() or "Untitled worksheet"
        self.commit(self.worksheet.model_copy(update={"title": title[:200]}))

    def set_basis(self, kind: str, duration_text: str) -> None:
        """A new basis; a duration that does not read is kept as typed with its message."""
        text = (duration_text or "").strip()
        try:
            duration = grids.parse_quantity(text, ("duration",), "duration") if text else None
        except HeatBalanceError as exc:
            self.basis_problem = exc.message
            return
        self.basis_problem = ""
        basis = self.worksheet.basis.model_copy(update={"kind": kind, "duration": duration})
        self.commit(self.worksheet.model_copy(update={"basis": basis}))

    def pick_unknown(self, new_address: str) -> None:
        """Make ``new_address`` the unknown; the old unknown keeps the last answer, stored the same
        whatever the view (:func:`heatbalance.address.answer_value`, in the unit typed there)."""
        old_value = None
        if self.result is not None and len(self.worksheet.unknowns) == 1:
            old_value = address.answer_value(self.worksheet, self.result.answer)
        self.worksheet = address.with_unknown(self.worksheet, new_address, old_value)
        self.rows = grids.worksheet_to_tables(self.worksheet)
        self.problems = []

    # ------------------------------------------------------------------ solving
    def solve(self) -> tuple[Result | None, HeatBalanceError | None]:
        """Solve the worksheet unless a grid cell is bad (the answer would not match the page)."""
        self.result, self.error = self._solve()
        return self.result, self.error

    def _solve(self) -> tuple[Result | None, HeatBalanceError | None]:
        ws = self.worksheet
        if self.problems:
            first = self.problems[0]
            more = f" (and {len(self.problems) - 1} more)" if len(self.problems) > 1 else ""
            return None, HeatBalanceError(f"{first.text}{more}")
        if not ws.streams and not ws.vessels:
            return None, None  # a new sheet: nothing to solve yet, and nothing wrong
        try:
            return solve_and_analyse(ws), None
        except HeatBalanceError as exc:
            return None, exc
        except Exception as exc:  # noqa: BLE001 - an engine bug must not reach the page as a traceback
            return None, HeatBalanceError(f"the engine failed unexpectedly ({exc.__class__.__name__}); your "
                                          "inputs are kept. Please report this worksheet.")

    def cell_problems(self, message=lambda exc: exc.message) -> list[grids.CellProblem]:
        """The bad cells, or else the refusal placed on the cell its address names."""
        if self.problems:
            return list(self.problems)
        if self.error is None or not self.error.address:
            return []
        cell = grids.cell_of(self.error.address, self.worksheet)
        return [grids.CellProblem(cell.table, cell.row, cell.column, message(self.error))]

    # ------------------------------------------------------------------ drawing a grid
    def editor_rows(self, table: str, marks: list[str], edits: dict | None) -> tuple[list[dict], list[str]]:
        """The rows and marks to give a grid's editor: its base, re-based only when the browser
        (base + ``edits``, the editor's own state) would not show the rows and marks wanted."""
        columns = grids.COLUMNS[table]
        base = self.base.get(table)
        if base is not None:
            shown = grids.apply_edits(base, edits or {}, columns, derive=False)
            if grids.same_rows(shown, self.rows[table], columns) and \
                    _marked(self.base_marks.get(table, [])) == _marked(marks):
                return base, self.base_marks.get(table, [])
        self.base[table] = [dict(r) for r in self.rows[table]]
        self.base_marks[table] = list(marks)
        return self.base[table], self.base_marks[table]


def _marked(marks: list[str]) -> list[tuple[int, str]]:
    return [(i, m) for i, m in enumerate(marks) if m]
