"""Tests of the band-limited pulse measures (hcfplan.pulse.bandlimited and their use in metrics).

Kinds of check: analytic (exact shapes, derived bounds), invariant (sampling, Parseval) and
property tests with hypothesis on coarse grids (2-4 points per FWHM).
"""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from hcfplan.numerics.grid import Grid
from hcfplan.pulse import bandlimited, metrics

LN2 = np.log(2.0)
SECH_T0_PER_FWHM = 1.0 / (2.0 * np.log(1.0 + np.sqrt(2.0)))  # intensity sech^2: FWHM = 1.7627 T0


def _grid(points: int = 512, dt: float = 1e-15) -> Grid:
    return Grid(points, dt, 2 * np.pi / dt)  # window from 0.5 to 1.5 times omega0


def _gaussian_field(t: np.ndarray, fwhm: float, centre: float) -> np.ndarray:
    return np.exp(-2.0 * LN2 * (t - centre) ** 2 / fwhm**2).astype(complex)


def _sech_field(t: np.ndarray, fwhm: float, centre: float) -> np.ndarray:
    return (1.0 / np.cosh((t - centre) / (SECH_T0_PER_FWHM * fwhm))).astype(complex)


# --- the interpolation itself -------------------------------------------------------------


@pytest.mark.parametrize("factor", [1, 3, 16])
def test_upsample_keeps_the_samples_and_the_energy(factor: int) -> None:
    # invariant: every factor-th fine sample is an input sample; Parseval gives the energy
    rng = np.random.default_rng(3)
    field = rng.normal(size=64) + 1j * rng.normal(size=64)
    fine = bandlimited.upsample(field, factor)
    np.testing.assert_allclose(fine[::factor], field, atol=1e-12)
    assert np.sum(np.abs(fine) ** 2) == pytest.approx(factor * np.sum(np.abs(field) ** 2), 1e-12)


@pytest.mark.parametrize("points", [64, 2048, 65])
@pytest.mark.parametrize("factor", [2, 16])
def test_upsample_equals_the_zero_padded_fft(points: int, factor: int) -> None:
    # the construction of the module docstring written out: the spectrum zero-padded between
    # its positive (bins 0..N/2-1) and negative halves, one FFT of factor * N points; upsample
    # splits that FFT into factor FFTs of N points (Cooley & Tukey, Math. Comp. 19, 297, 1965)
    rng = np.random.default_rng(7)
    field = rng.normal(size=points) + 1j * rng.normal(size=points)
    coefficients = np.fft.ifft(field)
    padded = np.zeros(factor * points, complex)
    half = points // 2
    padded[:half] = coefficients[:half]
    padded[factor * points - (points - half):] = coefficients[half:]
    np.testing.assert_allclose(bandlimited.upsample(field, factor), np.fft.fft(padded),
                               rtol=0.0, atol=1e-13 * np.max(np.abs(field)))


def test_upsample_is_exact_for_an_in_band_signal() -> None:
    # analytic: a sum of complex exponentials at grid frequencies inside the window is its own
    # band-limited interpolant, so the fine samples equal the formula between the samples
    n, factor = 32, 8
    k = np.array([-15, -4, 0, 3, 11])
    amplitude = np.array([0.3, 1.0 - 0.5j, 0.7, 0.2j, 0.4])
    def signal(x):
        return np.exp(-2j * np.pi * np.outer(x, k) / n) @ amplitude
    fine = bandlimited.upsample(signal(np.arange(n)), factor)
    np.testing.assert_allclose(fine, signal(np.arange(n * factor) / factor), atol=1e-12)


def test_peak_location_matches_a_dense_interpolation() -> None:
    # invariant: the refined peak equals the maximum of a 256-fold upsampling
    rng = np.random.default_rng(5)
    t = np.arange(256) - 128.0
    for _ in range(20):
        width, centre = rng.uniform(2, 5), rng.uniform(-1, 1)
        chirp = np.exp(1j * rng.normal() * 0.1 * t**2 / width**2)
        field = _gaussian_field(t, width, centre) * chirp
        dense = np.max(np.abs(bandlimited.upsample(field, 256)) ** 2)
        assert bandlimited.peak_power(field) == pytest.approx(dense, rel=1e-5)


@pytest.mark.parametrize("value", [np.nan, np.inf, -np.inf, complex(np.nan, 0.0),
                                   complex(0.0, np.inf)])
def test_peak_location_of_a_nonfinite_field_is_nan(value) -> None:
    # contract (none of the candidates is searched): one non-finite sample, anywhere, gives
    # (nan, nan), as does a field too short to bracket a peak; an all-zero field gives 0
    for where in (0, 17, 63):
        field = np.exp(-((np.arange(64.0) - 30.2) ** 2) / 20.0).astype(complex)
        field[where] = value
        peak, position = bandlimited.peak_location(field)
        assert np.isnan(peak) and np.isnan(position)
    assert np.isnan(bandlimited.peak_location(np.ones(2, complex))[0])
    assert bandlimited.peak_location(np.zeros(64, complex))[0] == 0.0



@pytest.mark.parametrize(("samples_per_fwhm", "factor"), [(2, 16), (3, 11), (20, 2), (40, 1),
                                                          (np.nan, 16)])
def test_oversampling_factor(samples_per_fwhm: float, factor: int) -> None:
    # invariant: about 32 fine samples per FWHM, between 1 and 16 per grid step
    assert bandlimited.oversampling_factor(samples_per_fwhm) == factor


# --- analytic pulses on coarse grids ----------------------------------------------------


@pytest.mark.parametrize("offset", [0.0, 0.25, 0.37, 0.5])
@pytest.mark.parametrize("samples_per_fwhm", [2, 3, 5])
def test_gaussian_fwhm_and_peak_at_few_points_per_fwhm(samples_per_fwhm, offset) -> None:
    # analytic: a Gaussian of FWHM tau and peak 1 W. Its spectral amplitude at the window edge
    # is exp(-pi^2 (tau/dt)^2 / (8 ln 2)) of its peak, 8e-4 at 2 points per FWHM (derived
    # here), so aliasing stays within the 1e-3 tolerance
    grid = _grid()
    tau = samples_per_fwhm * grid.dt
    field = _gaussian_field(grid.time, tau, offset * grid.dt)
    assert metrics.envelope_fwhm(grid, field) == pytest.approx(tau, rel=1e-3)
    assert metrics.peak_power(field) == pytest.approx(1.0, rel=1e-3)
    m = metrics.pulse_metrics(grid, field)
    assert m.fwhm == pytest.approx(tau, rel=1e-3)
    assert m.outermost_fwhm == pytest.approx(tau, rel=1e-3)
    assert m.peak_power == pytest.approx(1.0, rel=1e-3)


@pytest.mark.parametrize("offset", [0.0, 0.25, 0.5])
@pytest.mark.parametrize("samples_per_fwhm", [4, 5])
def test_sech2_fwhm_and_peak(samples_per_fwhm: int, offset: float) -> None:
    # analytic: sech^2 pulse of FWHM tau and peak 1 W
    grid = _grid()
    tau = samples_per_fwhm * grid.dt
    field = _sech_field(grid.time, tau, offset * grid.dt)
    assert metrics.envelope_fwhm(grid, field) == pytest.approx(tau, rel=1e-3)
    assert metrics.peak_power(field) == pytest.approx(1.0, rel=1e-3)


@pytest.mark.parametrize("samples_per_fwhm", [2, 3])
def test_sech2_below_four_points_is_limited_by_aliasing(samples_per_fwhm: int) -> None:
    # analytic bound, derived here: the spectrum of sech(t/T0) is pi T0 sech(pi^2 T0 nu), whose
    # exponential tails do not fit in the window at 2-3 points per FWHM. The part beyond the
    # Nyquist frequency, relative to the whole, is at most r = 4 exp(-b/2)/pi with
    # b = pi^2 T0 / dt; it is missing once and folded in once, so the peak amplitude errs by
    # at most 2r and the peak power by at most about 4r (1.2e-3 at 3 points, 2.5e-2 at 2)
    grid = _grid()
    tau = samples_per_fwhm * grid.dt
    b = np.pi**2 * SECH_T0_PER_FWHM * samples_per_fwhm
    bound = 4.0 * (4.0 * np.exp(-b / 2.0) / np.pi)
    for offset in (0.0, 0.25, 0.5):
        field = _sech_field(grid.time, tau, offset * grid.dt)
        assert abs(metrics.peak_power(field) - 1.0) <= 1.05 * bound


@pytest.mark.parametrize("samples_per_fwhm", [2, 3])
def test_peak_between_samples(samples_per_fwhm: int) -> None:
    # analytic: a Gaussian centred half-way between two samples; the highest sample is
    # exp(-ln2 / spf^2) (16 % low at 2 points per FWHM), the band-limited peak is the true one
    grid = _grid()
    field = _gaussian_field(grid.time, samples_per_fwhm * grid.dt, 0.5 * grid.dt)
    sampled = float(np.max(np.abs(field) ** 2))
    assert sampled == pytest.approx(np.exp(-LN2 / samples_per_fwhm**2), rel=1e-12)
    assert metrics.peak_power(field) == pytest.approx(1.0, rel=1e-3)
    assert bandlimited.peak_location(field)[1] == pytest.approx(grid.points // 2 + 0.5, abs=1e-3)


# --- no phase beats the transform limit -------------------------------------------------

POINTS = 256


def _band_spectrum(lobes, spf: float) -> np.ndarray:
    """Smooth amplitude of one to three Gaussian lobes; the transform limit spans ~spf samples."""
    j = np.fft.fftfreq(POINTS) * POINTS  # bin index, FFT order
    width = 0.44 * POINTS / spf
    amplitude = np.zeros(POINTS)
    for height, centre, spread in lobes:
        amplitude += height * np.exp(-0.5 * ((j - centre * width) / (spread * width)) ** 2)
    return amplitude


_lobes = st.lists(st.tuples(st.floats(0.3, 1.0), st.floats(-0.6, 0.6), st.floats(0.15, 0.5)),
                  min_size=1, max_size=3)
_coefficients = st.lists(st.floats(-4.0, 4.0), min_size=3, max_size=3)
_harmonics = st.lists(st.tuples(st.floats(-2.0, 2.0), st.floats(0.0, 6.3)), min_size=0,
                      max_size=3)


def _phase(spf: float, poly, harmonics) -> np.ndarray:
    u = np.fft.fftfreq(POINTS) * spf  # frequency in units of the spectral width
    phase = poly[0] * u**2 + poly[1] * u**3 + poly[2] * u**4
    for k, (a, shift) in enumerate(harmonics, start=1):
        phase = phase + a * np.cos(k * np.pi * u + shift)
    return phase


@settings(max_examples=150, deadline=None, derandomize=True,
          suppress_health_check=[HealthCheck.too_slow])
@given(lobes=_lobes, spf=st.floats(2.0, 4.0), poly=_coefficients, harmonics=_harmonics)
def test_no_phase_beats_the_transform_limit(lobes, spf, poly, harmonics) -> None:
    # analytic (peak): |A(t)| = |sum_j c_j exp(...)| <= sum_j |c_j| = the transform limit's peak
    # (triangle / Cauchy-Schwarz inequality), for the band-limited interpolant at every t.
    # analytic (rms): t_rms^2 = int |d|S|/dw|^2 + int |S|^2 (phi' - <phi'>)^2 (normalised),
    # smallest for a linear phase; L. Cohen, "Time-frequency distributions - a review,"
    # Proc. IEEE 77, 941 (1989), Sec. II [from memory]. The FWHM has no such bound (next test).
    grid = _grid(POINTS)
    amplitude = _band_spectrum(lobes, spf)
    shaped = grid.to_time(amplitude * np.exp(1j * _phase(spf, poly, harmonics)))
    limit = metrics.transform_limit(grid, amplitude.astype(complex))
    assert metrics.peak_power(shaped) <= metrics.peak_power(limit) * (1 + 1e-9)
    # the time axis is periodic: centre the pulse before taking moments
    centred = np.roll(shaped, grid.points // 2 - int(np.argmax(np.abs(shaped))))
    rms = metrics.rms_width(grid.time, np.abs(centred) ** 2)
    assert rms >= metrics.rms_width(grid.time, np.abs(limit) ** 2) * (1 - 1e-6)


def test_main_peak_can_be_narrower_than_the_transform_limit() -> None:
    # analytic: a phase of pi on the central part of a flat spectrum subtracts a broad pulse
    # from the narrow one, so the main peak reaches half maximum closer to its centre; the
    # energy goes into side lobes. The contiguous width then falls below the transform
    # limit's (the compressor then adds a caution), and the peak power drops.
    grid = _grid(512)
    j = np.fft.fftfreq(grid.points) * grid.points
    amplitude = 1.0 / (1.0 + np.exp((np.abs(j) - 40.0) / 1.5))  # flat top, smooth edges
    phase = np.pi / (1.0 + np.exp((np.abs(j) - 16.0) / 1.5))  # pi over |j| < 16
    limit = metrics.transform_limit(grid, amplitude.astype(complex))
    shaped = grid.to_time(amplitude * np.exp(1j * phase))
    main = metrics.envelope_fwhm(grid, shaped, extent="contiguous")
    limit_main = metrics.envelope_fwhm(grid, limit, extent="contiguous")
    assert main < 0.97 * limit_main
    assert metrics.pulse_metrics(grid, shaped).fwhm == pytest.approx(main, rel=1e-9)
    assert metrics.peak_power(shaped) < 0.6 * metrics.peak_power(limit)
