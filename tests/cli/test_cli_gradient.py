"""A gradient fill through the commands that need no propagation (limits, envelope, fiber) and
the config error of a mixed fill: exit codes, the keys named, the pressures reported.

Contract tests (the keys are the documented interface); the physics of the profile is checked in
tests/propagation/test_profile.py and tests/planning/test_gradient_fill.py.
"""

from __future__ import annotations

import json

from fast_cases import write_fast_config

from hcfplan.cli.app import main


def _gradient(tmp_path, extra: str = ""):
    path = write_fast_config(tmp_path)
    text = path.read_text(encoding="utf-8").replace(
        "pressure_bar = 2.0", "entrance_pressure_bar = 0.0\nexit_pressure_bar = 3.0" + extra)
    path.write_text(text, encoding="utf-8")
    return path


def _json(capsys, *argv) -> dict:
    code = main(list(argv))
    out = capsys.readouterr().out
    assert code == 0
    return json.loads(out)


def test_limits_and_fiber_report_a_gradient(capsys, tmp_path):
    path = _gradient(tmp_path)
    report = _json(capsys, "limits", str(path), "--json")
    assert report["limits.cell.pressure_pa"] == 3e5
    names = {c["name"] for c in report["limits.checks"]}
    assert "self_focusing.highest_pressure" in names
    fiber = _json(capsys, "fiber", str(path), "--json")
    assert fiber["gas.fill"] == "gradient" and fiber["gas.exit_pressure_pa"] == 3e5
    assert abs(fiber["gas.mean_pressure_pa"] / 2e5 - 1) < 1e-12


def test_envelope_axis_is_the_exit_pressure(capsys, tmp_path):
    data = _json(capsys, "envelope", str(_gradient(tmp_path)), "--json")
    assert data["envelope.pressure_axis"].startswith("exit pressure")
    assert data["envelope.config_pressure_pa"] == 3e5


def test_mixed_fill_is_a_config_error(capsys, tmp_path):
    path = _gradient(tmp_path, "\npressure_bar = 2.0")
    assert main(["check", str(path)]) == 2
    err = capsys.readouterr().err
    assert "gas.pressure_bar and gas.entrance_pressure_bar and gas.exit_pressure_bar" in err
