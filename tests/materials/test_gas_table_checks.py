"""The physical checks of a gas table: poles and non-physical indices of its dispersion fit,
and the equation-of-state name.

Kinds of test: analytic (pole positions of the published forms), published value (the shipped
fits are usable over their stated ranges: Borzsonyi et al., Appl. Opt. 47, 4856 (2008); Ciddor,
Appl. Opt. 35, 1566 (1996)), error tests (file and key named) and a property test of the check.
"""

from __future__ import annotations

import math

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from hcfplan.errors import ConfigError
from hcfplan.io.crosschecks import check_gas_tables
from hcfplan.materials import gas_fit_checks
from hcfplan.materials.gas_fit_checks import fit_poles, index_defect
from hcfplan.materials.gas_tables import DispersionFit, load_gas_table, refractive_index_from_fit


def fit_defect(fit: DispersionFit, low: float, high: float) -> str:
    return index_defect(lambda w: refractive_index_from_fit(fit, w), fit.form, fit.coefficients,
                        low, high)

GASES = ["He", "Ne", "Ar", "Kr", "Xe", "N2", "air"]


def test_pole_positions_of_the_published_forms():
    # analytic: B lambda^2/(lambda^2 - C) diverges at lambda = sqrt(C) (C in um^2); the Xe fit
    # has C1 = 12.75e-3 um^2 (gases/Xe.toml): 112.92 nm. A/(B - lambda^-2) diverges at
    # lambda = 1/sqrt(B): Ciddor's B1 = 238.0185 um^-2 gives 64.82 nm (gases/air.toml)
    xe = load_gas_table("Xe").dispersion
    assert fit_poles(xe.form, xe.coefficients)[0] == ("c_um2", 0,
                                                      pytest.approx(math.sqrt(12.75e-3) * 1e-6))
    ciddor = next(f for f in load_gas_table("air").dispersion_fits if f.form ==
                  "n_minus_1_inverse")
    assert fit_poles(ciddor.form, ciddor.coefficients)[0] == (
        "b_per_um2", 0, pytest.approx(1e-6 / math.sqrt(238.0185)))


@pytest.mark.parametrize("gas", GASES)
def test_shipped_fits_are_usable_over_their_stated_range(gas):
    for fit in load_gas_table(gas).dispersion_fits:
        assert fit_defect(fit, *fit.valid_wavelength) == ""


def test_run_range_through_a_pole_names_file_and_key():
    # analytic (band of hcfplan.numerics.grid.estimated_band): a 5 fs pulse at 250 nm needs
    # wavelengths down to 157 nm, a 2 fs pulse down to 101 nm, past the Xe fit's pole at 112.9 nm
    resolved = {"laser": {"wavelength_nm": 250.0, "fwhm_fs": 2.0},
                "gas": {"species": "Xe", "mixture": None, "temperature_k": 293.15}}
    table = load_gas_table("Xe")
    with pytest.raises(ConfigError) as info:
        check_gas_tables(resolved, {"gas"}, ())
    message = str(info.value)
    assert message.startswith(f"{table.path}: dispersion[0].c_um2[0] = 0.01275: the fit has a "
                              "pole at 112.9 nm")
    assert "inside the wavelengths the run needs at laser.wavelength_nm = 250.0" in message
    resolved["laser"]["fwhm_fs"] = 5.0
    check_gas_tables(resolved, {"gas"}, ())


def test_index_below_one_is_reported_with_its_wavelength():
    # analytic: n^2 - 1 = -1e-4 lambda^2/(lambda^2 - 0.01) < 0 for lambda > 0.1 um
    fit = DispersionFit(form="n2_minus_1_sellmeier", coefficients=((-1e-4, 0.01),),
                        reference_temperature=273.15, reference_pressure=1e5,
                        valid_wavelength=(0.4e-6, 1.0e-6), source="invented", key="neg")
    problem = fit_defect(fit, 0.4e-6, 1.0e-6)
    n = math.sqrt(1 - 1e-4 * 0.16 / (0.16 - 0.01))
    assert problem.startswith(f"b and c_um2: n = {n:.9g} at 400 nm")
    assert "a gas index must be real and > 1" in problem


def test_unknown_eos_name_gets_the_closest_coolprop_name():
    gas_fit_checks.check_eos_name("Argon", "eos.coolprop_name", "x.toml")
    with pytest.raises(ConfigError, match=r"^x\.toml: eos\.coolprop_name = 'Neonn': not a fluid "
                                          r"of the equation-of-state library CoolProp; did you "
                                          r"mean 'Neon'\?"):
        gas_fit_checks.check_eos_name("Neonn", "eos.coolprop_name", "x.toml")


coefficient = st.floats(min_value=-10.0, max_value=10.0, allow_nan=False)


@settings(max_examples=150, deadline=None, derandomize=True,
          suppress_health_check=[HealthCheck.too_slow])
@given(form=st.sampled_from(["n2_minus_1_sellmeier", "n_minus_1_inverse"]),
       pairs=st.lists(st.tuples(coefficient, coefficient), min_size=1, max_size=4),
       low=st.floats(min_value=0.1, max_value=5.0), span=st.floats(min_value=1.001, max_value=20))
def test_fit_check_never_fails_itself(form, pairs, low, span):
    fit = DispersionFit(form=form, coefficients=tuple(pairs), reference_temperature=273.15,
                        reference_pressure=1e5, valid_wavelength=(low * 1e-6, low * span * 1e-6),
                        source="fuzz", key="fuzz")
    problem = fit_defect(fit, *fit.valid_wavelength)
    assert "\n" not in problem
    if not problem:  # a fit that passes gives a real index above 1 at every sample
        import numpy as np

        wavelength = np.geomspace(*fit.valid_wavelength, 50)
        assert np.all(refractive_index_from_fit(fit, wavelength) > 1)
