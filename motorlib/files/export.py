"""Exporting motor records to generic CSV and JSON, or to our XML format (all written atomically)."""

from __future__ import annotations

import dataclasses
import json
import os
from pathlib import Path
from typing import Sequence

from ..motor.checks import metrics
from ..motor.record import MotorRecord
from .fsio import slug, write_atomic
from .motor_xml import record_to_bytes

__all__ = ["export_records", "record_as_dict"]


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


def export_records(items: Sequence[tuple[str, MotorRecord]], folder: str | os.PathLike[str], fmt: str) -> list[Path]:
    """Write (handle, record) pairs to ``folder`` as ``xml``, ``csv`` (one file each) or ``json`` (one file)."""
    out = Path(folder)
    out.mkdir(parents=True, exist_ok=True)
    written = []
    if fmt == "json":
        payload = [{"handle": handle, **record_as_dict(record)} for handle, record in items]
        written.append(write_atomic(out / "motors.json", (json.dumps(payload, indent=2) + "\n").encode()))
        return written
    for handle, record in items:
        name = "_".join(slug(part) for part in handle.split("/"))
        if fmt == "xml":
            written.append(write_atomic(out / f"{name}.xml", record_to_bytes(record)))
        elif fmt == "csv":
            lines = [f"# {record.maker}: {record.designation}", "time_s,thrust_n"]
            lines += [f"{float(t)!r},{float(f)!r}" for t, f in zip(record.time_s, record.thrust_n)]
            written.append(write_atomic(out / f"{name}.csv", ("\n".join(lines) + "\n").encode()))
        else:
            raise ValueError(f"`fmt` must be xml, csv or json, got {fmt!r}")
    return written
