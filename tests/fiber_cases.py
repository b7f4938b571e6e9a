"""Test-local gases, wall glass and helpers shared by the fiber test files (not a test module)."""

from __future__ import annotations

import dataclasses

import numpy as np

from hcfplan.materials.solids import QuotedValue, SellmeierFit, SolidMaterial

C = 299792458.0


def omega_of(wavelength):
    """Angular frequency [rad/s] of a vacuum wavelength [m]."""
    return 2 * np.pi * C / np.asarray(wavelength, dtype=float)


class Vacuum:
    """An empty tube (index 1, no Kerr): Marcatili & Schmeltzer's own case."""

    n2 = 0.0

    def refractive_index(self, omega):
        return np.ones_like(np.asarray(omega, dtype=float))


def constant_glass(n):
    """A wall of fixed index n (Sellmeier with only the constant term)."""
    fit = SellmeierFit("sellmeier_wavelength_um", n * n - 1, (0.0,), (0.1,), 1e-8, 1e-3, 293.15,
                       "test: constant index", False)
    return SolidMaterial("constant", "", fit, QuotedValue(0.0, "test", False),
                         QuotedValue(1.0, "test", False))


@dataclasses.dataclass(frozen=True)
class BorzsonyiArgon:
    """Test-local argon: n^2 - 1 = (p/1000 mbar)(273 K/T)[B1 l^2/(l^2-C1) + B2 l^2/(l^2-C2)].

    A. Borzsonyi et al., Appl. Opt. 47, 4856 (2008), doi:10.1364/AO.47.004856 (Ar coefficients);
    n2 = 9.7e-24 m^2/W per bar, J. K. Wahlstrand et al., Phys. Rev. A 85, 043820 (2012).
    """

    pressure: float  # [Pa]
    temperature: float = 293.15  # [K]

    @property
    def n2(self):
        return 9.7e-24 * self.pressure / 1e5

    def refractive_index(self, omega):
        lam2 = (2 * np.pi * C / np.asarray(omega, dtype=float) / 1e-6) ** 2
        s = 20332.29e-8 * lam2 / (lam2 - 206.12e-6) + 34458.31e-8 * lam2 / (lam2 - 8.066e-3)
        return np.sqrt(1 + self.pressure / 1e5 * 273.0 / self.temperature * s)
