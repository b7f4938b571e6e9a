"""Tests of the operating-envelope map (hcfplan.planning.envelope) and its figure."""

from __future__ import annotations

import dataclasses
import json
import math
from pathlib import Path

import numpy as np
import pytest

from hcfplan.errors import ConfigError
from hcfplan.fibers import derived
from hcfplan.io.config import load_config
from hcfplan.ionization.fraction import pulse_ionization_fraction
from hcfplan.limits import beam as limits
from hcfplan.materials.gases import GasFill, gas_medium
from hcfplan.planning.build import build_medium, build_waveguide, coupling, pump_omega
from hcfplan.planning.envelope import envelope_json, envelope_map, thz_cutoff_gaussian_estimate
from hcfplan.planning.reports.limits_gas import weighted_rates
from hcfplan.planning.validity import quiet_validity
from hcfplan.pulse import fields as pulse

CONFIGS = {p.stem: p for p in
           sorted((Path(__file__).resolve().parents[2] / "configs").glob("*.toml"))}


@pytest.fixture(scope="module", params=["tisa_capillary_neon", "yb_capillary_mixture",
                                        "yb_arf_argon"])
def mapped(request):
    config = load_config(CONFIGS[request.param])
    return config, envelope_map(config, points=(100, 100))


def test_map_shapes_and_axes(mapped):
    """A 100 x 100 map runs (no timing asserted: bench/envelope.py times it)."""
    config, result = mapped
    assert result.soliton_order.shape == result.compressed_duration.shape == (100, 100)
    assert result.energies[0] == pytest.approx(0.05 * config.laser.energy)
    assert result.energies[-1] == pytest.approx(5 * config.laser.energy)
    assert result.pressures[0] == pytest.approx(0.05 * config.gas.pressure)
    top = min(3 * config.gas.pressure, 1.2 * config.cell.rated_pressure)
    assert result.pressures[-1] == pytest.approx(top)
    assert result.rated_pressure == config.cell.rated_pressure  # the rating line
    assert np.all(np.isfinite(result.compressed_duration))
    json.dumps(envelope_json(result), allow_nan=False)


@pytest.mark.parametrize("index", [0, 37, 99])
def test_self_focusing_line_matches_point_function(mapped, index):
    """Invariant: the map's line equals max_energy_for_self_focusing with a fresh real-gas
    medium at that pressure (mixtures: density interpolated along the axis, to 1e-6)."""
    config, result = mapped
    p = float(result.pressures[index])
    with quiet_validity():
        medium = gas_medium(GasFill(config.gas.components, p, config.gas.temperature))
        n0 = float(medium.refractive_index(np.array([pump_omega(config.laser)]))[0])
    critical = limits.self_focusing_power(config.laser.wavelength, n0, medium.n2)
    expected = limits.max_energy_for_self_focusing(
        critical, config.laser.duration_fwhm, config.laser.shape,
        margin=config.limits.self_focusing_margin, coupling_efficiency=coupling(config)[0])
    assert result.self_focusing_max_energy[index] == pytest.approx(expected, rel=1e-6)


def test_zero_dispersion_pressure_matches_derived():
    """Invariant: the ZDW pressure of the map agrees with derived.zero_dispersion_pressure
    (fresh gas medium per pressure, adaptive derivatives)."""
    config = load_config(CONFIGS["tisa_capillary_neon"])
    result = envelope_map(config, points=(10, 60))
    assert math.isfinite(result.zero_dispersion_pressure)

    def fiber_at(p):
        return build_waveguide(config.fiber,
                               build_medium(dataclasses.replace(config.gas, pressure=p)),
                               pump_omega(config.laser))

    with quiet_validity():
        reference = derived.zero_dispersion_pressure(fiber_at, pump_omega(config.laser),
                                                     (result.pressures[0], result.pressures[-1]))
    assert result.zero_dispersion_pressure == pytest.approx(reference, rel=1e-3)
    # and beta2 changes sign there: anomalous below, normal above
    below = result.beta2[result.pressures < reference]
    above = result.beta2[result.pressures > reference]
    assert np.all(below < 0) and np.all(above > 0)


def test_ionization_line_flat_and_at_limit(mapped):
    """Analytic: the per-atom fraction does not depend on density, so the line is flat, and at
    its energy the coupled EH11 intensity gives the limit fraction."""
    config, result = mapped
    assert np.ptp(result.ionization_max_energy) == 0.0
    laser = config.laser
    with quiet_validity():
        medium = build_medium(config.gas)
        area = build_waveguide(config.fiber, medium, pump_omega(laser)).peak_intensity_area
    power = pulse.peak_power_from_energy(result.ionization_max_energy[0] * coupling(config)[0],
                                         laser.duration_fwhm, laser.shape)
    rates = weighted_rates(medium, laser.wavelength, config.gas.ionization_model)
    fraction = pulse_ionization_fraction(power / area, laser.duration_fwhm, laser.shape, rates)
    assert fraction == pytest.approx(config.limits.ionization_fraction_limit, rel=1e-8)


@pytest.mark.parametrize(("level", "quantity"), [(-20.0, "power"), (-10.0, "power"),
                                                  (-20.0, "field")])
def test_thz_cutoff_estimate(level, quantity):
    """Analytic: for |E| = Omega exp(-Omega^2 tau^2 / (16 ln 2)) the share of the integral of
    |E|^p (p = 2 "power", p = 1 "field") above the returned frequency is 10^(level/10)
    (quadrature), the definition of the chain's cutoff (hcfplan.thz.measures.thz_cutoff)."""
    from scipy.integrate import quad

    tau = 10e-15
    f = thz_cutoff_gaussian_estimate(tau, level, quantity)
    p = 2 if quantity == "power" else 1

    def integrand(w):
        return (w * math.exp(-(w**2) * tau**2 / (16 * math.log(2)))) ** p

    scale = 1 / tau
    total = quad(integrand, 0, 40 * scale)[0]
    above = quad(integrand, 2 * math.pi * f, 40 * scale)[0]
    assert above / total == pytest.approx(10 ** (level / 10), rel=1e-6)
    if (level, quantity) == (-20.0, "power"):
        assert f * tau == pytest.approx(0.8926, abs=1e-4)


def test_taylor_has_no_envelope():
    config = load_config(CONFIGS["taylor_pcf_check"])
    with pytest.raises(ConfigError, match=r"'taylor'"):
        envelope_map(config)


def test_plot_envelope_draws(mapped):
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    from hcfplan.plotting.envelope import plot_envelope

    _, result = mapped
    fig, ax = plt.subplots()
    assert plot_envelope(ax, result, contours="both") is ax
    assert ax.get_yscale() == "log"
    assert "estimates" in ax.get_legend().get_title().get_text()
    plt.close(fig)


def test_thz_cutoff_only_within_the_crystal_model():
    """The GaP model stops at 20 THz (its crystal table); estimates above are no
    cutoffs: null in the JSON, printed as "above the model's range", no contour drawn."""
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    from hcfplan.planning.thz_range import estimate_cutoff_text
    from hcfplan.plotting.envelope import plot_envelope

    config = load_config(CONFIGS["yb_capillary_mixture"])
    result = envelope_map(config, points=(30, 30))
    assert result.thz_model_limit == pytest.approx(20e12) and result.thz_model == "GaP"
    assert np.nanmax(result.thz_cutoff) > 20e12  # the map reaches beyond the model
    data = envelope_json(result)
    assert data["envelope.thz_model_limit_hz"] == pytest.approx(20e12)
    cut = np.array([[np.nan if v is None else v for v in row]
                    for row in data["envelope.thz_cutoff_hz"]])
    beyond = np.asarray(result.thz_cutoff) > 20e12
    assert np.all(np.isnan(cut[beyond])) and np.all(cut[~beyond] <= 20e12)
    assert "above the GaP model's range (> 20 THz)" in data["envelope.thz_cutoff_note"]
    assert any("above the GaP model's range (> 20 THz)" in n for n in result.notes)
    fig, ax = plt.subplots()
    plot_envelope(ax, result, contours="cutoff")
    labels = [t.get_text() for t in ax.texts]
    drawn = [float(t.split()[0]) for t in labels if "THz (SPM-only)" in t]
    assert drawn and max(drawn) < 20
    legend = [t.get_text() for t in ax.get_legend().get_texts()]
    assert any("beyond the GaP model (> 20 THz)" in t for t in legend)
    plt.close(fig)
    assert estimate_cutoff_text(50e12, 20e12) == "above the model's range (> 20 THz)"
    assert estimate_cutoff_text(12.34e12, 20e12) == "12.3 THz"
    assert estimate_cutoff_text(math.nan, 20e12) == "void"


def test_single_wavelength_range_note_prints_once():
    from hcfplan.planning import validity

    note = validity._note("argon fit", 400e-9, 1000e-9, (1030e-9, 1030e-9), "the pump")
    assert note.endswith("the pump (1030 nm) is extrapolated") and "1030-1030" not in note
    band = validity._note("argon fit", 400e-9, 1000e-9, (300e-9, 1030e-9), "the spectrum")
    assert "the spectrum (300-1030 nm) is extrapolated" in band
