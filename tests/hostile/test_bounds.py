"""Issue 13, classes 6 and 11: reads and grids are bounded, special files refused, nothing created by a reader."""

from __future__ import annotations

import os
import tracemalloc
from pathlib import Path

import numpy as np
import pytest

from motorlib.errors import CatalogError, CurveDataError, CsvFormatError, SimulationInputError
from motorlib.files.airframe_toml import load_airframe
from motorlib.files.motor_csv import read_csv_curve
from motorlib.files.motor_xml import read_record
from motorlib.motor.reduction import reduce_log

from .conftest import AIRFRAME, run


def test_one_wrong_timestamp_does_not_build_a_huge_grid() -> None:
    t = np.arange(-0.3, 1.5, 1e-3)
    f = np.where((t > 0) & (t < 1.0), 30.0, 0.0) + 5.0
    t[-1] = 1e5  # one wrong timestamp: a 1 kHz grid to it would hold 1e8 points (3 GB with its copies)
    tracemalloc.start()
    with pytest.raises(CurveDataError, match="row 1801") as info:
        reduce_log(t, f, lines=np.arange(2, t.size + 2))
    peak = tracemalloc.get_traced_memory()[1]
    tracemalloc.stop()
    assert peak < 50e6
    assert info.value.problems[0].code == "log-time-gap"


def test_a_symlink_to_dev_zero_is_read_within_the_limit(tmp_path: Path) -> None:
    link = tmp_path / "zero.csv"
    link.symlink_to("/dev/zero")
    with pytest.raises(CsvFormatError, match="not a regular file"):
        read_csv_curve(link)


def test_a_fifo_is_refused_without_waiting(tmp_path: Path) -> None:
    for name, reader, error in (("p.xml", read_record, CurveDataError.__mro__[1]),
                                ("p.csv", read_csv_curve, CsvFormatError),
                                ("p.toml", load_airframe, SimulationInputError)):
        os.mkfifo(tmp_path / name)
        with pytest.raises(error, match="pipe"):
            reader(tmp_path / name)


def test_a_huge_airframe_file_is_refused_by_bytes_read(tmp_path: Path) -> None:
    big = tmp_path / "big.toml"
    big.write_text(AIRFRAME.read_text() + "\n# " + "x" * (5 * 1024 * 1024) + "\n")
    with pytest.raises(SimulationInputError, match="limit"):
        load_airframe(big)


def test_a_non_utf8_airframe_file_is_a_clear_error(tmp_path: Path) -> None:
    bad = tmp_path / "latin.toml"
    bad.write_bytes("name = 'caf\xe9'\n".encode("latin-1"))
    with pytest.raises(SimulationInputError, match="not UTF-8"):
        load_airframe(bad)


def test_read_only_commands_never_create_the_user_catalog(tmp_path: Path) -> None:
    from motorlib.cli.options import default_catalog_dir

    result = run("catalog", "list")
    assert result.exit_code in (0, 2), result.output  # 2: no catalog there yet (unusable input), never created
    assert not Path(default_catalog_dir()).exists()
    result = run("match", AIRFRAME, "--target", "300")
    assert result.exit_code == 0, result.output  # the bundled samples, not "no motors"


def test_a_typo_in_a_catalog_folder_name_creates_nothing(tmp_path: Path) -> None:
    from motorlib.catalog import Catalog

    with pytest.raises(CatalogError, match="no such catalog folder"):
        Catalog(tmp_path / "mtors", create=False)
    assert not (tmp_path / "mtors").exists()
    result = run("catalog", "list", "--catalog", tmp_path / "mtors")
    assert result.exit_code != 0 and "mtors" in result.output
    assert not (tmp_path / "mtors").exists()


def test_staged_files_of_a_killed_writer_are_cleaned_on_the_next_open(tmp_path: Path) -> None:
    from motorlib.catalog import Catalog

    root = tmp_path / "cat"
    Catalog(root).close()
    staging = root / ".motorlib" / "staging"
    staging.mkdir(parents=True, exist_ok=True)
    (staging / "123-dead-0.tmp").write_bytes(b"half")
    (root / "maker").mkdir()
    (root / "maker" / ".g59.xml.abc123.tmp").write_bytes(b"half")  # write_atomic's temporary name
    (root / ".tags.json.def456.tmp").write_bytes(b"{")  # tags.json's, in the catalog folder itself
    (root / ".hidden").mkdir()
    (root / ".hidden" / ".kept.tmp").write_bytes(b"not ours")  # hidden folders are not the catalog's
    (root / "maker" / "g59.tmp").write_bytes(b"not ours")  # not a temporary name of ours
    Catalog(root).close()
    assert not list(staging.iterdir())
    assert not (root / "maker" / ".g59.xml.abc123.tmp").exists() and not (root / ".tags.json.def456.tmp").exists()
    assert (root / ".hidden" / ".kept.tmp").exists() and (root / "maker" / "g59.tmp").exists()


@pytest.mark.parametrize("field", ["maker", "designation", "notes"])
def test_a_control_character_in_a_name_refuses_that_curve_only(tmp_path: Path, field: str) -> None:
    # A name from CSV metadata may carry a control character that no curve file can hold; the add refused nothing
    # and stopped the whole batch with an internal error. Now that one curve is refused, naming the field, and the
    # other curve of the batch is added.
    from motorlib.catalog import Catalog
    from motorlib.files.motor_csv import CurveMetadata
    from motorlib.motor.record import Provenance

    good, bad = tmp_path / "good.csv", tmp_path / "bad.csv"
    for path in (good, bad):
        path.write_text("time_s,thrust_n\n0,0\n0.05,14\n0.1,20\n0.3,19\n0.5,18.5\n0.7,18\n0.8,17\n0.9,8\n1,0\n")
    names = {"designation": "D16-6", "maker": "Test stand team", "notes": "lot 3"}

    def metadata(path):
        text = dict(names)
        if path == bad:
            text[field] = text[field][:2] + "\x01" + text[field][2:]
        return CurveMetadata(designation=text["designation"], maker=text["maker"],
                             provenance=Provenance("own-firing", notes=text["notes"]))

    with Catalog(tmp_path / "catalog") as catalog:
        results = catalog.add_files([bad, good], metadata=metadata)
    by_file = {Path(r.source).name: r for r in results}
    assert by_file["good.csv"].status == "added"
    assert by_file["bad.csv"].status == "refused"
    assert "cannot carry (U+0001" in by_file["bad.csv"].message and field in by_file["bad.csv"].message
