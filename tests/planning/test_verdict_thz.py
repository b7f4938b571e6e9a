"""The THz crystal-limit check of the verdict (hcfplan.planning.verdict_thz): the pump fluence
on the generation crystal above the limit that binds makes a run a caution, naming the limit.

Contract tests; the limits themselves are checked in tests/thz/test_crystal_limits.py."""

from __future__ import annotations

import pytest

from hcfplan.materials.crystals import load_crystal
from hcfplan.planning.reports.thz_absolute import absolute_part
from hcfplan.planning.verdict import CODES, verdict_of_summary, verdict_of_thz_report
from hcfplan.thz.generation import thz_estimate
from hcfplan.thz.setup import ThzSetup
from tests.thz.test_thz import gaussian_pulse

BEYOND = {"fiber.transmission": 0.9, "thz.crystal": "ZnTe", "thz.peak_hz": 1e12,
          "thz.cutoff_hz": 3e12, "thz.pump_fluence_j_per_m2": 40.0,
          "thz.damage_fluence_j_per_m2": 500.0, "thz.two_photon_fluence_j_per_m2": 30.0,
          "thz.free_carrier_fluence_j_per_m2": 10.0,
          "thz.binding_limit": "free_carrier_absorption", "thz.crystal_fluence_margin": 0.25}


def test_code_is_a_caution_that_voids_nothing():
    assert CODES["thz_crystal_limit"].status == "caution"
    assert CODES["thz_crystal_limit"].voids == ()


def test_fluence_beyond_the_binding_limit_is_a_caution_naming_it():
    verdict = verdict_of_summary(BEYOND)
    assert verdict.status == "caution" and verdict.codes == ("thz_crystal_limit",)
    message = verdict.reasons[0].message
    assert ("pump peak fluence 0.004 J/cm^2 on ZnTe exceeds its free-carrier absorption limit "
            "0.001 J/cm^2 (4x), the limit that binds (free_carrier_absorption)") in message
    assert "upper bounds" in message
    assert verdict.void_fields == ()


@pytest.mark.parametrize(("binding", "name", "consequence"), [
    ("damage", "damage fluence", "maker's rating"),
    ("two_photon_absorption", "two-photon absorption limit", "upper bounds")])
def test_each_limit_is_named(binding, name, consequence):
    verdict = verdict_of_summary(BEYOND | {"thz.binding_limit": binding})
    assert f"its {name}" in verdict.reasons[0].message
    assert consequence in verdict.reasons[0].message


@pytest.mark.parametrize("change", [{"thz.crystal_fluence_margin": 1.0},
                                    {"thz.crystal_fluence_margin": 3.2},
                                    {"thz.crystal_fluence_margin": None},
                                    {"thz.binding_limit": None}])
def test_no_reason_within_the_limits_or_without_them(change):
    assert verdict_of_summary(BEYOND | change).status == "valid"


def test_thz_report_verdict_carries_the_limit():
    report = {k.removeprefix("thz."): v for k, v in BEYOND.items() if k.startswith("thz.")}
    verdict = verdict_of_thz_report(report)
    assert verdict.codes == ("thz_crystal_limit",) and verdict.status == "caution"


def test_estimate_beyond_its_limit_reaches_the_verdict():
    """End to end: the summary keys of a GaP estimate with a 0.2 mm beam (20 uJ, 100 fs at
    1030 nm, far above the GaP limits) give the caution; a 2 mm beam with 0.1 uJ does not."""
    gap = load_crystal("gap")
    for energy, waist, expected in ((20e-6, 0.2e-3, "caution"), (0.1e-6, 2e-3, "valid")):
        grid, spectrum = gaussian_pulse(100e-15, energy=energy)
        setup = ThzSetup(gap, 1e-3, beam_radius=waist)
        result = thz_estimate(grid, spectrum, setup)
        flat = {"fiber.transmission": 0.9, "thz.crystal": "GaP",
                **absolute_part(result, setup, focus_f_number=2.0)}
        verdict = verdict_of_summary(flat)
        assert verdict.status == expected
        if expected == "caution":
            assert verdict.codes == ("thz_crystal_limit",)
            assert f"({result.crystal_limits.binding})" in verdict.reasons[0].message


def test_model_limit_of_a_user_crystal_in_its_folder(tmp_path, monkeypatch):
    """The verdict reads the model range of a crystal in thz.table_dir (its search folders)."""
    from pathlib import Path

    from hcfplan.planning.verdict_thz import crystal_model_limit

    monkeypatch.delenv("HCFPLAN_CRYSTAL_PATH", raising=False)
    shipped = Path(__file__).resolve().parents[2] / "hcfplan/materials/data/crystals/gap.toml"
    text = shipped.read_text().replace('name = "GaP"', 'name = "MyGaP"')
    (tmp_path / "mygap.toml").write_text(text.replace("valid_max_thz = 20.0",
                                                      "valid_max_thz = 7.0"))
    assert crystal_model_limit("MyGaP") is None
    assert crystal_model_limit("MyGaP", (tmp_path,)) == pytest.approx(7e12)


def test_damage_binding_with_an_absorption_limit_also_exceeded():
    """Damage binds, but the fluence is above the free-carrier limit too: the figures are then
    upper bounds, and the message says so instead of "stand as computed"."""
    flat = BEYOND | {"thz.damage_fluence_j_per_m2": 5.0, "thz.binding_limit": "damage",
                     "thz.crystal_fluence_margin": 0.125}
    message = verdict_of_summary(flat).reasons[0].message
    assert "(damage)" in message and "maker's rating" in message
    assert "also above its two-photon absorption limit" in message  # the first exceeded
    assert "upper bounds" in message and "stand as computed" not in message
    alone = BEYOND | {"thz.damage_fluence_j_per_m2": 5.0, "thz.binding_limit": "damage",
                      "thz.crystal_fluence_margin": 0.125, "thz.pump_fluence_j_per_m2": 8.0,
                      "thz.free_carrier_fluence_j_per_m2": 10.0}
    assert "stand as computed" in verdict_of_summary(alone).reasons[0].message
