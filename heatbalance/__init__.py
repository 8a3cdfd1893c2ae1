"""heatbalance: process heat balances with real property data.

The flow runs one way: worksheet as typed (:mod:`.worksheet`) -> SI problem (:mod:`.problem`, the
only place typed units become floats) -> solve (:mod:`.balance`, SI only) -> analyses on the solved
result (:mod:`.analyses`) -> presentation in a unit set (:mod:`.present`) -> page and command line.
Every input and unknown has an address (:mod:`.address`). The engine never imports a user interface.

The names below are loaded on first use, so ``python -m heatbalance`` imports only what a command needs.
"""
from importlib import import_module

#: public name -> the module that defines it
_EXPORTS = {
    "solve": "balance", "solve_and_analyse": "analyses", "inputs": "address", "unknown_choices": "address",
    "with_unknown": "address", "with_value": "address", "AddressError": "errors", "HeatBalanceError": "errors",
    "InputError": "errors", "NoSolutionError": "errors", "PropertyRangeError": "errors", "UnitError": "errors",
    "WorksheetFormatError": "errors", "catalogue": "materials", "get_material": "materials",
    "SIGN_CONVENTION": "results", "Result": "results", "SCHEMA_VERSION": "worksheet", "Worksheet": "worksheet",
    "dump_worksheet": "worksheet", "load_worksheet": "worksheet", "parse_worksheet": "worksheet",
}
__all__ = list(_EXPORTS)


def __getattr__(name: str):
    if name in _EXPORTS:
        value = getattr(import_module(f".{_EXPORTS[name]}", __name__), name)
        globals()[name] = value
        return value
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")


def __dir__() -> list[str]:
    return sorted(__all__)
