"""Monte Carlo band machinery against closed-form statistics.

Distribution used: each value uniform between its tolerance limits, the
rectangular distribution of JCGM 100:2008 (GUM) 4.3.7, standard deviation
half-width / sqrt(3).
"""

import math

import numpy as np
import pytest

from incircuit.bands import (band_from_readings, healthy_band, monte_carlo, piece_parts,
                             sample_factors, varied_parts)
from incircuit.model import Board, Part, Reading, Tolerance


def _parallel(values):
    r1, r2 = values[:, 0], values[:, 1]
    return r1 * r2 / (r1 + r2)


def test_parallel_resistors_spread_matches_first_order_propagation():
    # Parallel combination, Horowitz & Hill 3rd ed. 1.2.1; propagation of
    # uncertainty sigma_f^2 = sum (df/dx_i)^2 sigma_i^2, GUM 5.1.2 eq. (10).
    r1, r2, tol = 10e3, 4.7e3, 0.05
    tols = [Tolerance.symmetric(tol)] * 2
    out = monte_carlo(_parallel, [r1, r2], tols, samples=20_000, seed=3)
    s1, s2 = tol * r1 / math.sqrt(3), tol * r2 / math.sqrt(3)
    d1, d2 = r2**2 / (r1 + r2) ** 2, r1**2 / (r1 + r2) ** 2
    sigma = math.hypot(d1 * s1, d2 * s2)
    # The standard error of a sample standard deviation of N = 20000 draws of
    # a near-uniform sum is about sqrt((kurtosis - 1) / 4N) < 0.4 %; the
    # neglected second-order terms are of order tol^2 = 0.25 %. rtol 2 %
    # is about four standard errors plus that bias.
    assert out.std(ddof=1) == pytest.approx(sigma, rel=0.02)
    assert out.mean() == pytest.approx(r1 * r2 / (r1 + r2), rel=1e-3)  # bias O(tol^2)


def test_divider_ratio_spread_matches_first_order_propagation():
    # Voltage divider k = R2 / (R1 + R2), Horowitz & Hill 3rd ed. 1.2.3;
    # propagation as above (GUM 5.1.2) with 1 % and 5 % parts.
    r1, r2 = 10e3, 10e3
    tols = [Tolerance.symmetric(0.01), Tolerance.symmetric(0.05)]
    out = monte_carlo(lambda v: v[:, 1] / (v[:, 0] + v[:, 1]), [r1, r2], tols, 20_000, seed=5)
    dk1, dk2 = -r2 / (r1 + r2) ** 2, r1 / (r1 + r2) ** 2
    sigma = math.hypot(dk1 * 0.01 * r1 / math.sqrt(3), dk2 * 0.05 * r2 / math.sqrt(3))
    assert out.std(ddof=1) == pytest.approx(sigma, rel=0.02)  # same reasoning as above


def _reader_of(name):
    def read(board):
        return Reading("resistor", board.part(name).value)
    return read


def test_band_percentiles_of_one_part_match_the_uniform_quantiles():
    # The q-quantile of a uniform on [a, b] is a + q (b - a) (any statistics
    # text, e.g. NIST/SEMATECH e-Handbook 1.3.6.6.2). The standard error of
    # a sample quantile is sqrt(q (1 - q) / N) (b - a) / density terms, here
    # 0.0032 (b - a) for q = 0.005 and N = 500; atol is five of those.
    r, tol = 1e3, 0.1
    board = Board("t", (Part("R1", "R", ("A", "B"), r, tolerance=Tolerance.symmetric(tol)),))
    band = healthy_band(board, ("A", "B"), samples=500, seed=7, reader=_reader_of("R1"))
    width = 2 * tol * r
    se = math.sqrt(0.005 * 0.995 / 500) * width
    assert band.low == pytest.approx(r * (1 - tol) + 0.005 * width, abs=5 * se)
    assert band.high == pytest.approx(r * (1 - tol) + 0.995 * width, abs=5 * se)
    assert band.kind == "resistor" and band.kind_fraction == 1.0
    assert band.samples == 500 and band.varied == ("R1",)


def test_instrument_error_is_uniform_within_the_accuracy():
    # A constant true value plus a uniform error on [-a, a]: sigma = a / sqrt(3)
    # (GUM 4.3.7); in log terms a / (v sqrt(3)) to first order (a/v = 1 %).
    readings = [Reading("capacitor", 1e-6)] * 4000
    band = band_from_readings(readings, ("A", "B"), accuracy=lambda r: 0.01 * r.value, seed=2)
    stats = band.kinds["capacitor"]
    # standard error of sigma for N = 4000 uniform draws ~ 0.7 %: rtol 4 %
    assert stats.log_sigma == pytest.approx(0.01 / math.sqrt(3), rel=0.04)
    assert stats.log_sigma_circuit == 0.0
    assert band.low >= 0.99e-6 and band.high <= 1.01e-6


def test_same_seed_same_band_other_seed_other_band():
    board = Board("t", (Part("R1", "R", ("A", "B"), 1e3, tolerance=Tolerance.symmetric(0.05)),))
    a = healthy_band(board, ("A", "B"), samples=50, seed=11, reader=_reader_of("R1"))
    b = healthy_band(board, ("A", "B"), samples=50, seed=11, reader=_reader_of("R1"))
    c = healthy_band(board, ("A", "B"), samples=50, seed=12, reader=_reader_of("R1"))
    assert a == b
    assert (a.low, a.high) != (c.low, c.high)


def test_kind_fraction_counts_the_majority_kind():
    readings = [Reading("capacitor", 1e-6)] * 90 + [Reading("resistor", 5e3)] * 9 + [Reading("nothing")]
    band = band_from_readings(readings, ("A", "B"))
    assert band.kind == "capacitor" and band.kind_fraction == pytest.approx(0.9, abs=1e-12)
    assert band.fraction("resistor") == pytest.approx(0.09, abs=1e-12)
    assert band.fraction("nothing") == pytest.approx(0.01, abs=1e-12)
    assert band.fraction("diode") == 0.0


def test_only_parts_that_can_carry_probe_current_are_varied():
    # Parts on a loop through the probes: the biconnected block that holds
    # them (Hopcroft & Tarjan 1973); checked by hand on this small board.
    t = Tolerance.symmetric(0.05)
    board = Board("t", (
        Part("R1", "R", ("A", "B"), 1e3, tolerance=t),
        Part("C1", "C", ("B", "C"), 1e-6, tolerance=t),
        Part("L2", "L", ("C", "A"), 1e-3, tolerance=t),      # closes the loop A-B-C
        Part("R9", "R", ("X", "Y"), 1e3, tolerance=t),       # elsewhere on the board
        Part("R5", "R", ("C", "D"), 1e3, tolerance=t),       # hangs off net C only
        Part("R2", "R", ("A", "B"), 1e3),                     # no tolerance known
        Part("L1", "L", ("P", "Q"), 1e-3, tolerance=t),
        Part("R6", "R", ("P", "Q"), 1e3, tolerance=t),        # loads the other winding
        Part("K1", "K", (), 0.99, params={"inductors": ("L1", "L2")}),  # couples P-Q in
    ))
    assert [p.name for p in varied_parts(board, ("A", "B"))] == ["R1", "C1", "L2", "L1", "R6"]
    assert "R5" not in [p.name for p in piece_parts(board, ("A", "B"))]


def test_factors_stay_within_asymmetric_limits():
    rng = np.random.default_rng(0)
    f = sample_factors([Tolerance(0.2, 0.8), None], 10_000, rng)
    assert f.shape == (10_000, 2)
    assert f[:, 0].min() >= 0.8 and f[:, 0].max() <= 1.8
    assert np.all(f[:, 1] == 1.0)
    # mean of a uniform on [0.8, 1.8] is 1.3; SE = 1/sqrt(12 * 10000) ~ 0.003
    assert f[:, 0].mean() == pytest.approx(1.3, abs=0.012)


@pytest.fixture(scope="module")
def parallel_pair_bands():
    """Bands of the tester's reading of 10k || 4.7k (both 5 %), by full Monte
    Carlo and by the checked linear model (asked for: "auto" would choose it
    only with a junction on the probed piece)."""
    t = Tolerance.symmetric(0.05)
    board = Board("pair", (
        Part("R1", "R", ("A", "B"), 10e3, tolerance=t),
        Part("R2", "R", ("A", "B"), 4.7e3, tolerance=t),
    ))
    full = healthy_band(board, ("A", "B"), samples=500, seed=4)
    linear = healthy_band(board, ("A", "B"), samples=500, seed=4, method="linear")
    return full, linear


def test_tester_band_matches_first_order_propagation(parallel_pair_bands):
    # ln f = ln(R1 R2 / (R1 + R2)); d ln f / d ln R1 = R2 / (R1 + R2) and
    # vice versa (Horowitz & Hill 3rd ed. 1.2.1); sigma of ln R_i is
    # tol / sqrt(3) for a uniform tolerance (GUM 4.3.7), combined by GUM
    # 5.1.2. The standard error of a standard deviation from N = 500 samples
    # of this near-uniform sum is at most about 3 %; rtol 10 % is three of
    # those plus the tester's own quantisation (0.3 % at 3.2 kohm).
    r1, r2 = 10e3, 4.7e3
    s = 0.05 / math.sqrt(3)
    sigma = s * math.hypot(r2 / (r1 + r2), r1 / (r1 + r2))
    full, linear = parallel_pair_bands
    assert full.method == "full" and linear.method == "linear"
    for band in (full, linear):
        assert band.kinds["resistor"].log_sigma_circuit == pytest.approx(sigma, rel=0.10)
        assert band.median == pytest.approx(r1 * r2 / (r1 + r2), rel=0.01)  # tester within 1 %


def test_linear_model_band_agrees_with_full_runs(parallel_pair_bands):
    # Same seed, same sampled boards: the model's percentiles follow the full
    # runs to within its checked error (at most CHECK_FLOOR = 0.5 % here).
    full, linear = parallel_pair_bands
    assert linear.check_error <= 0.005
    assert linear.low == pytest.approx(full.low, rel=0.01)    # 0.5 % model + quantisation
    assert linear.high == pytest.approx(full.high, rel=0.01)
    assert linear.runs < 40 < full.runs
    assert set(linear.slopes) == {"R1", "R2"}
    # the slopes are d ln f / d ln R_i of the parallel pair (H&H 1.2.1)
    assert linear.slopes["R1"] == pytest.approx(4.7 / 14.7, abs=0.02)  # secant over 5 %
