"""The result of a propagation run and the recorder that fills it along z."""

from __future__ import annotations

from dataclasses import dataclass
from typing import Literal

import numpy as np

from hcfplan.constants import c
from hcfplan.numerics.fft import shared_transforms
from hcfplan.numerics.grid import Grid
from hcfplan.propagation.kernel_sets import solver_kernels
from hcfplan.pulse import bandlimited
from hcfplan.units import db_to_power_ratio

Status = Literal["completed", "nonfinite", "step_collapse", "step_budget", "ionization_stop"]

#: Outer part of the time or frequency window (each side) checked for energy at the edges.
EDGE_ZONE = 0.05
#: Energy fraction in the edge zones above which the result carries a warning.
EDGE_ENERGY_LIMIT = 1e-5
#: Level of the tracked spectral bandwidth below the peak. [dB]
BANDWIDTH_LEVEL_DB = -20.0
#: Full relative width of a wall-resonance band of an anti-resonant fiber (|lambda/lambda_m - 1|
#: < width/2; the default of ``AntiresonantFiber.in_resonance_band``). [1]
RESONANCE_BAND_WIDTH = 0.05
#: Energy fraction inside the resonance bands above which the result carries a warning. [1]
RESONANCE_ENERGY_LIMIT = 1e-3
#: Resonance orders searched when the waveguide gives no wall thickness.
_RESONANCE_ORDERS = 20


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
        waveguide has no ``peak_intensity_area``); the peaks are those of the band-limited
        envelope, between the samples (:func:`hcfplan.pulse.bandlimited.peak_power`).
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
    edge_time_fraction, edge_frequency_fraction : float
        Largest fraction of the energy, over the records along z, in the outer ``EDGE_ZONE`` of
        the time window and of the frequency window (both sides together). [1]
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
    edge_time_fraction: float = 0.0
    edge_frequency_fraction: float = 0.0


class _Threshold:
    """Largest value seen of an energy fraction and the first z where it passed its limit."""

    def __init__(self, limit: float) -> None:
        self.limit, self.largest, self.first_z = limit, 0.0, None
        self.where = np.nan  # extra information at the first crossing (e.g. a wavelength)

    def update(self, value: float, z: float, where: float = np.nan) -> None:
        self.largest = max(self.largest, value)
        if self.first_z is None and value > self.limit:
            self.first_z, self.where = z, where

    @property
    def crossed(self) -> bool:
        return self.first_z is not None


class Recorder:
    """Collects the records at the sample positions (preallocated for ``capacity`` rows)."""

    _SCALARS = ("energy", "peak_power", "peak_intensity", "ionization", "electrons", "bandwidth")

    def __init__(self, grid: Grid, capacity: int, intensity_area: float, plasma,
                 waveguide=None, fft_backend: str | None = None, transforms=None) -> None:
        self.grid = grid
        # the transform of the envelope at each record: ``transforms`` (a back end of
        # transforms.py whose input and time buffers are free between calls; the solver passes
        # its own, which are free between steps: no second set of buffers to bring into the
        # cache), else one kept per thread for ``fft_backend``
        self.fft_backend = fft_backend
        self._transforms = transforms
        self._bandwidth_level = db_to_power_ratio(BANDWIDTH_LEVEL_DB)  # as spectral_width
        self.intensity_area = intensity_area
        self.plasma = plasma  # NonlinearTerms with ionising species, or None
        self.z = np.empty(capacity)
        self.spectra = np.empty((capacity, grid.points), np.float32)
        self.values = {name: np.empty(capacity) for name in self._SCALARS}
        self.count = 0
        self.edge_time = _Threshold(EDGE_ENERGY_LIMIT)
        self.edge_frequency = _Threshold(EDGE_ENERGY_LIMIT)
        self.resonance = _Threshold(RESONANCE_ENERGY_LIMIT)
        far = np.abs(grid.domega) > (1 - 2 * EDGE_ZONE) * np.pi / grid.dt
        self._far_frequency = far
        ascending = np.argsort(grid.frequency, kind="stable")  # sorted once, not per record
        self._frequency_sorted = grid.frequency[ascending]
        self._rank = np.empty(grid.points, dtype=np.int64)  # FFT bin -> ascending position
        self._rank[ascending] = np.arange(grid.points)
        self._density_sorted = np.empty(grid.points)
        self._power_buffer = np.empty(grid.points)
        k = np.arange(grid.points)
        self._far_time = (k < EDGE_ZONE * grid.points) | (k >= (1 - EDGE_ZONE) * grid.points)
        self._in_band, self._resonances = _resonance_bands(grid, waveguide)
        self._band = np.zeros(grid.points, bool) if self._in_band is None else self._in_band
        self._band_wavelength = np.where(self._band, grid.wavelength, 0.0)
        self._kernels = solver_kernels(grid.points)  # the solver's set for this grid

    def record(self, z: float, u: np.ndarray) -> None:
        """Store the spectrum and the tracked quantities of spectrum ``u`` at ``z``.

        Two fused passes (:func:`~.kernels.spectrum_sums`, :func:`~.kernels.power_sums`, or
        their numpy twins) give the spectral density, the power and their sums; the numpy
        expressions the compiled ones replace took 0.25 ms per record at 2048 points (20 % of
        the demo config's run).

        References
        ----------
        none: numerical helper
        """
        i, grid = self.count, self.grid
        known = self._evaluated_ionization(u)  # before _power writes u into the terms' input
        total, far_sum, band_sum, band_moment = self._kernels.spectrum_sums(
            u, self._rank, self._density_sorted, self.spectra[i], self._far_frequency,
            self._band, self._band_wavelength)
        energy = total * grid.dnu
        power, peak, far_time = self._power(u)
        self._store(z, energy, (peak, peak / self.intensity_area),
                    self._ionization(power) if known is None else known,
                    (far_sum, far_time, band_sum, band_moment))

    def _store(self, z: float, energy: float, peaks: tuple[float, float],
               ionization: tuple[float, float], sums: tuple[float, float, float, float]) -> None:
        """Store record ``count`` at ``z``: the energy [J], ``peaks`` (peak power [W], peak
        intensity [W/m^2]), ``ionization`` (fraction, electron line density [1/m]) and ``sums``
        (spectral density and power in the outer zones, density and wavelength moment in the
        resonance bands, from the fused passes), the bandwidth of the sorted density, and the
        edge and resonance checks; then count it."""
        i, grid, values = self.count, self.grid, self.values
        far_sum, far_time, band_sum, band_moment = sums
        self.z[i] = z
        values["energy"][i] = energy
        values["peak_power"][i], values["peak_intensity"][i] = peaks
        values["ionization"][i], values["electrons"][i] = ionization
        # metrics.spectral_width, compiled (kernels.outermost_width)
        values["bandwidth"][i] = self._kernels.outermost_width(
            self._frequency_sorted, self._density_sorted, self._bandwidth_level)
        if energy > 0:
            self.edge_frequency.update(grid.dnu * far_sum / energy, z)
            self.edge_time.update(grid.dt * far_time / energy, z)
            self._check_resonance(z, band_sum, band_moment, energy)
        self.count += 1

    def _power(self, u: np.ndarray) -> tuple[np.ndarray, float, float]:
        """|A(t)|^2 of the spectrum ``u`` (``grid.to_time``, on a kept FFT back end) [W], its
        maximum between the samples (band-limited, :func:`hcfplan.pulse.bandlimited.peak_power`;
        about 0.1 ms per record at 8192 points) [W] and its sum over the outer time zones [W]."""
        fft = self._transforms
        if fft is None:
            fft = shared_transforms(self.grid.points, self.fft_backend)
        fft.spectrum_in[...] = u
        field = fft.forward()  # = points dt A(t)
        scale = 1.0 / (self.grid.points * self.grid.dt) ** 2
        peak, far = self._kernels.power_sums(field, self._power_buffer, scale, self._far_time)
        if np.isfinite(peak):
            peak = max(peak, bandlimited.peak_power(field) * scale)
        return self._power_buffer, peak, far

    def _check_resonance(self, z: float, inside: float, moment: float, energy: float) -> None:
        """``inside``: sum of the density in the resonance bands; ``moment``: of the
        wavelength times the density there."""
        if self._in_band is None:
            return
        fraction = inside * self.grid.dnu / energy
        centre = moment / inside if fraction > 0 else np.nan
        self.resonance.update(fraction, z, centre)

    def _evaluated_ionization(self, u: np.ndarray) -> tuple[float, float] | None:
        """The ionisation fraction and electron line density of ``u`` when the plasma terms
        evaluated ``u`` last (their input holds it bit for bit; the steppers evaluate the
        accepted state last: ERK4(3)-IP's FSAL k5, RK4IP's next k1), else None. Saves a pass
        of the plasma kernel per record (the multimode recorder does the same)."""
        plasma = self.plasma
        terms_input = getattr(plasma, "input", None)
        if terms_input is None or not np.array_equal(terms_input, u):
            return None
        return plasma.ionization_fraction, plasma.electron_line_density

    def _ionization(self, power: np.ndarray) -> tuple[float, float]:
        if self.plasma is None:
            return 0.0, 0.0
        return self.plasma.ionization_of(power)

    def edge_warnings(self) -> list[str]:
        """Warnings: pulse at the window edges, spectrum in a fiber resonance band.

        References
        ----------
        none: numerical helper
        """
        from hcfplan.numerics.grid import LOWER_EDGE_FRACTION

        found = []
        if self.edge_time.crossed:
            found.append(
                f"{self.edge_time.largest:.2e} of the energy reached the outer {EDGE_ZONE:.0%} "
                f"of the time window (first at z = {self.edge_time.first_z:.4g} m): the window "
                "is too short; increase grid.time_window_fs (and grid.points to keep the step)"
            )
        if self.edge_frequency.crossed:
            grid = self.grid
            at_floor = grid.omega_low <= 1.01 * LOWER_EDGE_FRACTION * grid.omega_pump
            remedy = (
                f"the window already reaches down to {grid.omega_low / grid.omega_pump:.0%} of "
                "the pump frequency, so it cannot grow to the red: lower the energy or "
                "pressure, or shorten the fiber"
                if at_floor else
                "the time step is too coarse; increase grid.points (at the same "
                "grid.time_window_fs)"
            )
            found.append(
                f"{self.edge_frequency.largest:.2e} of the energy reached the outer "
                f"{EDGE_ZONE:.0%} of the frequency window (first at z = "
                f"{self.edge_frequency.first_z:.4g} m; the edge absorber removes it): {remedy}"
            )
        if self.resonance.crossed:
            found.append(self._resonance_warning())
        return found

    def _resonance_warning(self) -> str:
        r = self.resonance
        pump = 2 * np.pi * c / self.grid.omega_pump
        lam, order = self._resonance_named(r.where)
        if lam is None:
            # the band's own wavelength is not known (non-finite: outside the material tables)
            side = pump if not np.isfinite(r.where) else float(r.where)
            band = (f"a wall-resonance band{order} (its resonance wavelength lies outside the "
                    "material tables' range)")
        else:
            side = lam
            band = (f"the wall-resonance band of order m = {order} around {lam * 1e9:.0f} nm "
                    f"(+-{RESONANCE_BAND_WIDTH / 2:.1%})")
        direction = ("a thinner wall moves it to shorter wavelengths, away from the spectrum"
                     if side < pump else
                     "a thicker wall moves it to longer wavelengths, away from the spectrum")
        return (
            f"{r.largest:.2e} of the energy lies in {band}, first "
            f"above {RESONANCE_ENERGY_LIMIT:g} at z = {r.first_z:.4g} m: the fiber model is "
            "not valid there (high loss and strong dispersion near the resonance); remedy: "
            f"change the wall thickness ({direction}) or lower the broadening (energy, "
            "pressure or fiber length)"
        )

    def _resonance_named(self, where: float) -> tuple[float | None, str | int]:
        """(wavelength [m], order) of the resonance band nearest ``where`` [m]; ``(None,
        text)`` when that band's wavelength is not finite (never a nan in a message)."""
        res = self._resonances
        finite = np.flatnonzero(np.isfinite(res))
        unknown = np.flatnonzero(~np.isfinite(res))
        if finite.size == 0:
            return None, ""
        if not np.isfinite(where):
            k = int(finite[0])
            return float(res[k]), k + 1
        k = int(finite[np.argmin(np.abs(res[finite] - where))])
        near = abs(where - res[k]) <= RESONANCE_BAND_WIDTH * res[k]
        if near or unknown.size == 0:
            return float(res[k]), k + 1
        # energy away from every known band: it sits in an order whose wavelength is unknown
        beyond = [int(m) + 1 for m in unknown if (res[k] > where) == (int(m) > k)]
        if not beyond:
            return float(res[k]), k + 1
        return None, f" of order m >= {min(beyond)}" if res[k] > where else \
            f" of order m <= {max(beyond)}"

    def edge_fractions(self) -> dict:
        """Largest energy fractions seen in the time- and frequency-window edge zones.

        References
        ----------
        none: numerical helper
        """
        return {"edge_time_fraction": float(self.edge_time.largest),
                "edge_frequency_fraction": float(self.edge_frequency.largest)}

    def arrays(self) -> dict:
        """The filled rows as result fields.

        References
        ----------
        none: numerical helper
        """
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


def _resonance_bands(grid: Grid, waveguide) -> tuple[np.ndarray | None, np.ndarray]:
    """Mask of the grid inside the wall-resonance bands and the resonance wavelengths."""
    if waveguide is None or not hasattr(waveguide, "in_resonance_band"):
        return None, np.empty(0)
    mask = np.asarray(waveguide.in_resonance_band(grid.omega, RESONANCE_BAND_WIDTH), dtype=bool)
    wall = getattr(waveguide, "wall_thickness", None)
    orders = _RESONANCE_ORDERS
    if wall is not None:
        orders = int(np.ceil(4.0 * wall / float(np.min(grid.wavelength)))) + 1
    return mask, np.asarray(waveguide.resonance_wavelengths(max(orders, 1)), dtype=float)
