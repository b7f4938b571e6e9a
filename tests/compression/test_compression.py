"""Tests of the compressor elements (hcfplan.compression.elements), the bounce optimisation
(hcfplan.compression.compressor) and its evaluation machinery (hcfplan.compression.scoring)."""

from __future__ import annotations

import numpy as np
import pytest

from hcfplan.compression import elements as el
from hcfplan.compression.compressor import TrimSpec, optimize_bounces
from hcfplan.constants import c
from hcfplan.errors import ConfigError
from hcfplan.numerics.grid import Grid
from hcfplan.pulse import metrics
from hcfplan.pulse.metrics import pulse_metrics

LN2 = np.log(2.0)
TAU = 30e-15  # transform-limited FWHM of the test pulse [s]
MIRROR_GDD = -200e-30  # per bounce [s^2]


@pytest.fixture(scope="module")
def grid() -> Grid:
    return Grid(2**12, 2e-15, 2 * np.pi * c / 1030e-9)


def _tl_spectrum(grid: Grid, peak_power: float = 1e9) -> np.ndarray:
    """Spectrum of a transform-limited Gaussian of FWHM TAU, centred at t = 0."""
    field = np.sqrt(peak_power) * np.exp(-2 * LN2 * grid.time**2 / TAU**2)
    return grid.to_spectrum(field.astype(complex))


def _chirped(grid: Grid, gdd: float, tod: float = 0.0) -> np.ndarray:
    """TL Gaussian with a spectral phase gdd/2 dw^2 + tod/6 dw^3 (convention 4 of grid.py)."""
    return _tl_spectrum(grid) * np.exp(1j * el.mirror_phase(grid.omega, grid.omega0, gdd, tod))


def _no_phase(grid: Grid) -> np.ndarray:
    return np.zeros(grid.points)


def _mirror(grid: Grid) -> np.ndarray:
    return el.mirror_phase(grid.omega, grid.omega0, MIRROR_GDD)


# --- elements ------------------------------------------------------------------------------


def _constant_gdd_index(grid: Grid, beta2: float) -> np.ndarray:
    """n(omega) with k = k0 + k1 dw + beta2/2 dw^2 exactly (a constant-GDD test material)."""
    k0, k1 = 1.45 * grid.omega0 / c, 1.47 / c
    k = k0 + k1 * grid.domega + 0.5 * beta2 * grid.domega**2
    return c * k / grid.omega


def test_material_phase_constant_gdd_is_quadratic(grid: Grid) -> None:
    # analytic: value and slope at omega0 removed, only beta2 L dw^2 / 2 remains
    beta2, length = 36e-27, 3e-3
    phase = el.material_phase(grid.omega, grid.omega0, _constant_gdd_index(grid, beta2), length)
    expected = 0.5 * beta2 * length * grid.domega**2
    np.testing.assert_allclose(phase, expected, rtol=1e-9, atol=1e-9 * np.max(expected))


@pytest.mark.parametrize("gdd", [300e-30, 1000e-30, -700e-30])
def test_chirped_gaussian_broadening(grid: Grid, gdd: float) -> None:
    # analytic: T1 = T0 sqrt(1 + (GDD/T0^2)^2) for a Gaussian field exp(-t^2/(2 T0^2));
    # G. P. Agrawal, Nonlinear Fiber Optics, 6th ed., 2019, Sec. 3.2 (Eq. 3.2.11) [from memory:
    # equation number]; the FWHM scales the same way. 1e-3 covers the FWHM interpolation error.
    length = 5e-3
    index = _constant_gdd_index(grid, gdd / length)
    spectrum = _tl_spectrum(grid) * np.exp(
        1j * el.material_phase(grid.omega, grid.omega0, index, length)
    )
    t0 = TAU / (2 * np.sqrt(LN2))
    stretched = metrics.fwhm(grid.time, np.abs(grid.to_time(spectrum)) ** 2)
    assert stretched / TAU == pytest.approx(np.sqrt(1 + (gdd / t0**2) ** 2), rel=1e-3)


@pytest.mark.parametrize(("gdd", "tod"), [(-150e-30, 0.0), (40e-30, 300e-45), (0.0, -500e-45)])
def test_phase_derivatives_of_polynomial(grid: Grid, gdd: float, tod: float) -> None:
    # analytic: the local degree-4 fit is exact for a cubic phase
    phase = el.mirror_phase(grid.omega, grid.omega0, gdd, tod)
    phi0, delay, gdd_fit, tod_fit = el.phase_derivatives_at(grid.omega, grid.omega0, phase)
    assert abs(phi0) < 1e-12 and abs(delay) < 1e-24
    assert gdd_fit == pytest.approx(gdd, abs=1e-36)
    assert tod_fit == pytest.approx(tod, abs=1e-50)


def test_gdd_curve_constant_reproduces_mirror_phase(grid: Grid) -> None:
    # analytic: double trapezoidal integration is exact for a constant (and linear) integrand
    curve = np.full(grid.points, MIRROR_GDD)
    phase = el.phase_from_gdd_curve(grid.omega, grid.omega0, curve)
    expected = el.mirror_phase(grid.omega, grid.omega0, MIRROR_GDD)
    np.testing.assert_allclose(phase, expected, rtol=1e-10, atol=1e-10 * np.max(np.abs(expected)))


def test_gdd_curve_linear_within_trapezoid_error(grid: Grid) -> None:
    # analytic: GDD = g + TOD dw gives phase g dw^2/2 + TOD dw^3/6; the second integration of a
    # quadratic group delay by the trapezoid rule errs by TOD h^2 |dw| / 12 (h = sample step)
    tod = 400e-45
    curve = MIRROR_GDD + tod * grid.domega
    phase = el.phase_from_gdd_curve(grid.omega, grid.omega0, curve)
    expected = el.mirror_phase(grid.omega, grid.omega0, MIRROR_GDD, tod)
    step = 2 * np.pi / (grid.points * grid.dt)
    bound = tod * step**2 * np.abs(grid.domega) / 12
    assert np.all(np.abs(phase - expected) <= bound * (1 + 1e-6) + 1e-9)


def test_gdd_curve_rejects_nan(grid: Grid) -> None:
    curve = np.full(grid.points, MIRROR_GDD)
    curve[5] = np.nan
    with pytest.raises(ConfigError, match="gdd_values"):
        el.phase_from_gdd_curve(grid.omega, grid.omega0, curve)


def test_band_from_wavelengths() -> None:
    lo, hi = el.band_from_wavelengths(900e-9, 1200e-9)
    assert lo == pytest.approx(2 * np.pi * c / 1200e-9)
    assert hi == pytest.approx(2 * np.pi * c / 900e-9)
    with pytest.raises(ConfigError, match="1.2e-06, 9e-07"):
        el.band_from_wavelengths(1200e-9, 900e-9)


# --- energy and band -----------------------------------------------------------------------


def test_compression_is_phase_only(grid: Grid) -> None:
    # invariant: without a band the compressor conserves energy to 1e-12
    rng = np.random.default_rng(7)
    spectrum = _chirped(grid, 900e-30) * np.exp(1j * rng.normal(0, 0.3, grid.points))
    fixed = el.material_phase(grid.omega, grid.omega0, _constant_gdd_index(grid, 20e-27), 2e-3)
    result = optimize_bounces(grid, spectrum, fixed, _mirror(grid), max_bounces=8)
    energy_in = grid.energy_w(spectrum)
    assert grid.energy_t(result.field_t) == pytest.approx(energy_in, rel=1e-12)
    assert result.input_energy == pytest.approx(energy_in, rel=1e-15)
    assert result.band_loss == 0.0


def _wing_band(grid: Grid, spectrum: np.ndarray, share: float) -> tuple[float, float]:
    """Symmetric band around omega0 that leaves ``share`` of the energy outside (approx.)."""
    order = np.argsort(np.abs(grid.domega))
    cumulative = np.cumsum(np.abs(spectrum[order]) ** 2) / np.sum(np.abs(spectrum) ** 2)
    half = np.abs(grid.domega[order][np.searchsorted(cumulative, 1 - share)])
    return grid.omega0 - half, grid.omega0 + half


def test_band_clipping_removes_exactly_the_clipped_energy(grid: Grid) -> None:
    # invariant: energy after = energy before - spectral energy outside the band (1e-12)
    spectrum = _chirped(grid, 1200e-30)
    band = _wing_band(grid, spectrum, 0.017)
    outside = ~el.band_mask(grid.omega, band)
    clipped_energy = np.sum(np.abs(spectrum[outside]) ** 2) * grid.dnu
    result = optimize_bounces(
        grid, spectrum, _no_phase(grid), _mirror(grid), max_bounces=8, band=band
    )
    energy_in = grid.energy_w(spectrum)
    assert grid.energy_t(result.field_t) == pytest.approx(energy_in - clipped_energy, rel=1e-12)
    assert result.band_loss == pytest.approx(clipped_energy / energy_in, rel=1e-12)


def test_clipped_wings_lengthen_the_pulse(grid: Grid) -> None:
    # qualitative trend: removing spectral wings with ~1.7 % of the energy lengthens the
    # compressed pulse and lowers its peak power. R. Paschotta, "Importance of spectral wings on
    # the pulse duration", RP Photonics Spotlight, 2017-10-03 (reports 100 fs -> 129 fs for a
    # different spectral shape; only the direction is checked here)
    spectrum = _chirped(grid, 1200e-30)
    band = _wing_band(grid, spectrum, 0.017)
    full = optimize_bounces(grid, spectrum, _no_phase(grid), _mirror(grid), max_bounces=8)
    cut = optimize_bounces(grid, spectrum, _no_phase(grid), _mirror(grid), max_bounces=8, band=band)
    assert 0.01 < cut.band_loss < 0.025
    assert cut.metrics.fwhm > full.metrics.fwhm
    assert cut.metrics.peak_power < full.metrics.peak_power


# --- bounce optimisation -------------------------------------------------------------------


@pytest.mark.parametrize("objective", ["peak_power", "fwhm"])
@pytest.mark.parametrize("bounces", [3, 6])
def test_restores_transform_limit(grid: Grid, bounces: int, objective: str) -> None:
    # analytic: a Gaussian with GDD = -bounces * MIRROR_GDD is restored to its transform limit
    # by that bounce count (J.-C. Diels, W. Rudolph, Ultrashort Laser Pulse Phenomena, 2nd ed.,
    # 2006, ch. 1: a quadratic phase is undone by its opposite); FWHM within 0.5 %
    spectrum = _chirped(grid, -bounces * MIRROR_GDD)
    result = optimize_bounces(
        grid,
        spectrum,
        _no_phase(grid),
        _mirror(grid),
        max_bounces=10,
        objective=objective,
        input_peak_power=1e8,
    )
    assert result.bounces == bounces
    assert result.total_gdd == pytest.approx(bounces * MIRROR_GDD, rel=1e-9)
    assert result.metrics.fwhm == pytest.approx(result.metrics.transform_limited_fwhm, rel=5e-3)
    assert result.metrics.fwhm == pytest.approx(TAU, rel=5e-3)
    assert result.metrics.peak_to_transform_limit == pytest.approx(1.0, abs=1e-9)
    assert result.metrics.peak_power_gain == pytest.approx(result.metrics.peak_power / 1e8)
    assert result.metrics.main_lobe_fraction > 0.999


def test_in_pairs_gives_even_count(grid: Grid) -> None:
    # invariant: with in_pairs only even counts are candidates; 5 bounces' worth of GDD -> 4 or 6
    spectrum = _chirped(grid, -5 * MIRROR_GDD)
    result = optimize_bounces(
        grid, spectrum, _no_phase(grid), _mirror(grid), max_bounces=10, in_pairs=True
    )
    assert result.bounces in (4, 6)
    np.testing.assert_array_equal(result.bounce_counts, [0, 2, 4, 6, 8, 10])


def test_peak_power_curve_peaks_at_chosen_count(grid: Grid) -> None:
    # invariant: without trim the chosen count is the maximum of the reported curve
    spectrum = _chirped(grid, -4 * MIRROR_GDD + 60e-30)
    result = optimize_bounces(grid, spectrum, _no_phase(grid), _mirror(grid), max_bounces=9)
    i = int(np.argmax(result.peak_power_vs_bounces))
    assert result.bounce_counts[i] == result.bounces
    assert result.peak_power_vs_bounces[i] == pytest.approx(result.metrics.peak_power, rel=1e-12)
    assert result.peak_power_vs_bounces_trimmed is None


@pytest.mark.parametrize("objective", ["peak_power", "fwhm"])
@pytest.mark.parametrize("trimmed", [False, True])
def test_curves_are_the_peak_powers_of_each_count(grid: Grid, objective: str, trimmed: bool):
    # consistency: each point of the reported curves is the peak power of its own candidate
    # (count k, and its own best trim insertion on the trimmed curve), whichever objective
    # chose them (with the peak-power objective the curves are taken from the bounce scan)
    spectrum = _chirped(grid, -4 * MIRROR_GDD - 100e-30)
    fixed = el.material_phase(grid.omega, grid.omega0, _constant_gdd_index(grid, 20e-27), 2e-3)
    trim = TrimSpec.from_index(grid, _constant_gdd_index(grid, 50e-27), 0.0, 5e-3) \
        if trimmed else None
    result = optimize_bounces(grid, spectrum, fixed, _mirror(grid), max_bounces=6,
                              objective=objective, trim=trim)

    def peak(k: int, insertion: float) -> float:
        phase = fixed + k * _mirror(grid)
        if trim is not None:
            phase = phase + insertion * trim.phase_per_length
        return metrics.peak_power(grid.to_time(spectrum * np.exp(1j * phase)))

    counts = result.bounce_counts
    np.testing.assert_allclose(result.peak_power_vs_bounces, [peak(k, 0.0) for k in counts],
                               rtol=1e-10)
    if trim is None:
        assert result.peak_power_vs_bounces_trimmed is None
        return
    # the insertion of each count is not reported; the best count's is
    i = int(np.flatnonzero(counts == result.bounces)[0])
    assert result.peak_power_vs_bounces_trimmed[i] == pytest.approx(
        peak(result.bounces, result.trim_insertion), rel=1e-10)
    if objective == "peak_power":  # the trim search includes insertion 0: it can only gain
        assert np.all(result.peak_power_vs_bounces_trimmed
                      >= result.peak_power_vs_bounces * (1 - 1e-12))


@pytest.mark.parametrize(("max_bounces", "flagged"), [(4, True), (8, False)])
def test_caution_when_best_count_is_the_largest(grid: Grid, max_bounces: int, flagged: bool):
    # invariant: 6 bounces' worth of GDD with at most 4 allowed -> 4, with a caution
    spectrum = _chirped(grid, -6 * MIRROR_GDD)
    result = optimize_bounces(
        grid, spectrum, _no_phase(grid), _mirror(grid), max_bounces=max_bounces
    )
    assert result.bounces == min(6, max_bounces)
    assert any("max_bounces" in note for note in result.cautions) is flagged


def test_trim_fills_the_gap(grid: Grid) -> None:
    # analytic: 4 bounces overshoot by 100 fs^2 which a constant-GDD trim material of
    # 50 fs^2/mm cancels at 2 mm insertion
    spectrum = _chirped(grid, -4 * MIRROR_GDD - 100e-30)
    index = _constant_gdd_index(grid, 50e-27)
    trim = TrimSpec.from_index(grid, index, 0.0, 5e-3)
    result = optimize_bounces(
        grid, spectrum, _no_phase(grid), _mirror(grid), max_bounces=8, trim=trim
    )
    assert result.bounces == 4
    assert result.trim_insertion == pytest.approx(2e-3, rel=1e-3)
    assert result.metrics.peak_to_transform_limit == pytest.approx(1.0, abs=1e-6)
    assert result.peak_power_vs_bounces_trimmed is not None


def test_references_recover_cubic_phase(grid: Grid) -> None:
    # analytic: the ideal compressor of a phase gdd/2 dw^2 + tod/6 dw^3 is its opposite; the
    # quadratic reference is limited by the TOD, the quadratic + cubic one reaches the limit
    gdd, tod = 700e-30, 20000e-45
    spectrum = _chirped(grid, gdd, tod)
    result = optimize_bounces(grid, spectrum, _no_phase(grid), _mirror(grid), max_bounces=6)
    cubic, quadratic = result.quadratic_cubic, result.quadratic
    assert cubic.metrics.peak_to_transform_limit == pytest.approx(1.0, abs=1e-4)
    assert cubic.total_gdd == pytest.approx(-gdd, rel=1e-2)
    assert cubic.total_tod == pytest.approx(-tod, rel=1e-2)
    assert quadratic.metrics.peak_power < cubic.metrics.peak_power
    assert result.metrics.peak_power <= quadratic.metrics.peak_power * (1 + 1e-9)
    assert result.transform_limit.metrics.peak_to_transform_limit == pytest.approx(1.0, abs=1e-12)


def test_metrics_share_the_transform_limit_of_the_clipped_spectrum(grid: Grid) -> None:
    # consistency: the compressed pulse and the references take the transform limit of the
    # clipped spectrum they share (one phase apart) instead of each computing it from its own
    # field; the metrics equal those computed from each field alone to rounding
    spectrum = _chirped(grid, 700e-30, 20000e-45)
    result = optimize_bounces(grid, spectrum, _no_phase(grid), _mirror(grid), max_bounces=6,
                              band=_wing_band(grid, spectrum, 0.02))
    for pulse, field in [(result.metrics, result.field_t),
                         (result.quadratic.metrics, result.quadratic.field_t),
                         (result.quadratic_cubic.metrics, result.quadratic_cubic.field_t),
                         (result.transform_limit.metrics, result.transform_limit.field_t)]:
        alone = pulse_metrics(grid, field, input_peak_power=1.0)
        assert pulse.transform_limited_fwhm == pytest.approx(alone.transform_limited_fwhm,
                                                             rel=1e-12)
        assert pulse.transform_limited_peak_power == pytest.approx(
            alone.transform_limited_peak_power, rel=1e-12)
        assert pulse.peak_to_transform_limit == pytest.approx(alone.peak_to_transform_limit,
                                                              rel=1e-12)


def test_residual_phase_of_restored_pulse_is_flat(grid: Grid) -> None:
    # analytic: a perfectly compensated chirp leaves zero residual phase where there is light
    result = optimize_bounces(
        grid, _chirped(grid, -3 * MIRROR_GDD), _no_phase(grid), _mirror(grid), max_bounces=5
    )
    finite = np.isfinite(result.residual_phase)
    assert np.count_nonzero(finite) > 20
    assert np.max(np.abs(result.residual_phase[finite])) < 1e-9


def test_pulse_metrics_of_transform_limit(grid: Grid) -> None:
    # analytic: TL Gaussian -> FWHM = TAU, peak = 1e9 W, Strehl 1, no pre/post pulse beyond 2e-4
    field = grid.to_time(_tl_spectrum(grid))
    m = pulse_metrics(grid, field)
    assert m.fwhm == pytest.approx(TAU, rel=1e-3)
    assert m.peak_power == pytest.approx(1e9, rel=1e-12)
    assert np.isnan(m.peak_power_gain)
    assert (m.pre_pulse_energy + m.post_pulse_energy) / m.energy < 3e-4


# --- the search's scorer ------------------------------------------------------------------


@pytest.mark.parametrize("objective", ["peak_power", "fwhm"])
@pytest.mark.parametrize("clipped", ["no", "band", "wrapped", "scattered"])
def test_scorer_scores_the_plain_formula(grid: Grid, objective: str, clipped: str) -> None:
    # consistency: the search's scorer (only the nonzero samples, a folded common phase, the
    # solver's FFT back end) gives objective(to_time(spectrum exp(i phase))) to 1e-12, for a
    # band-clipped spectrum (exact zeros outside the band: one run of samples in FFT order, or
    # two where it wraps, written as slices; many runs, scattered), and an unclipped one
    from hcfplan.compression.scoring import OBJECTIVES, Scorer, peak_powers

    rng = np.random.default_rng(3)
    spectrum = _chirped(grid, 900e-30) * np.exp(1j * rng.normal(0, 0.3, grid.points))
    if clipped != "no":
        spectrum, _ = el.clip_to_band(grid, spectrum, _wing_band(grid, spectrum, 0.02))
        assert 0 < np.count_nonzero(spectrum) < grid.points // 2
    if clipped == "wrapped":  # the band across the ends of the array
        spectrum = np.roll(spectrum, grid.points - np.flatnonzero(spectrum)[0] - 5)
        assert spectrum[0] != 0 and spectrum[-1] != 0
    if clipped == "scattered":
        spectrum[np.flatnonzero(spectrum)[::7]] = 0.0
    common = el.mirror_phase(grid.omega, grid.omega0, 300e-30, 2e-42)
    polynomial = 0.5 * -700e-30 * grid.domega**2 + 5e-42 / 6 * grid.domega**3
    fun = OBJECTIVES[objective]

    def plain(phase: np.ndarray) -> float:
        return fun(grid, grid.to_time(spectrum * np.exp(1j * phase)))

    score = Scorer(grid, spectrum, fun)
    assert score(score.part(common)) == pytest.approx(plain(common), rel=1e-12)
    shaped = score.with_phase(score.part(common))
    assert shaped(shaped.polynomial(-700e-30, 5e-42)) == pytest.approx(
        plain(common + polynomial), rel=1e-12)
    assert score(score.part(common)) == pytest.approx(plain(common), rel=1e-12)  # unchanged
    peaks = peak_powers(score, [common, common + polynomial])
    expected = [metrics.peak_power(grid.to_time(spectrum * np.exp(1j * p)))
                for p in (common, common + polynomial)]
    np.testing.assert_allclose(peaks, expected, rtol=1e-12)


def test_scorer_runs_of_kept_samples() -> None:
    # the scorer writes one or two contiguous runs of kept samples as slices, else scatters
    from hcfplan.compression.scoring import _runs

    assert _runs(np.arange(3, 9), 16) == [(slice(3, 9), slice(0, 6))]
    assert _runs(np.array([0, 1, 2, 13, 14, 15]), 16) == [(slice(0, 3), slice(0, 3)),
                                                         (slice(13, 16), slice(3, 6))]
    assert _runs(np.array([0, 2, 4]), 16) is None
    assert _runs(np.arange(16), 16) is None


# --- errors --------------------------------------------------------------------------------


def test_rejects_unknown_objective(grid: Grid) -> None:
    with pytest.raises(ConfigError, match="'shortest'"):
        optimize_bounces(
            grid,
            _tl_spectrum(grid),
            _no_phase(grid),
            _mirror(grid),
            max_bounces=2,
            objective="shortest",
        )


@pytest.mark.parametrize("max_bounces", [-1, 2.5])
def test_rejects_bad_max_bounces(grid: Grid, max_bounces) -> None:
    with pytest.raises(ConfigError, match=f"max_bounces = {max_bounces}"):
        optimize_bounces(
            grid, _tl_spectrum(grid), _no_phase(grid), _mirror(grid), max_bounces=max_bounces
        )


def test_rejects_wrong_shape(grid: Grid) -> None:
    with pytest.raises(ConfigError, match=r"fixed_phase: shape \(10,\)"):
        optimize_bounces(grid, _tl_spectrum(grid), np.zeros(10), _mirror(grid), max_bounces=2)


def test_rejects_nan_phase_where_light(grid: Grid) -> None:
    mirror = _mirror(grid)
    mirror[:3] = np.nan  # omega0 and its neighbours carry light
    with pytest.raises(ConfigError, match="mirror_phase_per_bounce: non-finite at 3 samples"):
        optimize_bounces(grid, _tl_spectrum(grid), _no_phase(grid), mirror, max_bounces=2)


def test_nan_phase_outside_band_is_ignored(grid: Grid) -> None:
    # invariant: non-finite phase where the band removed all light does not matter
    fixed = _no_phase(grid)
    band = (grid.omega0 * 0.8, grid.omega0 * 1.2)
    fixed[~el.band_mask(grid.omega, band)] = np.nan
    result = optimize_bounces(
        grid, _chirped(grid, 400e-30), fixed, _mirror(grid), max_bounces=4, band=band
    )
    assert result.bounces == 2 and np.all(np.isfinite(result.field_t))


def test_trim_range_rejected() -> None:
    with pytest.raises(ConfigError, match=r"\(0.003, 0.001\) m"):
        TrimSpec(np.zeros(16), 3e-3, 1e-3)


# --- plotting smoke test -------------------------------------------------------------------


def test_plots_draw(grid: Grid) -> None:
    matplotlib = pytest.importorskip("matplotlib")
    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    from hcfplan.plotting import compression as plots

    result = optimize_bounces(
        grid, _chirped(grid, 650e-30), _no_phase(grid), _mirror(grid), max_bounces=6
    )
    fig, axes = plt.subplots(1, 4)
    try:
        assert plots.plot_temporal_intensity(axes[0], result) is axes[0]
        assert plots.plot_temporal_intensity(axes[1], result, scale="log") is axes[1]
        assert plots.plot_residual_phase(axes[2], result) is axes[2]
        assert plots.plot_peak_power_vs_bounces(axes[3], result) is axes[3]
    finally:
        plt.close(fig)


# --- docstrings ----------------------------------------------------------------------------


@pytest.mark.parametrize("module", ["compressor", "elements", "references", "scoring"])
def test_public_functions_name_their_source(module: str) -> None:
    # house rule: every public function of hcfplan.compression has a References section in its
    # own docstring (a published source, or "None: ..." for a numerical helper)
    import importlib
    import inspect

    mod = importlib.import_module(f"hcfplan.compression.{module}")
    missing = [name for name, obj in vars(mod).items()
               if not name.startswith("_") and inspect.isfunction(obj)
               and obj.__module__ == mod.__name__
               and "\nReferences\n----------\n" not in (inspect.getdoc(obj) or "")]
    assert not missing, f"hcfplan.compression.{module}: no References section in {missing}"
