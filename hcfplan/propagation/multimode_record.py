"""The recorder of the multimode solver: whole-beam records plus the energy per mode.

:class:`ModeRecorder` is the solver's :class:`~.result.Recorder` for the flat state of
:mod:`.multimode_terms` (N spectra after one another). The whole-beam quantities are those
the :class:`~.multimode.MultimodeResult` documents: the spectral density summed over the modes,
the power sum_m |A_m(t)|^2, the on-axis intensity |sum_m A_m(t) F_m(0)|^2, the ionisation on
axis and the electrons over the core. For one mode every record is computed as the single-mode
recorder computes it.
"""

from __future__ import annotations

import numpy as np
from scipy import fft as sfft

from hcfplan.numerics.grid import Grid
from hcfplan.propagation.result import Recorder
from hcfplan.pulse import bandlimited

#: Fine offsets per grid step at which the band-limited envelopes of the modes are evaluated
#: around the highest sample of the whole-beam power (N > 1); a parabola through the highest
#: three gives the peak. [1]
BEAM_PEAK_OVERSAMPLING = 8


class ModeRecorder(Recorder):
    """Records of the N-mode state (``record(z, u)`` with u flat, mode after mode)."""

    def __init__(self, grid: Grid, capacity: int, nonlinear, waveguide=None,
                 keep_mode_spectra: bool = False) -> None:
        plasma = nonlinear if nonlinear.species else None
        super().__init__(grid, capacity, nonlinear.intensity_area, plasma, waveguide)
        self.modes = nonlinear.modes
        self.axis = np.array(nonlinear.axis, dtype=float)  # F_m(0) [1/m]
        self.workers = nonlinear.workers
        self._mk = nonlinear.mk
        self.mode_energy = np.empty((capacity, self.modes))
        self.mode_spectra = (np.empty((capacity, self.modes, grid.points), np.float32)
                             if keep_mode_spectra else None)

    def record(self, z: float, u: np.ndarray) -> None:
        """Store the whole-beam records and the mode energies of the flat state ``u`` at ``z``.

        References
        ----------
        none: numerical helper
        """
        i, grid, kn = self.count, self.grid, self._kernels
        u2 = u.reshape(self.modes, grid.points)
        density = u2.real**2 + u2.imag**2
        self.mode_energy[i] = np.sum(density, axis=1) * grid.dnu
        if self.mode_spectra is not None:
            self.mode_spectra[i] = density
        # a field whose |.|^2 is the summed density (the mode itself for one mode)
        beam = u2[0] if self.modes == 1 else np.sqrt(np.sum(density, axis=0)).astype(complex)
        total, far_sum, band_sum, band_moment = kn.spectrum_sums(
            beam, self._rank, self._density_sorted, self.spectra[i], self._far_frequency,
            self._band, self._band_wavelength)
        energy = total * grid.dnu
        a = sfft.fft(u2, axis=-1, workers=self.workers)  # = points dt A_m(t)
        scale = 1.0 / (grid.points * grid.dt) ** 2
        peak, axis_peak, far_time = self._peaks(a, scale)
        self.z[i] = z
        values = self.values
        values["energy"][i] = energy
        values["peak_power"][i] = peak
        values["peak_intensity"][i] = axis_peak
        ionization = (0.0, 0.0) if self.plasma is None else self.plasma.ionization_of(a)
        values["ionization"][i], values["electrons"][i] = ionization
        values["bandwidth"][i] = kn.outermost_width(
            self._frequency_sorted, self._density_sorted, self._bandwidth_level)
        if energy > 0:
            self.edge_frequency.update(grid.dnu * far_sum / energy, z)
            self.edge_time.update(grid.dt * far_time / energy, z)
            self._check_resonance(z, band_sum, band_moment, energy)
        self.count += 1

    def _peaks(self, a: np.ndarray, scale: float) -> tuple[float, float, float]:
        """Whole-beam peak power [W], peak on-axis intensity [W/m^2] and the power summed over
        the outer time zones [W] of the fields ``a`` = points dt A_m(t)."""
        kn = self._kernels
        axis = self.axis[0] * a[0]  # sum_m F_m(0) a_m (no BLAS call: its threads wait on
        for m in range(1, self.modes):  # a loaded machine, measured 6 us -> 4 ms)
            axis += self.axis[m] * a[m]
        if self.modes == 1:
            peak, far = kn.power_sums(a[0], self._power_buffer, scale, self._far_time)
            if np.isfinite(peak):
                peak = max(peak, bandlimited.peak_power(a[0]) * scale)
        else:
            power = np.sum(a.real**2 + a.imag**2, axis=0) * scale
            peak, far = float(np.max(power)), float(np.sum(power[self._far_time]))
            if np.isfinite(peak):
                peak = max(peak, self._beam_peak(a, int(np.argmax(power))) * scale)
        axis_peak = bandlimited.peak_power(axis) * scale
        if not np.isfinite(peak):
            axis_peak = np.nan
        return peak, axis_peak, far

    def _beam_peak(self, a: np.ndarray, at: int) -> float:
        """Highest value of sum_m |A_m(t)|^2 (times the FFT scale squared) within one grid step
        of sample ``at``, from the band-limited interpolants of the modes (convention 2 of
        :mod:`hcfplan.numerics.grid`: a_k = sum_j c_j exp(-i dw_j k dt), c = ifft(a)) at
        :data:`BEAM_PEAK_OVERSAMPLING` offsets per step and a parabola through the highest
        three; the sampled peak when that lies at the ends."""
        grid = self.grid
        offsets = at + np.arange(-BEAM_PEAK_OVERSAMPLING, BEAM_PEAK_OVERSAMPLING + 1) \
            / BEAM_PEAK_OVERSAMPLING
        coefficients = sfft.ifft(a, axis=-1, workers=self.workers)
        power = np.empty(offsets.size)
        first = np.exp(-1j * grid.domega * grid.dt * offsets[0])
        step = np.exp(-1j * grid.domega * (grid.dt / BEAM_PEAK_OVERSAMPLING))
        self._mk.beam_power_at(coefficients, first, step, offsets.size, power)
        i = int(np.argmax(power))
        if not 0 < i < power.size - 1:
            return float(power[i])
        left, mid, right = power[i - 1], power[i], power[i + 1]
        curvature = 2.0 * mid - left - right
        return float(mid + (right - left) ** 2 / (8.0 * curvature)) if curvature > 0 \
            else float(mid)

    def mode_arrays(self) -> dict:
        """The per-mode records as result fields.

        References
        ----------
        none: numerical helper
        """
        n = self.count
        spectra = None if self.mode_spectra is None else self.mode_spectra[:n].copy()
        return {"mode_energy_z": self.mode_energy[:n].copy(), "mode_spectrum_z": spectra}
