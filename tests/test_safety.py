"""The safety caution: one module holds every form of it, and each form makes the same points."""

from __future__ import annotations

import pytest

from motorlib import safety
from motorlib.present import report

# The project's rule (motorlib/safety.py): predictions are estimates; the safety code, the law and the site's
# rules come first; the range safety officer decides; fly only motors within your certification.
POINTS = ("estimate", "safety code", "range safety officer", "certification")


@pytest.mark.parametrize("point", POINTS)
def test_the_paragraph_and_the_report_box_make_every_point(point: str) -> None:
    assert point in safety.SAFETY_CAUTION.lower()
    assert any(point in sentence.lower() for sentence in safety.CAUTIONS)


def test_the_chart_line_keeps_the_two_points_that_fit() -> None:
    assert "estimates" in safety.CHART_CAUTION and "range safety officer decides" in safety.CHART_CAUTION


def test_the_reports_use_the_one_set_of_sentences() -> None:
    assert report.CAUTIONS is safety.CAUTIONS
