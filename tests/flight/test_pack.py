"""The motor pack: curves of different lengths padded into one array, with masses and offered delays."""

from __future__ import annotations

import numpy as np

from motorlib.flight import MotorPack


def test_pack_pads_each_curve_with_its_last_time_and_zero_thrust() -> None:
    # Worked by hand: three curves of 3, 2 and 4 samples; the pack is 4 wide.
    samples = [(np.array([0.0, 0.1, 0.5]), np.array([0.0, 10.0, 0.0])),
               (np.array([0.0, 2.0]), np.array([5.0, 0.0])),
               (np.array([0.0, 0.2, 0.4, 0.8]), np.array([0.0, 20.0, 20.0, 0.0]))]
    pack = MotorPack.from_samples(samples, total_mass_kg=[0.1, None, 0.3], propellant_mass_kg=[0.05, 0.02, 0.1],
                                  delays_s=[[5.0, 3.0], [], [4.0]], delay_adjustable=[False, False, True])
    np.testing.assert_array_equal(pack.time_s, [[0.0, 0.1, 0.5, 0.5], [0.0, 2.0, 2.0, 2.0], [0.0, 0.2, 0.4, 0.8]])
    np.testing.assert_array_equal(pack.thrust_n, [[0.0, 10.0, 0.0, 0.0], [5.0, 0.0, 0.0, 0.0], [0.0, 20.0, 20.0, 0.0]])
    np.testing.assert_array_equal(pack.n_samples, [3, 2, 4])
    # offered delays, sorted; the adjustable 4 s motor also offers 1, 2 and 3 s drilled (1 s steps)
    np.testing.assert_array_equal(pack.delays_s, [[3.0, 5.0, np.nan, np.nan], [np.nan] * 4, [1.0, 2.0, 3.0, 4.0]])
    np.testing.assert_array_equal(pack.has_mass, [True, False, True])
    # trapezoid impulse: 0.5·10·0.5 = 2.5; 0.5·5·2 = 5; 0.5·20·0.2 + 20·0.2 + 0.5·20·0.4 = 10
    np.testing.assert_allclose(pack.total_impulse_ns, [2.5, 5.0, 10.0])
    np.testing.assert_array_equal(pack.burnout_s, [0.5, 2.0, 0.8])
