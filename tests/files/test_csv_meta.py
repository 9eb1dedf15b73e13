"""Metadata side files for many CSV curves (issue 14): one TOML file instead of nine long command lines."""

from __future__ import annotations

import datetime as dt
import json
from pathlib import Path

import pytest

from motorlib.errors import CsvFormatError
from motorlib.files.csv_meta import read_csv_metadata
from motorlib.files.motor_csv import CurveMetadata

from ..cli.conftest import run
from ..conftest import ROOT

SOUND_CSV = ROOT / "tests" / "fixtures" / "sound_d12.csv"

SIDE = '''
[defaults]
maker = "Our team"
diameter = "24 mm"
length = "70 mm"
source_kind = "own-firing"

[files."a.csv"]
designation = "D12-5"
total_mass = "44 g"
propellant_mass = "21 g"
delays = [3, 5, 7]
test_date = 2026-11-14

[files."b.csv"]
designation = "D12-7"
diameter = "0.95 in"
delays = "7"
notes = "lot 3"
'''


def test_defaults_and_tables_merge_per_file(tmp_path: Path) -> None:
    side = tmp_path / "motors.toml"
    side.write_text(SIDE)
    meta = read_csv_metadata(side)
    a = meta.metadata(tmp_path / "a.csv")
    assert (a.designation, a.maker, a.delays_s) == ("D12-5", "Our team", (3.0, 5.0, 7.0))
    assert a.diameter_m == pytest.approx(0.024) and a.total_mass_kg == pytest.approx(0.044)
    assert a.provenance.kind == "own-firing" and a.provenance.date == dt.date(2026, 11, 14)
    b = meta.metadata("elsewhere/b.csv")
    assert b.diameter_m == pytest.approx(0.95 * 0.0254)  # inch = 25.4 mm exactly (1959 agreement)
    assert b.provenance.notes == "lot 3" and b.length_m == pytest.approx(0.070)
    # options given on the command line win over the file
    over = meta.metadata(tmp_path / "a.csv", CurveMetadata(designation="D12-3"), {"designation"})
    assert over.designation == "D12-3" and over.maker == "Our team"
    assert meta.unused([tmp_path / "a.csv"]) == ["b.csv"]


@pytest.mark.parametrize("text, field", [
    ('[defaults]\ndiameter = "24"', "defaults.diameter"),
    ('[defaults]\ndiameter = 24', "defaults.diameter"),
    ('[defaults]\ndiamter = "24 mm"', "defaults.diamter"),
    ('[files."a.csv"]\ndelays = [0]', "files.a.csv.delays"),
    ('[files."a.csv"]\nsource_kind = "rumour"', "files.a.csv.source_kind"),
    ('[motors]\nmaker = "x"', "motors"),
])
def test_bad_entries_name_the_file_and_key(tmp_path: Path, text: str, field: str) -> None:
    side = tmp_path / "bad.toml"
    side.write_text(text)
    with pytest.raises(CsvFormatError) as info:
        read_csv_metadata(side)
    assert str(side) in str(info.value) and info.value.field == field


def test_catalog_add_and_check_use_the_side_file(tmp_path: Path) -> None:
    for name in ("a.csv", "b.csv"):
        (tmp_path / name).write_bytes(SOUND_CSV.read_bytes())
    side = tmp_path / "motors.toml"
    side.write_text(SIDE)
    code, out = run("catalog", "add", "--catalog", str(tmp_path / "cat"), str(tmp_path / "a.csv"),
                    str(tmp_path / "b.csv"), "--meta", str(side))
    assert code == 0, out
    code, out = run("catalog", "list", "--catalog", str(tmp_path / "cat"), "--json")
    rows = {r["designation"]: r for r in json.loads(out)}
    assert set(rows) == {"D12-5", "D12-7"}
    assert rows["D12-5"]["maker"] == "Our team" and rows["D12-5"]["diameter_m"] == pytest.approx(0.024)
    code, out = run("check", str(tmp_path / "a.csv"), "--meta", str(side), "--json")
    assert json.loads(out)[0]["designation"] == "D12-5"
    code, out = run("import", str(tmp_path / "b.csv"), "--meta", str(side), "--maker", "Other", "-o",
                    str(tmp_path / "b.xml"))
    assert code == 0, out
    from motorlib import read_record

    record = read_record(tmp_path / "b.xml")
    assert record.maker == "Other" and record.designation == "D12-7" and record.delays_s == (7.0,)
