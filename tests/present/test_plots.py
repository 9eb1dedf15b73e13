"""The flight chart's event labels (present/plots.py): each event once, labels of close events apart."""

from __future__ import annotations

from motorlib.present.plots import _event_times


def test_the_first_opening_is_labelled_once() -> None:
    # The summary names the first opening twice (deploy_time_s and deployments[0]); the chart drew two
    # overlapping 'deployment 11.9 s' labels (found when the labels were spread apart)
    summary = {"rail_exit_time_s": 0.2, "burnout_time_s": 1.9, "time_to_apogee_s": 12.4, "deploy_time_s": 11.9,
               "deployments": [{"name": "main", "time_s": 11.9}]}
    assert _event_times(summary) == [("rail exit", 0.2), ("burnout", 1.9), ("main", 11.9), ("apogee", 12.4)]
    without = {**summary, "deployments": []}
    assert ("deployment", 11.9) in _event_times(without)
