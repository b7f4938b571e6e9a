"""The compressed pulse of a run as a measured-field CSV (``compressed_field.csv``).

The file has the layout ``laser.field_csv`` reads (:func:`hcfplan.io.csvdata.read_field_csv`),
columns ``time_fs, intensity, phase_rad``: the intensity is the power |A|^2 in W, the phase
that of the envelope about the pump carrier (``laser.wavelength_nm``), so that under the
exp(-i omega t) convention of :mod:`hcfplan.numerics.grid` the instantaneous angular frequency
is omega_pump - d(phase)/dt. Fed back as ``laser.field_csv`` (with ``laser.wavelength_nm``
unchanged and ``laser.energy_uj`` set to the compressed energy) it reproduces the pulse.
"""

from __future__ import annotations

import io

import numpy as np

#: Samples whose power is below this share of the peak are left out at both ends of the file.
EXPORT_FLOOR = 1e-10


def envelope_about_pump(grid, field_t: np.ndarray) -> tuple[np.ndarray, np.ndarray,
                                                               np.ndarray]:
    """Time [s], power [W] and unwrapped phase about the pump carrier [rad] of a field,
    trimmed to where the power exceeds :data:`EXPORT_FLOOR` of its peak; the phase is zero at
    the peak."""
    envelope = np.asarray(field_t) * np.conj(grid.carrier())
    power = np.abs(envelope) ** 2
    above = np.flatnonzero(power > EXPORT_FLOOR * power.max())
    lo, hi = max(above[0] - 1, 0), min(above[-1] + 2, power.size)
    phase = np.unwrap(np.angle(envelope[lo:hi]))
    peak = int(np.argmax(power[lo:hi]))
    return grid.time[lo:hi], power[lo:hi], phase - phase[peak]


def compressed_field_csv(chain) -> str | None:
    """Text of ``compressed_field.csv`` for a :class:`~hcfplan.planning.chain.ChainResult`
    (None when the run has no compressed pulse)."""
    if chain.compression is None:
        return None
    time, power, phase = envelope_about_pump(chain.grid, chain.compression.field_t)
    wavelength_nm = chain.config.laser.wavelength * 1e9
    energy_uj = chain.compression.metrics.energy * 1e6
    out = io.StringIO()
    out.write(f"# compressed pulse of an hcfplan run: envelope about the pump carrier "
              f"{wavelength_nm:.6g} nm, energy {energy_uj:.6g} uJ\n"
              "# intensity: power |A|^2 in W; phase_rad: temporal phase (instantaneous "
              "angular frequency omega_pump - dphase/dt)\n"
              "# use as laser.field_csv with laser.wavelength_nm and laser.energy_uj as "
              "above\ntime_fs,intensity,phase_rad\n")
    for t, p, ph in zip(time * 1e15, power, phase, strict=True):
        out.write(f"{t:.6f},{p:.9e},{ph:.9f}\n")
    return out.getvalue()
