"""compare: the table of A and B with B - A and B / A. Invariant/contract tests. No external source
is needed for these checks."""

from __future__ import annotations

import pytest
from fast_cases import write_fast_config

from hcfplan.io.config import load_config
from hcfplan.planning.compare import MULTIMODE_KEYS, ROWS, compare_configs


def test_rows_differences_and_ratios(tmp_path):
    path = write_fast_config(tmp_path)
    a = load_config(path)
    b = load_config(path, overrides=["laser.energy_uj=500"])
    comparison = compare_configs(a, b)
    rows = {r["key"]: r for r in comparison.rows}
    # the rows of multimode runs are left out when neither side is one
    assert [r["key"] for r in comparison.rows] == [k for _, k, _, _ in ROWS
                                                   if k not in MULTIMODE_KEYS]
    energy = rows["input.energy_j"]
    # invariant: the input energy is the configured one, so B / A = 500 / 200 exactly
    assert energy["ratio"] == pytest.approx(2.5, rel=1e-12)
    assert energy["difference"] == pytest.approx(300e-6, rel=1e-12)
    # invariant: P_cr is the same fill, so the margin scales as 1 / launched peak power
    sf = rows["margins.self_focusing"]
    peak = rows["input.peak_power_w"]
    assert sf["ratio"] == pytest.approx(1 / peak["ratio"], rel=1e-9)
    for row in comparison.rows:
        if row["a"] is not None and row["b"] is not None:
            assert row["difference"] == pytest.approx(row["b"] - row["a"])
