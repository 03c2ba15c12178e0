"""Each chart of the report, tested once on data worked by hand (reports.figures).

Checks read the plotly figure's own data (``figure.data``, ``figure.layout``): what plotly
draws is what these arrays say. Expected values are restated from the inputs given here.
"""

from __future__ import annotations

import datetime as dt
import itertools

import numpy as np
import pandas as pd
import pytest
from test_element_timeline import _DICHROMACY, _lab

from reports import figures
from reports.palette import BUILT_BAR, PARTY_COLOURS, PLANNED_BAR, STATE_COLOURS


def test_completion_trend_draws_each_programme_and_the_reference_lines():
    trend = pd.DataFrame(
        {
            "label": ["Baseline", "Update <1>"],
            "data_date": [dt.date(2025, 1, 6), dt.date(2025, 2, 3)],
            "completion": [dt.date(2025, 6, 30), dt.date(2025, 7, 14)],
        }
    )
    figure = figures.completion_trend(trend, contract_in_force=dt.date(2025, 7, 1), planned=dt.date(2025, 6, 30))
    (line,) = figure.data
    assert list(line.x) == ["2025-01-06", "2025-02-03"] and list(line.y) == ["2025-06-30", "2025-07-14"]
    assert list(line.text) == ["Baseline", "Update &lt;1&gt;"]  # case text escaped for plotly's labels
    levels = sorted(shape.y0 for shape in figure.layout.shapes)
    assert levels == ["2025-06-30", "2025-07-01"]
    assert figure.layout.yaxis.type == "date" and line.line.color == STATE_COLOURS[2]


def test_completion_trend_steps_the_date_in_force_at_each_grant():
    trend = pd.DataFrame(
        {
            "label": ["Baseline", "Update 01"],
            "data_date": [dt.date(2025, 1, 6), dt.date(2025, 3, 3)],
            "completion": [dt.date(2025, 6, 30), dt.date(2025, 7, 14)],
        }
    )
    # a contract completion of 2025-06-27 and one grant of 10 days on 2025-02-10: in force
    # 2025-06-27 until then, 2025-07-07 from then (datetime arithmetic: 27 June + 10 days)
    assert dt.date(2025, 6, 27) + dt.timedelta(days=10) == dt.date(2025, 7, 7)
    in_force = pd.DataFrame(
        {
            "date": [dt.date(2025, 1, 6), dt.date(2025, 2, 10), dt.date(2025, 3, 3)],
            "completion_in_force": [dt.date(2025, 6, 27), dt.date(2025, 7, 7), dt.date(2025, 7, 7)],
            "grant": ["", "G-1 +10 days", ""],
        }
    )
    figure = figures.completion_trend(trend, planned=dt.date(2025, 6, 30), in_force=in_force)
    forecast, steps = figure.data
    assert steps.name == "contract completion in force" and steps.line.shape == "hv"  # held until the next grant
    assert list(steps.x) == ["2025-01-06", "2025-02-10", "2025-03-03"]
    assert list(steps.y) == ["2025-06-27", "2025-07-07", "2025-07-07"] and list(steps.text)[1] == "G-1 +10 days"
    assert [shape.y0 for shape in figure.layout.shapes] == ["2025-06-30"]  # no flat line beside the steps


def test_window_parties_stack_delays_above_and_gains_below_zero():
    windows = pd.DataFrame(
        {
            "window": [1, 2],
            "start": ["Baseline", "U1"],
            "end": ["U1", "U2"],
            "movement_days": [12, -1],
            "employer_days": [12, 0],
            "employer_gain_days": [0, 0],
            "contractor_days": [2, 1],
            "contractor_gain_days": [-2, -2],
            "neutral_days": [0, 0],
            "neutral_gain_days": [0, 0],
            "concurrent_days": [0, 0],
            "concurrent_gain_days": [0, 0],
        }
    )
    figure = figures.window_parties(windows)
    assert figure.layout.barmode == "relative"  # stacked: positives up from zero, negatives down
    names = [t.name for t in figure.data]
    assert names == ["employer", "contractor", "contractor: gain", "net movement"]  # the parties with days
    bars = {t.name: list(t.y) for t in figure.data}
    assert bars["contractor: gain"] == [-2, -2] and bars["employer"] == [12, 0]
    # each window's bars add up to its net movement: 12 + 2 - 2 = 12, 0 + 1 - 2 = -1
    assert [sum(bars[n][k] for n in names[:-1]) for k in range(2)] == bars["net movement"] == [12, -1]
    assert figure.data[0].marker.color == PARTY_COLOURS["employer"]


@pytest.mark.parametrize("vision", ["normal", *_DICHROMACY])
def test_party_colours_stay_apart_for_colour_blind_readers(vision):
    matrix = np.eye(3) if vision == "normal" else _DICHROMACY[vision]
    for first, second in itertools.combinations(PARTY_COLOURS.values(), 2):
        # a CIE76 difference of 20 is far above the just-noticeable difference of about 2.3
        # (Sharma, Digital Color Imaging Handbook, 2003; recalled from memory)
        assert np.linalg.norm(_lab(first, matrix) - _lab(second, matrix)) > 20, (vision, first, second)


def test_window_movements_stack_progress_and_revisions():
    windows = pd.DataFrame(
        {
            "window": [1, 2],
            "start": ["baseline", "u01"],
            "end": ["u01", "u02"],
            "progress_days": [3, 6],
            "revision_days": [0, -2],
        }
    )
    figure = figures.window_movements(windows)
    progress, revisions = figure.data
    assert list(progress.x) == ["1", "2"] and list(progress.y) == [3, 6] and list(revisions.y) == [0, -2]
    assert figure.layout.barmode == "relative"  # stacked, a gain below the axis
    assert list(progress.text) == ["window 1: baseline to u01", "window 2: u01 to u02"]


def test_completion_steps_are_a_staircase_with_impacts_alone_beside_it():
    steps = pd.DataFrame(
        {
            "run": ["baseline"] * 3,
            "step": ["before any event", "EV1", "EV2"],
            "completion": [dt.date(2025, 6, 30), dt.date(2025, 7, 7), dt.date(2025, 7, 7)],
            "alone": [None, dt.date(2025, 7, 7), dt.date(2025, 7, 2)],
            "title": ["base", "Rain", "Late <drawings>"],
        }
    )
    figure = figures.completion_steps(steps)
    stairs, alone = figure.data
    assert stairs.line.shape == "hv"  # each step holds until the next event
    assert list(stairs.x) == ["before any event", "EV1", "EV2"]
    assert list(stairs.y) == ["2025-06-30", "2025-07-07", "2025-07-07"]
    assert list(alone.y) == [None, "2025-07-07", "2025-07-02"] and alone.mode == "markers"
    assert list(stairs.text)[2] == "Late &lt;drawings&gt;"
    # two runs (a time impact analysis): one staircase each, the run named on each step
    two = pd.concat([steps, steps.assign(run="u01")], ignore_index=True)
    lines = [t for t in figures.completion_steps(two).data if t.mode == "lines+markers"]
    assert len(lines) == 2 and list(lines[1].x)[0] == "u01: before any event"


def _three_activities() -> pd.DataFrame:
    return pd.DataFrame(
        {
            "wbs": ["1", "1", "2"],
            "activity": ["A", "M", "B"],
            "name": ["Dig", "Handover", "<b>Pour</b>"],
            "planned_start": pd.to_datetime(["2025-01-06", "2025-01-17", "2025-01-13"]),
            "planned_finish": pd.to_datetime(["2025-01-10", "2025-01-17", "2025-01-17"]),
            "actual_start": pd.to_datetime(["2025-01-06", "2025-01-22", "2025-01-13"]),
            "actual_finish": pd.to_datetime(["2025-01-14", "2025-01-22", None]),
            "milestone": [False, True, False],
        }
    )


def test_planned_against_built_bars_run_from_start_to_the_end_of_the_finish_date():
    activities = _three_activities()
    data_dates = pd.DataFrame({"label": ["Update 01"], "data_date": [dt.date(2025, 1, 13)]})
    # the as-built critical path runs B then M (the critical_path table of the as-built
    # method, in path order); A is not on it
    path = pd.DataFrame({"activity": ["B", "M"], "accrued_days": [3, 2]})
    figure = figures.planned_against_built(activities, critical_path=path, data_dates=data_dates)
    rows, planned, planned_points, built, built_points = figure.data
    day = 86_400_000  # milliseconds in a day
    # the rows: the path first in path order (B, M), then the rest by start (A)
    path_group, other = (g.replace(" ", "<br>", 1) for g in figures.GANTT_GROUPS)
    assert [list(level) for level in rows.y] == [[path_group, path_group, other], ["B", "M", "A"]]
    # A planned Mon 01-06 to Fri 01-10: 5 days (work on both ends); built to Tue 01-14: 9
    # days; B planned Mon 01-13 to Fri 01-17: 5 days, and no actual finish: no actual bar
    assert [list(level) for level in planned.y] == [[path_group, other], ["B", "A"]]
    assert list(planned.base) == ["2025-01-13", "2025-01-06"] and list(planned.x) == [5 * day, 5 * day]
    assert list(built.y[1]) == ["A"] and list(built.base) == ["2025-01-06"] and list(built.x) == [9 * day]
    assert list(planned_points.x) == ["2025-01-17"] and list(built_points.x) == ["2025-01-22"]
    assert planned_points.marker.symbol == "diamond-open" and built_points.marker.symbol == "diamond"
    assert figure.layout.yaxis.type == "multicategory" and list(figure.layout.yaxis.range) == [2.5, -0.5]
    assert "&lt;b&gt;Pour&lt;/b&gt;" in planned.hovertext[0] and "wbs 2" in planned.hovertext[0]
    (line,) = figure.layout.shapes
    assert line.x0 == line.x1 == "2025-01-13" and line.line.dash == "dot"
    (label,) = figure.layout.annotations
    assert label.text == "Update 01" and label.y == 0 and label.yanchor == "top"  # under the plot
    # planned and actual differ in fill, hatching and outline, not in colour alone
    assert planned.marker.color == PLANNED_BAR["fill"] and planned.marker.pattern.shape == "/"
    assert built.marker.color == BUILT_BAR["fill"] and built.marker.pattern.shape == ""
    assert planned.marker.line.color == PLANNED_BAR["line"]


def test_the_legend_sits_between_the_title_and_the_date_ticks():
    figure = figures.planned_against_built(_three_activities())
    layout = figure.layout
    height, top = layout.height, layout.margin.t
    # in pixels from the top of the figure: the title's band, then the legend's (one row of
    # about 20 px for two entries), then the date tick labels just above the plot (about
    # 30 px for 12 px text and outside ticks)
    title_px = (1 - layout.title.y) * height
    legend_px = (1 - layout.legend.y) * height
    assert layout.title.yref == layout.legend.yref == "container"
    assert layout.title.yanchor == layout.legend.yanchor == "top"
    assert title_px + 20 <= legend_px and legend_px + 20 <= top - 30
    assert layout.xaxis.side == "top"


def test_gantt_order_puts_the_path_first_then_the_rest_by_start():
    activities = pd.DataFrame(
        {
            "activity": ["A", "B", "C", "D", "E"],
            "planned_start": pd.to_datetime(["2025-01-13", None, "2025-01-06", "2025-01-06", None]),
            "actual_start": pd.to_datetime([None, "2025-01-08", None, None, "2025-01-20"]),
        }
    )
    # path E, A; the others by start: C and D both 01-06 (then by id), B 01-08 (its actual
    # start, having no planned one)
    ordered = figures.gantt_order(activities, ["E", "A"])
    assert ordered["activity"].tolist() == ["E", "A", "C", "D", "B"]
    assert ordered["group"].tolist() == [figures.GANTT_GROUPS[0]] * 2 + [figures.GANTT_GROUPS[1]] * 3
    assert figures.gantt_order(activities)["activity"].tolist() == ["C", "D", "B", "A", "E"]


@pytest.mark.parametrize("vision", ["normal", *_DICHROMACY])
def test_planned_and_actual_bars_stay_apart_in_greyscale(vision):
    # CIE L* (lightness) of the two fills, also as a reader with each dichromacy sees them
    # (the simulation of test_element_timeline.py): a greyscale print keeps lightness only
    matrix = np.eye(3) if vision == "normal" else _DICHROMACY[vision]
    planned, built = (_lab(style["fill"], matrix)[0] for style in (PLANNED_BAR, BUILT_BAR))
    # a lightness step of 40 is far above the just-noticeable difference of about 2.3
    # (Sharma, Digital Color Imaging Handbook, 2003; recalled from memory) and reads as
    # "light" against "dark"
    assert planned - built > 40, (vision, planned, built)
    assert PLANNED_BAR["pattern"] and not BUILT_BAR["pattern"]


def test_days_by_method_groups_three_figures_per_method():
    summary = pd.DataFrame(
        {
            "method": ["windows analysis", "impacted as-planned"],
            "eot_days": [10, 7],
            "compensable_days": [4, 7],
            "ld_days": [3, 0],
        }
    )
    figure = figures.days_by_method(summary)
    assert [t.name for t in figure.data] == [
        "extension of time",
        "compensable days (time and money)",
        "days of liquidated damages",
    ]
    assert [list(t.y) for t in figure.data] == [[10, 7], [4, 7], [3, 0]]
    assert figure.layout.barmode == "group" and figure.data[2].marker.color == STATE_COLOURS[3]


def test_but_for_days_leave_out_a_party_not_scored():
    by_party = pd.DataFrame(
        {"party": ["employer", "contractor", "all"], "days_earlier": pd.array([5, None, 8], dtype="Int64")}
    )
    (bars,) = figures.but_for_days(by_party).data
    assert list(bars.x) == ["employer events", "all events"] and list(bars.y) == [5, 8]
    assert list(bars.marker.color) == [STATE_COLOURS[2], STATE_COLOURS[4]]


def test_a_figure_fragment_carries_no_plotly_js_and_no_raw_case_text():
    trend = pd.DataFrame(
        {
            "label": ["</script><script>alert(1)</script>"],
            "data_date": [dt.date(2025, 1, 6)],
            "completion": [dt.date(2025, 6, 30)],
        }
    )
    fragment = figures.figure_html(figures.completion_trend(trend), "figure-test")
    assert 'id="figure-test"' in fragment and "Plotly.newPlot" in fragment
    assert "<script>alert" not in fragment and len(fragment) < 20_000
