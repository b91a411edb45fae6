"""ERRDIST_PANEL: one row per column of a block of returns.

Real data: index 2 and index 1 daily closes shipped in ``arch`` (``arch.data``).
"""

from __future__ import annotations

import numpy as np
from scipy import stats

import errdist
from errdist.sheet.catalog import evaluate
from errdist.sheet.cells import SheetError
from panel_data import real_wide


def _block() -> np.ndarray:
    w = real_wide(400)
    r = np.diff(np.log(w[["INDEX2", "INDEX1"]].to_numpy(dtype=float)), axis=0)
    r[:25, 1] = np.nan  # the second series starts later: blank cells are skipped
    return r


def test_rows_match_scipy_gennorm_per_column():
    """Each row: scipy.stats.gennorm.fit reaches no higher log-likelihood than the row's law,
    and the VaR is -gennorm.ppf(0.01) of that law (scipy)."""
    block = _block()
    rows = evaluate("ERRDIST_PANEL", block.tolist(), 0.99, "mle", True)
    assert rows[0] == ["n", "loc", "scale", "shape", "VaR", "ES"]
    assert len(rows) == 3
    for j, row in enumerate(rows[1:]):
        x = block[:, j][~np.isnan(block[:, j])]
        n, loc, scale, shape, var, es = row
        assert n == x.size
        ll = stats.gennorm.logpdf(x, shape, loc, scale).sum()
        beta, m, s = stats.gennorm.fit(x)
        assert stats.gennorm.logpdf(x, beta, m, s).sum() <= ll + 1e-9 * abs(ll)
        np.testing.assert_allclose(var, -stats.gennorm.ppf(0.01, shape, loc, scale), rtol=1e-10)
        assert es > var > 0
        # The same numbers as the panel's per-series core and errdist's own functions.
        f = errdist.fit(x)
        assert (loc, scale, shape) == (f.loc, f.scale, f.shape)
        assert es == errdist.expected_shortfall(0.99, f.loc, f.scale, f.shape)


def test_a_column_that_cannot_be_fitted_keeps_its_row_with_the_reason():
    block = _block()[:40].copy()
    block[:, 1] = 0.001  # no spread
    rows = evaluate("ERRDIST_PANEL", block.tolist())
    assert len(rows) == 2
    assert isinstance(rows[0][1], float)
    n, *rest = rows[1]
    assert n == 40
    assert all(isinstance(c, SheetError) and c.code == "#N/A" for c in rest)
    assert "column 2" in rest[0].message
