"""Redundant links: finish-to-start links that other links already imply.

A finish-to-start link ``A -> C`` with lag ``L >= 0`` is redundant when a path of two links
or more ``A -> B -> ... -> C`` of finish-to-start links with lags of zero or more exists
whose *implied lag* - the sum of its lags plus the planned durations of the activities
between - is at least ``L``: the path already keeps ``C`` at least ``L`` work days after
``A``'s finish, so removing the link changes no date. The links searched are the
finish-to-start links with a non-negative lag; a lead or a link of another type is never
called redundant and never makes another link redundant. Durations and lags are added as
work days without regard to calendars.

The search is exact - a transitive reduction of the searched links, refined by the
longest implied lag for links with a positive lag - on programmes of up to
:data:`EXACT_REDUNDANCY_LIMIT` activities. Reachability is held as bit sets, a block of
target activities at a time so that memory stays within :data:`BIT_BUDGET_WORDS` words;
only activities with two or more searched links into them can be the end of a redundant
link, so only they take a bit. Beyond the limit the search is bounded to paths of two links
and the result says so.

References
----------
A. V. Aho, M. R. Garey and J. D. Ullman, "The transitive reduction of a directed graph",
SIAM Journal on Computing 1(2), 1972.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..network import Network
from . import _kernels

__all__ = ["Redundancy", "redundant_links", "EXACT_REDUNDANCY_LIMIT", "BIT_BUDGET_WORDS"]

#: Programmes up to this many activities get the exact search; larger ones paths of two links.
EXACT_REDUNDANCY_LIMIT = 200_000
#: Largest reachability table held at once, in 64-bit words (64 MB).
BIT_BUDGET_WORDS = 8_000_000


@dataclass(frozen=True)
class Redundancy:
    """Which links are redundant.

    Parameters
    ----------
    redundant : numpy.ndarray
        ``bool`` array, shape ``(m,)``, one per link of the network, true for a redundant
        link.
    via : numpy.ndarray
        ``int64`` array, shape ``(m,)``: for a redundant link, the activity number (position
        in the network) of the first activity after its predecessor on a path that implies
        it; ``-1`` otherwise.
    exact : bool
        Whether every path length was searched (``False``: paths of two links only).
    """

    redundant: np.ndarray
    via: np.ndarray
    exact: bool


def _out_adjacency(n: int, pred: np.ndarray, succ: np.ndarray, links: np.ndarray):
    by_pred = links[np.argsort(pred[links], kind="stable")]
    ptr = np.zeros(n + 1, dtype=np.int64)
    np.cumsum(np.bincount(pred[links], minlength=n), out=ptr[1:])
    return ptr, np.ascontiguousarray(succ[by_pred]), np.ascontiguousarray(by_pred)


def redundant_links(
    network: Network,
    duration: np.ndarray,
    exact_limit: int = EXACT_REDUNDANCY_LIMIT,
    bit_budget_words: int = BIT_BUDGET_WORDS,
) -> Redundancy:
    """Find the redundant finish-to-start links of a network.

    Parameters
    ----------
    network : Network
        The compiled logic (:class:`delay.network.Network`).
    duration : numpy.ndarray
        Planned duration of each activity in work days, shape ``(n,)``.
    exact_limit : int, optional
        Largest number of activities searched exactly.
    bit_budget_words : int, optional
        Largest reachability table held at once, in 64-bit words.

    Returns
    -------
    Redundancy
        One flag and one ``via`` activity per link, in the network's link order, and
        whether the search was exact (at most ``exact_limit`` activities).

    References
    ----------
    A. V. Aho, M. R. Garey and J. D. Ullman, "The transitive reduction of a directed
    graph", SIAM Journal on Computing 1(2), 1972.

    Examples
    --------
    >>> import pandas as pd
    >>> from delay.network import compile_network
    >>> acts = pd.DataFrame({"id": ["A", "B", "C"]})
    >>> links = pd.DataFrame({"pred": ["A", "B", "A"], "succ": ["B", "C", "C"], "type": "FS", "lag": 0})
    >>> redundant_links(compile_network(acts, links), np.array([1, 1, 1])).redundant.tolist()
    [False, False, True]
    """
    n, m = network.size, network.link_count
    pred, succ = network.pred, network.succ
    duration = np.ascontiguousarray(duration, dtype=np.int64)
    lag = np.ascontiguousarray(network.lag, dtype=np.int64)
    redundant = np.zeros(m, dtype=np.bool_)
    via = np.full(m, -1, dtype=np.int64)
    searched = np.flatnonzero((network.link_type == 0) & (lag >= 0)).astype(np.int64)
    exact = n <= exact_limit
    if searched.size < 2:
        return Redundancy(redundant, via, exact)
    out_ptr, out_succ, out_link = _out_adjacency(n, pred, succ, searched)
    if not exact:
        keys = pred[searched] * np.int64(n) + succ[searched]
        order = np.argsort(keys)
        _kernels.two_link_paths(
            out_ptr,
            out_succ,
            out_link,
            lag,
            duration,
            np.ascontiguousarray(keys[order]),
            np.ascontiguousarray(searched[order]),
            n,
            redundant,
            via,
        )
        return Redundancy(redundant, via, exact)

    indegree = np.bincount(succ[searched], minlength=n)
    targets = np.flatnonzero(indegree >= 2)
    target_column = np.full(n, -1, dtype=np.int64)
    target_column[targets] = np.arange(targets.size)
    total_words = (targets.size + 63) // 64
    words = int(max(1, min(total_words, bit_budget_words // max(n, 1))))
    implied = np.zeros(m, dtype=np.bool_)
    order = np.ascontiguousarray(network.order, dtype=np.int64)
    for first_word in range(0, total_words, words):
        reach = np.zeros((n, words), dtype=np.uint64)
        _kernels.reach_chunk(order, out_ptr, out_succ, target_column, first_word * 64, words, reach)
        _kernels.mark_implied(
            n, out_ptr, out_succ, out_link, target_column, first_word * 64, words, reach, implied, via
        )
    # A link of lag 0 is implied by any path; one with a positive lag needs a path whose
    # implied lag is at least its own.
    positive = np.flatnonzero(implied & (lag > 0))
    redundant[:] = implied
    if positive.size:
        grouped = positive[np.argsort(succ[positive], kind="stable")]
        ends, starts = np.unique(succ[grouped], return_index=True)
        group_ptr = np.append(starts, grouped.size).astype(np.int64)
        best = np.full(m, _kernels.NO_PATH, dtype=np.int64)
        through = np.full(m, -1, dtype=np.int64)
        _kernels.longest_implied_lag(
            order,
            np.ascontiguousarray(network.rank, dtype=np.int64),
            out_ptr,
            out_succ,
            out_link,
            lag,
            duration,
            ends.astype(np.int64),
            group_ptr,
            np.ascontiguousarray(grouped, dtype=np.int64),
            pred,
            best,
            through,
        )
        enough = best[positive] >= lag[positive]
        redundant[positive] = enough
        via[positive] = np.where(enough, through[positive], -1)
    via[~redundant] = -1
    return Redundancy(redundant, via, exact)
