"""Issue 13, class 1: one bad curve file never breaks a catalog command; `verify` names it.

Each poison is put in a catalog beside a good motor, then every catalog command is run: each works on the
good motor, reports the bad file as skipped, and never shows a traceback.
"""

from __future__ import annotations

import os
import shutil
from pathlib import Path
from typing import Callable

import pytest

from .conftest import AIRFRAME, SAMPLE_DIR, run

GOOD = SAMPLE_DIR / "bramblewick-propulsion_f29-8.xml"


def _good_text() -> str:
    return GOOD.read_text(encoding="utf-8")


def _huge_thrust_by_force(root: Path, tmp: Path) -> str:
    """Finite but huge thrust: its impulse overflows to inf; `add --force` used to write it."""
    csv = tmp / "h.csv"
    csv.write_text("time_s,thrust_n\n0,0\n0.1,1e308\n0.5,1e308\n1,0\n")
    result = run("catalog", "add", "--catalog", root, csv, "--designation", "D12-5", "--force")
    assert "Traceback" not in result.output
    return "h.csv"


def _huge_thrust_file(root: Path, tmp: Path) -> str:
    text = _good_text()
    start = text.index("<samples")
    start = text.index(">", start) + 1
    end = text.index("</samples>")
    (root / "maker").mkdir()
    (root / "maker" / "huge.xml").write_text(text[:start] + "\n0 0\n0.1 1e308\n0.5 1e308\n1 0\n" + text[end:])
    return "huge.xml"


def _dated_with_timezone(root: Path, tmp: Path) -> str:
    """`2026-12-01Z` is a valid xs:date (with a time zone) that date.fromisoformat refuses."""
    text = _good_text()
    text = text.replace('date="2026-12-01"', 'date="2026-12-01Z"', 1)
    (root / "tz.xml").write_text(text.replace("F29-8", "F29-6"), encoding="utf-8")
    return "tz.xml"


def _utf16_doctype(root: Path, tmp: Path) -> str:
    text = _good_text().replace("<?xml version='1.0' encoding='UTF-8'?>", "").replace(
        '<?xml version="1.0" encoding="UTF-8"?>', "")
    doc = '<?xml version="1.0" encoding="UTF-16"?>\n<!DOCTYPE motor-record [<!ENTITY x "F29-8">]>\n' + text.lstrip()
    (root / "u16.xml").write_bytes(doc.encode("utf-16"))
    return "u16.xml"


def _dangling_symlink(root: Path, tmp: Path) -> str:
    os.symlink(tmp / "nowhere.xml", root / "dangling.xml")
    return "dangling.xml"


def _markup_in_name_and_error(root: Path, tmp: Path) -> str:
    """The path reads ``.../[/x]bad.xml`` and the schema error quotes the value ``[/x]``: both are rich markup."""
    (root / "[").mkdir()
    (root / "[" / "x]bad.xml").write_text(_good_text().replace('kind="demo"', 'kind="[/x]"'), encoding="utf-8")
    return "[/x]bad.xml"


def _not_a_file(root: Path, tmp: Path) -> str:
    os.mkfifo(root / "pipe.xml")
    return "pipe.xml"


POISONS: dict[str, Callable[[Path, Path], str]] = {
    "huge-thrust-added-with-force": _huge_thrust_by_force,
    "huge-thrust-file": _huge_thrust_file,
    "date-with-timezone": _dated_with_timezone,
    "utf16-with-doctype": _utf16_doctype,
    "dangling-symlink": _dangling_symlink,
    "rich-markup-in-path-and-error": _markup_in_name_and_error,
    "fifo": _not_a_file,
}


# Not poisons after all: read as what they are (a valid xs:date with a time zone is a date)
ACCEPTED = {"date-with-timezone"}
# Refused by `catalog add`, so never in the catalog
REFUSED_AT_ADD = {"huge-thrust-added-with-force"}


@pytest.fixture(params=sorted(POISONS))
def poisoned(request: pytest.FixtureRequest, tmp_path: Path) -> tuple[Path, str, str]:
    root = tmp_path / "cat"
    root.mkdir()
    shutil.copy(GOOD, root / "good.xml")
    name = POISONS[request.param](root, tmp_path)
    return root, name, request.param


def test_list_and_json_skip_the_bad_file(poisoned: tuple[Path, str, str]) -> None:
    root, name, kind = poisoned
    result = run("catalog", "list", "--catalog", root)
    assert result.exit_code == 0, result.output
    assert "F29-8" in result.stdout
    if kind in ACCEPTED:
        assert "F29-6" in result.stdout and "skipped" not in result.stderr
    elif kind not in REFUSED_AT_ADD:
        assert name in result.stderr and "skipped" in result.stderr
    result = run("catalog", "list", "--catalog", root, "--json")
    assert result.exit_code == 0, result.output
    assert "Infinity" not in result.stdout and "NaN" not in result.stdout


def test_show_match_remove_reindex_still_work(poisoned: tuple[Path, str, str]) -> None:
    root, _, _ = poisoned
    assert run("catalog", "show", "--catalog", root, "F29-8").exit_code == 0
    result = run("match", AIRFRAME, "--catalog", root, "--target", "300")
    assert result.exit_code == 0, result.output
    assert run("catalog", "reindex", "--catalog", root).exit_code == 0
    assert run("catalog", "list", "--catalog", root).exit_code == 0
    result = run("catalog", "remove", "--catalog", root, "F29-8")
    assert result.exit_code == 0, result.output


def test_verify_names_the_bad_file(poisoned: tuple[Path, str, str]) -> None:
    root, name, kind = poisoned
    result = run("catalog", "verify", "--catalog", root)
    if kind in REFUSED_AT_ADD | ACCEPTED:
        assert result.exit_code == 0, result.output  # nothing wrong in the catalog
        assert "skipped" not in result.stdout.replace("0 file(s) skipped", "")
        return
    assert result.exit_code == 1, result.output
    assert name in result.stdout.replace("\n", "")
    assert "skipped" in result.stdout


def test_force_cannot_write_a_file_the_catalog_cannot_read(tmp_path: Path) -> None:
    csv = tmp_path / "h.csv"
    csv.write_text("time_s,thrust_n\n0,0\n0.1,1e308\n0.5,1e308\n1,0\n")
    result = run("catalog", "add", "--catalog", tmp_path / "cat", csv, "--designation", "D12-5", "--force")
    assert result.exit_code == 1
    assert not list((tmp_path / "cat").rglob("*.xml"))
    assert "h.csv" in result.output


def test_a_curve_too_long_for_the_reader_is_refused_before_writing(tmp_path: Path) -> None:
    """Issue 13 class 4: 400 000 rows made an XML over the reader's cap, accepted by add, gone on reindex."""
    import numpy as np

    n = 400_000
    t = np.linspace(0.0, 4.0, n)
    f = 30.0 * np.sin(np.pi * t / 4.0) + 1.0
    f[0] = f[-1] = 0.0
    csv = tmp_path / "long.csv"
    csv.write_text("time_s,thrust_n\n" + "\n".join(f"{a:.7f},{b:.5f}" for a, b in zip(t, f)) + "\n")
    root = tmp_path / "cat"
    result = run("catalog", "add", "--catalog", root, csv, "--designation", "F20", "--force")
    assert result.exit_code == 1 and "refused" in result.output, result.output
    assert not list(root.rglob("*.xml"))
    from motorlib.catalog import Catalog
    from motorlib.files.motor_csv import CurveMetadata

    (added,) = Catalog(root).add_files([csv], metadata=CurveMetadata(designation="F20"), force=True)
    assert added.status == "refused" and "reads back" in added.message and "limit of 8 MiB" in added.message
    out = tmp_path / "long.xml"
    result = run("import", csv, "-o", out, "--designation", "F20", "--force")
    assert result.exit_code != 0 and not out.exists(), result.output


def test_a_name_over_the_schema_limit_is_refused_before_writing(tmp_path: Path) -> None:
    csv = tmp_path / "m.csv"
    csv.write_text("time_s,thrust_n\n0,0\n0.1,30\n0.9,25\n1.0,0\n")
    root = tmp_path / "cat"
    result = run("catalog", "add", "--catalog", root, csv, "--designation", "E25", "--maker", "M" * 600)
    assert result.exit_code == 1, result.output
    assert not list(root.rglob("*.xml"))
    assert run("catalog", "reindex", "--catalog", root).exit_code == 0
