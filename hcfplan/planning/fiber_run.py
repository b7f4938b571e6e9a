"""The fiber part of a chain run, shared by :mod:`hcfplan.planning.chain` and the model
evaluations of :mod:`hcfplan.planning.calibrate`: the physics objects of a config (gas, fiber,
coupling) and the GNLSE run of a launched field on a given grid.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from hcfplan.planning.build import (
    build_fill_segments,
    build_medium,
    build_waveguide,
    check_transmission,
    coupling,
    pump_omega,
    rate_model,
)


@dataclass(frozen=True)
class FiberSetup:
    """What a fiber run of a config needs besides its grid and field."""

    omega0: float  #: pump angular frequency [rad/s]
    medium: Any  #: the fill (GasMedium), None for a Taylor fiber
    waveguide: Any  #: the fiber model
    efficiency: float  #: coupling efficiency into the mode [1]
    energy: float  #: launched energy, laser.energy x efficiency [J]


def fiber_setup(config) -> FiberSetup:
    """The gas, fiber and coupling of a validated config; a fiber that transmits too little is
    refused (:func:`hcfplan.planning.build.check_transmission`).

    References
    ----------
    none: composition; the models cite their sources in :mod:`hcfplan.planning.build`.
    """
    laser = config.laser
    omega0 = pump_omega(laser)
    medium = build_medium(config.gas, laser.polarization) if config.gas is not None else None
    waveguide = build_waveguide(config.fiber, medium, omega0)
    check_transmission(config, waveguide, omega0)
    efficiency, _, _ = coupling(config)
    return FiberSetup(omega0, medium, waveguide, efficiency, laser.energy * efficiency)


def run_fiber(config, setup: FiberSetup, grid, field0, *, rtol: float, z_samples: int,
              workers: int = 1, progress=None):
    """The GNLSE run of ``field0`` through the fiber of ``setup`` on ``grid``, with the
    config's ionisation model, stop level and fill profile. With ``fiber.modes`` > 1 the
    multimode run of :func:`hcfplan.planning.mode_run.run_modes` (``field0`` is then the
    EH11 part of the launch).

    References
    ----------
    none: composition; the solver cites its sources in :mod:`hcfplan.propagation.solve`.
    """
    from hcfplan.propagation.options import SolverOptions
    from hcfplan.propagation.solve import propagate

    options = SolverOptions(rtol=rtol, z_samples=z_samples,
                            ionization_model=rate_model(config) if config.gas else None,
                            stop_ionization_fraction=config.grid.stop_ionization_fraction,
                            workers=workers)
    if getattr(config.fiber, "modes", 1) > 1:
        from hcfplan.planning.mode_run import run_modes

        return run_modes(config, setup, grid, field0, options, progress)
    return propagate(field0, grid, setup.waveguide, gas=setup.medium, options=options,
                     progress=progress, segments=build_fill_segments(config, setup.omega0))
