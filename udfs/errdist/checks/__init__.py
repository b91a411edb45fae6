"""Model checking: goodness of fit, rival laws, empirical chart points, VaR backtests and
rolling forecasts."""

from __future__ import annotations
