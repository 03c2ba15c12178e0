"""Results remembered per loaded case, so that one run computes each analysis once.

A loaded :class:`delay.model.Case` does not change (its tables are handed out as
copy-on-write copies), and every method is a pure function of the case and its options.
``delay demo`` and the report ask for the same analyses several times (the entitlement, the
comparison and the sensitivity table each want the windows analysis, the report wants them
all again): :func:`remembered` computes each one once per case and options, and hands the
same result back. Results are frozen dataclasses; callers derive new tables from them and
never write into them. The memory goes with the case: the store is keyed weakly on it.
"""

from __future__ import annotations

import weakref
from collections.abc import Callable, Hashable
from typing import TypeVar

__all__ = ["remembered", "forget"]

T = TypeVar("T")

_STORE: weakref.WeakKeyDictionary[object, dict[Hashable, object]] = weakref.WeakKeyDictionary()


def remembered(case, key: Hashable, compute: Callable[[], T]) -> T:
    """Return the result of ``compute()`` for ``case`` and ``key``, computed on the first call only.

    Parameters
    ----------
    case : object
        The loaded case the result belongs to (kept weakly: it must be weak-referenceable).
    key : Hashable
        What was computed and with which options, e.g. ``("windows", (), True)``.
    compute : callable
        Computes the result, called with no arguments when it is not known yet. An
        exception it raises passes through and is not remembered.

    Returns
    -------
    object
        The remembered result: the very object the first call computed.

    Examples
    --------
    >>> class Case: pass
    >>> case, calls = Case(), []
    >>> remembered(case, "answer", lambda: calls.append(1) or 42)
    42
    >>> remembered(case, "answer", lambda: calls.append(1) or 43), len(calls)
    (42, 1)
    """
    known = _STORE.setdefault(case, {})
    if key not in known:
        known[key] = compute()
    return known[key]  # type: ignore[return-value]


def forget(case) -> None:
    """Drop every result remembered for ``case``.

    Tests that change a case's tables use it; a case with nothing remembered is left as it
    is.

    Parameters
    ----------
    case : object
        The loaded case.

    Examples
    --------
    >>> class Case: pass
    >>> case = Case()
    >>> remembered(case, "answer", lambda: 42)
    42
    >>> forget(case)
    >>> remembered(case, "answer", lambda: 43)
    43
    """
    _STORE.pop(case, None)
