"""Presentation: the only home of text in a unit set, display tables, plotly figures and reports.

Everything here reads solved SI records (:mod:`heatbalance.results`, :mod:`heatbalance.analyses`)
and writes them for people; nothing here solves. ``figures`` and ``screening`` import plotly,
so they are imported on their own (``from heatbalance.present.figures import energy_waterfall``).
"""
