"""The README is the user's manual: it must document every config key and the two set-up
commands that CI runs, and keep its generated blocks current (contract tests; no physics
here)."""

from pathlib import Path

from hcfplan.io.schema import SCHEMA

ROOT = Path(__file__).resolve().parents[1]
README = (ROOT / "README.md").read_text(encoding="utf-8")


def test_every_config_key_documented():
    missing = [f"{s}.{k}" for s, keys in SCHEMA.items() for k in keys if f"`{k}`" not in README]
    assert not missing, f"README lacks: {missing}"


def test_setup_commands_match_ci():
    ci = (ROOT / ".ci" / "run").read_text()
    assert 'pip install -e ".[test]"' in README and 'pip install -e ".[test]"' in ci
    assert "python -m pytest -q" in README and "python -m pytest -q" in ci
    assert "hcfplan simulate configs/yb_arf_argon.toml" in README
    assert "hcfplan simulate configs/yb_arf_argon.toml" in ci


def test_cautions_in_readme():
    # the README repeats the cautions the commands print (key phrases of each one)
    from hcfplan.limits.cautions import CAUTIONS

    phrases = {"estimates": "licensed practice", "pressure": "relief device",
               "laser": "Class 4", "gas": "odourless"}
    assert set(phrases) == set(CAUTIONS)
    section = README.split("## Cautions", 1)[1].split("\n## ", 1)[0]
    for tag, phrase in phrases.items():
        assert phrase in CAUTIONS[tag] and phrase in section, tag


def _script(name: str):
    import importlib.util

    spec = importlib.util.spec_from_file_location(name, ROOT / "scripts" / f"{name}.py")
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module


def test_config_reference_is_current():
    # the README block is generated from the schema; regenerate with
    # `python scripts/config_reference.py --update README.md`
    module = _script("config_reference")
    block = README.split(module.START, 1)[1].split(module.END, 1)[0]
    assert block == "\n" + module.reference()


def test_from_memory_table_is_current(monkeypatch, capsys):
    # the README block between these markers is the output of
    # `python scripts/from_memory_table.py` (run from the repository root)
    start, end = "<!-- from-memory-table:start -->", "<!-- from-memory-table:end -->"
    monkeypatch.chdir(ROOT)
    _script("from_memory_table").main()
    block = README.split(start, 1)[1].split(end, 1)[0]
    assert block == "\n" + capsys.readouterr().out


def test_manual_describes_the_code_not_its_history():
    # README and DEVELOPERS describe the current state; history goes into CHANGELOG.md
    import re

    for name in ("README.md", "DEVELOPERS.md"):
        text = (ROOT / name).read_text(encoding="utf-8")
        assert not re.search(r"\bsessions?\b", text, re.IGNORECASE), name
    assert (ROOT / "CHANGELOG.md").is_file()
