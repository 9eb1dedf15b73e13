"""Impulse classes and the trade's motor designations (``C6-5``, ``1/2A3-2T``, ``120G40-8``).

Model
-----
Total-impulse class n (A = 1 ... O = 15) covers (1.25 * 2**(n-1), 1.25 * 2**n] N·s:
each letter doubles the one before. Below A come the fractional classes
1/2A (0.625, 1.25], 1/4A (0.3125, 0.625] and 1/8A (0, 0.3125]. The upper bound is
inclusive, the lower exclusive, as the published class lists write them
(A = 1.26-2.50 N·s, two-decimal lower bounds). Published in NFPA 1122 / 1125 /
1127 and reproduced by the national associations' codes (secondary copies; see
``tests/reference/check_values.md#impulse-classes``).

Boundary decision (tested; issue 14): the published class lists state their
ranges to 0.01 N·s (A = 1.26-2.50, B = 2.51-5.00, G = 80.01-160.00), so an
impulse is first rounded to that resolution, :data:`CLASS_RESOLUTION_NS`, and
the rounded figure is compared with the bounds: 2.504 N·s is A, 2.506 N·s is B,
and a curve scaled to exactly 160 N·s whose trapezoid sum lands one ulp above is
G, not H. Two bounds below class A cannot be written at 0.01 N·s (1/8A-1/4A at
0.3125, 1/4A-1/2A at 0.625 N·s; both would sit on a rounding tie, where one ulp
decides); an impulse that rounds below 1.25 N·s is therefore rounded to
:data:`FRACTIONAL_CLASS_RESOLUTION_NS` (0.0001 N·s) instead, which writes both
bounds exactly. Rounding is Python's ``round``: correct rounding of the binary
value, ties to even. The rounded figure (:func:`rounded_impulse_ns`, printed by
:func:`class_impulse_text`) is the one to print beside a class, so the figure
never contradicts the verdict. A positive impulse that rounds to 0 is 1/8A.
Above O (40 960.00 N·s, also the FAA Class 2 ceiling) no class is assigned:
:func:`impulse_class_for` returns None and callers report it.

Designation grammar (parsed by :func:`parse_designation`)::

    [total impulse N·s] CLASS AVERAGE-THRUST [code letters] [-DELAYS [code letters]]
    DELAYS := P (plugged, no charge) | 0 (booster, no charge) | n[,n...] or n[/n...] (seconds)

Standard library only.
"""

from __future__ import annotations

import re
from dataclasses import dataclass
from typing import Final

from ..errors import DesignationError

__all__ = [
    "CLASS_LETTERS",
    "CLASS_RESOLUTION_NS",
    "Designation",
    "FRACTIONAL_CLASS_RESOLUTION_NS",
    "ImpulseClass",
    "class_bounds_ns",
    "class_impulse_text",
    "format_designation",
    "impulse_class_for",
    "parse_designation",
    "rounded_impulse_ns",
]

_A_UPPER_NS: Final = 2.5  # top of class A; every other bound is this times a power of two
CLASS_LETTERS: Final[tuple[str, ...]] = (
    "1/8A", "1/4A", "1/2A", "A", "B", "C", "D", "E", "F", "G", "H", "I", "J", "K", "L", "M", "N", "O",
)
_A_INDEX: Final = CLASS_LETTERS.index("A")
# Published class lists give their ranges to two decimals of a newton-second (secondary copies;
# tests/reference/check_values.md#impulse-classes).
CLASS_RESOLUTION_NS: Final = 0.01
# Below 1.25 N·s the bounds 0.3125 and 0.625 N·s need four decimals; no published list was seen that
# states them at a coarser resolution (tests/reference/check_values.md#impulse-classes: 1/4A's bounds follow from the
# doubling rule, 1/8A's are from memory).
FRACTIONAL_CLASS_RESOLUTION_NS: Final = 0.0001
_DECIMALS: Final = 2  # decimals of CLASS_RESOLUTION_NS
_FRACTIONAL_DECIMALS: Final = 4  # decimals of FRACTIONAL_CLASS_RESOLUTION_NS


@dataclass(frozen=True)
class ImpulseClass:
    """One total-impulse class and where an impulse sits in it.

    Attributes
    ----------
    letter : str
        ``"1/8A"`` ... ``"O"``.
    lower_ns, upper_ns : float
        Exclusive lower and inclusive upper bound [N·s] (1/8A has lower 0).
    percent : float
        How far the impulse, rounded as :func:`rounded_impulse_ns` does, lies
        from the lower to the upper bound, in percent (a 7.5 N·s motor is "50 % C"):
        ``100 * (I - lower) / (upper - lower)``.
    """

    letter: str
    lower_ns: float
    upper_ns: float
    percent: float


def class_bounds_ns(letter: str) -> tuple[float, float]:
    """Return the (exclusive lower, inclusive upper) bounds in N·s of class ``letter``.

    >>> class_bounds_ns("C")
    (5.0, 10.0)
    >>> class_bounds_ns("1/2A")
    (0.625, 1.25)
    """
    try:
        index = CLASS_LETTERS.index(letter)
    except ValueError:
        raise ValueError(f"`letter` must be one of {', '.join(CLASS_LETTERS)}, got {letter!r}") from None
    upper = _A_UPPER_NS * 2.0 ** (index - _A_INDEX)  # powers of two: exact in binary floating point
    lower = 0.0 if index == 0 else upper / 2.0
    return lower, upper


def _class_decimals(total_impulse_ns: float) -> int:
    coarse = round(float(total_impulse_ns), _DECIMALS)
    return _DECIMALS if coarse >= _A_UPPER_NS / 2.0 else _FRACTIONAL_DECIMALS


def rounded_impulse_ns(total_impulse_ns: float) -> float:
    """A total impulse [N·s] at the resolution of the class table: 0.01 N·s, 0.0001 N·s below 1.25 N·s.

    This is the figure :func:`impulse_class_for` classifies (see the module docstring); print it
    beside a class with :func:`class_impulse_text`.

    >>> rounded_impulse_ns(160.00000000000003)
    160.0
    >>> rounded_impulse_ns(2.506)
    2.51
    >>> rounded_impulse_ns(0.62500000000001)
    0.625
    """
    return round(float(total_impulse_ns), _class_decimals(total_impulse_ns))


def class_impulse_text(total_impulse_ns: float) -> str:
    """The classified figure of a total impulse [N·s] as text, at its resolution (no unit).

    >>> class_impulse_text(160.00000000000003)
    '160.00'
    >>> class_impulse_text(0.3125)
    '0.3125'
    """
    return f"{rounded_impulse_ns(total_impulse_ns):.{_class_decimals(total_impulse_ns)}f}"


def impulse_class_for(total_impulse_ns: float) -> ImpulseClass | None:
    """Classify a total impulse [N·s] as the class lists do; None above class O (> 40 960.00 N·s) or for I <= 0.

    The impulse is rounded first (:func:`rounded_impulse_ns`; module docstring),
    and ``percent`` is computed from the rounded figure.

    >>> impulse_class_for(10.0).letter
    'C'
    >>> impulse_class_for(10.01).letter
    'D'
    >>> impulse_class_for(10.004).letter
    'C'
    """
    if not total_impulse_ns > 0.0:  # also rejects NaN
        return None
    shown = rounded_impulse_ns(total_impulse_ns)
    for letter in CLASS_LETTERS:
        lower, upper = class_bounds_ns(letter)
        if shown <= upper:
            percent = 100.0 * (shown - lower) / (upper - lower)
            return ImpulseClass(letter, lower, upper, percent)
    return None


@dataclass(frozen=True)
class Designation:
    """A parsed motor label.

    Attributes
    ----------
    impulse_class : str
        ``"1/4A"`` ... ``"O"``.
    average_thrust_n : float
        The labelled average thrust [N].
    total_impulse_ns : float or None
        Leading total impulse when the label gives one (``120G40-8``) [N·s].
    delays_s : tuple of float
        Labelled ejection delays [s]; empty when plugged or booster.
    plugged : bool
        ``-P``: no ejection charge at all (electronics deploy recovery).
    booster : bool
        ``-0``: no delay and no ejection charge; ignites the next stage.
    thrust_code, delay_code : str
        Maker letters after the thrust or the delay (propellant or variant
        codes); kept verbatim, never interpreted.
    """

    impulse_class: str
    average_thrust_n: float
    total_impulse_ns: float | None = None
    delays_s: tuple[float, ...] = ()
    plugged: bool = False
    booster: bool = False
    thrust_code: str = ""
    delay_code: str = ""


_NUM = re.compile(r"\d+(?:\.\d+)?")
_LETTERS = re.compile(r"[A-Za-z]*")


def _format_number(value: float) -> str:
    return str(int(value)) if float(value).is_integer() else repr(float(value))


def parse_designation(text: str) -> Designation:
    """Parse a designation such as ``C6-5``, ``1/2A3-2T``, ``120G40-8W``, ``H100-P``, ``G40-4,7,10``.

    Raises
    ------
    DesignationError
        Naming the character position and the part that was expected there.

    >>> parse_designation("C6-5")
    Designation(impulse_class='C', average_thrust_n=6.0, total_impulse_ns=None, delays_s=(5.0,), plugged=False, booster=False, thrust_code='', delay_code='')
    """
    if not isinstance(text, str):
        raise TypeError(f"`text` must be a str, got {type(text).__name__}")
    label = text.strip()
    pos = 0
    total_impulse = None
    # A leading number is a total impulse only when a class letter follows it ("120G40").
    lead = re.match(r"(\d+(?:\.\d+)?)(?=[A-Za-z])", label)
    if lead and not label.startswith(("1/8", "1/4", "1/2")):
        total_impulse = float(lead.group(1))
        pos = lead.end()
    letter = None
    for fractional in ("1/8A", "1/4A", "1/2A"):
        if label.upper().startswith(fractional, pos):
            letter, pos = fractional, pos + len(fractional)
            break
    if letter is None:
        if pos < len(label) and label[pos].isalpha():
            candidate = label[pos].upper()
            if candidate not in CLASS_LETTERS:
                raise DesignationError(
                    text, pos, f"an impulse class letter A to O ({candidate!r} is not in the standard class table)"
                )
            letter, pos = candidate, pos + 1
        else:
            raise DesignationError(text, pos, "an impulse class (1/8A, 1/4A, 1/2A or a letter A to O)")
    thrust = _NUM.match(label, pos)
    if thrust is None:
        raise DesignationError(text, pos, f"the average thrust in newtons (a number) after class {letter!r}")
    average = float(thrust.group())
    pos = thrust.end()
    code = _LETTERS.match(label, pos)
    thrust_code = code.group()
    pos = code.end()
    delays: tuple[float, ...] = ()
    plugged = booster = False
    delay_code = ""
    if pos < len(label):
        if label[pos] != "-":
            raise DesignationError(text, pos, "'-' followed by the ejection delay, or the end of the label")
        pos += 1
        if label[pos:pos + 1].upper() == "P":
            plugged, pos = True, pos + 1
        else:
            values = []
            while True:
                number = _NUM.match(label, pos)
                if number is None:
                    raise DesignationError(text, pos, "an ejection delay in seconds (a number) or 'P' for plugged")
                values.append(float(number.group()))
                pos = number.end()
                if pos < len(label) and label[pos] in ",/":
                    pos += 1
                    continue
                break
            if values == [0.0]:
                booster = True
            elif 0.0 in values:
                raise DesignationError(text, pos, "delays above 0 s (0 marks a booster and stands alone)")
            else:
                delays = tuple(values)
        code = _LETTERS.match(label, pos)
        delay_code = code.group()
        pos = code.end()
        if pos < len(label):
            raise DesignationError(text, pos, "the end of the label")
    if average <= 0.0:
        raise DesignationError(text, thrust.start(), "an average thrust above 0 N")
    return Designation(letter, average, total_impulse, delays, plugged, booster, thrust_code, delay_code)


def format_designation(designation: Designation) -> str:
    """Format a :class:`Designation` back into the trade's notation.

    >>> format_designation(parse_designation("120g40-8w"))
    '120G40-8w'
    """
    d = designation
    text = (_format_number(d.total_impulse_ns) if d.total_impulse_ns is not None else "")
    text += d.impulse_class + _format_number(d.average_thrust_n) + d.thrust_code
    if d.plugged:
        text += "-P"
    elif d.booster:
        text += "-0"
    elif d.delays_s:
        text += "-" + ",".join(_format_number(v) for v in d.delays_s)
    return text + d.delay_code
