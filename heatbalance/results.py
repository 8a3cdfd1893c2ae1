"""Result records of a solved balance: SI numbers and phrases, no unit set.

All heats are SI: W on a continuous basis, J on a batch basis, positive into
the process for heat terms and positive when absorbed for lines. Words that
mention a quantity are :class:`~heatbalance.messages.Phrase`s; the presentation
layer (:mod:`heatbalance.present`) writes them in a unit set.
"""
from __future__ import annotations

from dataclasses import dataclass, field, fields, is_dataclass

from .messages import Phrase

__all__ = ["SIGN_CONVENTION", "Answer", "LineResult", "TermResult", "Result"]

SIGN_CONVENTION = ("+ = heat into the process. Duties: heater +, cooler −. Reaction heat is + when "
                   "exothermic. Losses are heat leaving. Each line absorbs ΔH = m·(h_final − h_initial); "
                   "the balance closes when Σ ΔH_lines + equipment heat = duties + reaction heat − losses.")


@dataclass
class Answer:
    """The solved unknown, in SI, with the address of its field and the unit typed there (if any)."""

    address: str
    label: str
    kind: str  # amount | temperature | duty
    si_kind: str  # a key of units.KINDS
    value_si: float
    typed_unit: str | None = None  # the unit the user typed for this field (None: use the view's)
    phase_fraction: float | None = None  # fraction of the upper phase on a plateau
    plateau: str | None = None  # boiling | melting


@dataclass
class LineResult:
    """One line's states and the heat it absorbs (sensible + latent)."""

    name: str
    kind: str  # stream | charge
    material: str
    amount_si: float  # kg/s or kg
    initial_T: float
    final_T: float
    initial_phase: str
    final_phase: str
    initial_P: float
    final_P: float
    sensible: float
    latent: float
    address: str = ""  # streams[S] or vessels[V].charges[C]
    vessel: str | None = None

    @property
    def total(self) -> float:
        return self.sensible + self.latent


@dataclass
class TermResult:
    """A heat term, + into the process: a duty, a loss, reaction heat, or equipment."""

    name: str
    kind: str  # duty | loss | reaction | equipment
    heat: float
    detail: Phrase = field(default_factory=lambda: Phrase(""))
    vessel: str | None = None  # equipment: its vessel; reaction: the vessel it names


@dataclass
class Result:
    """Everything a checker needs to see about one solved worksheet."""

    title: str
    basis: str  # continuous | batch
    answer: Answer
    lines: list[LineResult]
    terms: list[TermResult]
    residual: float
    warnings: list[Phrase] = field(default_factory=list)
    assumptions: list[str] = field(default_factory=list)
    sources: dict[str, str] = field(default_factory=dict)
    versions: dict[str, str] = field(default_factory=dict)
    sign_convention: str = SIGN_CONVENTION
    duration: float | None = None  # s: a batch's duration, when given (None: continuous, or not given)
    # filled by the analyses (this module may not import them): one analyses.screening.Screening per vessel
    # with a reaction
    screening: list = field(default_factory=list)
    uncertainty: object = None  # analyses.uncertainty.Uncertainty of the answer, when the sheet has tolerances
    uncertainty_error: object = None  # the refusal that kept the uncertainty from being given (also a warning)
    output_uncertainties: dict = field(default_factory=dict)  # other outputs' Uncertainty (each screening's MTSR)
    exchangers: list = field(default_factory=list)  # analyses.exchangers.ExchangerCheck, one per exchanger
    utilities: list = field(default_factory=list)  # analyses.utilities.UtilityTable, one per duty to meet
    rating_closure: object = None  # analyses.rating_solve.RatingClosure: an exchanger's rating set an input
    surface_losses: list = field(default_factory=list)  # losses.SurfaceLoss, one per loss computed from a surface
    humid_air: list = field(default_factory=list)  # humid_air.HumidAirLine, one per humid-air line

    @property
    def heat_si_unit(self) -> str:
        return "W" if self.basis == "continuous" else "J"

    def to_dict(self, write_phrase=lambda phrase: phrase.text) -> dict:
        """Plain JSON-ready data in SI; each phrase written by ``write_phrase`` (default: plain SI units)."""
        data = _plain(self, write_phrase)
        data["warnings"] = [{"text": write_phrase(w), "address": w.address} for w in self.warnings]
        data["heat_unit"] = self.heat_si_unit
        for line, record in zip(data["lines"], self.lines):
            line["total"] = record.total
        return data


def _plain(value, write_phrase):
    """Dataclasses, lists and dicts as plain data; a phrase as its text."""
    if isinstance(value, Phrase):
        return write_phrase(value)
    if isinstance(value, BaseException):
        return {"where": getattr(value, "where", ""), "message": write_phrase(getattr(value, "phrase", str(value)))}
    if hasattr(value, "model_dump"):  # a worksheet model (a tolerance) as typed
        return value.model_dump(mode="json", exclude_none=True)
    if is_dataclass(value):
        return {f.name: _plain(getattr(value, f.name), write_phrase) for f in fields(value)}
    if isinstance(value, (list, tuple)):
        return [_plain(v, write_phrase) for v in value]
    if isinstance(value, dict):
        return {k: _plain(v, write_phrase) for k, v in value.items()}
    return value
