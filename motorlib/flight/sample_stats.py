"""Statistics of sampled flights: percentiles, probabilities with standard errors, confidence ellipses.

Model: an event's probability is its share p of n valid samples, with the binomial standard error
√(p(1 − p)/n); a 2-D confidence ellipse comes from the sample mean and covariance and the
chi-square quantile with 2 degrees of freedom, which is exactly −2 ln(1 − level). The rules each sample
breaks are the rule book's codes (:data:`~motorlib.flight.rulebook.FLIGHT_CODES`), kept by
:func:`motorlib.flight.dispersion.fly_samples` as one boolean column per code and read here.

numpy only.
"""

from __future__ import annotations

import math
from typing import Final, Sequence

import numpy as np

from .rulebook import FLIGHT_CODES
from .rules import NOTE_CODES

__all__ = ["CHI2_2DOF_95", "ellipse", "failure_shares", "inside_ellipse", "rule_masks", "sample_codes"]

CHI2_2DOF_95: Final = -2.0 * math.log(0.05)  # 5.991...: chi-square quantile, 2 dof, exact (-2 ln(1 - p))


def _num(value: float) -> float | None:
    return float(value) if np.isfinite(value) else None


def _percentiles(values: np.ndarray, qs: Sequence[int] = (5, 50, 95)) -> dict[str, float | None]:
    finite = values[np.isfinite(values)]
    if finite.size == 0:
        return {f"p{q}": None for q in qs}
    return {f"p{q}": float(v) for q, v in zip(qs, np.percentile(finite, qs))}


def _probability(event: np.ndarray, valid: np.ndarray) -> dict[str, float | None]:
    n = int(valid.sum())
    if n == 0:
        return {"p": None, "standard_error": None}
    p = float(np.sum(event & valid)) / n
    return {"p": p, "standard_error": math.sqrt(p * (1.0 - p) / n)}


def rule_masks(flights: dict[str, np.ndarray]) -> dict[str, np.ndarray]:
    """The flights that break each rule: code -> bool array of shape (n,), every code of ``FLIGHT_CODES``.

    ``flights`` holds ``broken``, shape (n, len(FLIGHT_CODES)), as :func:`~motorlib.flight.dispersion.fly_samples`
    returns it.
    """
    broken = flights["broken"]
    return {code: broken[:, k] for k, code in enumerate(FLIGHT_CODES)}


def sample_codes(flights: dict[str, np.ndarray], i: int) -> list[str]:
    """The codes sampled flight ``i`` gets, in the rule book's order: those ``fly`` would warn of for that flight."""
    return [code for k, code in enumerate(FLIGHT_CODES) if flights["broken"][i, k]]


def failure_shares(masks: dict[str, np.ndarray]) -> dict[str, float]:
    """The share of flights that fail each rule: code -> fraction in [0, 1] (notes on the model left out).

    >>> failure_shares({"rail-exit-slow": np.array([True, False]), "constant-cd-past-mach": np.array([True, True])})
    {'rail-exit-slow': 0.5}
    """
    return {code: float(np.mean(mask)) for code, mask in masks.items() if code not in NOTE_CODES}


def ellipse(east_m: np.ndarray, north_m: np.ndarray, level: float = CHI2_2DOF_95) -> dict[str, float] | None:
    """Confidence ellipse of points from their sample mean and covariance.

    Parameters
    ----------
    east_m, north_m : array, shape (n,)
        Points [m]; non-finite pairs are ignored (at least 3 needed).
    level : float
        Chi-square quantile with 2 degrees of freedom; 5.991 (= -2 ln 0.05) for 95 %.

    Returns
    -------
    dict or None
        ``east_m``, ``north_m`` (centre), ``semi_major_m``, ``semi_minor_m`` and
        ``orientation_deg``: azimuth of the major axis, clockwise from north, in [0, 180).

    Notes
    -----
    The ellipse is {x : (x - μ)ᵀ Σ⁻¹ (x - μ) ≤ level}; its semi-axes are √(level·λ) for the
    eigenvalues λ of Σ. For normal points it holds the fraction 1 - exp(-level/2).

    >>> e = ellipse(np.array([-1.0, 1.0, 0.0, 0.0]), np.array([0.0, 0.0, -2.0, 2.0]))
    >>> round(e["orientation_deg"], 6), e["semi_major_m"] > e["semi_minor_m"]
    (0.0, True)
    """
    ok = np.isfinite(east_m) & np.isfinite(north_m)
    if ok.sum() < 3:
        return None
    e, nn = east_m[ok], north_m[ok]
    cov = np.cov(np.vstack((e, nn)))
    values, vectors = np.linalg.eigh(cov)
    values = np.maximum(values, 0.0)
    major = vectors[:, 1]  # eigh sorts ascending: the last is the major axis
    azimuth = math.degrees(math.atan2(major[0], major[1])) % 180.0  # clockwise from north: atan2(east, north)
    return {"east_m": float(e.mean()), "north_m": float(nn.mean()), "semi_major_m": math.sqrt(level * values[1]),
            "semi_minor_m": math.sqrt(level * values[0]), "orientation_deg": 0.0 if math.isclose(azimuth, 180.0) else azimuth}


def inside_ellipse(east_m: np.ndarray, north_m: np.ndarray, e: dict[str, float]) -> np.ndarray:
    """Whether each point lies inside the ellipse ``e`` (from :func:`ellipse`)."""
    angle = math.radians(e["orientation_deg"])
    de, dn = np.asarray(east_m) - e["east_m"], np.asarray(north_m) - e["north_m"]
    along = de * math.sin(angle) + dn * math.cos(angle)
    across = de * math.cos(angle) - dn * math.sin(angle)
    minor = max(e["semi_minor_m"], 1e-300)
    return (along / e["semi_major_m"]) ** 2 + (across / minor) ** 2 <= 1.0
