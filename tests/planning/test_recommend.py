"""recommend: the search finds the best valid point of its range, never worse than its own
coarse pass, with several optima, non-monotone cutoffs and plateaus; the smallest pressure that
reaches a THz target; the joint pressure x energy search; the binding constraint named; the
cell rating never used as an operating point.

Most tests replace the chain runs (``recommend_points.run_records``) with analytic objectives:
they are about the search logic, so the objective and the verdict of every point are known.
The last tests run the real chain on small grids. Contract and invariant tests: no physics
values are checked, no external source is needed.
"""

from __future__ import annotations

import json
import math
from pathlib import Path

import pytest
from fast_cases import write_fast_config

from hcfplan.cli.app import main
from hcfplan.errors import ConfigError
from hcfplan.planning import recommend_points
from hcfplan.planning.recommend import parse_range, parse_ranges, recommend
from hcfplan.planning.recommend_search import coarse_values

ROOT = Path(__file__).resolve().parents[2]
P, E = "gas.pressure_bar", "laser.energy_uj"


def _check(name, margin, required=1.0, ratio="limit/value"):
    return {"name": name, "margin": margin, "required": required, "ratio": ratio,
            "limit_kind": "maximum", "severity": "limit",
            "status": "within" if margin >= required else "exceeds"}


def fake_record(task, *, peak=None, fwhm=None, cutoff=None, sf=None, ion=None, failed=None):
    """A point record from analytic functions of the point's values (a dict key -> value).

    ``sf(values)``: self-focusing margin P_cr/P (required 2); ``ion(values)``: ionisation
    margin in the fiber (required 1); ``failed(values)``: the run fails.
    """
    v = task["values"]
    checks = [_check("self_focusing.input", sf(v) if sf else 50.0, 2.0, "P_cr/P"),
              _check("ionization.in_fiber", ion(v) if ion else 1e3, 1.0, "limit/fraction")]
    beyond = [c["name"] for c in checks if c["status"] == "exceeds"]
    bad = failed is not None and failed(v)
    return {
        "key": task["key"], "values": v, "status": "failed" if bad else "ok",
        "message": "step size underflow" if bad else "",
        "summary": {} if bad else {
            "compressed": {"peak_power_w": peak(v) if peak else 1e8,
                           "fwhm_s": fwhm(v) if fwhm else 30e-15,
                           "main_lobe_energy_fraction": 0.9},
            "thz": {"cutoff_hz": cutoff(v) if cutoff else 5e12},
            "limits": {"checks": checks}},
        "margins": {"acceptable": not beyond, "binding": ", ".join(beyond),
                    "pressure_pa": v.get(P, 2.0) * 1e5, "self_focusing_required": 2.0,
                    "ionization_limit": 1e-4},
    }


@pytest.fixture()
def fake_runs(monkeypatch):
    """Install analytic point records; returns the list of every point run (values dicts)."""
    seen = []

    def install(**functions):
        def run_records(tasks, workers):
            seen.extend(t["values"] for t in tasks)
            return [fake_record(t, **functions) for t in tasks]

        monkeypatch.setattr(recommend_points, "run_records", run_records)
        return seen

    return install


@pytest.fixture()
def weak(tmp_path):
    # 20 uJ: no input-side limit in 0.5-18 bar; the rating (20 bar) caps the search at 18 bar
    return write_fast_config(tmp_path, "weak.toml", energy_uj=20.0)


def _coarse_best(lo, hi, n, goal_value, valid):
    """Best valid value of ``goal_value`` over the coarse pass (maximised)."""
    xs = [x for x in coarse_values(lo, hi, n) if valid(x)]
    return max(goal_value(x) for x in xs)


# ---------------------------------------------------------------------------------------------
# (1) never worse than the best valid coarse point


def _two_optima(p):  # a narrow high peak near 12.3 bar and a broad lower one near 3 bar
    return 1e8 * (math.exp(-((p - 3.0) / 2.0) ** 2) + 1.3 * math.exp(-((p - 12.3) / 0.9) ** 2))


def _wiggly(p):  # non-monotone, many local optima
    return 1e8 * (1.0 + 0.3 * math.sin(2.7 * p) + 0.05 * p)


def _plateau(p):  # flat top between 6 and 10 bar, a small bump at 15 bar
    return 1e8 * (min(1.0, max(0.0, (p - 2.0) / 4.0)) if p < 10 else
                  max(0.4, 1.0 - (p - 10) / 4.0) + 0.1 * math.exp(-((p - 15) / 0.5) ** 2))


@pytest.mark.parametrize("objective", [_two_optima, _wiggly, _plateau])
@pytest.mark.parametrize("invalid", [
    lambda p: False,
    lambda p: 11.0 < p < 13.5,  # the best region is beyond a limit in the run
    lambda p: p > 8.0,  # everything above 8 bar
])
def test_never_worse_than_the_coarse_pass(weak, fake_runs, objective, invalid):
    # property: the answer is valid and at least as good as the best valid coarse point
    seen = fake_runs(peak=lambda v: objective(v[P]),
                     ion=lambda v: 0.5 if invalid(v[P]) else 3.0)
    (rec,) = recommend(weak, "peak_power", search="gas.pressure_bar=0.5:18", coarse=12,
                       budget=24)
    assert rec.coarse == 12 and rec.runs <= 24 and len(seen) == rec.runs
    best = rec.best
    assert best is not None and best.valid and not invalid(best.value)
    assert best.objective >= _coarse_best(0.5, 18.0, 12, objective,
                                          lambda p: not invalid(p)) * (1 - 1e-12)
    assert best.objective == max(e.objective for e in rec.evaluations if e.valid)
    # every excluded point is counted with its reason
    bad = [e for e in rec.evaluations if not e.valid]
    assert sum(n for _, n in rec.excluded) == len(bad)
    assert all(e.reasons == ("ionisation fraction in the fiber > 0.0001",) for e in bad)


def test_refinement_finds_the_narrow_peak(weak, fake_runs):
    # the narrow peak (12.3 bar) lies between coarse points; the refinement gets within the
    # search tolerance of it, where a search for one optimum climbing the broad hill would not
    fake_runs(peak=lambda v: _two_optima(v[P]))
    (rec,) = recommend(weak, "peak_power", search="gas.pressure_bar=0.5:18")
    assert abs(rec.best.value - 12.3) < 0.5
    assert rec.best.objective > 1.2e8


def test_shortest_ignores_spikes_on_a_pedestal(weak, monkeypatch):
    # contract (common practice, no source): for the goal "shortest" a compressed pulse with
    # less than MIN_MAIN_LOBE_FRACTION of its energy in the main lobe does not count
    def run_records(tasks, workers):
        out = []
        for t in tasks:
            record = fake_record(t, fwhm=lambda v: 10e-15 / v[P])
            record["summary"]["compressed"]["main_lobe_energy_fraction"] = (
                0.2 if t["values"][P] > 2.0 else 0.9)  # high pressure: a spike on a pedestal
            out.append(record)
        return out

    monkeypatch.setattr(recommend_points, "run_records", run_records)
    (rec,) = recommend(weak, "shortest", search="gas.pressure_bar=0.5:4", coarse=5, budget=9)
    assert rec.best is not None and rec.best.value <= 2.0
    assert dict(rec.excluded)["main-lobe energy fraction < 0.5"] >= 2


def test_failed_runs_are_excluded_and_counted(weak, fake_runs):
    fake_runs(peak=lambda v: 1e8 * v[P], failed=lambda v: v[P] > 10.0)
    (rec,) = recommend(weak, "peak_power", search="gas.pressure_bar=1:12", coarse=12,
                       budget=16)
    assert rec.best.value <= 10.0 and rec.best.status == "ok"
    failed = [e for e in rec.evaluations if e.status == "failed"]
    assert failed and all(not e.valid for e in failed)
    assert any(r.endswith("(run_failed)") for r, _ in rec.excluded)


# ---------------------------------------------------------------------------------------------
# (2) --target-thz: the smallest pressure that reaches the target


def _cutoff(p):  # crosses 7.5 THz upwards near 2.2 bar, dips below 4-6 bar, crosses again
    return 1e12 * (5.0 + 3.0 * math.sin(0.55 * (p - 0.5)) + 0.25 * p)


def test_target_returns_the_smallest_crossing(weak, fake_runs):
    fake_runs(cutoff=lambda v: _cutoff(v[P]))
    (rec,) = recommend(weak, "thz_cutoff", search="gas.pressure_bar=0.5:18", target_thz=7.5,
                       workers=2)
    best, tol = rec.best, rec.tolerance[0]
    assert best is not None and best.objective >= 7.5e12
    # the first crossing of the target, from the analytic function
    xs = [0.5 + i * 1e-4 for i in range(180_000)]
    first = next(x for x in xs if _cutoff(x) >= 7.5e12)
    assert first <= best.value <= first + tol
    reached = [e.value for e in rec.evaluations if e.valid and e.objective >= 7.5e12]
    assert best.value == min(reached)
    assert rec.runs <= rec.coarse + 8  # a few runs of bisection


def test_target_skips_a_crossing_beyond_a_limit(weak, fake_runs):
    # the cutoff reaches the target first at 3-5 bar, where the run is beyond a limit
    fake_runs(cutoff=lambda v: 1e12 * (9.0 if 3.0 < v[P] < 5.0 else v[P]),
              ion=lambda v: 0.5 if 3.0 < v[P] < 5.0 else 3.0)
    (rec,) = recommend(weak, "thz_cutoff", search="gas.pressure_bar=1:13", target_thz=8.0,
                       coarse=13, budget=20)
    assert rec.best.valid and 8.0 <= rec.best.value <= 8.0 + rec.tolerance[0]


def test_target_reached_just_below_an_excluded_part(weak, fake_runs):
    # no coarse point both reaches 5.5 THz and is valid (everything above 5.8 bar is beyond a
    # limit); the target is reached between the last valid coarse point and the excluded part
    fake_runs(cutoff=lambda v: 1e12 * v[P], ion=lambda v: 0.5 if v[P] > 5.8 else 3.0)
    (rec,) = recommend(weak, "thz_cutoff", search="gas.pressure_bar=1:13", target_thz=5.5,
                       coarse=13, budget=22)
    assert rec.best is not None and rec.best.valid
    assert 5.5 <= rec.best.value <= 5.5 + rec.tolerance[0]


def test_target_out_of_reach_names_each_part(weak, fake_runs):
    # no answer: which reason excludes which part of the range, and the closest valid point
    fake_runs(cutoff=lambda v: 1e12 * v[P], sf=lambda v: 2.5 if v[P] < 5.0 else 1.5)
    (rec,) = recommend(weak, "thz_cutoff", search="gas.pressure_bar=1:10", target_thz=8.0,
                       coarse=10, budget=12)
    assert rec.best is None and rec.closest is not None and rec.closest.value < 5.0
    # the edge of the excluded part is probed (the target might be reached just below it)
    low, high = rec.spans
    assert low.startswith("1–4.") and low.endswith(" bar: goal not reached")
    assert high.endswith("–10 bar: self-focusing margin < 2")
    edge = float(low.split("–")[1].split()[0])
    assert 4.0 < edge < 5.0 and rec.runs <= 12
    assert rec.reason.startswith("no point reaches the THz cutoff target 8 THz")


# ---------------------------------------------------------------------------------------------
# (3) pressure x energy


def test_two_key_search(weak, fake_runs):
    # optimum inside the box, off the coarse grid; the run is beyond a limit at high energy
    # and pressure (P > 6e7 at p * E > 600)
    def peak(v):
        return 1e8 * math.exp(-((v[P] - 6.7) / 3.0) ** 2 - ((v[E] - 43.0) / 20.0) ** 2)

    seen = fake_runs(peak=peak, sf=lambda v: 2.2 if v[P] * v[E] < 600 else 1.8)
    (rec,) = recommend(weak, "peak_power", search=["gas.pressure_bar=1:30",
                                                   "laser.energy_uj=10:80"])
    assert rec.keys == (P, E) and rec.coarse == 36 and rec.runs <= 36 + 16
    assert rec.allowed[0] == (1.0, 18.0)  # 0.9 x 20 bar
    grid = [(p, e) for p in coarse_values(1, 18, 6) for e in coarse_values(10, 80, 6)
            if p * e < 600]
    coarse_best = max(peak({P: p, E: e}) for p, e in grid)
    best = rec.best
    assert best.valid and best.values[0] * best.values[1] < 600
    assert best.objective >= coarse_best and best.objective > 0.95e8
    assert max(v[P] for v in seen) <= 18.0 + 1e-9
    assert any("points in" in s and "self-focusing margin < 2" in s for s in rec.spans)


# ---------------------------------------------------------------------------------------------
# (4) the binding constraint at the answer


def test_binding_constraint_named(weak, fake_runs):
    # peak power grows with pressure; the self-focusing margin P_cr/P = 4.1 / p (required 2)
    # falls below 2 above 2.05 bar, so the answer sits near 2 bar with P_cr/P close to 2
    fake_runs(peak=lambda v: 1e8 * v[P], sf=lambda v: 4.1 / v[P])
    (rec,) = recommend(weak, "peak_power", search="gas.pressure_bar=1:3", coarse=12,
                       budget=24)
    assert rec.best.value <= 2.05
    first = rec.binding[0]
    assert first["name"] == "self_focusing.input"
    assert first["text"].startswith("self-focusing margin P_cr/P = 2")
    assert "(required >= 2): met" in first["text"]
    assert rec.spans[-1].endswith("bar: self-focusing margin < 2")


def test_range_beyond_the_limit_names_it(tmp_path):
    # 500 uJ: the input-side self-focusing limit lies below 5 bar; no full run is spent
    strong = write_fast_config(tmp_path, energy_uj=500.0)
    (rec,) = recommend(strong, "shortest", search="gas.pressure_bar=5:8", coarse=4)
    assert rec.best is None and not rec.evaluations and rec.runs == 0
    assert rec.reason.startswith("no allowed gas.pressure_bar in 5-8 bar: ")
    assert "self_focusing" in rec.reason and "beyond the limit above" in rec.reason


# ---------------------------------------------------------------------------------------------
# (5) the rating is never an operating point


@pytest.mark.parametrize("fraction,cap", [(None, 18.0), (0.5, 10.0)])
def test_rating_fraction_respected(tmp_path, fake_runs, fraction, cap):
    config = write_fast_config(tmp_path, energy_uj=20.0)  # rated 20 bar
    seen = fake_runs(peak=lambda v: 1e8 * v[P])  # the goal pushes to the highest pressure
    over = () if fraction is None else (f"limits.rating_fraction={fraction}",)
    (rec,) = recommend(config, "peak_power", search="gas.pressure_bar=1:30", coarse=6,
                       budget=10, overrides=over)
    assert max(v[P] for v in seen) <= cap + 1e-9
    assert rec.best.value == pytest.approx(cap)
    assert rec.rating_fraction == (fraction or 0.9) and rec.pressure_cap == pytest.approx(cap)
    assert rec.binding[0]["name"] == "limits.rating_fraction"


def test_energy_search_refuses_a_fill_above_the_cap(tmp_path):
    config = write_fast_config(tmp_path, energy_uj=20.0)
    (rec,) = recommend(config, "peak_power", search="laser.energy_uj=10:50",
                       overrides=("gas.pressure_bar=19",))
    assert rec.best is None and not rec.evaluations
    assert "fill pressure 19 bar is above 0.9 x the cell rating 20 bar" in rec.reason


# ---------------------------------------------------------------------------------------------
# input checks


@pytest.mark.parametrize("text,fragment", [
    ("gas.temperature_k=1:2", "'gas.temperature_k': recommend searches"),
    ("gas.pressure_bar=3:1", "gas.pressure_bar=3:1: need 0 < LO < HI"),
    ("gas.pressure_bar=1", r"'gas.pressure_bar=1': expected gas.pressure_bar=LO:HI"),
])
def test_bad_range(text, fragment):
    with pytest.raises(ConfigError, match=fragment):
        parse_range(text)


def test_bad_ranges():
    with pytest.raises(ConfigError, match="the same key is given twice"):
        parse_ranges(["gas.pressure_bar=1:2", "gas.pressure_bar=3:4"])
    with pytest.raises(ConfigError, match="give one or two ranges, got 3"):
        parse_ranges(["gas.pressure_bar=1:2", "laser.energy_uj=1:2", "laser.energy_uj=3:4"])


def _run(capsys, *argv):
    code = main([str(a) for a in argv])
    out, err = capsys.readouterr()
    return code, out, err


@pytest.mark.parametrize("argv,fragment", [
    (["--goal", "fastest"], "--goal = 'fastest'"),
    (["--goal", "shortest", "--coarse", "2"], "--coarse = 2: must be >= 3"),
    (["--goal", "shortest", "--budget", "5"], "--budget = 5: must be at least the coarse pass"),
    (["--goal", "shortest", "--workers", "0"], "--workers = 0: must be >= 1"),
    (["--goal", "thz_cutoff", "--target-thz", "5", "--vary", "gas.pressure_bar=1:2",
      "--vary", "laser.energy_uj=1:2"], "--target-thz: searches one key"),
])
def test_bad_options_exit_2_one_line(capsys, weak, argv, fragment):
    code, _, err = _run(capsys, "recommend", weak, *argv)
    assert code == 2 and fragment in err and len(err.strip().splitlines()) == 1


# ---------------------------------------------------------------------------------------------
# (6) real runs


def test_shortest_on_the_input_limit_real_runs(tmp_path):
    # invariant: more pressure -> more SPM -> shorter pulse, so the best point lies on the
    # edge of the allowed range, cut by an input-side self-focusing check; the answer names it
    strong = write_fast_config(tmp_path, energy_uj=500.0)
    (rec,) = recommend(strong, "shortest", search="gas.pressure_bar=1:6", coarse=4, budget=6,
                       overrides=("grid.points=512",))
    best = rec.best
    assert best is not None and best.valid and rec.allowed[0][1] < 6.0
    assert best.value == pytest.approx(rec.allowed[0][1], abs=rec.tolerance[0])
    assert "self_focusing" in rec.reason
    assert "self-focusing margin" in rec.binding[0]["text"]
    assert best.objective == min(e.objective for e in rec.evaluations if e.valid)


def test_cli_end_to_end_on_the_demo(capsys):
    # one real recommend run on the anti-resonant demo with a tiny grid, two workers
    code, out, err = _run(capsys, "recommend", ROOT / "configs" / "yb_arf_argon.toml",
                          "--goal", "peak_power", "--set", "grid.points=512", "--coarse", "4",
                          "--budget", "6", "--workers", "2", "--json")
    assert code == 0, err
    report = json.loads(out)
    chosen = report["chosen"]
    assert chosen["best"]["valid"] and chosen["runs"] <= 6 and chosen["coarse_points"] == 4
    assert chosen["rating_fraction"] == 0.9 and chosen["pressure_cap_pa"] == pytest.approx(18e5)
    assert all(e["values"][P] <= 18.0 for e in chosen["evaluations"])
    assert chosen["binding"] and chosen["binding"][0]["text"]
    assert any("maker's rating" in c for c in report["cautions"])
    code, out, err = _run(capsys, "recommend", ROOT / "configs" / "yb_arf_argon.toml",
                          "--goal", "peak_power", "--set", "grid.points=512", "--coarse", "4",
                          "--budget", "4", "--workers", "1")
    assert code == 0, err
    assert "0.9 x the cell rating = 18 bar (limits.rating_fraction)" in out
    assert "binding:" in out and "Cautions:" in out
