"""The THz peak field and efficiency in recommend, compare and --spread."""

from __future__ import annotations

import pytest

from hcfplan.errors import ConfigError
from hcfplan.planning.compare import ROWS
from hcfplan.planning.recommend import recommend
from hcfplan.planning.recommend_points import GOALS, point_verdict
from hcfplan.planning.spread import REPORTED


def _record(field, margin):
    return {"status": "ok", "margins": {},
            "summary": {"thz": {"peak_field_v_per_m": field, "crystal_fluence_margin": margin,
                                "binding_limit": "free_carrier_absorption"}}}


def test_thz_field_goal_maximises_the_peak_field():
    assert GOALS["thz_field"] == ("thz", "peak_field_v_per_m", -1.0)


def test_thz_field_goal_keeps_the_crystal_below_its_binding_limit():
    valid, reasons, _ = point_verdict(_record(5e7, 0.5), "thz_field")
    assert not valid and reasons == ("crystal fluence beyond its free_carrier_absorption limit",)
    assert point_verdict(_record(5e7, 1.5), "thz_field")[0]
    valid, reasons, _ = point_verdict(_record(None, 1.5), "thz_field")
    assert not valid and reasons == ("no thz.peak_field_v_per_m",)


def test_compare_and_spread_carry_field_energy_and_efficiency():
    keys = [row[1] for row in ROWS]
    for key in ("thz.peak_field_v_per_m", "thz.energy_estimate_j", "thz.efficiency",
                "thz.cutoff_hz"):
        assert key in keys
    reported = {(section, key) for _, section, key, _ in REPORTED}
    assert {("thz", "peak_field_v_per_m"), ("thz", "efficiency")} <= reported


def test_thz_field_goal_needs_a_beam_waist(tmp_path):
    from fast_cases import write_fast_config

    config = write_fast_config(tmp_path)
    with pytest.raises(ConfigError, match=r"--goal thz_field: needs .*thz\.beam_waist_um"):
        recommend(config, "thz_field")
