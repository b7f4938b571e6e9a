"""Optical and safety-relevant numbers of one gas at a fill state (the ``gas`` command)."""

from __future__ import annotations

import math

import numpy as np

from hcfplan.constants import c, eV


def _wavenumber(medium):
    return lambda omega: omega * medium.refractive_index(omega) / c


def gas_report(name: str, pressure: float, temperature: float, wavelengths, *,
               eos: str = "coolprop", search_dirs=()) -> dict:
    """Refractive index, group index, GVD, n2, densities, Ip and P_cr of a gas (SI, keyed).

    Parameters
    ----------
    name : str
        Gas table name (``"Ar"``).
    pressure : float
        Fill pressure. [Pa]
    temperature : float
        Fill temperature. [K]
    wavelengths : sequence of float
        Vacuum wavelengths at which to evaluate. [m]
    """
    from hcfplan.planning.validity import quiet_validity

    with quiet_validity():
        return _gas_report(name, pressure, temperature, wavelengths, eos, search_dirs)


def _gas_report(name, pressure, temperature, wavelengths, eos, search_dirs) -> dict:
    from hcfplan.limits import beam as limits
    from hcfplan.materials import gas_density, gases
    from hcfplan.numerics import derivatives

    table = gases.load_gas_table(name, search_dirs)
    fill = gases.GasFill(components=((table.name, 1.0),), pressure=pressure,
                         temperature=temperature, eos=eos)
    medium = gases.gas_medium(fill, search_dirs=search_dirs)
    ideal = gas_density.number_density(table, pressure, temperature, eos="ideal")
    real = gas_density.number_density(table, pressure, temperature, eos="coolprop")
    k = _wavenumber(medium)
    rows = []
    for wavelength in wavelengths:
        omega = 2 * math.pi * c / wavelength
        n = float(medium.refractive_index(np.array([omega]))[0])
        k1 = float(derivatives.derivative(k, omega, 1))
        k2 = float(derivatives.derivative(k, omega, 2))
        rows.append({
            "wavelength_m": wavelength,
            "refractive_index": n,
            "n_minus_1": n - 1.0,
            "group_index": c * k1,
            "gvd_s2_per_m": k2,
            "critical_power_w": float(limits.self_focusing_power(wavelength, n, medium.n2)),
        })
    return {
        "gas": table.name,
        "pressure_pa": pressure,
        "temperature_k": temperature,
        "equation_of_state": eos,
        "number_density_per_m3": medium.number_density,
        "number_density_ideal_per_m3": ideal,
        "number_density_real_per_m3": real,
        "compressibility_factor": ideal / real,
        "n2_m2_per_w": medium.n2,
        "ionization_potential_ev": table.ionization.potential / eV,
        "wavelengths": rows,
        "sources": {
            "dispersion": table.dispersion.source,
            "kerr": table.kerr.source,
            "ionization": table.ionization.source,
            "density": ("CoolProp reference equation of state for "
                        f"{table.coolprop_name} (I. H. Bell et al., Ind. Eng. Chem. Res. 53, "
                        "2498 (2014))" if eos == "coolprop" else "ideal gas, N = p/(k_B T)"),
            "critical_power": "P_cr = 1.8962 lambda^2/(4 pi n0 n2), G. Fibich and A. L. Gaeta, "
                              "Opt. Lett. 25, 335 (2000)",
        },
        "warnings": list(medium.warnings) + _range_warnings(table, wavelengths),
    }


def _range_warnings(table, wavelengths) -> list[str]:
    lo, hi = table.dispersion.valid_wavelength
    outside = [w for w in wavelengths if not lo <= w <= hi]
    if not outside:
        return []
    shown = ", ".join(f"{w * 1e9:.0f} nm" for w in outside)
    return [f"{table.name} dispersion fit is valid for {lo * 1e9:.0f}-{hi * 1e9:.0f} nm; "
            f"{shown} extrapolated"]
