"""Time-domain THz field, focus and EO-sampled waveform (hcfplan.thz.waveforms), and the
absolute figures' scaling with the pump energy."""

from __future__ import annotations

import numpy as np
import pytest

from hcfplan.constants import c, epsilon_0
from hcfplan.materials.crystals import load_crystal, optical_index
from hcfplan.thz.detection import EoDetector
from hcfplan.thz.generation import thz_estimate
from hcfplan.thz.setup import ThzSetup
from hcfplan.thz.waveforms import (
    eo_retardation_factor,
    focus_factor,
    real_waveform,
    thz_waveforms,
)
from tests.thz.test_thz import gaussian_pulse


@pytest.fixture(scope="module")
def znte_case():
    """ZnTe 0.1 mm pumped at 800 nm, 40 fs, 1 uJ on w = 1 mm, ZnTe 0.2 mm detector."""
    znte = load_crystal("znte")
    grid, spectrum = gaussian_pulse(40e-15, wavelength=0.8e-6, energy=1e-6, dt=1.5e-15)
    setup = ThzSetup(znte, 0.1e-3, beam_radius=1e-3, detector=EoDetector(znte, 0.2e-3),
                     phase_matching="group_velocity")
    result = thz_estimate(grid, spectrum, setup)
    wf = thz_waveforms(result, beam_radius=1e-3, focus_f_number=2.0, detector=znte,
                       detector_thickness=0.2e-3)
    return result, wf


def test_real_waveform_is_the_inverse_transform():
    """Analytic: the real transform of a Gaussian spectrum exp(-(nu/s)^2) is
    2 int_0^inf exp(-(nu/s)^2) cos(2 pi nu t) dnu = sqrt(pi) s exp(-(pi s t)^2)."""
    s = 1e12
    nu = np.arange(0, 400) * 25e9
    t, x = real_waveform(nu, np.exp(-(nu / s) ** 2))
    expected = np.sqrt(np.pi) * s * np.exp(-((np.pi * s * t) ** 2))
    assert np.max(np.abs(x - expected)) < 1e-3 * expected.max()
    # a delay tau in the phase exp(i 2 pi nu tau) moves the signal to +tau (exp(-i w t))
    _, moved = real_waveform(nu, np.exp(-(nu / s) ** 2) * np.exp(2j * np.pi * nu * 2e-12))
    assert t[np.argmax(moved)] == pytest.approx(2e-12, abs=t[1] - t[0])


def test_eo_power_spectrum_equals_the_detected_spectrum(znte_case):
    """Consistency: the power spectrum of eo_signal is the reported detected spectrum
    (within the crystal model's range, which the waveforms keep)."""
    result, wf = znte_case
    n = len(wf.eo_signal)
    dt = wf.eo_delay[1] - wf.eo_delay[0]
    spectrum = np.abs(np.fft.rfft(wf.eo_signal)) ** 2
    freq = np.fft.rfftfreq(n, dt)
    keep = result.frequency <= result.model_limit
    on_axis = np.interp(result.frequency[keep], freq, spectrum)
    detected = result.detected_power[keep]
    assert np.allclose(on_axis / on_axis.max(), detected / detected.max(), atol=1e-6)


def test_exit_field_carries_the_thz_energy(znte_case):
    """Invariant: eps0 c int E(t)^2 dt times the Gaussian THz area pi w^2 / 4 (intensity
    profile exp(-4 r^2 / w^2)) is the reported energy, within the model range kept."""
    result, wf = znte_case
    power = np.abs(result.generated_field) ** 2
    inside = np.where(result.frequency <= result.model_limit, power, 0)
    kept = np.trapezoid(inside, result.frequency)
    share = kept / np.trapezoid(power, result.frequency)
    energy = epsilon_0 * c * np.sum(wf.exit_field**2) * (wf.time[1] - wf.time[0]) * (
        np.pi * 1e-3**2 / 4)
    assert energy == pytest.approx(result.thz_energy * share, rel=0.02)


def test_focus_conserves_energy_per_frequency():
    """Invariant: |factor|^2 pi w0^2 / 2 = pi w^2 / 4 for every frequency (w0 = 2 lambda F / pi),
    and the Gouy phase is -i."""
    nu = np.array([0.5e12, 1e12, 3e12])
    w, f_number = 1.5e-3, 3.0
    factor = focus_factor(nu, w, f_number)
    w0 = 2 * (c / nu) * f_number / np.pi
    assert np.allclose(np.abs(factor) ** 2 * np.pi * w0**2 / 2, np.pi * w**2 / 4)
    assert np.allclose(np.angle(factor), -np.pi / 2)


def test_focus_field_is_larger_and_grows_with_smaller_f_number(znte_case):
    result, wf = znte_case
    tight = thz_waveforms(result, beam_radius=1e-3, focus_f_number=1.0)
    assert wf.peak_field > wf.peak_field_exit
    assert tight.peak_field == pytest.approx(2 * wf.peak_field, rel=1e-9)  # field ~ 1/F


def test_eo_signal_is_the_phase_retardation(znte_case):
    """Planken et al., J. Opt. Soc. Am. B 18, 313 (2001) (formula from memory):
    Gamma = omega_p n^3 r41 d E / c at the optimal orientation."""
    result, wf = znte_case
    znte = load_crystal("znte")
    omega = 2 * np.pi * result.probe_frequency
    expected = omega * float(optical_index(znte, omega)) ** 3 * 4.0e-12 * 0.2e-3 / c
    assert eo_retardation_factor(znte, 0.2e-3, result.probe_frequency) == pytest.approx(expected)
    assert "rad" in wf.eo_normalisation
    # the retardation of an ideal thin detector would be factor * t_in * peak field; ours is
    # below it (velocity mismatch, gate, absorption) but of that order
    ideal = expected * 2 / (1 + 3.17) * wf.peak_field_exit
    assert 0.05 * ideal < np.max(np.abs(wf.eo_signal)) < 1.2 * ideal


def test_field_linear_energy_quadratic_in_pump_energy():
    """Invariant of the undepleted model below the absorption limits: at a fixed spectrum the
    field scales as E_pump, the THz energy as E_pump^2 (efficiency as E_pump)."""
    gap = load_crystal("gap")
    out = []
    for energy in (1e-7, 4e-7):
        grid, spectrum = gaussian_pulse(60e-15, energy=energy)
        result = thz_estimate(grid, spectrum, ThzSetup(gap, 0.5e-3, beam_radius=2e-3))
        assert result.crystal_limits.margin > 1  # below every limit
        wf = thz_waveforms(result, beam_radius=2e-3, focus_f_number=2.0)
        out.append((wf.peak_field, result.thz_energy))
    assert out[1][0] / out[0][0] == pytest.approx(4.0, rel=1e-6)
    assert out[1][1] / out[0][1] == pytest.approx(16.0, rel=1e-6)


def test_reference_case_without_beam_radius():
    thin = load_crystal("thin")
    grid, spectrum = gaussian_pulse(50e-15)
    result = thz_estimate(grid, spectrum, ThzSetup(thin, 1e-4, detector=EoDetector(thin, 1e-5)))
    wf = thz_waveforms(result, beam_radius=None, focus_f_number=2.0, detector=thin,
                       detector_thickness=1e-5)
    assert not wf.absolute and result.field_scale is None
    assert "normalised to a peak of 1" in wf.eo_normalisation  # thin has no r41
    assert np.max(np.abs(wf.eo_signal)) == pytest.approx(1.0)
