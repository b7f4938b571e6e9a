"""``hcfplan simulate`` and ``hcfplan thz`` end to end on small, fast cases.

Contract tests: the output files and the summary/fields keys that users and later issues rely
on; plus invariants of the chain (phase-only compression keeps the energy; the THz spectrum is
limited by the optical bandwidth). No published values are checked here. No external source is
needed for these checks.
"""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np
import pytest
from fast_cases import FAST, TINY

from hcfplan.cli.app import main

ROOT = Path(__file__).resolve().parents[2]



SUMMARY_KEYS = [
    ("input", "energy_j"), ("input", "peak_power_w"), ("input", "fwhm_s"),
    ("fiber", "transmission"), ("fiber", "soliton_order"), ("fiber", "zdw_m"),
    ("output", "energy_j"), ("output", "bandwidth_hz"), ("output", "transform_limit_fwhm_s"),
    ("output", "max_ionization_fraction"), ("output", "max_peak_intensity_w_per_m2"),
    ("solver", "steps"), ("solver", "rejected_steps"),
    ("compressed", "fwhm_s"), ("compressed", "peak_power_w"), ("compressed", "bounces"),
    ("compressed", "gdd_s2"), ("compressed", "main_lobe_energy_fraction"),
    ("compressed", "transform_limit_fwhm_s"),
    ("thz", "peak_hz"), ("thz", "cutoff_hz"), ("thz", "relative_efficiency"), ("thz", "crystal"),
    ("thz", "thickness_m"),
]
FIELD_KEYS = ["frequency_hz", "time_s", "z_m", "spectrum_z", "field_in_t", "field_out_t",
              "field_out_spectrum", "thz_frequency_hz", "thz_power_generated",
              "thz_power_detected"]


@pytest.fixture(scope="module")
def run_dir(tmp_path_factory):
    base = tmp_path_factory.mktemp("sim")
    config = base / "fast.toml"
    config.write_text(FAST)
    out = base / "out"
    code = main(["simulate", str(config), "--out", str(out), "--quiet"])
    assert code == 0
    return out


def test_summary_has_contract_keys(run_dir):
    summary = json.loads((run_dir / "summary.json").read_text())
    for section, key in SUMMARY_KEYS:
        assert key in summary[section], f"{section}.{key}"
    assert isinstance(summary["warnings"], list)
    assert summary["solver"]["success"] is True


def test_fields_have_contract_arrays(run_dir):
    with np.load(run_dir / "fields.npz") as fields:
        for key in FIELD_KEYS:
            assert key in fields.files, key
        n = fields["time_s"].size
        assert fields["spectrum_z"].shape == (fields["z_m"].size, n)
        assert np.iscomplexobj(fields["field_out_t"])
        # frequency_hz is the absolute optical frequency (all positive, around 375 THz)
        assert np.all(fields["frequency_hz"] > 0)


def test_figures_written(run_dir):
    # the default figures; the others are drawn on request (--figures all or names)
    names = {p.stem for p in run_dir.glob("*.png")}
    assert names == {"spectrum_in_out", "compressed_pulse", "thz_spectrum"}


def test_compression_keeps_energy_inside_band(run_dir):
    # invariant: the compressor's phases conserve energy; with no mirror band the compressed
    # energy is the fiber output energy times the throughput (exit window, mirror bounces)
    summary = json.loads((run_dir / "summary.json").read_text())
    throughput = summary["compressor"]["throughput"]
    assert 0 < throughput < 1
    assert summary["compressed"]["energy_j"] == pytest.approx(
        summary["output"]["energy_j"] * throughput, rel=1e-10)


def test_thz_within_optical_bandwidth(run_dir):
    # invariant: the autoconvolution support is the optical bandwidth
    with np.load(run_dir / "fields.npz") as fields:
        spec = np.abs(fields["field_out_spectrum"]) ** 2
        freq = fields["frequency_hz"]
        lit = freq[spec > spec.max() * 1e-12]
        width = lit.max() - lit.min()
        thz_f = fields["thz_frequency_hz"]
        thz_p = fields["thz_power_generated"]
    assert thz_f[thz_p > thz_p.max() * 1e-10].max() <= width * 1.01


def test_existing_out_refused(run_dir, capsys):
    config = run_dir.parent / "fast.toml"
    code = main(["simulate", str(config), "--out", str(run_dir), "--quiet"])
    err = capsys.readouterr().err
    assert code == 2
    assert "--force" in err





def _interrupt(*args, **kwargs):
    raise KeyboardInterrupt


def test_interrupt_during_the_run_writes_nothing(tmp_path, capsys, monkeypatch):
    # contract: Ctrl-C during the propagation: exit 130, one stderr line, no output folder.
    # No external source is needed for this check.
    from hcfplan.planning import chain

    config = tmp_path / "tiny.toml"
    config.write_text(TINY)
    monkeypatch.setattr(chain, "run_chain", _interrupt)
    out = tmp_path / "run"
    code = main(["simulate", str(config), "--out", str(out)])
    err = capsys.readouterr().err
    assert code == 130
    assert err.strip() == "hcfplan: interrupted; nothing written", err
    assert not out.exists()


def test_interrupt_during_the_figures_names_the_kept_files(tmp_path, capsys, monkeypatch):
    # contract: Ctrl-C while the figures are drawn, in a folder reused with --force: the line
    # names the files this run wrote (complete, written atomically), not the older ones.
    # No external source is needed for this check.
    from hcfplan.planning import run_folder
    from hcfplan.plotting.helpers import FigureHelpers

    config = tmp_path / "tiny.toml"
    config.write_text(TINY)
    out = tmp_path / "run"
    assert main(["simulate", str(config), "--out", str(out), "--quiet", "--no-figures"]) == 0
    (out / "notes.txt").write_text("kept from before\n")
    capsys.readouterr()
    monkeypatch.setattr(run_folder, "write_figures", _interrupt)
    monkeypatch.setattr(FigureHelpers, "write", _interrupt)  # helpers started before the run
    code = main(["simulate", str(config), "--out", str(out), "--quiet", "--force"])
    err = capsys.readouterr().err
    assert code == 130
    assert err.strip() == (f"hcfplan: interrupted; kept {out}/: compressed_field.csv, "
                           "config.resolved.toml, fields.npz (complete files only)"), err
    assert "Traceback" not in err


def test_thz_command_json(capsys):
    code = main(["thz", str(ROOT / "configs" / "demo_broadened_spectrum.csv"), "--crystal",
                 "GaP", "--thickness-mm", "0.3", "--energy-uj", "5", "--json"])
    out = capsys.readouterr().out
    assert code == 0
    report = json.loads(out)
    assert report["peak_hz"] > 0
    # 1.3 % of this spectrum's THz energy lies above GaP's stated 20 THz (gap.toml), more than
    # the -20 dB (1 %) of the cutoff: the cutoff is null and the range is given
    assert report["cutoff_hz"] is None and report["model_limit_hz"] == 20e12
    assert "-20 dB" in report["cutoff_definition"]
    # the null cutoff carries its reason
    assert report["pump_energy_j"] == pytest.approx(5e-6)
    assert report["verdict"]["status"] == "caution"
    assert [r["code"] for r in report["verdict"]["reasons"]] == ["thz_beyond_crystal_model"]
    assert report["verdict"]["void_fields"] == ["cutoff_hz"]


def test_thz_command_text_shows_pump_energy_and_verdict(capsys):
    code = main(["thz", str(ROOT / "configs" / "demo_broadened_spectrum.csv"), "--crystal",
                 "GaP", "--thickness-mm", "0.3"])
    out = capsys.readouterr().out
    assert code == 0
    assert "  pump energy           1 uJ" in out  # the default
    line = next(x for x in out.splitlines() if x.strip().startswith("THz cutoff"))
    assert "above the model's range (> 20 THz; thz_beyond_crystal_model)" in line
    assert "Verdict: caution (read the reasons below)" in out
    assert "  ! caution  thz_beyond_crystal_model: THz cutoff not given" in out


def test_thz_command_bad_csv(tmp_path, capsys):
    bad = tmp_path / "s.csv"
    bad.write_text("wavelength_nm,intensity\n1.0,1\n1.1,2\n1.2,1\n")
    code = main(["thz", str(bad)])
    err = capsys.readouterr().err
    assert code == 2
    assert "s.csv" in err and len(err.strip().splitlines()) == 1
