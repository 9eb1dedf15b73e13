"""One motor as a catalog lists it: the :class:`CatalogRow` record, every figure named with its unit.

The catalog's index keeps one row per motor and hands them out as these records (``Catalog.rows()``);
the matcher fits and ranks them; a plain :class:`~motorlib.motor.record.MotorRecord` becomes one with
:meth:`CatalogRow.from_record`. A row turns into a dict only where it is written out (JSON, CSV, a
DataFrame, the index's SQL row): :meth:`CatalogRow.as_dict`, whose keys are :data:`ROW_COLUMNS` in order.

The record sits here, below ``flight`` and ``matching``, because both the catalog (a layer above) and the
matcher (a layer below the catalog) read it. numpy is not needed; no file formats.
"""

from __future__ import annotations

from dataclasses import dataclass, fields
from typing import Sequence

from .checks import CheckSettings, Finding, check_record
from .classes import CLASS_LETTERS
from .record import MotorRecord

__all__ = ["ROW_COLUMNS", "CatalogRow"]


@dataclass(frozen=True)
class CatalogRow:
    """Metadata and derived figures of one motor (SI; no samples).

    Attributes
    ----------
    motor_id : str
        The catalog's id (a content hash), or ``record-<i>`` for a record ranked outside a catalog.
    handle, path : str, str or None
        The file's path in the catalog without and with ``.xml``; outside a catalog the handle is the
        designation and the path None.
    maker, designation, computed_designation : str
        As the file gives them, and the designation computed from the curve.
    impulse_class : str or None
        Impulse class letter (None above the last class); ``class_index`` its position in
        :data:`~motorlib.motor.classes.CLASS_LETTERS` (one past the end for None), ``class_percent`` how far
        into the class the impulse lies.
    total_impulse_ns, average_thrust_n, peak_thrust_n, burn_time_s : float
        Figures of the curve (average thrust and burn time at the catalog's burn threshold).
    diameter_m, length_m, total_mass_kg, propellant_mass_kg, specific_impulse_s : float or None
        Hardware figures, None where the file does not give them.
    delays_s : tuple of float
        Listed ejection delays [s]; ``delay_adjustable`` when they can be drilled shorter; ``ejection`` one of
        :data:`~motorlib.motor.record.EJECTION_STATES`.
    provenance_kind, provenance_date, notes : str, str or None, str
        Provenance; the date in ISO form (as JSON carries it).
    n_samples, n_errors, n_warnings : int
        Curve samples, and error and warning findings.
    findings : tuple of Finding, or None
        Every check result, most severe first; None when the row was read without them
        (``Catalog.rows(findings=False)``).
    """

    motor_id: str
    handle: str
    path: str | None
    maker: str
    designation: str
    computed_designation: str
    impulse_class: str | None
    class_index: int
    class_percent: float | None
    total_impulse_ns: float
    average_thrust_n: float
    peak_thrust_n: float
    burn_time_s: float
    diameter_m: float | None
    length_m: float | None
    total_mass_kg: float | None
    propellant_mass_kg: float | None
    specific_impulse_s: float | None
    delays_s: tuple[float, ...]
    delay_adjustable: bool
    ejection: str
    provenance_kind: str
    provenance_date: str | None
    notes: str
    n_samples: int
    n_errors: int
    n_warnings: int
    findings: tuple[Finding, ...] | None

    def __post_init__(self) -> None:
        # sequences from JSON arrive as lists: keep our own immutable copies
        for name, value in _normalised(self.__dict__).items():
            object.__setattr__(self, name, value)

    @classmethod
    def from_columns(cls, rows: Sequence[Sequence[object]], delays_s: Sequence[Sequence[float]],
                     findings: Sequence[Sequence[Finding] | None]) -> list[CatalogRow]:
        """One record per sequence of values in :data:`ROW_COLUMNS` order (as the index's ``SELECT`` gives
        them), with each row's delays [s] and findings (or None) given apart, parsed: the same records as
        ``CatalogRow(**values)``, several times faster (the generated ``__init__`` of a frozen dataclass sets
        each of its 28 fields through ``object.__setattr__``).

        For reading a catalog, 5,000 rows at once: no check of the field names (the order is this module's
        own), and the three fields a row keeps in its own form are converted inline as :func:`_normalised`
        converts them. The values in the delays and findings columns of ``rows`` are not read.
        """
        new = object.__new__
        out = []
        for values, delays, found in zip(rows, delays_s, findings):
            data = dict(zip(ROW_COLUMNS, values))
            data["delays_s"] = tuple(map(float, delays))
            data["delay_adjustable"] = bool(data["delay_adjustable"])
            data["findings"] = None if found is None else tuple(found)
            row = new(cls)
            row.__dict__.update(data)  # frozen: fields are set once, here
            out.append(row)
        return out

    @classmethod
    def from_fields(cls, rows: Sequence[Sequence[object]]) -> list[CatalogRow]:
        """One record per sequence of field values in :data:`ROW_COLUMNS` order, each already in the row's own
        form (delays a tuple of floats, the flag a bool, findings a tuple or None: the fields of a record built
        here, as the catalog's row cache keeps them). Nothing is converted or checked."""
        new = object.__new__
        out = []
        append = out.append
        for values in rows:
            row = new(cls)
            row.__dict__.update(zip(ROW_COLUMNS, values))  # frozen: fields are set once, here
            append(row)
        return out

    @classmethod
    def from_record(cls, record: MotorRecord, motor_id: str, *, path: str | None = None,
                    settings: CheckSettings | None = None,
                    findings: Sequence[Finding] | None = None) -> CatalogRow:
        """The row of ``record``: its figures at ``settings.burn_threshold`` and its findings.

        ``path`` is the file's path in a catalog (ending in ``.xml``; the handle drops the suffix); without
        it the handle is the designation. ``findings`` are ``check_record(record, settings)`` when the
        caller has them already.
        """
        s = settings or CheckSettings()
        start_s, end_s = record.burn_window_s(s.burn_threshold)
        if findings is None:
            findings = check_record(record, s)
        impulse_class = record.impulse_class
        letter = impulse_class.letter if impulse_class else None
        return cls(
            motor_id=motor_id, handle=path[:-4] if path else record.designation, path=path, maker=record.maker,
            designation=record.designation, computed_designation=record.computed_designation(s.burn_threshold),
            impulse_class=letter, class_index=CLASS_LETTERS.index(letter) if letter else len(CLASS_LETTERS),
            class_percent=impulse_class.percent if impulse_class else None,
            total_impulse_ns=record.total_impulse_ns, average_thrust_n=record.average_thrust_n(s.burn_threshold),
            peak_thrust_n=record.peak_thrust_n, burn_time_s=end_s - start_s,
            diameter_m=record.diameter_m, length_m=record.length_m, total_mass_kg=record.total_mass_kg,
            propellant_mass_kg=record.propellant_mass_kg, specific_impulse_s=record.specific_impulse_s,
            delays_s=record.delays_s, delay_adjustable=record.delay_adjustable, ejection=record.ejection,
            provenance_kind=record.provenance.kind,
            provenance_date=record.provenance.date.isoformat() if record.provenance.date else None,
            notes=record.provenance.notes, n_samples=record.n_samples,
            n_errors=sum(f.severity == "error" for f in findings),
            n_warnings=sum(f.severity == "warning" for f in findings), findings=tuple(findings))

    def as_dict(self) -> dict[str, object]:
        """The row as plain data for JSON, CSV or a DataFrame: keys :data:`ROW_COLUMNS` in order, delays a
        list, findings a list of dicts (:meth:`Finding.as_dict`)."""
        out: dict[str, object] = {name: getattr(self, name) for name in ROW_COLUMNS}
        out["delays_s"] = list(self.delays_s)
        out["findings"] = None if self.findings is None else [f.as_dict() for f in self.findings]
        return out


def _normalised(values: dict[str, object]) -> dict[str, object]:
    """The fields a row keeps in its own form: delays a tuple of floats, the flag a bool, findings a tuple."""
    findings = values["findings"]
    return {"delays_s": tuple(float(d) for d in values["delays_s"]),  # type: ignore[attr-defined]
            "delay_adjustable": bool(values["delay_adjustable"]),
            "findings": None if findings is None else tuple(findings)}  # type: ignore[arg-type]


ROW_COLUMNS: tuple[str, ...] = tuple(f.name for f in fields(CatalogRow))
