"""Shared fixtures: paths to the bundled sample curves and test fixtures, simple records, strategies."""

from __future__ import annotations

import datetime as dt
import os
from pathlib import Path

import numpy as np
import pytest
from hypothesis import strategies as st

from motorlib import FiringSpread, MotorRecord, Provenance
from motorlib.motor.record import PROVENANCE_KINDS

ROOT = Path(__file__).resolve().parent.parent
SAMPLE_DIR = ROOT / "sample_curves"
FIXTURE_DIR = Path(__file__).resolve().parent / "fixtures"


@pytest.fixture(scope="session")
def _chart_cache_dir(tmp_path_factory: pytest.TempPathFactory) -> Path:
    """One private matplotlib cache for the session (its font cache takes seconds to build)."""
    return tmp_path_factory.mktemp("mplconfig")


@pytest.fixture(autouse=True)
def _hermetic_user_folders(tmp_path_factory: pytest.TempPathFactory, monkeypatch: pytest.MonkeyPatch,
                           _chart_cache_dir: Path) -> None:
    """Every test gets its own empty data, config and home folders and no motorlib settings from the caller.

    A catalog or settings file in the real user folders must neither change a test's result nor be written to.
    """
    home = tmp_path_factory.mktemp("home")
    for name in ("HOME", "XDG_DATA_HOME", "XDG_CONFIG_HOME", "XDG_CACHE_HOME", "LOCALAPPDATA", "APPDATA"):
        monkeypatch.setenv(name, str(home / name.lower()))
    for name in [n for n in os.environ if n.startswith("MOTORLIB_")] + ["COLUMNS", "LINES", "NO_COLOR", "FORCE_COLOR"]:
        monkeypatch.delenv(name, raising=False)
    monkeypatch.setenv("MPLCONFIGDIR", str(_chart_cache_dir))


@pytest.fixture
def sample_curve_paths() -> list[Path]:
    return sorted(SAMPLE_DIR.glob("*.xml"))


@pytest.fixture
def fixture_dir() -> Path:
    return FIXTURE_DIR


@pytest.fixture
def triangle() -> MotorRecord:
    """The triangle of tests/reference/check_values.md#curve-oracles: (0 s, 0 N), (0.1 s, 10 N), (1.0 s, 0 N)."""
    return MotorRecord("B5", [0.0, 0.1, 1.0], [0.0, 10.0, 0.0])


@pytest.fixture
def demo_record() -> MotorRecord:
    return MotorRecord(
        designation="D12-3,5",
        maker="Fixture Works (fictional)",
        time_s=[0.0, 0.05, 0.1, 0.15, 0.25, 0.5, 0.8, 1.1, 1.3, 1.4, 1.45],
        thrust_n=[0.0, 14.0, 28.0, 24.0, 13.0, 11.0, 10.6, 10.2, 9.0, 4.0, 0.0],
        diameter_m=0.024, length_m=0.070, total_mass_kg=0.044, propellant_mass_kg=0.021,
        delays_s=(3.0, 5.0), provenance=Provenance("demo", dt.date(2026, 12, 1), "fixture"),
    )


_finite = dict(allow_nan=False, allow_infinity=False)


@st.composite
def curves(draw: st.DrawFn, min_samples: int = 2, max_samples: int = 40) -> MotorRecord:
    """Random valid curves: increasing times from 0 s, non-negative thrust with a positive sample."""
    n = draw(st.integers(min_samples, max_samples))
    steps = draw(st.lists(st.floats(1e-4, 1.0, **_finite), min_size=n - 1, max_size=n - 1))
    start = draw(st.floats(0.0, 0.5, **_finite))
    time_s = start + np.concatenate(([0.0], np.cumsum(steps)))
    thrust = draw(st.lists(st.floats(0.0, 5000.0, **_finite), min_size=n, max_size=n))
    thrust[draw(st.integers(0, n - 1))] = draw(st.floats(0.01, 5000.0, **_finite))
    if np.any(np.diff(time_s) <= 0):  # cumsum of tiny steps at large offsets can round equal
        time_s = np.arange(n, dtype=float) * 1e-3 + start
    return MotorRecord("test curve", time_s, thrust)


_xml_text = st.text(
    alphabet=st.characters(blacklist_categories=("Cs", "Cc"), blacklist_characters="\ufffe\uffff"),
    min_size=1, max_size=40,
).filter(lambda s: s.strip() == s and s != "")


@st.composite
def full_records(draw: st.DrawFn) -> MotorRecord:
    """Random valid records with every field drawn, for format round trips."""
    base = draw(curves())
    positive = st.floats(1e-6, 1e4, **_finite)
    total = draw(st.one_of(st.none(), positive))
    propellant = None
    if draw(st.booleans()):
        propellant = draw(st.floats(1e-7, total, **_finite)) if total is not None else draw(positive)
    delays = draw(st.lists(st.floats(0.01, 30.0, **_finite), max_size=4, unique_by=lambda d: f"{d:.10g}"))  # distinct as a file keeps them
    adjustable = draw(st.booleans())
    no_charge = not delays and not adjustable and draw(st.booleans())
    return MotorRecord(
        designation=draw(_xml_text),
        maker=draw(st.one_of(st.just(""), _xml_text)),
        time_s=base.time_s, thrust_n=base.thrust_n,
        diameter_m=draw(st.one_of(st.none(), positive)),
        length_m=draw(st.one_of(st.none(), positive)),
        total_mass_kg=total, propellant_mass_kg=propellant,
        delays_s=tuple(delays), delay_adjustable=adjustable, no_ejection_charge=no_charge,
        firing_spread=draw(st.one_of(st.none(), firing_spreads())),
        provenance=Provenance(
            draw(st.sampled_from(PROVENANCE_KINDS)),
            draw(st.one_of(st.none(), st.dates(dt.date(1950, 1, 1), dt.date(2100, 1, 1)))),
            draw(st.one_of(st.just(""), _xml_text)),
        ),
    )


@st.composite
def firing_spreads(draw: st.DrawFn) -> FiringSpread:
    """Random valid spreads of several firings."""
    positive = st.floats(1e-6, 1e5, **_finite)
    spread = st.floats(0.0, 1e4, **_finite)
    return FiringSpread(n_firings=draw(st.integers(2, 1000)), total_impulse_mean_ns=draw(positive),
                        total_impulse_std_ns=draw(spread), burn_time_mean_s=draw(positive),
                        burn_time_std_s=draw(spread))
