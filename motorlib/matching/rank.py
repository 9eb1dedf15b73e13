"""Rank candidate motors for an airframe: fit, one batched flight of all, verdicts and the ranking order.

The figures and reasons of each flight are in :mod:`.figures`, the ballast and the nose weight in
:mod:`.ballast`.

Every candidate gets the list of reasons it fails; a failed safety rule is never
dropped to improve a ranking. The rules are settings (:class:`MatchSettings`);
each default names its source. With a target altitude the ranking is by
closeness to it, otherwise by apogee (under the ceiling); good choices first.
Each candidate gets a verdict word (:mod:`.verdicts`): a motor that flies safely
but misses the target's tolerance band is ``off target``, not ``pass``; notes
(an adapter, a missed target) are kept apart from failures.

Landing speed under the recovery device is the terminal descent rate at the pad,
√(2·m·g/(ρ·(Cd·A_device + Cd·A_body))), which the descent approaches well before
landing (see :mod:`motorlib.recovery`); the ``fly`` command integrates the whole
descent instead. The first device's opening speed comes from the flight; a later
device's is the terminal speed under the devices open before it, at the density
of its opening height. The landing distance is an estimate: the apogee's
distance plus the drift under each device at that terminal speed in the
power-law wind.

numpy only; pandas, scipy and matplotlib are not imported here.
"""

from __future__ import annotations

import math
from operator import attrgetter
from dataclasses import dataclass, field, fields
from typing import Any, Callable, Protocol, Sequence, Union

from ..flight.airframe import Airframe
from ..motor.classes import CLASS_LETTERS
from ..motor.listing import CatalogRow
from ..motor.record import MotorRecord
from ..flight.integrate import FlightSettings, simulate
from ..flight.pack import MotorPack
from ..flight.rules import LaunchRules
from ..flight.stability import MIN_STABILITY_CAL
from .adapters import adapter_steps, adapter_text
from .ballast import _check_stability, _solve_ballast
from .figures import _figures, flies_descent
from .candidate import Candidate
from .verdicts import VERDICTS, _classify, verdict_order
from ..flight.delays import DEFAULT_DRILL_STEP_S

__all__ = ["MatchResult", "MatchSettings", "candidate_rows", "mount_problems", "rank"]

PackFor = Callable[[Sequence[CatalogRow]], MotorPack]  # builds the pack of the rows that fit


class RowSource(Protocol):
    """What :func:`rank` needs of a catalog (:class:`motorlib.Catalog`; catalog/ is a layer above, so duck-typed)."""

    def rows(self) -> list[CatalogRow]: ...

    def motor_pack(self, rows: Sequence[CatalogRow], drill_step_s: float = DEFAULT_DRILL_STEP_S) -> MotorPack: ...


Candidates = Union[RowSource, MotorRecord, Sequence[MotorRecord], Sequence[CatalogRow]]


@dataclass(frozen=True)
class MatchSettings:
    """What the ranking asks of a motor.

    Attributes
    ----------
    target_m, ceiling_m : float or None
        Aim altitude, and the field's altitude limit that no motor may exceed [m above the pad].
    max_class : str or None
        Highest impulse class allowed (the flyer's certification).
    rules : LaunchRules
        Every launch rule and its threshold (rail exit speed, thrust-to-weight, how far the chosen delay may be
        from the optimal one, ejection, deployment and descent speeds, the field): the rules ``fly`` applies,
        with their defaults and sources in :class:`~motorlib.flight.rules.LaunchRules`.
    allow_smaller_motors : bool
        Motors narrower than the mount fit with an adapter, up to ``adapter_steps`` standard sizes down.
    adapter_steps : int
        How many standard motor sizes below the mount an adapter may step down (default 2: a 24 or an
        18 mm motor in a 29 mm mount; common practice, no published source).
    diameter_tolerance_m : float
        Diameters within this are equal (0.5 mm).
    ballast : bool
        Solve the nose weight that brings every motor too strong for the target or the ceiling down to the
        target, and re-check every rule with it aboard.
    target_tolerance : float
        Half-width of the target band as a fraction of the target (default 0.05, ±5 %); a safe motor outside
        it is ``off target``.
    min_stability_cal : float
        Least static margin over the powered flight [calibers] when the airframe has a
        geometry; default 1 caliber (common practice, no published source).
    """

    target_m: float | None = None
    ceiling_m: float | None = None
    max_class: str | None = None
    rules: LaunchRules = field(default_factory=LaunchRules)
    allow_smaller_motors: bool = False
    diameter_tolerance_m: float = 0.0005
    ballast: bool = False
    target_tolerance: float = 0.05
    adapter_steps: int = 2
    min_stability_cal: float = MIN_STABILITY_CAL

    def __post_init__(self) -> None:
        if not 0.0 < self.target_tolerance < 1.0:
            raise ValueError(f"`target_tolerance` must be a fraction between 0 and 1, got {self.target_tolerance!r}")
        if int(self.adapter_steps) != self.adapter_steps or self.adapter_steps < 1:
            raise ValueError(f"`adapter_steps` must be a whole number of at least 1, got {self.adapter_steps!r}")
        if not (math.isfinite(self.min_stability_cal) and self.min_stability_cal >= 0.0):
            raise ValueError(f"`min_stability_cal` must be finite and >= 0, got {self.min_stability_cal!r}")
        if self.max_class is not None and self.max_class not in CLASS_LETTERS:
            raise ValueError(f"`max_class` must be one of {', '.join(CLASS_LETTERS)}, got {self.max_class!r}")
        if self.ballast and self.target_m is None:
            raise ValueError("ballast needs a target altitude")
        for name in ("target_m", "ceiling_m"):
            value = getattr(self, name)
            if value is not None and not value > 0:
                raise ValueError(f"`{name}` must be positive, got {value!r}")
        if self.target_m is not None and self.ceiling_m is not None and self.target_m > self.ceiling_m:
            raise ValueError(f"the target ({self.target_m:g} m) is above the ceiling ({self.ceiling_m:g} m): no "
                             "motor can reach one without breaking the other")


@dataclass(frozen=True)
class MatchResult:
    """The ranking: ``candidates`` (:class:`Candidate` records, good choices first) plus the conditions that
    produced it."""

    airframe: dict[str, Any]
    conditions: dict[str, Any]
    candidates: tuple[Candidate, ...]

    @property
    def passing(self) -> list[Candidate]:
        """Candidates with the verdict ``pass`` (every rule, on target, no ballast needed)."""
        return [c for c in self.candidates if c.passes]

    @property
    def with_ballast(self) -> list[Candidate]:
        """Candidates with the verdict ``pass with ballast``."""
        return [c for c in self.candidates if c.verdict == "pass with ballast"]

    def as_dict(self) -> dict[str, Any]:
        """Plain data (the ``match --json`` layout, without the CLI's additions to the conditions)."""
        return {"airframe": self.airframe, "conditions": self.conditions,
                "candidates": [c.as_dict() for c in self.candidates]}


def candidate_rows(records: Sequence[MotorRecord], ids: Sequence[str] | None = None) -> list[CatalogRow]:
    """Catalog rows for plain records (for ranking records that are not in a catalog); ids ``record-<i>``
    unless given."""
    return [CatalogRow.from_record(r, ids[i] if ids else f"record-{i}") for i, r in enumerate(records)]


def mount_problems(frame: Airframe, record: MotorRecord) -> list[str]:
    """Why ``record`` cannot go into ``frame``'s mount as it is (too wide, too long, or of unknown size); an
    adapter for a narrower motor is not a problem. Empty when it fits or the airframe states no mount."""
    settings = MatchSettings(allow_smaller_motors=True, adapter_steps=99)
    reasons, _ = _fits(frame, candidate_rows([record])[0], settings)
    return [text for code, text in reasons if code == "motor-does-not-fit"]


def _fits(frame: Airframe, row: CatalogRow, s: MatchSettings) -> tuple[list[tuple[str, str]], str | None]:
    """(code, message) for every reason the motor cannot be flown in ``frame``, and the adapter it needs."""
    reasons = []
    adapter = None
    if s.max_class is not None:
        cls = row.impulse_class
        if cls is None or CLASS_LETTERS.index(cls) > CLASS_LETTERS.index(s.max_class):
            reasons.append(("above-class", f"class {cls or 'above O'} is above the limit {s.max_class}"))
    d, mount = row.diameter_m, frame.mount_diameter_m
    if mount is not None:
        if d is None:
            reasons.append(("motor-does-not-fit", "does not fit: the motor's diameter is unknown"))
        elif d > mount + s.diameter_tolerance_m:
            reasons.append(("motor-does-not-fit", f"does not fit: {_size_text(d, mount)}"))
        elif d < mount - s.diameter_tolerance_m:
            steps = adapter_steps(d, mount, s.diameter_tolerance_m)
            if not s.allow_smaller_motors:
                reasons.append(("motor-does-not-fit", f"does not fit: {_size_text(d, mount)} (adapters not allowed)"))
            elif steps > s.adapter_steps:
                reasons.append(("motor-does-not-fit", f"does not fit: {_size_text(d, mount)} is {steps} standard sizes "
                                                      f"down (adapters up to {s.adapter_steps} allowed)"))
            else:
                adapter = adapter_text(d, mount)
    if frame.mount_length_m is not None:
        if row.length_m is None:
            reasons.append(("motor-does-not-fit", "does not fit: the motor's length is unknown"))
        elif row.length_m > frame.mount_length_m + 1e-9:
            reasons.append(("motor-does-not-fit", f"does not fit: {row.length_m * 1e3:.4g} mm long, the mount takes "
                                      f"{frame.mount_length_m * 1e3:.4g} mm"))
    if row.total_mass_kg is None or row.propellant_mass_kg is None:
        reasons.append(("no-masses", "cannot be flown: no total or propellant mass"))
    return reasons, adapter


def _size_text(motor_diameter_m: float, mount_diameter_m: float) -> str:
    return f"{motor_diameter_m * 1e3:.4g} mm motor in a {mount_diameter_m * 1e3:.4g} mm mount"


def rank(frame: Airframe, rows: Candidates, pack_for: PackFor | MatchSettings | None = None,
         settings: MatchSettings | None = None,
         flight_settings: FlightSettings | None = None) -> MatchResult:
    """Rank every candidate for ``frame``.

    The common case is one call, ``rank(airframe, catalog, settings)``; a motor record or a list of them
    works in place of the catalog.

    Parameters
    ----------
    frame : Airframe
    rows : Catalog, MotorRecord, sequence of MotorRecord, or sequence of CatalogRow
        The candidates: a catalog (all its motors), records, or catalog rows
        (:meth:`Catalog.rows` or :func:`candidate_rows`), which then need ``pack_for``.
    pack_for : callable, optional
        ``pack_for(rows) -> MotorPack`` for the rows that fit (the catalog builds it from its index); not
        needed for a catalog or records. A :class:`MatchSettings` here is taken as ``settings``.
    settings : MatchSettings, optional
    flight_settings : FlightSettings, optional

    Returns
    -------
    MatchResult

    Examples
    --------
    >>> import motorlib
    >>> from motorlib.files.curvefiles import sample_catalog_dir
    >>> frame = motorlib.load_airframe(sample_catalog_dir() / "airframes" / "quibble-41.toml")
    >>> catalog = motorlib.Catalog(sample_catalog_dir(), read_only=True)
    >>> result = motorlib.rank(frame, catalog, motorlib.MatchSettings(target_m=400.0, ceiling_m=800.0))
    >>> len(result.candidates), result.candidates[0].designation, result.candidates[0].verdict
    (27, 'F51-10', 'off target')
    """
    if isinstance(pack_for, MatchSettings):  # rank(airframe, catalog, settings)
        settings, pack_for = pack_for, None
    s = settings or MatchSettings()
    fs = flight_settings or FlightSettings()
    rows, pack_for = _candidates(rows, pack_for, fs.drill_step_s)
    fit_reasons, adapters = zip(*[_fits(frame, row, s) for row in rows]) if rows else ((), ())
    fitting = [i for i, reasons in enumerate(fit_reasons) if not reasons]
    figure_columns: dict[str, list[Any]] = {}
    reasons_of: list[list[tuple[str, str]]] = list(fit_reasons)  # a motor not flown: why it does not fit
    notes_of: list[list[tuple[str, str]]] = [[] for _ in rows]
    if fitting:
        sub = [rows[i] for i in fitting]
        pack = pack_for(sub)
        results = simulate(frame, pack, fs, descent=flies_descent(frame, s))
        figures = _figures(frame, sub, pack, results, s)
        _check_stability(frame, sub, pack, results, figures, s, fs)
        if s.ballast:
            _solve_ballast(frame, sub, pack, figures, s, fs)
        figure_columns = _spread(figures.columns, fitting, len(rows))
        for i, reasons, notes in zip(fitting, figures.reasons, figures.notes):
            reasons_of[i], notes_of[i] = reasons, notes
    candidates = sorted(_candidates_of(rows, fit_reasons, adapters, figure_columns, reasons_of, notes_of, s),
                        key=_sort_key_for(s))
    conditions = _conditions(frame, s)
    airframe = {"name": frame.name, "mass_kg": frame.mass_kg, "diameter_m": frame.diameter_m,
                "mount_diameter_m": frame.mount_diameter_m, "mount_length_m": frame.mount_length_m}
    return MatchResult(airframe, conditions, tuple(candidates))


def _candidates(rows: Candidates, pack_for: PackFor | None, drill_step_s: float) -> tuple[list[CatalogRow], PackFor]:
    """Rows and a pack function for whatever :func:`rank` was given (a catalog, records or rows)."""
    if hasattr(rows, "rows") and hasattr(rows, "motor_pack"):  # a Catalog (duck-typed: catalog/ is a layer above)
        return rows.rows(), pack_for or rows.motor_pack
    if isinstance(rows, MotorRecord):
        rows = [rows]
    rows = list(rows)
    if rows and all(isinstance(r, MotorRecord) for r in rows):
        records = rows
        by_id = {f"record-{i}": r for i, r in enumerate(records)}
        return candidate_rows(records), pack_for or (
            lambda sub: MotorPack.from_records([by_id[r.motor_id] for r in sub], drill_step_s))
    if pack_for is None:
        raise TypeError("`pack_for` is needed when `rows` are catalog rows (or pass a Catalog or motor records)")
    return rows, pack_for


def _spread(columns: dict[str, list[Any]], fitting: list[int], n: int) -> dict[str, list[Any]]:
    """The figure columns of the ``fitting`` motors (one value per flown motor) spread over all ``n`` motors,
    a motor not flown holding the field's default (None: no such figure)."""
    if len(fitting) == n:
        return columns
    out = {}
    for key, column in columns.items():
        full = [_FIELD_DEFAULTS[key]] * n
        for i, value in zip(fitting, column):
            full[i] = value
        out[key] = full
    return out


def _candidates_of(rows: Sequence[CatalogRow], fit_reasons: Sequence[list[tuple[str, str]]],
                   adapters: Sequence[str | None], figure_columns: dict[str, list[Any]],
                   reasons_of: list[list[tuple[str, str]]], notes_of: list[list[tuple[str, str]]],
                   s: MatchSettings) -> list[Candidate]:
    """The record of every motor, in the order of ``rows``: its row, its flown figures (``figure_columns``, a
    motor not flown holding the defaults), the (code, message) of every rule it breaks and every note, and its
    verdict (:func:`.verdicts.classify`). Built column by column (:meth:`Candidate.from_columns`): 5,000
    candidates are one record each, not a dict merged per motor."""
    n = len(rows)
    nothing = [None] * n
    apogees = figure_columns.get("apogee_m", nothing)
    ballasts = figure_columns.get("ballast_kg", nothing)
    ballast_reasons = figure_columns.get("ballast_reasons", nothing)
    target_m, tolerance = s.target_m, s.target_tolerance
    empty = ((), ())
    # one tuple per motor, turned into columns at the end: a single list append per motor instead of seven
    per_motor = []
    append = per_motor.append
    for row, fit, reasons, notes, adapter, apogee, ballast, ballast_reason in zip(
            rows, fit_reasons, reasons_of, notes_of, adapters, apogees, ballasts, ballast_reasons):
        if row.n_errors:  # never hidden: the flight is of the curve, the flyer buys the label
            reasons = reasons + [("curve-errors", _curve_errors_text(row.n_errors))]
        if adapter is not None and not fit:
            notes = [("adapter", f"needs a {adapter} adapter")] + notes
        codes, reason_texts = zip(*reasons) if reasons else empty  # (pairs -> two tuples)
        verdict, passes, ballast_passes, verdict_notes = _classify(codes, apogee, target_m, tolerance, ballast,
                                                                   ballast_reason)
        if verdict_notes:
            notes = notes + list(verdict_notes)
        codes_n, texts_n = zip(*notes) if notes else empty
        append((reason_texts, codes, texts_n, codes_n, verdict, passes, ballast_passes))
    texts, codes_of, note_texts, note_codes, verdicts, passes_of, ballast_passes_of = (
        zip(*per_motor) if per_motor else ((),) * 7)
    columns: dict[str, Sequence[Any]] = dict(zip(_IDENTITY, zip(*map(attrgetter(*_IDENTITY), rows)))) if rows else {
        name: [] for name in _IDENTITY}
    columns.update(fits=[not reasons for reasons in fit_reasons], adapter=adapters)
    columns.update(figure_columns)
    columns.update(reasons=texts, reason_codes=codes_of, notes=note_texts, note_codes=note_codes, verdict=verdicts,
                   passes=passes_of, ballast_passes=ballast_passes_of)
    return Candidate.from_columns(columns)


# The fields a candidate takes from its catalog row, and every field's default (a motor not flown keeps them)
_IDENTITY = ("motor_id", "handle", "designation", "maker", "impulse_class", "total_impulse_ns", "diameter_m", "length_m")
_FIELD_DEFAULTS = {f.name: f.default for f in fields(Candidate)}


def _curve_errors_text(n_errors: int) -> str:
    return (f"the curve fails {n_errors} of its own checks (its label, impulse class or data; `motorlib catalog verify` "
            "lists them): the motor sold under this label may not fly like this curve")


def _sort_key_for(s: MatchSettings) -> Callable[[Candidate], tuple[int, float, str]]:
    """The ranking's sort key: good choices first (by verdict), then closeness to the target (least ballast with
    ballast), or apogee; then the designation. One call per candidate, the verdict's order looked up inline."""
    target_m = s.target_m
    order = verdict_order
    positions = _VERDICT_POSITIONS

    def key(c: Candidate) -> tuple[int, float, str]:
        verdict = c.verdict
        group = positions[verdict] if verdict in positions else order(verdict)  # (order() raises for a non-verdict)
        apogee = c.apogee_m
        if apogee is None or not math.isfinite(apogee):
            return (group, 0.0, c.designation)
        if verdict == "pass with ballast" and c.ballast_kg is not None:
            return (group, c.ballast_kg, c.designation)
        if target_m is not None:
            return (group, abs(apogee - target_m), c.designation)
        return (group, -apogee, c.designation)

    return key


_VERDICT_POSITIONS = {verdict: verdict_order(verdict) for verdict in VERDICTS}


def _conditions(frame: Airframe, s: MatchSettings) -> dict[str, Any]:
    launch = frame.launch
    site = launch.site
    return {
        "target_m": s.target_m, "ceiling_m": s.ceiling_m, "max_class": s.max_class,
        **s.rules.conditions(launch.surface_wind_m_s), "allow_smaller_motors": s.allow_smaller_motors,
        "adapter_steps": s.adapter_steps, "target_tolerance": s.target_tolerance,
        "drag": ("estimated from the shape, Cd(Mach) powered and coasting" if frame.drag_source == "estimated"
                 else f"Cd table over Mach {frame.drag_machs[0]:g}-{frame.drag_machs[-1]:g}" if frame.drag_table
                 else f"Cd {frame.drag_coefficient:g}") + f" on {frame.diameter_m * 1e3:.4g} mm",
        "drag_source": frame.drag_source,
        "min_stability_cal": s.min_stability_cal if frame.geometry is not None else None,
        "atmosphere": "U.S. Standard Atmosphere 1976" + (f", {site.elevation_m:.0f} m elevation" if site.elevation_m else "")
                      + (f", {site.temperature_k - 273.15:.1f} degC at the pad" if site.temperature_k else "")
                      + (f", {site.pressure_pa / 100:.0f} hPa at the pad" if site.pressure_pa else ""),
        "wind": ("a measured profile" if launch.wind_profile is not None
                 else f"{launch.wind_speed_m_s:g} m/s at 10 m, power law 1/7"),
        "rail": f"{launch.rail_length_m:g} m at {math.degrees(launch.rail_angle_rad):g} deg from vertical",
        "recovery": (f"{frame.recovery.device}, deployed at {frame.recovery.deploy}" if frame.recovery else "none given"),
    }
