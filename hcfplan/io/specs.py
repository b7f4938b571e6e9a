"""The frozen specs a validated config is made of: SI values only, built by
:mod:`hcfplan.io.config` while loading.

Files a config names (a measured input spectrum, a measured mirror GDD curve, measured fiber
loss and GVD) are read while
loading and travel here as arrays (:class:`MeasuredCurve`), so a run needs no file access.
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace
from pathlib import Path
from typing import Any

import numpy as np


@dataclass(frozen=True, eq=False)
class MeasuredCurve:
    """A curve versus wavelength read from a CSV file while the config was loaded.

    Compared by identity (it holds arrays). The arrays are read-only.
    """

    source: Path  #: the file it was read from (for messages and reports only)
    wavelength: np.ndarray  #: strictly increasing vacuum wavelengths [m]
    values: np.ndarray  #: the value column in SI (intensity: arbitrary units, >= 0)

    def __post_init__(self) -> None:
        for name in ("wavelength", "values"):
            array = np.array(getattr(self, name), dtype=float)  # a private copy
            array.setflags(write=False)
            object.__setattr__(self, name, array)


@dataclass(frozen=True, eq=False)
class MeasuredField:
    """A measured pulse read from ``laser.field_csv`` while the config was loaded.

    ``axis`` is ``"wavelength"`` (``x`` wavelengths [m], ``intensity`` per unit wavelength,
    ``phase`` the spectral phase [rad]) or ``"time"`` (``x`` times [s], ``intensity`` the
    temporal intensity, ``phase`` the temporal phase of the envelope [rad]). Compared by
    identity; the arrays are read-only.
    """

    source: Path  #: the file it was read from (for messages and reports only)
    axis: str
    x: np.ndarray
    intensity: np.ndarray
    phase: np.ndarray

    def __post_init__(self) -> None:
        for name in ("x", "intensity", "phase"):
            array = np.array(getattr(self, name), dtype=float)  # a private copy
            array.setflags(write=False)
            object.__setattr__(self, name, array)


@dataclass(frozen=True)
class LaserSpec:
    wavelength: float  #: [m]
    duration_fwhm: float  #: intensity FWHM [s]
    shape: str
    energy: float  #: [J]
    repetition_rate: float | None  #: [Hz]
    gdd: float  #: [s^2]
    spectrum: MeasuredCurve | None  #: measured input spectrum (values: intensity per wavelength)
    beam_waist: float | None  #: [m]
    polarization: str = "linear"  #: "linear" or "circular"
    field: MeasuredField | None = None  #: measured pulse (``laser.field_csv``)


@dataclass(frozen=True)
class FiberSpec:
    kind: str
    length: float  #: [m]
    core_radius: float | None  #: [m]
    cladding: str
    wall_thickness: float | None  #: [m]
    bend_radius: float | None  #: [m]
    mode_order: int  #: m of EH1m
    betas: tuple[float, ...]  #: (beta2, beta3, ...) [s^n/m]
    gamma: float | None  #: [1/(W m)]
    loss: float  #: field attenuation of a taylor fiber (0 when not given) [1/m]
    self_steepening: bool
    raman_fraction: float
    raman_tau1: float  #: [s]
    raman_tau2: float  #: [s]
    effective_area: float | None  #: [m^2]
    #: flat measured field attenuation replacing the model's (``fiber.loss_db_per_m``) [1/m]
    flat_loss: float | None = None
    #: measured loss (``fiber.loss_csv``), values as field attenuation [1/m]
    loss_curve: MeasuredCurve | None = None
    #: measured GVD (``fiber.gvd_csv``), values beta2 [s^2/m]
    gvd_curve: MeasuredCurve | None = None
    #: capillary modes EH11...EH1N propagated together (``fiber.modes``; 1: single mode)
    modes: int = 1


@dataclass(frozen=True)
class GasSpec:
    """The fill: a static pressure, or a gradient between the entrance and exit pressures.

    For a gradient ``pressure`` is the mean of the viscous-flow profile over the fiber
    (:func:`hcfplan.propagation.profile.mean_pressure`), the equivalent static fill of the
    first-look estimates; the solver follows the profile itself.
    """

    components: tuple[tuple[str, float], ...]  #: (table name, mole fraction)
    pressure: float  #: static fill, or the mean of the gradient's profile [Pa]
    temperature: float  #: [K]
    equation_of_state: str
    ionization_model: str
    table_dirs: tuple[Path, ...]
    entrance_pressure: float | None = None  #: gradient only: at the fiber entrance [Pa]
    exit_pressure: float | None = None  #: gradient only: at the fiber exit [Pa]
    density_scale: float = 1.0  #: calibration factor on the number density [1]
    n2_scale: float = 1.0  #: calibration factor on the electronic n2 [1]

    @property
    def is_gradient(self) -> bool:
        return self.entrance_pressure is not None

    @property
    def highest_pressure(self) -> float:
        """Highest pressure anywhere in the cell (the rating and window loads). [Pa]"""
        if not self.is_gradient:
            return self.pressure
        return max(self.entrance_pressure, self.exit_pressure)

    @property
    def entrance_side_pressure(self) -> float:
        """Pressure at the fiber entrance and in the gas path before it. [Pa]"""
        return self.entrance_pressure if self.is_gradient else self.pressure

    def with_exit_pressure(self, exit_pressure: float) -> GasSpec:
        """The same gradient with another exit pressure (the mean follows). [Pa]"""
        from hcfplan.propagation.profile import mean_pressure

        mean = mean_pressure(self.entrance_pressure, exit_pressure)
        return replace(self, exit_pressure=exit_pressure, pressure=mean)

    def with_pressure(self, pressure: float) -> GasSpec:
        """The fill at another pressure: a static fill's pressure, or a gradient's exit
        pressure (entrance fixed). [Pa]"""
        if self.is_gradient:
            return self.with_exit_pressure(pressure)
        return replace(self, pressure=pressure)


@dataclass(frozen=True)
class CellSpec:
    rated_pressure: float | None  #: [Pa]
    window_material: str
    window_thickness: float | None  #: [m]
    window_clear_aperture: float | None  #: [m]
    entrance_window_material: str = "fused_silica"
    entrance_window_thickness: float | None = None  #: [m]
    window_coating: str = "uncoated"  #: "uncoated" (Fresnel) or "ar" (loss taken as zero)


@dataclass(frozen=True)
class CompressorSpec:
    air_path: float  #: [m]
    mirror_gdd: float | None  #: per bounce [s^2]
    mirror_tod: float  #: per bounce [s^3]
    mirror_gdd_curve: MeasuredCurve | None  #: measured GDD per bounce (values in s^2)
    mirror_band: tuple[float, float] | None  #: wavelengths [m]
    max_bounces: int
    bounces_in_pairs: bool
    objective: str
    wedge_material: str | None
    wedge_max_insertion: float  #: [m]
    mirror_reflectivity: float = 0.99  #: power reflectivity per bounce [1]


@dataclass(frozen=True)
class ThzSpec:
    crystal: str
    thickness: float  #: [m]
    cutoff_db: float
    cutoff_quantity: str
    detector_crystal: str | None
    detector_thickness: float | None  #: [m]
    probe_fwhm: float | None  #: [s]
    beam_waist: float | None  #: [m]
    d_eff: float | None  #: [m/V]
    damage_fluence: float | None  #: [J/m^2]
    geometry: str = "collinear"
    focus_f_number: float = 2.0
    table_dirs: tuple[Path, ...] = ()  #: user crystal folders, searched first


@dataclass(frozen=True)
class LimitsSpec:
    self_focusing_margin: float
    ionization_fraction_limit: float
    window_safety_factor: float
    window_mounting: str
    window_distance: float | None  #: [m]
    entrance_gas_path: float | None  #: [m]
    b_integral_limit: float  #: [rad]
    cladding_damage_fluence: float | None  #: [J/m^2]
    room_volume: float | None  #: [m^3]
    cylinder_volume: float | None  #: [m^3]
    cylinder_pressure: float | None  #: [Pa]
    rating_fraction: float = 0.9  #: highest share of the rated pressure searched [1]


@dataclass(frozen=True)
class SpreadDefaults:
    energy_percent: float
    pressure_percent: float
    fwhm_percent: float


@dataclass(frozen=True)
class GridSpec:
    points: int | None
    time_window: float | None  #: [s]
    z_samples: int
    rtol: float
    stop_ionization_fraction: float
    center_wavelength: float | None = None  #: window centre as a vacuum wavelength [m]


@dataclass(frozen=True)
class PlanConfig:
    """A validated config: SI specs plus the resolved user-unit table (for ``check``)."""

    laser: LaserSpec
    fiber: FiberSpec
    gas: GasSpec | None
    cell: CellSpec
    compressor: CompressorSpec
    thz: ThzSpec
    limits: LimitsSpec
    spread: SpreadDefaults
    grid: GridSpec
    resolved: dict[str, dict[str, Any]]
    present_sections: tuple[str, ...]
    source: Path | None = None
    overrides: tuple[str, ...] = field(default=())
    #: cascaded stages (``[[stage]]``): one single-stage config per stage, in order; empty for
    #: a single-stage config. A staged config's own specs are those of stage 0 and its
    #: ``resolved`` holds the shared sections and ``stage`` (a list of the stage sections).
    stages: tuple[PlanConfig, ...] = field(default=())
