"""The motor record: one thrust-time curve with its hardware, ejection and provenance data.

Model
-----
Thrust is piecewise linear between the samples and zero outside
``[time_s[0], time_s[-1]]``. Every integral is therefore exact: the trapezoid
rule over the samples is the integral of that function (Burden & Faires,
*Numerical Analysis*, section 4.4: the composite-trapezoid error term vanishes
for piecewise-linear integrands).

Burn time is the *threshold burn time*: from the moment thrust first rises to a
threshold fraction of peak thrust to the moment it last falls to it, crossings
located by linear interpolation. The default threshold, 5 % of peak, is the one
secondary sources attribute to NFPA 1125 (tests/reference/check_values.md#motor-testing).
Average thrust is the impulse delivered inside that window divided by the burn
time (same source). Both keep the threshold as a parameter.

Ejection is a tri-state (issue 14): delays listed (``delays_s`` not empty), no
ejection charge at all (``no_ejection_charge``: plugged or booster), or unknown
(neither: the delays were not given). :attr:`MotorRecord.ejection` names the state.

Motor mass is assumed to fall from the loaded mass by the propellant mass in
proportion to the impulse delivered so far: ``m(t) = m0 - mp * I(t) / I_total``.

The curve arithmetic every module shares lives here with the record it describes: the cumulative trapezoid
(:func:`cumulative_impulse_ns`, also the flight's pack and the stability code) and the threshold window
(:func:`threshold_window_s`, also the test-stand reduction), and the record remembers its figures
(issue 16: a catalog add reads each several times). That puts the module near 600 lines.

numpy only (no scipy: the flight path imports this module).
"""

from __future__ import annotations

import datetime as _dt
import math
import re
from dataclasses import dataclass, field
from typing import Callable, Final, TypeVar

import numpy as np

from .classes import ImpulseClass, impulse_class_for
from ..errors import CurveDataError, Problem
from ..units import STANDARD_GRAVITY_M_S2

__all__ = [
    "DEFAULT_BURN_THRESHOLD",
    "EJECTION_STATES",
    "FORMER_PROVENANCE_KINDS",
    "FiringSpread",
    "MotorRecord",
    "PROVENANCE_KINDS",
    "Provenance",
    "cumulative_impulse_ns",
    "threshold_window_s",
]

# Fraction of peak thrust; NFPA 1125 as secondary sources summarise it (tests/reference/check_values.md#motor-testing).
DEFAULT_BURN_THRESHOLD: Final = 0.05
# Where a curve comes from, in our own words (format 1.1; data_schema/FORMAT.md has the table):
#   approval-firing   fired by a body that tests motors for approval before sale, as that body published it
#   maker-published   published by the motor's maker (data sheet, instructions, maker's own files)
#   own-firing        fired on a test stand by the record's author or their team (motorlib reduce)
#   demo              invented for demonstration; never for a real flight
#   other             anything else, or not known
# A character no curve file can carry (XML 1.0 allows tab, newline, carriage return and the rest of Unicode
# except surrogates and U+FFFE/U+FFFF; W3C XML 1.0, section 2.2 "Characters"): a record's text refuses it, so
# that every record can be written and read back. Spelled as the characters refused rather than as the negation of
# those allowed: the same set, and compiled in a tenth of the time (the negated class with its astral range took
# ~6 ms, paid by every command that imports this module).
UNWRITABLE_CHARACTER: Final = re.compile("[\x00-\x08\x0b\x0c\x0e-\x1f\ud800-\udfff\ufffe\uffff]")


def text_problem(text: object, field_name: str) -> Problem | None:
    """A Problem when ``text`` (a str) holds a character no curve file can carry, naming the first one."""
    found = UNWRITABLE_CHARACTER.search(text) if isinstance(text, str) else None
    if found is None:
        return None
    return Problem("text-not-writable", field_name,
                   f"holds a character a curve file cannot carry (U+{ord(found.group()):04X}, a control character "
                   f"or a lone surrogate) at position {found.start() + 1}; remove it")


PROVENANCE_KINDS: Final = ("approval-firing", "maker-published", "own-firing", "demo", "other")
# Names used up to format 1.0; files that carry them are read with the new name.
FORMER_PROVENANCE_KINDS: Final = {
    "certification-test": "approval-firing",
    "maker-data": "maker-published",
    "static-test": "own-firing",
}
EJECTION_STATES: Final = ("delays", "no-charge", "unknown")  # values of MotorRecord.ejection
_T = TypeVar("_T")


def read_only_copy(values: np.ndarray) -> np.ndarray:
    """A copy of ``values`` that refuses writes (``ValueError: assignment destination is read-only``)."""
    frozen = np.array(values)
    frozen.flags.writeable = False
    return frozen


def freeze_arrays(record: object) -> None:
    """Replace every numpy array attribute of a frozen dataclass ``record`` by a read-only copy of itself."""
    for name, value in list(vars(record).items()):
        if isinstance(value, np.ndarray):
            object.__setattr__(record, name, read_only_copy(value))


@dataclass(frozen=True)
class Provenance:
    """Where a curve comes from.

    Attributes
    ----------
    kind : str
        One of :data:`PROVENANCE_KINDS`.
    date : datetime.date or None
        Date of the test or of the data sheet.
    notes : str
        Free text (test stand, lot number, who measured).
    """

    kind: str = "other"
    date: _dt.date | None = None
    notes: str = ""

    def __post_init__(self) -> None:
        if self.kind not in PROVENANCE_KINDS:
            hint = (f" ({self.kind!r} is now called {FORMER_PROVENANCE_KINDS[self.kind]!r})"
                    if self.kind in FORMER_PROVENANCE_KINDS else "")
            raise CurveDataError(
                "provenance",
                [Problem("provenance-kind", "provenance.kind",
                         f"must be one of {', '.join(PROVENANCE_KINDS)}, got {self.kind!r}{hint}")],
            )
        problem = text_problem(self.notes, "provenance.notes")
        if problem is not None:
            raise CurveDataError("provenance", [problem])


@dataclass(frozen=True)
class FiringSpread:
    """The measured spread of several firings of one motor (issue 12: it feeds the dispersion runs).

    Attributes
    ----------
    n_firings : int
        Number of firings, at least 2.
    total_impulse_mean_ns, total_impulse_std_ns : float
        Mean [N·s] (above 0) and sample standard deviation [N·s] (n - 1 in the
        denominator, at least 0) of the firings' total impulses.
    burn_time_mean_s, burn_time_std_s : float
        Mean [s] (above 0) and sample standard deviation [s] (at least 0) of the
        firings' burn times, each measured as :meth:`MotorRecord.burn_time_s`
        measures it (5 % of peak by default).

    Raises
    ------
    CurveDataError
        Code ``firing-spread-invalid``, field ``firing_spread``.

    Examples
    --------
    >>> FiringSpread(3, 49.0, 0.98, 1.6, 0.04).total_impulse_relative_std
    0.02
    """

    n_firings: int
    total_impulse_mean_ns: float
    total_impulse_std_ns: float
    burn_time_mean_s: float
    burn_time_std_s: float

    def __post_init__(self) -> None:
        problems = []
        if isinstance(self.n_firings, bool) or not isinstance(self.n_firings, (int, np.integer)) or self.n_firings < 2:
            problems.append(f"a spread needs at least 2 firings, got {self.n_firings!r}")
        else:
            object.__setattr__(self, "n_firings", int(self.n_firings))
        for name, strictly in (("total_impulse_mean_ns", True), ("total_impulse_std_ns", False),
                               ("burn_time_mean_s", True), ("burn_time_std_s", False)):
            value = float(getattr(self, name))
            object.__setattr__(self, name, value)
            if not (math.isfinite(value) and (value > 0.0 if strictly else value >= 0.0)):
                problems.append(f"{name} must be a finite number {'above' if strictly else 'at least'} 0, "
                                f"got {value!r}")
        if problems:
            raise CurveDataError("firing spread",
                                 [Problem("firing-spread-invalid", "firing_spread", p) for p in problems])

    @property
    def total_impulse_relative_std(self) -> float:
        """Standard deviation of total impulse over its mean (dimensionless)."""
        return self.total_impulse_std_ns / self.total_impulse_mean_ns

    @property
    def burn_time_relative_std(self) -> float:
        """Standard deviation of burn time over its mean (dimensionless)."""
        return self.burn_time_std_s / self.burn_time_mean_s


def _frozen_array(values: object) -> np.ndarray:
    array = np.array(values, dtype=float)  # our own copy, frozen below
    array.flags.writeable = False
    return array


def _positive_or_none(name: str, value: float | None, problems: list[Problem]) -> float | None:
    if value is None:
        return None
    value = float(value)
    if not (math.isfinite(value) and value > 0.0):
        problems.append(Problem("hardware-not-positive", name, f"must be a positive finite number, got {value!r}"))
    return value


@dataclass(frozen=True, eq=False)
class MotorRecord:
    """Thrust [N] against time [s] for one motor, with its label and hardware.

    Parameters
    ----------
    designation : str
        The label as the maker prints it (``"C6-5"``); not required to parse.
    time_s, thrust_n : array_like, shape (n_samples,)
        Sample times [s], strictly increasing and >= 0, and thrusts [N], finite and >= 0.
    maker : str
        Maker name ("" if unknown).
    diameter_m, length_m : float or None
        Motor case diameter and length [m].
    total_mass_kg, propellant_mass_kg : float or None
        Loaded mass and propellant mass [kg]; propellant <= total.
    delays_s : tuple of float
        Available ejection delays [s] of the motor type; a label carrying any one of them is
        consistent (``E16-6`` with 4, 6, 8). Empty when there is no charge or the delays are unknown.
    delay_adjustable : bool
        True when the user may shorten the delay (drilling); the listed delays are then the longest.
    no_ejection_charge : bool
        True when the motor has no ejection charge at all (plugged or booster). With no delays and
        False, the delays are *unknown* (not given), which is not the same as plugged.
    provenance : Provenance
    firing_spread : FiringSpread or None
        The measured spread of several firings of this motor, when known.

    Raises
    ------
    CurveDataError
        Listing every broken invariant, each with a stable code.

    Notes
    -----
    Arrays are copied and frozen; records compare equal when every field and
    every sample is equal (exactly).

    The figures of the curve (total and cumulative impulse, peak thrust, burn
    window and average thrust at each threshold asked for, impulse class) are
    computed once per record and remembered: a catalog add or index rebuild
    reads each several times (checks, label, row). They depend on the samples
    only, which refuse writes; the memo is tied to the two sample arrays
    themselves, so a copy given other arrays (``dataclasses.replace``, or
    ``copy.copy`` and ``object.__setattr__``) computes its own.
    """

    designation: str
    time_s: np.ndarray
    thrust_n: np.ndarray
    maker: str = ""
    diameter_m: float | None = None
    length_m: float | None = None
    total_mass_kg: float | None = None
    propellant_mass_kg: float | None = None
    delays_s: tuple[float, ...] = ()
    delay_adjustable: bool = False
    provenance: Provenance = field(default_factory=Provenance)
    no_ejection_charge: bool = False
    firing_spread: FiringSpread | None = None

    def __post_init__(self) -> None:
        for name in ("time_s", "thrust_n"):
            object.__setattr__(self, name, _frozen_array(getattr(self, name)))
        problems = sample_problems(self.time_s, self.thrust_n)
        for name in ("diameter_m", "length_m", "total_mass_kg", "propellant_mass_kg"):
            object.__setattr__(self, name, _positive_or_none(name, getattr(self, name), problems))
        delays = tuple(float(d) for d in self.delays_s)
        object.__setattr__(self, "delays_s", delays)
        for delay in delays:
            if not (math.isfinite(delay) and delay > 0.0):
                problems.append(Problem("delay-not-positive", "delays_s",
                                        f"ejection delays must be positive seconds, got {delay!r}"))
        # compared at the ten significant digits a catalog file keeps (files/motor_xml.py), or a record could
        # list two delays that its own file lists as one twice
        if len({f"{d:.10g}" for d in delays}) != len(delays):
            problems.append(Problem("delay-repeated", "delays_s", f"a delay is listed twice in {delays}"))
        object.__setattr__(self, "no_ejection_charge", bool(self.no_ejection_charge))
        object.__setattr__(self, "delay_adjustable", bool(self.delay_adjustable))
        if self.no_ejection_charge and delays:
            problems.append(Problem("no-charge-with-delays", "delays_s",
                                    f"a motor without an ejection charge cannot list delays {delays}"))
        elif self.no_ejection_charge and self.delay_adjustable:
            problems.append(Problem("no-charge-with-delays", "delay_adjustable",
                                    "a motor without an ejection charge has no delay to adjust"))
        if (self.total_mass_kg is not None and self.propellant_mass_kg is not None
                and self.propellant_mass_kg > self.total_mass_kg):
            problems.append(Problem(
                "propellant-exceeds-total-mass", "propellant_mass_kg",
                f"propellant mass {self.propellant_mass_kg * 1e3:.6g} g exceeds the total (loaded) "
                f"mass {self.total_mass_kg * 1e3:.6g} g; check the units of both",
            ))
        if not isinstance(self.designation, str) or not self.designation.strip():
            problems.append(Problem("designation-missing", "designation", "a designation (label) is required"))
        problems += [p for p in (text_problem(self.maker, "maker"), text_problem(self.designation, "designation"))
                     if p is not None]
        if not isinstance(self.provenance, Provenance):
            raise TypeError("`provenance` must be a Provenance")
        if self.firing_spread is not None and not isinstance(self.firing_spread, FiringSpread):
            raise TypeError("`firing_spread` must be a FiringSpread or None")
        if problems:
            raise CurveDataError(self.designation or "motor record", problems)

    def __eq__(self, other: object) -> bool:
        if not isinstance(other, MotorRecord):
            return NotImplemented
        return (
            self.designation == other.designation and self.maker == other.maker
            and np.array_equal(self.time_s, other.time_s) and np.array_equal(self.thrust_n, other.thrust_n)
            and self.diameter_m == other.diameter_m and self.length_m == other.length_m
            and self.total_mass_kg == other.total_mass_kg and self.propellant_mass_kg == other.propellant_mass_kg
            and self.delays_s == other.delays_s and self.delay_adjustable == other.delay_adjustable
            and self.no_ejection_charge == other.no_ejection_charge
            and self.provenance == other.provenance and self.firing_spread == other.firing_spread
        )

    __hash__ = None  # type: ignore[assignment]  # mutable-looking arrays: not hashable

    def _figure(self, key: object, compute: Callable[[], _T]) -> _T:
        """``compute()``, remembered under ``key`` for as long as the record keeps its sample arrays."""
        memo = self.__dict__.get("_figures")
        if memo is None or memo[0] is not self.time_s or memo[1] is not self.thrust_n:
            memo = (self.time_s, self.thrust_n, {})
            object.__setattr__(self, "_figures", memo)  # not a field: no effect on eq, repr or replace
        figures = memo[2]
        if key not in figures:
            figures[key] = compute()
        return figures[key]

    @property
    def ejection(self) -> str:
        """``"delays"`` (delays listed), ``"no-charge"`` (plugged or booster) or ``"unknown"`` (not given)."""
        if self.delays_s:
            return "delays"
        return "no-charge" if self.no_ejection_charge else "unknown"

    # ----------------------------------------------------------------- integrals
    @property
    def n_samples(self) -> int:
        return int(self.time_s.size)

    @property
    def total_impulse_ns(self) -> float:
        """Total impulse [N·s]: the exact integral of the piecewise-linear curve."""
        return self._figure("total_impulse_ns", lambda: float(np.trapezoid(self.thrust_n, self.time_s)))

    def cumulative_impulse_ns(self) -> np.ndarray:
        """Impulse delivered up to each sample [N·s], shape (n_samples,), starting at 0; read-only."""
        return self._figure("cumulative_impulse_ns",
                            lambda: read_only_copy(cumulative_impulse_ns(self.time_s, self.thrust_n)))

    def thrust_at_n(self, time_s: np.ndarray | float) -> np.ndarray:
        """Thrust [N] at any times [s] (linear between samples, 0 outside); vectorised."""
        return np.interp(time_s, self.time_s, self.thrust_n, left=0.0, right=0.0)

    def impulse_at_ns(self, time_s: np.ndarray | float) -> np.ndarray:
        """Impulse [N·s] delivered from the start up to each time [s]; vectorised, exact.

        Within a sample interval the thrust is linear, so the partial integral
        is a trapezoid from the interval start to ``t``.
        """
        t = np.clip(np.asarray(time_s, dtype=float), self.time_s[0], self.time_s[-1])
        cumulative = self.cumulative_impulse_ns()
        index = np.clip(np.searchsorted(self.time_s, t, side="right") - 1, 0, self.n_samples - 2)
        t0 = self.time_s[index]
        partial = 0.5 * (self.thrust_n[index] + np.interp(t, self.time_s, self.thrust_n)) * (t - t0)
        return cumulative[index] + partial

    def mass_at_kg(self, time_s: np.ndarray | float) -> np.ndarray:
        """Motor mass [kg] at any times [s], propellant consumed in proportion to impulse.

        Raises
        ------
        ValueError
            When the record lacks its total or propellant mass.
        """
        if self.total_mass_kg is None or self.propellant_mass_kg is None:
            raise ValueError(f"{self.designation}: total and propellant mass are needed for the motor mass")
        fraction = self.impulse_at_ns(time_s) / self.total_impulse_ns
        return self.total_mass_kg - self.propellant_mass_kg * fraction

    # ------------------------------------------------------------- peak and burn
    @property
    def peak_thrust_n(self) -> float:
        """Largest sampled thrust [N] (the curve's maximum: it is piecewise linear)."""
        return self._figure("peak_thrust_n", lambda: float(self.thrust_n.max()))

    @property
    def peak_time_s(self) -> float:
        """Time [s] of the first sample at peak thrust."""
        return float(self.time_s[int(np.argmax(self.thrust_n))])

    def burn_window_s(self, threshold: float = DEFAULT_BURN_THRESHOLD) -> tuple[float, float]:
        """Start and end [s] of the threshold burn window.

        Start: where thrust first reaches ``threshold * peak``; end: where it last
        falls to it; both by linear interpolation within the crossing interval.
        A curve that starts (ends) above the threshold starts (ends) at its first
        (last) sample.
        """
        if not 0.0 < threshold < 1.0:
            raise ValueError(f"`threshold` must lie strictly between 0 and 1, got {threshold!r}")
        return self._figure(("burn_window_s", threshold),
                            lambda: threshold_window_s(self.time_s, self.thrust_n, threshold * self.peak_thrust_n))

    def burn_time_s(self, threshold: float = DEFAULT_BURN_THRESHOLD) -> float:
        """Threshold burn time [s] (see module docstring); default 5 % of peak."""
        start, end = self.burn_window_s(threshold)
        return end - start

    def average_thrust_n(self, threshold: float = DEFAULT_BURN_THRESHOLD) -> float:
        """Average thrust [N]: impulse inside the burn window divided by the burn time."""
        start, end = self.burn_window_s(threshold)
        if end <= start:
            return self.peak_thrust_n  # a single-sample spike: the window has no width

        def average() -> float:
            impulse = float(np.diff(self.impulse_at_ns(np.array([start, end])))[0])
            return impulse / (end - start)

        return self._figure(("average_thrust_n", threshold), average)

    # ---------------------------------------------------------- class and label
    @property
    def impulse_class(self) -> ImpulseClass | None:
        """The total-impulse class with percent-into-class; None above class O."""
        return self._figure("impulse_class", lambda: impulse_class_for(self.total_impulse_ns))

    def computed_designation(self, threshold: float = DEFAULT_BURN_THRESHOLD) -> str:
        """Class letter plus average thrust as a label prints it (``"C6"``, ``"A1.4"``, ``"H124"``).

        The class comes from the impulse at 0.01 N·s (:func:`~motorlib.motor.classes.impulse_class_for`).
        Average thrust is printed as labels print it, in whole newtons (common practice, no
        published source), from 5 N up, where a whole newton is within 10 % of the average: half the
        20 % label tolerance of :class:`~motorlib.motor.checks.CheckSettings`. Below 5 N a whole
        newton can be off by more than that tolerance (1.36 N would print as 1, 26 % low), so the
        figure keeps two significant figures (``A1.4``, ``1/4A0.36``; within 5 %). Either way a
        record labelled with its computed designation passes its own label check.
        """
        cls = self.impulse_class
        letter = cls.letter if cls is not None else ">O"
        return letter + _label_thrust_text(self.average_thrust_n(threshold))

    # ------------------------------------------------------------------- masses
    @property
    def specific_impulse_s(self) -> float | None:
        """Specific impulse [s]: ``I_total / (m_propellant * g0)``; None without propellant mass.

        Definition as in Sutton & Biblarz, *Rocket Propulsion Elements*, ch. 2.
        """
        if self.propellant_mass_kg is None:
            return None
        return self.total_impulse_ns / (self.propellant_mass_kg * STANDARD_GRAVITY_M_S2)

    @property
    def propellant_mass_fraction(self) -> float | None:
        """Propellant mass over loaded mass (dimensionless); None unless both are known."""
        if self.propellant_mass_kg is None or self.total_mass_kg is None:
            return None
        return self.propellant_mass_kg / self.total_mass_kg

    @property
    def burnout_mass_kg(self) -> float | None:
        """Mass of the spent motor [kg]; None unless both masses are known."""
        if self.propellant_mass_kg is None or self.total_mass_kg is None:
            return None
        return self.total_mass_kg - self.propellant_mass_kg


_WHOLE_NEWTONS_FROM_N: Final = 5.0  # from here up a whole newton is within 0.5 / 5 = 10 % of the average


def _label_thrust_text(average_n: float) -> str:
    """Average thrust [N] as a label prints it: whole newtons from 5 N, else two significant figures."""
    if not (math.isfinite(average_n) and average_n > 0.0):
        return f"{average_n:g}"
    if average_n >= _WHOLE_NEWTONS_FROM_N:
        return str(int(math.floor(average_n + 0.5)))
    decimals = 1 - math.floor(math.log10(average_n))  # two significant figures
    text = f"{average_n:.{decimals}f}"
    return text.rstrip("0").rstrip(".") if "." in text else text


def _crossing(t0: float, f0: float, t1: float, f1: float, level: float) -> float:
    """Time where the segment (t0, f0)-(t1, f1) takes the value ``level``."""
    if f1 == f0:
        return float(t0)
    return float(t0 + (level - f0) * (t1 - t0) / (f1 - f0))


def threshold_window_s(time_s: np.ndarray, thrust_n: np.ndarray, level_n: float) -> tuple[float, float]:
    """Start and end [s] of the span where thrust is at or above ``level_n`` [N]: where it first reaches the
    level and where it last falls to it, by linear interpolation in the crossing interval; a curve that starts
    (ends) at or above the level starts (ends) at its first (last) sample. The level must be reached. The one
    threshold crossing of the library: a record's burn window, a reduction's ignition and burnout.

    >>> threshold_window_s(np.array([0.0, 1.0, 2.0, 3.0]), np.array([0.0, 10.0, 10.0, 0.0]), 5.0)
    (0.5, 2.5)
    """
    t, f = time_s, thrust_n
    above = np.flatnonzero(f >= level_n)
    first, last = int(above[0]), int(above[-1])
    start = float(t[0]) if first == 0 else _crossing(t[first - 1], f[first - 1], t[first], f[first], level_n)
    end = float(t[-1]) if last == f.size - 1 else _crossing(t[last], f[last], t[last + 1], f[last + 1], level_n)
    return start, end


def cumulative_impulse_ns(time_s: np.ndarray, thrust_n: np.ndarray) -> np.ndarray:
    """Impulse [N·s] delivered up to each sample, by the trapezoid rule along the last axis, starting at 0.

    ``time_s`` and ``thrust_n`` have the same shape, (n_samples,) or (n_motors, n_samples); so does the
    result. The trapezoid rule is the exact integral of the piecewise-linear curve.

    >>> cumulative_impulse_ns(np.array([0.0, 1.0, 3.0]), np.array([0.0, 10.0, 10.0])).tolist()
    [0.0, 5.0, 25.0]
    """
    time, thrust = np.asarray(time_s, dtype=float), np.asarray(thrust_n, dtype=float)
    steps = 0.5 * (thrust[..., 1:] + thrust[..., :-1]) * np.diff(time, axis=-1)
    return np.concatenate((np.zeros(steps.shape[:-1] + (1,)), np.cumsum(steps, axis=-1)), axis=-1)


MIN_SAMPLES: Final = 2  # fewer cannot describe any curve; check.py warns below a larger count
# Bounds that keep every derived figure (impulse, mass flow, grids) finite and every file readable: the largest
# solid motors ever fired give about 16 MN and burn about two minutes; these limits are far above both
# (common practice, no published source), and their product (1e13 N·s) is far below the float64 range.
MAX_THRUST_N: Final = 1e8
MAX_TIME_S: Final = 1e5


def _samples_are_sound(time_s: np.ndarray, thrust_n: np.ndarray) -> bool:
    """True when :func:`_problems_in_detail` would find nothing in 1-D samples of one length (at least two).

    A NaN makes every comparison with the minimum or maximum false, and an infinity is out of range, so
    finiteness needs no pass of its own.
    """
    time_min, time_max = time_s.min(), time_s.max()
    thrust_min, thrust_max = thrust_n.min(), thrust_n.max()
    return bool(0.0 <= time_min and time_max <= MAX_TIME_S and 0.0 <= thrust_min and 0.0 < thrust_max <= MAX_THRUST_N
                and (np.diff(time_s) > 0.0).all())


def sample_problems(time_s: np.ndarray, thrust_n: np.ndarray) -> list[Problem]:
    """Every broken invariant of a sampled curve, with the first offending sample index.

    Codes: ``shape-mismatch``, ``too-few-samples``, ``time-not-finite``,
    ``time-negative``, ``time-too-large``, ``time-not-increasing``, ``thrust-not-finite``,
    ``thrust-negative``, ``thrust-too-large``, ``no-thrust`` (limits: :data:`MAX_TIME_S`, :data:`MAX_THRUST_N`).
    """
    problems: list[Problem] = []
    if time_s.ndim != 1 or thrust_n.ndim != 1 or time_s.shape != thrust_n.shape:
        return [Problem("shape-mismatch", "samples",
                        f"time and thrust must be 1-D of one length, got shapes {time_s.shape} and {thrust_n.shape}")]
    if time_s.size < MIN_SAMPLES:
        return [Problem("too-few-samples", "samples", f"at least {MIN_SAMPLES} samples are needed, got {time_s.size}")]
    if _samples_are_sound(time_s, thrust_n):  # the usual case, settled in a few reductions
        return problems
    return _problems_in_detail(time_s, thrust_n)


def _problems_in_detail(time_s: np.ndarray, thrust_n: np.ndarray) -> list[Problem]:
    """The problems of :func:`sample_problems` in 1-D samples of one length (at least two), each located."""
    problems: list[Problem] = []

    def first(mask: np.ndarray) -> int | None:
        hits = np.flatnonzero(mask)
        return int(hits[0]) if hits.size else None

    if (i := first(~np.isfinite(time_s))) is not None:
        problems.append(Problem("time-not-finite", "time_s", f"sample {i + 1}: time is {float(time_s[i])!r}", i))
    elif (i := first(time_s < 0.0)) is not None:
        problems.append(Problem("time-negative", "time_s",
                                f"sample {i + 1}: time {float(time_s[i])!r} s is before ignition (t < 0)", i))
    elif (i := first(time_s > MAX_TIME_S)) is not None:
        problems.append(Problem("time-too-large", "time_s", f"sample {i + 1}: time {float(time_s[i])!r} s is "
                                f"above {MAX_TIME_S:g} s, far beyond any motor's burn (a wrong timestamp?)", i))
    # only between finite times: the difference of two infinities is undefined (and numpy warns about it)
    if np.all(np.isfinite(time_s)) and (i := first(~(np.diff(time_s) > 0.0))) is not None:
        problems.append(Problem(
            "time-not-increasing", "time_s",
            f"sample {i + 2}: time {float(time_s[i + 1])!r} s does not follow {float(time_s[i])!r} s; times must strictly increase",
            i + 1,
        ))
    if (i := first(~np.isfinite(thrust_n))) is not None:
        problems.append(Problem("thrust-not-finite", "thrust_n", f"sample {i + 1}: thrust is {float(thrust_n[i])!r}", i))
    elif (i := first(thrust_n < 0.0)) is not None:
        problems.append(Problem("thrust-negative", "thrust_n",
                                f"sample {i + 1}: thrust {float(thrust_n[i])!r} N is negative (tare the load cell)", i))
    elif (i := first(thrust_n > MAX_THRUST_N)) is not None:
        problems.append(Problem("thrust-too-large", "thrust_n", f"sample {i + 1}: thrust {float(thrust_n[i])!r} N "
                                f"is above {MAX_THRUST_N:g} N, far beyond any motor (a wrong unit or scale?)", i))
    elif not np.any(thrust_n > 0.0):
        problems.append(Problem("no-thrust", "thrust_n", "every thrust sample is zero"))
    return problems
