"""CSV cells for a file a user opens in a spreadsheet: numbers to ten significant figures, text as text.

A spreadsheet reads a cell that starts with ``=``, ``+``, ``-`` or ``@`` (or a tab or a carriage return) as a
formula: a stream named ``=HYPERLINK(...)`` would be a live link there, or a command ("CSV injection", OWASP, from
memory). Such a text cell is written with a leading apostrophe, which spreadsheets take as "this is text" and do
not show; a number (``-12.5``) is written as it is. Text cells are quoted, so a ``#`` in a name does not start a
comment for a reader that skips the ``#`` lines. A ``#`` comment line is one line and one cell: no line break, and
its commas written as a look-alike that separates nothing.
"""
from __future__ import annotations

import csv
from typing import TYPE_CHECKING

if TYPE_CHECKING:
    import pandas as pd

__all__ = ["CSV_FLOAT", "CSV_QUOTING", "CsvNumber", "csv_cell", "csv_table", "comment_line"]

# ten significant figures (1e-10 relative, far below any property data's accuracy), not a computation's 16-digit
# float tail (71.95312500000001)
CSV_FLOAT = "%.10g"
_FORMULA_STARTS = ("=", "+", "-", "@", "\t", "\r")
# every text cell is quoted: a '#' in a name ('Pumpe #2') would start a comment for a reader that skips the '#' lines
CSV_QUOTING = csv.QUOTE_NONNUMERIC


class CsvNumber(float):
    """A number as a CSV cell writes it: ten significant figures, unquoted."""

    def __repr__(self) -> str:
        return CSV_FLOAT % self

    __str__ = __repr__


def csv_cell(value):
    """A cell as written: text a spreadsheet would read as a formula behind an apostrophe, anything else as it is.

    >>> csv_cell('=HYPERLINK("x")'), csv_cell("-12.5"), csv_cell("Glycol"), csv_cell(-3.0)
    ('\\'=HYPERLINK("x")', '-12.5', 'Glycol', -3.0)
    """
    if isinstance(value, str) and value.startswith(_FORMULA_STARTS) and not _is_number(value):
        return "'" + value
    return value


def csv_table(table: pd.DataFrame) -> pd.DataFrame:
    """A copy of ``table`` whose header, index and text cells are :func:`csv_cell`'s."""
    from pandas.api.types import is_numeric_dtype  # only a table's CSV needs pandas (the page loads it late)

    safe = table.rename(columns=csv_cell, index=csv_cell)
    for column in safe.columns:
        if not is_numeric_dtype(safe[column]):  # text (object, or pandas' string dtype)
            safe[column] = safe[column].map(csv_cell)
    return safe


# a comma in a '#' line would split it into cells (a title's '=...' after it a formula, '386,400 kJ' in two): it is
# written as the low single quotation mark, which looks like a comma and separates nothing
_COMMA_IN_A_COMMENT = "\u201a"


def comment_line(text: str) -> str:
    """``# text`` as one line and one cell: a line break of any kind becomes a space, a comma a look-alike.

    >>> comment_line("Heater,=1+1\\rnext") == "# Heater\u201a=1+1 next"
    True
    """
    return "# " + " ".join(text.splitlines()).replace(",", _COMMA_IN_A_COMMENT)


def _is_number(text: str) -> bool:
    try:
        float(text)
    except ValueError:
        return False
    return True
