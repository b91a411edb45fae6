"""A plain-text fit table of the demo scenario (used when the workbook extra is absent)."""

from __future__ import annotations

import numpy as np

from errdist.data.demo import FUND_NAME, simulate_prices


def fit_table_lines(returns: np.ndarray) -> list[str]:
    """Fit ``returns`` both ways and format a comparison table, one string per line."""
    from errdist.estimate import fit

    fits = [fit(returns, method="moments"), fit(returns, method="mle")]
    lines = [
        f"{'method':<10}{'loc':>14}{'scale':>14}{'shape':>10}{'loglik':>14}{'AIC':>14}",
    ]
    for f in fits:
        lines.append(
            f"{f.method:<10}{f.loc:>14.6g}{f.scale:>14.6g}{f.shape:>10.4f}"
            f"{f.loglik:>14.2f}{f.aic:>14.2f}"
        )
        if f.warning:
            lines.append(f"  note: {f.warning}")
    return lines


def print_demo_fit() -> int:
    """Simulate the demo fund, fit it by moments and by maximum likelihood, print a table."""
    prices = simulate_prices()
    returns = np.diff(np.log(prices["price"].to_numpy()))
    print(
        f"{FUND_NAME} (invented, simulated): {len(returns)} daily log returns "
        f"{prices['date'].iloc[0]:%Y-%m-%d} to {prices['date'].iloc[-1]:%Y-%m-%d}"
    )
    for line in fit_table_lines(returns):
        print(line)
    print("Install the 'headless' extra for the full workbook: pip install 'errdist[headless]'")
    return 0
