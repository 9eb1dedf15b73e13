"""Issue 13: a corpus of hostile and careless inputs, one case per row; none may end in a traceback.

Each row is (command, input, expected exit status, fragment the output must hold). Inputs are written into a
scratch folder under the names the command line uses; ``{f}`` in the command stands for the input file.
Every input kind is covered: CSV curves and logs, XML records, airframe TOML, CLI options, catalog folders
and output paths. Exit statuses: 0 ok, 1 findings / a failed rule / a refused file, 2 unusable input or usage.
"""

from __future__ import annotations

import os
from pathlib import Path

import pytest

from .conftest import AIRFRAME, SAMPLE_DIR, run

GOOD_XML = (SAMPLE_DIR / "bramblewick-propulsion_f29-8.xml").read_text(encoding="utf-8")
GOOD_TOML = AIRFRAME.read_text(encoding="utf-8")
MOTOR = str(SAMPLE_DIR / "bramblewick-propulsion_f29-8.xml")


def _samples(rows: str) -> str:
    start = GOOD_XML.index(">", GOOD_XML.index("<samples")) + 1
    return GOOD_XML[:start] + "\n" + rows + "\n  " + GOOD_XML[GOOD_XML.index("</samples>"):]


# name -> bytes of a hostile curve file (CSV)
CSV_INPUTS: dict[str, bytes] = {
    "empty": b"",
    "only-comments": b"# nothing\n# here\n",
    "header-only": b"time_s,thrust_n\n",
    "one-row": b"time_s,thrust_n\n0,1\n",
    "ragged": b"time_s,thrust_n\n0,0\n0.1\n0.2,3\n",
    "text-in-number": b"time_s,thrust_n\n0,0\n0.1,ten\n0.2,0\n",
    "nan-thrust": b"time_s,thrust_n\n0,0\n0.1,nan\n0.2,0\n",
    "inf-time": b"time_s,thrust_n\n0,0\ninf,5\n",
    "huge-thrust": b"time_s,thrust_n\n0,0\n0.1,1e308\n0.5,1e308\n1,0\n",
    "overflowing-number": b"time_s,thrust_n\n0,0\n0.1,1e400\n1,0\n",
    "negative-thrust": b"time_s,thrust_n\n0,0\n0.1,-5\n1,0\n",
    "time-backwards": b"time_s,thrust_n\n0,0\n0.5,5\n0.2,5\n1,0\n",
    "duplicate-time": b"time_s,thrust_n\n0,0\n0.5,5\n0.5,6\n1,0\n",
    "all-zero": b"time_s,thrust_n\n0,0\n0.5,0\n1,0\n",
    "unknown-thrust-unit": b"time_s,thrust_furlongs\n0,0\n0.5,5\n1,0\n",
    "unknown-time-unit": b"time_fortnights,thrust_n\n0,0\n0.5,5\n1,0\n",
    "latin1": "time_s,thrust_n\n# café\xff\n0,0\n0.5,5\n1,0\n".encode("latin-1"),
    "utf16": "time_s,thrust_n\n0,0\n0.5,5\n1,0\n".encode("utf-16"),
    "binary": bytes(range(256)) * 4,
    "three-unnamed-columns": b"0,0,0\n0.5,5,5\n1,0,0\n",
    "no-time-column": b"a,b,c\n0,0,0\n0.5,5,5\n1,0,0\n",
    "markup-in-cell": b"time_s,thrust_n\n0,0\n0.5,[/x]\n1,0\n",
    "many-columns": b"time_s,thrust_n," + b",".join(b"c%d" % i for i in range(2000)) + b"\n",
    "wrong-timestamp": b"time_s,thrust_n\n0,0\n0.5,5\n1,0\n100000,0\n",
    "beyond-time-limit": b"time_s,thrust_n\n0,0\n0.5,5\n1e6,0\n",
}

# name -> bytes of a hostile motor record (XML)
XML_INPUTS: dict[str, bytes] = {
    "empty": b"",
    "not-xml": b"time,thrust\n0,0\n",
    "truncated": GOOD_XML[: len(GOOD_XML) // 2].encode(),
    "doctype": GOOD_XML.replace("<motor-record", '<!DOCTYPE m [<!ENTITY x "y">]>\n<motor-record', 1).encode(),
    "utf16-doctype": ('<?xml version="1.0" encoding="UTF-16"?>\n<!DOCTYPE m [<!ENTITY x "y">]>\n'
                      + GOOD_XML.split("?>", 1)[1].lstrip()).encode("utf-16"),
    "utf16-plain": ('<?xml version="1.0" encoding="UTF-16"?>\n' + GOOD_XML.split("?>", 1)[1].lstrip()).encode("utf-16"),
    "wrong-root": b"<?xml version='1.0'?><thrust-curve/>",
    "date-with-timezone-plus": GOOD_XML.replace('date="2026-12-01"', 'date="2026-12-01+02:00"').encode(),
    "date-year-0": GOOD_XML.replace('date="2026-12-01"', 'date="0000-12-01"').encode(),
    "date-february-30": GOOD_XML.replace('date="2026-12-01"', 'date="2026-02-30"').encode(),
    "huge-thrust": _samples("0 0\n0.1 1e308\n1 0").encode(),
    "overflow-number": _samples("0 0\n0.1 1e400\n1 0").encode(),
    "nan-sample": _samples("0 0\n0.1 NaN\n1 0").encode(),
    "three-fields": _samples("0 0 0\n0.1 5\n1 0").encode(),
    "markup-in-value": GOOD_XML.replace('kind="demo"', 'kind="[/x]"').encode(),
    "long-maker": GOOD_XML.replace("Bramblewick", "B" * 5000, 1).encode(),
    "big-diameter": GOOD_XML.replace('<diameter unit="mm">', '<diameter unit="mm">9', 1).encode(),
    "zero-diameter": GOOD_XML.replace('<diameter unit="mm">29', '<diameter unit="mm">0', 1).encode(),
    "binary": bytes(range(256)) * 4,
}

# name -> text of a hostile airframe file (TOML)
TOML_INPUTS: dict[str, bytes] = {
    "empty": b"",
    "not-toml": b"[[[\n",
    "latin1": "name = 'caf\xe9'\n".encode("latin-1") + GOOD_TOML.split("\n", 2)[2].encode(),
    "utf16": GOOD_TOML.encode("utf-16"),
    "missing-mass": GOOD_TOML.replace('mass = "310 g"', "").encode(),
    "negative-mass": GOOD_TOML.replace('mass = "310 g"', 'mass = "-310 g"').encode(),
    "nan-mass": GOOD_TOML.replace('mass = "310 g"', 'mass = "nan g"').encode(),
    "inf-cd": GOOD_TOML.replace("drag_coefficient = 0.55", "drag_coefficient = inf").encode(),
    "zero-diameter": GOOD_TOML.replace('diameter = "41.6 mm"', 'diameter = "0 mm"').encode(),
    "mass-as-length": GOOD_TOML.replace('mass = "310 g"', 'mass = "310 mm"').encode(),
    "mass-as-table": GOOD_TOML.replace('mass = "310 g"', "mass = {a = 1}").encode(),
    "rail-angle-90": GOOD_TOML.replace('rail_angle = "5 deg"', 'rail_angle = "95 deg"').encode(),
    "huge-rail": GOOD_TOML.replace('rail_length = "2.4 m"', 'rail_length = "1e300 m"').encode(),
    "markup-in-name": GOOD_TOML.replace('name = "Quibble 41 (demo)"', 'name = "[/x] [bold]oops"').encode(),
    "binary": bytes(range(256)) * 4,
}

CSV_COMMANDS = {
    "check": ["check", "{f}", "--designation", "E30"],
    "import": ["import", "{f}", "-o", "{out}.xml", "--designation", "E30"],
    "catalog add": ["catalog", "add", "--catalog", "{cat}", "{f}", "--designation", "E30"],
    "catalog add --force": ["catalog", "add", "--catalog", "{cat}", "{f}", "--designation", "E30", "--force"],
    "reduce": ["reduce", "{f}", "--designation", "E30"],
}
XML_COMMANDS = {
    "check": ["check", "{f}"],
    "catalog add": ["catalog", "add", "--catalog", "{cat}", "{f}"],
    "fly --motor": ["fly", str(AIRFRAME), "--motor", "{f}"],
}
TOML_COMMANDS = {
    "fly": ["fly", "{f}", "--motor", MOTOR],
    "match": ["match", "{f}", "--target", "300"],
    "airframe": ["airframe", "{f}"],
}


def _cases() -> list[tuple[str, str, str, bytes, str, list[str]]]:
    cases = []
    for table, commands, suffix in ((CSV_INPUTS, CSV_COMMANDS, ".csv"), (XML_INPUTS, XML_COMMANDS, ".xml"),
                                    (TOML_INPUTS, TOML_COMMANDS, ".toml")):
        for input_name, data in table.items():
            for command_name, args in commands.items():
                cases.append((f"{command_name}[{suffix[1:]}:{input_name}]", suffix, input_name, data,
                              command_name, args))
    return cases


CASES = _cases()


@pytest.mark.parametrize("case", CASES, ids=[c[0] for c in CASES])
def test_no_traceback_and_a_clear_outcome(case: tuple, tmp_path: Path) -> None:
    _, suffix, input_name, data, _, args = case
    path = tmp_path / f"in-{input_name}{suffix}"
    path.write_bytes(data)
    os.chdir(tmp_path)
    argv = [a.format(f=path, out=tmp_path / "out", cat=tmp_path / "cat") for a in args]
    result = run(*argv)  # raises on a traceback
    assert result.exit_code in (0, 1, 2), result.output
    if result.exit_code:
        assert "Error" in result.output or "refused" in result.output or "unreadable" in result.output \
            or "error" in result.output or "warning" in result.output, result.output  # warning: a rule broken
    assert "Traceback" not in result.output
    assert "Infinity" not in result.output and "NaN" not in result.output
    if "catalog" in argv[:1] and (tmp_path / "cat").exists():  # whatever add wrote, the catalog reads
        listing = run("catalog", "list", "--catalog", tmp_path / "cat")
        assert listing.exit_code == 0 and "skipped" not in listing.stderr, listing.output


# (command, expected exit status, fragment): the options and folders a careless user gives
OPTION_CASES = [
    (["match", str(AIRFRAME), "--target", "300", "--min-thrust-to-weight", "nan"], 2, "min-thrust-to-weight"),
    (["match", str(AIRFRAME), "--target", "300", "--min-thrust-to-weight", "inf"], 2, "min-thrust-to-weight"),
    (["match", str(AIRFRAME), "--target", "300", "--delay-slack", "nan"], 2, "delay-slack"),
    (["match", str(AIRFRAME), "--target", "nan"], 2, "target"),
    (["match", str(AIRFRAME), "--target", "-300"], 2, "target"),
    (["fly", str(AIRFRAME), "--motor", "F29-8", "--ballast", "nan g"], 2, "ballast"),
    (["fly", str(AIRFRAME), "--motor", "F29-8", "--delay", "inf"], 2, "delay"),
    (["fly", str(AIRFRAME), "--motor", "NO-SUCH-MOTOR"], 2, "NO-SUCH-MOTOR"),
    (["descent", "--mass", "0g", "--drag-area", "0.1"], 2, "mass"),
    (["descent", "--mass", "-1g", "--drag-area", "0.1"], 2, "mass"),
    (["descent", "--mass", "100g", "--drag-area", "0"], 0, "no drag"),  # free fall (issue 10)
    (["descent", "--mass", "100g", "--drag-area", "-0.1"], 2, "drag-area"),
    (["descent", "--mass", "100g", "--drag-area", "nan"], 2, "drag-area"),
    (["descent", "--mass", "100g", "--drag-area", "0.1", "--height", "-5"], 2, "height"),
    (["descent", "--height", "0", "--fall-time", "9"], 2, "height"),
    (["descent", "--height", "80", "--fall-time", "0"], 2, "fall-time"),
    (["descent", "--height", "80", "--fall-time", "1", "--json"], 2, "vacuum"),
    (["descent", "--mass", "100g", "--drag-area", "1e-30", "--json"], 0, "terminal"),
    (["catalog", "list", "--catalog", "{tmp}/afile"], 2, "afile"),
    (["catalog", "show", "--catalog", str(SAMPLE_DIR), "ZZZ-9"], 2, "ZZZ-9"),
    (["catalog", "remove", "--catalog", "{tmp}/cat", "nothing"], 2, "nothing"),
    (["catalog", "list", "--catalog", "{tmp}/cat", "--class", "Q..Z"], 2, "class"),
    (["catalog", "list", "--catalog", "{tmp}/cat", "--impulse", "abc"], 2, "impulse"),
    (["catalog", "list", "--catalog", "{tmp}/cat", "--sort", "nonsense"], 2, "sort"),
    (["catalog", "tag", "--catalog", "{tmp}/cat", "F29-8", "bad tag!"], 2, "tag"),
    (["reduce", "{tmp}/flat.csv", "--designation", "E30"], 1, "flat.csv"),
    (["reduce", "{tmp}/flat.csv", "--cutoff", "-5"], 2, "cutoff"),
    (["reduce", "{tmp}/flat.csv", "--scale", "nan"], 2, "scale"),
    (["check", "{tmp}/nowhere.csv"], 2, "nowhere.csv"),
    (["check", "{tmp}/flat.csv", "--time-unit", "fortnight"], 2, "fortnight"),
    (["new-airframe", "{tmp}/afile/x.toml"], 2, "afile"),
]


@pytest.mark.parametrize("args,status,fragment", OPTION_CASES, ids=[" ".join(c[0][:3]) + f"#{i}"
                                                                    for i, c in enumerate(OPTION_CASES)])
def test_options_and_folders(args: list[str], status: int, fragment: str, tmp_path: Path) -> None:
    os.chdir(tmp_path)
    (tmp_path / "afile").write_text("not a folder")
    (tmp_path / "flat.csv").write_text("time_s,force_N\n" + "".join(f"{i / 1000:.3f},5.0\n" for i in range(2000)))
    run("catalog", "add", "--catalog", tmp_path / "cat", MOTOR)
    result = run(*[a.format(tmp=tmp_path) for a in args])
    assert result.exit_code == status, result.output
    assert fragment in result.output, result.output
    assert "Infinity" not in result.output and "NaN" not in result.output
