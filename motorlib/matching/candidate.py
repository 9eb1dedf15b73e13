"""One ranked motor: the :class:`Candidate` record, what :func:`motorlib.rank` returns for every motor.

A candidate is frozen and typed; it becomes a dict only where it is written out (``match --json`` and
``--csv``, the report): :meth:`Candidate.as_dict`, whose keys and their order are a contract of the JSON
output. Figures are SI and None where the motor was not flown (it does not fit, or no such figure exists).
stdlib only.
"""

from __future__ import annotations

from dataclasses import MISSING, dataclass, fields
from itertools import repeat
from typing import Any, Final, Iterable, Sequence

__all__ = ["Candidate"]

# Fields that hold a sequence: tuples on the record, lists in :meth:`Candidate.as_dict` (as JSON has them)
_SEQUENCES: Final = frozenset({"ballast_reasons", "ballast_reason_codes", "nose_weight_reasons",
                               "nose_weight_reason_codes", "reasons", "reason_codes", "notes", "note_codes"})
_NOTES: Final = ("notes", "note_codes")
_CODED: Final = (("reasons", "reason_codes"), _NOTES)  # each text needs its code
_OWN_SEQUENCE: Final = frozenset({tuple, type(None)})  # what a sequence field holds once copied


@dataclass(frozen=True)
class Candidate:
    """One motor as the ranking judged it.

    Identity (from the catalog row): ``motor_id``, ``handle``, ``designation``, ``maker``, ``impulse_class``,
    ``total_impulse_ns``, ``diameter_m``, ``length_m``; ``fits`` (the mount and the class limit) and the
    ``adapter`` it needs (None if none).

    Flown figures, None when not flown: apogee [m above the pad] and its time [s], rail exit speed [m/s],
    liftoff thrust-to-weight, maximum speed [m/s] and Mach number, burnout time [s], the optimal and the
    chosen delay [s] (``delay_adjusted`` when an adjustable delay was drilled), the state at ejection [m, m/s]
    (speeds over the ground), the descent rate at landing [m/s], the fastest device opening [m/s, through
    the air: relative to the wind], the landing distance [m] and the
    liftoff mass [kg]. ``ballast_*``: with the solved ballast aboard (``ballast_kg`` None when none was
    solved); ``stability_margin_cal`` and ``nose_weight_*``: the least static margin and the nose weight
    that restores it, flown again (None without a geometry).

    ``reasons``/``reason_codes``: every rule broken, in order, with its code; ``notes``/``note_codes`` what
    does not fail a motor (an adapter, a missed target). ``verdict`` is a word of
    :data:`~motorlib.matching.verdicts.VERDICTS`; ``passes`` is ``verdict == "pass"``; ``ballast_passes``
    whether it passes with its ballast (None without ballast).
    """

    motor_id: str
    handle: str | None
    designation: str
    maker: str
    impulse_class: str | None
    total_impulse_ns: float
    diameter_m: float | None
    length_m: float | None
    fits: bool
    adapter: str | None
    apogee_m: float | None = None
    time_to_apogee_s: float | None = None
    rail_exit_speed_m_s: float | None = None
    liftoff_thrust_to_weight: float | None = None
    max_speed_m_s: float | None = None
    max_mach: float | None = None
    burnout_time_s: float | None = None
    optimal_delay_s: float | None = None
    chosen_delay_s: float | None = None
    delay_adjusted: bool | None = None
    ejection_altitude_m: float | None = None
    ejection_speed_m_s: float | None = None
    ejection_vertical_speed_m_s: float | None = None
    landing_speed_m_s: float | None = None
    max_deployment_speed_m_s: float | None = None
    landing_distance_m: float | None = None
    liftoff_mass_kg: float | None = None
    ballast_kg: float | None = None
    ballast_apogee_m: float | None = None
    ballast_rail_exit_speed_m_s: float | None = None
    ballast_liftoff_thrust_to_weight: float | None = None
    ballast_chosen_delay_s: float | None = None
    ballast_optimal_delay_s: float | None = None
    ballast_ejection_speed_m_s: float | None = None
    ballast_landing_speed_m_s: float | None = None
    ballast_reasons: tuple[str, ...] | None = None
    ballast_reason_codes: tuple[str, ...] | None = None
    stability_margin_cal: float | None = None
    nose_weight_for_stability_kg: float | None = None
    nose_weight_apogee_m: float | None = None
    nose_weight_stability_margin_cal: float | None = None
    nose_weight_reasons: tuple[str, ...] | None = None
    nose_weight_reason_codes: tuple[str, ...] | None = None
    reasons: tuple[str, ...] = ()
    reason_codes: tuple[str, ...] = ()
    notes: tuple[str, ...] = ()
    note_codes: tuple[str, ...] = ()
    verdict: str = ""
    passes: bool = False
    ballast_passes: bool | None = None

    def __post_init__(self) -> None:
        for name in _SEQUENCES:  # our own immutable copies of the lists the ranking built
            value = getattr(self, name)
            if value is not None and type(value) is not tuple:
                object.__setattr__(self, name, tuple(value))
        self._check_codes()

    def _check_codes(self) -> None:
        if len(self.reasons) != len(self.reason_codes) or len(self.notes) != len(self.note_codes):
            raise ValueError(f"{self.designation}: every reason and note needs its code")

    @classmethod
    def from_columns(cls, columns: dict[str, Sequence[Any]]) -> list[Candidate]:
        """One candidate per position of ``columns`` (field name -> one value per candidate, every column the
        same length; a field left out keeps its default): the same records as ``Candidate(**values)`` per
        row, about three times faster (the generated ``__init__`` of a frozen dataclass with 55 fields costs
        ~16 µs a call, most of it in passing keywords and setting each field through ``object.__setattr__``).

        For the ranking (5,000 candidates at once). Sequences are copied to tuples as ``__init__`` does; an
        unknown or missing field is a TypeError, as it would be there.
        """
        unknown = columns.keys() - _DEFAULTS.keys()
        if unknown:
            raise TypeError(f"Candidate has no field {sorted(unknown)[0]!r}")
        for name in _REQUIRED:
            if name not in columns:
                raise TypeError(f"Candidate needs field {name!r}")
        n = len(columns[_REQUIRED[0]])
        if any(len(column) != n for column in columns.values()):
            raise ValueError("every column must hold one value per candidate")
        full: list[Iterable[Any]] = []
        given: dict[str, Sequence[Any]] = {}
        for name, default in _DEFAULTS.items():  # declaration order, which as_dict (the JSON layout) keeps
            column: Iterable[Any] = columns.get(name, repeat(default, n))
            if name in _SEQUENCES and name in columns:
                if not set(map(type, column)) <= _OWN_SEQUENCE:  # (checked without a Python loop: the ranking's are)
                    column = [v if v is None or type(v) is tuple else tuple(v) for v in column]
                given[name] = column
            full.append(column)
        # _check_codes of every candidate at once (a method call per candidate was a tenth of the building)
        lengths = {name: list(map(len, given[name])) for pair in _CODED for name in pair if name in given}
        none = [0] * n
        if any(lengths.get(texts, none) != lengths.get(codes, none) for texts, codes in _CODED):
            first = next(i for i in range(n) if any(lengths.get(texts, none)[i] != lengths.get(codes, none)[i]
                                                    for texts, codes in _CODED))
            raise ValueError(f"{list(columns['designation'])[first]}: every reason and note needs its code")
        names = tuple(_DEFAULTS)
        new = object.__new__
        out = []
        append = out.append
        for values in zip(*full):
            candidate = new(cls)
            candidate.__dict__.update(zip(names, values))  # frozen: fields are set once, here, as __init__ would
            append(candidate)
        return out

    def as_dict(self) -> dict[str, object]:
        """The candidate as plain data (the ``match --json`` layout): every field, sequences as lists.

        The key order is part of that output: a motor that does not fit lists ``notes`` and ``note_codes``
        after ``ballast_passes``, one that fits before ``verdict`` (the layout of earlier versions).
        """
        out: dict[str, object] = dict(self.__dict__)  # every field, in declaration order
        for name in _SEQUENCES:
            value = out[name]
            if value is not None:
                out[name] = list(value)
        if not self.fits:
            for name in _NOTES:
                out[name] = out.pop(name)
        return out

    @staticmethod
    def json_dicts(candidates: Iterable[Candidate]) -> list[dict[str, object]]:
        """What ``json.dumps`` needs to write :meth:`as_dict` of every candidate, the same text, for writing only
        (the dicts must not be changed): a candidate that fits hands its own field dict (every field in declaration
        order, as_dict's order for it; sequences are tuples, which JSON writes as arrays, like lists), one that does
        not fit its :meth:`as_dict`. At 5,000 candidates the copies of ``as_dict`` cost about 10 ms of a
        ``match --json``.
        """
        return [c.__dict__ if c.fits else c.as_dict() for c in candidates]


_UNSET: Final = object()
# Every field with its default (``_UNSET`` for the identity fields, which have none), in declaration order
_DEFAULTS: Final[dict[str, Any]] = {f.name: _UNSET if f.default is MISSING else f.default for f in fields(Candidate)}
_REQUIRED: Final = tuple(name for name, value in _DEFAULTS.items() if value is _UNSET)
