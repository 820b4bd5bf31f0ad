"""The exceptions freeladder raises on purpose, so that callers can tell them apart.

Every one derives from a built-in type (``ValueError`` or ``Exception``) so that code catching
the built-in type keeps working; catch the specific class to react to one situation only.
"""

from __future__ import annotations

__all__ = ["CheckNotApplicable", "NoTheoremError", "NotExpandableError", "TooLargeError"]


class NoTheoremError(ValueError):
    """No theorem guarantees that the single exclusion polynomial gives this model's spectrum.

    Raised by :func:`freeladder.free_spectrum` for models whose verdict is "unsolved",
    "integrable", Jordan-Wigner with cycle symmetries, or whose strings obey relations the
    frustration graph does not show.  The message names the reason and what to do instead;
    ``free_spectrum(m, unproven=True)`` still returns the numbers, marked as not guaranteed.
    """


class CheckNotApplicable(Exception):
    """A check of :func:`freeladder.verify` cannot apply to this model (wrong N, too large ...).

    Only this exception makes a check "not run"; any other exception raised inside a check is
    a failure of that check, reported with its traceback.
    """


class TooLargeError(ValueError):
    """The requested exact computation exceeds a stated size limit; the message says which."""


class NotExpandableError(ValueError):
    """An operator or model the hidden-mode expansion of the dynamics does not cover.

    Raised by :func:`freeladder.edge_expansion`, :func:`freeladder.autocorrelation` and
    :func:`freeladder.two_point`; the message names the operator or the structure that is
    missing (an edge operator next to one end term, a chain or indifference order, independent
    strings) and what is expandable instead.
    """
