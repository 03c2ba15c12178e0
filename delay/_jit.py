"""Loops over the logic, run as plain Python on small networks and compiled on large ones.

Each loop is written once, as a plain Python function over numpy arrays
(:mod:`delay._kernels`, :mod:`delay.checks._kernels`), and wrapped in a :class:`Kernel`.
Calling the kernel runs the plain function while the work is small, and the same function
compiled by numba (``numba.njit(cache=True)`` applied at first use) once it is large: a
six-activity case never imports numba, whose start-up (its import and the loading of the
cached machine code, about half a second) is far more than the loops cost in Python
there. The helper functions the loops call are registered with
``numba.extending.register_jitable`` at that moment, so that the compiled loops call
compiled helpers while the plain loops call the plain ones.

When to compile (``DELAY_KERNELS`` unset or ``auto``): a call whose work (activities plus
links) reaches :data:`LARGE`, or once the plain calls of the process have together done
:data:`BUDGET` of work (a long analysis of a small network: the half second of start-up
then pays for itself), or once anything was compiled. From then on every kernel runs
compiled. ``DELAY_KERNELS=python`` or ``compiled`` forces one way (the tests compare
them); :func:`kernel_mode` does the same for a block of code.

Compiled code is cached on disk: beside the package when its folder may be written, else
in the user's cache (``NUMBA_CACHE_DIR`` when set, or numba's per-user cache folder), which
numba chooses by itself, silently.
"""

from __future__ import annotations

import contextlib
import os
import threading

import numpy as np

__all__ = ["Kernel", "sized", "LARGE", "BUDGET", "kernel_mode", "compiled_in_use", "jitable"]

# Measured on 200 to 10,000 activities: a schedule's plain loops (the layout, both passes,
# the driving path) cost about 12 us per activity-plus-link, some 3 us per unit of work as
# counted here; numba's start-up (its import and the loading of the cached code) about
# 0.5 s, after which the same loops cost 0.1 us. So a call of 20,000 (a programme of some
# 6,000 activities) is about where compiling pays for itself at once, and 200,000 of plain
# work in all (0.6 s) is where a long analysis of a small programme has spent what
# compiling would have cost.
#: A single call with at least this much work (activities plus links) runs compiled.
LARGE = 20_000
#: Plain calls of one process doing this much work in all switch every kernel to compiled.
BUDGET = 200_000

_MODES = ("auto", "python", "compiled")
_state = {"mode": os.environ.get("DELAY_KERNELS", "auto").strip().lower() or "auto", "spent": 0, "compiled": False}
if _state["mode"] not in _MODES:
    _state["mode"] = "auto"
_lock = threading.Lock()
_helpers: list = []
_registered: set = set()


def jitable(function):
    """Mark ``function`` as a helper the kernels call.

    The helper stays plain Python as it is, and is registered with numba
    (``numba.extending.register_jitable``) when the kernels are first compiled, so that the
    compiled kernels call its compiled form.

    (Left to LLVM to inline: numba's own ``inline="always"`` measured no faster on the
    passes over 100,000 activities and trips an internal check of numba's on a helper with
    two returns.)

    Parameters
    ----------
    function : callable
        A plain function of scalars (and at most one array).

    Returns
    -------
    callable
        ``function`` itself.
    """
    _helpers.append(function)
    return function


def _register_helpers() -> None:
    from numba.extending import register_jitable

    for helper in _helpers:
        if helper not in _registered:
            register_jitable(helper)
            _registered.add(helper)


def _work(value) -> int:
    if isinstance(value, np.ndarray):
        return int(value.size)
    if isinstance(value, (int, np.integer)):
        return int(value)
    return 0


class Kernel:
    """One loop over the logic: its plain function, compiled by numba when it pays.

    Parameters
    ----------
    function : callable
        The loop, a plain Python function over numpy arrays and scalars that numba can
        compile in nopython mode.
    work : callable, optional
        The work of a call, from its arguments (a tuple). By default the size of the first
        two arguments (an array's length, or an integer's value): the activities and the
        links of the passes.
    """

    def __init__(self, function, work=None):
        self.function = function
        self.work = work
        self.__doc__ = function.__doc__
        self.__name__ = function.__name__
        self.__wrapped__ = function
        self._compiled = None

    def compiled(self):
        """Return the numba dispatcher of this kernel, made at its first use.

        The first call imports numba, registers the helpers marked :func:`jitable` and
        wraps the plain function in ``numba.njit(cache=True)``; the machine code is read
        from numba's on-disk cache, or compiled and cached. From then on every kernel of
        the process runs compiled in ``"auto"`` mode.

        Returns
        -------
        numba.core.registry.CPUDispatcher
            The compiled function, called with the same arguments as the plain one.
        """
        if self._compiled is None:
            with _lock:
                if self._compiled is None:
                    from numba import njit

                    _register_helpers()
                    self._compiled = njit(cache=True)(self.function)
                    _state["compiled"] = True
        return self._compiled

    def __call__(self, *args):
        mode = _state["mode"]
        if mode == "compiled" or (mode == "auto" and _compile_now(self, args)):
            return self.compiled()(*args)
        return self.function(*args)

    def __repr__(self) -> str:
        return f"<kernel {self.__name__}>"


def sized(work):
    """Make a :class:`Kernel` decorator with its own measure of work.

    See the ``work`` parameter of :class:`Kernel`.

    Parameters
    ----------
    work : callable
        The work of a call, from its arguments (a tuple).

    Returns
    -------
    callable
        The decorator: it takes the plain function and returns its :class:`Kernel`.

    Examples
    --------
    >>> @sized(lambda args: len(args[0]))
    ... def total(values):
    ...     return values.sum()
    >>> total
    <kernel total>
    >>> with kernel_mode("python"):  # the plain function, whatever ran before in the process
    ...     int(total(np.arange(4)))
    6
    """
    return lambda function: Kernel(function, work)


def _compile_now(kernel: Kernel, args) -> bool:
    if _state["compiled"]:
        return True
    if kernel.work is not None:
        work = int(kernel.work(args))
    else:
        work = _work(args[0]) + (_work(args[1]) if len(args) > 1 else 0)
    if work >= LARGE:
        return True
    _state["spent"] += work
    return _state["spent"] >= BUDGET


def compiled_in_use() -> bool:
    """Tell whether any kernel has been compiled (or read from the cache) in this process.

    Returns
    -------
    bool
        ``True`` once a kernel's :meth:`Kernel.compiled` has run.
    """
    return _state["compiled"]


@contextlib.contextmanager
def kernel_mode(mode: str):
    """Run the kernels one way inside the block: ``"python"``, ``"compiled"`` or ``"auto"``.

    Parameters
    ----------
    mode : str
        One of ``"auto"``, ``"python"``, ``"compiled"``.

    Yields
    ------
    None
        Nothing: the block runs in that mode, and the mode before is restored after it.

    Raises
    ------
    ValueError
        For another mode.

    Examples
    --------
    >>> with kernel_mode("python"):
    ...     pass
    """
    if mode not in _MODES:
        raise ValueError(f"mode must be one of {', '.join(_MODES)}")
    before = _state["mode"]
    _state["mode"] = mode
    try:
        yield
    finally:
        _state["mode"] = before
