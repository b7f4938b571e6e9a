"""``report.html`` of simulate, scan and compare folders: self-contained, complete, skipped by
``--no-report``.

Contract tests of the page against the files of its own folder (summary, table, figures); no
physics value is checked, so no external source is needed.
"""

from __future__ import annotations

import base64
import json
import re

import pytest
from fast_cases import write_fast_config

from hcfplan.cli.app import main
from hcfplan.version import __version__


def assert_self_contained(text: str) -> None:
    """No script, no external style sheet, font, frame or image; every image inline."""
    assert text.startswith("<!DOCTYPE html>") and text.rstrip().endswith("</html>")
    lowered = text.lower()
    for tag in ("<script", "<link", "<iframe", "@import", "url("):
        assert tag not in lowered, tag
    assert not re.search(r"(src|href)=\"(?!data:)", text), "a reference outside the file"
    assert "http://" not in lowered and "https://" not in lowered


def embedded_pngs(text: str) -> list[bytes]:
    return [base64.b64decode(m) for m in re.findall(r'src="data:image/png;base64,([^"]+)"',
                                                    text)]


@pytest.mark.parametrize("kind", ["run", "scan", "compare"])
def test_report_is_self_contained_with_every_figure(folders, kind):
    folder = folders[kind]
    text = (folder / "report.html").read_text(encoding="utf-8")
    assert_self_contained(text)
    pngs = sorted(p.read_bytes() for p in folder.glob("*.png"))
    assert pngs, "the folder has figures"
    assert sorted(embedded_pngs(text)) == pngs  # the files themselves, not drawn again
    for heading in ("Verdict", "Cautions", "Figures", "Data sources used", "Provenance",
                    "Inputs"):
        assert f">{heading}" in text, heading
    assert __version__ in text and re.search(r"Plan( \(first point\))?: \d", text)
    assert re.search(r"\bsafe\b", text.lower()) is None  # never calls a point safe


def test_run_report_holds_the_summary(folders):
    folder = folders["run"]
    summary = json.loads((folder / "summary.json").read_text())
    text = (folder / "report.html").read_text(encoding="utf-8")
    assert f'badge {summary["verdict"]["status"]}' in text
    for reason in summary["verdict"]["reasons"]:
        assert reason["code"] in text
    for check in summary["limits"]["checks"]:
        assert check["name"] in text
    fwhm = summary["compressed"]["fwhm_s"] / 1e-15
    assert f"{fwhm:.4g}" in text
    from hcfplan.planning.scan import config_key

    assert config_key(summary["config"]) in text
    assert "Wahlstrand" in text or "Borzsonyi" in text  # the gas table's sources


def test_scan_and_compare_reports_list_points_and_sides(folders):
    scan = (folders["scan"] / "report.html").read_text(encoding="utf-8")
    assert "2 points" in scan and "gas.pressure_bar" in scan
    state = json.loads((folders["scan"] / "scan.json").read_text())
    assert state["definition"] in scan
    cmp = (folders["compare"] / "report.html").read_text(encoding="utf-8")
    assert "B - A" in cmp and "laser.energy_uj=300" in cmp
    assert cmp.count("config hash") == 2


def test_no_report_skips_it(tmp_path):
    config = write_fast_config(tmp_path)
    assert main(["simulate", str(config), "--out", str(tmp_path / "run"), "--quiet",
                 "--no-figures", "--no-report"]) == 0
    assert not (tmp_path / "run" / "report.html").exists()
    assert (tmp_path / "run" / "summary.json").exists()
    assert main(["compare", str(config), "--set-b", "laser.energy_uj=300", "--out",
                 str(tmp_path / "cmp"), "--no-report", "--json"]) == 0
    assert not (tmp_path / "cmp" / "report.html").exists()


def test_report_of_an_invalid_run_shows_void_numbers(tmp_path):
    from hcfplan.report.run import run_report_html

    summary = {
        "compressed": {"fwhm_s": 5e-15},
        "verdict": {"status": "invalid", "void_fields": ["compressed.fwhm_s"],
                    "reasons": [{"code": "no_transmission",
                                 "message": "fiber transmission 1e-05 (below 0.001)"}]},
        "config": {"laser": {"wavelength_nm": 800.0}},
    }
    text = run_report_html(tmp_path, summary, "hcfplan simulate x.toml")
    assert_self_contained(text)
    assert "void (no_transmission)" in text and "badge invalid" in text
    assert "No figures in this folder" in text
