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


def test_pack_offers_each_motor_the_delays_offered_delays_s_gives_it() -> None:
    # issue 16: offers are worked out once per distinct delay set; every motor must still get exactly its own
    # (ints and floats alike, and a zero's sign kept even where 0.0 and -0.0 compare equal)
    from motorlib.flight.delays import offered_delays_s

    listed = [(5.0,), (5,), (4.0, 6.0), (5.0,), (), (0.0, 3.0), (-0.0, 3.0), (8.0,), (4, 6)]
    adjustable = [True, True, False, False, True, False, False, True, False]
    samples = [(np.array([0.0, 1.0]), np.array([10.0, 0.0]))] * len(listed)
    pack = MotorPack.from_samples(samples, total_mass_kg=[1.0] * len(listed), propellant_mass_kg=[0.5] * len(listed),
                                  delays_s=listed, delay_adjustable=adjustable, drill_step_s=1.5)
    for row, delays, adj in zip(pack.delays_s, listed, adjustable):
        expected = offered_delays_s(delays, adj, 1.5)
        got = row[~np.isnan(row)].tolist()
        assert got == expected and [np.copysign(1.0, d) for d in got] == [np.copysign(1.0, d) for d in expected]
