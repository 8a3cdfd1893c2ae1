"""Materials that freeze over a range (foods, wet solids), in SI: by an enthalpy table or by composition.

A food by composition (mass fractions of water, protein, fat, carbohydrate, fibre, ash) with an initial
freezing point ``t_f``:

* cp of each component from the Choi–Okos (1986) correlations (t in °C, cp in kJ/(kg·K));
* below ``t_f`` the ice fraction follows the freezing-point depression relation of Miles/Schwartzberg,
  ``x_ice = (x_w − x_b)·(1 − t_f / t)`` (t, t_f in °C), with bound (unfreezable) water ``x_b = 0.4·x_protein``
  (Schwartzberg 1976);
* h(t) = Σ x_i·∫cp_i dt + (x_w − x_ice)·∫cp_water dt + x_ice·(∫cp_ice dt − L₀), each integral from 0 °C,
  L₀ = 333.6 kJ/kg (ice at 0 °C): the latent heat is released as ice forms, at the temperature it forms.

References: Choi, Y. & Okos, M.R. (1986), "Effects of temperature and composition on the thermal properties
of foods", in Food Engineering and Process Applications, vol. 1, Elsevier, 93–101; Schwartzberg, H.G. (1976),
J. Food Sci. 41, 152–156; both as summarised in ASHRAE Handbook—Refrigeration, "Thermal Properties of Foods"
(from memory). Unfrozen water below 0 °C takes the liquid correlation extrapolated (a small fraction).
"""
from __future__ import annotations

from bisect import bisect_right

from .properties import EVALUATIONS, Material

__all__ = ["CHOI_OKOS", "ICE", "LATENT_ICE_0C", "BOUND_WATER_PER_PROTEIN", "COMPONENTS", "FoodByComposition",
           "EnthalpyTable", "FOOD_T_MIN", "FOOD_T_MAX"]

KJ = 1000.0
C0 = 273.15
#: cp = a + b·t + c·t² [kJ/(kg·K)], t in °C: Choi & Okos (1986), ASHRAE Handbook—Refrigeration (from memory)
CHOI_OKOS = {
    "water": (4.1762, -9.0864e-5, 5.4731e-6),
    "protein": (2.0082, 1.2089e-3, -1.3129e-6),
    "fat": (1.9842, 1.4733e-3, -4.8008e-6),
    "carbohydrate": (1.5488, 1.9625e-3, -5.9399e-6),
    "fibre": (1.8459, 1.8306e-3, -4.6509e-6),
    "ash": (1.0926, 1.8896e-3, -3.6817e-6),
}
ICE = (2.0623, 6.0769e-3, 0.0)  # Choi & Okos (1986), ice (from memory)
COMPONENTS = tuple(CHOI_OKOS)
LATENT_ICE_0C = 333.6e3  # J/kg, ice at 0 °C (ASHRAE Handbook—Refrigeration, from memory)
BOUND_WATER_PER_PROTEIN = 0.4  # x_b = 0.4·x_protein (Schwartzberg 1976, from memory)
# K: the Choi–Okos correlations cover −40 to 150 °C; above 100 °C a food's water boils (not modelled)
FOOD_T_MIN, FOOD_T_MAX = C0 - 40.0, C0 + 100.0


def _integral(coefficients: tuple[float, float, float], t: float) -> float:
    """∫ from 0 °C to t of a + b·t + c·t² [J/kg]."""
    a, b, c = coefficients
    return (a * t + b * t * t / 2 + c * t ** 3 / 3) * KJ


class FoodByComposition(Material):
    """A food or wet solid by composition with an initial freezing point (no plateau: it freezes over a range).

    Parameters
    ----------
    fractions : dict
        Mass fractions by component (``COMPONENTS``), summing to 1.
    T_freeze : float
        Initial freezing point [K], below 0 °C.
    """

    lowest_phase = "partly frozen"

    def __init__(self, name: str, fractions: dict[str, float], T_freeze: float, source: str):
        self.name, self.fractions, self.T_freeze = name, dict(fractions), T_freeze
        self.t_min, self.t_max = FOOD_T_MIN, FOOD_T_MAX
        self.bound_water = BOUND_WATER_PER_PROTEIN * self.fractions.get("protein", 0.0)
        self.source = (f"{source}; cp: Choi & Okos (1986) correlations; ice fraction below the initial freezing "
                       "point: Miles/Schwartzberg relation with bound water 0.4·protein (Schwartzberg 1976), "
                       "ASHRAE Handbook—Refrigeration (from memory)")

    def ice_fraction(self, T: float) -> float:
        """Mass fraction of ice at T [K] (0 at and above the initial freezing point).

        Examples
        --------
        Hand calculation: 80 % water, 10 % protein (bound water 0.04), freezing from −1 °C; at −10 °C
        x_ice = (0.80 − 0.04)·(1 − (−1)/(−10)) = 0.684:

        >>> food = FoodByComposition("f", {"water": 0.8, "protein": 0.1, "ash": 0.1}, 272.15, "example")
        >>> round(food.ice_fraction(263.15), 6)
        0.684
        """
        if T >= self.T_freeze:
            return 0.0
        t, t_f = T - C0, self.T_freeze - C0
        return (self.fractions["water"] - self.bound_water) * (1.0 - t_f / t)

    def enthalpy(self, T: float, P: float) -> float:
        EVALUATIONS.count += 1
        t = T - C0
        solids = sum(x * _integral(CHOI_OKOS[k], t) for k, x in self.fractions.items() if k != "water")
        ice = self.ice_fraction(T)
        water = (self.fractions["water"] - ice) * _integral(CHOI_OKOS["water"], t)
        return solids + water + ice * (_integral(ICE, t) - LATENT_ICE_0C)

    def latent_held(self, T: float, P: float) -> float:
        """Latent heat of the freezable water still unfrozen at T, at L₀ (the split of a line's heat into
        sensible and latent; the enthalpy itself uses the latent heat at the temperature the ice forms)."""
        return (self.fractions["water"] - self.bound_water - self.ice_fraction(T)) * LATENT_ICE_0C

    def phase_name(self, T: float, P: float) -> str:
        return f"partly frozen ({self.ice_fraction(T):.0%} ice)" if T < self.T_freeze else "unfrozen"


class EnthalpyTable(Material):
    """A material given by specific enthalpy at rising temperatures [K, J/kg], linear between rows.

    The table is the data: no extrapolation, so states outside its first and last rows are refused.
    """

    lowest_phase = "as tabulated"

    def __init__(self, name: str, temperatures: tuple[float, ...], enthalpies: tuple[float, ...], source: str,
                 T_freeze: float | None = None):
        self.name, self.temperatures, self.enthalpies = name, temperatures, enthalpies
        self.t_min, self.t_max, self.T_freeze = temperatures[0], temperatures[-1], T_freeze
        self.source = f"user-defined enthalpy table: {source}"

    def enthalpy(self, T: float, P: float) -> float:
        EVALUATIONS.count += 1
        i = min(max(bisect_right(self.temperatures, T) - 1, 0), len(self.temperatures) - 2)
        (T0, T1), (h0, h1) = self.temperatures[i:i + 2], self.enthalpies[i:i + 2]
        return h0 + (h1 - h0) * (T - T0) / (T1 - T0)

    def phase_name(self, T: float, P: float) -> str:
        if self.T_freeze is None:
            return "as tabulated"
        return "partly frozen" if T < self.T_freeze else "unfrozen"
