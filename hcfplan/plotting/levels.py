"""Display conversions shared by the figure modules: decibel levels and per-wavelength densities.

Display only: nothing here is physics beyond the Jacobian of the density.
"""

from __future__ import annotations

import numpy as np

from hcfplan.constants import c


def decibels(values: np.ndarray, reference: float, floor_db: float) -> np.ndarray:
    """10 log10(values / reference), clipped below at ``floor_db`` (zeros give the floor). [dB]"""
    ratio = np.maximum(np.asarray(values, dtype=float) / reference, 10.0 ** (floor_db / 10.0))
    return 10.0 * np.log10(ratio)


def per_wavelength(frequency: np.ndarray, density: np.ndarray) -> np.ndarray:
    """Energy density per unit wavelength from one per unit frequency: S_λ = S_ν ν² / c.

    ``frequency`` [Hz] > 0, ``density`` [J/Hz] (last axis on ``frequency``); returns J/m.
    """
    return np.asarray(density, dtype=float) * np.asarray(frequency, dtype=float) ** 2 / c
