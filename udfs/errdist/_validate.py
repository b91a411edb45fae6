"""Shared input checks: number formatting for messages, float-array conversion, first-bad raising.

Private to the package; the public modules (:mod:`errdist.law.symmetric`, :mod:`errdist.risk`,
:mod:`errdist.checks.backtest`) raise through these so their messages read the same way.
"""

from __future__ import annotations

from typing import Any

import numpy as np
from numpy.typing import NDArray

from errdist.errors import DomainError, InputTypeError

__all__ = ["as_float_array", "check_confidence", "fmt_number", "raise_first"]


def fmt_number(value: Any) -> str:
    """Format a number for an error message: ``0``, ``-1``, ``0.25``, ``nan``, ``inf``."""
    try:
        f = float(value)
    except (TypeError, ValueError):
        return repr(value)
    if f.is_integer() and abs(f) < 1e16:
        return str(int(f))
    return repr(f)


def as_float_array(name: str, value: Any, *, strict: bool = True) -> NDArray[np.float64]:
    """Convert ``value`` to a float64 array or raise :class:`InputTypeError`.

    Text is always refused. With ``strict`` (the default) ``None`` is refused too, and a list or
    tuple holding ``None`` or text names the first such item and its position; without it,
    ``None`` converts to NaN (for callers whose own range check then reports it).
    """
    if isinstance(value, (str, bytes)):
        raise InputTypeError(f"{name} must be numeric, got text {value!r}")
    if strict:
        if value is None:
            raise InputTypeError(f"{name} must be numeric, got None")
        if isinstance(value, (list, tuple)):
            raw = np.asarray(value)
            if raw.dtype.kind not in "biuf":  # None or text inside a list: no silent NaN
                for index, item in np.ndenumerate(raw):
                    if isinstance(item, np.generic):
                        item = item.item()
                    if item is None or isinstance(item, (str, bytes)):
                        where = index[0] if raw.ndim == 1 else index
                        raise InputTypeError(
                            f"{name} must be numeric, got {item!r} at position {where}"
                        )
    try:
        return np.asarray(value, dtype=np.float64)
    except (TypeError, ValueError) as exc:
        raise InputTypeError(f"{name} must be numeric, got {value!r}") from exc


def raise_first(name: str, arr: NDArray[np.float64], bad: NDArray[np.bool_], rule: str) -> None:
    """Raise a :class:`DomainError` for the first element of ``arr`` flagged in ``bad``.

    The message reads ``"<name> must be <rule>, got <value>"``, with ``" at position <i>"``
    (0-based; a tuple for 2-D and higher) for arrays. Callers check ``np.any(bad)`` first.
    """
    if arr.ndim == 0:
        raise DomainError(f"{name} must be {rule}, got {fmt_number(arr[()])}")
    flat = int(np.argmax(bad.ravel()))
    index = np.unravel_index(flat, arr.shape)
    where = str(index[0]) if arr.ndim == 1 else str(tuple(int(i) for i in index))
    raise DomainError(f"{name} must be {rule}, got {fmt_number(arr[index])} at position {where}")


def check_confidence(confidence: Any, minimum: float = 0.0) -> float:
    """One VaR/ES confidence as a float, or raise.

    ``minimum`` 0 accepts the open interval (0, 1); a positive ``minimum`` accepts
    ``[minimum, 1)`` (the conditional models take 0.5 and above).

    Raises
    ------
    InputTypeError
        Text, a bool, None or an array.
    DomainError
        Outside the interval: ``"confidence must be a fraction in (0, 1) such as 0.99, got 1"``.
    """
    if isinstance(confidence, (str, bytes, bool)) or confidence is None:
        raise InputTypeError(f"confidence must be a number, got {confidence!r}")
    try:
        c = float(confidence)
    except (TypeError, ValueError) as exc:
        raise InputTypeError(f"confidence must be a single number, got {confidence!r}") from exc
    if minimum > 0.0:
        ok, rule = minimum <= c < 1.0, f"[{fmt_number(minimum)}, 1)"
    else:
        ok, rule = 0.0 < c < 1.0, "(0, 1)"
    if not ok:
        raise DomainError(
            f"confidence must be a fraction in {rule} such as 0.99, got {fmt_number(c)}"
        )
    return c
