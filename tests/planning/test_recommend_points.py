"""The binding constraints of a recommended point (hcfplan.planning.recommend_points): the
margin of the EH11 share that --min-eh11 asks for.

Contract tests of the margin convention (margin / required, 1 on the limit); no external
source is needed.
"""

from __future__ import annotations

import math

import pytest

from hcfplan.planning.recommend_points import binding_constraints


def _record(share: float) -> dict:
    return {"summary": {"output": {"eh11_fraction": share}}, "margins": {}, "checks": []}


@pytest.mark.parametrize(("share", "minimum", "closeness"), [
    (0.9977, 0.95, 0.05 / 0.0023),  # far from the minimum: not binding
    (0.95, 0.95, 1.0),  # on the minimum
    (0.90, 0.95, 0.5),  # below it: not met
])
def test_the_eh11_margin_is_the_share_allowed_outside_over_the_share_found(share, minimum,
                                                                           closeness):
    (found,) = binding_constraints(_record(share), min_eh11=minimum)
    assert found["name"] == "output.eh11_fraction"
    assert found["closeness"] == pytest.approx(closeness, rel=1e-9)
    assert ("not met" in found["text"]) == (closeness < 1 - 1e-12)


def test_a_beam_wholly_in_eh11_has_an_unbounded_margin():
    (found,) = binding_constraints(_record(1.0), min_eh11=0.95)
    assert math.isinf(found["closeness"])
