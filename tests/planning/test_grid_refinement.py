"""Grids set by the spectrum, refined until converged (numerics.grid, planning.convergence).

Kinds: analytic invariant (the envelope's reference frequency is a choice: a window centred away
from the pump gives the same field), contract (the convergence checks and the refinement of a
grid the user did not fix), convergence (a default run against a run on a 4x finer, 2x longer
grid).
"""

from __future__ import annotations

import warnings

import numpy as np
import pytest
from propagation_cases import OMEGA0, T0, max_intensity_error

from hcfplan.errors import ConfigError, ValidityWarning
from hcfplan.fibers.taylor import TaylorFiber
from hcfplan.io.config import load_config
from hcfplan.numerics.grid import Grid, choose_grid
from hcfplan.planning.chain import run_chain, summary_dict
from hcfplan.planning.convergence import MIN_POINTS_PER_FWHM, assess_run
from hcfplan.propagation.options import SolverOptions
from hcfplan.propagation.solve import propagate
from hcfplan.pulse.fields import pulse_field

# --------------------------------------------------------------------------------------------
# the reference frequency is a choice (analytic invariant, common practice, no source)

#: Shift of the reference frequency in frequency bins of the textbook grid.
SHIFT_BINS = 37


def _pair(points=1024, window=40 * T0):
    pumped = Grid(points=points, dt=window / points, omega0=OMEGA0)
    shift = SHIFT_BINS * 2 * np.pi / window  # a whole number of bins: same absolute samples
    shifted = Grid(points=points, dt=window / points, omega0=OMEGA0 + shift, omega_pump=OMEGA0)
    return pumped, shifted


def _absolute_spectrum(grid: Grid, spectrum: np.ndarray) -> np.ndarray:
    """|A~|^2 in ascending absolute frequency, aligned on the pump-centred grid's samples."""
    power = grid.shifted(np.abs(spectrum) ** 2)
    offset = int(round((grid.omega0 - grid.omega_pump) * grid.time_window / (2 * np.pi)))
    return np.roll(power, offset)


@pytest.mark.parametrize("nonlinear", [False, True])
def test_shifted_reference_gives_the_same_field(nonlinear):
    # dispersion to third order, a chirped input and (second case) Kerr with self-steepening:
    # the envelope about a reference 37 bins above the pump is the pump-centred one times
    # exp(-i (omega_pump - omega0) t), so |A(t)|^2 and |A~|^2 on absolute frequency agree
    pumped, shifted = _pair()
    fiber = TaylorFiber(omega0=OMEGA0, betas=(-20e-27, 1e-40), gamma=1.3e-3 if nonlinear else 0.0,
                        length=0.5 * T0**2 / 20e-27, self_steepening=nonlinear)
    options = SolverOptions(rtol=1e-8, z_samples=3)
    runs = []
    for grid in (pumped, shifted):
        field = pulse_field(grid, "sech2", 1.76 * T0, 4e-12 if nonlinear else 1e-12, gdd=3e-25)
        runs.append(propagate(field, grid, fiber, options=options))
    a, b = runs
    assert a.success and b.success
    assert max_intensity_error(b.field_out_t, a.field_out_t) < 1e-9
    sa, sb = _absolute_spectrum(pumped, a.field_out_spectrum), _absolute_spectrum(
        shifted, b.field_out_spectrum)
    assert np.max(np.abs(sb - sa)) / np.max(sa) < 1e-9
    # the input carries the pump's carrier about the shifted reference
    centroid = np.sum(shifted.omega * np.abs(b.spectrum_z[0])) / np.sum(np.abs(b.spectrum_z[0]))
    assert centroid == pytest.approx(OMEGA0, rel=1e-6)


def test_grid_rejects_a_pump_outside_the_window():
    with pytest.raises(ConfigError, match="omega_pump"):
        Grid(points=64, dt=2e-15, omega0=3e15, omega_pump=7e15)  # window 1.4e15-4.6e15


def test_default_grid_is_centred_on_the_band_not_the_pump():
    # a few-cycle band around 800 nm: the window's lower edge stays above a quarter of the pump
    # frequency and the half window is no longer capped at 0.9 of the pump frequency
    pump = 2 * np.pi * 299792458.0 / 800e-9
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ValidityWarning)
        grid = choose_grid(pump, 30e-15, broadening_factor=8.0)
    assert grid.omega_pump == pump and grid.omega0 > pump
    assert grid.omega_low == pytest.approx(0.25 * pump)
    assert np.pi / grid.dt > 1.5 * pump
    # a band asked for (e.g. a dispersive wave at 200 nm) lies inside the window
    grid = choose_grid(pump, 100e-15, band=(pump, 4.2 * pump))
    assert grid.omega_high >= 4.2 * pump


# --------------------------------------------------------------------------------------------
# the Ti:sapphire case: 800 nm, 30 fs, 1 mJ, 250 um capillary, Ne 1.5 bar, 1 m

TISA = """
[laser]
wavelength_nm = 800.0
fwhm_fs = 30.0
shape = "gaussian"
energy_uj = 1000.0

[fiber]
kind = "capillary"
core_diameter_um = 250.0
length_m = 1.0

[gas]
species = "Ne"
pressure_bar = 1.5

[grid]
z_samples = 12
"""

#: Time step of the grid that centred the window on the pump and capped it at 0.1-1.9 omega0
#: (1024 points over 1.518 ps). [s]
OLD_DT = 1.4825e-15


def _load(tmp_path, text, overrides=()):
    path = tmp_path / "c.toml"
    path.write_text(text)
    return load_config(path, overrides=overrides)


@pytest.fixture(scope="module")
def tisa_runs(tmp_path_factory):
    folder = tmp_path_factory.mktemp("tisa")
    auto = run_chain(_load(folder, TISA))
    fixed = run_chain(_load(folder, TISA, ["grid.points=1024", "grid.time_window_fs=1518"]))
    return auto, fixed


def test_tisa_default_grid_is_fine_and_refined(tisa_runs):
    auto, _ = tisa_runs
    assert auto.propagation.success
    assert auto.grid.dt <= OLD_DT / 2  # measured 0.56 fs against 1.48 fs
    conv = auto.convergence
    assert conv.converged and not conv.grid_fixed
    assert conv.refinements >= 1 and len(conv.reasons) == conv.refinements
    summary = summary_dict(auto)["grid"]
    assert summary["refinements"] == conv.refinements
    assert summary["refinement_reasons"] == list(conv.reasons)
    assert all(isinstance(r, str) and r for r in summary["refinement_reasons"])
    # the refined run passes every check on its own
    again = assess_run(auto.grid, auto.propagation, auto.compression)
    assert again.passed
    tl = summary_dict(auto)["output"]["transform_limit_fwhm_s"]
    assert tl / auto.grid.dt >= MIN_POINTS_PER_FWHM


def test_user_fixed_grid_is_kept_and_its_failed_checks_reported(tisa_runs):
    _, fixed = tisa_runs
    conv = fixed.convergence
    assert fixed.grid.points == 1024 and fixed.grid.time_window == pytest.approx(1518e-15)
    assert conv.grid_fixed and conv.refinements == 0 and conv.reasons == ()
    assert not conv.converged
    names = {c.name for c in conv.failed}
    assert "pulse_sampling" in names  # 2.9 fs on 1.48 fs steps
    assert "unresolved_pulse" in conv.failed_codes
    summary = summary_dict(fixed)["grid"]
    assert summary["refinements"] == 0 and summary["converged"] is False


# --------------------------------------------------------------------------------------------
# convergence with grid size (a small case)

SMALL = """
[laser]
wavelength_nm = 800.0
fwhm_fs = 40.0
shape = "gaussian"
energy_uj = 150.0

[fiber]
kind = "capillary"
core_diameter_um = 250.0
length_m = 0.3

[gas]
species = "Ar"
pressure_bar = 0.5

[compressor]
mirror_gdd_fs2 = -20.0
max_bounces = 16

[grid]
z_samples = 6
"""


def test_default_run_agrees_with_a_finer_longer_grid(tmp_path):
    default = run_chain(_load(tmp_path, SMALL))
    grid = default.grid
    finer = run_chain(_load(tmp_path, SMALL, [
        f"grid.points={4 * grid.points}", f"grid.time_window_fs={2 * grid.time_window * 1e15}"]))
    assert default.convergence.converged
    assert finer.grid.dt == pytest.approx(grid.dt / 2)
    a, b = default.compression.metrics, finer.compression.metrics
    assert a.fwhm == pytest.approx(b.fwhm, rel=0.01)
    assert a.transform_limited_fwhm == pytest.approx(b.transform_limited_fwhm, rel=0.01)


def test_center_wavelength_fixes_the_window_centre():
    """Contract: ``grid.center_wavelength_nm`` with points and time window fixes the whole grid
    (centre, step, count); a centre whose window would reach zero frequency is refused naming
    the key. Analytic: omega0 = 2 pi c / lambda_c."""
    from hcfplan.constants import c
    from hcfplan.errors import ConfigError
    from hcfplan.numerics.grid import choose_grid

    pump = 2 * np.pi * c / 800e-9
    centre = 2 * np.pi * c / 600e-9
    grid = choose_grid(pump, 30e-15, points=4096, time_window=8e-12, center=centre)
    assert grid.omega0 == pytest.approx(centre, rel=1e-12)
    assert grid.points == 4096 and grid.dt == pytest.approx(8e-12 / 4096, rel=1e-12)
    assert grid.omega_pump == pytest.approx(pump, rel=1e-12)
    with pytest.raises(ConfigError, match="grid.center_wavelength_nm"):
        choose_grid(pump, 30e-15, points=4096, time_window=0.5e-12, center=centre)
