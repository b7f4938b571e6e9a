"""hcfplan's cache folder (hcfplan.numerics.cache) as used by
hcfplan.ionization.tables.cached_rate_table: a cached rate table is the computed one, is read
back instead of computed again, and a damaged file or unwritable folder is never an error.

Invariant checks: a cache returns exactly what the formula computes (common practice, no
source); the reference values are hcfplan's own tabulate_rate, whose published checks are in
tests/ionization/test_ionization.py."""

from __future__ import annotations

import numpy as np
import pytest

from hcfplan.ionization import tables as ionization_tables

EV = 1.602176634e-19
#: Argon at 800 nm: Ip 15.7596 eV (NIST Atomic Spectra Database, ionization energies), 3p
#: shell l = 1, m = 0; a narrow intensity range keeps the test fast.
ARGON = ("ppt", 800e-9, 15.7596 * EV, 1, 0, 1, 1e16, 1e18)


@pytest.fixture()
def folder(tmp_path, monkeypatch):
    monkeypatch.setenv("HCFPLAN_CACHE_DIR", str(tmp_path))
    return tmp_path


def _refuse(*args, **kwargs):
    raise AssertionError("tabulate_rate called: the cached table was not used")


def test_rate_table_is_stored_exactly_and_read_back(folder, monkeypatch):
    direct = ionization_tables.tabulate_rate(*ARGON)
    first = ionization_tables.cached_rate_table(*ARGON)
    assert [p.name.split("-")[0] for p in folder.iterdir()] == ["rate"]
    monkeypatch.setattr(ionization_tables, "tabulate_rate", _refuse)
    again = ionization_tables.cached_rate_table(*ARGON)
    for table in (first, again):
        np.testing.assert_array_equal(table.log_intensity, direct.log_intensity)
        np.testing.assert_array_equal(table.log_rate, direct.log_rate)
        assert table.model == "ppt" and not table.log_rate.flags.writeable
    intensity = np.geomspace(2e16, 9e17, 7)
    np.testing.assert_array_equal(again(intensity), direct(intensity))


def test_other_inputs_get_their_own_entry(folder):
    ionization_tables.cached_rate_table(*ARGON)
    ionization_tables.cached_rate_table("adk", *ARGON[1:])
    assert len(list(folder.glob("rate-table-*.npz"))) == 2


@pytest.mark.parametrize("content", [b"", b"PK\x03\x04 not a zip", b"\x93NUMPY garbage"])
def test_damaged_file_is_computed_again_and_replaced(folder, content):
    ionization_tables.cached_rate_table(*ARGON)
    (path,) = folder.glob("rate-table-*.npz")
    path.write_bytes(content)
    table = ionization_tables.cached_rate_table(*ARGON)
    np.testing.assert_array_equal(table.log_rate, ionization_tables.tabulate_rate(*ARGON).log_rate)
    with np.load(path) as stored:
        assert sorted(stored.files) == ["log_intensity", "log_rate"]


def test_readable_file_with_wrong_content_is_not_used(folder):
    ionization_tables.cached_rate_table(*ARGON)
    (path,) = folder.glob("rate-table-*.npz")
    np.savez(path, log_intensity=np.array([2.0, 1.0]), log_rate=np.array([0.0, 0.0]))
    table = ionization_tables.cached_rate_table(*ARGON)
    np.testing.assert_array_equal(table.log_rate, ionization_tables.tabulate_rate(*ARGON).log_rate)
    with np.load(path) as stored:  # and the file is replaced by the computed table
        np.testing.assert_array_equal(stored["log_rate"], table.log_rate)


def test_unwritable_folder_is_not_an_error(tmp_path, monkeypatch):
    blocker = tmp_path / "a-file"
    blocker.write_text("")
    monkeypatch.setenv("HCFPLAN_CACHE_DIR", str(blocker / "cache"))
    table = ionization_tables.cached_rate_table(*ARGON)
    assert table.log_rate.size >= 2


@pytest.mark.parametrize(("arrays", "sound"), [
    ({"log_intensity": np.array([1.0, 2.0]), "log_rate": np.array([-5.0, -4.0])}, True),
    ({"log_intensity": np.array([1.0, 2.0])}, False),
    ({"log_intensity": np.array([1.0, np.nan]), "log_rate": np.array([0.0, 0.0])}, False),
    ({"log_intensity": np.array([1.0, 2.0, 3.0]), "log_rate": np.array([0.0, 0.0])}, False),
    ({"log_intensity": np.array([1.0]), "log_rate": np.array([0.0])}, False),
    ({"log_intensity": np.array([2.0, 1.0]), "log_rate": np.array([0.0, 0.0])}, False),
])
def test_rate_table_soundness(arrays, sound):
    # common practice, no source: only arrays a RateTable can interpolate are accepted
    assert ionization_tables.rate_table_is_sound(arrays) is sound
