"""Errors raised by the engine: one base class, each also a builtin.

Every error keeps its data as fields and builds its message from them, so the
page and the command line can say *where* the problem is (``where``) and
*what* is wrong (``message``).
"""
from __future__ import annotations

__all__ = [
    "HeatBalanceError",
    "InputError",
    "UnitError",
    "PropertyRangeError",
    "NoSolutionError",
    "WorksheetFormatError",
]


class HeatBalanceError(Exception):
    """Base class of every error the engine raises on purpose."""

    def __init__(self, message: str, where: str = ""):
        self.message = message
        self.where = where
        super().__init__(f"{where}: {message}" if where else message)


class InputError(HeatBalanceError, ValueError):
    """A value the user entered cannot be used as it is."""


class UnitError(InputError):
    """A unit that cannot be read, or of the wrong dimension for its field."""

    def __init__(self, unit: str, expected: str, where: str = "", detail: str = ""):
        self.unit = unit
        self.expected = expected
        message = f"unit '{unit}' is not {expected}"
        if detail:
            message += f" ({detail})"
        super().__init__(message, where)


class PropertyRangeError(InputError):
    """A state lies outside the range of a material's property data."""

    def __init__(self, material: str, quantity: str, value: float, low: float, high: float,
                 unit: str, where: str = ""):
        self.material, self.quantity, self.value = material, quantity, value
        self.low, self.high, self.unit = low, high, unit
        message = (f"{quantity} {value:.6g} {unit} is outside the property data of "
                   f"{material} ({low:.6g} to {high:.6g} {unit})")
        super().__init__(message, where)


class NoSolutionError(HeatBalanceError, ArithmeticError):
    """The balance has no physical answer for the chosen unknown."""


class WorksheetFormatError(InputError):
    """A worksheet document that does not follow the worksheet format."""
