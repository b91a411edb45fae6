"""The demo scenario: an invented fund's daily prices, simulated and seeded.

The fund, its name and every number here are invented for demonstration. Nothing is real data.

Returns follow a two-state Markov regime (calm / stressed spells) whose innovations are drawn
from a generalized normal law with shape 1.2 (heavier tails than the normal), so the pooled
series shows the excess kurtosis typical of daily fund returns.
"""

from __future__ import annotations

import numpy as np
import pandas as pd

FUND_NAME = "Harrowgate Meridian Balanced Fund"
"""Name of the invented demo fund."""

DEMO_SEED = 20261202
"""Seed of the demo simulation (fixed, so the demo is reproducible)."""

DEMO_END = "2026-11-30"
"""Last price date of the demo month."""

# Regime parameters (daily): calm and stressed spells.
_CALM_SD = 0.0065
_STRESS_SD = 0.015
_DRIFT = 0.00025
_P_CALM_TO_STRESS = 0.012
_P_STRESS_TO_CALM = 0.06
_INNOVATION_SHAPE = 1.4


def _gn_standard_draws(rng: np.random.Generator, size: int, shape: float) -> np.ndarray:
    """Draw unit-variance generalized normal variates: |Z| = G^(1/b), G ~ Gamma(1/b)."""
    g = rng.gamma(1.0 / shape, 1.0, size=size)
    sign = np.where(rng.random(size) < 0.5, -1.0, 1.0)
    z = sign * g ** (1.0 / shape)
    # Var(Z) = Γ(3/b)/Γ(1/b) for scale 1; rescale to unit variance.
    from scipy.special import gammaln

    sd = np.exp(0.5 * (gammaln(3.0 / shape) - gammaln(1.0 / shape)))
    return z / sd


def simulate_returns(n: int, seed: int = DEMO_SEED) -> tuple[np.ndarray, np.ndarray]:
    """Simulate ``n`` daily log returns and the regime path (``True`` = stressed).

    Parameters
    ----------
    n : int
        Number of daily returns.
    seed : int
        Seed of ``numpy.random.default_rng``.

    Returns
    -------
    returns, stressed : numpy.ndarray
        Daily log returns and a boolean array marking stressed days.
    """
    if n < 1:
        raise ValueError(f"n must be >= 1, got {n}")
    rng = np.random.default_rng(seed)
    u = rng.random(n)
    stressed = np.empty(n, dtype=bool)
    state = False
    for i in range(n):
        if state:
            state = u[i] >= _P_STRESS_TO_CALM
        else:
            state = u[i] < _P_CALM_TO_STRESS
        stressed[i] = state
    sd = np.where(stressed, _STRESS_SD, _CALM_SD)
    z = _gn_standard_draws(rng, n, _INNOVATION_SHAPE)
    returns = _DRIFT + sd * z
    return returns, stressed


def simulate_prices(
    years: int = 5, seed: int = DEMO_SEED, end: str = DEMO_END, start_price: float = 100.0
) -> pd.DataFrame:
    """Simulate the demo fund's daily prices over ``years`` years of business days.

    Parameters
    ----------
    years : int
        Length of the history; 252 business days a year, plus the first price.
    seed : int
        Seed of the simulation.
    end : str
        Last business day (ISO date).
    start_price : float
        Price on the first day.

    Returns
    -------
    pandas.DataFrame
        Columns ``date`` (``datetime64``) and ``price`` (float), one row per business day,
        ``252 * years + 1`` rows, oldest first.
    """
    n_returns = 252 * int(years)
    returns, _ = simulate_returns(n_returns, seed)
    dates = pd.bdate_range(end=end, periods=n_returns + 1)
    log_prices = np.log(start_price) + np.concatenate([[0.0], np.cumsum(returns)])
    prices = np.round(np.exp(log_prices), 4)
    return pd.DataFrame({"date": dates, "price": prices})
