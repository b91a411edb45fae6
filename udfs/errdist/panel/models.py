"""The models whose rolling VaR forecasts the panel backtests: a registry.

Each :class:`Model` turns a return series into one-day VaR forecasts aligned with it (NaN
where there is no forecast yet), using only the returns before each day. The panel backtests
every model listed in ``--models`` and writes its columns under the model's ``name``.

Adding a model is one :func:`register` call at the end of this module (or in a module
imported here), with a module-level forecast function so that Dask can send it to workers::

    register(Model("mymodel", "My model, rolling fit", my_forecasts))

where ``my_forecasts(returns, window, confidence) -> numpy.ndarray``.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from errdist.errors import InputTypeError

__all__ = ["MODELS", "Model", "get_models", "register"]

Forecaster = Callable[[NDArray[np.float64], int, float], NDArray[np.float64]]


@dataclass(frozen=True)
class Model:
    """A VaR model the panel can backtest.

    Attributes
    ----------
    name : str
        Short name: the ``--models`` value and the prefix of its output columns.
    label : str
        What the model is, for the overview workbook.
    forecast : callable
        ``forecast(returns, window, confidence)`` -> one-day VaR forecasts (positive losses),
        same length as ``returns``, NaN where there is no forecast yet.
    default : bool
        Backtested when ``--models`` is not given.
    """

    name: str
    label: str
    forecast: Forecaster
    default: bool = True


MODELS: dict[str, Model] = {}
"""Registered models by name, in registration order."""


def register(model: Model) -> Model:
    """Add ``model`` to :data:`MODELS` (names are unique)."""
    if model.name in MODELS:
        raise ValueError(f"model {model.name!r} is already registered")
    MODELS[model.name] = model
    return model


def get_models(names: str | list[str] | tuple[str, ...] | None) -> tuple[Model, ...]:
    """The models named in ``names`` (a comma-separated text or a list); ``"none"`` or an
    empty list gives none; ``None`` gives the default models."""
    if names is None:
        return tuple(m for m in MODELS.values() if m.default)
    if isinstance(names, str):
        names = [n.strip() for n in names.split(",") if n.strip()]
    if [n.casefold() for n in names] in ([], ["none"]):
        return ()
    out = []
    for n in names:
        if n not in MODELS:
            known = ", ".join(MODELS) or "none"
            raise InputTypeError(f"unknown model {n!r}; known models: {known} (or none)")
        out.append(MODELS[n])
    return tuple(out)


def unconditional_forecasts(
    returns: NDArray[np.float64], window: int, confidence: float
) -> NDArray[np.float64]:
    """The error law refitted by maximum likelihood on each rolling window
    (:func:`errdist.rolling_var`, the monthly workbook's Backtest sheet)."""
    from errdist import rolling_var

    return np.asarray(rolling_var(returns, window, confidence, "mle"), dtype=np.float64)


register(
    Model(
        "uncond",
        "Unconditional error law, refitted by maximum likelihood on each rolling window",
        unconditional_forecasts,
    )
)


def _conditional(model: str, returns: NDArray[np.float64], confidence: float, window: int):
    from errdist.risk.forecasts import rolling_forecasts

    path = rolling_forecasts(returns, model, confidence, window=window)
    return np.asarray(path.var, dtype=np.float64)


def ewma_forecasts(
    returns: NDArray[np.float64], window: int, confidence: float
) -> NDArray[np.float64]:
    """RiskMetrics EWMA volatility with the skewed error law refitted on the scaled returns
    (:func:`errdist.risk.forecasts.rolling_forecasts`, model ``"ewma"``; first forecast after
    its 1,000-day fit window)."""
    return _conditional("ewma", returns, confidence, window)


def gjr_forecasts(
    returns: NDArray[np.float64], window: int, confidence: float
) -> NDArray[np.float64]:
    """GJR-GARCH(1,1) with the skewed error law, estimated by ``arch``
    (:func:`errdist.risk.forecasts.rolling_forecasts`, model ``"gjr"``)."""
    return _conditional("gjr", returns, confidence, window)


register(
    Model(
        "ewma",
        "Conditional: EWMA volatility (lambda 0.94) with the skewed error law, refitted every "
        "21 days on 1,000 days",
        ewma_forecasts,
        default=False,
    )
)
register(
    Model(
        "gjr",
        "Conditional: GJR-GARCH(1,1) with the skewed error law (arch), re-estimated every 21 "
        "days on 1,000 days",
        gjr_forecasts,
        default=False,
    )
)
