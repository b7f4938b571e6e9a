"""The chain of a multimode capillary run (``fiber.modes`` > 1): the launch on the modes, the
summary keys and arrays, the whole-beam compressed pulse, the verdict's EH11 check, and
``fiber.modes = 1`` left on the single-mode path.

Invariant and contract tests (no external source needed, each says what it checks); the
coupling fractions themselves are checked against independent overlap integrals in
tests/fibers/test_capillary_modes.py.
"""

from __future__ import annotations

import numpy as np
import pytest
from fast_cases import TINY, write_multimode_config

from hcfplan.errors import ConfigError
from hcfplan.fibers.capillary_modes import eh_launch_amplitudes
from hcfplan.io.config import load_config
from hcfplan.planning.chain import field_arrays, run_chain, summary_dict
from hcfplan.planning.verdict import flat_summary, verdict_of_summary


@pytest.fixture(scope="module")
def multimode(tmp_path_factory):
    """(config, chain, flat summary, arrays) of the fast three-mode run."""
    config = load_config(write_multimode_config(tmp_path_factory.mktemp("mm")))
    chain = run_chain(config)
    return config, chain, flat_summary(summary_dict(chain)), field_arrays(chain)


def test_modes_one_stays_on_the_single_mode_path(tmp_path, monkeypatch):
    # contract: fiber.modes = 1 (given or default) runs propagate(), never the multimode
    # solver, and gives the same summary and arrays as a config without the key
    import hcfplan.propagation.multimode as multimode

    def refuse(*args, **kwargs):
        raise AssertionError("propagate_modes called for fiber.modes = 1")

    monkeypatch.setattr(multimode, "propagate_modes", refuse)
    (tmp_path / "tiny.toml").write_text(TINY, encoding="utf-8")
    plain = run_chain(load_config(tmp_path / "tiny.toml"))
    one = run_chain(load_config(tmp_path / "tiny.toml", overrides=["fiber.modes=1"]))
    assert plain.modes is None and one.modes is None
    flat_plain, flat_one = flat_summary(summary_dict(plain)), flat_summary(summary_dict(one))
    assert not any("mode" in k or "eh11" in k or ".beam_" in k for k in flat_one
                   if not k.startswith(("config.", "fiber.loss", "limits.")))
    volatile = {"config.fiber.modes"}
    assert {k: v for k, v in flat_one.items() if k not in volatile} == \
        {k: v for k, v in flat_plain.items() if k not in volatile}
    arrays_plain, arrays_one = field_arrays(plain), field_arrays(one)
    assert arrays_plain.keys() == arrays_one.keys()
    for key, value in arrays_plain.items():
        np.testing.assert_array_equal(arrays_one[key], value)


def test_launch_projects_the_whole_pulse_energy_on_the_modes(multimode):
    # invariant: mode m starts with laser.energy x c_m^2 (the Gaussian beam's share), the
    # shares are those of eh_launch_amplitudes, and the rest is reported lost
    config, chain, flat, arrays = multimode
    c = eh_launch_amplitudes(config.laser.beam_waist, config.fiber.core_radius, 3)
    assert flat["input.mode_fractions"] == pytest.approx(list(c**2), rel=1e-12)
    assert flat["input.lost_fraction"] == pytest.approx(1 - np.sum(c**2), abs=1e-12)
    assert flat["input.lost_fraction"] > 0
    np.testing.assert_allclose(arrays["mode_energy_z_j"][0], config.laser.energy * c**2,
                               rtol=1e-6)
    np.testing.assert_allclose(arrays["mode_launch_amplitudes"], c, rtol=1e-12)
    # the EH11 part is launched as a single-mode run launches it
    assert flat["input.launched_energy_j"] == pytest.approx(config.laser.energy * c[0] ** 2,
                                                            rel=1e-9)
    assert flat["input.launched_beam_energy_j"] == pytest.approx(
        config.laser.energy * np.sum(c**2), rel=1e-12)


def test_exit_shares_and_arrays_are_consistent(multimode):
    # invariant: the exit shares are the last row of mode_energy_z_j over its sum, which is
    # the whole beam's exit energy; the whole beam's spectrum is the modes' spectra summed
    config, chain, flat, arrays = multimode
    grid = chain.grid
    energies = arrays["mode_energy_z_j"]
    assert energies.shape == (len(arrays["z_m"]), 3)
    shares = energies[-1] / energies[-1].sum()
    assert flat["output.mode_fractions"] == pytest.approx(list(shares), rel=1e-12)
    assert flat["output.eh11_fraction"] == pytest.approx(shares[0], rel=1e-12)
    # the lowest EH11 share along the fiber: of every row, so at most the launch and exit ones
    along = energies[:, 0] / energies.sum(axis=1)
    assert flat["output.eh11_fraction_lowest"] == pytest.approx(along.min(), rel=1e-12)
    assert flat["output.eh11_fraction_lowest"] <= min(along[0], shares[0])
    assert sum(flat["output.mode_fractions"]) == pytest.approx(1.0, rel=1e-12)
    assert flat["output.energy_j"] == pytest.approx(energies[-1].sum(), rel=1e-6)
    spectra = arrays["mode_field_out_spectrum"]
    assert spectra.shape == (3, grid.points)
    np.testing.assert_allclose(arrays["beam_spectrum_out"],
                               np.sum(np.abs(spectra) ** 2, axis=0), rtol=1e-12)
    assert np.sum(arrays["beam_spectrum_out"]) * grid.dnu == pytest.approx(
        flat["output.energy_j"], rel=1e-6)
    # the EH11 mode's exit spectrum is the field_out_spectrum the single-mode keys read
    np.testing.assert_allclose(spectra[0], arrays["field_out_spectrum"], rtol=1e-12)


def test_whole_beam_compression_applies_the_eh11_compressor_to_every_mode(multimode):
    # invariant: mode 1 through the compressor chosen for EH11 is the EH11 compressed pulse
    # itself; the whole beam's energy is the modes' energies after the same losses, and its
    # power is the sum of the modes' powers
    config, chain, flat, arrays = multimode
    beam = chain.modes.beam
    np.testing.assert_allclose(beam.fields_t[0], chain.compression.field_t,
                               atol=1e-9 * np.abs(chain.compression.field_t).max())
    np.testing.assert_allclose(arrays["beam_compressed_power_w"],
                               np.sum(np.abs(beam.fields_t) ** 2, axis=0), rtol=1e-12)
    assert flat["compressed.beam_energy_j"] >= flat["compressed.energy_j"]
    throughput = flat["compressed.energy_j"] / chain.grid.energy_w(
        chain.propagation.mode_spectra_out[0])
    assert flat["compressed.beam_energy_j"] == pytest.approx(
        throughput * flat["output.energy_j"], rel=1e-6)
    assert flat["compressed.beam_peak_power_w"] == pytest.approx(
        np.max(arrays["beam_compressed_power_w"]), rel=0.02)
    assert flat["compressed.beam_fwhm_s"] > 0
    assert flat["compressed.part"].startswith("EH11 mode")


def test_low_eh11_share_gets_the_caution(tmp_path):
    # contract: a focus far below the optimum (w0 = 0.3 a) puts most of the beam into higher
    # modes; the verdict then carries eh11_fraction_low (a caution, nothing void)
    config = load_config(write_multimode_config(tmp_path, waist_um=37.5))
    summary = summary_dict(run_chain(config))
    eh11 = summary["output"]["eh11_fraction"]
    assert eh11 < 0.9
    codes = [r["code"] for r in summary["verdict"]["reasons"]]
    assert "eh11_fraction_low" in codes
    assert summary["verdict"]["status"] in ("caution", "invalid")
    assert verdict_of_summary(summary).codes == tuple(codes)


@pytest.mark.parametrize(("fraction", "expected"), [(0.95, []), (0.9, []),
                                                    (0.89, ["eh11_fraction_low"])])
def test_eh11_check_level(fraction, expected):
    # contract: the caution starts below EH11_FRACTION_FLOOR = 0.9 (common practice, no source)
    from hcfplan.planning.verdict_modes import check_eh11_fraction

    reasons = check_eh11_fraction({"output.eh11_fraction": fraction}, {})
    assert [r.code for r in reasons] == expected
    assert check_eh11_fraction({}, {}) == []  # a single-mode run has no share


def test_staged_config_refuses_several_modes(tmp_path):
    from fast_cases import FAST_CONFIG, two_stage_text

    second = ("[[stage]]\n[stage.fiber]\nkind = \"capillary\"\ncore_diameter_um = 250.0\n"
              "length_m = 0.3\nmodes = 2\n[stage.gas]\nspecies = \"He\"\npressure_bar = 2.0\n")
    text = two_stage_text(FAST_CONFIG.format(energy_uj=200.0, rated_bar=20.0), second)
    (tmp_path / "two.toml").write_text(text, encoding="utf-8")
    with pytest.raises(ConfigError, match=r"stage\.1\.fiber\.modes = 2: cascaded stages"):
        load_config(tmp_path / "two.toml")


def test_modes_key_reaches_the_spec(tmp_path):
    config = load_config(write_multimode_config(tmp_path, modes=4))
    assert config.fiber.modes == 4 and config.fiber.mode_order == 1
    assert config.resolved["fiber"]["modes"] == 4
    (tmp_path / "tiny.toml").write_text(TINY, encoding="utf-8")
    assert load_config(tmp_path / "tiny.toml").fiber.modes == 1


def test_gradient_fill_with_equal_ends_is_the_static_run(tmp_path):
    # invariant: a gradient whose ends are both at the static pressure is that static fill
    # (one stretch of uniform fill, each with the N modes), so the exit shares agree
    path = write_multimode_config(tmp_path, modes=2)
    static = load_config(path)
    text = path.read_text().replace("pressure_bar = 0.5", "entrance_pressure_bar = 0.5\n"
                                    "exit_pressure_bar = 0.5")
    (tmp_path / "gradient.toml").write_text(text, encoding="utf-8")
    gradient = load_config(tmp_path / "gradient.toml")
    assert gradient.gas.is_gradient
    a = flat_summary(summary_dict(run_chain(static)))
    b = flat_summary(summary_dict(run_chain(gradient)))
    assert b["output.mode_fractions"] == pytest.approx(a["output.mode_fractions"], rel=1e-9)
    assert b["output.energy_j"] == pytest.approx(a["output.energy_j"], rel=1e-9)


def test_calibration_model_of_a_multimode_run_is_the_whole_beam(multimode):
    # contract: calibrate compares a measured spectrum with the whole beam (a spectrometer fed
    # with the whole beam), i.e. the modes' spectral densities summed
    from hcfplan.planning.calibrate import modelled_output

    config, chain, flat, arrays = multimode
    spectrum = modelled_output(config, chain.grid)
    np.testing.assert_allclose(np.abs(spectrum) ** 2, arrays["beam_spectrum_out"],
                               rtol=1e-3, atol=1e-3 * arrays["beam_spectrum_out"].max())
