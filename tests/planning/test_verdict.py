"""The verdict on a chain result (:mod:`hcfplan.planning.verdict`): one small real case per code,
the exit code 3 of ``simulate``, the "void" headline, and the verdict of scan rows, scan figures,
``compare`` and ``--spread`` corners.

Kind: contract. Each case is built so that the physics behind its code holds, and the test
checks that condition from the summary's own numbers beside the code; the thresholds are common
practice, no source, except where a source is named at the check.
"""

from __future__ import annotations

import csv
import json
import subprocess
import sys
from pathlib import Path

import pytest

from hcfplan.cli.app import main
from hcfplan.io.config import load_config
from hcfplan.planning.chain import run_chain, summary_dict
from hcfplan.planning.verdict import (
    CODES,
    TRANSMISSION_FLOOR,
    Reason,
    flat_summary,
    stored_verdict,
    verdict_from_reasons,
    verdict_of_record,
    verdict_of_summary,
)

ROOT = Path(__file__).resolve().parents[2]

#: A linear, nearly lossless capillary case on a fixed small grid (valid verdict): 512 points
#: over 4 ps, a 128 THz window centred on the pump.
BASE = """
[laser]
wavelength_nm = 800.0
fwhm_fs = 60.0
shape = "gaussian"
energy_uj = 1.0

[fiber]
kind = "capillary"
core_diameter_um = 250.0
length_m = 0.1

[gas]
species = "Ar"
pressure_bar = 0.5

[compressor]
air_path_m = 0.0

[grid]
points = 512
time_window_fs = 4000.0
z_samples = 8
"""

#: 46 dB of capillary loss (50 um core, 0.6 m at 800 nm): below the 1e-3 floor, above the
#: 300 dB at which the config is refused.
NO_TRANSMISSION = ("fiber.core_diameter_um=50", "fiber.length_m=0.6")

ARF = """
[laser]
wavelength_nm = 1030.0
fwhm_fs = 220.0
shape = "sech2"
energy_uj = 1.0

[fiber]
kind = "antiresonant"
core_diameter_um = 50.0
wall_thickness_um = 0.5
length_m = 0.02

[gas]
species = "Ar"
pressure_bar = 1.0

[compressor]
air_path_m = 0.0

[grid]
points = 512
z_samples = 8
"""


def run_case(tmp_path: Path, *overrides: str, text: str = BASE, extra: str = ""):
    """(chain, nested summary, verdict recomputed from the summary) of one small case."""
    path = tmp_path / "case.toml"
    path.write_text(text + extra)
    chain = run_chain(load_config(path, overrides=overrides))
    summary = summary_dict(chain)
    return chain, summary, verdict_of_summary(summary)


def reason(verdict, code: str) -> Reason:
    found = [r for r in verdict.reasons if r.code == code]
    assert found, f"{code} not in {verdict.codes}"
    return found[0]


# ---------------------------------------------------------------------------------------------
# one case per code


def test_a_plain_case_is_valid_and_the_stored_verdict_is_the_recomputed_one(tmp_path):
    _, summary, verdict = run_case(tmp_path)
    assert verdict.status == "valid" and verdict.reasons == () and verdict.void_fields == ()
    assert summary["verdict"]["status"] == "valid"
    assert summary["verdict"]["reasons"] == [] and summary["verdict"]["void_fields"] == []
    assert stored_verdict(summary) == verdict
    # the same verdict from the flat form of the summary
    assert verdict_of_summary(flat_summary(summary)) == verdict


def test_no_transmission(tmp_path):
    _, summary, verdict = run_case(tmp_path, *NO_TRANSMISSION)
    t = summary["fiber"]["transmission"]
    assert t < TRANSMISSION_FLOOR
    assert verdict.status == "invalid"
    assert f"fiber transmission {t:.2g}" in reason(verdict, "no_transmission").message
    assert {"compressed.fwhm_s", "compressed.peak_power_w"} <= set(verdict.void_fields)
    assert "fiber.transmission" not in verdict.void_fields  # the reason is never void
    assert summary["compressed"]["fwhm_s"] is not None  # the JSON keeps the number
    assert verdict.void_reason("compressed.fwhm_s").code == "no_transmission"  # listed first


def test_pump_in_resonance(tmp_path):
    _, summary, verdict = run_case(tmp_path, text=ARF)
    # the pump lies within +-2.5 % of a wall resonance lambda_m = (2d/m) sqrt(n_glass^2 - n_gas^2)
    # (N. M. Litchinitser et al., Opt. Lett. 27, 1592 (2002), from memory)
    resonances = summary["limits"]["fiber.resonance_wavelengths_m"]
    assert min(abs(1030e-9 / r - 1) for r in resonances) < 0.025
    assert verdict.status == "invalid"
    assert "pump 1030 nm" in reason(verdict, "pump_in_resonance").message
    assert "output.bandwidth_hz" in verdict.void_fields


def test_self_focusing_at_entrance(tmp_path):
    _, summary, verdict = run_case(tmp_path, "laser.energy_uj=100", "gas.pressure_bar=10",
                                   "fiber.length_m=0.01")
    lim = summary["limits"]
    # P >= P_cr = 1.8962 lambda^2 / (4 pi n0 n2) (G. Fibich and A. L. Gaeta, Opt. Lett. 25, 335
    # (2000)), both from the limits report of the same run
    assert lim["static_fill.peak_power_w"] >= lim["self_focusing.critical_power_w"]
    assert verdict.status == "invalid"
    assert "P_cr/P = " in reason(verdict, "self_focusing_at_entrance").message


def test_beyond_barrier_suppression(tmp_path):
    _, summary, verdict = run_case(tmp_path, "laser.energy_uj=40", "laser.fwhm_fs=20",
                                   "gas.pressure_bar=0.05", "fiber.length_m=0.01",
                                   "fiber.core_diameter_um=50", "grid.stop_ionization_fraction=1")
    # barrier suppression I_BSI = 4e9 Ip^4 / Z^2 W/cm^2 (S. Augst et al., Phys. Rev. Lett. 63,
    # 2212 (1989)), from the limits report of the same run
    bsi = summary["limits"]["ionization.barrier_suppression_intensity_w_per_m2"]
    assert summary["output"]["max_peak_intensity_w_per_m2"] > bsi
    assert verdict.status == "invalid"
    assert "barrier-suppression" in reason(verdict, "beyond_barrier_suppression").message


def test_window_edge_energy(tmp_path):
    # a 75 fs pulse in a 180 fs time window: its wings fill the outer 5 % on each side
    _, summary, verdict = run_case(tmp_path, "grid.points=128", "grid.time_window_fs=180",
                                   "laser.fwhm_fs=75")
    failed = [c for c in summary["grid"]["checks"] if not c["passed"]]
    assert any(c["name"] == "time_edge_energy" for c in failed)
    assert verdict.status == "invalid"
    assert "time-window edge" in reason(verdict, "window_edge_energy").message
    assert "compressed.fwhm_s" in verdict.void_fields


def test_unresolved_pulse(tmp_path):
    # 64 points over 1 ps: a 15.6 fs step, 3.8 steps across the 60 fs pulse
    _, summary, verdict = run_case(tmp_path, "grid.points=64", "grid.time_window_fs=1000")
    assert summary["compressed"]["fwhm_s"] / summary["grid"]["dt_s"] < 4
    assert verdict.status == "invalid"
    assert verdict.codes == ("unresolved_pulse",)
    assert {"compressed.fwhm_s", "compressed.peak_power_w",
            "output.transform_limit_fwhm_s"} <= set(verdict.void_fields)
    # energies are not durations: they stand
    assert "compressed.energy_j" not in verdict.void_fields


def test_thz_beyond_crystal_model(tmp_path):
    _, summary, verdict = run_case(tmp_path, extra='[thz]\ncrystal = "ZnTe"\nthickness_mm = 0.1\n')
    # ZnTe THz model valid to 4.5 THz (the range measured by G. Gallot et al., Appl. Phys. Lett.
    # 74, 3450 (1999), as stated in the crystal table): the THz estimate either gives a cutoff
    # beyond it or leaves the cutoff out (null) with the model limit beside it
    thz = summary["thz"]
    assert (thz["cutoff_hz"] is None and thz.get("model_limit_hz") == pytest.approx(4.5e12)
            or thz["cutoff_hz"] > 4.5e12)
    assert verdict.status == "caution" and verdict.codes == ("thz_beyond_crystal_model",)
    assert "ZnTe model's validity" in verdict.reasons[0].message
    assert "4.5 THz" in verdict.reasons[0].message
    assert "thz.cutoff_hz" in verdict.void_fields
    assert "thz.relative_efficiency" not in verdict.void_fields


def test_thz_cutoff_beyond_the_model_from_a_flat_summary():
    # a cutoff beyond the model, and one the THz estimate left out (null) with the limit beside
    verdict = verdict_of_summary({"fiber.transmission": 0.9, "thz.crystal": "ZnTe",
                                  "thz.cutoff_hz": 38e12, "thz.peak_hz": 2e12})
    assert verdict.codes == ("thz_beyond_crystal_model",)
    assert "cutoff 38 THz" in verdict.reasons[0].message
    assert verdict.void_fields == ("thz.cutoff_hz",)
    flat = {"fiber.transmission": 0.9, "thz.crystal": "ZnTe", "thz.cutoff_hz": None,
            "thz.model_limit_hz": 4.5e12, "thz.peak_hz": 2e12}
    verdict = verdict_of_summary(flat)
    assert verdict.status == "caution" and verdict.codes == ("thz_beyond_crystal_model",)
    assert "4.5 THz" in verdict.reasons[0].message


def test_main_lobe_below_half(tmp_path):
    # two narrow lines 40 nm apart: the transform-limited pulse beats into several lobes
    import numpy as np

    wl = np.linspace(740, 860, 481)
    lines = np.exp(-((wl - 780) / 3) ** 2) + np.exp(-((wl - 820) / 3) ** 2)
    (tmp_path / "lines.csv").write_text("wavelength_nm,intensity\n" + "".join(
        f"{a:.2f},{b:.6g}\n" for a, b in zip(wl, lines, strict=True)))
    text = BASE.split("[grid]")[0]  # the grid sized by the run
    _, summary, verdict = run_case(tmp_path, "laser.spectrum_csv=lines.csv", text=text)
    assert summary["compressed"]["main_lobe_energy_fraction"] < 0.5
    assert verdict.status == "caution" and verdict.codes == ("main_lobe_below_half",)
    assert verdict.void_fields == ()


def test_extrapolated_data(tmp_path):
    # neon's only dispersion fit is stated for 400-1000 nm (A. Borzsonyi et al., Appl. Opt. 47,
    # 4856 (2008)); a 1030 nm pump lies outside it (argon's combined fits reach 2059 nm)
    _, _, verdict = run_case(tmp_path, "laser.wavelength_nm=1030", "gas.species=Ne")
    assert verdict.status == "caution" and verdict.codes == ("extrapolated_data",)
    assert "400-1000 nm" in verdict.reasons[0].message


def test_not_converged(tmp_path):
    _, summary, verdict = run_case(tmp_path, "laser.energy_uj=300", "gas.pressure_bar=0.05",
                                   "fiber.length_m=0.02", "fiber.core_diameter_um=50")
    assert summary["solver"]["success"] is False
    assert verdict.status == "invalid"
    assert "ionization_stop" in reason(verdict, "not_converged").message


def test_run_failed_and_status_rules():
    record = {"summary": {}, "status": "failed", "message": "gas condenses at 60 bar"}
    verdict = verdict_of_record(record)
    assert verdict.status == "invalid" and verdict.codes == ("run_failed",)
    assert "condenses" in verdict.reasons[0].message
    assert verdict_of_summary({}).codes == ("run_failed",)
    # one invalid reason makes the verdict invalid; cautions alone make it a caution
    caution = [Reason(c, "x") for c, code in CODES.items() if code.status == "caution"]
    assert verdict_from_reasons(caution).status == "caution"
    assert verdict_from_reasons([*caution, Reason("no_transmission", "x")]).status == "invalid"
    with pytest.raises(ValueError, match="unknown verdict codes"):
        verdict_from_reasons([Reason("no_such_code", "x")])


# ---------------------------------------------------------------------------------------------
# command line


def test_simulate_exits_3_on_an_invalid_result_and_writes_it(tmp_path):
    config = tmp_path / "lossy.toml"
    config.write_text(BASE)
    out = tmp_path / "out"
    sets = [a for s in NO_TRANSMISSION for a in ("--set", s)]
    done = subprocess.run([sys.executable, "-m", "hcfplan", "simulate", str(config), "--out",
                           str(out), "--no-figures", "--quiet", *sets],
                          capture_output=True, text=True, cwd=tmp_path, timeout=300)
    assert done.returncode == 3, done.stderr
    assert "result invalid (no_transmission" in done.stderr
    assert "Traceback" not in done.stderr
    summary = json.loads((out / "summary.json").read_text())
    assert summary["verdict"]["status"] == "invalid"
    assert (out / "fields.npz").exists()


def test_simulate_headline_shows_void_with_its_reason(tmp_path, capsys):
    config = tmp_path / "lossy.toml"
    config.write_text(BASE)
    sets = [a for s in NO_TRANSMISSION for a in ("--set", s)]
    code = main(["simulate", str(config), "--out", str(tmp_path / "out"), "--no-figures",
                 *sets])
    out = capsys.readouterr().out
    assert code == 3
    line = next(x for x in out.splitlines() if x.strip().startswith("compressed FWHM"))
    assert "void (no_transmission: fiber transmission" in line
    assert "Verdict: invalid (the numbers marked void are not results)" in out
    assert "  ! invalid  no_transmission: fiber transmission" in out


def _headline(summary: dict, tmp_path: Path, capsys) -> str:
    from hcfplan.cli.output import print_simulation

    print_simulation(summary, tmp_path)
    return capsys.readouterr().out


def _row(out: str, label: str) -> str:
    return next(x for x in out.splitlines() if x.strip().startswith(label))


SELF_FOCUSING = ("laser.energy_uj=100", "gas.pressure_bar=10", "fiber.length_m=0.01")
THZ_WITH_DETECTOR = ('[thz]\ncrystal = "ZnTe"\nthickness_mm = 0.1\n'
                     'detector_crystal = "ZnTe"\ndetector_thickness_mm = 0.1\n')


def test_void_fields_are_results_never_inputs_and_the_headline_voids_thz(tmp_path, capsys):
    from hcfplan.planning.verdict import NOT_RESULT_FIELDS, RESULT_FIELDS

    _, summary, verdict = run_case(tmp_path, *SELF_FOCUSING, extra=THZ_WITH_DETECTOR)
    assert verdict.invalid and verdict.codes[0] == "self_focusing_at_entrance"
    flat = flat_summary(summary)
    # every number of the result sections is either a result or a listed input/setting
    sections = [k for k, v in flat.items() if k.split(".")[0] in ("output", "compressed", "thz")
                and (v is None or isinstance(v, (int, float)))]
    assert set(sections) <= set(RESULT_FIELDS) | set(NOT_RESULT_FIELDS)
    assert set(verdict.void_fields) <= set(RESULT_FIELDS)
    assert set(summary["verdict"]["void_fields"]) == set(verdict.void_fields)
    for key in ("thz.thickness_m", "thz.model_limit_hz", "thz.frequency_step_hz",
                "input.energy_j", "fiber.length_m"):
        assert key not in verdict.void_fields
    assert {"thz.peak_hz", "thz.cutoff_hz", "thz.detected_cutoff_hz"} <= set(verdict.void_fields)
    out = _headline(summary, tmp_path, capsys)
    for label in ("THz peak", "THz cutoff", "detected THz cutoff", "compressed FWHM"):
        assert "void (self_focusing_at_entrance: input peak power" in _row(out, label), label
    assert "above the model's range" not in _row(out, "THz cutoff")


def test_headline_names_the_code_of_a_cutoff_beyond_the_crystal_model(tmp_path, capsys):
    _, summary, verdict = run_case(tmp_path, extra='[thz]\ncrystal = "ZnTe"\nthickness_mm = 0.1\n')
    assert verdict.codes == ("thz_beyond_crystal_model",)
    line = _row(_headline(summary, tmp_path, capsys), "THz cutoff")
    if summary["thz"]["cutoff_hz"] is None:
        assert "above the model's range (> 4.5 THz; thz_beyond_crystal_model)" in line
    else:
        assert "void (thz_beyond_crystal_model: THz cutoff" in line


def test_headline_warnings_are_one_block_without_the_verdict_reasons(tmp_path, capsys):
    _, summary, verdict = run_case(tmp_path, "laser.wavelength_nm=1030", "gas.species=Ne")
    message = reason(verdict, "extrapolated_data").message
    assert message in summary["warnings"]  # the run warns with the same text
    out = _headline(summary, tmp_path, capsys)
    assert "Verdict: caution (read the reasons below)" in out
    assert f"  ! caution  extrapolated_data: {message}" in out
    assert out.count(message) == 1
    assert out.count("Warnings:") <= 1


# ---------------------------------------------------------------------------------------------
# scan rows, scan figures, compare, --spread


@pytest.fixture(scope="module")
def scan_records(tmp_path_factory):
    """A two-point scan: 50 um core (no transmission) and 250 um core (valid)."""
    base = tmp_path_factory.mktemp("verdict_scan")
    config = base / "scan.toml"
    config.write_text(BASE)
    out = base / "scan"
    code = main(["scan", str(config), "--vary", "fiber.core_diameter_um=50,250", "--set",
                 "fiber.length_m=0.6", "--workers", "1", "--out", str(out), "--no-figures"])
    assert code == 0
    records = [json.loads(p.read_text()) for p in sorted((out / "points").glob("*.json"))]
    records.sort(key=lambda r: r["values"]["fiber.core_diameter_um"])
    with open(out / "table.csv", newline="") as f:
        rows = sorted(csv.DictReader(f), key=lambda r: float(r["fiber.core_diameter_um"]))
    return records, rows


def test_scan_rows_carry_the_verdict(scan_records):
    _, rows = scan_records
    assert [r["verdict"] for r in rows] == ["invalid", "valid"]
    assert "no_transmission: fiber transmission" in rows[0]["verdict_reasons"]
    assert rows[1]["verdict_reasons"] == ""


def test_scan_figure_leaves_invalid_points_off_the_line(scan_records):
    import matplotlib

    matplotlib.use("Agg")
    from matplotlib.figure import Figure

    from hcfplan.plotting.scan import draw_results_1d, void_note

    records, _ = scan_records
    assert void_note(records) == ("hollow grey: void; 1 of 2 points void:\n"
                                  "no_transmission (fiber transmission below 0.001)")
    axes = draw_results_1d(Figure(), "fiber.core_diameter_um", (50, 250), records)
    result_line, void_marks = axes[0].lines[:2]  # compressed FWHM
    assert list(result_line.get_xdata()) == [250]
    assert list(void_marks.get_xdata()) == [50] and void_marks.get_markerfacecolor() == "none"
    assert "1 of 2 points void:\nno_transmission (fiber transmission" in axes[0].get_title()
    # margins are drawn for every point
    assert len(axes[3].lines[0].get_xdata()) == 2


def test_compare_marks_void_numbers_and_drops_their_difference(scan_records):
    from hcfplan.planning.compare import Side, comparison_rows

    records, _ = scan_records
    a, b = (Side(str(r["values"]), None, r["summary"], r["margins"]) for r in records)
    rows = {r["key"]: r for r in comparison_rows(a, b)}
    fwhm = rows["compressed.fwhm_s"]
    assert fwhm["a_void"] == "no_transmission" and fwhm["b_void"] is None
    assert fwhm["a"] is not None and fwhm["difference"] is None and fwhm["ratio"] is None
    energy = rows["input.energy_j"]
    assert energy["a_void"] is None and energy["difference"] == 0.0
    assert rows["thz.cutoff_hz"]["a_void"] is None  # no [thz] section: nothing to void
    assert a.verdict.status == "invalid" and b.verdict.status == "valid"


def test_spread_corners_carry_the_verdict_and_void_values_leave_the_range(tmp_path):
    from hcfplan.planning.spread import corner_tasks, parse_spread, run_spread, spread_summary

    config = tmp_path / "spread.toml"
    # 60 um core: 27 dB over 0.6 m; the +50 % corner (0.9 m, 40 dB) transmits below 1e-3
    config.write_text(BASE)
    cfg = load_config(config, overrides=("fiber.core_diameter_um=60", "fiber.length_m=0.6"))
    spec = parse_spread("length=50%")
    tasks = corner_tasks(cfg, spec, ("fiber.core_diameter_um=60", "fiber.length_m=0.6"))
    result = run_spread(tasks, spec, {"summary": {}, "margins": {}}, workers=1)
    short, long = sorted(result.verdicts, key=lambda v: v["values"]["fiber.length_m"])
    assert long["values"]["fiber.length_m"] == pytest.approx(0.9)
    assert long["verdict"] == "invalid"
    assert "no_transmission" in [x["code"] for x in long["verdict_reasons"]]
    assert short["verdict"] != "invalid"
    fwhm = result.ranges["compressed FWHM"]
    assert fwhm["void_corners"] == 1 and fwhm["low"] == fwhm["high"]  # one corner left
    summary = spread_summary(result)
    assert summary["invalid_corners"] == 1 and len(summary["corners"]) == 2


# ---------------------------------------------------------------------------------------------
# tables and figures of a THz cutoff left out beyond the crystal model


def _beyond_record(value: float, cutoff) -> dict:
    """A scan point record whose THz cutoff is null beyond the ZnTe model (or a number)."""
    summary = {"fiber": {"transmission": 0.9},
               "compressed": {"fwhm_s": 30e-15, "peak_power_w": 1e9},
               "thz": {"crystal": "ZnTe", "thickness_m": 1e-4, "peak_hz": 2e12,
                       "cutoff_hz": cutoff, "model_limit_hz": 4.5e12}}
    return {"key": str(value), "values": {"gas.pressure_bar": value}, "status": "ok",
            "message": "", "summary": summary,
            "margins": {"self_focusing": 5.0, "ionization_fraction": 1e-6,
                        "ionization_margin": 100.0, "binding": ""}}


def test_scan_table_prints_void_code_and_a_legend(capsys):
    from types import SimpleNamespace

    from hcfplan.cli import workflows
    from hcfplan.cli.output import print_void_legend

    records = [_beyond_record(1.0, 3e12), _beyond_record(2.0, None)]
    plan = SimpleNamespace(varies=[SimpleNamespace(key="gas.pressure_bar")])
    header, rows = workflows.scan_rows(plan, records)
    cutoff = header.index("THz cutoff")
    assert [r[cutoff] for r in rows] == ["3", "void (thz_beyond_crystal_model)"]
    print_void_legend(["thz_beyond_crystal_model", "thz_beyond_crystal_model"])
    out = capsys.readouterr().out
    assert out.count("thz_beyond_crystal_model") == 1
    assert ("    thz_beyond_crystal_model (caution): THz cutoff or band beyond the crystal "
            "model's validity") in out


def test_scan_figure_draws_a_void_cutoff_hollow_and_says_why():
    import matplotlib

    matplotlib.use("Agg")
    from matplotlib.figure import Figure

    from hcfplan.plotting.scan import draw_results_1d, void_note

    records = [_beyond_record(p, None if p > 3 else 3e12) for p in (1.0, 2.0, 3.0, 4.0, 5.0)]
    note = void_note(records)
    assert note == ("hollow grey: void; 2 of 5 points void:\nthz_beyond_crystal_model (THz "
                    "cutoff or band beyond the crystal model's validity)")
    axes = draw_results_1d(Figure(), "gas.pressure_bar", (1.0, 2.0, 3.0, 4.0, 5.0), records)
    cutoff_axis = axes[2]
    hollow = [line for line in cutoff_axis.lines if line.get_markerfacecolor() == "none"]
    assert sorted(x for line in hollow for x in line.get_xdata()) == [4.0, 5.0]
    assert "2 of 5 points void" in axes[0].get_title()
    assert "void at" not in axes[0].get_title()


def test_compare_table_prints_void_code_for_a_null_cutoff_and_a_legend(capsys):
    from hcfplan.cli import workflows
    from hcfplan.planning.compare import Comparison, Side, comparison_rows

    margins = {"acceptable": True, "binding": "", "self_focusing": 5.0,
               "self_focusing_required": 2.0}
    a, b = (Side(name, None, _beyond_record(1.0, cutoff)["summary"], margins)
            for name, cutoff in (("A", 3e12), ("B", None)))
    comparison = Comparison(a, b, comparison_rows(a, b))
    workflows.print_comparison(comparison, [], None)
    out = capsys.readouterr().out
    line = next(x for x in out.splitlines() if x.strip().startswith("THz cutoff"))
    assert line.split()[-4:] == ["void", "(thz_beyond_crystal_model)", "-", "-"]  # B - A, B / A
    assert "    thz_beyond_crystal_model (caution): THz cutoff or band" in out
    assert "Verdict: caution (read the reasons below)" in out
    assert "  ! caution  thz_beyond_crystal_model:" in out


def test_thz_report_verdict_names_void_report_keys():
    from hcfplan.planning.verdict import verdict_of_thz_report

    report = {"crystal": "ZnTe", "peak_hz": 2e12, "cutoff_hz": None, "model_limit_hz": 4.5e12,
              "thickness_m": 1e-4, "frequency_step_hz": 1e10, "detected_peak_hz": None,
              "detected_cutoff_hz": None, "relative_efficiency": 1e-9}
    verdict = verdict_of_thz_report(report)
    assert verdict.status == "caution" and verdict.codes == ("thz_beyond_crystal_model",)
    assert verdict.void_fields == ("cutoff_hz",)  # no detector: detected_* are no results
    assert verdict_of_thz_report(report | {"cutoff_hz": 3e12}).status == "valid"


def test_unresolved_pulse_voids_only_the_pulse_that_is_under_sampled():
    """Contract: ``unresolved_pulse`` voids the numbers of the under-sampled pulse only (here the
    fiber output's sub-cycle transform limit, 0.49 fs on 0.45 fs steps), not a compressed pulse
    the same grid resolves (4.3 fs, 9.5 steps); with both short, both groups are void; a summary
    that does not say which pulse is short voids every duration."""
    from hcfplan.planning.verdict import CODES, UNRESOLVED_GROUPS, Reason, verdict_from_reasons

    reason = [Reason("unresolved_pulse", "shortest pulse 0.489 fs sampled by 1.1 points")]
    summary = {"grid.dt_s": 0.454e-15, "output.transform_limit_fwhm_s": 0.489e-15,
               "compressed.fwhm_s": 4.3e-15, "compressed.peak_power_w": 1e9,
               "compressed.transform_limit_fwhm_s": 2.2e-15,
               "compressed.transform_limit_peak_power_w": 2e9}
    verdict = verdict_from_reasons(reason, summary)
    assert verdict.status == "invalid"
    assert verdict.void_fields == ("output.transform_limit_fwhm_s",)
    assert verdict.void_reason("compressed.fwhm_s") is None
    assert verdict.void_reason("output.transform_limit_fwhm_s").code == "unresolved_pulse"
    both = verdict_from_reasons(reason, {**summary, "compressed.fwhm_s": 1.0e-15})
    assert set(UNRESOLVED_GROUPS["compressed.fwhm_s"]) & set(summary) <= set(both.void_fields)
    assert "compressed.peak_power_w" in both.void_fields
    unknown = verdict_from_reasons(reason, {k: v for k, v in summary.items() if k != "grid.dt_s"})
    assert set(unknown.void_fields) == set(CODES["unresolved_pulse"].voids) & set(summary)
