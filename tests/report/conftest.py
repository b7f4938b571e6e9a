"""Report folders shared by the report tests: one simulate, scan and compare folder of the
fast test config, made once per test run through the command line."""

from __future__ import annotations

import pytest
from fast_cases import write_fast_config

from hcfplan.cli.app import main


@pytest.fixture(scope="session")
def folders(tmp_path_factory):
    base = tmp_path_factory.mktemp("report")
    config = write_fast_config(base)
    out = {"config": config}
    assert main(["simulate", str(config), "--out", str(base / "run"), "--quiet"]) == 0
    out["run"] = base / "run"
    assert main(["scan", str(config), "--vary", "gas.pressure_bar=1,2", "--workers", "1",
                 "--out", str(base / "scan"), "--json"]) == 0
    out["scan"] = base / "scan"
    assert main(["compare", str(config), "--set-b", "laser.energy_uj=300", "--out",
                 str(base / "cmp"), "--json"]) == 0
    out["compare"] = base / "cmp"
    return out
