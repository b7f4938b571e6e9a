"""Input fields from a measured pulse (``laser.field_csv``): spectral and temporal layouts."""

from __future__ import annotations

import math

import numpy as np
import pytest

from hcfplan.constants import c
from hcfplan.numerics.grid import Grid
from hcfplan.pulse import fields

OMEGA_PUMP = 2 * math.pi * c / 800e-9
FWHM = 30e-15
GDD = 400e-30  # 400 fs^2
ENERGY = 1e-4


def _grid(points=2**12, dt=2.0e-15, offset=0.02):
    # the reference frequency off the pump, so the pump carrier is exercised
    return Grid(points=points, dt=dt, omega0=OMEGA_PUMP * (1 + offset), omega_pump=OMEGA_PUMP)


def _relative_error(a, b):
    return float(np.linalg.norm(a - b) / np.linalg.norm(b))


def test_spectral_phase_layout_reproduces_a_chirped_pulse():
    # analytic: a Gaussian with the spectral phase GDD dw^2/2 given as a measured phase
    # must equal the same pulse built with gdd (module docstring of hcfplan.pulse.fields)
    grid = _grid()
    reference = fields.pulse_field(grid, "gaussian", FWHM, ENERGY, gdd=GDD)
    wavelength = np.linspace(700e-9, 920e-9, 4000)
    omega = 2 * math.pi * c / wavelength
    t0 = FWHM / (2 * math.sqrt(math.log(2)))
    s_omega = np.exp(-((omega - OMEGA_PUMP) * t0) ** 2)  # |FT of exp(-t^2/(2 t0^2))|^2
    intensity = s_omega * omega**2  # per unit wavelength (any scale)
    phase = 0.5 * GDD * (omega - OMEGA_PUMP) ** 2
    measured = fields.field_from_measured_spectrum(grid, wavelength, intensity, ENERGY,
                                                   phase=phase)
    assert _relative_error(measured, reference) < 2e-3


def test_temporal_layout_reproduces_a_pulse_sampled_elsewhere():
    # invariant: intensity and phase about the pump carrier, sampled on another grid and
    # interpolated back, give the same field
    fine = _grid(points=2**13, dt=1.5e-15, offset=-0.03)
    coarse = _grid()
    source = fields.pulse_field(fine, "gaussian", FWHM, ENERGY, gdd=GDD)
    envelope = source * np.conj(fine.carrier())
    keep = np.abs(envelope) ** 2 > 1e-12 * np.max(np.abs(envelope) ** 2)
    time, intensity = fine.time[keep], np.abs(envelope[keep]) ** 2
    phase = np.unwrap(np.angle(envelope[keep]))
    measured = fields.field_from_measured_time(coarse, time, intensity, phase, ENERGY)
    reference = fields.pulse_field(coarse, "gaussian", FWHM, ENERGY, gdd=GDD)
    assert _relative_error(measured, reference) < 1e-3
    assert coarse.energy_t(measured) == pytest.approx(ENERGY, rel=1e-12)


def test_temporal_phase_convention_red_leads_for_positive_gdd():
    # normal dispersion (GDD > 0) puts the red (lower frequency) in front, t < 0
    # (G. P. Agrawal, Nonlinear Fiber Optics, 6th ed., 2019, ch. 3, chirp of a dispersed
    # Gaussian) [from memory]; with omega_inst = omega_pump - dphi/dt that is dphi/dt > 0
    grid = _grid(offset=0.0)
    field = fields.pulse_field(grid, "gaussian", FWHM, ENERGY, gdd=GDD)
    phase = np.unwrap(np.angle(field))
    lead = np.searchsorted(grid.time, -30e-15)
    assert np.gradient(phase, grid.time)[lead] > 0


def test_fwhm_of_a_chirped_spectrum():
    # analytic: a Gaussian with GDD broadens to FWHM sqrt(1 + (4 ln2 GDD / FWHM^2)^2)
    # (G. P. Agrawal, Nonlinear Fiber Optics, 6th ed., 2019, Eq. (3.2.12)) [equation number
    # from memory]
    wavelength = np.linspace(650e-9, 1000e-9, 3000)
    omega = 2 * math.pi * c / wavelength
    t0 = FWHM / (2 * math.sqrt(math.log(2)))
    intensity = np.exp(-((omega - OMEGA_PUMP) * t0) ** 2) * omega**2
    phase = 0.5 * GDD * (omega - OMEGA_PUMP) ** 2
    expected = FWHM * math.sqrt(1 + (4 * math.log(2) * GDD / FWHM**2) ** 2)
    width = fields.measured_field_fwhm("wavelength", wavelength, intensity, phase)
    assert width == pytest.approx(expected, rel=5e-3)
    flat = fields.measured_field_fwhm("wavelength", wavelength, intensity, 0 * phase)
    assert flat == pytest.approx(FWHM, rel=5e-3)
