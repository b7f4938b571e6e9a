"""The Python API (``import hcfplan``): the same numbers as the command line, figures, folders,
config errors naming the key.

Contract tests against the command line's own outputs (``--json``, ``summary.json``,
``fields.npz``, ``table.csv``) on the small invented test configs of ``tests/fast_cases.py``;
no physics value is checked here, so no external source is needed.
"""

from __future__ import annotations

import json
import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest
from fast_cases import write_fast_config

import hcfplan
import hcfplan.api
from hcfplan.cli.app import main
from hcfplan.errors import ConfigError

ROOT = Path(__file__).resolve().parents[2]


def _flat(data: dict, prefix: str = "") -> dict:
    out = {}
    for key, value in data.items():
        if isinstance(value, dict):
            out.update(_flat(value, f"{prefix}{key}."))
        else:
            out[f"{prefix}{key}"] = value
    return out


@pytest.fixture(scope="module")
def fast(tmp_path_factory):
    folder = tmp_path_factory.mktemp("api")
    config = write_fast_config(folder)
    return folder, config, hcfplan.simulate(config)


def test_import_is_light_and_names_resolve():
    code = ("import sys, hcfplan; heavy = [m for m in ('hcfplan.api', 'numpy', 'matplotlib', "
            "'numba', 'CoolProp', 'scipy') if m in sys.modules]; print(','.join(heavy)); "
            "print(callable(hcfplan.simulate), hcfplan.ConfigError.__module__)")
    proc = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                          timeout=120)
    assert proc.returncode == 0, proc.stderr
    heavy, names = proc.stdout.splitlines()
    assert heavy == ""
    assert names == "True hcfplan.errors"
    with pytest.raises(AttributeError):
        hcfplan.no_such_name  # noqa: B018


def test_summary_is_the_cli_json_and_the_summary_file(fast, capsys):
    folder, config, run = fast
    code = main(["simulate", str(config), "--out", str(folder / "cli"), "--json",
                 "--no-figures", "--no-report"])
    printed = json.loads(capsys.readouterr().out)
    assert code == 0
    assert _flat(printed) == run.summary
    written = json.loads((folder / "cli" / "summary.json").read_text())
    assert _flat(written) == run.summary
    assert "compressed.fwhm_s" in run.summary and "verdict.status" in run.summary
    assert run.verdict.status == run.summary["verdict.status"]
    assert [r.code for r in run.verdict.reasons] == \
        [r["code"] for r in run.summary["verdict.reasons"]]


def test_arrays_are_the_fields_file(fast):
    folder, _, run = fast
    with np.load(folder / "cli" / "fields.npz") as data:
        assert sorted(data.files) == sorted(run.arrays)
        for name in data.files:
            np.testing.assert_array_equal(data[name], run.arrays[name], err_msg=name)


def test_every_figure_of_the_cli_can_be_drawn(fast):
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    _, _, run = fast
    assert set(run.figures) == {"thz_spectrum", "compressed_pulse", "spectral_evolution",
                                "energy_ionization", "temporal_in_out", "spectrum_in_out",
                                "bounces", "thz_waveform"}
    for name in run.figures:
        fig = run.plot(name)
        assert fig.axes and any(ax.has_data() for ax in fig.axes), name
        plt.close(fig)
    fig, ax = plt.subplots()
    assert run.plot("bounces", ax=ax) is ax and ax.has_data()
    fig2, axes = plt.subplots(3, 1)
    run.plot("compressed_pulse", ax=axes)
    assert all(a.has_data() for a in axes)
    with pytest.raises(ConfigError, match="compressed_pulse.*3 panels"):
        run.plot("compressed_pulse", ax=ax)
    with pytest.raises(ConfigError, match="no_such.*bounces"):
        run.plot("no_such")
    plt.close("all")


def test_save_writes_the_run_folder(fast):
    folder, _, run = fast
    out = run.save(folder / "saved", figures=False)
    names = sorted(p.name for p in out.iterdir())
    assert names == ["compressed_field.csv", "config.resolved.toml", "fields.npz",
                     "report.html", "summary.json"]
    assert _flat(json.loads((out / "summary.json").read_text())) == run.summary
    with pytest.raises(ConfigError, match="not empty"):
        run.save(out)


def test_load_config_takes_mappings_and_overrides(fast):
    _, config, _ = fast
    cfg = hcfplan.load_config(config, overrides={"gas.pressure_bar": 3,
                                                 "compressor.mirror_band_nm": [900, 1200]})
    assert cfg.gas.pressure == pytest.approx(3e5)
    assert cfg.resolved["compressor"]["mirror_band_nm"] == [900, 1200]
    again = hcfplan.load_config(cfg, ["laser.energy_uj=150"])
    assert again.laser.energy == pytest.approx(150e-6) and again.gas.pressure == cfg.gas.pressure
    from hcfplan.io.tomlio import read_toml

    mapping = read_toml(config)
    from_mapping = hcfplan.load_config(mapping)
    assert from_mapping.resolved == hcfplan.load_config(config).resolved
    assert hcfplan.load_config(from_mapping, {"gas.pressure_bar": 3}).resolved == \
        hcfplan.load_config(config, {"gas.pressure_bar": 3}).resolved


@pytest.mark.parametrize("overrides, match", [
    ({"gas.presure_bar": 3}, "gas.presure_bar.*pressure_bar"),
    ({"laser.energy_uj": -5}, "laser.energy_uj"),
    (["fiber.length_m=abc"], "fiber.length_m"),
    ({"gas.pressure_bar": {"a": 1}}, "gas.pressure_bar"),
])
def test_config_errors_name_the_key(fast, overrides, match):
    _, config, _ = fast
    with pytest.raises(ConfigError, match=match):
        hcfplan.simulate(config, overrides)


def test_bad_config_argument_is_a_config_error():
    with pytest.raises(ConfigError, match="config: expected"):
        hcfplan.load_config(42)
    with pytest.raises(ConfigError, match="vary"):
        hcfplan.scan({"laser": {}}, vary=[])


def test_limits_are_the_cli_json(fast, capsys):
    _, config, _ = fast
    assert main(["limits", str(config), "--json"]) == 0
    cli = json.loads(capsys.readouterr().out)
    assert cli == hcfplan.api.limits(config)
    from hcfplan.limits.cautions import caution_lines  # the physics package keeps its name

    assert caution_lines() and hcfplan.limits.beam.self_focusing_power  # its modules stay
    assert hcfplan.limits(config) == cli  # and called, it is the limits report of a config
    with pytest.raises(ConfigError, match="gas.pressure_bar"):
        hcfplan.limits(config, {"gas.pressure_bar": -1})


def test_scan_table_matches_the_points(fast, tmp_path):
    _, config, _ = fast
    table = hcfplan.scan(config, vary={"gas.pressure_bar": [1.0, 2.5]}, workers=1,
                         out=tmp_path / "scan", figures=False)
    assert len(table) == 2 and table["gas.pressure_bar"] == [1.0, 2.5]
    assert table.folder == tmp_path / "scan" and (tmp_path / "scan" / "report.html").exists()
    with open(tmp_path / "scan" / "table.csv", encoding="utf-8") as handle:
        assert handle.readline().strip().split(",") == list(table.columns)
    single = hcfplan.simulate(config, {"gas.pressure_bar": 2.5})
    assert table[1]["compressed.fwhm_s"] == single.summary["compressed.fwhm_s"]
    assert table[1]["verdict"] == single.summary["verdict.status"]
    pd = pytest.importorskip("pandas")
    frame = table.to_pandas()
    assert isinstance(frame, pd.DataFrame) and list(frame.columns) == list(table.columns)


def test_scan_of_a_mapping_in_a_temporary_folder(fast):
    from hcfplan.io.tomlio import read_toml

    _, config, _ = fast
    table = hcfplan.scan(read_toml(config), vary={"laser.energy_uj": "100:150:2"}, workers=1)
    assert table.folder is None and table["laser.energy_uj"] == [100.0, 150.0]
    assert all(status == "ok" for status in table["status"])


def test_compare_rows_and_folder(fast, tmp_path, capsys):
    _, config, run = fast
    result = hcfplan.compare(config, overrides_b={"laser.energy_uj": 300})
    assert result.a.summary["compressed.fwhm_s"] == run.summary["compressed.fwhm_s"]
    energy = next(r for r in result.rows if r["key"] == "input.energy_j")
    assert energy["b"] == pytest.approx(300e-6) and energy["ratio"] == pytest.approx(1.5)
    out = result.save(tmp_path / "cmp")
    assert {"comparison.json", "report.html", "compare_spectra.png"} <= {
        p.name for p in out.iterdir()}
    assert main(["compare", str(config), "--set-b", "laser.energy_uj=300", "--json"]) == 0
    printed = json.loads(capsys.readouterr().out)
    assert printed["rows"] == json.loads((out / "comparison.json").read_text())["rows"]


def test_envelope_data_and_plot(capsys):
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    config = ROOT / "configs" / "tisa_capillary_neon.toml"
    env = hcfplan.envelope(config)
    assert main(["envelope", str(config), "--json"]) == 0
    assert json.loads(capsys.readouterr().out) == json.loads(json.dumps(env.data))
    assert env.result.energies.size == len(env.data["envelope.energies_j"])
    fig = env.plot()
    assert fig.axes[0].has_data()
    plt.close(fig)


def test_recommend_gives_the_cli_answer(fast, capsys):
    _, config, _ = fast
    options = dict(vary="gas.pressure_bar=1:3", coarse=3, budget=4, workers=1)
    rec = hcfplan.recommend(config, "shortest", **options)
    assert main(["recommend", str(config), "--goal", "shortest", "--vary", options["vary"],
                 "--coarse", "3", "--budget", "4", "--workers", "1", "--json"]) == 0
    printed = json.loads(capsys.readouterr().out)
    assert rec.best == printed["chosen"]["best"]["values"]
    table = rec.table()
    assert len(table) == len(printed["searches"][0]["evaluations"])
    assert table["gas.pressure_bar"] == [e["values"]["gas.pressure_bar"]
                                         for e in printed["searches"][0]["evaluations"]]
