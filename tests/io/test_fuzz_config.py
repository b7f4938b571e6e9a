"""Property-based fuzz of the config boundary: the loader and the ``--set`` parser.

Error-contract tests (STYLE.md section 6): for any TOML-like mapping and any ``--set`` text,
``config_from_mapping``, ``parse_override`` and ``apply_overrides`` either succeed or raise
:class:`~hcfplan.errors.ConfigError` with a one-line message; never any other exception.
Inputs mix schema sections and keys with unknown ones, and values of every TOML type
(NaN, infinities, huge and negative numbers, integers beyond the float range, strings,
lists, nested tables, dates). Past the loader, configs with values at the edges of the schema
ranges build their physics (gas, fiber, loss, coupling, grid) or stop with a ConfigError that
names a config key. Bounded by ``max_examples``; the whole module runs in seconds. No external
source is needed for these checks.
"""

from __future__ import annotations

import copy
import datetime
import math
import re
from pathlib import Path

from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from hcfplan.errors import ConfigError
from hcfplan.io.config import PlanConfig, apply_overrides, config_from_mapping, parse_override
from hcfplan.io.schema import SCHEMA
from hcfplan.io.tomlio import parse_toml

HERE = Path(__file__).resolve().parents[1] / "bad_inputs"


def _base() -> dict:
    return parse_toml((HERE / "base.toml").read_text(encoding="utf-8"), "base.toml")


BASE = _base()
SETTINGS = settings(max_examples=150, deadline=None, derandomize=True,
                    suppress_health_check=[HealthCheck.too_slow])

SECTIONS = list(SCHEMA)
KEYS = sorted({key for table in SCHEMA.values() for key in table})
NAMES = ["Ar", "He", "Ne", "Kr", "Xe", "N2", "air", "GaP", "ZnTe", "fused_silica", "caf2",
         "capillary", "antiresonant", "taylor", "EH11", "EH12", "gaussian", "sech2", "ideal",
         "coolprop", "ppt", "adk", "power", "field", "fwhm", "peak_power", "clamped",
         "good_spectrum.csv", "csv/good_gdd.csv", "csv/unsorted.csv", "gas_tables/negative_n2",
         "gas_tables/pole_in_run_range", "gas_tables/unknown_eos", "testgas",
         ".", "~", "~no_such_user_hcfplan/x", "", " ", "EH1\u00b2", "a\nb", "\x00"]

numbers = st.one_of(
    st.floats(allow_nan=True, allow_infinity=True),
    st.sampled_from([0.0, -0.0, 1.0, -1.0, 1e-300, 1e300, 1e308, math.nan, math.inf, -math.inf,
                     0.5, 0.3, 0.7, 1030.0, 800.0, 2.0, 100.0, 4096, 64, 2**22, 2**22 + 1]),
    st.integers(min_value=-(10**6), max_value=10**6),
    st.integers(min_value=-(10**400), max_value=10**400),
    st.sampled_from([10**400, -(10**400), 10**4000]),
)
scalars = st.one_of(
    numbers, st.booleans(), st.sampled_from(NAMES), st.text(max_size=12),
    st.dates(), st.datetimes(), st.times(),
)
values = st.recursive(
    scalars,
    lambda inner: st.one_of(
        st.lists(inner, max_size=4),
        st.dictionaries(st.one_of(st.sampled_from(NAMES), st.text(max_size=6)), inner,
                        max_size=3),
    ),
    max_leaves=8,
)
section_names = st.one_of(st.sampled_from(SECTIONS), st.text(max_size=8))
key_names = st.one_of(st.sampled_from(KEYS), st.text(max_size=10))


@st.composite
def mutated_base(draw):
    """The valid base scenario with a few keys set, removed or sections replaced."""
    data = copy.deepcopy(BASE)
    for _ in range(draw(st.integers(min_value=1, max_value=4))):
        action = draw(st.sampled_from(["set", "set", "set", "delete", "section"]))
        section = draw(section_names)
        if action == "section":
            data[section] = draw(st.one_of(values, st.dictionaries(key_names, values,
                                                                   max_size=4)))
            continue
        table = data.setdefault(section, {})
        if not isinstance(table, dict):
            continue
        key = draw(st.sampled_from(sorted(SCHEMA.get(section, {"x": None}))) | key_names)
        if action == "delete":
            table.pop(key, None)
        else:
            table[key] = draw(values)
    return data


random_mapping = st.dictionaries(section_names, st.one_of(
    st.dictionaries(key_names, values, max_size=5), values), max_size=5)


def _one_line(exc: ConfigError) -> None:
    message = str(exc)
    assert message.strip(), "empty message"
    assert "\n" not in message and "\r" not in message, message


def _load(mapping, overrides=()):
    try:
        cfg = config_from_mapping(mapping, base_dir=HERE, overrides=overrides)
    except ConfigError as exc:
        _one_line(exc)
        return None
    assert isinstance(cfg, PlanConfig)
    return cfg


@SETTINGS
@given(mutated_base())
def test_mutated_base_config(mapping):
    _load(mapping)


@SETTINGS
@given(random_mapping)
def test_random_mapping(mapping):
    _load(mapping)


def _toml_text(value) -> str:
    """A rough TOML rendering of a value (may be invalid on purpose for some inputs)."""
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, int) and abs(value) >= 10**4000:
        return "1" * 5000  # longer than Python converts from text
    if isinstance(value, (int, float, datetime.date, datetime.time)):
        return repr(value) if isinstance(value, float) else str(value)  # inf, nan as in TOML
    if isinstance(value, str):
        return value
    if isinstance(value, list):
        return "[" + ", ".join(_toml_text(v) for v in value) + "]"
    if isinstance(value, dict):
        return "{ " + ", ".join(f"{k} = {_toml_text(v)}" for k, v in value.items()) + " }"
    return str(value)


set_texts = st.one_of(
    st.text(max_size=30),
    st.builds(lambda s, k, v: f"{s}.{k}={_toml_text(v)}", section_names, key_names, values),
    st.builds(lambda s, k, v: f"{s}.{k}={v}", st.sampled_from(SECTIONS), key_names,
              st.text(max_size=20)),
)


@SETTINGS
@given(set_texts)
def test_parse_override(text):
    try:
        section, key, _ = parse_override(text)
    except ConfigError as exc:
        _one_line(exc)
        return
    assert key in SCHEMA[section]


@SETTINGS
@given(st.lists(set_texts, max_size=3))
def test_apply_overrides_then_load(overrides):
    try:
        data = apply_overrides(BASE, overrides)
    except ConfigError as exc:
        _one_line(exc)
        return
    assert isinstance(data, dict)
    assert BASE == _base()  # the input mapping is not changed
    _load(BASE, overrides)


# ---------------------------------------------------------------------------------------------
# Past the loader: any config that loads either builds its physics (gas, fiber, coupling, grid)
# or stops with a ConfigError that names a config key; never another exception

NUMERIC = sorted((section, key) for section, table in SCHEMA.items()
                 for key, spec in table.items() if spec.kind in ("float", "int")
                 and section in ("laser", "fiber", "gas", "grid"))
KEY_IN_MESSAGE = re.compile(rf"\b({'|'.join(SCHEMA)})\.[a-z0-9_]+\b")


def _edge_values(section: str, key: str) -> list:
    """The bounds of a key, just inside them, and a value in between (the key's unit)."""
    spec = SCHEMA[section][key]
    low = spec.low if spec.low is not None else -1e6
    high = spec.high if spec.high is not None else 1e6
    inside = [low * (1 + 1e-9) + 1e-300, high * (1 - 1e-9), math.sqrt(max(low, 1e-300) * high)]
    values = ([] if spec.low_open else [low]) + ([] if spec.high_open else [high]) + inside
    if spec.kind == "int":
        values = sorted({int(math.ceil(low)), int(high), int(math.ceil(low)) + 1})
    return values


@st.composite
def edge_configs(draw):
    data = copy.deepcopy(BASE)
    data["grid"] = {"points": 256}
    for section, key in draw(st.lists(st.sampled_from(NUMERIC), min_size=1, max_size=3)):
        data.setdefault(section, {})[key] = draw(st.sampled_from(_edge_values(section, key)))
    return data


@settings(max_examples=60, deadline=None, derandomize=True,
          suppress_health_check=[HealthCheck.too_slow])
@given(edge_configs())
def test_edge_values_build_or_name_a_key(mapping):
    from hcfplan.numerics.grid import choose_grid
    from hcfplan.planning.build import (
        build_medium,
        build_waveguide,
        check_transmission,
        coupling,
        pump_omega,
    )
    from hcfplan.planning.validity import quiet_validity

    cfg = _load(mapping)
    if cfg is None:
        return
    try:
        with quiet_validity():  # range notes are not errors
            omega0 = pump_omega(cfg.laser)
            medium = build_medium(cfg.gas)
            waveguide = build_waveguide(cfg.fiber, medium, omega0)
            check_transmission(cfg, waveguide, omega0)
            efficiency = coupling(cfg)[0]
            choose_grid(omega0, cfg.laser.duration_fwhm, points=cfg.grid.points,
                        time_window=cfg.grid.time_window)
    except ConfigError as exc:
        _one_line(exc)
        assert KEY_IN_MESSAGE.search(str(exc)), str(exc)
        return
    assert 0.0 < efficiency <= 1.0
