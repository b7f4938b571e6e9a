"""Every figure of the demo runs, drawn with the Agg backend and the house style, has no two
text boxes overlapping and no text outside the saved figure (or its clip box).

Contract tests of the layout; no external source is needed (common practice, no source: a
label that covers another, or is cut off, cannot be read). The runs use the small invented
configs of tests/fast_cases.py, so the whole file takes a few seconds.
"""

from __future__ import annotations

import itertools
from pathlib import Path
from unittest import mock

import numpy as np
import pytest
from fast_cases import (
    FAST,
    FAST_CONFIG,
    TINY,
    two_stage_text,
    write_fast_config,
    write_multimode_config,
)

matplotlib = pytest.importorskip("matplotlib")
matplotlib.use("Agg")
import matplotlib.pyplot as plt  # noqa: E402
from matplotlib.text import Text  # noqa: E402

from hcfplan.io import results  # noqa: E402
from hcfplan.io.config import load_config  # noqa: E402
from hcfplan.planning.chain import run_chain  # noqa: E402
from hcfplan.plotting import report  # noqa: E402

STYLE = Path(__file__).resolve().parents[2] / "hcfplan" / "styles" / "hcfplan.mplstyle"
#: Overlap below this many pixels is antialiasing, not a covered label.
TOLERANCE_PX = 1.0


def _drawn_texts(fig):
    """Draw ``fig`` and return (artist, window extent) of every non-empty text that was drawn
    (tick labels outside the view limits exist as artists but are not drawn)."""
    drawn = []
    original = Text.draw

    def recording_draw(self, renderer):
        original(self, renderer)
        if self.get_visible() and self.get_text().strip():
            box = self.get_window_extent(renderer)
            if box.width > 0 and box.height > 0:
                drawn.append((self, box))

    with mock.patch.object(Text, "draw", recording_draw):
        fig.canvas.draw()
    return drawn


def _overlap(a, b) -> float:
    """Overlap of two boxes in pixels (the smaller of the two extents, 0 if apart)."""
    dx = min(a.x1, b.x1) - max(a.x0, b.x0)
    dy = min(a.y1, b.y1) - max(a.y0, b.y0)
    return min(dx, dy) if dx > 0 and dy > 0 else 0.0


def layout_problems(fig) -> list[str]:
    """Pairs of overlapping texts and texts cut off, in words ([] when the layout is clean).

    The saved figure is the tight box of the figure (the style saves with
    ``savefig.bbox: tight``); a text drawn with clipping must lie inside its clip box.
    """
    texts = _drawn_texts(fig)
    renderer = fig.canvas.get_renderer()
    problems = []
    for (ta, a), (tb, b) in itertools.combinations(texts, 2):
        if _overlap(a, b) > TOLERANCE_PX:
            problems.append(f"overlap: {ta.get_text()!r} and {tb.get_text()!r}")
    saved = fig.get_tightbbox(renderer).transformed(fig.dpi_scale_trans)
    width, height = fig.get_size_inches() * fig.dpi
    margin, right = results.PNG_MARGIN_IN * fig.dpi, results.PNG_MARGIN_RIGHT_IN * fig.dpi
    if (saved.x0 < -margin or saved.y0 < -margin or saved.x1 > width + right
            or saved.y1 > height + margin):
        problems.append("the tight box reaches beyond the margin drawn by save_png")
    for text, box in texts:
        if (box.x0 < saved.x0 - TOLERANCE_PX or box.x1 > saved.x1 + TOLERANCE_PX
                or box.y0 < saved.y0 - TOLERANCE_PX or box.y1 > saved.y1 + TOLERANCE_PX):
            problems.append(f"outside the saved figure: {text.get_text()!r}")
        clip = text.get_clip_box() if text.get_clip_on() else None
        if clip is not None and (box.x0 < clip.x0 - TOLERANCE_PX or box.x1 > clip.x1
                                 + TOLERANCE_PX or box.y0 < clip.y0 - TOLERANCE_PX
                                 or box.y1 > clip.y1 + TOLERANCE_PX):
            problems.append(f"clipped: {text.get_text()!r}")
    return problems


def _check(draw, *args):
    with plt.style.context(str(STYLE)):
        fig = plt.figure()
        try:
            draw(fig, *args)
            problems = layout_problems(fig)
        finally:
            plt.close(fig)
    assert problems == []


@pytest.fixture(scope="module")
def chains(tmp_path_factory):
    """The chains of three fast invented runs: an Ar capillary at 1030 nm with a GaP stage, a
    Ti:sapphire capillary with a ZnTe stage and detector, and a three-mode capillary run (the
    mode figures)."""
    folder = tmp_path_factory.mktemp("layout")
    (folder / "fast2.toml").write_text(FAST, encoding="utf-8")
    configs = [load_config(write_fast_config(folder)), load_config(folder / "fast2.toml"),
               load_config(write_multimode_config(folder))]
    return [run_chain(config) for config in configs]


@pytest.mark.parametrize("name", list(report.FIGURES))
@pytest.mark.parametrize("which", [0, 1, 2])
def test_run_figure_layout(chains, name, which):
    chain = chains[which]
    if report.applies(name, chain):
        _check(report.FIGURES[name], chain)


@pytest.mark.parametrize("z_scale", ["linear", "log"])
def test_evolution_map_layout_both_z_scales(chains, z_scale):
    _check(report.draw_spectral_evolution, chains[1], z_scale)


def test_thz_result_layout(chains):
    _check(report.draw_thz_result, chains[0].thz)


def test_fiber_figure_layout_and_title(chains):
    from hcfplan.planning.reports.fiber import dispersion_curves
    from hcfplan.plotting.fiber import plot_dispersion_and_loss

    config = chains[0].config
    curves = dispersion_curves(config, np.linspace(400e-9, 2200e-9, 200))
    _check(plot_dispersion_and_loss, curves, config)
    with plt.style.context(str(STYLE)):
        fig = plt.figure()
        ax_gvd, _ = plot_dispersion_and_loss(fig, curves, config)
        title = ax_gvd.get_title()
        plt.close(fig)
    assert "Ar 2 bar" in title and "150 µm core" in title


def test_compare_figure_layout_and_names(tmp_path):
    from hcfplan.planning.compare import compare_configs
    from hcfplan.plotting import compare

    path_a = write_fast_config(tmp_path, "a.toml")
    path_b = write_fast_config(tmp_path, "b.toml", energy_uj=300.0)
    comparison = compare_configs(load_config(path_a), load_config(path_b),
                                 (str(path_a), str(path_b)))
    for draw in compare.FIGURES.values():
        _check(draw, comparison.a, comparison.b)
    with plt.style.context(str(STYLE)):
        fig = plt.figure()
        ax = compare.draw_spectra(fig, comparison.a, comparison.b)
        labels = [t.get_text() for t in ax.get_legend().get_texts()]
        plt.close(fig)
    assert labels == ["a", "b"]  # config names, not the absolute paths


def test_scan_figures_layout_and_axis_names(tmp_path):
    from hcfplan.planning.scan import parse_vary, plan_scan, release_workers, run_scan
    from hcfplan.plotting import scan

    config = tmp_path / "tiny.toml"
    config.write_text(TINY, encoding="utf-8")
    plan = plan_scan(config, [parse_vary("gas.pressure_bar=0.4:0.6:3")])
    plan_2d = plan_scan(config, [parse_vary("gas.pressure_bar=0.4:0.6:2"),
                                 parse_vary("laser.energy_uj=40:60:2")])
    try:
        records = run_scan(plan, tmp_path / "scan", workers=1).records
        records_2d = run_scan(plan_2d, tmp_path / "scan2d", workers=1).records
    finally:
        release_workers()
    _check(scan.draw_results_2d, ("gas.pressure_bar", "laser.energy_uj"),
           tuple(v.values for v in plan_2d.varies), records_2d)
    values = plan.varies[0].values
    _check(scan.draw_spectrum_map, "gas.pressure_bar", values, records)
    _check(scan.draw_results_1d, "gas.pressure_bar", values, records)
    with plt.style.context(str(STYLE)):
        fig = plt.figure()
        axes = scan.draw_results_1d(fig, "gas.pressure_bar", values, records)
        xlabel = axes[-1].get_xlabel()
        plt.close(fig)
    assert xlabel == "Gas fill pressure (bar)"


def test_envelope_figure_layout(chains):
    from hcfplan.planning.envelope import envelope_map
    from hcfplan.plotting.envelope import plot_envelope

    result = envelope_map(chains[1].config, points=(30, 30))
    _check(lambda fig, r: plot_envelope(fig.subplots(), r, contours="both"), result)


def test_stages_overview_layout(tmp_path):
    # a two-stage run (the fast capillary, then a short helium capillary): the overview figure
    from hcfplan.plotting.stages import draw_stages_overview

    second = ("[[stage]]\n[stage.fiber]\nkind = \"capillary\"\ncore_diameter_um = 250.0\n"
              "length_m = 0.3\n[stage.gas]\nspecies = \"He\"\npressure_bar = 2.0\n")
    text = two_stage_text(FAST_CONFIG.format(energy_uj=200.0, rated_bar=20.0), second)
    (tmp_path / "two.toml").write_text(text, encoding="utf-8")
    _check(draw_stages_overview, run_chain(load_config(tmp_path / "two.toml")))


def test_layout_check_finds_an_overlap_and_a_cut_text():
    """The check itself: two labels at one place, and a label outside its clip box."""
    with plt.style.context(str(STYLE)):
        fig = plt.figure()
        ax = fig.subplots()
        ax.text(0.5, 0.5, "first label", transform=ax.transAxes)
        ax.text(0.52, 0.5, "second label", transform=ax.transAxes)
        ax.text(0.99, 0.2, "cut off at the frame", transform=ax.transAxes, clip_on=True)
        problems = layout_problems(fig)
        plt.close(fig)
    assert any(p.startswith("overlap: 'first label'") for p in problems)
    assert any(p.startswith("clipped: 'cut off") for p in problems)


def test_figure_selection():
    assert report.select_figures(None) == report.select_figures("default")
    assert set(report.select_figures("default")) == set(report.DEFAULT_FIGURES)
    assert report.select_figures("all") == tuple(report.FIGURES)
    assert report.select_figures("bounces,default") == tuple(
        n for n in report.FIGURES if n in {"bounces", *report.DEFAULT_FIGURES})
    from hcfplan.errors import ConfigError

    with pytest.raises(ConfigError, match=r"--figures 'spectra'.*spectrum_in_out"):
        report.select_figures("spectra")


def test_energy_figure_draws_the_ionisation_limit(chains):
    with plt.style.context(str(STYLE)):
        fig = plt.figure()
        ax = report.draw_energy_ionization(fig, chains[0])
        labels = [t.get_text() for t in ax.get_legend().get_texts()]
        plt.close(fig)
    limit = chains[0].config.limits.ionization_fraction_limit
    assert f"ionisation limit {limit:g} (config)" in labels


def test_thz_panels_share_one_frequency_range(chains):
    chain = chains[0]
    with plt.style.context(str(STYLE)):
        fig = plt.figure()
        report.draw_thz(fig, chain)
        ranges = {tuple(np.round(ax.get_xlim(), 9)) for ax in fig.axes[:3]
                  if "THz" in ax.get_xlabel()}
        plt.close(fig)
    assert len(ranges) == 1


def test_simulate_figures_option(tmp_path):
    """``--figures`` picks the figures of a run; an unknown name is refused before the run."""
    from hcfplan.cli.app import main

    config = write_fast_config(tmp_path)
    out = tmp_path / "run"
    assert main(["simulate", str(config), "--out", str(out), "--quiet",
                 "--figures", "bounces,energy_ionization"]) == 0
    assert {p.stem for p in out.glob("*.png")} == {"bounces", "energy_ionization"}
    assert main(["simulate", str(config), "--out", str(tmp_path / "bad"), "--quiet",
                 "--figures", "spectra"]) == 2
    assert not (tmp_path / "bad").exists()


def test_mode_figures_exist_for_the_multimode_run_only(chains):
    for name in ("mode_energy", "mode_spectra"):
        assert name in report.DEFAULT_FIGURES
        assert [report.applies(name, chain) for chain in chains] == [False, False, True]


def test_eh11_scan_figure_layout(tmp_path):
    from hcfplan.planning.scan import parse_vary, plan_scan, release_workers, run_scan
    from hcfplan.plotting.modes import draw_eh11_fraction, has_eh11

    config = write_multimode_config(tmp_path, modes=2)
    plan = plan_scan(config, [parse_vary("laser.energy_uj=30:60:2")])
    plan_2d = plan_scan(config, [parse_vary("laser.energy_uj=30:60:2"),
                                 parse_vary("gas.pressure_bar=0.4:0.6:2")])
    try:
        records = run_scan(plan, tmp_path / "scan", workers=1).records
        records_2d = run_scan(plan_2d, tmp_path / "scan2d", workers=1).records
    finally:
        release_workers()
    assert has_eh11(records) and has_eh11(records_2d)
    _check(draw_eh11_fraction, ("laser.energy_uj",), (plan.varies[0].values,), records)
    _check(draw_eh11_fraction, ("laser.energy_uj", "gas.pressure_bar"),
           tuple(v.values for v in plan_2d.varies), records_2d)
