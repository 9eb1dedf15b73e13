"""JSON export carries the 1.1 additions: the ejection state and the firing spread."""

from __future__ import annotations

import json
from pathlib import Path

from motorlib import read_record
from motorlib.files.export import export_records, record_as_dict


def test_json_export_carries_ejection_and_firing_spread(fixture_dir: Path, tmp_path: Path) -> None:
    record = read_record(fixture_dir / "v1_1_firing_spread.xml")
    data = record_as_dict(record)
    assert data["ejection"] == "delays"
    assert data["firing_spread"] == {"n_firings": 3, "total_impulse_mean_ns": 16.6, "total_impulse_std_ns": 0.33,
                                     "burn_time_mean_s": 1.43, "burn_time_std_s": 0.029}
    assert record_as_dict(read_record(fixture_dir / "v1_1_no_charge.xml"))["firing_spread"] is None
    (path,) = export_records([("fixture/d12", record)], tmp_path, "json")
    assert json.loads(path.read_text())[0]["firing_spread"]["n_firings"] == 3
