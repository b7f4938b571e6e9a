"""Tests of the THz cutoff: its definition, the crystal model's range, its smoothness over a
pressure scan and its independence of the optical grid (hcfplan.thz.measures,
hcfplan.thz.sampling, hcfplan.thz.generation, the THz part of the chain's summary).

Each numerical test states its kind (published value / analytic / invariant / convergence).
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

from hcfplan.constants import c
from hcfplan.materials.crystals import load_crystal
from hcfplan.numerics.grid import Grid
from hcfplan.thz.detection import EoDetector
from hcfplan.thz.generation import thz_estimate
from hcfplan.thz.measures import cutoff_definition, gaussian_pulse_cutoff, thz_cutoff
from hcfplan.thz.setup import ThzSetup

CONFIGS = Path(__file__).resolve().parents[2] / "configs"
TWO_PI = 2 * np.pi
LN2 = np.log(2.0)


def gaussian_pulse(duration, wavelength=0.8e-6, energy=1e-6, points=4096, dt=1.5e-15):
    """Transform-limited Gaussian of intensity FWHM ``duration`` [s] on a grid."""
    grid = Grid(points, dt, TWO_PI * c / wavelength)
    field = np.exp(-2 * LN2 * grid.time**2 / duration**2).astype(complex)
    field *= np.sqrt(energy / grid.energy_t(field))
    return grid, grid.to_spectrum(field)


def old_level_cutoff(frequency, power, level_db=-20.0):
    """The earlier definition, kept here only to show what it did: the highest sample at or
    above ``level_db`` of the peak."""
    p = power / power.max()
    return frequency[np.nonzero(p >= 10 ** (level_db / 10))[0][-1]]


# ----------------------------------------------------------------------------- definition


def test_definition_text():
    """The definition is stated in words with the level (common practice, no source)."""
    assert cutoff_definition(-20.0, "power") == (
        "99 % of the THz energy (power spectrum |E|^2) lies below it (-20 dB above)")
    assert cutoff_definition(-10.0, "field").startswith("90 % of the integral of the field")
    grid, spectrum = gaussian_pulse(100e-15, wavelength=1.03e-6, dt=2e-15)
    result = thz_estimate(grid, spectrum, ThzSetup(load_crystal("gap"), 0.3e-3))
    assert result.cutoff_definition.startswith(cutoff_definition(-20.0, "power"))
    assert "generated spectrum" in result.cutoff_definition


def test_quantile_does_not_hop_between_lobes():
    """Invariant: a main band and one weak far lobe (as a phase-mismatched crystal gives), the
    lobe's top just below -20 dB of the peak. Raising the lobe by 2 % moves the level crossing
    of the earlier definition from the main band's edge to the lobe (by 7.8 THz), while the
    energy quantile moves by less than 1 %."""
    f = np.linspace(0.0, 20e12, 20001)
    main = np.exp(-((f / 2e12) ** 2))
    lobe = np.where(np.abs(f - 12e12) < 1e12, np.sinc((f - 12e12) / 1e12) ** 2, 0.0)

    def spectrum(gain):
        return main + 0.0099 * (1 + gain) * lobe

    old = [old_level_cutoff(f, spectrum(g)) for g in (0.0, 0.02)]
    new = [thz_cutoff(f, spectrum(g))[0] for g in (0.0, 0.02)]
    assert old[1] - old[0] > 7e12  # the earlier definition hops to the lobe
    assert abs(new[1] - new[0]) < 0.01 * new[0]


@pytest.mark.parametrize(("level_db", "quantity"), [(-20.0, "power"), (-10.0, "power"),
                                                     (-20.0, "field")])
def test_gaussian_pulse_cutoff(level_db, quantity):
    """Analytic: a thin, dispersion-free crystal radiates |E| ~ Omega exp(-a Omega^2 / 2),
    a = tau^2 / (8 ln 2); :func:`gaussian_pulse_cutoff` (incomplete gamma function) agrees with
    the quantile of the sampled spectrum (1e-4) and with the full estimate in the test crystal
    'thin' (0.5 %; the optical band is mixed down to -120 dB, as the field integral weighs
    the tail)."""
    tau = 40e-15
    expected = gaussian_pulse_cutoff(tau, level_db, quantity)
    f = np.linspace(0, 200e12, 200001)
    omega = TWO_PI * f
    power = omega**2 * np.exp(-(omega**2) * tau**2 / (8 * LN2))
    assert thz_cutoff(f, power, level_db, quantity)[0] == pytest.approx(expected, rel=1e-4)
    grid, spectrum = gaussian_pulse(tau, wavelength=1.03e-6, points=8192, dt=2e-15)
    result = thz_estimate(grid, spectrum, ThzSetup(load_crystal("thin"), 10e-6,
                                                   cutoff_db=level_db, cutoff_level=quantity,
                                                   band_floor_db=-120.0))
    assert result.cutoff == pytest.approx(expected, rel=5e-3)
    if (level_db, quantity) == (-20.0, "power"):
        assert expected * tau == pytest.approx(0.8926, abs=1e-4)


# --------------------------------------------------------------------- the model's range


def test_znte_cutoff_beyond_its_model_is_null():
    """Published range: the ZnTe table's THz model is stated valid to 4.5 THz (the range
    measured by G. Gallot, J. Zhang, R. W. McGowan, T.-I. Jeon, D. Grischkowsky, Appl. Phys.
    Lett. 74, 3450 (1999), cited in znte.toml). A 10 fs pulse at 800 nm in 0.2 mm ZnTe puts
    most of its THz energy above that (the computed cutoff is tens of THz): the cutoff and
    the peak are null, the limit is given and a note says why."""
    znte = load_crystal("znte")
    assert znte.thz.frequency_max == 4.5e12
    grid, spectrum = gaussian_pulse(10e-15)
    result = thz_estimate(grid, spectrum, ThzSetup(znte, 0.2e-3))
    assert result.model_limit == 4.5e12
    assert result.cutoff is None and result.cutoff_computed > 4.5e12
    assert any("above the range of the THz model (> 4.5 THz" in w for w in result.warnings)
    # a GaP generator read out by ZnTe: the range is the intersection, GaP's 20 THz and 4.5
    gap = load_crystal("gap")
    grid, spectrum = gaussian_pulse(100e-15, wavelength=1.03e-6, dt=2e-15)
    both = thz_estimate(grid, spectrum, ThzSetup(gap, 0.3e-3, detector=EoDetector(znte, 0.1e-3)))
    alone = thz_estimate(grid, spectrum, ThzSetup(gap, 0.3e-3))
    assert both.model_limit == 4.5e12 and alone.model_limit == gap.thz.frequency_max
    assert alone.cutoff is not None and alone.cutoff < alone.model_limit


def test_figure_shades_beyond_the_model():
    """The spectrum figure shades the frequencies above the model's range and draws no cutoff
    line when the cutoff is null."""
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    from hcfplan.plotting.thz import plot_thz_spectrum

    grid, spectrum = gaussian_pulse(10e-15)
    result = thz_estimate(grid, spectrum, ThzSetup(load_crystal("znte"), 0.2e-3))
    fig, ax = plt.subplots()
    plot_thz_spectrum(ax, result)
    labels = [" ".join(t.get_text().split()) for t in ax.get_legend().get_texts()]
    assert "beyond the crystal model (> 4.5 THz)" in labels
    assert not any(label.startswith("cutoff") for label in labels)
    assert "above the model's range (> 4.5 THz)" in ax.get_title()
    plt.close(fig)


def test_summary_and_text_of_a_cutoff_beyond_the_model():
    """The capillary demo pumps 0.2 mm ZnTe with a few-fs pulse: ``thz.cutoff_hz`` is null,
    ``thz.model_limit_hz`` = 4.5 THz (znte.toml), and the text says so."""
    from hcfplan.cli.output import thz_cutoff_text
    from hcfplan.io.config import load_config
    from hcfplan.planning.chain import run_chain, summary_dict

    config = load_config(CONFIGS / "tisa_capillary_neon.toml", overrides=["grid.points=1024"])
    thz = summary_dict(run_chain(config))["thz"]
    assert thz["cutoff_hz"] is None and thz["model_limit_hz"] == 4.5e12
    assert thz["cutoff_definition"].startswith("99 % of the THz energy")
    assert thz_cutoff_text(thz) == "above the model's range (> 4.5 THz)"
    assert thz_cutoff_text({"cutoff_hz": 6.1e12}) == "6.1 THz"


# -------------------------------------------------------------------- smooth and converged


def _phonon_between(crystal, f1: float, f2: float) -> bool:
    """A TO phonon of the crystal table (an oscillator frequency) lies between f1 and f2."""
    lo, hi = sorted((f1, f2))
    return any(lo < o.omega / TWO_PI < hi for o in crystal.thz.oscillators)


def test_cutoff_is_smooth_in_a_pressure_scan():
    """Invariant (common practice, no source): in a fine pressure scan of the anti-resonant
    fiber demo (GaP, 16 pressures 1-4.2 bar, 512 grid points) the reported cutoff changes by
    at most 10 % between neighbours, unless a TO phonon frequency of the crystal table lies
    between the two cutoffs (the quantile may then skip the phonon band). Every point is
    reported (within GaP's stated 20 THz). The earlier definition (highest frequency at
    -20 dB of the peak) jumped by 15 % here (8.06 -> 6.99 THz between 3.13 and 3.35 bar)."""
    from hcfplan.io.config import load_config
    from hcfplan.planning.chain import run_chain

    gap = load_crystal("gap")
    cutoffs = []
    for pressure in np.linspace(1.0, 4.2, 16):
        config = load_config(CONFIGS / "yb_arf_argon.toml",
                             overrides=["grid.points=512", f"gas.pressure_bar={pressure:.4f}"])
        cutoffs.append(run_chain(config).thz.cutoff)
    assert all(cut is not None for cut in cutoffs)
    jumps = [(a, b) for a, b in zip(cutoffs[:-1], cutoffs[1:], strict=True)
             if abs(b - a) > 0.1 * min(a, b) and not _phonon_between(gap, a, b)]
    assert not jumps, [(a * 1e-12, b * 1e-12) for a, b in jumps]


def test_cutoff_does_not_depend_on_the_optical_window():
    """Convergence: the same 8 fs pulse at 800 nm on optical windows of 1.5 ps and 12.3 ps
    (1024 and 8192 points of 1.5 fs), 1 mm of ZnTe. The sum over omega needs the pulse as it
    disperses in the crystal (a few ps) inside the window; the THz sampling pads the short
    window, so the computed cutoff and the peak agree within 1 % (unpadded, the 1.5 ps window
    gave a cutoff 9 % higher)."""
    znte = load_crystal("znte")
    runs = []
    for points in (1024, 8192):
        grid, spectrum = gaussian_pulse(8e-15, points=points)
        runs.append(thz_estimate(grid, spectrum, ThzSetup(znte, 1e-3)))
    assert runs[0].cutoff_computed == pytest.approx(runs[1].cutoff_computed, rel=0.01)
    assert runs[0].peak_frequency == pytest.approx(runs[1].peak_frequency, rel=0.01)
    assert max(r.frequency_step for r in runs) <= 50e9


def test_chain_cutoff_is_grid_independent():
    """Convergence: the anti-resonant fiber demo at 512 and 2048 grid points gives cutoffs
    within 5 % (the THz axis has its own step, at most 50 GHz, on both)."""
    from hcfplan.io.config import load_config
    from hcfplan.planning.chain import run_chain

    cutoffs = [run_chain(load_config(CONFIGS / "yb_arf_argon.toml",
                                     overrides=[f"grid.points={n}"])).thz.cutoff
               for n in (512, 2048)]
    assert cutoffs[0] == pytest.approx(cutoffs[1], rel=0.05)
