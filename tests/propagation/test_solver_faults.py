"""Every fault and caveat of the propagation solver: status, message (z, step, cause, remedy)
and the partial result that is kept.

Kinds: contract tests of hcfplan.propagation.solve (the message and bookkeeping promised in its
module docstring); no numbers against outside sources.
"""

from __future__ import annotations

import re
import warnings

import numpy as np
import pytest
from propagation_cases import Z0, soliton, taylor, textbook_grid

from hcfplan.constants import c
from hcfplan.errors import ValidityWarning
from hcfplan.fibers.antiresonant import AntiresonantFiber
from hcfplan.fibers.capillary import CapillaryFiber
from hcfplan.fibers.taylor import TaylorFiber
from hcfplan.materials.gases import GasFill, gas_medium
from hcfplan.numerics.grid import Grid
from hcfplan.propagation import control, operators
from hcfplan.propagation.options import SolverOptions
from hcfplan.propagation.solve import propagate
from hcfplan.pulse.fields import pulse_field

OMEGA_1030 = 2 * np.pi * c / 1030e-9


@pytest.fixture(scope="module")
def case():
    grid = textbook_grid(2**9, window_t0=30.0)
    return grid, soliton(grid, 2.0), taylor(0.5 * Z0)


@pytest.fixture(scope="module")
def argon():
    return gas_medium(GasFill((("Ar", 1.0),), 1e5, 293.15))


def _kept(result, length: float) -> None:
    """The partial result: records up to the position reached, all arrays of that length."""
    assert not result.success
    assert 0 < result.z[-1] < length
    assert result.spectrum_z.shape == (result.z.size, result.grid.points)
    assert result.energy_z.size == result.z.size and np.all(np.isfinite(result.spectrum_z))
    assert np.all(np.isfinite(result.field_out_t))


def _inject_nan_after(monkeypatch, calls: int) -> None:
    original = operators.NonlinearTerms.evaluate

    def broken(self, out):
        original(self, out)
        if self.n_calls > calls:
            out[3] = np.nan
        return out

    monkeypatch.setattr(operators.NonlinearTerms, "evaluate", broken)


@pytest.mark.parametrize(("stepper", "remedy"), [("erk43ip", "remedy: loosen rtol"),
                                                 ("rk4ip", "use a smaller step")])
def test_nonfinite(monkeypatch, case, stepper, remedy):
    grid, field0, fiber = case
    _inject_nan_after(monkeypatch, 40)
    result = propagate(field0, grid, fiber,
                       options=SolverOptions(stepper=stepper, step=fiber.length / 100, z_samples=5))
    assert result.status == "nonfinite"
    assert "non-finite (NaN/Inf)" in result.message and remedy in result.message
    assert f"z = {result.z[-1]:.6g} m" in result.message and "step" in result.message
    _kept(result, fiber.length)


def test_step_collapse(monkeypatch, case):
    # an error estimate that never falls with the step: the controller must give up at the floor
    grid, field0, fiber = case
    original = operators.NonlinearTerms.evaluate

    def noisy(self, out):
        original(self, out)
        if self.n_calls > 30:
            out *= 1.0 + 1e-3 * np.cos(7.0 * self.n_calls)  # k4 != k5 at any step length
        return out

    monkeypatch.setattr(operators.NonlinearTerms, "evaluate", noisy)
    monkeypatch.setattr(control, "MIN_STEP_FRACTION", 1e-4)  # reach the floor in few attempts
    result = propagate(field0, grid, fiber,
                       options=SolverOptions(rtol=1e-9, z_samples=5, max_steps=5000))
    assert result.status == "step_collapse"
    assert "step size collapsed at z = " in result.message and "floor" in result.message
    assert "local error stays above rtol = 1e-09" in result.message
    assert "remedy: loosen rtol" in result.message
    _kept(result, fiber.length)


def test_step_budget(case):
    grid, field0, fiber = case
    result = propagate(field0, grid, fiber,
                       options=SolverOptions(rtol=1e-8, z_samples=5, max_steps=25))
    assert result.status == "step_budget"
    assert result.n_steps + result.n_rejected == 25 and result.n_steps > 0
    for fragment in ("max_steps = 25 used up at z = ", "(step ", "rtol = 1e-08 may be too tight",
                     "raise max_steps"):
        assert fragment in result.message
    _kept(result, fiber.length)


def test_time_window_edge_warning():
    # a pulse spreading by dispersion (no nonlinearity) over a window of only 12 T0
    grid = textbook_grid(2**8, window_t0=12.0)
    result = propagate(soliton(grid, 1.0), grid, taylor(3 * Z0, gamma=0.0),
                       options=SolverOptions(z_samples=5))
    assert result.success
    (note,) = [w for w in result.warnings if "time window" in w]
    assert "first at z = " in note and "increase grid.time_window_fs" in note


def _spm_case(dt: float, points: int):
    """Strong SPM of a 10 fs pulse at 1030 nm (no dispersion): the spectrum fills the window."""
    grid = Grid(points=points, dt=dt, omega0=OMEGA_1030)
    fiber = TaylorFiber(omega0=OMEGA_1030, betas=(0.0,), gamma=1e-2, length=0.3,
                        self_steepening=False)
    return grid, pulse_field(grid, "gaussian", 10e-15, 2e-9), fiber


@pytest.mark.parametrize(("widest", "remedy"), [
    (False, "increase grid.points"),
    (True, "so it cannot grow to the red"),
])
def test_frequency_window_edge_warning(widest, remedy):
    half = 0.9 * OMEGA_1030 if widest else 0.35 * OMEGA_1030  # widest: lower edge at 10 %
    grid, field0, fiber = _spm_case(np.pi / half, 256)
    result = propagate(field0, grid, fiber, options=SolverOptions(rtol=1e-5, z_samples=5))
    (note,) = [w for w in result.warnings if "frequency window" in w]
    assert "first at z = " in note and remedy in note
    assert ("lower the energy or pressure" in note) == widest


def test_ionisation_runaway(argon):
    grid = Grid(points=2**10, dt=2e-15, omega0=2 * np.pi * c / 800e-9)
    fiber = CapillaryFiber(core_radius=50e-6, length=0.01, gas=argon)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ValidityWarning)
        result = propagate(pulse_field(grid, "sech2", 30e-15, 60e-6), grid, fiber, gas=argon,
                           options=SolverOptions(stop_ionization_fraction=1e-3, z_samples=5))
    assert result.status == "ionization_stop"
    for fragment in ("exceeded the stop level 0.001 at z = ", "(step ", "ionisation runaway",
                     "remedy: lower the energy or the pressure"):
        assert fragment in result.message
    assert result.ionization_fraction_z[-1] > 1e-3  # the record at the stop is kept
    _kept(result, fiber.length)


def _arf_run(argon, wall: float, energy: float):
    grid = Grid(points=2**10, dt=2e-15, omega0=OMEGA_1030)
    fiber = AntiresonantFiber(core_radius=25e-6, wall_thickness=wall, length=0.1, gas=argon)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ValidityWarning)
        options = SolverOptions(rtol=1e-5, z_samples=11, ionization_model=None)
        return propagate(pulse_field(grid, "sech2", 30e-15, energy), grid, fiber, gas=argon,
                         options=options), fiber


def test_recorder_values_are_the_plain_numpy_ones(argon):
    # consistency: the recorder's compiled passes give what the numpy expressions of its
    # docstring give (energy, peak power, bandwidth, energy at the window edges, energy and
    # centre in the wall-resonance bands), on a spectrum that reaches the edges and a band
    from hcfplan.propagation.result import BANDWIDTH_LEVEL_DB, EDGE_ZONE, Recorder
    from hcfplan.pulse.metrics import spectral_width

    grid = Grid(points=2**10, dt=2e-15, omega0=OMEGA_1030)
    fiber = AntiresonantFiber(core_radius=25e-6, wall_thickness=0.93e-6, length=0.1, gas=argon)
    rng = np.random.default_rng(8)
    u = (rng.standard_normal(grid.points) + 1j * rng.standard_normal(grid.points)) * 1e-12
    u *= np.exp(-((grid.domega * 2e-15) ** 2))  # a broad spectrum, still above zero at the edges
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ValidityWarning)  # the Ar fit beyond 1000 nm
        recorder = Recorder(grid, 2, 1e-9, None, fiber)
        band = fiber.in_resonance_band(grid.omega, 0.05)
    recorder.record(0.0, u)
    density = np.abs(u) ** 2
    power = np.abs(grid.to_time(u)) ** 2
    energy = np.sum(density) * grid.dnu
    np.testing.assert_array_equal(recorder.spectra[0], density.astype(np.float32))
    assert recorder.values["energy"][0] == pytest.approx(energy, rel=1e-12)
    # the peak is that of the band-limited envelope (between the samples), as documented
    from hcfplan.pulse.metrics import peak_power

    assert recorder.values["peak_power"][0] == pytest.approx(peak_power(grid.to_time(u)), 1e-9)
    assert recorder.values["peak_power"][0] >= power.max()
    assert recorder.values["bandwidth"][0] == pytest.approx(
        spectral_width(grid.frequency, density, BANDWIDTH_LEVEL_DB), rel=1e-12)
    far = np.abs(grid.domega) > (1 - 2 * EDGE_ZONE) * np.pi / grid.dt
    assert recorder.edge_frequency.largest == pytest.approx(
        np.sum(density[far]) * grid.dnu / energy, rel=1e-12)
    k = np.arange(grid.points)
    outer = (k < EDGE_ZONE * grid.points) | (k >= (1 - EDGE_ZONE) * grid.points)
    assert recorder.edge_time.largest == pytest.approx(
        np.sum(power[outer]) * grid.dt / energy, rel=1e-12)
    assert band.any() and recorder.resonance.largest == pytest.approx(
        np.sum(density[band]) * grid.dnu / energy, rel=1e-12)
    assert recorder.resonance.where == pytest.approx(
        np.sum(grid.wavelength[band] * density[band]) / np.sum(density[band]), rel=1e-12)


def test_resonance_band_warning(argon):
    # wall 0.93 um: the m = 2 resonance lies near 977 nm, 5 % from the 1030 nm pump
    result, fiber = _arf_run(argon, 0.93e-6, 1e-6)
    (note,) = [w for w in result.warnings if "resonance band" in w]
    lam2 = fiber.resonance_wavelengths(2)[1]
    assert f"order m = 2 around {lam2 * 1e9:.0f} nm" in note
    assert "first above 0.001 at z = 0 m" in note
    assert "a thinner wall moves it to shorter wavelengths" in note
    assert "lower the broadening" in note


def _recorder_with_resonances(argon, resonances, where):
    # a recorder whose resonance wavelengths are given (nan: outside the material tables, as
    # the glass fit returns far below its range) and whose band threshold was crossed
    from hcfplan.propagation.result import Recorder

    grid = Grid(points=2**8, dt=2e-15, omega0=OMEGA_1030)
    fiber = AntiresonantFiber(core_radius=25e-6, wall_thickness=0.93e-6, length=0.1, gas=argon)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ValidityWarning)
        recorder = Recorder(grid, 2, 1e-9, None, fiber)
    recorder._resonances = np.asarray(resonances, dtype=float)
    recorder.resonance.update(0.01, 0.05, where)
    return recorder


@pytest.mark.parametrize(("resonances", "where", "expected"), [
    # energy near a band whose wavelength is nan: no order or wavelength invented, no nan
    ([1294e-9, 647e-9, np.nan, np.nan], 300e-9, "a wall-resonance band of order m >= 3 (its"),
    # energy in a known band beside unknown ones: that band, by its order and wavelength
    ([1294e-9, 647e-9, np.nan, np.nan], 650e-9, "order m = 2 around 647 nm"),
    # no finite resonance at all
    ([np.nan, np.nan], 500e-9, "a wall-resonance band (its resonance wavelength lies outside"),
    # no centre recorded: the first finite band, never the first (nan) entry
    ([np.nan, 647e-9], np.nan, "order m = 2 around 647 nm"),
])
def test_resonance_warning_never_prints_nan(argon, resonances, where, expected):
    recorder = _recorder_with_resonances(argon, resonances, where)
    (note,) = [w for w in recorder.edge_warnings() if "resonance band" in w]
    assert re.search(r"\bnan\b", note.lower()) is None
    assert expected in note
    assert "first above 0.001 at z = 0.05 m" in note and "remedy" in note


def test_no_resonance_warning_in_the_window(argon):
    # wall 0.7 um: resonances near 1460 and 739 nm, a weak pulse stays between them
    result, _ = _arf_run(argon, 0.70e-6, 1e-7)
    assert result.success and not [w for w in result.warnings if "resonance band" in w]
