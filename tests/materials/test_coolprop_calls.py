"""CoolProp answers kept in the cache folder (hcfplan.materials.coolprop_calls): the same
numbers as CoolProp, read back without CoolProp, refusals never kept.

Contract tests against CoolProp itself (I. H. Bell, J. Wronski, S. Quoilin, V. Lemort, Ind. Eng.
Chem. Res. 53, 2498-2508 (2014), doi:10.1021/ie4033999).
"""

from __future__ import annotations

import sys

import pytest
from CoolProp.CoolProp import PhaseSI, PropsSI

from hcfplan.materials import coolprop_calls


@pytest.fixture()
def fresh_cache(tmp_path, monkeypatch):
    monkeypatch.setenv("HCFPLAN_CACHE_DIR", str(tmp_path))
    return tmp_path


class _NoCoolProp:
    def __getattr__(self, name):
        raise AssertionError(f"CoolProp.{name} used although the answer is kept")


def test_answers_are_coolprops_and_read_back_without_it(fresh_cache, monkeypatch):
    args = ("Dmolar", "T", 293.15, "P", 3.0e5, "Argon")
    first = coolprop_calls.props_si(*args)
    assert first == PropsSI(*args)  # the same float, not merely close
    phase = coolprop_calls.phase_si("T", 293.15, "P", 3.0e5, "Argon")
    assert phase == PhaseSI("T", 293.15, "P", 3.0e5, "Argon")
    assert list(fresh_cache.glob("coolprop-*.json"))
    monkeypatch.setattr(coolprop_calls, "_memo", None)  # as in a new process
    monkeypatch.setitem(sys.modules, "CoolProp.CoolProp", _NoCoolProp())
    assert coolprop_calls.props_si(*args) == first
    assert coolprop_calls.phase_si("T", 293.15, "P", 3.0e5, "Argon") == phase


def test_numpy_scalars_share_the_key_of_floats(fresh_cache):
    np = pytest.importorskip("numpy")
    value = coolprop_calls.props_si("Dmolar", "T", np.float64(293.15), "P", 1e5, "Argon")
    memo = coolprop_calls._load()
    assert "PropsSI('Dmolar', 'T', 293.15, 'P', 100000.0, 'Argon')" in memo
    assert value == PropsSI("Dmolar", "T", 293.15, "P", 1e5, "Argon")


def test_a_refused_call_raises_each_time_and_is_not_kept(fresh_cache):
    for _ in range(2):
        with pytest.raises(ValueError):
            coolprop_calls.props_si("Tcrit", "Argonium")
    assert not any("Argonium" in key for key in coolprop_calls._load())


def test_an_unreadable_cache_file_only_costs_asking_again(fresh_cache, monkeypatch):
    args = ("Tcrit", "Nitrogen")
    coolprop_calls.props_si(*args)
    for path in fresh_cache.glob("coolprop-*.json"):
        path.write_text("{not json", encoding="utf-8")
    monkeypatch.setattr(coolprop_calls, "_memo", None)
    assert coolprop_calls.props_si(*args) == PropsSI(*args)
