"""The result of a propagation run and the recorder that fills it along z."""

from __future__ import annotations

from dataclasses import dataclass
from typing import Literal

import numpy as np

from ..grid import Grid
from ..metrics import spectral_width

Status = Literal["completed", "nonfinite", "step_collapse", "step_budget", "ionization_stop"]

#: Outer part of the time or frequency window (each side) checked for energy at the edges.
EDGE_ZONE = 0.05
#: Energy fraction in the edge zones above which the result carries a warning.
EDGE_ENERGY_LIMIT = 1e-5
#: Level of the tracked spectral bandwidth below the peak. [dB]
BANDWIDTH_LEVEL_DB = -20.0


@dataclass(frozen=True)
class PropagationResult:
    """Outcome of :func:`~hcfplan.propagation.solve.propagate` (SI units, grid conventions).

    Attributes
    ----------
    grid : Grid
        The grid of the run.
    z : ndarray
        Positions of the records (evenly spaced from 0 to the length; after a failure the last
        entry is the position reached). [m]
    spectrum_z : ndarray of float32, shape (len(z), N)
        Spectral energy density |A~|^2 at each z, FFT order (``grid.frequency``). [J/Hz]
    field_in_t, field_out_t : ndarray of complex
        Temporal envelope at z = 0 and at the last z. [sqrt(W)]
    field_out_spectrum : ndarray of complex
        Grid spectrum at the last z, FFT order. [sqrt(J/Hz)]
    energy_z, peak_power_z, peak_intensity_z : ndarray
        Pulse energy [J], peak power [W], on-axis peak intensity P/A_I [W/m^2] (nan when the
        waveguide has no ``peak_intensity_area``).
    ionization_fraction_z : ndarray
        Free electrons behind the pulse over the neutral density (all components). [1]
    electron_line_density_z : ndarray
        Electrons left behind the pulse per unit length, A_I rho. [1/m]
    bandwidth_z : ndarray
        Full width between the outermost points at -20 dB of the spectral peak. [Hz]
    status : str
        ``"completed"`` or the kind of fault (see :data:`Status`).
    message : str
        Empty on success; otherwise what happened, where, the likely cause and a remedy.
    success : bool
        True when the run reached the fiber end.
    n_steps, n_rejected, n_rhs_evals : int
        Accepted steps, rejected attempts, evaluations of the nonlinear terms.
    warnings : tuple of str
        Caveats (energy at the window edges, removed field outside the valid band, ...).
    """

    grid: Grid
    z: np.ndarray
    spectrum_z: np.ndarray
    field_in_t: np.ndarray
    field_out_t: np.ndarray
    field_out_spectrum: np.ndarray
    energy_z: np.ndarray
    peak_power_z: np.ndarray
    peak_intensity_z: np.ndarray
    ionization_fraction_z: np.ndarray
    electron_line_density_z: np.ndarray
    bandwidth_z: np.ndarray
    status: Status
    message: str
    success: bool
    n_steps: int
    n_rejected: int
    n_rhs_evals: int
    warnings: tuple[str, ...]


class Recorder:
    """Collects the records at the sample positions (preallocated for ``capacity`` rows)."""

    _SCALARS = ("energy", "peak_power", "peak_intensity", "ionization", "electrons", "bandwidth")

    def __init__(self, grid: Grid, capacity: int, intensity_area: float, plasma) -> None:
        self.grid = grid
        self.intensity_area = intensity_area
        self.plasma = plasma  # NonlinearTerms with ionising species, or None
        self.z = np.empty(capacity)
        self.spectra = np.empty((capacity, grid.points), np.float32)
        self.values = {name: np.empty(capacity) for name in self._SCALARS}
        self.count = 0
        self.edge_time = 0.0
        self.edge_frequency = 0.0
        far = np.abs(grid.domega) > (1 - 2 * EDGE_ZONE) * np.pi / grid.dt
        self._far_frequency = far
        k = np.arange(grid.points)
        self._far_time = (k < EDGE_ZONE * grid.points) | (k >= (1 - EDGE_ZONE) * grid.points)

    def record(self, z: float, u: np.ndarray) -> None:
        """Store the spectrum and the tracked quantities of spectrum ``u`` at ``z``."""
        i, grid = self.count, self.grid
        density = np.abs(u) ** 2
        power = np.abs(grid.to_time(u)) ** 2
        energy = float(np.sum(density) * grid.dnu)
        self.z[i] = z
        self.spectra[i] = density
        values = self.values
        values["energy"][i] = energy
        values["peak_power"][i] = float(power.max())
        values["peak_intensity"][i] = float(power.max()) / self.intensity_area
        values["ionization"][i], values["electrons"][i] = self._ionization(power)
        values["bandwidth"][i] = spectral_width(grid.frequency, density, BANDWIDTH_LEVEL_DB)
        if energy > 0:
            far_w = grid.dnu * density[self._far_frequency].sum() / energy
            far_t = grid.dt * power[self._far_time].sum() / energy
            self.edge_frequency = max(self.edge_frequency, far_w)
            self.edge_time = max(self.edge_time, far_t)
        self.count += 1

    def _ionization(self, power: np.ndarray) -> tuple[float, float]:
        if self.plasma is None:
            return 0.0, 0.0
        self.plasma._ionization(power / self.intensity_area)
        return self.plasma.ionization_fraction, self.plasma.electron_line_density

    def edge_warnings(self) -> list[str]:
        """Warnings when the pulse reached the outer parts of the time or frequency window."""
        found = []
        if self.edge_time > EDGE_ENERGY_LIMIT:
            found.append(
                f"{self.edge_time:.2e} of the energy reached the outer {EDGE_ZONE:.0%} of the "
                "time window: the window is too short; increase grid.time_window_fs"
            )
        if self.edge_frequency > EDGE_ENERGY_LIMIT:
            found.append(
                f"{self.edge_frequency:.2e} of the energy reached the outer {EDGE_ZONE:.0%} of "
                "the frequency window (where the edge absorber removes it): the time step is too "
                "coarse; increase grid.points (at the same grid.time_window_fs)"
            )
        return found

    def arrays(self) -> dict:
        """The filled rows as result fields."""
        n = self.count
        v = {k: a[:n].copy() for k, a in self.values.items()}
        return {
            "z": self.z[:n].copy(),
            "spectrum_z": self.spectra[:n].copy(),
            "energy_z": v["energy"],
            "peak_power_z": v["peak_power"],
            "peak_intensity_z": v["peak_intensity"],
            "ionization_fraction_z": v["ionization"],
            "electron_line_density_z": v["electrons"],
            "bandwidth_z": v["bandwidth"],
        }
