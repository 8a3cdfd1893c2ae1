"""Errors raised by the engine: one base class, each also a builtin.

Every error keeps its data as fields: ``address`` names the input at fault (see
:mod:`heatbalance.address`; ``where`` is the same string) and ``phrase`` says what is
wrong, with any temperature or pressure kept as an SI :class:`~heatbalance.messages.Measure`
so the page and the command line write it in their own units. ``message`` is the
phrase in plain SI units.
"""
from __future__ import annotations

from .messages import Measure, Phrase

__all__ = [
    "HeatBalanceError",
    "InputError",
    "UnitError",
    "PropertyRangeError",
    "NoSolutionError",
    "WorksheetFormatError",
    "AddressError",
]


def _restored(cls: type, args: tuple) -> "HeatBalanceError":
    """An error of ``cls`` with ``args`` and no fields yet (they are set from the copied state)."""
    error = cls.__new__(cls, *args)
    error.args = args
    return error


class HeatBalanceError(Exception):
    """Base class of every error the engine raises on purpose.

    Parameters
    ----------
    message : str or Phrase
        What is wrong and how to fix it.
    where : str
        The address of the field at fault (``streams[Steam].flow``), or ``""``.
    """

    def __init__(self, message: str | Phrase, where: str = ""):
        self.phrase = message if isinstance(message, Phrase) else Phrase(str(message))
        self.address = where
        super().__init__(f"{where}: {self.message}" if where else self.message)

    @property
    def message(self) -> str:
        return self.phrase.text

    @property
    def where(self) -> str:
        return self.address

    def __str__(self) -> str:
        return f"{self.address}: {self.message}" if self.address else self.message

    def __reduce__(self):
        """Copy and pickle by fields (copy, pickle, pandas' ``attrs``), never by calling ``__init__`` again: a
        subclass's ``__init__`` takes its own fields (``PropertyRangeError(material, quantity, …)``)."""
        return _restored, (type(self), self.args), self.__dict__

    def located(self, where: str) -> "HeatBalanceError":
        """The same refusal, placed at ``where`` if it had no place yet (for re-raising from a caller)."""
        if not self.address:
            self.address = where
        return self


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
    """A state lies outside the range of a material's property data (``value``, ``low``, ``high`` in SI)."""

    def __init__(self, material: str, quantity: str, value: float, low: float, high: float,
                 kind: str, where: str = ""):
        self.material, self.quantity, self.value = material, quantity, value
        self.low, self.high, self.kind = low, high, kind
        phrase = Phrase("{quantity} {value} is outside the property data of {material} ({low} to {high})",
                        {"quantity": quantity, "material": material, "value": Measure(value, kind, 6),
                         "low": Measure(low, kind, 6), "high": Measure(high, kind, 6)})
        super().__init__(phrase, where)


class NoSolutionError(HeatBalanceError, ArithmeticError):
    """The balance has no physical answer for the chosen unknown."""


class WorksheetFormatError(InputError):
    """A worksheet document that does not follow the worksheet format.

    ``loc`` is the JSON path of the first problem as data (keys and list positions, e.g.
    ``("streams", 0, "flow")``); ``where`` its address with items by name where they have one.
    """

    def __init__(self, message: str | Phrase, where: str = "", loc: tuple = ()):
        self.loc = loc
        super().__init__(message, where)


class AddressError(InputError, KeyError):
    """An address that names nothing in the worksheet, or a field that cannot take the value given."""

    __str__ = HeatBalanceError.__str__  # KeyError would quote the message
