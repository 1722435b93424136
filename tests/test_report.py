"""The client report (HTML) and the compare and report commands."""

from __future__ import annotations

import datetime as dt
import re
import shutil
from html import escape
from html.parser import HTMLParser
from pathlib import Path

import pytest

from roomfit.caution import CAUTION
from roomfit.cli import main
from roomfit.plan.read import read_plan
from roomfit.present.compare import compare
from roomfit.present.report import PDF_NOTE, build_report

PLANS = Path(__file__).resolve().parent.parent / "plans"


class _Tags(HTMLParser):
    """Counts start tags and collects ids; raises nothing on well-formed input."""

    def __init__(self) -> None:
        super().__init__()
        self.tags: dict[str, int] = {}
        self.ids: list[str] = []

    def handle_starttag(self, tag: str, attrs: list[tuple[str, str | None]]) -> None:
        self.tags[tag] = self.tags.get(tag, 0) + 1
        self.ids += [v for k, v in attrs if k == "id" and v]


@pytest.fixture(scope="module")
def two() -> tuple:
    plans = [read_plan(PLANS / "studio.toml"), read_plan(PLANS / "one-bed.toml")]
    cmp = compare(plans, ["studio", "one-bed"])
    return cmp, build_report(cmp, date=dt.date(2026, 3, 14))


def test_report_is_self_contained_with_one_drawing_per_arrangement(two):
    cmp, html = two
    tags = _Tags()
    tags.feed(html)
    assert tags.tags["svg"] == 2
    assert "script" not in tags.tags and "img" not in tags.tags and "link" not in tags.tags
    assert not re.search(r'(src|href)="(https?:|//)', html)
    assert len(tags.ids) == len(set(tags.ids)), "ids of the two drawings clash"


def test_report_holds_caution_date_names_metrics_and_sources(two):
    cmp, html = two
    assert html.count(f"<p class='caution'>{escape(CAUTION)}</p>") == 2  # top and bottom
    assert "2026-03-14" in html and escape(cmp.rows[0].plan.name) in html
    assert escape(PDF_NOTE) in html
    for label in ("Rules failed", "Walking per day", "Narrowest on a routine route",
                  "Turning spaces", "Free floor", "Preferences met"):
        assert label in html
    # every failed finding appears with its source text
    for row in cmp.rows:
        for f in row.audit.failures:
            assert escape(f.message) in html
            if f.source:
                assert escape(f.source) in html
    # best values carry a visible mark, not colour alone
    assert html.count("&#9733; best") == sum(len(ix) for _, ix in cmp.best)
    # unreachable trips say why
    for t in cmp.rows[0].routes.unreachable:
        assert escape(t.reason) in html


def test_compare_command_prints_table_and_writes_report(tmp_path, capsys):
    out = tmp_path / "cmp.html"
    code = main(["compare", str(PLANS / "studio.toml"), str(PLANS / "one-bed.toml"),
                 "--html", str(out)])
    printed = capsys.readouterr().out
    assert code == 0
    assert printed.splitlines()[0].split() == ["studio", "one-bed"]
    assert "* best value" in printed and printed.rstrip().endswith(CAUTION)
    html = out.read_text(encoding="utf-8")
    assert html.count("<svg") == 2 and escape(CAUTION) in html


def test_compare_never_writes_over_an_input(tmp_path, capsys):
    plan = tmp_path / "studio.toml"
    shutil.copy(PLANS / "studio.toml", plan)
    before = plan.read_bytes()
    assert main(["compare", str(plan), "--html", str(plan)]) == 2
    assert "never overwrites its inputs" in capsys.readouterr().err
    assert plan.read_bytes() == before


def test_report_command_and_bad_input(tmp_path, capsys):
    out = tmp_path / "client.html"
    assert main(["report", str(PLANS / "studio.toml"), "-o", str(out), "--rules", "ada-2010"]) == 0
    html = out.read_text(encoding="utf-8")
    assert html.count("<svg") == 1 and "ada-2010" in html
    assert main(["report", str(tmp_path / "missing.toml"), "-o", str(out)]) == 2
    assert main(["compare", str(PLANS / "studio.toml"), "--rules", "no-such-set"]) == 2
    assert "unknown rule set" in capsys.readouterr().err


def test_report_areas_in_square_centimetres():
    # column-room: the bed's 1000 mm foot zone (UK M4(3)) runs y 2900..3900 over x 2650..4350;
    # the 400 x 400 mm column at x 3300..3700, y 2800..3200 covers 400 x 300 mm of it:
    # 120 000 mm2 = 1200 cm2 (1 cm2 = 100 mm2)
    plan = read_plan(Path(__file__).parent / "plans_unseen" / "column-room.toml")
    html = build_report(compare([plan], None), date=dt.date(2026, 3, 14))
    assert "<td>1200 cm²</td><td>none</td>" in html  # none of the zone may be covered
