"""Results kept between calls in one process (hcfplan.planning.memo; the fiber report and
the config-only limits of the limits report) and the parsed table files kept per file state
(hcfplan.materials.table_files): equal inputs give equal results, independent copies; a changed
input or file is computed or read again.

Contract tests; no external source is needed.
"""

from __future__ import annotations

import dataclasses

from fast_cases import write_fast_config

from hcfplan.io.config import load_config
from hcfplan.materials.table_files import read_table_toml
from hcfplan.planning import memo
from hcfplan.planning.reports.fiber import fiber_report
from hcfplan.planning.reports.limits import limits_report


def _config(folder):
    return load_config(write_fast_config(folder))


def test_an_equal_config_gets_an_independent_copy(tmp_path):
    memo.forget()
    calls = []

    def compute():
        calls.append(1)
        return {"value": [1.0, 2.0]}

    config = _config(tmp_path)
    first = memo.remembered("test", config, compute)
    first["value"].append(3.0)  # the caller's copy only
    again = memo.remembered("test", _config(tmp_path), compute)
    assert again == {"value": [1.0, 2.0]} and len(calls) == 1
    other = dataclasses.replace(config, fiber=dataclasses.replace(config.fiber, length=0.5))
    memo.remembered("test", other, compute)
    assert len(calls) == 2


def test_fiber_report_kept_equals_the_computed_one(tmp_path):
    memo.forget()
    config = _config(tmp_path)
    computed = fiber_report(config)
    kept = fiber_report(_config(tmp_path))
    assert kept == computed and kept is not computed


def test_a_changed_table_file_is_read_again(tmp_path):
    path = tmp_path / "table.toml"
    path.write_text("a = 1\n", encoding="utf-8")
    first = read_table_toml(path)
    first["a"] = 5  # the caller's copy only
    assert read_table_toml(path) == {"a": 1}
    path.write_text("a = 22\n", encoding="utf-8")
    assert read_table_toml(path) == {"a": 22}


def test_limits_report_with_kept_limits_equals_the_computed_one(tmp_path):
    memo.forget()
    config = _config(tmp_path)
    computed = limits_report(config)
    kept = limits_report(_config(tmp_path))
    assert kept == computed
    memo.forget()
    assert limits_report(config) == computed
    # a changed margin is a new key: the highest pressure is searched again, for that margin
    limits = dataclasses.replace(config.limits,
                                 self_focusing_margin=4 * config.limits.self_focusing_margin,
                                 ionization_fraction_limit=config.limits.ionization_fraction_limit
                                 / 10)
    stricter = limits_report(dataclasses.replace(config, limits=limits))
    for key in ("limits.self_focusing.max_pressure_pa",
                "limits.ionization.limit_intensity_w_per_m2"):
        assert stricter[key] < computed[key], key


def test_a_table_file_copy_is_independent_at_every_depth(tmp_path):
    path = tmp_path / "nested.toml"
    path.write_text('name = "x"\n[a]\nb = [1, 2, {c = 3}]\n[[rows]]\nd = 4.5\n',
                    encoding="utf-8")
    first = read_table_toml(path)
    expected = {"name": "x", "a": {"b": [1, 2, {"c": 3}]}, "rows": [{"d": 4.5}]}
    assert first == expected
    first["a"]["b"][2]["c"] = 30  # changes of the caller's copy, at every depth
    first["a"]["b"].append(9)
    first["rows"][0]["d"] = -1.0
    assert read_table_toml(path) == expected
