"""Tests of hcfplan.planning.reports.limits on the demo configs and on edited cases."""

from __future__ import annotations

import json
import re
from pathlib import Path
from types import SimpleNamespace

import numpy as np
import pytest

from hcfplan.io.config import load_config
from hcfplan.limits import beam as limits
from hcfplan.limits.cautions import caution_lines
from hcfplan.materials.gases import GasFill, gas_medium
from hcfplan.planning.reports.limits import limits_report

CONFIGS = sorted((Path(__file__).resolve().parents[2] / "configs").glob("*.toml"))
STATUSES = {"within", "exceeds", "not checked"}
GAS_HANDLING = ["limits.room_volume_m3=40", "limits.cylinder_volume_l=50",
                "limits.cylinder_pressure_bar=200"]


@pytest.fixture(scope="module", params=CONFIGS, ids=lambda p: p.stem)
def demo(request):
    config = load_config(request.param)
    return config, limits_report(config)


def test_report_neutral_words_and_cautions(demo):
    """Every demo config: cautions present, statuses from the neutral set, never 'safe'."""
    _, report = demo
    assert report["limits.cautions"] == caution_lines()
    assert {c["status"] for c in report["limits.checks"]} <= STATUSES
    assert report.get("limits.cell.status", "not checked") in (
        "within rating", "exceeds rating", "not checked")
    text = json.dumps(report, allow_nan=False)  # also: no NaN/inf leak into the JSON
    assert not re.search(r"\bsafe\b", text, flags=re.IGNORECASE)
    if report["limits.acceptable"]:
        assert "within the modelled limits" in report["limits.acceptable_note"]


def test_checks_have_all_fields(demo):
    _, report = demo
    fields = {"name", "value", "limit", "unit", "limit_kind", "ratio", "margin", "required",
              "met", "status", "severity", "source", "assumption"}
    for check in report["limits.checks"]:
        assert set(check) == fields
        assert check["assumption"]


def test_taylor_fiber_not_checked():
    config = load_config(next(p for p in CONFIGS if "taylor" in p.stem))
    report = limits_report(config)
    names = {c["name"]: c["status"] for c in report["limits.checks"]}
    assert names["self_focusing.input"] == "not checked"
    assert names["ionization.input"] == "not checked"
    assert "limits.self_focusing.critical_power_w" not in report


@pytest.fixture(scope="module")
def neon():
    path = next(p for p in CONFIGS if "neon" in p.stem)
    return load_config(path, overrides=GAS_HANDLING)


def test_above_rating_exceeds(neon):
    """A fill above the rated pressure: 'exceeds rating' and not acceptable."""
    path = next(p for p in CONFIGS if "neon" in p.stem)
    config = load_config(path, overrides=["gas.pressure_bar=4.5", "cell.rated_pressure_bar=4"])
    report = limits_report(config)
    assert report["limits.cell.status"] == "exceeds rating"
    assert report["limits.acceptable"] is False
    (rating,) = [c for c in report["limits.checks"] if c["name"] == "cell.rating"]
    assert rating["status"] == "exceeds" and rating["margin"] == pytest.approx(4 / 4.5)


def test_max_pressure_and_energy_invariants(neon):
    """Invariant: at the reported max pressure the margin is the configured one (fresh real-gas
    medium); at the reported max energies the coupled peak power is P_cr / margin and the PPT
    fraction is the limit."""
    report = limits_report(neon)
    laser, lim = neon.laser, neon.limits
    p_max = report["limits.self_focusing.max_pressure_pa"]
    medium = gas_medium(GasFill(neon.gas.components, p_max, neon.gas.temperature))
    omega0 = 2 * np.pi * 299792458.0 / laser.wavelength
    n0 = float(medium.refractive_index(np.array([omega0]))[0])
    power = report["limits.self_focusing.peak_power_input_w"]
    margin = limits.self_focusing_power(laser.wavelength, n0, medium.n2) / power
    assert margin == pytest.approx(lim.self_focusing_margin, rel=1e-9)
    scale = report["limits.ionization.max_energy_j"] / laser.energy
    intensity = report["limits.ionization.peak_intensity_input_w_per_m2"] * scale
    assert intensity == pytest.approx(report["limits.ionization.limit_intensity_w_per_m2"],
                                      rel=1e-12)


def test_run_values_used(neon):
    """With a run, the in-fiber margin is P_cr / max_peak_power and the fraction is taken at
    max_peak_intensity (duck-typed run object)."""
    base = limits_report(neon)
    run = SimpleNamespace(max_peak_power=3 * base["limits.self_focusing.peak_power_input_w"],
                          max_peak_intensity=2e18, output_peak_power=1e10)
    report = limits_report(neon, run)
    assert report["limits.self_focusing.margin_in_fiber"] == pytest.approx(
        base["limits.self_focusing.margin_input"] / 3, rel=1e-12)
    assert report["limits.ionization.fraction_in_fiber"] > base["limits.ionization.fraction_input"]
    assert report["limits.window.peak_power_w"] == 1e10
    names = [c["name"] for c in report["limits.checks"]]
    assert "self_focusing.in_fiber" in names and "ionization.in_fiber" in names


def test_gas_handling_present(neon):
    """With room and cylinder given the oxygen estimate is made and compared with 19.5 %."""
    report = limits_report(neon)
    (o2,) = [c for c in report["limits.checks"] if c["name"] == "gas_handling.oxygen"]
    assert o2["limit"] == 0.195 and o2["limit_kind"] == "minimum"
    assert o2["value"] == pytest.approx(report["limits.gas_handling.oxygen_fraction"])
    assert 0 < o2["value"] < 0.2095
