"""heatbalance: process heat balances with real property data.

The flow runs one way: worksheet as typed (:mod:`.worksheet`) -> SI problem (:mod:`.problem`, the
only place typed units become floats) -> solve (:mod:`.balance`, SI only) -> analyses on the solved
result (:mod:`.analyses`) -> presentation in a unit set (:mod:`.present`) -> page and command line.
Every input and unknown has an address (:mod:`.address`). The engine never imports a user interface.
"""
from .address import inputs, unknown_choices, with_unknown, with_value
from .analyses import solve_and_analyse
from .balance import solve
from .errors import (AddressError, HeatBalanceError, InputError, NoSolutionError, PropertyRangeError, UnitError,
                     WorksheetFormatError)
from .materials import catalogue, get_material
from .results import SIGN_CONVENTION, Result
from .worksheet import SCHEMA_VERSION, Worksheet, dump_worksheet, load_worksheet, parse_worksheet

__all__ = [
    "solve", "solve_and_analyse", "inputs", "unknown_choices", "with_unknown", "with_value", "AddressError",
    "HeatBalanceError", "InputError", "NoSolutionError", "PropertyRangeError", "UnitError", "WorksheetFormatError",
    "catalogue", "get_material", "SIGN_CONVENTION", "Result", "SCHEMA_VERSION", "Worksheet", "dump_worksheet",
    "load_worksheet", "parse_worksheet",
]
