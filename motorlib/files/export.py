"""Exporting motor records to generic CSV and JSON, or to our XML format (all written atomically)."""

from __future__ import annotations

import dataclasses
import json
import os
from pathlib import Path
from typing import Callable, Sequence

from ..motor.checks import metrics
from ..motor.record import MotorRecord
from .fsio import slug, write_atomic
from .motor_xml import readable_record_bytes

__all__ = ["export_json_bytes", "export_records", "record_as_dict"]


def record_as_dict(record: MotorRecord) -> dict[str, object]:
    """A record and its metrics as plain JSON-ready data (SI units)."""
    data = metrics(record)
    data["provenance"] = {"kind": record.provenance.kind,
                          "date": record.provenance.date.isoformat() if record.provenance.date else None,
                          "notes": record.provenance.notes}
    spread = record.firing_spread
    data["firing_spread"] = dataclasses.asdict(spread) if spread is not None else None
    data["samples"] = {"time_s": record.time_s.tolist(), "thrust_n": record.thrust_n.tolist()}
    return data


def export_json_bytes(items: Sequence[tuple[str, MotorRecord]], *,
                      progress: Callable[[int], None] | None = None) -> bytes:
    """The ``json`` export of (handle, record) pairs: one JSON list, each motor ``{handle, ...record_as_dict}``.

    ``progress(1)`` is called after each motor.
    """
    payload = []
    for handle, record in items:
        payload.append({"handle": handle, **record_as_dict(record)})
        if progress is not None:
            progress(1)
    return (json.dumps(payload, indent=2) + "\n").encode()


def export_records(items: Sequence[tuple[str, MotorRecord]], folder: str | os.PathLike[str], fmt: str, *,
                   overwrite: bool = False, progress: Callable[[int], None] | None = None) -> list[Path]:
    """Write (handle, record) pairs to ``folder`` as ``xml``, ``csv`` (one file each) or ``json`` (one file).

    File names come from the handles; two handles that give one name (they differ only in case or
    punctuation) get ``-2``, ``-3`` suffixes, so every motor gets its own file. Every target is checked
    before anything is written: without ``overwrite`` an existing file stops the export untouched.
    ``progress(1)`` is called after each motor.

    Raises
    ------
    FileExistsError
        A target exists and ``overwrite`` is False (nothing written).
    """
    if fmt not in ("xml", "csv", "json"):
        raise ValueError(f"`fmt` must be xml, csv or json, got {fmt!r}")
    out = Path(folder)
    if fmt == "json":
        targets = [(out / "motors.json", None)]
    else:
        targets, taken = [], set()
        for handle, record in items:
            stem = base = "_".join(slug(part) for part in handle.split("/"))
            n = 1
            while stem.lower() in taken:
                n += 1
                stem = f"{base}-{n}"
            taken.add(stem.lower())
            targets.append((out / f"{stem}.{fmt}", record))
    existing = [str(path) for path, _ in targets if os.path.lexists(path)]
    if existing and not overwrite:
        more = f" (and {len(existing) - 1} more)" if len(existing) > 1 else ""
        raise FileExistsError(f"{existing[0]}{more}: already exists")
    out.mkdir(parents=True, exist_ok=True)
    if fmt == "json":
        return [write_atomic(out / "motors.json", export_json_bytes(items, progress=progress), overwrite=overwrite)]
    written = []
    for path, record in targets:
        written.append(write_atomic(path, _export_bytes(record, fmt), overwrite=overwrite))
        if progress is not None:
            progress(1)
    return written


def _export_bytes(record: MotorRecord, fmt: str) -> bytes:
    if fmt == "xml":
        return readable_record_bytes(record)
    # a comment line of one line: a newline in a name would start a line the CSV reader takes for data
    title = " ".join(f"{record.maker}: {record.designation}".split())
    lines = [f"# {title}", "time_s,thrust_n"]
    lines += [f"{float(t)!r},{float(f)!r}" for t, f in zip(record.time_s, record.thrust_n)]
    return ("\n".join(lines) + "\n").encode()
