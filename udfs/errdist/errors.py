"""Exception types of the errdist core.

Every class is a :class:`ValueError`, so plain Python callers can catch ``ValueError``.
The worksheet layer maps each class to a spreadsheet error code (see ``sheet/cells.py``):

=========================  ===========  ==============================================
class                      cell code    meaning
=========================  ===========  ==============================================
``DomainError``            ``#NUM!``    a number outside its domain (scale <= 0,
                                        p outside (0, 1), kurtosis <= -1.2, no
                                        convergence, non-positive price)
``InsufficientDataError``  ``#N/A``     not enough usable data (fewer than 4 points,
                                        zero spread)
``InputTypeError``         ``#VALUE!``  wrong kind of value (text where a number is
                                        needed, unknown option name)
=========================  ===========  ==============================================

A plain ``ValueError`` raised anywhere else is shown as ``#NUM!``.
"""

from __future__ import annotations


class ErrdistError(ValueError):
    """Base class of errdist's input errors."""

    code: str = "#NUM!"


class DomainError(ErrdistError):
    """A number is outside the domain of the function (``#NUM!``)."""

    code = "#NUM!"


class InsufficientDataError(ErrdistError):
    """Too few usable observations, or no spread in them (``#N/A``)."""

    code = "#N/A"


class InputTypeError(ErrdistError):
    """A value of the wrong kind, e.g. text or an unknown option (``#VALUE!``)."""

    code = "#VALUE!"
