"""Average power, heat per pulse and thermal relaxation (hcfplan.limits.thermal,
hcfplan.materials.gas_transport)."""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy import special
from scipy.signal import fftconvolve

from hcfplan.constants import c
from hcfplan.errors import ConfigError
from hcfplan.limits import thermal
from hcfplan.limits.rotational import raman_records
from hcfplan.materials.gas_tables import load_gas_table
from hcfplan.materials.gas_transport import heat_transport, thermal_diffusivity
from hcfplan.materials.gases import GasFill, gas_medium
from hcfplan.propagation.raman import rotational_raman_response
from hcfplan.pulse.shapes import intensity_envelope


def _medium(gas: str, pressure: float = 1e5):
    return gas_medium(GasFill(components=((gas, 1.0),), pressure=pressure, temperature=293.15,
                              eos="ideal"))


def test_relaxation_time_is_slowest_diffusion_mode():
    """Analytic (Carslaw & Jaeger, Sec. 7.6 [from memory]): T = J0(j01 r/a) exp(-t/tau) with
    tau = a^2/(j01^2 D) solves dT/dt = D (T'' + T'/r) with T(a) = 0; j01 from scipy."""
    a, d = 125e-6, 2e-5
    tau = thermal.thermal_relaxation_time(a, d)
    j01 = special.jn_zeros(0, 1)[0]
    assert tau == pytest.approx(a**2 / (j01**2 * d), rel=1e-14)
    r = np.linspace(0.1, 0.9, 5) * a
    k = j01 / a
    laplacian = -k**2 * special.j0(k * r)  # (J0(kr))'' + (J0(kr))'/r = -k^2 J0(kr)
    assert np.allclose(-special.j0(k * r) / tau, d * laplacian, rtol=1e-12)


def test_relaxes_between_pulses_threshold():
    """Definition: relaxed when the spacing is at least 3 relaxation times."""
    assert thermal.relaxes_between_pulses(1e-6, 1 / 3.1e-6)
    assert not thermal.relaxes_between_pulses(1e-6, 1 / 2.9e-6)
    with pytest.raises(ConfigError, match="repetition_rate = 0"):
        thermal.relaxes_between_pulses(1e-6, 0)


@pytest.mark.parametrize(("gas", "value"), [("Ar", 0.0177), ("N2", 0.0259)])
def test_conductivity_lemmon_jacobsen(gas, value):
    """Published value (E. W. Lemmon and R. T. Jacobsen, Int. J. Thermophys. 25, 21 (2004)
    [from memory]): dilute-gas thermal conductivity at 300 K, 1 bar: Ar 0.0177, N2 0.0259
    W/(m K) (three digits recalled: 2 %)."""
    found = heat_transport(load_gas_table(gas), 1e5, 300.0)
    assert found.conductivity == pytest.approx(value, rel=0.02)


def test_diffusivity_missing_model_and_pressure_scaling():
    """Contract: no CoolProp conductivity model for Ne -> None; invariant: D ~ 1/p for a
    dilute gas (within 1 % from 1 to 2 bar)."""
    assert thermal_diffusivity(_medium("Ne")) is None
    one, two = thermal_diffusivity(_medium("Ar", 1e5)), thermal_diffusivity(_medium("Ar", 2e5))
    assert one / two == pytest.approx(2.0, rel=0.01)


@pytest.mark.parametrize("shape", ["gaussian", "sech2"])
@pytest.mark.parametrize("omega", [0.0, 5e12, 3e13])
def test_intensity_spectrum_against_quadrature(shape, omega):
    """Analytic: the closed forms against the numerical transform of the envelope."""
    tau, dt = 50e-15, 0.05e-15
    t = np.arange(-20 * tau, 20 * tau, dt)
    numeric = np.sum(intensity_envelope(shape, t / tau) * np.cos(omega * t)) * dt
    assert thermal.intensity_spectrum(shape, omega, tau) == pytest.approx(numeric, rel=1e-9)


@pytest.mark.parametrize("shape", ["gaussian", "sech2"])
@pytest.mark.parametrize("tau", [30e-15, 150e-15])
def test_rotational_heat_equals_work_on_delayed_index(shape, tau):
    """Invariant: the line sum equals q = (1/c) int I d(delta n_rot)/dt dt computed in the
    time domain from the response R (T2 finite there: 0.2 %)."""
    medium = _medium("N2")
    records = raman_records(medium)
    dt = 0.25e-15
    n = int(16 * tau / dt)
    t = (np.arange(n) - n / 2) * dt
    peak = 1e17
    intensity = peak * intensity_envelope(shape, t / tau)
    response = sum(rotational_raman_response(np.arange(n) * dt, sp, d, 293.15)
                   for sp, d in records)
    delta_n = fftconvolve(intensity, response)[:n] * dt
    work = np.sum(intensity * np.gradient(delta_n, dt)) * dt / c
    lines = thermal.rotational_heat_per_length(records, 293.15, peak, tau, shape, 1.0)
    assert lines == pytest.approx(work, rel=2e-3)
    assert thermal.rotational_heat_per_length([], 293.15, peak, tau, shape, 1.0) == 0.0


def test_ionization_heat_and_average_power():
    """Definitions: I_p N f V summed over species; E f."""
    heat = thermal.ionization_heat([2e-18, 3e-18], 1e25, [1e-4, 2e-4], 1e-8)
    assert heat == pytest.approx((2e-18 * 1e-4 + 3e-18 * 2e-4) * 1e25 * 1e-8, rel=1e-14)
    assert thermal.average_power(1e-3, 1e4) == pytest.approx(10.0)
    assert math.isclose(thermal.average_power(0.0, 1e4), 0.0)
