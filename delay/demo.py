"""``delay demo``: every capability of the toolkit, run on one case.

The outputs go into one folder, checked by the toolkit's output policy (new, empty or an
earlier output; never the case or an input), built under a temporary name and moved into
place whole (:func:`delay.output.output_folder`). Every CSV goes through
:func:`delay.output.write_csv` (text cells that a spreadsheet would run are neutralised), and
nothing written names a path of the machine: the case appears by its folder's name.
Each capability adds its outputs here as it is built.
"""

from __future__ import annotations

import json
import os
from collections.abc import Callable
from pathlib import Path

import pandas as pd

from .calendars import CalendarSet, build_calendars
from .case import load_case, summarise
from .convert import list_cells
from .cpm import prepare
from .output import output_folder, write_csv

__all__ = ["run_demo"]


class _Beside:
    """Parts of the demo made in a process of their own, started first so that they run
    beside the rest of the demo on a second core.

    In order: the headline figures of each method under the other progress mode (the
    costliest row of the sensitivity table, :func:`delay.comparison.other_progress_figures`),
    when the case has delay events; the checks (:func:`delay.checks.run_all`); both only
    where the machine has a second core; then the IFC outputs
    (:func:`delay.ifc.demo_outputs`), when the IFC extra is installed and the case has a
    model. The process loads the case itself from the same files; each part is handed back
    through a pipe as it is made. The IFC part writes into a temporary folder of its own and
    hands the files back, which the demo writes into its folder as it is built; an error is
    handed back and raised where its part is waited for; stopped, the process leaves
    nothing behind."""

    def __init__(self, case_path: Path, methods: tuple[str, ...], checks: bool, ifc: bool):
        import multiprocessing

        self.methods, self.checks, self.ifc = methods, checks, ifc
        context = multiprocessing.get_context("spawn")  # a fresh interpreter, on every platform
        self._receive, send = context.Pipe(duplex=False)
        self._process = context.Process(target=_beside, args=(str(case_path), methods, checks, ifc, send), daemon=True)
        self._process.start()
        send.close()

    @classmethod
    def start(cls, case, case_path: Path) -> _Beside | None:
        """Start the process when ``case``, loaded from ``case_path``, has a part for it."""
        from .comparison import available_methods
        from .ifc import available

        root = Path(case.root)
        ifc = available() and root.is_dir() and bool(sorted((root / "model").glob("*.ifc")))
        checks = _cores() > 1
        methods = tuple(available_methods(case)) if len(case.events) and checks else ()
        if not ifc and not checks:
            return None
        return cls(case_path, methods, checks, ifc)

    def _next(self, kind: str):
        try:
            got, found = self._receive.recv()
        except EOFError:
            raise RuntimeError("the second process of the demo stopped without a result") from None
        if got == "error":
            raise found
        if got != kind:  # the parts come in the order they are asked for
            raise RuntimeError(f"the second process of the demo handed back {got} where {kind} was due")
        return found

    def adopt_figures(self, case) -> None:
        """Wait for the figures under the other progress mode and take them as ``case``'s."""
        from .comparison import adopt_other_progress_figures

        if self.methods:
            adopt_other_progress_figures(case, self.methods, self._next("figures"))

    def adopt_checks(self, case) -> bool:
        """Wait for the checks and take them as ``case``'s; tell whether the process made them."""
        from .checks import adopt_checks

        if self.checks:
            adopt_checks(case, self._next("checks"))
        return self.checks

    def files(self) -> dict[str, bytes]:
        """Wait for the IFC outputs: path under the demo's folder to content (none when the
        process makes no IFC part); raises what the IFC part raised."""
        if not self.ifc:
            return {}
        try:
            return self._next("files")
        finally:
            self._process.join()

    def stop(self) -> None:
        """End the process if it still runs (the demo failed, was interrupted or is done)."""
        if self._process.is_alive():
            self._process.terminate()
        self._process.join()
        self._receive.close()


def _cores() -> int:
    try:
        return len(os.sched_getaffinity(0))
    except AttributeError:  # not on every platform
        return os.cpu_count() or 1


def _beside(case_path: str, methods: tuple[str, ...], checks: bool, ifc: bool, send) -> None:
    """The body of :class:`_Beside`'s process."""
    import tempfile

    try:
        case = load_case(Path(case_path))
        if methods:
            from .comparison import other_progress_figures

            send.send(("figures", other_progress_figures(case, methods)))
        if checks:
            from .checks import run_all

            send.send(("checks", run_all(case)))
        if ifc:
            from .ifc import demo_outputs

            with tempfile.TemporaryDirectory(prefix="delay-demo-ifc-out-") as folder:
                paths = demo_outputs(case, folder)
                send.send(("files", {p.relative_to(folder).as_posix(): p.read_bytes() for p in paths}))
    except Exception as error:  # handed back: the demo raises it
        try:
            send.send(("error", error))
        except Exception:  # an error that does not pickle goes back as its text
            send.send(("error", RuntimeError(str(error))))
    finally:
        send.close()


def run_demo(
    case_path: Path,
    out_dir: Path,
    echo: Callable[[str], None] = print,
    *,
    extra: Callable[[object, Path, Path], list[Path]] | None = None,
) -> list[Path]:
    """Run the demo on ``case_path``, writing every output into ``out_dir``.

    Loads and checks the case, then writes: the case summary and the checks (JSON); every
    snapshot's schedule (the as-built record's too) as CSV and JSON with the completion of
    each; the windows analysis and the as-planned versus as-built comparison where the
    case has the snapshots for them; the impacted as-planned, time impact and collapsed
    as-built analyses, the entitlement per method, the methods compared and the
    sensitivity table where it has delay events; and the IFC outputs when the IFC extra is
    installed. The IFC outputs, the checks and the sensitivity table's figures under the
    other progress mode are made in a process of their own, started first, so that they
    take a second core while the rest runs (:class:`_Beside`). The folder is built under a
    temporary name and moved into place whole (:func:`delay.output.output_folder`).

    Parameters
    ----------
    case_path : Path
        The case folder or workbook.
    out_dir : Path
        The output folder (new, empty or an earlier output of the toolkit, which is
        replaced whole when the run succeeds).
    echo : callable, default print
        Called with each line of progress.
    extra : callable, optional
        ``extra(case, folder, out_dir)`` writes more outputs into ``folder`` (the folder
        being built) before it is moved to ``out_dir``, and returns their paths under
        ``out_dir``; the command line writes the report this way.

    Returns
    -------
    list of Path
        The files written, as paths under ``out_dir``.

    Raises
    ------
    CaseError
        When the case is invalid (nothing is written then).
    delay.output.OutputRefused
        When ``out_dir`` must not be written (nothing is written then).
    delay.output.OutputFailed
        An OSError while writing (an earlier output survives whole).
    """
    case = load_case(case_path)
    echo(f"Loaded {case.settings.project.name}: {len(case.snapshots)} snapshots")
    background = _Beside.start(case, case_path)  # beside the rest, on another core
    try:
        return _run(case, out_dir, echo, extra, background)
    finally:
        if background is not None:
            background.stop()


def _run(case, out_dir: Path, echo, extra, background: _Beside | None) -> list[Path]:
    written: list[Path] = []
    with output_folder(out_dir, case_root=case.root, inputs=case.input_files, what="demo", option=" (--out)") as folder:
        summary = summarise(case)
        summary["root"] = Path(case.root).resolve().name  # the case by its name, never a path of the machine
        (folder / "case_summary.json").write_text(json.dumps(summary, indent=2), encoding="utf-8")
        written.append(out_dir / "case_summary.json")
        schedules = folder / "schedules"
        schedules.mkdir()
        calendars = CalendarSet(build_calendars(case))
        trend = []
        snapshots = list(case.snapshots) + ([case.asbuilt_snapshot] if case.asbuilt_snapshot else [])
        for snap in snapshots:
            result = prepare(case, snap, calendars=calendars).run()
            frame = result.activities.rename(columns={"id": "activity"})  # the outputs' name for it
            write_csv(schedules / f"{snap.folder}.csv", frame, date_format="%Y-%m-%d")
            (schedules / f"{snap.folder}.json").write_text(result.to_json_text(indent=2) + "\n", encoding="utf-8")
            written += [out_dir / "schedules" / f"{snap.folder}.csv", out_dir / "schedules" / f"{snap.folder}.json"]
            trend.append(
                {
                    "snapshot": snap.folder,
                    "label": snap.label,
                    "kind": snap.kind,
                    "data_date": snap.data_date.isoformat(),
                    "completion": result.completion.isoformat(),
                    "critical_activities": int(frame["critical"].sum()),
                    "driving_path_length": len(result.driving_path()),
                }
            )
            echo(f"  {snap.label:<24} data date {snap.data_date}  completion {result.completion}")
        write_csv(folder / "completion_by_snapshot.csv", pd.DataFrame(trend))
        written.append(out_dir / "completion_by_snapshot.csv")
        written += _retrospective(case, folder, out_dir, echo)
        written += _modelled(case, folder, out_dir, echo, background)
        written += _checks(case, folder, out_dir, echo, background)
        if extra is not None:
            written += extra(case, folder, out_dir)
        if background is not None:
            ifc_files = background.files()
            for name, data in ifc_files.items():
                (folder / name).parent.mkdir(parents=True, exist_ok=True)
                (folder / name).write_bytes(data)
            written += [out_dir / name for name in ifc_files]
            if ifc_files:
                echo(
                    "IFC: the demo model imported and the baseline exported as a work schedule "
                    f"({len(ifc_files)} files)"
                )
    return written


def _checks(case, folder: Path, out_dir: Path, echo, background: _Beside | None) -> list[Path]:
    """The checks of every snapshot (made on the second core where there is one)."""
    from .checks import run_all

    if background is not None:
        background.adopt_checks(case)
    (folder / "checks.json").write_text(json.dumps(run_all(case), indent=2), encoding="utf-8")
    echo("Checked the programmes' quality, the records and the model links (checks.json)")
    return [out_dir / "checks.json"]


def _retrospective(case, folder: Path, out_dir: Path, echo) -> list[Path]:
    """Windows analysis and, where there is an as-built record, as-planned versus as-built."""
    from .methods import asbuilt, windows

    written = []
    if len(case.snapshots) + (case.asbuilt_snapshot is not None) >= 2:
        result = windows.analyse(case)
        (folder / "windows.json").write_text(json.dumps(result.to_json(), indent=2), encoding="utf-8")
        write_csv(folder / "windows.csv", result.table, date_format="%Y-%m-%d")
        write_csv(folder / "windows_charges.csv", list_cells(result.charges))
        written += [out_dir / "windows.json", out_dir / "windows.csv", out_dir / "windows_charges.csv"]
        echo(f"Windows analysis: {len(result.windows)} windows, total movement {result.total_movement_days} days")
    if case.asbuilt_snapshot is not None:
        compared = asbuilt.compare(case)
        (folder / "asbuilt.json").write_text(json.dumps(compared.to_json(), indent=2), encoding="utf-8")
        write_csv(folder / "asbuilt_activities.csv", compared.activities, date_format="%Y-%m-%d")
        write_csv(folder / "asbuilt_critical_path.csv", compared.critical_path, date_format="%Y-%m-%d")
        written += [out_dir / "asbuilt.json", out_dir / "asbuilt_activities.csv", out_dir / "asbuilt_critical_path.csv"]
        echo(f"As-built: planned completion {compared.planned_completion}, actual {compared.actual_completion}")
    return written


def _modelled(case, folder: Path, out_dir: Path, echo, background: _Beside | None) -> list[Path]:
    """Impacted as-planned, time impact and collapsed as-built, where the case allows them."""
    from .methods import collapsed, impacted, tia

    written = []
    if len(case.events):
        impact = impacted.analyse(case)
        (folder / "impacted.json").write_text(json.dumps(impact.to_json(), indent=2), encoding="utf-8")
        write_csv(folder / "impacted_events.csv", list_cells(impact.events), date_format="%Y-%m-%d")
        assessed = tia.analyse(case)
        (folder / "tia.json").write_text(json.dumps(assessed.to_json(), indent=2), encoding="utf-8")
        written += [out_dir / "impacted.json", out_dir / "impacted_events.csv", out_dir / "tia.json"]
        echo(
            f"Impacted as-planned: the events add {impact.total_days} days to the plan (residual "
            f"{impact.residual_days:+d}); time impact: increments {assessed.total_days} days, residuals "
            f"{assessed.trace.residual_days:+d}, {assessed.explained_days} days in all"
        )
        if case.asbuilt_snapshot is not None:
            butfor = collapsed.analyse(case)
            (folder / "collapsed.json").write_text(json.dumps(butfor.to_json(), indent=2), encoding="utf-8")
            written.append(out_dir / "collapsed.json")
            echo(
                f"Collapsed as-built: the model {'reproduces' if butfor.reproduced else 'does not fully reproduce'} "
                "the actual dates; but-for completions written"
            )
        if background is not None:
            background.adopt_figures(case)  # made on the second core meanwhile
        written += _entitlement(case, folder, out_dir, echo)
    return written


def _entitlement(case, folder: Path, out_dir: Path, echo) -> list[Path]:
    """Entitlement per method, the methods compared and the sensitivity table."""
    from .comparison import available_methods, compare_methods, sensitivity
    from .entitlement import assess

    methods = available_methods(case)
    assessed = assess(case, methods)
    (folder / "entitlement.json").write_text(json.dumps(assessed.to_json(), indent=2), encoding="utf-8")
    compared = compare_methods(case, {m: assessed.method(m) for m in methods})
    (folder / "comparison.json").write_text(json.dumps(compared.to_json(), indent=2), encoding="utf-8")
    write_csv(folder / "sensitivity.csv", sensitivity(case, methods))
    for m in methods:
        e = assessed.method(m)
        echo(
            f"  {m:<10} extension of time {e.eot_days} days (revised completion {e.revised_completion}), "
            f"compensable {e.compensable_days}, days of damages {e.ld_days}, acceleration {e.acceleration_days}"
        )
    return [out_dir / "entitlement.json", out_dir / "comparison.json", out_dir / "sensitivity.csv"]
