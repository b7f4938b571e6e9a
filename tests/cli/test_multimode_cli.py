"""Multimode configs (``fiber.modes`` > 1) through simulate, scan, compare and recommend: the
keys, arrays, figures and report they write, the EH11 column and figure of a scan, and the
``--min-eh11`` constraint. Contract tests (no physics values); no external source is needed.
"""

from __future__ import annotations

import json

import numpy as np
import pytest
from fast_cases import TINY, write_multimode_config

from hcfplan.cli.app import main


def run(capsys, *argv):
    code = main([str(a) for a in argv])
    out, err = capsys.readouterr()
    return code, out, err


def test_simulate_writes_the_mode_keys_arrays_figures_and_report(capsys, tmp_path):
    config = write_multimode_config(tmp_path, modes=2)
    out = tmp_path / "run"
    code, stdout, err = run(capsys, "simulate", config, "--out", out)
    assert code in (0, 3), err  # 3: an invalid verdict still writes everything
    summary = json.loads((out / "summary.json").read_text())
    assert summary["fiber"]["modes"] == 2
    assert len(summary["input"]["mode_fractions"]) == 2
    assert len(summary["output"]["mode_fractions"]) == 2
    assert 0 < summary["output"]["eh11_fraction"] <= 1
    assert 0 < summary["input"]["lost_fraction"] < 1
    for key in ("beam_fwhm_s", "beam_peak_power_w", "beam_energy_j", "part"):
        assert key in summary["compressed"]
    with np.load(out / "fields.npz") as arrays:
        assert arrays["mode_energy_z_j"].shape == (arrays["z_m"].size, 2)
        assert arrays["mode_field_out_spectrum"].shape == (2, arrays["time_s"].size)
        for name in ("mode_field_out_t", "beam_spectrum_out", "beam_compressed_power_w"):
            assert name in arrays
    for name in ("mode_energy.png", "mode_spectra.png", "spectrum_in_out.png"):
        assert (out / name).stat().st_size > 10_000  # drawn by default for modes > 1
    assert "launch on EH11-EH12" in stdout and "compressed, whole beam" in stdout
    assert "Cautions:" in stdout
    html = (out / "report.html").read_text(encoding="utf-8")
    assert "<h2>Modes</h2>" in html and "EH12" in html and "EH11 share" in html


def test_single_mode_run_draws_no_mode_figures(capsys, tmp_path):
    (tmp_path / "tiny.toml").write_text(TINY, encoding="utf-8")
    out = tmp_path / "run"
    code, stdout, err = run(capsys, "simulate", tmp_path / "tiny.toml", "--out", out,
                            "--figures", "mode_energy,mode_spectra", "--quiet", "--no-report")
    assert code == 0, err
    assert not list(out.glob("*.png"))  # asked for, but a single-mode run has none
    assert "mode_fractions" not in json.loads((out / "summary.json").read_text())["input"]


def test_scan_carries_the_eh11_share_and_draws_its_figure(capsys, tmp_path):
    config = write_multimode_config(tmp_path, modes=2)
    out = tmp_path / "scan"
    code, stdout, err = run(capsys, "scan", config, "--vary", "laser.energy_uj=30:60:2",
                            "--out", out, "--workers", "1")
    assert code == 0, err
    assert "EH11 share (%)" in stdout and "Cautions:" in stdout
    header = (out / "table.csv").read_text().splitlines()[0].split(",")
    assert "output.eh11_fraction" in header and "compressed.beam_fwhm_s" in header
    assert (out / "eh11_fraction.png").stat().st_size > 10_000
    assert "EH11 share" in (out / "report.html").read_text(encoding="utf-8")
    # the stored output spectrum of a point is the whole beam's: it holds the exit energy of
    # all modes, not the EH11 share of it (about 89 % here)
    record = json.loads(next((out / "points").glob("*.json")).read_text())
    spectrum = record["spectrum"]
    energy = np.trapezoid(spectrum["energy_density_j_per_hz"], spectrum["frequency_hz"])
    assert energy == pytest.approx(record["summary"]["output"]["energy_j"], rel=0.02)


def test_compare_has_the_eh11_row(capsys, tmp_path):
    config = write_multimode_config(tmp_path, modes=2)
    code, stdout, err = run(capsys, "compare", config, "--set-b", "fiber.modes=3", "--json")
    assert code == 0, err
    rows = {r["key"]: r for r in json.loads(stdout)["rows"]}
    eh11 = rows["output.eh11_fraction"]
    assert 0 < eh11["a"] <= 1 and 0 < eh11["b"] <= 1
    assert "compressed.beam_fwhm_s" in rows


def test_recommend_honours_min_eh11(capsys, tmp_path):
    config = write_multimode_config(tmp_path, modes=2)
    common = ("--goal", "shortest", "--vary", "laser.energy_uj=20:60", "--coarse", "3",
              "--budget", "3", "--workers", "1", "--json")
    code, stdout, err = run(capsys, "recommend", config, "--min-eh11", "0.5", *common)
    assert code == 0, err
    report = json.loads(stdout)
    best = report["chosen"]["best"]
    share = best["summary"]["output"]["eh11_fraction"]
    assert share >= 0.5
    assert report["searches"][0]["min_eh11"] == 0.5
    # the launch puts about 11 % into EH12 (w0 = 0.48 a) and 10 cm of a 250 um bore cannot
    # strip it (EH12 loses well under 1 %): 0.999 excludes every point, naming the constraint
    code, stdout, err = run(capsys, "recommend", config, "--min-eh11", "0.999", *common)
    assert code == 1
    report = json.loads(stdout)
    assert report["chosen"] is None
    for e in report["searches"][0]["evaluations"]:
        assert "EH11 share below --min-eh11 (0.999)" in e["reasons"]


def test_min_eh11_needs_several_modes(tmp_path):
    import hcfplan
    from hcfplan.errors import ConfigError

    (tmp_path / "tiny.toml").write_text(TINY, encoding="utf-8")
    with pytest.raises(ConfigError, match=r"--min-eh11 = 0.95: needs fiber.modes > 1"):
        hcfplan.recommend(tmp_path / "tiny.toml", "shortest", min_eh11=0.95)


def test_spread_ranges_carry_the_eh11_share(capsys, tmp_path):
    config = write_multimode_config(tmp_path, modes=2)
    out = tmp_path / "run"
    code, stdout, err = run(capsys, "simulate", config, "--out", out, "--spread", "energy=5%",
                            "--workers", "1", "--no-figures", "--no-report")
    assert code in (0, 3), err
    ranges = json.loads((out / "summary.json").read_text())["spread"]["ranges"]
    share = ranges["output.eh11_fraction"]
    assert 0 < share["low"] <= share["high"] <= 1 and 0 < share["nominal"] <= 1
    assert "output.eh11_fraction" in stdout


def test_fiber_report_shows_the_launch_on_the_modes(capsys, tmp_path):
    from hcfplan.fibers.capillary_modes import eh_launch_amplitudes

    config = write_multimode_config(tmp_path, modes=3)
    code, stdout, err = run(capsys, "fiber", config, "--json")
    assert code == 0, err
    report = json.loads(stdout)
    shares = eh_launch_amplitudes(60e-6, 125e-6, 3) ** 2
    assert report["coupling.mode_fractions"] == pytest.approx(list(shares), rel=1e-12)
    assert report["coupling.lost_fraction"] == pytest.approx(1 - shares.sum(), abs=1e-12)
    assert report["coupling.efficiency"] == pytest.approx(shares[0], rel=1e-12)
    code, stdout, err = run(capsys, "fiber", config)
    assert "EH11-EH13 share" in stdout
