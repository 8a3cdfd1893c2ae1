"""heatbalance: process heat balances with real property data.

The engine is pure functions over typed data: a :class:`Worksheet` in, a
:class:`Result` out. It never imports a user interface.
"""
from .balance import solve, unknown_choices
from .errors import (HeatBalanceError, InputError, NoSolutionError, PropertyRangeError, UnitError,
                     WorksheetFormatError)
from .materials import catalogue, get_material
from .results import SIGN_CONVENTION, Result, contribution_rows
from .worksheet import SCHEMA_VERSION, Worksheet, dump_worksheet, load_worksheet, parse_worksheet

__all__ = [
    "solve", "unknown_choices", "HeatBalanceError", "InputError", "NoSolutionError", "PropertyRangeError",
    "UnitError", "WorksheetFormatError", "catalogue", "get_material", "SIGN_CONVENTION", "Result",
    "contribution_rows", "SCHEMA_VERSION", "Worksheet", "dump_worksheet", "load_worksheet", "parse_worksheet",
]
