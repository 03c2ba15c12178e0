"""Collecting the problems of a case before raising one :class:`CaseError`.

Checks are whole-column operations that produce a boolean mask of bad rows; only the rows
already known to be bad are turned into :class:`~delay.errors.Problem` records, and at most
:data:`~delay.errors.MAX_PROBLEMS_PER_FILE` of them per file reach the user.
"""

from __future__ import annotations

from collections import Counter
from collections.abc import Callable
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np
import pandas as pd

from delay.errors import MAX_PROBLEMS_PER_FILE, CaseError, Problem

__all__ = ["RawTable", "Problems"]


@dataclass
class RawTable:
    """A table as read, before typing: every cell is a stripped string (blank is ``""``).

    Parameters
    ----------
    name : str
        The table's name in the case format (``"activities"``, ``"links"``, ...), the key
        of :data:`delay.model.COLUMNS`.
    file : str
        The file (or ``case.xlsx:sheet``) as problems name it.
    frame : pandas.DataFrame
        The cells, all text.
    rows : numpy.ndarray
        For each row of ``frame`` (by position), the spreadsheet row it came from (the
        header is row 1). A row added by a correction has a negative code here.
    path : pathlib.Path or None, optional
        The file on disk, when there is one.
    origins : dict of int to (str, int), optional
        For each negative code in ``rows``, the (file, row) of the correction that added
        the row.
    present : bool, optional
        ``False`` for the empty stand-in of an optional file that the case does not have.
    date_format : str, optional
        How the file writes dates ([input] of case.toml): a strptime format; ISO dates are
        understood too.
    decimal : str, optional
        The file's decimal mark, ``"."`` or ``","``.

    Examples
    --------
    >>> import numpy as np, pandas as pd
    >>> table = RawTable("links", "links.csv", pd.DataFrame({"pred": ["A"], "succ": ["B"]}), np.array([2]))
    >>> len(table), table.where(0)
    (1, ('links.csv', 2))
    """

    name: str
    file: str
    frame: pd.DataFrame
    rows: np.ndarray
    path: Path | None = None
    origins: dict[int, tuple[str, int]] = field(default_factory=dict)
    #: False for the empty stand-in of an optional file that the case does not have.
    present: bool = True
    #: How the file writes dates and numbers ([input] of case.toml): ``date_format`` is a
    #: strptime format (ISO dates are understood too), ``decimal`` the decimal mark.
    date_format: str = "%Y-%m-%d"
    decimal: str = "."
    #: The blank-cell masks found so far, by column (see :meth:`blank`).
    _blanks: dict[str, np.ndarray] = field(default_factory=dict, init=False, repr=False, compare=False)
    #: The distinct texts found so far, by column (see :meth:`distinct`).
    _distinct: dict[str, tuple[np.ndarray, np.ndarray]] = field(
        default_factory=dict, init=False, repr=False, compare=False
    )

    def __setattr__(self, name: str, value) -> None:
        if name == "frame":  # a new frame: nothing found for the old one holds for it
            self.__dict__.setdefault("_blanks", {}).clear()
            self.__dict__.setdefault("_distinct", {}).clear()
        object.__setattr__(self, name, value)

    def __len__(self) -> int:
        return len(self.frame)

    def blank(self, column: str) -> np.ndarray:
        """Mask of the blank cells of ``column``, found once and kept.

        Several checks look at the blank cells of one column; the comparison of every
        cell with ``""`` is made only the first time. A cell is changed through
        :meth:`set_cell` (or the whole :attr:`frame` replaced), which forgets the mask.

        Parameters
        ----------
        column : str
            One of the table's columns.

        Returns
        -------
        numpy.ndarray
            One boolean per row, true where the cell is ``""`` (read-only: copy it to
            change it).
        """
        mask = self._blanks.get(column)
        if mask is None:
            found = self._distinct.get(column)
            if found is not None:  # the blank text is one of the distinct ones, or none
                codes, texts = found
                where_blank = np.flatnonzero(texts == "")
                mask = codes == where_blank[0] if where_blank.size else np.zeros(len(codes), dtype=bool)
            else:
                mask = self.frame[column].to_numpy() == ""
            mask.flags.writeable = False
            self._blanks[column] = mask
        return mask

    def distinct(self, column: str) -> tuple[np.ndarray, np.ndarray]:
        """The distinct texts of ``column`` and each cell's number among them, found once.

        A check that depends on a cell's text alone is made once per distinct text and
        carried to the cells through the numbers: a column of durations or link types
        holds few.

        Parameters
        ----------
        column : str
            One of the table's columns.

        Returns
        -------
        codes : numpy.ndarray
            For each row, the position of its text in ``texts``.
        texts : numpy.ndarray
            The distinct texts (``object``), in the order they first appear.
        """
        found = self._distinct.get(column)
        if found is None:
            codes, texts = pd.factorize(self.frame[column].to_numpy(dtype=object))
            codes.flags.writeable = False
            found = self._distinct[column] = (codes, np.asarray(texts, dtype=object))
        return found

    def remember_blank(self, column: str, mask: np.ndarray) -> None:
        """Keep the mask of the blank cells of ``column``, found while reading the table.

        Parameters
        ----------
        column : str
            One of the table's columns.
        mask : numpy.ndarray
            One boolean per row, true where the cell is ``""``.
        """
        mask = np.asarray(mask, dtype=bool)
        mask.flags.writeable = False
        self._blanks[column] = mask

    def set_cell(self, position: int, column: str, value: str) -> None:
        """Write one cell (the row at ``position``, from 0, in ``column``).

        Parameters
        ----------
        position : int
            The row's position in :attr:`frame`.
        column : str
            One of the table's columns.
        value : str
            The cell's new text.
        """
        self.frame.loc[position, column] = value
        self._blanks.pop(column, None)
        self._distinct.pop(column, None)

    def where(self, position: int) -> tuple[str, int]:
        """The (file, spreadsheet row) of the row at ``position``.

        Parameters
        ----------
        position : int
            The row's position in :attr:`frame` (0 for the first data row).

        Returns
        -------
        tuple of (str, int)
            This table's file and the row's spreadsheet row, or, for a row a correction
            added, the file and row of that correction.
        """
        row = int(self.rows[position])
        if row < 0:
            return self.origins[row]
        return self.file, row

    def ensure_columns(self, columns) -> None:
        """Add each missing column of ``columns`` as a blank column.

        Parameters
        ----------
        columns : iterable of str
            The column names the table must have; those already there are left as they
            are.
        """
        missing = [column for column in columns if column not in self.frame.columns]
        if not missing:
            return
        # One blank column, shared by every column added (copy-on-write: a change to one
        # of them copies it first), and its mask, known without looking.
        blank = pd.Series(np.full(len(self.frame), "", dtype=object), dtype="str", index=self.frame.index)
        every = np.ones(len(self.frame), dtype=bool)
        every.flags.writeable = False
        nothing_else = (np.zeros(len(self.frame), dtype=np.intp), np.array([""], dtype=object))
        nothing_else[0].flags.writeable = False
        for column in missing:
            self.frame[column] = blank
            self._blanks[column] = every
            self._distinct[column] = nothing_else

    def keep(self, mask: np.ndarray) -> None:
        """Keep only the rows where ``mask`` is true.

        :attr:`frame` is renumbered from 0; :attr:`rows` keeps each kept row's
        spreadsheet row.

        Parameters
        ----------
        mask : numpy.ndarray
            One boolean per row of :attr:`frame`.
        """
        self.frame = self.frame.loc[mask].reset_index(drop=True)  # forgets the masks
        self.rows = self.rows[mask]


Message = str | Callable[[int], str]


class Problems:
    """Every problem found so far, grouped by file.

    At most :data:`~delay.errors.MAX_PROBLEMS_PER_FILE` problems are kept per file; the
    rest are counted. :meth:`raise_if_any` turns them into one
    :class:`~delay.errors.CaseError`.

    Examples
    --------
    >>> import numpy as np, pandas as pd
    >>> table = RawTable("links", "links.csv", pd.DataFrame({"pred": ["A", ""]}), np.array([2, 3]))
    >>> problems = Problems()
    >>> problems.flag(table, table.frame["pred"].to_numpy() == "", "pred", "the predecessor is missing")
    1
    >>> problems.raise_if_any()
    Traceback (most recent call last):
    ...
    delay.errors.CaseError: links.csv, row 3, column 'pred': the predecessor is missing
    """

    def __init__(self) -> None:
        self._items: list[Problem] = []
        self._found: Counter[str] = Counter()
        #: (file, row, column) of every cell set by a correction -> row of corrections.csv
        self.corrected_cells: dict[tuple[str, int, str], int] = {}

    def __bool__(self) -> bool:
        return bool(self._items)

    def count(self, file: str | None = None) -> int:
        """How many problems were found (in ``file``, or in all files).

        Parameters
        ----------
        file : str or None, optional
            The file to count; ``None`` counts every file.

        Returns
        -------
        int
            The problems found, listed or not (beyond the per-file cap they are only
            counted).
        """
        if file is None:
            return sum(self._found.values())
        return self._found[file]

    def add(self, file: str, message: str, fix: str = "", row: int | None = None, column: str | None = None) -> None:
        """Record one problem.

        Beyond :data:`~delay.errors.MAX_PROBLEMS_PER_FILE` problems in ``file`` the problem
        is only counted. When the cell was set by a correction, the message says which row
        of corrections.csv set it.

        Parameters
        ----------
        file : str
            The file (or ``case.xlsx:sheet``) the problem is in.
        message : str
            What is wrong, in plain words.
        fix : str, optional
            What the user should do.
        row : int or None, optional
            Spreadsheet row (header = 1), or ``None`` when the problem is not in a row.
        column : str or None, optional
            The column, or ``None``.
        """
        self._found[file] += 1
        if self._found[file] > MAX_PROBLEMS_PER_FILE:
            return
        if row is not None and column is not None:
            source = self.corrected_cells.get((file, row, column))
            if source is not None:
                message += f" (the value was set by corrections.csv row {source})"
        self._items.append(Problem(file=file, message=message, fix=fix, row=row, column=column))

    def full(self, file: str) -> bool:
        """Whether ``file`` already has as many problems as can be listed.

        Parameters
        ----------
        file : str
            The file (or ``case.xlsx:sheet``).

        Returns
        -------
        bool
            ``True`` when ``file`` has :data:`~delay.errors.MAX_PROBLEMS_PER_FILE`
            problems or more.
        """
        return self._found[file] >= MAX_PROBLEMS_PER_FILE

    def more(self, file: str, count: int) -> None:
        """Count ``count`` further problems of ``file`` that will not be listed.

        Parameters
        ----------
        file : str
            The file (or ``case.xlsx:sheet``).
        count : int
            How many problems to add to its count.
        """
        self._found[file] += count

    def flag(self, table: RawTable, mask, column: str | None, message: Message, fix: Message = "") -> int:
        """Record a problem for every row of ``table`` where ``mask`` is true.

        Only as many messages are built as can still be listed; the other rows are counted.

        Parameters
        ----------
        table : RawTable
            The table checked.
        mask : array_like of bool
            One value per row of ``table``: true for a bad row.
        column : str or None
            The column the problems are in, or ``None``.
        message : str or callable
            What is wrong: text, in which ``{value}`` stands for the row's cell in
            ``column``, or a function of the row's position returning the text.
        fix : str or callable, optional
            What to do, in the same forms as ``message``.

        Returns
        -------
        int
            The number of bad rows (listed or not).
        """
        mask = np.asarray(mask, dtype=bool)
        bad = np.flatnonzero(mask)
        if not bad.size:
            return 0
        values = table.frame[column] if column is not None and column in table.frame else None
        # Only as many rows as can still be listed are turned into messages.
        for number, position in enumerate(bad):
            file, row = table.where(int(position))
            if self._found[file] >= MAX_PROBLEMS_PER_FILE:
                # Count the rest of this check's rows without building their messages.
                self._found[file] += bad.size - number
                break
            value = "" if values is None else values.iat[int(position)]
            text = message(int(position)) if callable(message) else message.format(value=value)
            advice = fix(int(position)) if callable(fix) else fix.format(value=value)
            self.add(file, text, advice, row, column)
        return int(bad.size)

    def raise_if_any(self) -> None:
        """Raise one :class:`CaseError` holding every problem, listed file by file.

        Within a file the problems are sorted by row. A file with more problems than
        :data:`MAX_PROBLEMS_PER_FILE` lists the first ones and a last line saying how many
        more there are, so that no file lists more than that many lines. Nothing happens
        when no problem was found.

        Raises
        ------
        CaseError
            When at least one problem was recorded.
        """
        if not self._items:
            return
        files: dict[str, list[Problem]] = {}
        for problem in self._items:
            files.setdefault(problem.file, []).append(problem)
        listed: list[Problem] = []
        for file, problems in files.items():
            problems.sort(key=lambda p: -1 if p.row is None else p.row)
            found = self._found[file]
            if found > MAX_PROBLEMS_PER_FILE:
                shown = MAX_PROBLEMS_PER_FILE - 1
                problems = problems[:shown]
                problems.append(
                    Problem(
                        file=file,
                        message=f"{found - shown} more problems in this file are not listed",
                        fix="fix the problems listed above and check the case again",
                    )
                )
            listed.extend(problems)
        raise CaseError(listed)
