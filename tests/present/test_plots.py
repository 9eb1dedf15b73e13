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


def test_an_apogee_before_burnout_gets_no_coast_band_label() -> None:
    # The flight chart labelled a 'coast' band after burnout even when apogee came first (under thrust): there is
    # no coast then (new-user trial; the card and the HTML report already said so)
    from motorlib.present.plots import _phase_labels

    assert [name for *_, name in _phase_labels(burnout_s=4.95, apogee_s=4.16, deploy_s=None, end_s=6.6)] == ["boost"]
    assert [name for *_, name in _phase_labels(burnout_s=1.9, apogee_s=12.4, deploy_s=11.9, end_s=16.0)] == [
        "boost", "coast", "recovery"]
    # a band too narrow to hold its word is not labelled
    assert [name for *_, name in _phase_labels(burnout_s=0.3, apogee_s=12.4, deploy_s=None, end_s=16.0)] == ["coast"]
