"""Reading and writing motor records in motorlib's own XML format (``data_schema/FORMAT.md``).

The only module that knows the element names. Reading is defensive: a size cap,
no DTD at all (so no entity expansion and no external entities), no network,
then XSD validation, then the record's own invariants; every error names the
file, the line and the field. Writing is atomic and byte-stable: samples and
delays are written to ten significant digits (far finer than any test stand;
arithmetic noise such as 0.0009999999999998899 becomes 0.001), hardware values
with the shortest text that reads back to the same double, and
write(read(write(r))) == write(r) for every record.

Versions: files of format 1.0 and 1.1 (and any later 1.x the schema accepts)
are read; new files always declare 1.1. What changed in 1.1 (FORMAT.md):

* an absent ``ejection`` element means "no ejection charge" in a 1.0 file and
  "delays not known" from 1.1 on; 1.1 says "no charge" as ``charge="none"``;
* provenance kinds have new names; the 1.0 names are read and mapped
  (:data:`~motorlib.motor.record.FORMER_PROVENANCE_KINDS`);
* an optional ``firing-spread`` element.
"""

from __future__ import annotations

import datetime as _dt
import os
import re
from pathlib import Path
from typing import Final

import numpy as np
from lxml import etree

from . import schema
from ..motor.record import FORMER_PROVENANCE_KINDS, UNWRITABLE_CHARACTER, FiringSpread, MotorRecord, Provenance
from ..errors import CurveDataError, CurveError, CurveSyntaxError, MotorlibError, Problem, SchemaValidationError
from .fsio import read_bounded, size_text as _size_text, write_atomic
from ..units import to_si

__all__ = ["DEFAULT_MAX_BYTES", "FORMAT_VERSION", "read_record", "read_record_and_bytes", "readable_record_bytes",
           "record_from_bytes", "record_to_bytes", "write_record"]

FORMAT_VERSION: Final = "1.1"  # written always, whichever 1.1 features a record uses (FORMAT.md)
DEFAULT_MAX_BYTES: Final = 8 * 1024 * 1024  # a 100 000-sample curve is about 3 MB; anything far larger is not a curve
_NS: Final = schema.MOTOR_RECORD_NAMESPACE
_Q: Final = "{" + _NS + "}"
_DECLARATION = re.compile(rb"<!(DOCTYPE|ENTITY)", re.IGNORECASE)


def _parser() -> etree.XMLParser:
    return etree.XMLParser(
        resolve_entities=False, no_network=True, load_dtd=False, dtd_validation=False,
        huge_tree=False, remove_blank_text=False,
    )


def read_record(path: str | os.PathLike[str], *, max_bytes: int = DEFAULT_MAX_BYTES) -> MotorRecord:
    """Read one motor record from an XML file.

    Raises
    ------
    CurveSyntaxError
        Not well-formed, larger than ``max_bytes``, or holding a DTD/entity declaration.
    SchemaValidationError
        Not a motor record of format version 1.x.
    CurveDataError
        Valid XML whose samples or hardware break a record invariant.
    CurveSyntaxError
        Also when the file cannot be read, is not a regular file (a pipe, a device) or is too large.
    """
    return read_record_and_bytes(path, max_bytes=max_bytes)[0]


def read_record_and_bytes(path: str | os.PathLike[str], *,
                          max_bytes: int = DEFAULT_MAX_BYTES) -> tuple[MotorRecord, bytes]:
    """:func:`read_record`, and the bytes of the file it read: a writer hands them to
    :func:`readable_record_bytes` (``read_from``), which then need not parse its own document again."""
    data = read_bounded(path, max_bytes, error=CurveSyntaxError)
    return record_from_bytes(data, str(path), max_bytes=max_bytes), data


def record_from_bytes(data: bytes, source: str = "<bytes>", *, max_bytes: int = DEFAULT_MAX_BYTES) -> MotorRecord:
    """Parse a motor record from the bytes of an XML document (see :func:`read_record`).

    Motor records are UTF-8 (FORMAT.md): a document in any other encoding is refused before parsing, so
    that the refusal of declarations below sees the text as it is (a UTF-16 ``<!DOCTYPE`` has no ASCII bytes).
    Any value the reader cannot convert becomes a :class:`~motorlib.errors.CurveError` naming the element.
    """
    root = _valid_tree(data, source, max_bytes)
    try:
        return _record_from_tree(root, source)
    except MotorlibError:
        raise
    except (ValueError, TypeError, ArithmeticError) as exc:  # a value the schema allows and Python cannot take
        raise SchemaValidationError(source, f"a value cannot be read: {exc}") from None


def _valid_tree(data: bytes, source: str, max_bytes: int) -> etree._Element:
    """The root of a well-formed, safe, schema-valid document (the checks of :func:`record_from_bytes`)."""
    if len(data) > max_bytes:
        raise CurveSyntaxError(source, f"document is above the limit of {_size_text(max_bytes)} for one curve")
    if data[:4] in (b"\xff\xfe\x00\x00", b"\x00\x00\xfe\xff") or data[:2] in (b"\xff\xfe", b"\xfe\xff") \
            or b"\x00" in data[:1024]:
        raise CurveSyntaxError(source, "not UTF-8: motor records are UTF-8 text (save the file as UTF-8)", line=1)
    declaration = _DECLARATION.search(data)
    if declaration:
        line = data.count(b"\n", 0, declaration.start()) + 1
        raise CurveSyntaxError(
            source, f"<!{declaration.group(1).decode().upper()}> declarations are not allowed in motor records "
            "(refused for safety: no DTDs, no entities)", line=line)
    try:
        root = etree.fromstring(data, _parser())
    except etree.XMLSyntaxError as exc:
        line = exc.lineno if exc.lineno else None
        raise CurveSyntaxError(source, f"not well-formed XML: {exc.msg}", line=line) from exc
    if root.getroottree().docinfo.doctype:  # belt and braces: an encoding lxml decodes that we did not foresee
        raise CurveSyntaxError(source, "<!DOCTYPE> declarations are not allowed in motor records "
                               "(refused for safety: no DTDs, no entities)", line=1)
    _check_root(root, source)
    schema.validate(root.getroottree(), source)
    return root


def _check_root(root: etree._Element, source: str) -> None:
    qname = etree.QName(root)
    if qname.localname != "motor-record":
        raise SchemaValidationError(source, f"root element is <{qname.localname}>, expected <motor-record>",
                                    field="/" + qname.localname, line=root.sourceline)
    if qname.namespace != _NS:
        hint = ""
        match = re.fullmatch(r"urn:x-motorlib:motor-record:(\d+)", qname.namespace or "")
        if match:
            hint = f"; it is format version {match.group(1)}, this motorlib reads version 1 (upgrade motorlib)"
        raise SchemaValidationError(source, f"namespace is {qname.namespace!r}, expected {_NS!r}{hint}",
                                    field="/motor-record", line=root.sourceline)


def _children(parent: etree._Element | None) -> dict[str, etree._Element]:
    """The child elements of ``parent`` in our namespace, by local name (the first of a name, as ``find`` gives).

    One pass over the children instead of a ``find`` per name: a record has about fifteen elements to look up.
    Elements of other namespaces (which the schema lets extensions add) are left out.
    """
    found: dict[str, etree._Element] = {}
    if parent is not None:
        for child in parent:
            tag = child.tag
            if isinstance(tag, str) and tag.startswith(_Q):  # comments and processing instructions have no str tag
                found.setdefault(tag[len(_Q):], child)
    return found


def _text(children: dict[str, etree._Element], name: str) -> str | None:
    element = children.get(name)
    return None if element is None else (element.text or "")


def _quantity(children: dict[str, etree._Element], name: str, kind: str) -> float | None:
    element = children.get(name)
    if element is None:
        return None
    return to_si(float(element.text), element.get("unit"), kind, field=name)


_XS_DATE = re.compile(r"(\d{4}-\d{2}-\d{2})(?:Z|[+-]\d{2}:\d{2})?")


def _xs_date(text: str, source: str, line: int | None) -> _dt.date:
    """An xs:date such as ``2026-12-01`` or ``2026-12-01Z`` / ``2026-12-01+02:00``; a time zone is dropped."""
    match = _XS_DATE.fullmatch(text.strip())
    try:
        if match is None:
            raise ValueError(text)
        return _dt.date.fromisoformat(match.group(1))
    except ValueError:
        raise SchemaValidationError(source, f"expected a date YYYY-MM-DD, got {text!r}",
                                    field="/motor-record/provenance/@date", line=line) from None


def _minor_version(root: etree._Element) -> int:
    """The minor version of a validated root (its ``format-version`` matches ``1.[0-9]+``)."""
    return int(root.get("format-version").split(".")[1])


def _firing_spread(element: etree._Element | None) -> FiringSpread | None:
    if element is None:
        return None
    # The schema fixed the units (N.s and s): the numbers are SI already.
    values = _children(element)
    return FiringSpread(
        n_firings=int(element.get("firings")),
        total_impulse_mean_ns=float(_text(values, "total-impulse-mean")),
        total_impulse_std_ns=float(_text(values, "total-impulse-standard-deviation")),
        burn_time_mean_s=float(_text(values, "burn-time-mean")),
        burn_time_std_s=float(_text(values, "burn-time-standard-deviation")),
    )


def _record_from_tree(root: etree._Element, source: str) -> MotorRecord:
    top = _children(root)
    identity = _children(top.get("identity"))
    hardware = _children(top.get("hardware"))
    ejection = top.get("ejection")
    ejection_children = _children(ejection)
    provenance_el = top.get("provenance")
    spread_el = top.get("firing-spread")
    samples = top["samples"]  # required by the schema
    time_s, thrust_n, lines = _parse_samples(samples, source)
    delays_text = _text(ejection_children, "delays")
    delays = tuple(float(v) for v in delays_text.split()) if delays_text else ()
    adjustable = ejection is not None and ejection.get("adjustable", "false") in ("true", "1")
    if ejection is None:
        no_charge = _minor_version(root) == 0  # 1.0: an absent <ejection> meant "no ejection charge"
    else:
        no_charge = ejection.get("charge") == "none"
    provenance = Provenance()
    if provenance_el is not None:
        date_text = provenance_el.get("date")
        kind = provenance_el.get("kind")
        provenance = Provenance(
            kind=FORMER_PROVENANCE_KINDS.get(kind, kind),
            date=_xs_date(date_text, source, provenance_el.sourceline) if date_text else None,
            notes=_text(_children(provenance_el), "notes") or "",
        )
    try:
        spread = _firing_spread(spread_el)
    except CurveDataError as exc:
        raise CurveDataError(source, [Problem(p.code, p.field, p.message, line=spread_el.sourceline)
                                      for p in exc.problems]) from None
    try:
        return MotorRecord(
            designation=_text(identity, "designation") or "",
            maker=_text(identity, "maker") or "",
            time_s=time_s,
            thrust_n=thrust_n,
            diameter_m=_quantity(hardware, "diameter", "length"),
            length_m=_quantity(hardware, "length", "length"),
            total_mass_kg=_quantity(hardware, "total-mass", "mass"),
            propellant_mass_kg=_quantity(hardware, "propellant-mass", "mass"),
            delays_s=delays,
            delay_adjustable=adjustable,
            no_ejection_charge=no_charge,
            provenance=provenance,
            firing_spread=spread,
        )
    except CurveDataError as exc:
        # the element each field comes from, for the line of a problem (looked up only when there is one)
        element_lines = {
            "diameter_m": hardware.get("diameter"), "length_m": hardware.get("length"),
            "total_mass_kg": hardware.get("total-mass"), "propellant_mass_kg": hardware.get("propellant-mass"),
            "delays_s": ejection_children.get("delays", ejection),
            "delay_adjustable": ejection, "designation": identity.get("designation"),
            "samples": samples, "time_s": samples, "thrust_n": samples,
        }
        located = []
        for p in exc.problems:
            if p.index is not None:
                line = lines[p.index]
            else:
                element = element_lines.get(p.field)
                line = element.sourceline if element is not None else None
            located.append(Problem(p.code, p.field, p.message, p.index, line))
        raise CurveDataError(source, located) from None


def _parse_samples(element: etree._Element, source: str) -> tuple[np.ndarray, np.ndarray, list[int]]:
    """Rows of the samples block, with the file line of each row."""
    text = element.text or ""
    base_line = element.sourceline or 1
    times: list[float] = []
    thrusts: list[float] = []
    lines: list[int] = []
    for offset, row in enumerate(text.split("\n")):
        fields = row.split()
        if not fields:
            continue
        line = base_line + offset
        if len(fields) != 2:
            raise CurveDataError(source, [Problem(
                "sample-row", "samples",
                f"expected two numbers (time in s, thrust in N), got {len(fields)} field(s): {row.strip()!r}",
                line=line)])
        try:
            times.append(float(fields[0]))
            thrusts.append(float(fields[1]))
        except ValueError:
            raise CurveDataError(source, [Problem(
                "sample-row", "samples", f"expected two numbers (time in s, thrust in N), got {row.strip()!r}",
                line=line)]) from None
        lines.append(line)
    return np.array(times), np.array(thrusts), lines


_DIGITS: Final = 10  # significant digits of samples and delays: a load cell resolves about 5


def _short(value: float) -> str:
    """``value`` to ten significant digits, as the shortest text that reads back to that rounded double."""
    return repr(float(f"{float(value):.{_DIGITS}g}"))


def _sample_rows(time_s: np.ndarray, thrust_n: np.ndarray) -> list[str]:
    """The sample rows; times keep full precision where ten digits would merge two of them."""
    times = [_short(t) for t in time_s]
    if any(float(b) <= float(a) for a, b in zip(times, times[1:])):
        times = [repr(float(t)) for t in time_s]
    return [f"    {t} {_short(f)}" for t, f in zip(times, thrust_n)]


def _exact_text(value_si: float, unit_choices: tuple[tuple[str, float], ...], kind: str) -> tuple[str, str]:
    """Text and unit that read back to exactly ``value_si``, preferring the trade's unit."""
    for unit, scale in unit_choices:
        for candidate in (float(f"{value_si * scale:.12g}"), value_si * scale):
            text = repr(candidate)
            if to_si(float(text), unit, kind) == value_si:
                return text, unit
    raise AssertionError("unreachable: the SI unit always round-trips")  # pragma: no cover


_HARDWARE: Final = (  # element, record field, units the writer prefers (scale from SI), quantity kind
    ("diameter", "diameter_m", (("mm", 1e3), ("m", 1.0)), "length"),
    ("length", "length_m", (("mm", 1e3), ("m", 1.0)), "length"),
    ("total-mass", "total_mass_kg", (("g", 1e3), ("kg", 1.0)), "mass"),
    ("propellant-mass", "propellant_mass_kg", (("g", 1e3), ("kg", 1.0)), "mass"),
)


def _escaped(text: str, *, attribute: bool = False) -> str:
    """``text`` as element content (or a double-quoted attribute value), escaped as libxml2 escapes it.

    Raises
    ------
    ValueError
        ``text`` holds a character XML cannot carry (lxml's own refusal, kept by the text writer).
    """
    if UNWRITABLE_CHARACTER.search(text):  # the record refuses these first; kept for any text written here
        raise ValueError("All strings must be XML compatible: Unicode or ASCII, no NULL bytes or control characters")
    text = text.replace("&", "&amp;").replace("<", "&lt;").replace(">", "&gt;").replace("\r", "&#13;")
    if attribute:
        text = text.replace('"', "&quot;").replace("\n", "&#10;").replace("\t", "&#9;")
    return text


def record_to_bytes(record: MotorRecord) -> bytes:
    """The XML document of ``record`` (UTF-8), indented by two spaces, samples one row a line.

    Written as text, element by element (an lxml tree took a third of a catalog add); the bytes are those the
    tree writer gave, which tests/files/test_motor_xml.py keeps as the oracle (a catalog id hashes them).

    Raises
    ------
    ValueError
        A text field holds a character XML cannot carry (a control character, a lone surrogate).
    """
    lines = ["<?xml version='1.0' encoding='UTF-8'?>",
             f'<motor-record xmlns="{_NS}" format-version="{FORMAT_VERSION}">', "  <identity>"]
    if record.maker:
        lines.append(f"    <maker>{_escaped(record.maker)}</maker>")
    lines += [f"    <designation>{_escaped(record.designation)}</designation>", "  </identity>"]
    hardware = []
    for name, attribute, choices, kind in _HARDWARE:
        value = getattr(record, attribute)
        if value is not None:
            text, unit = _exact_text(value, choices, kind)
            hardware.append(f'    <{name} unit="{unit}">{text}</{name}>')
    if hardware:
        lines += ["  <hardware>", *hardware, "  </hardware>"]
    # Ejection, a tri-state: delays listed, charge="none", or no element at all (not known, from 1.1 on).
    if record.no_ejection_charge:
        lines.append('  <ejection charge="none"/>')
    elif record.delays_s or record.delay_adjustable:
        opening = f'  <ejection adjustable="{"true" if record.delay_adjustable else "false"}"'
        if record.delays_s:
            delays = " ".join(_short(d) for d in record.delays_s)
            lines += [opening + ">", f'    <delays unit="s">{delays}</delays>', "  </ejection>"]
        else:
            lines.append(opening + "/>")
    p = record.provenance
    opening = f'  <provenance kind="{_escaped(p.kind, attribute=True)}"'
    if p.date is not None:
        opening += f' date="{p.date.isoformat()}"'
    if p.notes:
        lines += [opening + ">", f"    <notes>{_escaped(p.notes)}</notes>", "  </provenance>"]
    else:
        lines.append(opening + "/>")
    if record.firing_spread is not None:
        f = record.firing_spread
        lines.append(f'  <firing-spread firings="{f.n_firings}">')
        for name, value, unit in (("total-impulse-mean", f.total_impulse_mean_ns, "N.s"),
                                  ("total-impulse-standard-deviation", f.total_impulse_std_ns, "N.s"),
                                  ("burn-time-mean", f.burn_time_mean_s, "s"),
                                  ("burn-time-standard-deviation", f.burn_time_std_s, "s")):
            lines.append(f'    <{name} unit="{unit}">{_short(value)}</{name}>')
        lines.append("  </firing-spread>")
    lines.append('  <samples time-unit="s" thrust-unit="N">')
    lines += _sample_rows(record.time_s, record.thrust_n)
    lines += ["  </samples>", "</motor-record>", ""]
    return "\n".join(lines).encode("utf-8")


def readable_record_bytes(record: MotorRecord, source: str = "<record>", *, read_from: bytes | None = None) -> bytes:
    """:func:`record_to_bytes`, checked with the reader's own limits before anything is written.

    Whatever motorlib writes, it reads back: the document goes through the reader's size cap, safety checks
    and XSD (a name over the schema's length, a curve too long for the cap) here, so a file the reader would
    refuse is never written.

    ``read_from`` is the document ``record`` was read from by :func:`record_from_bytes` with the default size
    limit (:func:`read_record_and_bytes` gives it), if any. When the record writes back to exactly those bytes
    (a file in canonical form, as every catalog file is), they passed these very checks on reading and are not
    parsed again; any other bytes are checked in full.

    Raises
    ------
    CurveError
        Naming ``source``: what the reader would refuse.
    """
    data = record_to_bytes(record)
    if read_from is not None and data == read_from and len(data) <= DEFAULT_MAX_BYTES:
        return data
    try:
        _valid_tree(data, source, DEFAULT_MAX_BYTES)
    except CurveError as exc:
        raise type(exc)(source, f"cannot be written as a motor record that motorlib reads back: {exc.problem}",
                        field=exc.field) from None
    return data


def write_record(record: MotorRecord, path: str | os.PathLike[str], *, overwrite: bool = True) -> Path:
    """Write ``record`` to ``path`` atomically (temporary file, fsync, rename); see :func:`readable_record_bytes`."""
    return write_atomic(path, readable_record_bytes(record, str(path)), overwrite=overwrite)
