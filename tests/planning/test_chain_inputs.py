"""The chain's optional inputs: measured input spectrum, measured mirror GDD curve, wedge trim,
and the fixed compressor elements (exit window, air path) against their published GVD.

Kinds: invariant (a constant-GDD curve equals the constant per-bounce GDD), published value
(fused-silica and air GVD), contract (the options are honoured).
"""

from __future__ import annotations

import math
from pathlib import Path

import numpy as np
import pytest
from fast_cases import FAST

from hcfplan.constants import c
from hcfplan.io.config import load_config
from hcfplan.numerics.grid import Grid
from hcfplan.planning.chain import fixed_phase, run_chain

ROOT = Path(__file__).resolve().parents[2]


def _config(tmp_path, text, overrides=()):
    path = tmp_path / "c.toml"
    path.write_text(text)
    return load_config(path, overrides=overrides)


def _gdd_at_pump(grid, phase):
    from hcfplan.compression.elements import phase_derivatives_at

    return phase_derivatives_at(grid.omega, grid.omega0, phase)[2]


def test_window_gdd_is_thickness_times_malitson_gvd(tmp_path):
    # published value: fused silica GVD at 800 nm = 36.16 fs^2/mm from the Sellmeier fit of
    # I. H. Malitson, J. Opt. Soc. Am. 55, 1205 (1965) (36.2 fs^2/mm to the digits usually
    # quoted); a 1 mm window with no air path must give that GDD
    cfg = _config(tmp_path, FAST, ["compressor.air_path_m=0.0"])
    grid = Grid(4096, 2e-15, 2 * math.pi * c / 800e-9)
    gdd = _gdd_at_pump(grid, fixed_phase(cfg, grid))
    assert gdd / 1e-30 == pytest.approx(36.16, abs=0.05)


def test_air_path_gvd_near_20_fs2_per_m(tmp_path):
    # published value: standard-air dispersion of P. E. Ciddor, Appl. Opt. 35, 1566 (1996),
    # scaled to 20 degC and 1 atm, gives a GVD of about 20 fs^2/m at 800 nm (common figure;
    # the Borzsonyi 2008 air fit at 0 degC, 1 bar gives 21.5 fs^2/m). Tolerance 5 %.
    cfg = _config(tmp_path, FAST, ["cell.window_thickness_mm=0.0", "compressor.air_path_m=2.0"])
    grid = Grid(4096, 2e-15, 2 * math.pi * c / 800e-9)
    gdd_per_m = _gdd_at_pump(grid, fixed_phase(cfg, grid)) / 2.0
    assert gdd_per_m / 1e-30 == pytest.approx(20.0, rel=0.05)


def test_constant_gdd_curve_equals_constant_mirrors(tmp_path):
    # invariant: a measured curve that is flat at -40 fs^2 per bounce compresses exactly like
    # compressor.mirror_gdd_fs2 = -40
    curve = tmp_path / "mirror.csv"
    wl = np.linspace(500.0, 1300.0, 161)
    curve.write_text("wavelength_nm,gdd_fs2\n" + "\n".join(f"{w:.2f},-40.0" for w in wl))
    base = _config(tmp_path, FAST, ["grid.points=1024"])
    text = FAST.replace("mirror_gdd_fs2 = -40.0", f'mirror_gdd_csv = "{curve}"')
    measured = _config(tmp_path, text, ["grid.points=1024"])
    a, b = run_chain(base), run_chain(measured)
    assert b.compression.bounces == a.compression.bounces
    assert b.compression.metrics.peak_power == pytest.approx(a.compression.metrics.peak_power,
                                                             rel=1e-6)


def test_measured_input_spectrum_sets_the_launched_energy(tmp_path):
    # contract: laser.spectrum_csv replaces the analytic shape; the launched energy is the
    # configured energy times the coupling efficiency
    csv = ROOT / "configs" / "demo_broadened_spectrum.csv"
    text = FAST.replace('shape = "gaussian"', f'spectrum_csv = "{csv}"').replace(
        "wavelength_nm = 800.0", "wavelength_nm = 1030.0")
    cfg = _config(tmp_path, text, ["grid.points=2048", "fiber.length_m=0.05"])
    chain = run_chain(cfg)
    assert chain.propagation.success
    assert chain.propagation.energy_z[0] == pytest.approx(chain.launched_energy, rel=1e-6)
    assert chain.launched_energy == pytest.approx(cfg.laser.energy * chain.coupling_efficiency)


def test_wedge_trim_is_used(tmp_path):
    # contract: with a wedge pair configured the trim insertion is chosen within its bounds
    text = FAST.replace("bounces_in_pairs = true", 'bounces_in_pairs = true\n'
                        'wedge_material = "fused_silica"\nwedge_max_insertion_mm = 3.0')
    chain = run_chain(_config(tmp_path, text, ["grid.points=1024"]))
    assert 0.0 <= chain.compression.trim_insertion <= 3e-3


# ---------------------------------------------------------------------------------------------
# The run reads no file: measured curves travel in the config as arrays


def test_run_needs_no_file_after_loading(tmp_path):
    # contract: the measured spectrum and mirror GDD curve are read by load_config; deleting
    # both files afterwards leaves the run unchanged (run_chain does no file I/O)
    spectrum = tmp_path / "spectrum.csv"
    spectrum.write_text((ROOT / "configs" / "demo_broadened_spectrum.csv").read_text())
    curve = tmp_path / "mirror.csv"
    wl = np.linspace(800.0, 1300.0, 101)
    curve.write_text("wavelength_nm,gdd_fs2\n" + "\n".join(f"{w:.2f},-40.0" for w in wl))
    text = (FAST.replace('shape = "gaussian"', 'spectrum_csv = "spectrum.csv"')
            .replace("wavelength_nm = 800.0", "wavelength_nm = 1030.0")
            .replace("mirror_gdd_fs2 = -40.0", 'mirror_gdd_csv = "mirror.csv"'))
    cfg = _config(tmp_path, text, ["grid.points=1024", "fiber.length_m=0.05"])
    spectrum.unlink()
    curve.unlink()
    chain = run_chain(cfg)
    assert chain.propagation.success
    assert chain.compression is not None
    assert cfg.laser.spectrum.source == spectrum
    assert cfg.laser.spectrum.wavelength[0] == pytest.approx(900e-9)  # first line of the file
    assert cfg.compressor.mirror_gdd_curve.values[0] == pytest.approx(-40e-30)  # fs^2 -> s^2
    assert not cfg.laser.spectrum.values.flags.writeable


# ---------------------------------------------------------------------------------------------
# Input errors found only when the physics is built: one ConfigError naming the user's keys

RUN_ERRORS = [
    # (overrides of FAST, fragment of the message: the keys and values as the user wrote them)
    (["fiber.bend_radius_m=0.1"],
     "fiber.length_m = 0.3 with fiber.core_diameter_um = 250.0, fiber.mode = EH11, "
     "fiber.bend_radius_m = 0.1: the linear loss at the pump (laser.wavelength_nm = 800.0) is"),
    (["fiber.core_diameter_um=2.0"],
     "fiber.length_m = 0.3 with fiber.core_diameter_um = 2.0, fiber.mode = EH11: the linear "
     "loss"),
    (["fiber.length_m=100.0", "fiber.core_diameter_um=50.0"],
     "fiber.length_m = 100.0 with fiber.core_diameter_um = 50.0"),
    (["gas.pressure_bar=1.0", "gas.temperature_k=85.0"],
     "gas.pressure_bar = 1, gas.temperature_k = 85: Ar at 1 bar and 85 K would be liquid"),
]


@pytest.mark.parametrize("overrides,fragment", RUN_ERRORS, ids=[r[0][0] for r in RUN_ERRORS])
def test_run_input_error_names_the_keys(tmp_path, overrides, fragment):
    from hcfplan.errors import ConfigError

    cfg = _config(tmp_path, FAST, ["grid.points=512", *overrides])
    with pytest.raises(ConfigError) as info:
        run_chain(cfg)
    message = str(info.value)
    assert fragment in message
    assert "\n" not in message and len(message) < 500
    assert "core_radius" not in message  # no internal SI parameter


def test_taylor_loss_that_leaves_no_light_names_the_loss_key(tmp_path):
    # analytic: 1e4 dB/m over 0.1 m is 1000 dB, beyond MAX_FIBER_LOSS_DB (300 dB)
    from hcfplan.errors import ConfigError

    text = (ROOT / "configs" / "taylor_pcf_check.toml").read_text()
    cfg = _config(tmp_path, text, ["grid.points=512", "grid.time_window_fs=3000.0",
                                   "fiber.loss_db_per_m=10000.0", "fiber.length_m=0.1"])
    with pytest.raises(ConfigError, match=r"^fiber\.length_m = 0\.1 with "
                       r"fiber\.loss_db_per_m = 10000\.0: the linear loss at the pump "
                       r"\(laser\.wavelength_nm = 835\.0\) is 1e\+04 dB/m, 1000 dB over the "
                       r"fiber; above 300 dB"):
        run_chain(cfg)


# ---------------------------------------------------------------------------------------------
# Warnings: hcfplan's own keep their text, any other says where it comes from


def _module_function(module: str, source: str, name: str):
    """A function defined in (a stand-in for) the module ``module``, as its frames report."""
    namespace = {"__name__": module, "np": np}
    exec(compile(source, f"<{module}>", "exec"), namespace)  # noqa: S102 (test helper)
    return namespace[name]


def test_numpy_warning_in_a_run_names_numpy_and_the_module(tmp_path, monkeypatch):
    # contract: a numpy floating-point warning raised inside a run reaches the run's warning
    # list as "numpy (in <hcfplan module>): <numpy's text>"
    import hcfplan.planning.fiber_run as fiber_run_module  # the fiber part of run_chain

    check = _module_function("hcfplan.fibers.stand_in", (
        "def check(config, waveguide, omega0):\n"
        "    return float(np.sqrt(np.array(-1.0)))\n"), "check")
    monkeypatch.setattr(fiber_run_module, "check_transmission", check)
    chain = run_chain(_config(tmp_path, FAST, ["grid.points=512", "fiber.length_m=0.05"]))
    assert "numpy (in hcfplan.fibers.stand_in): invalid value encountered in sqrt" in \
        chain.warnings


def test_warning_lines_by_origin():
    import warnings

    import scipy.integrate

    from hcfplan.errors import ValidityWarning
    from hcfplan.planning.validity import collect_warnings

    divide = _module_function("hcfplan.thz.stand_in", (
        "def divide(x):\n"
        "    return np.array([1.0]) / x\n"), "divide")
    with collect_warnings() as lines:
        divide(np.array([0.0]))
        warnings.warn("fit used outside 400-1000 nm", ValidityWarning, stacklevel=1)
        scipy.integrate.quad(lambda x: abs(x - 0.3) ** -0.5, 0.0, 1.0, limit=1)
    assert lines[0] == "numpy (in hcfplan.thz.stand_in): divide by zero encountered in divide"
    assert lines[1] == "fit used outside 400-1000 nm"
    assert lines[2].startswith("scipy (in scipy.integrate.")
    assert len(lines) == 3
