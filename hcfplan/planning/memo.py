"""Results kept between calls in one process that depend only on parts of a config.

A program that calls ``hcfplan.simulate`` again and again (a notebook, a scan written by hand)
recomputes what depends only on the config each time: the fiber's first-look numbers, for
example, took 0.11 s of a warm demo call of 0.18 s (``bench/api_warm.py``). :func:`remembered`
keeps such a result under a key made of the frozen specs of the config (dataclasses compared by
value; a measured curve by identity, so a config loaded again reads its files again) and of
its resolved table, and hands out a deep copy, so a caller that changes what it got changes
nothing kept. Gas and crystal tables are read once per process already
(:func:`hcfplan.materials.gases.load_gas_table`), so a kept result is as fresh as they are.
"""

from __future__ import annotations

import copy
import json
from collections import OrderedDict
from collections.abc import Callable
from typing import Any

#: Most results kept per kind (the oldest goes first).
MAX_KEPT = 16

_kept: dict[str, OrderedDict] = {}

#: The spec fields of a :class:`hcfplan.io.specs.PlanConfig` that make up a key.
SPEC_FIELDS = ("laser", "fiber", "gas", "cell", "compressor", "thz", "limits", "spread", "grid",
               "present_sections", "overrides")


def config_key(config) -> tuple | None:
    """A hashable key of everything in ``config`` (None where a part cannot be hashed).

    References
    ----------
    none: bookkeeping.
    """
    try:
        parts = tuple(getattr(config, name, None) for name in SPEC_FIELDS)
        resolved = json.dumps(getattr(config, "resolved", None), sort_keys=True, default=repr)
        key = (parts, resolved)
        hash(key)
    except TypeError:
        return None
    return key


def remembered(kind: str, config, compute: Callable[[], Any]) -> Any:
    """``compute()``, or a deep copy of what it gave for an equal ``config`` in this process.

    Parameters
    ----------
    kind : str
        What is kept (one store per kind).
    config : PlanConfig
        The config the result depends on (nothing else may change it).
    compute : callable
        () -> the result.

    References
    ----------
    none: bookkeeping.
    """
    key = config_key(config)
    if key is None:
        return compute()
    store = _kept.setdefault(kind, OrderedDict())
    if key in store:
        store.move_to_end(key)
        return copy.deepcopy(store[key])
    value = compute()
    store[key] = copy.deepcopy(value)
    if len(store) > MAX_KEPT:
        store.popitem(last=False)
    return value


def forget() -> None:
    """Drop everything kept (tests; a program that changed a gas table file)."""
    _kept.clear()
