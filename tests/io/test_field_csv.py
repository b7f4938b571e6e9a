"""Reading a measured pulse (``laser.field_csv``): the two layouts and the refusals."""

from __future__ import annotations

import numpy as np
import pytest

from hcfplan.errors import ConfigError
from hcfplan.io.csvdata import read_field_csv


def _write(tmp_path, text, name="field.csv"):
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    return path


def _gaussian_rows(x, centre, width, phase=0.0):
    return "\n".join(f"{v:g},{np.exp(-((v - centre) / width) ** 2):.6g},{phase * v:g}"
                     for v in x)


def test_time_layout_is_read_in_si(tmp_path):
    t = np.linspace(-200, 200, 81)
    path = _write(tmp_path, "# a comment\ntime_fs,intensity,phase_rad\n"
                  + _gaussian_rows(t, 0.0, 30.0, 0.01))
    axis, x, intensity, phase = read_field_csv(path)
    assert axis == "time"
    assert x[0] == pytest.approx(-200e-15) and x[-1] == pytest.approx(200e-15)
    assert intensity.max() == pytest.approx(1.0)
    assert phase[-1] == pytest.approx(2.0)


def test_wavelength_layout_with_columns_in_any_order(tmp_path):
    wl = np.linspace(700, 900, 41)
    rows = "\n".join(f"{0.5 * v:g};{v:g};{np.exp(-((v - 800) / 20) ** 2):.6g}" for v in wl)
    path = _write(tmp_path, "phase_rad;wavelength_nm;intensity\n" + rows)
    axis, x, intensity, phase = read_field_csv(path)
    assert axis == "wavelength"
    assert x[20] == pytest.approx(800e-9)
    assert phase[20] == pytest.approx(400.0)


TIME = np.linspace(-200, 200, 81)


@pytest.mark.parametrize(("text", "match"), [
    ("1,2,3\n4,5,6\n", r"field\.csv:1: no header"),
    ("t_ps,intensity,phase_rad\n" + _gaussian_rows(TIME, 0, 30), r"looks like time in picoseconds"),
    ("delay_s,intensity,phase_rad\n" + _gaussian_rows(TIME, 0, 30), r"time in seconds"),
    ("wavelength_um,intensity,phase_rad\n1,1,0\n", r"'wavelength_um' looks like micrometres"),
    ("time_fs,intensity,phase_deg\n" + _gaussian_rows(TIME, 0, 30), r"in degrees"),
    ("time_fs,wavelength_nm,intensity,phase_rad\n1,2,3,4\n", r"names both"),
    ("time_fs,intensity\n1,2\n", r"lacks column\(s\) \['phase_rad'\]"),
    ("time_fs,intensity,phase_rad\n1,1,0\n3,-1,0\n5,0,0\n",
     r"field\.csv:3: negative intensity -1"),
    ("time_fs,intensity,phase_rad\n1,1,0\n1,1,0\n5,0,0\n",
     r"field\.csv:3: duplicated axis value 1"),
    ("time_fs,intensity,phase_rad\n1,0,0\n2,0,0\n3,0,0\n", r"every intensity is 0"),
    # a picosecond file under a time_fs header: FWHM 2 sqrt(ln 2) 0.03 = 0.0499
    ("time_fs,intensity,phase_rad\n" + _gaussian_rows(TIME / 1000, 0, 0.03),
     r"FWHM is 0\.0499.* picoseconds"),
    ("wavelength_nm,intensity,phase_rad\n" + _gaussian_rows(np.linspace(0.7, 0.9, 21), 0.8,
                                                           0.02), r"look like micrometres"),
    # a frequency axis in Hz under a wavelength_nm header (ascending as the file requires)
    ("wavelength_nm,intensity,phase_rad\n" + _gaussian_rows(np.linspace(3.5e14, 4e14, 21),
                                                           3.75e14, 1e13),
     r"peak lies at 3\.75e\+14 .*frequency in Hz"),
])
def test_refusals_name_the_file_and_the_fault(tmp_path, text, match):
    path = _write(tmp_path, text)
    with pytest.raises(ConfigError, match=match) as info:
        read_field_csv(path)
    assert "field.csv" in str(info.value)
