"""``--spread``: the chain at the corners of an input band (invariant and error tests). No external
source is needed for these checks."""

from __future__ import annotations

import json

import pytest
from fast_cases import FAST

from hcfplan.cli.app import main
from hcfplan.errors import ConfigError
from hcfplan.planning.spread import parse_spread


def test_parse_spread_names_and_paths():
    spec = parse_spread("energy=5%, pressure=2%,laser.fwhm_fs=10%")
    assert spec.items == (("laser.energy_uj", 0.05), ("gas.pressure_bar", 0.02),
                          ("laser.fwhm_fs", 0.10))


@pytest.mark.parametrize("text,fragment", [
    ("energy=5", "each item must be NAME=P%"),
    ("colour=5%", "unknown input"),
    ("laser.colour=5%", "laser.colour: unknown key"),
    ("energy=0%", "must be > 0 %"),
    ("energy=5%,energy=3%", "given twice"),
    ("energy=1%,pressure=1%,fwhm=1%,length=1%,core=1%", "at most 4 inputs"),
])
def test_parse_spread_errors(text, fragment):
    with pytest.raises(ConfigError) as info:
        parse_spread(text)
    assert fragment in str(info.value)


def test_spread_brackets_the_energy_scaling(tmp_path, capsys):
    # invariant: the self-focusing margin is P_cr / P with P proportional to the energy, so
    # over energy +-5 % the corners give exactly nominal/1.05 and nominal/0.95
    config = tmp_path / "fast.toml"
    config.write_text(FAST)
    code = main(["simulate", str(config), "--out", str(tmp_path / "out"), "--quiet",
                 "--no-figures", "--spread", "energy=5%", "--workers", "1"])
    assert code == 0, capsys.readouterr().err
    summary = json.loads((tmp_path / "out" / "summary.json").read_text())
    spread = summary["spread"]
    assert spread["runs"] == 2 and not spread["failed"]
    sf = spread["ranges"]["margins.self_focusing"]
    assert sf["low"] == pytest.approx(sf["nominal"] / 1.05, rel=1e-9)
    assert sf["high"] == pytest.approx(sf["nominal"] / 0.95, rel=1e-9)
    # the limits use the worst corner
    assert summary["limits"]["worst_case.self_focusing_margin"] == pytest.approx(sf["low"])
    assert summary["limits"]["worst_case.status"] in ("within", "exceeds")
    fwhm = spread["ranges"]["compressed.fwhm_s"]
    assert fwhm["low"] <= fwhm["high"]


def test_bad_spread_refused_before_running(tmp_path, capsys):
    config = tmp_path / "fast.toml"
    config.write_text(FAST)
    out = tmp_path / "out"
    code = main(["simulate", str(config), "--out", str(out), "--quiet", "--spread", "energy=5"])
    assert code == 2
    assert "--spread" in capsys.readouterr().err
    assert not out.exists()


def test_compare_with_spread_json(tmp_path, capsys):
    # contract: compare --spread reports a spread per side; B has 10 % more energy
    config = tmp_path / "fast.toml"
    config.write_text(FAST)
    code = main(["compare", str(config), "--set-b", "laser.energy_uj=330", "--spread",
                 "energy=5%", "--workers", "1", "--json"])
    out = capsys.readouterr().out
    assert code == 0
    data = json.loads(out)
    assert set(data["spread"]) == {"a", "b"}
    sf_a = data["spread"]["a"]["ranges"]["margins.self_focusing"]["nominal"]
    sf_b = data["spread"]["b"]["ranges"]["margins.self_focusing"]["nominal"]
    assert sf_a / sf_b == pytest.approx(1.1, rel=1e-9)  # P_cr / P with P proportional to E
