"""The input pulse of a run on its grid: the analytic shape, a measured spectrum
(``laser.spectrum_csv``) or a measured pulse (``laser.field_csv``), at the launched energy and
after the entrance window."""

from __future__ import annotations


def input_field(config, grid, energy: float, given=None):
    """Input envelope A(t) on ``grid`` [sqrt(W)] of a validated config, scaled to ``energy``
    [J] (the launched energy) and passed through the entrance window
    (:func:`hcfplan.planning.hardware.with_entrance_window`). ``given``: a field handed over
    from an earlier stage (:class:`hcfplan.planning.stages.HandoverField`, with
    ``on_grid(grid, energy)``), which replaces the input of ``[laser]``."""
    from hcfplan.planning.hardware import with_entrance_window
    from hcfplan.pulse import fields as pulse

    laser = config.laser
    if given is not None:
        field = given.on_grid(grid, energy)
    elif laser.field is not None:  # laser.field_csv, read while the config was loaded
        measured = laser.field
        if measured.axis == "time":
            field = pulse.field_from_measured_time(grid, measured.x, measured.intensity,
                                                   measured.phase, energy, gdd=laser.gdd)
        else:
            field = pulse.field_from_measured_spectrum(grid, measured.x, measured.intensity,
                                                       energy, gdd=laser.gdd,
                                                       phase=measured.phase)
    elif laser.spectrum is not None:  # read while the config was loaded
        field = pulse.field_from_measured_spectrum(grid, laser.spectrum.wavelength,
                                                   laser.spectrum.values, energy, gdd=laser.gdd)
    else:
        field = pulse.pulse_field(grid, laser.shape, laser.duration_fwhm, energy, gdd=laser.gdd)
    return with_entrance_window(config, grid, field)
