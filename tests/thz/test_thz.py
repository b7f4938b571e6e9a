"""Tests of hcfplan.thz.generation / hcfplan.thz.detection / hcfplan.plotting.thz.

Each numerical test states its kind (published value / analytic-or-invariant / convergence).
"""

from __future__ import annotations

import numpy as np
import pytest

from hcfplan.constants import c, epsilon_0
from hcfplan.errors import ConfigError
from hcfplan.materials.crystals import load_crystal
from hcfplan.numerics.grid import Grid
from hcfplan.thz.detection import (
    EoDetector,
    eo_response,
    phase_matching_integral,
    phase_matching_map,
)
from hcfplan.thz.generation import REFERENCE_AREA, REFERENCE_D_EFF, thz_estimate
from hcfplan.thz.measured import thz_from_measured_spectrum
from hcfplan.thz.measures import thz_cutoff
from hcfplan.thz.mixing import PHASE_MATCHING
from hcfplan.thz.setup import ThzSetup

TWO_PI = 2 * np.pi
LN2 = np.log(2.0)

MISMATCHED_TOML = """
name = "slow"
[optical_index]
model = "constant"
index = 3.3
source = "test: dispersion-free, n_g = 3.3"
valid_min_um = 0.1
valid_max_um = 100.0
range_source = "test"
[thz_permittivity]
model = "constant"
index = 3.0
source = "test"
valid_max_thz = 1000.0
range_source = "test"
"""


def gaussian_pulse(duration, wavelength=1.03e-6, energy=1e-6, points=4096, dt=2e-15):
    """Transform-limited Gaussian of intensity FWHM ``duration`` [s] on a grid."""
    grid = Grid(points, dt, TWO_PI * c / wavelength)
    t = grid.time
    field = np.exp(-2 * LN2 * t**2 / duration**2).astype(complex)
    field *= np.sqrt(energy / grid.energy_t(field))
    return grid, grid.to_spectrum(field)


@pytest.fixture(scope="module")
def thin():
    return load_crystal("thin")


@pytest.fixture()
def slow(tmp_path):
    (tmp_path / "slow.toml").write_text(MISMATCHED_TOML, encoding="utf-8")
    return load_crystal("slow", search_dirs=[tmp_path])


# -------------------------------------------------------------------------- analytic limits


@pytest.mark.parametrize("method", ["full", "group_velocity"])
@pytest.mark.parametrize("duration", [30e-15, 100e-15])
def test_thin_crystal_gaussian_peak(thin, method, duration):
    """Analytic. Thin crystal (Delta k = 0, L-factor = L): E_T(Omega) ~ Omega I~(Omega), with
    I~ the Fourier transform of the intensity envelope. For I(t) = exp(-4 ln2 t^2 / tau^2),
    I~(Omega) ~ exp(-Omega^2 tau^2 / (16 ln2)), so the power spectrum is
    P(Omega) ~ Omega^2 exp(-Omega^2 tau^2 / (8 ln2)). dP/dOmega = 0 gives
    Omega^2 = 8 ln2 / tau^2, i.e. nu_peak = sqrt(8 ln2) / (2 pi tau) = 0.3748 / tau.
    Tolerance 1 %."""
    grid, spectrum = gaussian_pulse(duration)
    result = thz_estimate(grid, spectrum, ThzSetup(thin, 100e-6, phase_matching=method))
    assert result.peak_frequency == pytest.approx(np.sqrt(8 * LN2) / (TWO_PI * duration),
                                                  rel=0.01)


def test_thin_crystal_absolute_scale(thin):
    """Analytic (module-docstring equation evaluated in closed form). Thin crystal, n = 3,
    C(Omega) = E_p exp(-Omega^2 tau^2/(16 ln2)):
    U = d^2 T^2 L^2 E_p^2 a^(-3/2) / (sqrt(pi) eps0 c^3 (n+1)^2 n^2 A), a = tau^2 / (8 ln2),
    T = 4n/(1+n)^2. Checks the Parseval factor and the correlation scaling to 1e-3."""
    duration, energy, length, n = 50e-15, 2e-6, 200e-6, 3.0
    grid, spectrum = gaussian_pulse(duration, energy=energy)
    result = thz_estimate(grid, spectrum, ThzSetup(thin, length, band_floor_db=-120.0))
    a = duration**2 / (8 * LN2)
    t_in = 4 * n / (1 + n) ** 2
    expected = (REFERENCE_D_EFF**2 * t_in**2 * length**2 * energy**2 * a**-1.5
                / (np.sqrt(np.pi) * epsilon_0 * c**3 * (n + 1) ** 2 * n**2 * REFERENCE_AREA))
    assert result.relative_efficiency * energy == pytest.approx(expected, rel=1e-3)


def test_efficiency_scalings(thin):
    """Invariant: THz energy ~ E_p^2 (so efficiency ~ E_p), ~ L^2 without mismatch, and the
    absolute estimate ~ 1 / w^2."""
    grid, spectrum = gaussian_pulse(50e-15)
    base = thz_estimate(grid, spectrum, ThzSetup(thin, 100e-6, beam_radius=1e-3))
    double_e = thz_estimate(grid, np.sqrt(2) * spectrum, ThzSetup(thin, 100e-6))
    double_l = thz_estimate(grid, spectrum, ThzSetup(thin, 200e-6))
    half_w = thz_estimate(grid, spectrum, ThzSetup(thin, 100e-6, beam_radius=0.5e-3))
    assert double_e.relative_efficiency == pytest.approx(2 * base.relative_efficiency, rel=1e-9)
    assert double_l.relative_efficiency == pytest.approx(4 * base.relative_efficiency, rel=1e-9)
    assert half_w.thz_energy == pytest.approx(4 * base.thz_energy, rel=1e-9)


def test_dispersion_free_mismatch_sinc(slow):
    """Analytic. Constant optical index 3.3 (n_g = 3.3) and THz index 3.0: Delta k = 0.3
    Omega / c exactly, so P ~ Omega^2 exp(-Omega^2 tau^2/(8 ln2)) sinc^2-factor
    |sin(Delta k L / 2) / (Delta k / 2)|^2 and both summation methods are exact."""
    duration, length = 30e-15, 300e-6
    grid, spectrum = gaussian_pulse(duration)
    for method in PHASE_MATCHING:
        result = thz_estimate(grid, spectrum, ThzSetup(slow, length, phase_matching=method,
                                                       band_floor_db=-120.0))
        Omega = TWO_PI * result.frequency
        dk = 0.3 * Omega / c
        pm = np.where(dk > 0, np.sin(dk * length / 2) / np.where(dk > 0, dk / 2, 1), length)
        expected = Omega**2 * np.exp(-(Omega**2) * duration**2 / (8 * LN2)) * pm**2
        expected /= expected.max()
        keep = expected > 1e-6
        assert np.allclose(result.generated_power[keep], expected[keep], rtol=1e-6)


@pytest.mark.parametrize(("delta_k", "k_out"), [(3e4, 0.0), (2.0, 0.0), (-5e3 + 0j, 2e4 + 300j),
                                                (1e3 - 400j, 1e4 + 400j)])
def test_phase_matching_integral_quadrature(delta_k, k_out):
    """Analytic: the closed form equals exp(i k_out L) int_0^L exp(i delta_k z) dz evaluated by
    Simpson quadrature (covers the series branch, delta_k L < 1e-4, and absorption)."""
    from scipy.integrate import simpson

    length = 1e-3
    z = np.linspace(0, length, 20001)
    integrand = np.exp(1j * delta_k * z) * np.exp(1j * k_out * length)
    expected = simpson(integrand.real, x=z) + 1j * simpson(integrand.imag, x=z)
    assert phase_matching_integral(delta_k, length, k_out) == pytest.approx(expected, rel=1e-8)


@pytest.mark.filterwarnings("ignore::hcfplan.errors.ValidityWarning")
def test_compiled_mixing_sum_matches_numpy_slab_integrals():
    """The compiled 'full' sum (no exponential in the double loop) equals the per-sample numpy
    form built from phase_matching_integral (two exponentials per term), for GaP with
    absorption up to the phonon band, including the series branch at Omega = 0 (delta_k = 0)."""
    from hcfplan.materials.crystals import optical_index, thz_index
    from hcfplan.thz.kernels import mixing_sums

    gap, length = load_crystal("gap"), 1e-3
    grid, spectrum = gaussian_pulse(20e-15, points=512, dt=2e-15)
    band = grid.shifted(spectrum) * np.exp(1j * np.linspace(0, 9, grid.points) ** 2)
    omega = grid.shifted(grid.omega)
    Omega = TWO_PI * grid.dnu * np.arange(120)
    k_opt = optical_index(gap, omega) * omega / c
    k_thz = thz_index(gap, Omega) * Omega / c
    assert np.max(k_thz.imag * length) > 5  # strongly absorbed samples are covered
    got = np.zeros(len(Omega), complex)
    mixing_sums(band, k_opt, k_thz + 0j, length, len(Omega), got)
    size = len(band)
    expected = np.zeros(len(Omega), complex)
    for m in range(len(Omega)):
        q = k_opt[m:] - k_opt[: size - m]
        slab = phase_matching_integral(q - k_thz[m], length, k_thz[m])
        expected[m] = np.sum(band[m:] * np.conj(band[: size - m]) * slab)
    # The spectrum is used relative to its peak. Samples in the phonon band are 1e-8 of it and
    # come from sums with large cancellation: there both forms differ from an extended-
    # precision evaluation by up to 3e-9 (numpy) and 3e-8 (compiled) of their own value.
    assert np.max(np.abs(got - expected)) <= 1e-11 * np.max(np.abs(expected))
    assert np.all(np.abs(got - expected) <= 1e-7 * np.abs(expected))


def test_full_sum_against_direct_double_integral():
    """Analytic: the 'full' sum equals a direct evaluation of
    sum_k A(w_k + W) A*(w_k) int_0^L exp(i[k(w_k+W) - k(w_k)] z) exp(i k_T (L - z)) dz dnu
    (z by Simpson), times the pump-frame phase, for GaP with absorption and dispersion."""
    from scipy.integrate import simpson

    from hcfplan.materials.crystals import optical_group_index, optical_index, thz_index

    gap, length = load_crystal("gap"), 0.5e-3
    grid, spectrum = gaussian_pulse(40e-15, points=256, dt=4e-15)
    band = grid.shifted(spectrum)
    omega = grid.shifted(grid.omega)
    Omega = TWO_PI * grid.dnu * np.arange(12)
    omega_c = grid.omega0
    got = PHASE_MATCHING["full"](band, omega, grid.dnu, Omega, gap, length, omega_c)
    k = optical_index(gap, omega) * omega / c
    z = np.linspace(0, length, 4001)
    for m in (3, 11):
        k_t = thz_index(gap, Omega[m]) * Omega[m] / c
        phase = np.exp(1j * np.subtract.outer(k[m:] - k[: len(k) - m], 0 * z) * z
                       + 1j * k_t * (length - z))
        integral = simpson(phase.real, x=z) + 1j * simpson(phase.imag, x=z)
        total = np.sum(band[m:] * np.conj(band[: len(k) - m]) * integral) * grid.dnu
        total *= np.exp(-1j * optical_group_index(gap, omega_c) * Omega[m] / c * length)
        assert got[m] == pytest.approx(total, rel=1e-7)


def test_group_velocity_approximation_agrees_for_small_dispersion():
    """Convergence/approximation: the group-velocity sum differs from the full sum only by the
    group-velocity dispersion of the pump band over the crystal. For 100 fs at 1.03 um in
    0.1 mm GaP (phase error Omega beta2 Delta_omega L of order 1e-2 rad) the spectra agree to
    1 % above 1e-2 of the peak; for 1 mm they differ by more (the test checks they do)."""
    gap = load_crystal("gap")
    grid, spectrum = gaussian_pulse(100e-15)
    diffs = []
    for length in (0.1e-3, 1e-3):
        full = thz_estimate(grid, spectrum, ThzSetup(gap, length, phase_matching="full"))
        fast = thz_estimate(grid, spectrum, ThzSetup(gap, length, phase_matching="group_velocity"))
        keep = full.generated_power > 1e-2
        diffs.append(np.max(np.abs(fast.generated_power[keep] / full.generated_power[keep] - 1)))
    assert diffs[0] < 0.01
    assert diffs[1] > 3 * diffs[0]


# ------------------------------------------------------------------------------- invariants


@pytest.mark.parametrize("method", ["full", "group_velocity"])
def test_thz_spectrum_within_optical_bandwidth(method):
    """Invariant: the THz field is an autocorrelation of the optical spectrum, so nothing is
    generated above the full optical bandwidth W (support of the spectrum). Self-phase-
    modulated (broadened) pulse, compressed to its transform limit, support cut at -80 dB."""
    gap = load_crystal("gap")
    grid, spectrum = gaussian_pulse(100e-15, points=8192)
    field = grid.to_time(spectrum)
    field *= np.exp(1j * 8 * np.pi * np.abs(field) ** 2 / np.max(np.abs(field) ** 2))  # SPM
    amplitude = np.abs(grid.to_spectrum(field))
    amplitude[amplitude**2 < 1e-8 * np.max(amplitude**2)] = 0.0
    support = np.nonzero(grid.shifted(amplitude))[0]
    width = (support[-1] - support[0]) * grid.dnu
    result = thz_estimate(grid, amplitude, ThzSetup(gap, 0.3e-3, phase_matching=method,
                                                    max_frequency=1.5 * width))
    beyond = result.frequency > width + 0.5 * grid.dnu
    assert beyond.any()
    assert np.max(result.generated_power[beyond]) <= 1e-20
    assert result.cutoff_computed <= width


def test_spectral_delay_does_not_change_thz_power(thin):
    """Invariant: a linear spectral phase (pure delay) leaves |I~(Omega)| unchanged."""
    grid, spectrum = gaussian_pulse(40e-15)
    delayed = spectrum * np.exp(1j * grid.domega * 200e-15)
    a = thz_estimate(grid, spectrum, ThzSetup(thin, 100e-6))
    b = thz_estimate(grid, delayed, ThzSetup(thin, 100e-6))
    assert np.allclose(a.generated_power, b.generated_power, atol=1e-10)


def test_chirp_lowers_bandwidth(thin):
    """Invariant: a spectral quadratic phase (GDD = 300 fs^2, same power spectrum, longer
    intensity envelope) gives a narrower THz spectrum than the transform limit."""
    grid, tl = gaussian_pulse(30e-15)
    chirped = tl * np.exp(0.5j * 300e-30 * grid.domega**2)  # grid.py convention 4
    setup = ThzSetup(thin, 1e-4)
    assert (thz_estimate(grid, chirped, setup).cutoff
            < 0.8 * thz_estimate(grid, tl, setup).cutoff)


# ----------------------------------------------------------------------------------- cutoff


@pytest.mark.parametrize(
    ("cutoff_db", "level", "expected"),
    [(-20.0, "power", np.log(100.0)), (-10.0, "power", np.log(10.0)),
     (-30.0, "power", np.log(1000.0)), (-20.0, "field", np.log(1e4))],
)
def test_cutoff_of_synthetic_spectrum(cutoff_db, level, expected):
    """Analytic: for P = exp(-nu / nu0) the share of the energy above f is exp(-f / nu0), so
    the share 10^(L/10) lies above nu0 ln(10^(-L/10)); with 'field' the integral of
    sqrt(P) = exp(-nu / (2 nu0)) is divided, and -20 dB lies above 2 nu0 ln(100) =
    nu0 ln(1e4). Trapezoidal integrals on 0.01 nu0 steps (axis to 40 nu0): rel. 1e-4."""
    nu0 = 1e12
    frequency = np.linspace(0, 40e12, 4001)
    cutoff, definition = thz_cutoff(frequency, np.exp(-frequency / nu0), cutoff_db, level)
    assert cutoff == pytest.approx(expected * nu0, rel=1e-4)
    assert f"({cutoff_db:g} dB above)" in definition and "lies below it" in definition


def test_cutoff_definition_is_reported(thin):
    grid, spectrum = gaussian_pulse(50e-15)
    result = thz_estimate(grid, spectrum, ThzSetup(thin, 1e-4, cutoff_db=-10.0))
    assert "90 % of the THz energy" in result.cutoff_definition
    assert "generated" in result.cutoff_definition
    lower = thz_estimate(grid, spectrum, ThzSetup(thin, 1e-4, cutoff_db=-20.0))
    assert lower.cutoff > result.cutoff


def test_unknown_cutoff_level_lists_choices():
    with pytest.raises(ConfigError, match=r"'amplitude'.*power, field"):
        thz_cutoff(np.arange(3.0), np.ones(3), -20.0, "amplitude")


def test_thick_mismatched_crystal_lowers_cutoff():
    """Qualitative: ZnTe pumped at 1.03 um is velocity-mismatched (l_c ~ 0.8 mm at 1 THz);
    a 1 mm crystal cuts the spectrum lower than a 50 um one."""
    znte = load_crystal("znte")
    grid, spectrum = gaussian_pulse(30e-15)
    # the frequency below which half the energy lies (-3 dB above), compared as computed: the
    # thin crystal's lies beyond ZnTe's stated 4.5 THz. (With -20 dB both are set by the weak
    # mismatched band above the LO phonon, whose share hardly depends on L once L >> l_c.)
    setup = {"cutoff_db": -3.0}
    thin_cut = thz_estimate(grid, spectrum, ThzSetup(znte, 50e-6, **setup)).cutoff_computed
    thick_cut = thz_estimate(grid, spectrum, ThzSetup(znte, 1e-3, **setup)).cutoff_computed
    assert thick_cut < 0.7 * thin_cut


# -------------------------------------------------------------------------------- detection


def test_eo_response_of_thin_matched_crystal_is_input_transmission(thin):
    """Analytic: a thin, velocity-matched, loss-free crystal (n_T = n_g = 3) and a delta probe
    give G = 1, so the EO response is the input Fresnel transmission t_in = 2 / (1 + n_T) = 0.5
    (normal-incidence amplitude transmission), not 1."""
    Omega = TWO_PI * np.array([0.5e12, 2e12, 5e12])
    response = eo_response(thin, 10e-6, Omega, TWO_PI * c / 1.03e-6)
    assert np.allclose(response, 0.5, rtol=1e-12, atol=1e-12)


def test_detection_with_ideal_detector_applies_probe_gate(thin):
    """Analytic: ideal thin detector, probe = the same Gaussian: the detected spectrum is the
    generated one times |I~_p(Omega)|^2 = exp(-Omega^2 tau^2/(8 ln2)), so
    P_det ~ Omega^2 exp(-Omega^2 tau^2/(4 ln2)), peak at sqrt(4 ln2)/(2 pi tau) = 0.265/tau."""
    duration = 50e-15
    grid, spectrum = gaussian_pulse(duration)
    result = thz_estimate(grid, spectrum, ThzSetup(thin, 100e-6, detector=EoDetector(thin, 10e-6)))
    assert result.detected_peak_frequency == pytest.approx(
        np.sqrt(4 * LN2) / (TWO_PI * duration), rel=0.01)
    assert result.detected_cutoff < result.cutoff


def test_znte_detector_suppresses_its_to_band():
    """Qualitative (Gallot & Grischkowsky 1999; Leitenstorfer et al. 1999): a ZnTe detector
    is nearly blind at its 5.3 THz TO resonance."""
    gap, znte = load_crystal("gap"), load_crystal("znte")
    grid, spectrum = gaussian_pulse(15e-15, wavelength=0.8e-6, points=8192, dt=1.5e-15)
    result = thz_estimate(grid, spectrum, ThzSetup(gap, 20e-6, detector=EoDetector(znte, 10e-6),
                                                   phase_matching="group_velocity"))
    at_to = np.argmin(np.abs(result.frequency - 5.3e12))
    ratio = result.detected_power[at_to] / result.generated_power[at_to]
    assert ratio < 1e-2


# ------------------------------------------------------------------------ warnings, energy


def test_pump_side_warnings():
    znte = load_crystal("znte")
    grid, spectrum = gaussian_pulse(40e-15, wavelength=0.8e-6, energy=50e-6, dt=1.5e-15)
    result = thz_estimate(grid, spectrum, ThzSetup(znte, 2e-3, beam_radius=0.3e-3))
    text = " | ".join(result.warnings)
    assert "the two-photon energy" in text and "eV exceeds the direct gap 2.26 eV" in text
    assert "2 photon energies" not in text
    # the binding fluence limit is named; damage is among the exceeded ones
    assert "ZnTe: pump peak fluence" in text and "the limit that binds" in text
    assert "exceeded: damage" in text
    gap = load_crystal("gap")
    grid, spectrum = gaussian_pulse(300e-15, energy=1e-6)  # pump-limited peak 1.25 THz
    text = " | ".join(thz_estimate(grid, spectrum, ThzSetup(gap, 1e-3, beam_radius=2e-3)).warnings)
    assert "the two-photon energy" in text and "only (not the direct gap)" in text
    assert "damage" not in text and "coherence length" not in text
    grid, spectrum = gaussian_pulse(40e-15, wavelength=1.55e-6, energy=1e-6, dt=3e-15)
    text = " | ".join(thz_estimate(grid, spectrum, ThzSetup(gap, 3e-3, beam_radius=2e-3)).warnings)
    assert "exceeds the coherence length" in text and "gap" not in text


def test_absolute_energy_needs_beam_radius(thin):
    grid, spectrum = gaussian_pulse(50e-15)
    result = thz_estimate(grid, spectrum, ThzSetup(thin, 1e-4))
    assert result.thz_energy is None
    text = " | ".join(result.warnings)
    assert "set thz.beam_waist_um" in text and "beam_radius" not in text
    assert "thz.beam_waist_um not given: fluence" in text and "beam radius" not in text
    assert "1e-5..1e-4" in result.thz_energy_caution


def test_gap_energy_estimate_order_of_magnitude():
    """Published range (order of magnitude): collinear GaP gives ~1e-5..1e-4 of the pump energy
    (Buchmann et al., APL Photonics 5, 106103 (2020), GaP as reference). A plane-wave estimate
    for a moderate fluence must land within a factor 10 of that range."""
    gap = load_crystal("gap")
    grid, spectrum = gaussian_pulse(30e-15, energy=5e-6)
    result = thz_estimate(grid, spectrum, ThzSetup(gap, 1e-3, beam_radius=1e-3))
    assert 1e-6 < result.thz_energy / result.pump_energy < 1e-3


@pytest.mark.parametrize(
    ("kwargs", "pattern"),
    [({"phase_matching": "exact"}, r"'exact'.*full, group_velocity"),
     ({"beam_radius": -1.0}, r"beam_radius = -1"),
     ({"cutoff_db": 3.0}, r"cutoff_db = 3"),
     ({"cutoff_level": "amplitude"}, r"'amplitude'.*power, field"),
     ({"band_floor_db": 0.0}, r"band_floor_db = 0"),
     ({"d_eff": 0.0}, r"d_eff = 0"),
     ({"damage_fluence": float("nan")}, r"damage_fluence = nan"),
     ({"max_frequency": -1e12}, r"max_frequency = -1")],
)
def test_setup_rejects_bad_values(thin, kwargs, pattern):
    # the set-up checks its values once, when it is made
    with pytest.raises(ConfigError, match=pattern):
        ThzSetup(thin, 1e-4, **kwargs)


def test_bad_thickness_and_shape(thin):
    grid, spectrum = gaussian_pulse(50e-15)
    with pytest.raises(ConfigError, match=r"thickness = -0.001 m"):
        ThzSetup(thin, -1e-3)
    with pytest.raises(ConfigError, match=r"shape \(100,\)"):
        thz_estimate(grid, spectrum[:100], ThzSetup(thin, 1e-3))


def _spec(**changes):
    from hcfplan.io.config import ThzSpec

    values = dict(crystal="GaP", thickness=0.3e-3, cutoff_db=-20.0, cutoff_quantity="field",
                  detector_crystal=None, detector_thickness=None, probe_fwhm=None,
                  beam_waist=None, d_eff=None, damage_fluence=None)
    return ThzSpec(**(values | changes))


def test_setup_from_config_section():
    """The [thz] section becomes one set-up: crystals loaded, SI values passed through, and a
    given probe FWHM becomes a Gaussian probe spectrum on the simulation grid."""
    from hcfplan.planning.reports.thz import thz_setup

    grid, _ = gaussian_pulse(50e-15, points=512)
    setup = thz_setup(_spec(beam_waist=1e-3, d_eff=2e-12, damage_fluence=1e4), grid)
    assert (setup.crystal.name.lower(), setup.thickness) == ("gap", 0.3e-3)
    assert (setup.cutoff_db, setup.cutoff_level, setup.detector) == (-20.0, "field", None)
    assert (setup.beam_radius, setup.d_eff, setup.damage_fluence) == (1e-3, 2e-12, 1e4)
    probed = thz_setup(_spec(detector_crystal="ZnTe", detector_thickness=1e-4,
                             probe_fwhm=30e-15), grid)
    assert probed.detector.crystal.name.lower() == "znte"
    assert probed.detector.probe_spectrum.shape == (grid.points,)
    assert grid.energy_w(probed.detector.probe_spectrum) == pytest.approx(1e-9, rel=1e-9)
    with pytest.raises(ConfigError, match="probe_fwhm_fs"):
        thz_setup(_spec(detector_crystal="ZnTe", detector_thickness=1e-4, probe_fwhm=30e-15))


def test_setup_from_command_options():
    from hcfplan.planning.reports.thz import thz_setup_from_options

    setup = thz_setup_from_options(crystal="ZnTe", thickness=0.5e-3, cutoff_db=-10.0,
                                   cutoff_quantity="power", detector_crystal=None,
                                   detector_thickness=0.3e-3)
    assert (setup.crystal.name.lower(), setup.thickness, setup.detector) == ("znte", 0.5e-3, None)
    assert (setup.cutoff_db, setup.cutoff_level) == (-10.0, "power")
    with_detector = thz_setup_from_options(crystal="GaP", thickness=0.3e-3, cutoff_db=-20.0,
                                           cutoff_quantity="power", detector_crystal="GaP",
                                           detector_thickness=0.1e-3)
    assert with_detector.detector.thickness == 0.1e-3


# ------------------------------------------------------------------------ measured spectrum


def test_measured_spectrum_transform_limit(thin):
    """Analytic: a Gaussian spectrum given per unit wavelength (grating spectrometer), assumed
    compressed to its transform limit, reproduces the thin-crystal peak 0.3748 / tau (1 %)."""
    duration, nu0 = 50e-15, c / 0.8e-6
    wavelength = np.linspace(600e-9, 1100e-9, 3000)
    nu = c / wavelength
    per_nu = np.exp(-(np.pi**2) * duration**2 * (nu - nu0) ** 2 / LN2)  # |A~|^2 of the TL pulse
    per_wavelength = per_nu * c / wavelength**2
    result = thz_from_measured_spectrum(wavelength, per_wavelength, 1e-6,
                                        ThzSetup(thin, 1e-4, phase_matching="group_velocity"))
    assert result.peak_frequency == pytest.approx(np.sqrt(8 * LN2) / (TWO_PI * duration),
                                                  rel=0.01)
    assert result.pump_energy == pytest.approx(1e-6, rel=1e-9)


def test_measured_spectrum_phase(thin):
    """Invariant: a given linear spectral phase (delay) leaves the THz power unchanged; a
    quadratic phase (GDD 500 fs^2, convention 4 of grid.py) lowers the cutoff."""
    duration, nu0 = 40e-15, c / 1.03e-6
    wavelength = np.linspace(800e-9, 1400e-9, 2000)
    omega = TWO_PI * c / wavelength
    per_nu = np.exp(-(np.pi**2) * duration**2 * (c / wavelength - nu0) ** 2 / LN2)
    per_wavelength = per_nu * c / wavelength**2
    d_omega = omega - TWO_PI * nu0
    setup = ThzSetup(thin, 1e-4, phase_matching="group_velocity")
    runs = [thz_from_measured_spectrum(wavelength, per_wavelength, 1e-6, setup, phase=phase)
            for phase in (None, 300e-15 * d_omega, 0.5 * 500e-30 * d_omega**2)]
    assert np.allclose(runs[1].generated_power, runs[0].generated_power, atol=1e-6)
    assert runs[2].cutoff < 0.8 * runs[0].cutoff


def test_measured_spectrum_errors(thin):
    with pytest.raises(ConfigError, match=r"wavelength \(3\) and intensity \(2\)"):
        thz_from_measured_spectrum(np.array([1e-6, 1.1e-6, 1.2e-6]), np.ones(2), 1e-6,
                                   ThzSetup(thin, 1e-4))
    with pytest.raises(ConfigError, match=r"density = 'per_nm'"):
        thz_from_measured_spectrum(np.linspace(1e-6, 1.1e-6, 5), np.ones(5), 1e-6,
                                   ThzSetup(thin, 1e-4), density="per_nm")


# ---------------------------------------------------------------------------------- plotting


def test_plots_draw_and_return_axes():
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    from hcfplan.plotting.thz import (
        plot_coherence_length,
        plot_optical_spectrum,
        plot_phase_matching_map,
        plot_thz_spectrum,
    )

    gap = load_crystal("gap")
    grid, spectrum = gaussian_pulse(100e-15)
    result = thz_estimate(grid, spectrum, ThzSetup(gap, 0.5e-3, detector=EoDetector(gap, 0.1e-3)))
    assert result.cutoff is not None  # within GaP's stated range: the cutoff line is drawn
    pm_map = phase_matching_map(gap, np.linspace(0.8e-6, 1.6e-6, 9), np.linspace(0.1e12, 5e12, 20))
    fig, axes = plt.subplots(2, 2)
    assert plot_thz_spectrum(axes[0, 0], result) is axes[0, 0]
    # the figure states the cutoff definition used (in the title, wrapped over lines; the
    # legend has the value)
    assert result.cutoff_definition in " ".join(axes[0, 0].get_title().split())
    labels = [t.get_text() for t in axes[0, 0].get_legend().get_texts()]
    assert any("cutoff" in label for label in labels)
    assert plot_phase_matching_map(axes[0, 1], pm_map) is axes[0, 1]
    assert plot_coherence_length(axes[1, 0], result) is axes[1, 0]
    assert plot_optical_spectrum(axes[1, 1], result) is axes[1, 1]
    plt.close(fig)


# ------------------------------------------------------------------------------ docstrings


@pytest.mark.parametrize("module", ["detection", "generation", "kernels", "kernels_numpy",
                                    "measured", "measures", "mixing", "sampling", "setup",
                                    "tilted", "crystal_limits", "waveforms"])
def test_public_functions_name_their_source(module):
    """House rule: every public function of hcfplan.thz has a References section in its own
    docstring (a published source, or "None: ..." for a numerical helper)."""
    import importlib
    import inspect

    mod = importlib.import_module(f"hcfplan.thz.{module}")
    missing = []
    for name, obj in vars(mod).items():
        func = getattr(obj, "py_func", obj)  # numba dispatchers keep the Python function
        if name.startswith("_") or not inspect.isfunction(func) or func.__module__ != mod.__name__:
            continue
        doc = inspect.getdoc(func) or ""
        if "\nReferences\n----------\n" not in doc:
            missing.append(name)
    assert not missing, f"hcfplan.thz.{module}: no References section in {missing}"
