"""The scan, recommend and compare commands: JSON fields, files written, exit codes, one-line
errors. Contract tests (no physics values). No external source is needed for these checks."""

from __future__ import annotations

import json

import pytest
from fast_cases import write_fast_config

from hcfplan.cli.app import main


def run(capsys, *argv):
    code = main([str(a) for a in argv])
    out, err = capsys.readouterr()
    return code, out, err


def test_scan_1d_json_table_and_figures(capsys, tmp_path):
    config = write_fast_config(tmp_path)
    out = tmp_path / "scan"
    code, stdout, err = run(capsys, "scan", config, "--vary", "gas.pressure_bar=1:2:2",
                            "--out", out, "--workers", "1", "--json")
    assert code == 0, err
    report = json.loads(stdout)
    assert report["computed"] == 2 and report["reused"] == 0 and report["points"] == 2
    assert set(report["figures"]) == {"spectrum_map.png", "results.png"}
    for name in report["figures"]:
        assert (out / name).stat().st_size > 10_000
    row = report["rows"][0]
    for key in ("gas.pressure_bar", "compressed.fwhm_s", "thz.cutoff_hz",
                "margins.self_focusing", "limits.self_focusing.margin_input"):
        assert key in row
    header = (out / "table.csv").read_text().splitlines()[0].split(",")
    assert "compressed.peak_power_w" in header and "margins.ionization_fraction" in header


def test_scan_releases_its_workers_before_the_figures(capsys, tmp_path, monkeypatch):
    # contract: a command with no more points to compute stops the pool processes kept for a
    # next run before it draws its figures (their memory is given back, and the figures'
    # helper is not forked beside the pool's threads)
    from hcfplan.cli import workflows as cli_workflows
    from hcfplan.planning import scan

    kept_at_figures = []
    real = cli_workflows.scan_figures

    def figures(*args):
        kept_at_figures.append(scan.KEPT_POOL.pool)
        return real(*args)

    monkeypatch.setattr(cli_workflows, "scan_figures", figures)
    config = write_fast_config(tmp_path)
    code, _, err = run(capsys, "scan", config, "--vary", "gas.pressure_bar=1:2:3", "--out",
                       tmp_path / "scan", "--workers", "2", "--json")
    assert code == 0, err
    assert kept_at_figures == [None]


def test_scan_2d_text_shows_table_and_cautions(capsys, tmp_path):
    config = write_fast_config(tmp_path)
    code, stdout, err = run(capsys, "scan", config, "--vary", "gas.pressure_bar=1,2",
                            "--vary", "laser.energy_uj=100,200", "--out", tmp_path / "s2",
                            "--workers", "1")
    assert code == 0, err
    assert "4 points computed" in stdout and "Cautions:" in stdout
    assert (tmp_path / "s2" / "results_map.png").stat().st_size > 10_000


@pytest.mark.parametrize("argv,fragment", [
    (["--vary", "gas.pressur=1:2:3"], "--vary gas.pressur: unknown key"),
    (["--vary", "gas.pressure_bar=0:2:3"], "gas.pressure_bar = 0.0: must be >= 1e-09"),
    (["--vary", "gas.pressure_bar=1:2:2", "--set", "laser.fwhm_fs=x"],
     "laser.fwhm_fs = 'x': must be a number"),
])
def test_scan_bad_input_exit_2_one_line(capsys, tmp_path, argv, fragment):
    config = write_fast_config(tmp_path)
    code, _, err = run(capsys, "scan", config, "--out", tmp_path / "s", *argv)
    assert code == 2
    assert fragment in err and len(err.strip().splitlines()) == 1


def test_recommend_no_solution_exit_1_names_limit(capsys, tmp_path):
    config = write_fast_config(tmp_path, energy_uj=500.0)
    code, stdout, err = run(capsys, "recommend", config, "--goal", "shortest", "--vary",
                            "gas.pressure_bar=5:8", "--json")
    assert code == 1
    report = json.loads(stdout)
    assert report["chosen"] is None
    assert "self_focusing" in report["searches"][0]["reason"]
    assert "beyond the limit above" in err


def test_compare_writes_figures_and_table(capsys, tmp_path):
    config = write_fast_config(tmp_path)
    out = tmp_path / "cmp"
    code, stdout, err = run(capsys, "compare", config, "--set-b", "laser.energy_uj=400",
                            "--out", out)
    assert code == 0, err
    assert "B - A" in stdout and "B / A" in stdout and "Cautions:" in stdout
    assert "THz cutoff (THz)" in stdout and "self-focusing margin" in stdout
    for name in ("compare_spectra.png", "compare_pulses.png", "compare_thz.png"):
        assert (out / name).stat().st_size > 10_000
    saved = json.loads((out / "comparison.json").read_text())
    assert saved["rows"][0]["ratio"] == pytest.approx(2.0)


def test_compare_needs_b(capsys, tmp_path):
    code, _, err = run(capsys, "compare", write_fast_config(tmp_path))
    assert code == 2 and "give config B or at least one --set-b" in err
