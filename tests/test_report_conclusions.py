"""The summary's conclusions: the headline per method, the points that need explaining, the
methods' disagreements, and the analyst's opinion rendered inert.

The warnings are checked on hand-worked figures (working in the comments) by the rules of
delay.entitlement's docstring, the project's contract for the figures: revised completion =
completion in force + extension; overrun = actual - completion in force; with the
extension below the excusable days, extension - overrun = acceleration - culpable delay.
The opinion's Markdown is checked against the CommonMark rules (spec 0.31.2, section 6.6:
with raw HTML off a tag is text; recalled from memory) and by HTML's own parser (Python's
html.parser, the reference) for what the markup holds.
"""

from __future__ import annotations

import datetime as dt
from html.parser import HTMLParser
from types import SimpleNamespace

import pandas as pd
import pytest
from test_report import rows_of, write_small_case

from delay.comparison import DISAGREEMENT_DAYS, MethodComparison, disagreements, why_they_differ
from reports.conclusions import (
    collapsed_model,
    events_left_alone,
    extension_beyond_overrun,
    tia_warnings,
    unexplained_days,
)
from reports.opinion import render_opinion, safe_link
from reports.writer import build

#: An opinion.md written to do harm: a script, an image whose error handler runs script, links
#: to javascript: (plain, in capitals, with a tab, as an entity, as a reference), a data: page,
#: raw HTML with an event handler, and an image from the network.
HOSTILE_OPINION = """# My opinion

The windows analysis is to be preferred. <script>window.owned = "script";</script>

<img src="x" onerror="window.owned = 'image'">

[click me](javascript:window.owned='link') [CLICK](JaVaScRiPt:window.owned='caps')
[tabbed](java\tscript:window.owned='tab') [entity](java&#115;cript:window.owned='entity')
[by reference][evil] [a page](data:text/html,<script>window.owned='data'</script>)
<div onmouseover="window.owned='div'">hover</div>

[evil]: javascript:window.owned='reference'

![a plan](http://example.org/plan.png)

Sources: [the protocol](https://example.org/protocol), [a note](notes/a.html), [me](mailto:a@example.org).
"""


class _Markup(HTMLParser):
    """Every tag and attribute of a fragment, as a browser's parser reads them."""

    def __init__(self, text: str):
        super().__init__()
        self.tags: list[tuple[str, dict]] = []
        self.feed(text)

    def handle_starttag(self, tag, attrs):
        self.tags.append((tag, dict(attrs)))


def _entitlement(**figures):
    """An Entitlement's figures as delay.entitlement names them (no method run)."""
    base = dict(
        method="collapsed",
        eot_days=0,
        acceleration_days=0,
        completion_in_force=dt.date(2026, 6, 26),
        actual_completion=dt.date(2026, 7, 2),
    )
    base.update(figures)
    item = SimpleNamespace(**base)
    item.overrun_days = (item.actual_completion - item.completion_in_force).days
    item.revised_completion = item.completion_in_force + dt.timedelta(days=item.eot_days)
    return item


def test_an_extension_beyond_the_overrun_is_explained_by_the_acceleration():
    # in force 2026-06-26, actual 2026-07-02: an overrun of 6 days; an extension of 12 days
    # puts the revised completion at 2026-07-08, after the actual one; the 6 days between are
    # the contractor's net recovery of 6 days
    text = extension_beyond_overrun(_entitlement(eot_days=12, acceleration_days=6))
    assert text.startswith("Collapsed as-built: the extension of time, 12 days, is more than the 6 days")
    assert "2026-07-08, falls after the actual completion, 2026-07-02" in text
    assert "All 6 days of the difference are the contractor's acceleration" in text
    # with a recovery of 4 days only, 4 of the 6 are explained and the method's reason is given
    # for the other 2
    text = extension_beyond_overrun(_entitlement(eot_days=12, acceleration_days=4))
    assert "4 of the 6 days" in text and "The other 2 days: the but-for days" in text
    # an extension within the overrun (5 of 6 days) needs no note; nor does no extension
    assert extension_beyond_overrun(_entitlement(eot_days=5)) is None
    assert extension_beyond_overrun(_entitlement(eot_days=0)) is None
    # works finished 3 days before the date in force: any extension is beyond the overrun
    early = extension_beyond_overrun(
        _entitlement(eot_days=2, actual_completion=dt.date(2026, 6, 23)), actual_word="forecast"
    )
    assert "finished 3 days before the completion in force" in early and "forecast completion, 2026-06-23" in early


def test_days_no_event_explains_gains_and_recovery_are_named():
    table = pd.DataFrame(
        {
            "party": ["contractor", "contractor", "employer", "recovery", "unexplained"],
            "basis": ["unexplained", "unexplained", "event", "recovery", "residual"],
            "days": [2, -8, 20, -18, 19],
        }
    )
    text = unexplained_days(SimpleNamespace(method="tia", causation=SimpleNamespace(table=table)))
    # delay no event explains: 2 (contractor, unexplained) + 19 (residual) = 21; gains 8; recovery 18
    assert text.startswith("Time impact analysis: 21 days of delay that no event explains; 8 days of gain")
    assert "18 days of recovery" in text
    only_events = pd.DataFrame({"party": ["employer"], "basis": ["event"], "days": [5]})
    assert unexplained_days(SimpleNamespace(method="tia", causation=SimpleNamespace(table=only_events))) is None


def test_events_not_scored_or_applied_in_part_and_programmes_that_show_an_event_are_named():
    events = pd.DataFrame(
        {
            "event": ["E1", "E2", "E3"],
            "applied": ["", "not in Baseline: X9", ""],
            "effect": ["", "", "alone: A: no effect on this programme"],
            "warnings": [["Update 02 already shows A 5 work days later"], [], []],
        }
    )
    found = events_left_alone("impacted", SimpleNamespace(events=events))
    assert found == [
        "Impacted as-planned: E2 is applied only in part (not in Baseline: X9).",
        "Impacted as-planned: E3 leaves some of its activities alone (a hold stops only work the "
        "programme has in its period), so it scores less than its period suggests; the events table "
        "says which.",
    ]
    assert tia_warnings(SimpleNamespace(events=events)) == [
        "Time impact analysis, E1: Update 02 already shows A 5 work days later."
    ]
    by_event = pd.DataFrame(
        {
            "event": ["E1", "E2"],
            "days_earlier": pd.array([3, None], dtype="Int64"),
            "note": ["", "nothing of it is in the as-built record"],
        }
    )
    assert events_left_alone("collapsed", SimpleNamespace(by_event=by_event)) == [
        "Collapsed as-built: E2 is not scored: nothing of it is in the as-built record."
    ]
    model = SimpleNamespace(
        reproduced=False,
        mismatches=pd.DataFrame({"activity": ["A", "B"]}),
        modelled_completion=dt.date(2025, 2, 3),
        actual_completion=dt.date(2025, 2, 1),
    )
    assert (
        "does not reproduce the actual dates of 2 activities (modelled completion 2025-02-03, actual 2025-02-01)"
        in collapsed_model(model)
    )
    assert collapsed_model(SimpleNamespace(reproduced=True)) is None


def _comparison(eot, compensable, culpable) -> MethodComparison:
    methods = ("windows", "impacted", "collapsed")
    headline = pd.DataFrame({"method": methods, "eot_days": eot, "compensable_days": compensable, "ld_days": culpable})
    return MethodComparison(methods, pd.DataFrame(), pd.DataFrame(), headline, ())


def test_methods_that_disagree_by_more_than_the_threshold_are_named():
    assert DISAGREEMENT_DAYS == 10
    found = disagreements(_comparison([0, 4, 12], [20, 29, 3], [6, 6, 0]))
    # extensions 0 to 12: 12 > 10; compensable 3 to 29: 26 > 10; culpable 0 to 6: not flagged
    assert [(d["figure"], d["difference"], d["low"], d["high"]) for d in found] == [
        ("extension of time", 12, "windows", "collapsed"),
        ("compensable days", 26, "collapsed", "impacted"),
    ]
    assert found[0]["sentence"].startswith(
        "The methods differ by 12 days on the extension of time (0 days by windows analysis, 12 by collapsed as-built)"
    )
    assert disagreements(_comparison([0, 4, 10], [1, 2, 3], [0, 0, 0])) == []  # 10 is not more than 10
    reasons = why_they_differ(_comparison([0, 4, 12], [20, 29, 3], [6, 6, 0]))
    assert len(reasons) == 2 and reasons[0].startswith("The methods differ most on the compensable days: from 3 days")
    assert "collapsed as-built" in reasons[1] and "impacted as-planned" in reasons[1]


def test_safe_links_are_http_mailto_or_relative():
    assert [
        safe_link(a) for a in ("https://example.org", "http://x", "mailto:a@b.c", "notes/a.html", "#part", "?q=1")
    ] == [True] * 6
    assert [
        safe_link(a)
        for a in (
            "javascript:x",
            "JAVASCRIPT:x",
            "java\tscript:x",
            " javascript:x",
            "vbscript:x",
            "data:text/html,x",
            "file:///etc/passwd",
        )
    ] == [False] * 7


def test_a_hostile_opinion_renders_to_inert_markup():
    html = str(render_opinion(HOSTILE_OPINION))
    tags = _Markup(html).tags
    names = {tag for tag, _ in tags}
    assert names <= {"h4", "p", "a", "span", "em", "strong", "code", "ul", "ol", "li", "blockquote"}, names
    assert not any(key.startswith("on") for _, attrs in tags for key in attrs)  # no event handler
    hrefs = [attrs["href"] for tag, attrs in tags if tag == "a"]
    assert hrefs == ["https://example.org/protocol", "notes/a.html", "mailto:a@example.org"]
    assert "&lt;script&gt;" in html and "javascript:" in html  # the text stays, as text
    assert "image not shown" in html and "http://example.org/plan.png" not in html


def test_the_opinion_and_the_method_relied_on_are_on_the_first_page(tmp_path):
    root = write_small_case(tmp_path / "case")
    (root / "opinion.md").write_text("I rely on the **time impact analysis**.", encoding="utf-8")
    text = (root / "case.toml").read_text(encoding="utf-8")
    (root / "case.toml").write_text(text + '\n[report]\npreferred_method = "tia"\n', encoding="utf-8")
    out = build(root, tmp_path / "report")
    page = (out / "report.html").read_text(encoding="utf-8")
    first = page.split('<div class="group first-page">', 1)[1].split("<h3>Dates and extensions", 1)[0]
    assert "I rely on the <strong>time impact analysis</strong>." in first
    assert "Method relied on: the time impact analysis ([report] preferred_method)." in first
    headline = {r["method_title"]: r for r in rows_of(out, "headline")}
    assert "time impact analysis (relied on by the analyst)" in headline
    # the small case's working (test_report.py): 5 days, all excusable and compensable
    assert headline["windows analysis"]["eot_days"] == "5" and headline["windows analysis"]["ld_days"] == "0"


@pytest.fixture(scope="module")
def small_without_opinion(tmp_path_factory):
    folder = tmp_path_factory.mktemp("small-no-opinion")
    return build(write_small_case(folder / "case"), folder / "report")


def test_without_an_opinion_the_first_page_says_none_was_given(small_without_opinion):
    page = (small_without_opinion / "report.html").read_text(encoding="utf-8")
    first = page.split('<div class="group first-page">', 1)[1].split("<h3>Dates and extensions", 1)[0]
    assert "No opinion was given: the case has no opinion.md." in first
    assert "The analyst names no method relied on ([report] preferred_method of case.toml)." in first
    # the small case's time impact analysis inserts E1 into the baseline (the last programme
    # before 2025-01-13): impacted completion 2025-01-22; Update 01 forecasts 2025-01-17 (A on
    # plan, B not started): a residual of -5 days, recovery; Update 01 to the as-built
    # record, 2025-01-17 to 2025-01-22: +5 days no event explains. The methods agree on
    # every headline figure, and no extension passes the overrun: nothing else is noted.
    points = first.split("Points that need explaining", 1)[1]
    assert points.count("<li>") == 2
    assert "Time impact analysis: 5 days of delay that no event explains; 5 days of recovery" in points
    assert "unexplained_risk (here: contractor)" in points
