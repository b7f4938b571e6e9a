"""CSV readers of hcfplan.io.csvdata: accepted layouts and one error test per problem.

Kinds: contract (layout, unit conversion nm -> m and fs^2 -> s^2, exact SI definitions) and
error tests matching the file:line and the offending value. No external source is needed for
these checks.
"""

from __future__ import annotations

import numpy as np
import pytest

from hcfplan.errors import ConfigError
from hcfplan.io.csvdata import read_curve_csv, read_spectrum_csv


def _write(tmp_path, text: str, name: str = "data.csv"):
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    return path


@pytest.mark.parametrize(
    "text",
    [
        "wavelength_nm,intensity\n780,0.5\n800,1.0\n820,0.25\n",
        "# measured 2024\n780, 0.5\n800, 1.0 # peak\n\n820, 0.25\n",
        "intensity;wavelength_nm\n0.5;780\n1.0;800\n0.25;820\n",
        "780\t0.5\n800\t1.0\n820\t0.25\n",
    ],
    ids=["header", "comments", "reordered-header", "tabs"],
)
def test_spectrum_layouts(tmp_path, text):
    wavelength, intensity = read_spectrum_csv(_write(tmp_path, text))
    np.testing.assert_allclose(wavelength, [780e-9, 800e-9, 820e-9], rtol=1e-15)
    np.testing.assert_allclose(intensity, [0.5, 1.0, 0.25])


def test_curve_converts_suffix_to_si(tmp_path):
    path = _write(tmp_path, "wavelength_nm,gdd_fs2\n700,-50\n900,-40\n")
    wavelength, gdd = read_curve_csv(path, "gdd_fs2")
    np.testing.assert_allclose(gdd, [-50e-30, -40e-30], rtol=1e-15)  # 1 fs^2 = 1e-30 s^2
    np.testing.assert_allclose(wavelength, [700e-9, 900e-9], rtol=1e-15)


def test_curve_without_suffix_is_unchanged(tmp_path):
    path = _write(tmp_path, "wavelength_nm,phase_rad\n700,1.5\n900,-2.0\n")
    assert read_curve_csv(path, "phase_rad")[1].tolist() == [1.5, -2.0]


@pytest.mark.parametrize(
    ("text", "pattern"),
    [
        ("", r"data\.csv: empty"),
        ("# only a comment\n", r"data\.csv: empty"),
        ("wavelength_nm,intensity\n", "header only"),
        ("780\n800\n", r"data\.csv:1: 1 column"),
        ("780,0.5\n800,abc\n", r"data\.csv:2: non-numeric.*abc"),
        ("780,0.5\n800,1\n790,1\n", r"data\.csv:3: unsorted wavelength 790"),
        ("780,0.5\n800,1\n800,1\n", r"data\.csv:3: duplicated wavelength 800"),
        ("780,0.5\n800,-0.01\n", r"data\.csv:2: negative intensity -0.01"),
        ("0.78,0.5\n0.80,1\n", r"largest 0\.8\).*micrometres"),
        ("lambda,counts\n780,1\n", r"data\.csv:1: header .*wavelength_nm"),
        ("780,nan\n800,1\n", r"data\.csv:1: non-finite"),
    ],
    ids=["empty", "comments-only", "header-only", "one-column", "non-numeric", "unsorted",
         "duplicate", "negative", "micrometres", "bad-header", "nan"],
)
def test_spectrum_errors(tmp_path, text, pattern):
    with pytest.raises(ConfigError, match=pattern):
        read_spectrum_csv(_write(tmp_path, text))


def test_missing_file(tmp_path):
    with pytest.raises(ConfigError, match="nothere.csv: cannot read"):
        read_spectrum_csv(tmp_path / "nothere.csv")


def test_curve_allows_negative_values_but_checks_header(tmp_path):
    path = _write(tmp_path, "wavelength_nm,gdd_fs2\n700,-50\n")
    with pytest.raises(ConfigError, match="phase_rad"):
        read_curve_csv(path, "phase_rad")
