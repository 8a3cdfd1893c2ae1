"""The page's editing state: one object, under one session key (:data:`KEY`).

It holds the worksheet (the last one that reads: what is solved), the grids as the user typed them
(bad cells included), their problems, the last result and the per-load token of the editors' keys.
The callbacks call its methods; tests may call them too, through ``st.session_state[KEY]``, or put
a :meth:`PageState.opened` state there before the first run.

Every edit is remembered (:meth:`PageState.undo`, :meth:`PageState.redo`): the worksheet and the rows as typed,
at most :data:`HISTORY` steps back, within the session. Loading another worksheet is a step too: undoing it
brings back the one it replaced, with where that one came from (the sharing part's record, opaque here).

Editors keep their key while the worksheet stays loaded: each editor is given the rows it was last
*based* on, and reports every edit since as one cumulative set (``apply_table_edit``). A grid is
re-based (and so redrawn, losing the cursor) only when what it should show differs from what the
browser shows: a problem mark appears or goes, the unknown's ``?`` moves, a vessel rename reaches
the charges. Loading another worksheet bumps the token, so every editor starts afresh.
"""
from __future__ import annotations

import dataclasses
from dataclasses import dataclass, field

from heatbalance import address
from heatbalance.analyses import solve_and_analyse
from heatbalance.errors import HeatBalanceError
from heatbalance.results import Result
from heatbalance.worksheet import Duty, Worksheet

from . import grids

__all__ = ["KEY", "PageState", "WIDGET_KEYS", "HISTORY", "NEW_DUTY"]

KEY = "hb_page"  # the one session key of the page's editing state

#: model-bound widgets, set from the worksheet when one is loaded
WIDGET_KEYS = ("title_input", "notes_input", "basis_kind", "basis_duration", "sample_picker", "show_own_tables")
HISTORY = 100  # edits that can be undone
NEW_DUTY = "new duty"  # the address-like choice that adds a heater or cooler duty and solves for it


@dataclass(frozen=True)
class _Snapshot:
    """What an undo puts back: the worksheet and the rows as typed (bad cells included)."""

    worksheet: Worksheet
    rows: dict[str, list[dict]]
    problems: tuple
    provenance: dict | None = None  # either side of a load: where that worksheet came from; None: an edit


def _copy_rows(rows: dict[str, list[dict]]) -> dict[str, list[dict]]:
    return {t: [dict(r) for r in table] for t, table in rows.items()}


def first_and_more(texts: list[str]) -> str:
    """The first of ``texts`` and how many more: ``"a (and 2 more)"``; '' for none.

    >>> first_and_more(["a", "b", "c"]), first_and_more([])
    ('a (and 2 more)', '')
    """
    if not texts:
        return ""
    return texts[0] + (f" (and {len(texts) - 1} more)" if len(texts) > 1 else "")


@dataclass
class PageState:
    """What the page is editing; see the module docstring."""

    worksheet: Worksheet
    rows: dict[str, list[dict]]
    problems: list[grids.CellProblem] = field(default_factory=list)
    basis_problem: str = ""  # message for a bad duration (the typed text stays in its widget)
    result: Result | None = None  # the last solve's result: the old unknown takes its answer
    error: HeatBalanceError | None = None  # the last solve's refusal
    solved: tuple[Worksheet, Result] | None = None  # the last worksheet that solved, and its result
    load: int = 0  # bumped when another worksheet is loaded: the editors' keys carry it
    base: dict[str, list[dict]] = field(default_factory=dict)  # the rows each editor was given
    base_marks: dict[str, list[str]] = field(default_factory=dict)  # the check marks it was given
    base_views: dict[str, str] = field(default_factory=dict)  # the unit set it was shown in
    base_options: dict[str, tuple] = field(default_factory=dict)  # the dropdown options it was given
    widgets_stale: bool = True  # the model-bound widgets must be set from the worksheet
    redraws: dict[str, int] = field(default_factory=dict)  # per grid: forced fresh editors (see editor_rows)
    past: list[_Snapshot] = field(default_factory=list)  # undo steps, oldest first
    future: list[_Snapshot] = field(default_factory=list)  # redo steps, the next one last

    # ------------------------------------------------------------------ loading
    @classmethod
    def opened(cls, worksheet: Worksheet) -> "PageState":
        """A state with ``worksheet`` loaded (nothing to undo)."""
        state = cls(worksheet=worksheet, rows={})
        state._load(worksheet)
        return state

    def replace(self, worksheet: Worksheet) -> None:
        """Put another worksheet on the page (a sample, a new sheet, an upload, a link). The one it replaces
        stays one undo step back, with its rows as typed (where it came from: :meth:`note_replaced`)."""
        self.remember(provenance={})
        self._load(worksheet)

    def note_replaced(self, provenance: dict) -> None:
        """Where the worksheet the last :meth:`replace` put away came from: undoing that load hands it back."""
        if self.past and self.past[-1].provenance is not None:
            self.past[-1] = dataclasses.replace(self.past[-1], provenance=provenance)

    def _load(self, worksheet: Worksheet) -> None:
        self.worksheet = worksheet
        self.rows = grids.worksheet_to_tables(worksheet)
        self.problems, self.basis_problem = [], ""
        self.result = self.error = None
        self._fresh_editors()
        self.widgets_stale = True

    def _fresh_editors(self) -> None:
        """Every grid's editor starts afresh (a new key) on the rows now held."""
        self.load += 1
        self.base = _copy_rows(self.rows)
        self.base_marks, self.base_views, self.base_options = {}, {}, {}
        self.redraws = {}

    def widget_values(self) -> dict:
        """The model-bound widgets' values for the loaded worksheet."""
        ws = self.worksheet
        return {"title_input": ws.title, "notes_input": ws.notes, "basis_kind": ws.basis.kind,
                "basis_duration": grids.format_quantity(ws.basis.duration), "sample_picker": None,
                "show_own_tables": bool(ws.materials or ws.common_temperatures)}

    def set_worksheet(self, worksheet: Worksheet) -> None:
        """A change made outside the grids (a panel's inputs, e.g. screening): the rows stay as typed."""
        if worksheet != self.worksheet:
            self.remember()
        self.worksheet = worksheet

    # ------------------------------------------------------------------ undo, redo
    def _snapshot(self, provenance: dict | None = None) -> _Snapshot:
        return _Snapshot(self.worksheet, _copy_rows(self.rows), tuple(self.problems), provenance)

    def remember(self, provenance: dict | None = None) -> None:
        """Keep the state as it is now as one undo step (called before each edit); a new edit ends redo.
        ``provenance`` (a load only): where the worksheet being put away came from."""
        self.past = [*self.past, self._snapshot(provenance)][-HISTORY:]
        self.future = []

    def _restore(self, snapshot: _Snapshot) -> None:
        self.worksheet, self.rows = snapshot.worksheet, _copy_rows(snapshot.rows)
        self.problems, self.basis_problem = list(snapshot.problems), ""
        self.widgets_stale = True  # the title, notes and basis widgets show the restored worksheet
        if snapshot.provenance is not None:  # back or forward across a load: another worksheet
            self.result = self.error = None
            self._fresh_editors()

    def _leaving(self, step: _Snapshot, provenance: dict | None) -> _Snapshot:
        """The state now, to come back to; across a load it keeps ``provenance``, where this worksheet came from."""
        return self._snapshot(None if step.provenance is None else (provenance or {}))

    def undo(self, provenance: dict | None = None) -> dict | None:
        """Go back one step. Undoing a load returns where the worksheet it brings back came from
        (``provenance``, that of the one leaving, is kept for redo); an edit undone, or none: None."""
        if not self.past:
            return None
        step = self.past[-1]
        self.future = [*self.future, self._leaving(step, provenance)]
        self._restore(step)
        self.past = self.past[:-1]
        return step.provenance

    def redo(self, provenance: dict | None = None) -> dict | None:
        """Go forward again one undone step; like :meth:`undo`, a load redone returns where its worksheet came from."""
        if not self.future:
            return None
        step = self.future[-1]
        self.past = [*self.past, self._leaving(step, provenance)][-HISTORY:]
        self._restore(step)
        self.future = self.future[:-1]
        return step.provenance

    # ------------------------------------------------------------------ editing
    def editor_key(self, table: str) -> str:
        """The widget key of a grid's editor: stable while this worksheet stays loaded (and no undo had to
        redraw it)."""
        redraws = self.redraws.get(table, 0)
        return f"editor_{table}_{self.load}" + (f"_{redraws}" if redraws else "")

    def apply_table_edit(self, table: str, edits: dict) -> None:
        """A grid's edits, as its editor reports them (every edit since its rows were given), onto the model."""
        before = self.rows[table]
        self.remember()
        after = grids.apply_edits(self.base.get(table, before), edits or {}, grids.COLUMNS[table])
        rows = {**self.rows, table: after}
        base, rows = grids.follow_renames(self.worksheet, rows, table, grids.renamed(before, after))
        worksheet, self.problems = grids.tables_to_worksheet(rows, base)
        self.rows = rows
        # a bad cell keeps the last worksheet that read, renames carried: fields not in the grids follow the name
        self.worksheet = worksheet if worksheet is not None else base

    def commit(self, base: Worksheet) -> None:
        """Read the grids, as the user left them, onto ``base`` (a new title or basis); bad cells stay."""
        worksheet, self.problems = grids.tables_to_worksheet(self.rows, base)
        self.worksheet = worksheet if worksheet is not None else base

    def set_title(self, text: str) -> None:
        title = (text or "").strip() or "Untitled worksheet"
        self.remember()
        self.commit(self.worksheet.model_copy(update={"title": title[:200]}))

    def set_notes(self, text: str) -> None:
        """The worksheet's notes (a sample's description too), plain text as typed."""
        self.remember()
        self.commit(self.worksheet.model_copy(update={"notes": (text or "").strip()[:20_000]}))

    def set_basis(self, kind: str, duration_text: str) -> None:
        """A new basis; a duration that does not read is kept as typed with its message."""
        text = (duration_text or "").strip()
        try:
            duration = grids.parse_quantity(text, ("duration",), "duration") if text else None
        except HeatBalanceError as exc:
            self.basis_problem = exc.message
            return
        self.basis_problem = ""
        self.remember()
        basis = self.worksheet.basis.model_copy(update={"kind": kind, "duration": duration})
        self.commit(self.worksheet.model_copy(update={"basis": basis}))

    def pick_unknown(self, new_address: str) -> None:
        """Make ``new_address`` (or :data:`NEW_DUTY`: a new heater or cooler duty) the unknown.

        The old unknown keeps the last answer, stored the same whatever the view
        (:func:`heatbalance.address.answer_value`, in the unit typed there), or the value typed into its
        cell. Only the two cells change: every other cell stays as typed, bad ones included."""
        self.remember()
        old_value = None
        if self.solved is not None and _same_inputs(self.solved[0], self.worksheet) and \
                len(self.worksheet.unknowns) == 1:
            old_value = address.answer_value(self.worksheet, self.solved[1].answer)
        base = self.worksheet
        if new_address == NEW_DUTY:
            base, new_address = _with_new_duty(base)
            self.rows = {**self.rows, "duties": [*self.rows["duties"], {"name": base.duties[-1].name}]}
        old_cells = [grids.typed_cell(self.rows, address.unknown_address(u), base) for u in base.unknowns
                     if grids.exists(base, address.unknown_address(u))]
        typed = {c: self.rows[c[0]][c[1]].get(c[2]) for c in old_cells if c is not None}
        kept = {c: v for c, v in typed.items() if isinstance(v, str) and v.strip()
                and not v.strip().startswith(grids.UNKNOWN_MARK)}  # a value typed there stays
        worksheet = address.with_unknown(base, new_address, None if kept else old_value)
        fresh = grids.worksheet_to_tables(worksheet)
        rows = _copy_rows(self.rows)
        for where in [new_address, *(address.unknown_address(u) for u in base.unknowns)]:
            cell = grids.typed_cell(rows, where, worksheet) if grids.exists(worksheet, where) else None
            shown = grids.typed_cell(fresh, where, worksheet) if cell is not None else None
            if shown is not None and cell not in kept:
                rows[cell[0]][cell[1]][cell[2]] = fresh[shown[0]][shown[1]][shown[2]]
        read, self.problems = grids.tables_to_worksheet(rows, worksheet)
        self.rows, self.worksheet = rows, read if read is not None else worksheet

    @property
    def unknown_gone(self) -> str | None:
        """The address of the unknown when its line or term is no longer on the sheet (deleted), else None."""
        if len(self.worksheet.unknowns) != 1:
            return None
        where = address.unknown_address(self.worksheet.unknowns[0])
        return None if grids.exists(self.worksheet, where) else where

    # ------------------------------------------------------------------ solving
    def solve(self) -> tuple[Result | None, HeatBalanceError | None]:
        """Solve the worksheet unless a grid cell is bad (the answer would not match the page)."""
        self.result, self.error = self._solve()
        if self.result is not None:
            self.solved = (self.worksheet, self.result)
        return self.result, self.error

    def unread_items(self) -> list[str]:
        """What the page shows typed but the worksheet does not hold (a bad cell, a bad batch duration), in words."""
        return [p.text for p in self.problems] + ([f"Batch duration: {self.basis_problem}"] if self.basis_problem
                                                  else [])

    def unread(self) -> str:
        """:meth:`unread_items` in one line ('' when the worksheet is what the page shows)."""
        return first_and_more(self.unread_items())

    def _solve(self) -> tuple[Result | None, HeatBalanceError | None]:
        ws = self.worksheet
        unread = self.unread()
        if unread:  # the last worksheet that read is not what the page shows: no answer for it
            return None, HeatBalanceError(unread)
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
    def editor_rows(self, table: str, marks: list[str], edits: dict | None, system: str = "SI",
                    options: tuple = ()) -> tuple[list[dict], list[str]]:
        """The rows (as the view ``system`` shows them: :func:`grids.in_view`) and marks to give a grid's
        editor: its base, re-based only when the browser (base + ``edits``, the editor's own state) would
        not show the rows, marks and view wanted, or when its dropdowns' ``options`` change (the editor is
        then a new one, showing only the rows it is given: they must be the rows as typed)."""
        columns = grids.COLUMNS[table]
        base = self.base.get(table)
        same_options = self.base_options.setdefault(table, options) == options  # a fresh editor: the ones given
        if base is not None and self.base_views.get(table, "SI") == system and same_options:
            shown = grids.apply_edits(base, edits or {}, columns, derive=False)
            if grids.same_rows(shown, self.rows[table], columns) and \
                    _marked(self.base_marks.get(table, [])) == _marked(marks):
                return grids.in_view(table, base, self.worksheet, system), self.base_marks.get(table, [])
        if base is not None and edits and grids.same_rows(base, self.rows[table], columns) and \
                _marked(self.base_marks.get(table, [])) == _marked(marks):
            # the same data as before (an undo back to it) keeps the editor's identity, and so its edits:
            # a new key gives a fresh editor (the cursor goes; what it shows is right)
            self.redraws[table] = self.redraws.get(table, 0) + 1
        self.base[table] = [dict(r) for r in self.rows[table]]
        self.base_marks[table] = list(marks)
        self.base_views[table] = system
        self.base_options[table] = options
        return grids.in_view(table, self.base[table], self.worksheet, system), self.base_marks[table]


def _same_inputs(a: Worksheet, b: Worksheet) -> bool:
    """True when two worksheets differ at most in their words (title, notes): the same answer."""
    words = {"title": "", "notes": ""}
    return a.model_copy(update=words) == b.model_copy(update=words)


def _with_new_duty(worksheet: Worksheet) -> tuple[Worksheet, str]:
    """A copy with a new heater or cooler duty (no value yet), and its address."""
    taken = {t.name for t in (*worksheet.duties, *worksheet.losses, *worksheet.reactions)}
    name = next(n for n in (f"Heater or cooler {i}" if i else "Heater or cooler" for i in range(len(taken) + 1))
                if n not in taken)
    duty = Duty(name=name)
    return worksheet.model_copy(update={"duties": [*worksheet.duties, duty]}), address.item("duties", name, "value")


def _marked(marks: list[str]) -> list[tuple[int, str]]:
    return [(i, m) for i, m in enumerate(marks) if m]
