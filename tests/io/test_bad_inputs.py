"""The bad-input corpus (tests/bad_inputs/cases.toml): exit code 2, one line, no traceback.

Error tests (STYLE.md section 6): every malformed config, --set value, CSV file, gas table and
command-line option of the corpus must stop with exactly one non-empty stderr line that names
the key or the file:line, no traceback, and nothing written (no output folder for ``simulate``).
Every case runs in-process through ``hcfplan.cli.app.main``; the cases marked ``subprocess = true``
also run through a real ``python -m hcfplan`` process, as a user would see them. The crystal
table cases call the loader directly, since the CLI takes no user crystal tables. The cases of
kind ``valid`` are extreme but allowed inputs: they must run (exit 0), say what is extreme in a
warning or note, and print no NaN or infinity in their JSON.
"""

from __future__ import annotations

import os
import subprocess
import sys
from pathlib import Path

import pytest

from hcfplan.cli.app import main
from hcfplan.errors import ConfigError
from hcfplan.io.tomlio import parse_toml, parse_toml_value
from hcfplan.materials.crystals import load_crystal
from hcfplan.numerics.grid import Grid

HERE = Path(__file__).resolve().parents[1] / "bad_inputs"
ROOT = HERE.parents[1]
CASES = parse_toml((HERE / "cases.toml").read_text(encoding="utf-8"), "cases.toml")["case"]
CLI_CASES = [c for c in CASES if c.get("kind", "cli") == "cli"]
VALID_CASES = [c for c in CASES if c.get("kind") == "valid"]
CRYSTAL_CASES = [c for c in CASES if c.get("kind") == "crystal_table"]
SUBPROCESS_CASES = [c for c in CLI_CASES if c.get("subprocess")]


def _expand(text: str, out: Path) -> str:
    return text.replace("{here}", str(HERE)).replace("{out}", str(out))


def _fragments(case: dict) -> list[str]:
    fragment = case["fragment"]
    return [fragment] if isinstance(fragment, str) else list(fragment)


def _check_stderr(case: dict, err: str) -> None:
    assert "Traceback" not in err, err
    lines = [line for line in err.splitlines() if line.strip()]
    assert len(lines) == 1, f"expected one stderr line, got {len(lines)}: {err[:2000]}"
    for fragment in _fragments(case):
        assert fragment in lines[0], f"{fragment!r} not in {lines[0]!r}"


#: Valid inputs of the corpus, and files that the configs of the corpus point to.
INDIRECT = {"base.toml", "good_spectrum.csv", "csv/good_gdd.csv", "csv/unsorted.csv",
            "csv/gdd_wrong_header.csv"}


def _referenced(case: dict) -> set[str]:
    """Corpus paths (relative to bad_inputs/) a case names, files or folders."""
    if case.get("kind") == "crystal_table":
        return {f"crystal_tables/{case['argv'][0]}.toml"}
    texts = list(case["argv"]) + list(case.get("env", {}).values())
    found = set()
    for text in texts:
        for part in text.split("{here}/")[1:]:
            found.add(part.split('"')[0])
    return found


def test_corpus_is_large_and_every_file_used():
    ids = [c["id"] for c in CASES]
    assert len(ids) == len(set(ids))
    assert len(CASES) >= 200
    named = set().union(*(_referenced(c) for c in CASES)) | INDIRECT
    for path in HERE.rglob("*"):
        if path.is_file() and path.name != "cases.toml":
            rel = path.relative_to(HERE).as_posix()
            assert rel in named or path.parent.relative_to(HERE).as_posix() in named, rel


@pytest.mark.parametrize("case", CLI_CASES, ids=[c["id"] for c in CLI_CASES])
def test_case_in_process(case, capsys, monkeypatch, tmp_path):
    out = tmp_path / "out"
    for name, value in case.get("env", {}).items():
        monkeypatch.setenv(name, _expand(value, out))
    monkeypatch.chdir(tmp_path)  # a default output folder would appear here
    code = main([_expand(a, out) for a in case["argv"]])
    captured = capsys.readouterr()
    assert code == 2, captured.err
    _check_stderr(case, captured.err)
    assert not out.exists(), "an output folder was created for bad input"
    assert list(tmp_path.iterdir()) == [], "bad input wrote files"


def _no_constant(name: str):
    raise AssertionError(f"{name} in the JSON output")


@pytest.mark.parametrize("case", VALID_CASES, ids=[c["id"] for c in VALID_CASES])
def test_extreme_valid_case_runs_with_warning(case, capsys, monkeypatch, tmp_path):
    import json

    out = tmp_path / "out"
    monkeypatch.chdir(tmp_path)
    code = main([_expand(a, out) for a in case["argv"]])
    captured = capsys.readouterr()
    assert code == 0, captured.err
    assert "Traceback" not in captured.err
    json.loads(captured.out, parse_constant=_no_constant)  # NaN, Infinity refused
    for fragment in _fragments(case):
        assert fragment in captured.out + captured.err, fragment


@pytest.mark.parametrize("case", CRYSTAL_CASES, ids=[c["id"] for c in CRYSTAL_CASES])
def test_crystal_table_case(case):
    (name,) = case["argv"]
    with pytest.raises(ConfigError) as info:
        load_crystal(name, [HERE / "crystal_tables"])
    message = str(info.value)
    assert "\n" not in message
    for fragment in _fragments(case):
        assert fragment in message


@pytest.mark.parametrize("case", SUBPROCESS_CASES, ids=[c["id"] for c in SUBPROCESS_CASES])
def test_case_subprocess(case, tmp_path):
    out = tmp_path / "out"
    env = dict(os.environ, PYTHONPATH=str(ROOT) + os.pathsep + os.environ.get("PYTHONPATH", ""))
    env.update({k: _expand(v, out) for k, v in case.get("env", {}).items()})
    argv = [sys.executable, "-m", "hcfplan", *(_expand(a, out) for a in case["argv"])]
    proc = subprocess.run(argv, capture_output=True, text=True, timeout=120, env=env,
                          cwd=tmp_path)
    assert proc.returncode == 2, proc.stderr
    _check_stderr(case, proc.stderr)
    assert not out.exists()
    assert list(tmp_path.iterdir()) == []


# ---------------------------------------------------------------------------------------------
# Outside a validity range: the run goes on and says so in `warnings` (not an error)

# (--set overrides on base.toml, fragments that the warnings must contain). The ranges are those
# stated in the shipped tables: Borzsonyi et al., Appl. Opt. 47, 4856 (2008) fit 400-1000 nm
# (gases/Ar.toml); Malitson, J. Opt. Soc. Am. 55, 1205 (1965) fused silica 0.21-3.71 um
# (hcfplan/materials/data/solids.toml); the CoolProp equation-of-state limits (Neon T <= 725 K);
# the near-critical and near-saturation bands are common practice, no source (gas_phase.py).
VALIDITY_CASES = {
    "pump-beyond-gas-fit": (["laser.wavelength_nm=2500"],
                            ["dispersion (combined fits", "valid for 140-2059 nm",
                             "the pump (2500 nm)"]),
    "pump-beyond-single-gas-fit": (["gas.species=Ne", "laser.wavelength_nm=1030"],
                                   ["neon dispersion fit", "valid for 400-1000 nm",
                                    "the pump (1030 nm)"]),
    "pump-beyond-cladding-fit": (["laser.wavelength_nm=4000"],
                                 ["cladding (fused_silica) Sellmeier fit is valid for 210-3710 nm",
                                  "the pump (4000 nm)"]),
    "temperature-beyond-eos": (["gas.species=Ne", "gas.temperature_k=800"],
                               ["outside the range of the Neon equation of state",
                                "T <= 725 K"]),
    "pressure-near-critical": (["gas.species=Xe", "gas.pressure_bar=45"],
                               ["near the critical point", "58.42 bar"]),
    "pressure-near-saturation": (["gas.species=Kr", "gas.pressure_bar=2.0",
                                  "gas.temperature_k=130"],
                                 ["of the saturation pressure", "condense"]),
}


@pytest.mark.parametrize("name", list(VALIDITY_CASES))
def test_outside_validity_is_a_warning(name, capsys):
    import json

    overrides, fragments = VALIDITY_CASES[name]
    argv = ["fiber", str(HERE / "base.toml"), "--json"]
    for text in overrides:
        argv += ["--set", text]
    code = main(argv)
    captured = capsys.readouterr()
    assert code == 0, captured.err
    assert "Traceback" not in captured.err
    warnings = json.loads(captured.out)["warnings"]
    assert any(all(f in w for f in fragments) for w in warnings), warnings


def test_gas_command_wavelength_beyond_fit_is_a_warning(capsys):
    import json

    # Ar's combined fits reach 2059 nm (Peck & Fisher 1964); Ne has Borzsonyi alone (400-1000 nm)
    code = main(["gas", "Ne", "--wavelength-nm", "1800", "--json"])
    captured = capsys.readouterr()
    assert code == 0, captured.err
    warnings = json.loads(captured.out)["warnings"]
    assert any("valid for 400-1000 nm" in w and "1800 nm" in w for w in warnings), warnings
    code = main(["gas", "Ar", "--wavelength-nm", "1800", "--wavelength-nm", "2500", "--json"])
    captured = capsys.readouterr()
    assert code == 0, captured.err
    warnings = json.loads(captured.out)["warnings"]
    assert any("valid for 140-2059 nm" in w and "2500 nm extrapolated" in w
               and "1800" not in w for w in warnings), warnings


def test_thz_spectrum_beyond_crystal_fit_is_a_warning(capsys, tmp_path):
    import json

    # GaP optical index range 0.7-2.0 um as stated in hcfplan/materials/data/crystals/gap.toml;
    # an invented spectrum around 640 nm lies below it
    spectrum = tmp_path / "blue.csv"
    spectrum.write_text("wavelength_nm,intensity\n620,0.2\n630,0.6\n640,1.0\n650,0.6\n660,0.2\n")
    code = main(["thz", str(spectrum), "--json"])
    captured = capsys.readouterr()
    assert code == 0, captured.err
    warnings = json.loads(captured.out)["warnings"]
    assert any("outside the validity range 700-2000 nm" in w for w in warnings), warnings


# ---------------------------------------------------------------------------------------------
# Errors below the config boundary are the tool's own (ConfigError, a ValueError), so that a
# command reports them as one line, never as a traceback

INTERNAL = [
    (Grid, (8, 1e-15, 2.4e15), "grid points = 8: must be >= 16"),
    (Grid, (64, 1e-16, 2.4e15), "grid frequency window reaches zero frequency"),
    (parse_toml_value, ("[1, 2",), "cannot parse '[1, 2' as a TOML value"),
    (parse_toml_value, ("  ",), "empty value"),
]


@pytest.mark.parametrize("function,args,fragment", INTERNAL,
                         ids=["grid-points", "grid-window", "toml-value", "toml-empty"])
def test_internal_checks_raise_config_error(function, args, fragment):
    with pytest.raises(ConfigError) as info:
        function(*args)
    assert fragment in str(info.value)


def test_plot_envelope_contours_is_a_config_error():
    import matplotlib

    matplotlib.use("Agg")
    from matplotlib.figure import Figure

    from hcfplan.plotting.envelope import plot_envelope

    with pytest.raises(ConfigError, match=r"contours = 'lines': use 'duration', 'cutoff'"):
        plot_envelope(Figure().subplots(), None, contours="lines")


# ---------------------------------------------------------------------------------------------
# Resource bombs: refused at the boundary at once, never run


def test_huge_set_value_is_refused_fast(capsys):
    import time

    start = time.perf_counter()
    code = main(["check", str(HERE / "base.toml"), "--set", "laser.energy_uj=" + "1" * 10**7])
    captured = capsys.readouterr()
    assert code == 2
    _check_stderr({"fragment": ["--set laser.energy_uj:", "10000000 characters"]}, captured.err)
    assert time.perf_counter() - start < 5.0


def test_set_nested_10000_deep_is_refused(capsys):
    deep = "[" * 10000 + "]" * 10000
    code = main(["check", str(HERE / "base.toml"), "--set", f"laser.energy_uj={deep}"])
    captured = capsys.readouterr()
    assert code == 2
    _check_stderr({"fragment": "--set laser.energy_uj:"}, captured.err)
    # below the length limit, the nesting is refused by depth
    deep = "[" * 4000 + "]" * 4000
    with pytest.raises(ConfigError, match="nested 4000 deep; at most 32"):
        parse_toml_value(deep)


def test_toml_text_nested_deeply_is_refused():
    with pytest.raises(ConfigError, match=r"x\.toml: arrays or inline tables nested 10000 deep"):
        parse_toml("a = " + "{ b = " * 10000 + "1" + " }" * 10000, "x.toml")
    # brackets inside strings and comments are not nesting
    text = 'a = "' + "[" * 100 + '"  # ' + "{" * 100 + "\nb = '''" + "[" * 100 + "'''\n"
    assert parse_toml(text, "x.toml")["b"] == "[" * 100


def test_toml_file_above_size_limit(tmp_path, monkeypatch):
    from hcfplan.io import tomlio

    monkeypatch.setattr(tomlio, "MAX_TOML_BYTES", 100)
    path = tmp_path / "big.toml"
    path.write_text("# " + "x" * 200 + "\n")
    with pytest.raises(ConfigError, match=r"big\.toml: 203 bytes; a config holds at most 100"):
        tomlio.read_toml(path)
