r"""errdist's skewed error law as an ``arch`` innovation distribution.

:class:`SkewedErrorInnovations` subclasses :class:`arch.univariate.distribution.Distribution`
so that ``arch``'s models (GARCH, GJR-GARCH, ...) estimate with errdist's law as the law of the
standardized residuals :math:`z_t = \varepsilon_t/\sigma_t`. Parameters: shape :math:`\nu`
(:math:`b`) and skew :math:`\lambda`; the law has mean 0 and variance 1
(:func:`errdist.risk.innovation_law.standardized_params`). The log-likelihood of one residual is

.. math::

    \ln\nu - \ln 2 - \ln a - \ln\Gamma(1/\nu) - \tfrac12\ln\sigma_t^2
    - \left(\frac{|z_t - m|}{a(1+\lambda\,\mathrm{sign}(z_t-m))}\right)^{\nu},

which at :math:`\lambda = 0` is ``arch``'s ``GeneralizedError`` (tested to 1e-10). Unlike
that class, the shape may go down to :data:`~errdist.risk.innovation_law.SHAPE_BOUNDS` ``[0]`` = 0.3:
daily index residuals have maximum-likelihood shapes near 0.7-1.3, and a bound at 1.01 would
force a too-light tail. ``arch`` is imported here only; install it with
``pip install errdist[volatility]``.
"""

from __future__ import annotations

from collections.abc import Callable, Sequence
from typing import Any

import numpy as np
from numpy.typing import ArrayLike, NDArray

from errdist.errors import InputTypeError
from errdist.risk.innovation_law import (
    SHAPE_BOUNDS,
    SKEW_BOUNDS,
    lower_tail,
    rvs,
    standardized_cdf,
    standardized_logpdf,
    standardized_ppf,
)

try:
    from arch.univariate.distribution import Distribution as _ArchDistribution
except ImportError:  # pragma: no cover - exercised only without arch
    _ArchDistribution = None  # type: ignore[assignment,misc]

__all__ = ["SkewedErrorInnovations", "require_arch"]


def require_arch() -> None:
    """Raise a clear :class:`InputTypeError` when the ``arch`` package is missing."""
    if _ArchDistribution is None:
        raise InputTypeError(
            "the conditional volatility models need the 'arch' package: "
            "pip install 'errdist[volatility]'"
        )


if _ArchDistribution is not None:

    class SkewedErrorInnovations(_ArchDistribution):  # type: ignore[misc,valid-type]
        """Standardized two-piece error law (shape ``nu``, skew ``lambda``) for ``arch``.

        Parameters
        ----------
        skewed : bool, default True
            ``False`` fixes the skew at 0 (one parameter, ``nu``): the symmetric error law with
            errdist's wider shape bounds.
        seed : int or numpy.random.Generator, optional
            Random source of :meth:`simulate`.
        """

        def __init__(self, skewed: bool = True, *, seed: Any = None) -> None:
            super().__init__(seed=seed)
            self.skewed = bool(skewed)
            self._name = "Skewed error law" if self.skewed else "Error law (errdist bounds)"
            self.num_params = 2 if self.skewed else 1

        # -- parameters ---------------------------------------------------------------
        def _split(self, parameters: Sequence[float] | ArrayLike) -> tuple[float, float]:
            p = np.asarray(parameters, dtype=float).ravel()
            return float(p[0]), float(p[1]) if self.skewed else 0.0

        def constraints(self) -> tuple[NDArray[np.float64], NDArray[np.float64]]:
            """Linear constraints ``A @ theta - b >= 0``: the bounds as inequalities."""
            lo, hi = SHAPE_BOUNDS
            if not self.skewed:
                return np.array([[1.0], [-1.0]]), np.array([lo, -hi])
            slo, shi = SKEW_BOUNDS
            a = np.array([[1.0, 0.0], [-1.0, 0.0], [0.0, 1.0], [0.0, -1.0]])
            return a, np.array([lo, -hi, slo, -shi])

        def bounds(self, resids: ArrayLike) -> list[tuple[float, float]]:
            """Shape in :data:`SHAPE_BOUNDS`, skew in :data:`SKEW_BOUNDS`."""
            return [SHAPE_BOUNDS, SKEW_BOUNDS] if self.skewed else [SHAPE_BOUNDS]

        def parameter_names(self) -> list[str]:
            """``["nu", "lambda"]`` (``["nu"]`` when not skewed)."""
            return ["nu", "lambda"] if self.skewed else ["nu"]

        def starting_values(self, std_resid: ArrayLike) -> NDArray[np.float64]:
            """Shape 1.2 (between Laplace and normal), skew 0."""
            return np.array([1.2, 0.0]) if self.skewed else np.array([1.2])

        # -- likelihood -----------------------------------------------------------------
        def loglikelihood(
            self,
            parameters: Sequence[float] | ArrayLike,
            resids: ArrayLike,
            sigma2: ArrayLike,
            individual: bool = False,
        ) -> Any:
            r"""Log-likelihood of ``resids`` with conditional variances ``sigma2``.

            :math:`\sum_t [\ln f(z_t) - \tfrac12\ln\sigma_t^2]`, :math:`z_t =
            \varepsilon_t/\sigma_t`, :math:`f` the standardized law's density.
            """
            nu, lam = self._split(parameters)
            sigma2 = np.asarray(sigma2, dtype=float)
            z = np.asarray(resids, dtype=float) / np.sqrt(sigma2)
            lls = standardized_logpdf(z, nu, lam) - 0.5 * np.log(sigma2)
            return lls if individual else float(np.sum(lls))

        # -- simulation, quantiles, moments ----------------------------------------------
        def _simulator(self, size: int | tuple[int, ...]) -> NDArray[np.float64]:
            assert self._parameters is not None
            nu, lam = self._split(self._parameters)
            gen = self._generator
            if not isinstance(gen, np.random.Generator):
                gen = np.random.default_rng(gen.randint(0, 2**31 - 1))
            return rvs(nu, lam, size, gen)

        def simulate(
            self, parameters: float | Sequence[float] | ArrayLike
        ) -> Callable[[int | tuple[int, ...]], NDArray[np.float64]]:
            """Return a simulator of i.i.d. standardized draws at ``parameters``."""
            self._parameters = np.atleast_1d(np.asarray(parameters, dtype=float))
            return self._simulator

        def ppf(
            self,
            pits: float | Sequence[float] | ArrayLike,
            parameters: Sequence[float] | ArrayLike | None = None,
        ) -> Any:
            """Quantiles of the standardized law."""
            nu, lam = self._split(self._check_constraints(parameters))
            return standardized_ppf(np.asarray(pits, dtype=float), nu, lam)

        def cdf(
            self,
            resids: Sequence[float] | ArrayLike,
            parameters: Sequence[float] | ArrayLike | None = None,
        ) -> Any:
            r"""Distribution function of the standardized law (tails through :math:`Q`)."""
            nu, lam = self._split(self._check_constraints(parameters))
            return standardized_cdf(np.asarray(resids, dtype=float), nu, lam)

        def moment(self, n: int, parameters: Sequence[float] | ArrayLike | None = None) -> float:
            """Moments of order 0, 1, 2 (1, 0, 1); higher orders are not needed here."""
            self._check_constraints(parameters)
            if n in (0, 2):
                return 1.0
            if n == 1:
                return 0.0
            return float("nan")

        def partial_moment(
            self,
            n: int,
            z: float = 0.0,
            parameters: Sequence[float] | ArrayLike | None = None,
        ) -> float:
            """Lower partial moments of order 0 and 1: :math:`E[Z^n; Z \\le z]`."""
            nu, lam = self._split(self._check_constraints(parameters))
            u = float(self.cdf(np.array([z]), parameters)[0])
            if n == 0:
                return u
            if n == 1:
                _, e = lower_tail(u, nu, lam)
                return float(u * e)
            return float("nan")

else:  # pragma: no cover
    SkewedErrorInnovations = None  # type: ignore[assignment,misc]
