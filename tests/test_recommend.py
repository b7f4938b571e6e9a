"""recommend: the chosen point of a goal pushed against a limit lies on that limit; a range
entirely beyond a limit names it. Invariant/contract tests on the fast test capillary."""

from __future__ import annotations

import pytest
from test_scan import write_fast_config

from hcfplan.errors import ConfigError
from hcfplan.io.config import load_config
from hcfplan.planning.recommend import parse_range, recommend
from hcfplan.planning.scan import limits_values, point_margins


@pytest.fixture()
def strong(tmp_path):
    # 500 uJ: the self-focusing limits fall inside 1-6 bar (rating 20 bar)
    return write_fast_config(tmp_path, energy_uj=500.0)


def _margins(path, pressure):
    config = load_config(path, overrides=[f"gas.pressure_bar={pressure!r}"])
    return point_margins(config, report=limits_values(config))


def test_shortest_lands_on_the_limit(strong):
    # invariant: more pressure -> more SPM -> shorter pulse, so the optimum is the largest
    # allowed pressure: the chosen point is within the limits and the analytic limits are
    # exceeded one search tolerance above it
    (rec,) = recommend(strong, "shortest", search="gas.pressure_bar=1:6", budget=5)
    best = rec.best
    assert best is not None and best.acceptable
    assert rec.allowed[0] == 1.0 and rec.allowed[1] < 6.0
    assert best.value == pytest.approx(rec.allowed[1], abs=rec.tolerance)
    assert _margins(strong, best.value)["acceptable"]
    above = _margins(strong, best.value + rec.tolerance)
    assert not above["acceptable"] and "self_focusing" in above["binding"]
    assert "self_focusing" in rec.reason  # the note names the limit it sits on
    fwhm = [e.objective for e in rec.evaluations]
    assert best.objective == min(fwhm)


def test_range_beyond_the_limit_names_it(strong):
    (rec,) = recommend(strong, "shortest", search="gas.pressure_bar=5:8", budget=4)
    assert rec.best is None and not rec.evaluations  # no full run is spent
    assert rec.reason.startswith("no allowed gas.pressure_bar in 5-8 bar: ")
    assert "self_focusing" in rec.reason and "beyond the limit above" in rec.reason


def test_thz_target_out_of_reach_gives_the_closest(strong):
    # contract: an unreachable target returns the closest point and says why
    (rec,) = recommend(strong, "thz_cutoff", search="gas.pressure_bar=1:2", target_thz=500.0,
                       budget=3)
    assert rec.best is not None
    assert rec.reason.startswith("THz cutoff") and "below the target 500 THz" in rec.reason


@pytest.mark.parametrize("text,fragment", [
    ("gas.temperature_k=1:2", "'gas.temperature_k': recommend searches"),
    ("gas.pressure_bar=3:1", "gas.pressure_bar=3:1: need 0 < LO < HI"),
    ("gas.pressure_bar=1", r"'gas.pressure_bar=1': expected gas.pressure_bar=LO:HI"),
])
def test_bad_range(text, fragment):
    with pytest.raises(ConfigError, match=fragment):
        parse_range(text)


def test_bad_goal(strong):
    with pytest.raises(ConfigError, match="--goal = 'fastest'"):
        recommend(strong, "fastest")


def test_shortest_ignores_spikes_on_a_pedestal(tmp_path, monkeypatch):
    # contract (common practice, no source): for the goal "shortest" a compressed pulse with
    # less than MIN_MAIN_LOBE_FRACTION of its energy in the main lobe does not count, and the
    # reason is named
    from hcfplan.planning import recommend as rec
    from hcfplan.planning import scan

    def fake_point(task):
        value = task["values"]["gas.pressure_bar"]
        lobe = 0.2 if value > 2.0 else 0.9  # high pressure: shorter spike, poor pulse
        return {"status": "ok", "message": "", "values": task["values"],
                "summary": {"compressed": {"fwhm_s": 10e-15 / value,
                                           "main_lobe_energy_fraction": lobe}},
                "margins": {"acceptable": True, "binding": ""}}

    monkeypatch.setattr(scan, "compute_point", fake_point)
    config = write_fast_config(tmp_path)
    recs = rec.recommend(config, "shortest", search="gas.pressure_bar=0.5:4", budget=8)
    best = rec.overall_best(recs)
    assert best is not None and best.best.value <= 2.0 + 1e-9
    runner_reasons = [e.binding for r in recs for e in r.evaluations if not e.acceptable]
    assert any("main-lobe energy fraction 0.2" in b for b in runner_reasons)
