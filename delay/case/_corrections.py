"""Applying corrections.csv to the tables as read, before they are typed and checked.

A correction changes one cell of an activity (by id) or of a link (by ``pred>succ``),
removes a link (``column = delete``) or adds one (``column = add``, ``value = TYPE LAG``).
Every applied correction becomes a :class:`~delay.model.Correction` with the original and
the corrected cell as text, so that the report can list each change beside the record it
changed. The corrected tables are then checked like any other; a problem in a corrected
cell says which row of corrections.csv set it.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import pandas as pd

from delay.case._problems import Problems, RawTable
from delay.model import COLUMNS, LINK_TYPES, Correction

__all__ = ["CorrectionTarget", "apply_corrections", "ASBUILT"]

#: The name that makes a correction apply to the as-built record.
ASBUILT = "asbuilt"


@dataclass
class CorrectionTarget:
    """What a correction's ``snapshot`` cell may name.

    Parameters
    ----------
    label : str
        The name stored in :attr:`Correction.snapshot` for a correction of this target.
    activities : RawTable or None
        The activities as read (for the as-built target, the as-built record); ``None``
        when the file could not be read.
    links : RawTable or None
        The links as read; ``None`` for the as-built target, which has no links, or when
        the file could not be read.
    asbuilt : bool, optional
        ``True`` for the as-built target.
    """

    label: str
    activities: RawTable | None
    links: RawTable | None
    asbuilt: bool = False


def _link_text(frame: pd.DataFrame, position: int) -> str:
    kind = frame["type"].iat[position] if "type" in frame else ""
    lag = frame["lag"].iat[position] if "lag" in frame else ""
    return f"{(kind or 'FS').upper()} {lag or '0'}"


def apply_corrections(
    corrections: RawTable, targets: dict[str, CorrectionTarget], problems: Problems
) -> list[Correction]:
    """Apply every row of ``corrections`` to the tables of ``targets``.

    Parameters
    ----------
    corrections : RawTable
        corrections.csv as read (its required columns present).
    targets : dict of str to CorrectionTarget
        Snapshot folder names and labels, and ``"asbuilt"``, mapped to their tables.
        Tables are changed in place.
    problems : Problems
        Where a correction that names no existing snapshot, record or column is recorded.

    Returns
    -------
    list of Correction
        The applied corrections, in file order.
    """
    applier = _Applier(corrections, targets, problems)
    frame = corrections.frame
    for position in range(len(frame)):
        _, row = corrections.where(position)
        cell = {c: frame[c].iat[position] for c in COLUMNS["corrections"] if c in frame}
        applier.apply(cell, row)
    return applier.applied


class _Applier:
    """The corrections of one file applied row by row; each problem names the row."""

    def __init__(self, corrections: RawTable, targets: dict[str, CorrectionTarget], problems: Problems):
        self.file = corrections.file
        self.targets = targets
        self.problems = problems
        self.applied: list[Correction] = []
        self.id_positions: dict[int, dict[str, int]] = {}
        self.next_code = -1  # the row number of an added link: negative, never one of a file
        self.known = ", ".join(sorted({t.label for t in targets.values() if not t.asbuilt})) or "none"
        self.row = 0

    def report(self, message: str, fix: str, column: str) -> None:
        self.problems.add(self.file, message, fix, row=self.row, column=column)

    def apply(self, cell: dict, row: int) -> None:
        """One row of corrections.csv (its cells by column)."""
        self.row = row
        found = self._table_of(cell)
        if found is None:
            return
        target, table_name, table = found
        record = "the as-built record" if target.asbuilt else f"snapshot '{target.label}'"
        key, column, value, reason = cell["key"], cell["column"], cell["value"], cell.get("reason", "")
        if table_name == "activities":
            self._activity(target, table, record, key, column, value, reason)
        else:
            self._link(target, table, record, key, column, value, reason)

    def _table_of(self, cell: dict):
        """The target, the table's name and the table a row corrects, or ``None`` (the
        problem reported) when the row names none that can be corrected."""
        snapshot, table_name = cell["snapshot"], cell["table"].lower()
        target = self.targets.get(ASBUILT if snapshot.lower() == ASBUILT else snapshot)
        if target is None:
            if snapshot.lower() == ASBUILT:
                self.report("there is no asbuilt.csv to correct", "add asbuilt.csv or remove the row", "snapshot")
            else:
                self.report(
                    f"there is no snapshot '{snapshot}'",
                    f"name a snapshot by its folder or label ({self.known}), or asbuilt",
                    "snapshot",
                )
            return None
        if table_name not in ("activities", "links"):
            self.report(f"'{cell['table']}' is not a table that can be corrected", "write activities or links", "table")
            return None
        if target.asbuilt and table_name == "links":
            self.report("the as-built record has no links", "correct the links of a snapshot instead", "table")
            return None
        if not cell["key"]:
            self.report("the key is blank", "give the activity id, or PRED>SUCC for a link", "key")
            return None
        table = target.activities if table_name == "activities" else target.links
        if table is None:
            return None  # the table itself could not be read; that problem is already listed
        return target, table_name, table

    def _set(self, table: RawTable, at: int, column: str, value: str):
        """Write one cell; the original cell's text is returned."""
        table.ensure_columns([column])
        original = table.frame[column].iat[at]
        table.set_cell(at, column, value)
        where = table.where(at)
        self.problems.corrected_cells[(where[0], where[1], column)] = self.row
        return original

    def _activity(self, target, table: RawTable, record: str, key, column, value, reason) -> None:
        if column == "id":
            self.report(
                "an activity's id cannot be corrected",
                "correct the id in the snapshot's own file, or correct other columns",
                "column",
            )
            return
        allowed = list(COLUMNS[table.name]) + list(table.frame.columns)
        if column not in allowed:
            self.report(
                f"there is no column '{column}' in the activities of {record}",
                "use one of: " + ", ".join(dict.fromkeys(allowed)),
                "column",
            )
            return
        index = self.id_positions.get(id(table))
        if index is None:
            ids = table.frame["id"].tolist() if "id" in table.frame else []
            index = {}
            for at, activity in enumerate(ids):
                index.setdefault(activity, at)
            self.id_positions[id(table)] = index
        at = index.get(key)
        if at is None:
            self.report(f"there is no activity '{key}' in {record}", "check the activity id in the key column", "key")
            return
        original = self._set(table, at, column, value)
        self.applied.append(Correction(target.label, "activities", key, column, original, value, reason, self.row))

    def _link(self, target, table: RawTable, record: str, key, column, value, reason) -> None:
        parts = [part.strip() for part in key.split(">")]
        if len(parts) != 2 or not all(parts):
            self.report(f"'{key}' is not a link key", "write the link as PRED>SUCC, e.g. A100>A110", "key")
            return
        pred, succ = parts
        link_key = f"{pred}>{succ}"
        links = table.frame
        matches = (
            np.flatnonzero(((links["pred"] == pred) & (links["succ"] == succ)).to_numpy())
            if len(links)
            else np.zeros(0, dtype=np.int64)
        )
        action = column.lower()
        if action == "add":
            self._add_link(target, table, record, pred, succ, matches, value, reason)
            return
        if action != "delete":
            if column in ("pred", "succ"):
                self.report(
                    "a link's activities cannot be corrected", "delete the link and add the corrected one", "column"
                )
                return
            allowed = list(COLUMNS["links"]) + list(links.columns)
            if column not in allowed:
                self.report(
                    f"there is no column '{column}' in the links of {record}",
                    "use one of: " + ", ".join(dict.fromkeys(allowed + ["delete", "add"])),
                    "column",
                )
                return
        if not matches.size:
            self.report(
                f"there is no link {link_key} in {record}",
                "check the key (PRED>SUCC) against the snapshot's links",
                "key",
            )
            return
        at = int(matches[0])
        if action == "delete":
            original = _link_text(links, at)
            keep = np.ones(len(links), dtype=bool)
            keep[at] = False
            table.keep(keep)
            self.applied.append(Correction(target.label, "links", link_key, "delete", original, "", reason, self.row))
            return
        original = self._set(table, at, column, value)
        self.applied.append(Correction(target.label, "links", link_key, column, original, value, reason, self.row))

    def _add_link(self, target, table: RawTable, record: str, pred, succ, matches, value, reason) -> None:
        link_key = f"{pred}>{succ}"
        if matches.size:
            self.report(
                f"the link {link_key} already exists in {record}",
                "correct its type or lag instead of adding it",
                "key",
            )
            return
        tokens = value.split()
        kind = tokens[0].upper() if tokens else "FS"
        lag = tokens[1] if len(tokens) > 1 else "0"
        try:
            lag_ok = float(lag).is_integer()
        except ValueError:
            lag_ok = False
        if len(tokens) > 2 or kind not in LINK_TYPES or not lag_ok:
            self.report(
                f"'{value}' is not a link type and lag",
                "write the type and the lag in work days, e.g. FS 0 or SS -2",
                "value",
            )
            return
        links = table.frame
        new_row = {c: "" for c in links.columns}
        new_row.update({"pred": pred, "succ": succ, "type": kind, "lag": lag})
        addition = pd.DataFrame([new_row], columns=links.columns, dtype="str")
        table.frame = pd.concat([links, addition], ignore_index=True)
        table.rows = np.append(table.rows, self.next_code)
        table.origins[self.next_code] = (self.file, self.row)
        self.next_code -= 1
        self.applied.append(Correction(target.label, "links", link_key, "add", "", f"{kind} {lag}", reason, self.row))
