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
        self._nonlinear = nonlinear  # its transforms are free between steps
        self._phases = None  # the offset phases of _beam_peak, made at first use
        self._buffers = None
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
        a, ionization = self._time_fields(u)  # a = points dt A_m(t)
        scale = 1.0 / (grid.points * grid.dt) ** 2
        peak, axis_peak, far_time = self._peaks(a, scale)
        self._store(z, energy, (peak, axis_peak), ionization,
                    (far_sum, far_time, band_sum, band_moment))

    def _time_fields(self, u: np.ndarray) -> tuple[np.ndarray, tuple[float, float]]:
        """The envelopes points dt A_m(t) of the flat state ``u`` (through the nonlinear terms'
        transforms) and the ionisation on axis and electron line density they leave. The
        steppers evaluate the nonlinear terms last on the state they accept (the first
        evaluation of the next step), which computes these very numbers: when the terms' input
        still holds ``u`` bit for bit, their stored values are taken instead of a second pass
        over the nodes."""
        plasma = self.plasma
        terms = plasma if plasma is not None else self._nonlinear
        known = self._evaluated_ionization(u)  # None without plasma terms
        if known is None:
            terms.input[...] = u
        a = terms.fft.forward()
        if plasma is None:
            return a, (0.0, 0.0)
        return a, known if known is not None else plasma.ionization_of(a)

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
        :mod:`hcfplan.numerics.grid`: a_k = sum_j c_j exp(-i dw_j k dt), c = ifft(a)) on the
        grid of :data:`BEAM_PEAK_OVERSAMPLING` offsets per step: the highest of the samples at
        -1, 0, +1 and the interpolant at +-1/2 step, then the spacing halved around the
        highest value down to one offset (2 evaluations each), and a parabola through the
        highest three; the sampled peak when that lies at the ends. Six evaluations instead of
        the whole offset grid (17), which gives the same peak where the power has one maximum
        within the step either side."""
        grid, r = self.grid, BEAM_PEAK_OVERSAMPLING
        # the envelopes rolled so that sample ``at`` is sample 0 (no phase factor of ``at``);
        # their unnormalised inverse transform is points * c, so all powers carry points^2
        fft, (rolled, coefficients) = self._nonlinear.fft, self._peak_buffers()
        rolled[:, :grid.points - at], rolled[:, grid.points - at:] = a[:, at:], a[:, :at]
        fft.backward(rolled, coefficients)
        norm = float(grid.points) ** 2
        table = self._offset_phases()
        known = {k: norm * float(np.sum(np.abs(a[:, (at + k // r) % grid.points]) ** 2))
                 for k in (-r, 0, r)}

        def value(k: int) -> float:
            if k not in known:
                known[k] = self._mk.beam_power_of(coefficients, table[k + r])
            return known[k]

        h = r // 2
        i = max((-r, -h, 0, h, r), key=value)  # the first of equal values, as argmax
        if abs(i) == r:
            return known[i] / norm
        while h > 1:
            h //= 2
            i = max((i - h, i, i + h), key=value)
        left, mid, right = known[i - 1], known[i], known[i + 1]
        curvature = 2.0 * mid - left - right
        peak = mid + (right - left) ** 2 / (8.0 * curvature) if curvature > 0 else mid
        return float(peak) / norm

    def _peak_buffers(self) -> tuple[np.ndarray, np.ndarray]:
        """Two (modes, points) arrays of the terms' transforms (made at first use)."""
        if self._buffers is None:
            self._buffers = self._nonlinear.fft.empty(), self._nonlinear.fft.empty()
        return self._buffers

    def _offset_phases(self) -> np.ndarray:
        """exp(-i dw_j k dt / R) for k = -R..R (R = :data:`BEAM_PEAK_OVERSAMPLING`), rows."""
        if self._phases is None:
            r = BEAM_PEAK_OVERSAMPLING
            k = np.arange(-r, r + 1)[:, None]
            self._phases = np.exp(-1j * self.grid.domega[None, :] * (self.grid.dt / r) * k)
        return self._phases

    def mode_arrays(self) -> dict:
        """The per-mode records as result fields.

        References
        ----------
        none: numerical helper
        """
        n = self.count
        spectra = None if self.mode_spectra is None else self.mode_spectra[:n].copy()
        return {"mode_energy_z": self.mode_energy[:n].copy(), "mode_spectrum_z": spectra}
