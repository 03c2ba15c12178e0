"""A programme's logic compiled to integer arrays.

Activities are numbered ``0 .. n-1`` in input order; links keep their input order too.
:class:`Network` holds the link arrays (``pred``, ``succ``, ``link_type``, ``lag``), the
compressed in- and out-adjacency (CSR) and a topological order of the activities, which is
what the CPM passes walk: every predecessor of an activity comes before it.

Link types are coded ``FS = 0``, ``SS = 1``, ``FF = 2``, ``SF = 3``: bit 1 of the code says the
link bounds the successor's finish (FF, SF), and ``code in (0, 2)`` says it reads the
predecessor's finish (FS, FF).
"""

from __future__ import annotations

import dataclasses
from collections import ChainMap
from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from functools import cached_property

import numpy as np
import pandas as pd

from .errors import CaseError, Problem
from .model import LINK_TYPES

__all__ = [
    "Network",
    "PassLayout",
    "compile_network",
    "build_network",
    "sorted_network",
    "LINK_CODES",
    "reads_finish",
    "bounds_finish",
]

LINK_CODES = {name: code for code, name in enumerate(LINK_TYPES)}  # FS 0, SS 1, FF 2, SF 3


def reads_finish(link_type: np.ndarray) -> np.ndarray:
    """Tell for each link whether it reads its predecessor's finish (FS, FF).

    Parameters
    ----------
    link_type : numpy.ndarray
        Link type codes: FS 0, SS 1, FF 2, SF 3.

    Returns
    -------
    numpy.ndarray
        Boolean, one per link.

    Examples
    --------
    >>> reads_finish(np.array([0, 1, 2, 3])).tolist()
    [True, False, True, False]
    """
    return (np.asarray(link_type) == 0) | (np.asarray(link_type) == 2)


def bounds_finish(link_type: np.ndarray) -> np.ndarray:
    """Tell for each link whether it bounds its successor's finish (FF, SF).

    Parameters
    ----------
    link_type : numpy.ndarray
        Link type codes: FS 0, SS 1, FF 2, SF 3.

    Returns
    -------
    numpy.ndarray
        Boolean, one per link.

    Examples
    --------
    >>> bounds_finish(np.array([0, 1, 2, 3])).tolist()
    [False, False, True, True]
    """
    return np.asarray(link_type) >= 2


@dataclass(frozen=True, eq=False)
class Network:
    """Activities and links as arrays.

    Made by :func:`build_network` (or :func:`compile_network` from case tables), which
    checks the logic for loops and finds the topological order. The layout copies link
    types and lags: vary a network through :meth:`with_lags` and :meth:`extended`, not
    ``dataclasses.replace``.

    Parameters
    ----------
    ids : numpy.ndarray
        ``object`` array of activity ids, shape ``(n,)``.
    pred : numpy.ndarray
        ``int64`` array, shape ``(m,)``: the activity number of each link's predecessor.
    succ : numpy.ndarray
        ``int64`` array, shape ``(m,)``: the activity number of each link's successor.
    link_type : numpy.ndarray
        ``int8`` array, shape ``(m,)``: FS 0, SS 1, FF 2, SF 3.
    lag : numpy.ndarray
        ``int64`` array, shape ``(m,)``: lag in work days (negative: a lead).
    order : numpy.ndarray
        ``int64`` array, shape ``(n,)``: the activities in a topological order.
    rank : numpy.ndarray
        ``int64`` array, shape ``(n,)``: each activity's position in ``order``.
    out_ptr : numpy.ndarray
        ``int64`` array, shape ``(n + 1,)``: with ``out_link``, the links by predecessor
        (compressed rows): the links out of activity ``v`` are
        ``out_link[out_ptr[v]:out_ptr[v + 1]]``, in input order.
    out_link : numpy.ndarray
        ``int64`` array, shape ``(m,)``: link numbers grouped by predecessor.
    passes : PassLayout
        The links laid out for the CPM passes.

    Attributes
    ----------
    size : int
        The number of activities, ``n``.
    link_count : int
        The number of links, ``m``.
    index : pandas.Index
        The activity ids as an index (built once per network).
    in_ptr, in_link : numpy.ndarray
        The same as ``out_ptr`` and ``out_link`` by successor (built on first use).
    has_predecessor : numpy.ndarray
        Whether each activity has at least one link into it.

    Examples
    --------
    >>> net = build_network(np.array(["A", "B", "C"], dtype=object), [0, 1], [1, 2], [0, 0], [0, 3])
    >>> net.size, net.link_count, net.order.tolist()
    (3, 2, [0, 1, 2])
    """

    ids: np.ndarray
    pred: np.ndarray
    succ: np.ndarray
    link_type: np.ndarray
    lag: np.ndarray
    order: np.ndarray
    rank: np.ndarray
    out_ptr: np.ndarray
    out_link: np.ndarray
    passes: PassLayout

    @property
    def size(self) -> int:
        """The number of activities, ``n``."""
        return int(self.ids.size)

    @property
    def link_count(self) -> int:
        """The number of links, ``m``."""
        return int(self.pred.size)

    @cached_property
    def index(self) -> pd.Index:
        """The activity ids as an index (built once per network)."""
        return pd.Index(self.ids)

    @cached_property
    def _in_rows(self) -> tuple[np.ndarray, np.ndarray]:
        from ._kernels import compressed_rows

        return compressed_rows(self.size, self.succ)

    @property
    def in_ptr(self) -> np.ndarray:
        """Row starts of the links by successor, shape ``(n + 1,)`` (built on first use)."""
        return self._in_rows[0]

    @property
    def in_link(self) -> np.ndarray:
        """Link numbers grouped by successor, in input order within one (built on first use)."""
        return self._in_rows[1]

    @cached_property
    def has_predecessor(self) -> np.ndarray:
        """Whether each activity has at least one link into it."""
        has = np.zeros(self.size, dtype=bool)
        has[self.order] = np.diff(self.passes.f_ptr) > 0
        return has

    def upstream(self, activities, links: np.ndarray | None = None) -> np.ndarray:
        """Mark the activities from which a chain of links leads to any of ``activities``.

        Parameters
        ----------
        activities : array_like of int
            Activity numbers.
        links : numpy.ndarray, optional
            Boolean mask over the links (link order): only the links where it is true are
            followed. By default every link is.

        Returns
        -------
        numpy.ndarray
            Boolean mask over the activities (activity order), ``activities`` included.

        Examples
        --------
        >>> net = build_network(np.array(["A", "B", "C"], dtype=object), [0, 1], [1, 2], [0, 0], [0, 0])
        >>> net.upstream([1]).tolist()
        [True, True, False]
        """
        from ._kernels import mark_upstream

        on = np.zeros(self.size, dtype=bool)
        on[self.rank[np.asarray(activities, dtype=np.int64)]] = True
        usable = np.ones(self.link_count, dtype=bool) if links is None else np.asarray(links, dtype=bool)
        layout = self.passes
        mark_upstream(
            layout.f_ptr,
            layout.f_pred,
            layout.f_type,
            layout.f_link,
            usable,
            False,
            np.empty(0, dtype=np.int8),
            np.empty(0, dtype=np.int64),
            on,
        )
        found = np.zeros(self.size, dtype=bool)
        found[self.order] = on
        return found

    @cached_property
    def _number(self) -> dict[str, int]:
        return {name: number for number, name in enumerate(self.ids.tolist())}

    def numbers_of(self, ids: Sequence[str], added: Mapping[str, int] | None = None) -> np.ndarray:
        """Activity numbers of a few ids by a dictionary built once per network (a what-if
        names a handful; :meth:`index_of` is for whole columns); ``-1`` for an unknown id.

        Parameters
        ----------
        ids : sequence of str
            Activity ids.
        added : mapping of str to int, optional
            Numbers of activities beyond this network's (a what-if's added activities).

        Returns
        -------
        numpy.ndarray
            ``int64``, one number per id.
        """
        number, more = self._number, added or {}
        return np.fromiter((number.get(i, more.get(i, -1)) for i in ids), dtype=np.int64, count=len(ids))

    def index_of(self, ids) -> np.ndarray:
        """Look up the activity numbers of ids.

        Parameters
        ----------
        ids : str or iterable of str
            One id or several.

        Returns
        -------
        numpy.ndarray
            One activity number per id (an array of one for a single id); ``-1`` for an
            unknown id.

        Examples
        --------
        >>> net = build_network(np.array(["A", "B", "C"], dtype=object), [0, 1], [1, 2], [0, 0], [0, 0])
        >>> net.index_of(["C", "X"]).tolist(), net.index_of("B").tolist()
        ([2, -1], [1])
        """
        if isinstance(ids, np.ndarray) and ids.shape == self.ids.shape and np.array_equal(ids, self.ids):
            return np.arange(self.size)  # another schedule of the same activities: nothing to look up
        ids = [ids] if isinstance(ids, str) else list(ids)
        if len(ids) <= 64:  # a few ids: a dictionary look-up each, no index built
            return self.numbers_of([str(i) for i in ids])
        return self.index.get_indexer(pd.Index(ids))

    def predecessor_count(self) -> np.ndarray:
        """Count the links into each activity.

        Returns
        -------
        numpy.ndarray
            ``int64``, one per activity (activity order).
        """
        return np.bincount(self.succ, minlength=self.size)

    def successor_count(self) -> np.ndarray:
        """Count the links out of each activity.

        Returns
        -------
        numpy.ndarray
            ``int64``, one per activity (activity order).
        """
        return np.bincount(self.pred, minlength=self.size)

    def with_lags(self, lag) -> Network:
        """Make the same network with other lags.

        The order and the layout are kept; only the lags are copied in (the whole layout
        is built again when a lag no longer fits its 32-bit numbers).

        Parameters
        ----------
        lag : array_like of int
            One lag per link, in link order, in work days.

        Returns
        -------
        Network
            The new network; this one does not change.

        Examples
        --------
        >>> net = build_network(np.array(["A", "B"], dtype=object), [0], [1], [0], [0])
        >>> net.with_lags([4]).lag.tolist(), net.lag.tolist()
        ([4], [0])
        """
        lag = np.ascontiguousarray(lag, dtype=np.int64)
        layout = self.passes
        number = _layout_number(self.size, lag)
        if number != layout.f_lag.dtype:
            return build_network(self.ids, self.pred, self.succ, self.link_type, lag)
        passes = dataclasses.replace(
            layout, f_lag=lag[layout.f_link].astype(number), b_lag=lag[layout.b_link].astype(number)
        )
        return dataclasses.replace(self, lag=lag, passes=passes)

    def extended(self, new_ids=(), pred=(), succ=(), link_type=(), lag=(), source="fragnet"):
        """Make a new network with activities and links added (a fragnet, an added link).

        Parameters
        ----------
        new_ids : iterable of str, optional
            Ids of the activities added; they are numbered after the existing ones, in
            this order.
        pred : array_like of int, optional
            The added links' predecessors, as activity numbers in the extended numbering
            (existing activities keep theirs).
        succ : array_like of int, optional
            The added links' successors, likewise.
        link_type : array_like of int, optional
            The added links' type codes (FS 0, SS 1, FF 2, SF 3).
        lag : array_like of int, optional
            The added links' lags in work days.
        source : str, default "fragnet"
            What the problem names as the file when the additions close a loop.

        Returns
        -------
        Network
            The extended network, its order and layout built anew.

        Raises
        ------
        CaseError
            When the additions close a logic loop; the message names the activities in it.

        Examples
        --------
        >>> net = build_network(np.array(["A", "B"], dtype=object), [0], [1], [0], [0])
        >>> net.extended(["C"], pred=[1], succ=[2], link_type=[0], lag=[0]).order.tolist()
        [0, 1, 2]
        """
        ids = np.concatenate([self.ids, np.asarray(list(new_ids), dtype=object)])
        all_pred = np.concatenate([self.pred, np.asarray(pred, dtype=np.int64)])
        all_succ = np.concatenate([self.succ, np.asarray(succ, dtype=np.int64)])
        all_type = np.concatenate([self.link_type, np.asarray(link_type, dtype=np.int8)])
        all_lag = np.concatenate([self.lag, np.asarray(lag, dtype=np.int64)])
        network = build_network(ids, all_pred, all_succ, all_type, all_lag, source)
        if "_number" in self.__dict__:  # the existing activities keep their numbers: extend the look-up
            number = self._number
            first, *rest = number.maps if isinstance(number, ChainMap) else ({}, number)
            more = {**first, **{str(name): self.size + k for k, name in enumerate(new_ids)}}
            network.__dict__["_number"] = ChainMap(more, *rest)  # the added ids, then the parent's look-up
        return network


@dataclass(frozen=True, eq=False)
class PassLayout:
    """A network's links in the order the CPM passes read them.

    Built by :func:`delay._kernels.order_and_layout`: activities by topological position
    ``i`` (activity ``order[i]``), the links into each position in ``f_*`` (the forward
    pass) and out of it in ``b_*`` (the backward pass). Position, link and lag arrays are
    ``int32`` where every value fits, else ``int64``.

    Parameters
    ----------
    f_ptr : numpy.ndarray
        Shape ``(n + 1,)``: the links into position ``i`` are entries
        ``f_ptr[i]:f_ptr[i + 1]`` of the other ``f_*`` arrays.
    f_pred : numpy.ndarray
        The predecessor of each of those links, by topological position.
    f_type : numpy.ndarray
        Its link type code (``int8``).
    f_lag : numpy.ndarray
        Its lag in work days.
    f_link : numpy.ndarray
        Its link number (link order).
    b_ptr : numpy.ndarray
        Shape ``(n + 1,)``: the links out of position ``i`` are entries
        ``b_ptr[i]:b_ptr[i + 1]`` of the other ``b_*`` arrays.
    b_succ : numpy.ndarray
        The successor of each of those links, by topological position.
    b_type : numpy.ndarray
        Its link type code (``int8``).
    b_lag : numpy.ndarray
        Its lag in work days.
    b_link : numpy.ndarray
        Its link number (link order).

    Attributes
    ----------
    forward : tuple of numpy.ndarray
        ``(f_ptr, f_pred, f_type, f_lag)``, the forward pass's arguments.
    backward : tuple of numpy.ndarray
        ``(b_ptr, b_succ, b_type, b_lag)``, the backward pass's arguments.
    """

    f_ptr: np.ndarray
    f_pred: np.ndarray
    f_type: np.ndarray
    f_lag: np.ndarray
    f_link: np.ndarray
    b_ptr: np.ndarray
    b_succ: np.ndarray
    b_type: np.ndarray
    b_lag: np.ndarray
    b_link: np.ndarray

    @property
    def forward(self) -> tuple:
        """``(f_ptr, f_pred, f_type, f_lag)``, the forward pass's arguments."""
        return self.f_ptr, self.f_pred, self.f_type, self.f_lag

    @property
    def backward(self) -> tuple:
        """``(b_ptr, b_succ, b_type, b_lag)``, the backward pass's arguments."""
        return self.b_ptr, self.b_succ, self.b_type, self.b_lag


def _loop_problem(ids, pred, succ, source) -> Problem:
    from .graph import find_loop

    loop = find_loop(len(ids), pred, succ) or []
    names = [str(ids[i]) for i in loop]
    chain = " -> ".join(names + names[:1])
    return Problem(
        file=source,
        message=f"logic loop: {chain}",
        fix="remove or reverse one of the links in the loop",
    )


def _layout_number(n: int, lag: np.ndarray):
    """32-bit numbers in the pass layout where they fit (always, in practice): less memory
    for the passes to read."""
    fits = max(n, lag.size) < 2**31 and (not lag.size or -(2**31) < int(lag.min()) and int(lag.max()) < 2**31)
    return np.int32 if fits else np.int64


def build_network(ids, pred, succ, link_type, lag, source="links.csv") -> Network:
    """Build a Network from arrays: its topological order and the passes' layout.

    Parameters
    ----------
    ids : numpy.ndarray
        ``object`` array of activity ids; the activities are numbered in this order.
    pred : array_like of int
        Each link's predecessor (activity number).
    succ : array_like of int
        Each link's successor (activity number).
    link_type : array_like of int
        Each link's type code: FS 0, SS 1, FF 2, SF 3.
    lag : array_like of int
        Each link's lag in work days (negative: a lead).
    source : str, default "links.csv"
        The file the problem names when the links form a loop.

    Returns
    -------
    Network
        The compiled network.

    Raises
    ------
    CaseError
        When the links form a loop; the message names every activity in it, in order.

    Examples
    --------
    >>> ids = np.array(["A", "B", "C"], dtype=object)
    >>> build_network(ids, pred=[2, 0], succ=[1, 2], link_type=[0, 0], lag=[0, 0]).order.tolist()
    [0, 2, 1]
    >>> build_network(ids[:2], pred=[0, 1], succ=[1, 0], link_type=[0, 0], lag=[0, 0])
    Traceback (most recent call last):
    ...
    delay.errors.CaseError: links.csv: logic loop: A -> B -> A - remove or reverse one of the links in the loop
    """
    network = sorted_network(ids, pred, succ, link_type, lag)
    if network is None:
        raise CaseError(_loop_problem(ids, pred, succ, source))
    return network


def sorted_network(ids, pred, succ, link_type, lag) -> Network | None:
    """Build a Network like :func:`build_network`, or give ``None`` when the links form a loop.

    The case loader's loop check: it names the loop itself, at the row of the file.

    Parameters
    ----------
    ids : numpy.ndarray
        ``object`` array of activity ids.
    pred : array_like of int
        Each link's predecessor (activity number).
    succ : array_like of int
        Each link's successor (activity number).
    link_type : array_like of int
        Each link's type code: FS 0, SS 1, FF 2, SF 3.
    lag : array_like of int
        Each link's lag in work days.

    Returns
    -------
    Network or None
        The network, or ``None`` when the links form a loop.

    Examples
    --------
    >>> print(sorted_network(np.array(["A", "B"], dtype=object), [0, 1], [1, 0], [0, 0], [0, 0]))
    None
    """
    from ._kernels import order_and_layout

    n = len(ids)
    pred = np.ascontiguousarray(pred, dtype=np.int64)
    succ = np.ascontiguousarray(succ, dtype=np.int64)
    lag = np.ascontiguousarray(lag, dtype=np.int64)
    m = pred.size
    number = _layout_number(n, lag)
    out_ptr = np.zeros(n + 1, dtype=np.int64)
    out_link = np.empty(m, dtype=np.int64)
    order = np.empty(n, dtype=np.int64)
    rank = np.empty(n, dtype=np.int64)
    layout = dict(
        f_ptr=np.empty(n + 1, dtype=np.int64),
        f_pred=np.empty(m, dtype=number),
        f_type=np.empty(m, dtype=np.int8),
        f_lag=np.empty(m, dtype=number),
        f_link=np.empty(m, dtype=number),
        b_ptr=np.empty(n + 1, dtype=np.int64),
        b_succ=np.empty(m, dtype=number),
        b_type=np.empty(m, dtype=np.int8),
        b_lag=np.empty(m, dtype=number),
        b_link=np.empty(m, dtype=number),
    )
    link_type = np.ascontiguousarray(link_type, dtype=np.int8)
    placed = order_and_layout(n, pred, succ, link_type, lag, out_ptr, out_link, order, rank, *layout.values())
    if placed < n:
        return None
    return Network(
        ids=ids,
        pred=pred,
        succ=succ,
        link_type=link_type,
        lag=lag,
        order=order,
        rank=rank,
        out_ptr=out_ptr,
        out_link=out_link,
        passes=PassLayout(**layout),
    )


def compile_network(
    activities: pd.DataFrame,
    links: pd.DataFrame,
    source: str = "links.csv",
    link_numbers: tuple[np.ndarray, np.ndarray] | None = None,
    type_codes: np.ndarray | None = None,
) -> Network:
    """Compile an activities table and a links table (case-format columns) to a Network.

    Parameters
    ----------
    activities : DataFrame
        The activities, with column ``id``; they are numbered in row order.
    links : DataFrame
        The links, with columns ``pred``, ``succ``, ``type``, ``lag`` (work days); ids must
        be known (the case loader has checked them).
    source : str, default "links.csv"
        File named in the problem when the logic has a loop, a link names an unknown
        activity or has an unknown type.
    link_numbers : tuple of numpy.ndarray, optional
        The activity numbers of each link's ends when already known
        (:attr:`delay.model.Snapshot.link_numbers`).
    type_codes : numpy.ndarray, optional
        Each link's position in ``LINK_TYPES`` when already known (the case loader finds
        them while checking the links).

    Returns
    -------
    Network
        The compiled network.

    Raises
    ------
    CaseError
        When the links form a loop (the message names every activity in it, in order),
        name an activity that is not in ``activities`` or have a type other than FS, SS,
        FF and SF (the problem names the row, counting the header as row 1).

    Examples
    --------
    >>> acts = pd.DataFrame({"id": ["A", "B"]})
    >>> net = compile_network(acts, pd.DataFrame({"pred": ["A"], "succ": ["B"], "type": ["FS"], "lag": [0]}))
    >>> net.order.tolist()
    [0, 1]
    """
    ids = activities["id"].to_numpy(dtype=object)
    if link_numbers is None:
        index = pd.Index(ids)
        link_numbers = (index.get_indexer(links["pred"]), index.get_indexer(links["succ"]))
    pred = np.asarray(link_numbers[0], dtype=np.int64)
    succ = np.asarray(link_numbers[1], dtype=np.int64)
    unknown = np.flatnonzero((pred < 0) | (succ < 0))
    if unknown.size:
        row = int(unknown[0])
        raise CaseError(
            Problem(
                file=source,
                row=row + 2,
                column="pred" if pred[row] < 0 else "succ",
                message="link names an activity that is not in the programme",
                fix="correct the activity id or add the activity",
            )
        )
    codes = pd.Index(LINK_TYPES).get_indexer(links["type"]) if type_codes is None else np.asarray(type_codes)
    if (codes < 0).any():
        row = int(np.flatnonzero(codes < 0)[0])
        raise CaseError(
            Problem(
                file=source,
                row=row + 2,
                column="type",
                message=f"unknown link type '{links['type'].iloc[row]}'",
                fix="use FS, SS, FF or SF",
            )
        )
    link_type = codes.astype(np.int8)
    lag = links["lag"].to_numpy(dtype=np.int64)
    return build_network(ids, pred, succ, link_type, lag, source)
