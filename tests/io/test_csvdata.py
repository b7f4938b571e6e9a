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


# ---------------------------------------------------------------------------------------------
# A first column in another unit, and spectra without usable signal (module docstring's rule)

C_NM = 299792458.0e9  # speed of light [nm/s], exact (SI definition)
NM = np.linspace(700.0, 900.0, 21)  # an invented Gaussian spectrum about 800 nm
SHAPE = np.exp(-(((NM - 800.0) / 40.0) ** 2))


def _table(x, y, header: str = "") -> str:
    order = np.argsort(x)
    return header + "".join(f"{x[k]:.9g},{y[k]:.6g}\n" for k in order)


@pytest.mark.parametrize(
    "x,header,pattern",
    [
        (C_NM / NM, "", r"data\.csv: the intensity's peak .*frequency in Hz \(800 nm\)"),
        (C_NM / NM / 1e12, "frequency_thz,intensity\n",
         r"data\.csv:1: column 'frequency_thz' looks like frequency in THz"),
        (1e7 / NM, "wavenumber_cm-1,intensity\n",
         r"data\.csv:1: column 'wavenumber_cm-1' looks like wavenumber in cm\^-1"),
        (1239.84198 / NM, "energy_ev,intensity\n",
         r"data\.csv:1: column 'energy_ev' looks like photon energy in eV"),
        (1239.84198 / NM, "", r"data\.csv: .*micrometres \(or photon energies in eV\)"),
        (3e7 / NM, "", r"data\.csv: the intensity's peak lies at 37500 .*wavenumber in cm\^-1"),
    ],
    ids=["hz", "thz-header", "wavenumber-header", "ev-header", "ev", "wavenumber"],
)
def test_other_units_are_named(tmp_path, x, header, pattern):
    with pytest.raises(ConfigError, match=pattern):
        read_spectrum_csv(_write(tmp_path, _table(x, SHAPE, header)))


def test_curve_in_hz_is_refused(tmp_path):
    path = _write(tmp_path, _table(C_NM / NM, np.linspace(-50, 50, NM.size),
                                   "frequency_hz,gdd_fs2\n"))
    with pytest.raises(ConfigError, match=r"data\.csv:1: column 'frequency_hz' .*Hz"):
        read_curve_csv(path, "gdd_fs2")


def test_denormal_intensity_has_no_usable_signal(tmp_path):
    path = _write(tmp_path, "780,1e-320\n800,3e-320\n820,1e-320\n")
    with pytest.raises(ConfigError, match=r"data\.csv: the largest intensity .*no usable signal"):
        read_spectrum_csv(path)


def test_file_above_size_limit(tmp_path, monkeypatch):
    from hcfplan.io import csvdata

    monkeypatch.setattr(csvdata, "MAX_CSV_BYTES", 10)
    path = _write(tmp_path, "780,0.5\n800,1\n820,0.5\n")
    with pytest.raises(ConfigError, match=r"data\.csv: 22 bytes; .* at most 10 bytes"):
        read_spectrum_csv(path)


# ---------------------------------------------------------------------------------------------
# Fuzz (error contract): any text gives a result or a ConfigError naming the file

from hypothesis import HealthCheck, given, settings  # noqa: E402
from hypothesis import strategies as st  # noqa: E402

_NUMBERS = st.one_of(
    st.floats(allow_nan=True, allow_infinity=True).map(repr),
    st.integers(-10**6, 10**30).map(str),
    st.sampled_from(["0", "-0", "1e-320", "1e308", "nan", "inf", "1_0", "0x10", "", "abc"]),
)
_ROW = st.lists(_NUMBERS, min_size=0, max_size=4).map(
    lambda fields: st.sampled_from([",", ";", "\t", " , "]).map(lambda sep: sep.join(fields)))
_TEXT = st.one_of(
    st.text(max_size=300),
    st.lists(_ROW.flatmap(lambda s: s), max_size=30).map("\n".join),
    st.tuples(st.sampled_from(["wavelength_nm,intensity\n", "frequency_thz,intensity\n",
                               "intensity;wavelength_nm\n", "# c\n", ""]),
              st.lists(_ROW.flatmap(lambda s: s), max_size=30).map("\n".join))
    .map("".join),
)


@settings(max_examples=300, deadline=None, derandomize=True,
          suppress_health_check=[HealthCheck.too_slow, HealthCheck.function_scoped_fixture])
@given(text=_TEXT)
def test_fuzz_reader_gives_result_or_config_error(tmp_path, text):
    path = tmp_path / "fuzz.csv"
    path.write_text(text, encoding="utf-8", errors="surrogatepass")
    for read in (read_spectrum_csv, lambda p: read_curve_csv(p, "gdd_fs2")):
        try:
            wavelength, values = read(path)
        except ConfigError as exc:
            assert "fuzz.csv" in str(exc)
            assert "\n" not in str(exc)
        else:
            assert wavelength.size == values.size >= 2
            assert np.all(np.diff(wavelength) > 0)
