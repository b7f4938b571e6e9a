"""The sampling of the THz estimate: a THz frequency step of its own, not the optical grid's.

The mixing sums of :mod:`hcfplan.thz.mixing` take the THz frequencies Omega_m = m d_nu on the
sample spacing d_nu of the optical spectrum, and sum over omega on the same samples. Two things
then depend on the optical grid rather than on the pulse:

* the THz axis itself: with d_nu = 0.66 THz (a 1024-point grid of 1.5 ps for a few-fs pulse)
  the peak, the widths and narrow features (phonon lines, the lobes of a thick crystal) are
  under-sampled;
* the sum over omega, which equals the integral over omega only if the pulse, as it disperses
  through the crystal, fits into the time window 1 / d_nu: for every depth z the sum is the
  transform of |A_z(t)|^2 of the periodically continued window, where A_z is the pulse after
  the depth z (the group delays of its spectral parts spread by L (n_g,max - n_g,min) / c).

The optical field is therefore padded with zeros in time (exact band-limited interpolation of its
spectrum; the pulse keeps its shape, energy and spectrum) to a window of at least
1 / ``frequency_step`` and at least the optical window plus twice the group-delay spread of the
band above :data:`SPREAD_FLOOR_DB` in the crystal. The field is first rotated in time so that its
quietest stretch sits at the window edges, where the zeros go; the delay this adds is removed
from the THz phase again (:attr:`ThzSampling.delay`).

References
----------
None: numerical sampling (zero padding in time, i.e. band-limited interpolation of the
spectrum; common practice, no source). The group index is that of the crystal table's
Sellmeier (:func:`hcfplan.materials.crystals.optical_group_index`).
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass

import numpy as np

from hcfplan.constants import c
from hcfplan.materials.crystals import CrystalTable, optical_group_index
from hcfplan.numerics.grid import Grid, fft_friendly_size

#: Default THz sample spacing of the estimate (50 GHz): the -20 dB cutoff of the demo cases
#: changes by < 0.5 % when it is halved (tests/thz/test_thz_cutoff.py). [Hz]
DEFAULT_FREQUENCY_STEP = 50e9
#: Largest padded grid (points); beyond it the window stays short and a note says so.
MAX_POINTS = 1 << 17
#: The group-delay spread is taken over the optical band above this level of the peak. [dB]
SPREAD_FLOOR_DB = -30.0


@dataclass(frozen=True, eq=False)
class ThzSampling:
    """The optical spectrum on the grid the THz estimate samples.

    Attributes
    ----------
    grid : Grid
        Same ``dt`` and centre as the optical grid, ``points`` >= the optical grid's.
    spectrum : ndarray of complex
        The spectrum on ``grid`` (FFT order, |A~|^2 in J/Hz). [sqrt(J/Hz)]
    delay : float
        Time by which the field was moved (rotated) before padding; the THz field computed on
        ``grid`` carries the phase exp(i Omega delay). [s]
    notes : tuple of str
        A note when the wanted window needed more than :data:`MAX_POINTS` points.
    """

    grid: Grid
    spectrum: np.ndarray
    delay: float
    notes: tuple[str, ...] = ()

    @property
    def frequency_step(self) -> float:
        """THz sample spacing 1 / (points dt). [Hz]"""
        return float(self.grid.dnu)


def group_delay_spread(crystal: CrystalTable, thickness: float, omega: np.ndarray) -> float:
    """Spread of the group delays L n_g(omega) / c over the angular frequencies ``omega``.

    Parameters
    ----------
    crystal : CrystalTable
        Crystal with an optical index model.
    thickness : float
        Crystal thickness L. [m]
    omega : ndarray
        Angular frequencies of the band. [rad/s]

    Returns
    -------
    float
        L (max n_g - min n_g) / c over the finite values (0 if none). [s]

    References
    ----------
    None: group delay of a dispersive slab, L n_g / c (common practice, no source).
    """
    n_g = np.asarray(optical_group_index(crystal, np.asarray(omega, dtype=float)), dtype=float)
    n_g = n_g[np.isfinite(n_g)]
    if n_g.size == 0:
        return 0.0
    return float(thickness * (n_g.max() - n_g.min()) / c)


def _quiet_index(intensity: np.ndarray) -> int:
    """Centre of the circular stretch of N/8 samples with the least energy."""
    n = len(intensity)
    width = max(n // 8, 1)
    total = np.concatenate([[0.0], np.cumsum(np.concatenate([intensity, intensity[:width]]))])
    sums = total[width:width + n] - total[:n]  # sums[k] = energy of samples k .. k + width - 1
    return int((int(np.argmin(sums)) + width // 2) % n)


def padded_spectrum(grid: Grid, spectrum: np.ndarray, points: int) -> tuple[Grid, np.ndarray,
                                                                           float]:
    """The spectrum of the field padded with zeros in time to ``points`` samples.

    Parameters
    ----------
    grid : Grid
        Grid of ``spectrum``.
    spectrum : ndarray of complex
        Spectral amplitude, FFT order (:mod:`hcfplan.numerics.grid`). [sqrt(J/Hz)]
    points : int
        Samples of the padded grid, >= ``grid.points`` (same ``dt``).

    Returns
    -------
    (Grid, ndarray, float)
        The padded grid, the spectrum on it, and the delay by which the field was rotated so
        that its quietest stretch lies at the window edges. [-], [sqrt(J/Hz)], [s]

    References
    ----------
    None: zero padding in time (band-limited interpolation of the spectrum), common practice,
    no source.
    """
    field = grid.to_time(np.asarray(spectrum, dtype=complex))
    n = grid.points
    quiet = _quiet_index(np.abs(field) ** 2)
    shift = (n // 2 - quiet) % n - n // 2  # -quiet, taken in [-n/2, n/2)
    rotated = np.roll(field, shift)  # rotated[0] = field[quiet]; rotated(t) = field(t - shift dt)
    lo = (points - n) // 2
    padded = np.zeros(points, dtype=complex)
    padded[lo:lo + n] = rotated
    big = dataclasses.replace(grid, points=int(points))
    return big, big.to_spectrum(padded), float(shift * grid.dt)


def thz_sampling(grid: Grid, spectrum: np.ndarray, crystal: CrystalTable, thickness: float,
                 frequency_step: float = DEFAULT_FREQUENCY_STEP) -> ThzSampling:
    """The optical spectrum on a grid whose spacing is at most ``frequency_step`` and whose
    window holds the pulse as it disperses through the crystal (module docstring).

    Parameters
    ----------
    grid : Grid
        Optical grid.
    spectrum : ndarray of complex
        Optical spectral amplitude, FFT order. [sqrt(J/Hz)]
    crystal : CrystalTable
        Generation crystal (its group index sets the dispersive spread).
    thickness : float
        Crystal thickness. [m]
    frequency_step : float
        Largest THz sample spacing wanted. [Hz]

    Returns
    -------
    ThzSampling
        The optical grid itself when it already meets both conditions.

    References
    ----------
    None: numerical sampling (module docstring), common practice, no source.
    """
    power = np.abs(grid.shifted(np.asarray(spectrum, dtype=complex))) ** 2
    bright = power >= 10.0 ** (SPREAD_FLOOR_DB / 10.0) * power.max()
    spread = group_delay_spread(crystal, thickness, grid.shifted(grid.omega)[bright])
    window = max(1.0 / frequency_step, grid.time_window + 2.0 * spread)
    wanted = fft_friendly_size(int(np.ceil(window / grid.dt * (1 - 1e-12))))
    notes: tuple[str, ...] = ()
    if wanted > MAX_POINTS:
        notes = (f"THz estimate: the pulse dispersed in {crystal.name} ({spread * 1e12:.3g} ps "
                 f"of group-delay spread) needs a {window * 1e12:.3g} ps window; "
                 f"{MAX_POINTS} points give {MAX_POINTS * grid.dt * 1e12:.3g} ps, so the THz "
                 "spectrum may be aliased",)
        wanted = MAX_POINTS
    if wanted <= grid.points:
        return ThzSampling(grid, np.asarray(spectrum, dtype=complex), 0.0, notes)
    big, padded, delay = padded_spectrum(grid, spectrum, wanted)
    return ThzSampling(big, padded, delay, notes)
