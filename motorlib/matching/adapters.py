"""Motor-mount adapters: which standard motor sizes a flyer steps down to, and how far.

A narrower motor flies in a larger mount inside an adapter (a tube with centring
rings and a thrust ring). Flyers step down one or two standard sizes (a 24 mm
motor in a 29 mm mount, an 18 mm one through a 24 mm adapter); a 10.5 mm motor
in a 98 mm mount is not a choice anyone makes. The standard sizes are the motor
diameters the trade sells motors, cases and adapters in.

stdlib only.
"""

from __future__ import annotations

from typing import Final

__all__ = ["STANDARD_MOTOR_DIAMETERS_M", "adapter_steps", "adapter_text"]

# Common practice, no single published source: the motor diameters makers sell motors, reloadable cases and
# mount adapters in (10.5 and 13 mm micro motors up to 152 mm). A mount or motor between two sizes counts
# the standard sizes strictly between them (see adapter_steps).
STANDARD_MOTOR_DIAMETERS_M: Final = (0.0105, 0.013, 0.018, 0.024, 0.029, 0.038, 0.054, 0.075, 0.098, 0.152)


def adapter_steps(motor_diameter_m: float, mount_diameter_m: float, tolerance_m: float = 0.0005) -> int:
    """Standard sizes a motor steps down from the mount: 0 when it fits as is, 1 for one adapter size, ...

    Parameters
    ----------
    motor_diameter_m, mount_diameter_m : float
        Motor and mount diameters [m].
    tolerance_m : float
        Diameters within this are the same size [m].

    Returns
    -------
    int
        The number of standard sizes larger than the motor (by more than ``tolerance_m``) and no larger
        than the mount (within ``tolerance_m``); a motor wider than the mount also gives 0 (it is not an
        adapter question).

    Examples
    --------
    >>> adapter_steps(0.024, 0.029), adapter_steps(0.018, 0.029), adapter_steps(0.0105, 0.098)
    (1, 2, 8)
    >>> adapter_steps(0.029, 0.0292)
    0
    """
    if motor_diameter_m >= mount_diameter_m - tolerance_m:
        return 0
    steps = sum(motor_diameter_m + tolerance_m < size <= mount_diameter_m + tolerance_m
                for size in STANDARD_MOTOR_DIAMETERS_M)
    return max(steps, 1)  # a narrower motor in a mount between standard sizes still needs an adapter


def adapter_text(motor_diameter_m: float, mount_diameter_m: float) -> str:
    """The adapter a motor needs, as a flyer asks for it: ``"24 to 29 mm"``.

    >>> adapter_text(0.024, 0.029)
    '24 to 29 mm'
    >>> adapter_text(0.0105, 0.013)
    '10.5 to 13 mm'
    """
    return f"{motor_diameter_m * 1e3:.3g} to {mount_diameter_m * 1e3:.3g} mm"
