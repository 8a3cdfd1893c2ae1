"""Handbook cp(T) tables typed from the printed page (sources beside each), and their integral.

The integral is a fine midpoint sum over numpy's linear interpolation: written apart from the engine's
analytic integral (heatbalance.solids), so a test compares two implementations.
"""
import numpy as np

# Incropera & DeWitt, Fundamentals of Heat and Mass Transfer, Table A.1 (from memory): T [K], cp [J/(kg·K)]
INCROPERA_A1 = {
    "aluminium": [(200, 798), (300, 903), (400, 949), (600, 1033), (800, 1146)],  # pure aluminum
    "copper": [(200, 356), (300, 385), (400, 397), (600, 417), (800, 433), (1000, 451)],  # pure copper
    "iron": [(200, 384), (300, 447), (400, 490), (600, 574), (800, 680), (1000, 975)],  # pure iron
    # plain carbon steel; none below 300 K, where pure iron's 384 at 200 K scaled by 434/447 stands in (as the
    # engine's row does)
    "carbon steel": [(200, 373), (300, 434), (400, 487), (600, 559), (800, 685), (1000, 1169)],
    "stainless steel 304": [(200, 402), (300, 477), (400, 515), (600, 557), (800, 582), (1000, 611)],  # AISI 304
    "stainless steel 316": [(300, 468), (400, 504), (600, 550), (800, 576), (1000, 602)],  # AISI 316
}


def integrated_cp(points, T1: float, T2: float, steps: int = 20000) -> float:
    """∫cp dT [J/kg] from T1 to T2 [K] over a cp table, linear between rows, by the midpoint rule.

    Below the table's first row the first segment's line is continued (as the engine does), so a
    reference from 20 °C over a table starting at 300 K is the handbook's own trend, said where used.
    """
    T = np.array([p[0] for p in points], float)
    cp = np.array([p[1] for p in points], float)
    mids = T1 + (np.arange(steps) + 0.5) * (T2 - T1) / steps
    values = np.interp(mids, T, cp)
    below = mids < T[0]
    values[below] = cp[0] + (cp[1] - cp[0]) / (T[1] - T[0]) * (mids[below] - T[0])
    return float(values.sum() * (T2 - T1) / steps)
