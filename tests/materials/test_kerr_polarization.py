"""Kerr coefficient for circular polarisation (hcfplan.materials.kerr_polarization)."""

from __future__ import annotations

import pytest

from hcfplan.errors import ConfigError
from hcfplan.materials.gases import GasFill, gas_medium
from hcfplan.materials.kerr_polarization import (
    circular_kerr_ratio,
    kerr_polarization_factors,
    polarized_medium,
)
from hcfplan.propagation.raman import rotational_kerr_n2


@pytest.mark.parametrize(("b_over_a", "ratio"), [(1.0, 2 / 3), (6.0, 1 / 4), (0.0, 1.0)])
def test_circular_ratio(b_over_a, ratio):
    """Published value (R. W. Boyd, Nonlinear Optics, 3rd ed. (2008), Sec. 4.2 [from memory]):
    n2(circular)/n2(linear) = 1/(1 + B/2A); electronic B/A = 1 gives 2/3, molecular
    orientation B/A = 6 gives 1/4."""
    assert circular_kerr_ratio(b_over_a) == pytest.approx(ratio, rel=1e-15)


def test_factors_and_bad_key():
    """Contract: linear leaves n2 alone; an unknown polarisation names the key."""
    assert kerr_polarization_factors("linear") == (1.0, 1.0)
    assert kerr_polarization_factors("circular") == pytest.approx((2 / 3, 1 / 4))
    with pytest.raises(ConfigError, match="laser.polarization = 'elliptic'"):
        kerr_polarization_factors("elliptic")


def test_polarized_medium_scales_electronic_and_rotational():
    """Invariant: the circular medium has 2/3 of the electronic n2 and 1/4 of the rotational
    n2 of each Raman record (the rotational response goes as the anisotropy squared)."""
    medium = gas_medium(GasFill(components=(("N2", 1.0),), pressure=1e5, temperature=293.15,
                                eos="ideal"))
    circ = polarized_medium(medium, "circular")
    assert circ.n2 == pytest.approx(medium.n2 * 2 / 3, rel=1e-15)
    lin_sp, circ_sp = medium.components[0].table.raman[0], circ.components[0].table.raman[0]
    density = medium.components[0].number_density
    assert rotational_kerr_n2(circ_sp, density, 293.15) == pytest.approx(
        rotational_kerr_n2(lin_sp, density, 293.15) / 4, rel=1e-12)
    assert polarized_medium(medium, "linear") is medium
