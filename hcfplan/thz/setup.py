"""The THz set-up: generation crystal, detection and the settings of the estimate, as one object.

A :class:`ThzSetup` is built once, from a config's ``[thz]`` section or from the options of the
``thz`` command (:mod:`hcfplan.planning.reports.thz`), and passed as one argument to
:func:`hcfplan.thz.generation.thz_estimate` and
:func:`hcfplan.thz.measured.thz_from_measured_spectrum`. It holds SI values and checks them when
it is made.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from hcfplan.errors import ConfigError
from hcfplan.materials.crystals import CrystalTable
from hcfplan.thz.detection import EoDetector
from hcfplan.thz.measures import CUTOFF_LEVELS, CutoffLevelName
from hcfplan.thz.mixing import PHASE_MATCHING, PhaseMatchingName
from hcfplan.thz.sampling import DEFAULT_FREQUENCY_STEP
from hcfplan.thz.tilted import GEOMETRIES, GeometryName


def _positive_or_none(name: str, value: float | None, unit: str) -> None:
    if value is not None and not (math.isfinite(value) and value > 0):
        raise ConfigError(f"{name} = {value} {unit}: must be > 0")


@dataclass(frozen=True, eq=False)
class ThzSetup:
    """Everything the THz estimate needs besides the optical spectrum (all SI).

    Attributes
    ----------
    crystal : CrystalTable
        Generation crystal.
    thickness : float
        Generation crystal thickness L. [m]
    phase_matching : {"full", "group_velocity"}
        Sum over omega with the exact k(omega) or in the group-velocity approximation
        (:data:`hcfplan.thz.mixing.PHASE_MATCHING`).
    detector : EoDetector or None
        Electro-optic detector; gives the detected spectrum.
    cutoff_db : float
        Share of the THz energy above the cutoff, < 0 (-20 dB: 99 % lies below the cutoff;
        :func:`hcfplan.thz.measures.thz_cutoff`). [dB]
    cutoff_level : {"power", "field"}
        Spectrum whose integral the cutoff divides (:func:`hcfplan.thz.measures.thz_cutoff`).
    beam_radius : float or None
        Pump 1/e^2 intensity radius on the crystal; needed for the absolute energy and the
        fluence checks. [m]
    d_eff : float or None
        Effective nonlinear coefficient; ``None`` uses the crystal table. [m/V]
    damage_fluence : float or None
        Damage fluence for the pump check; ``None`` uses the crystal table. [J/m^2]
    band_floor_db : float
        Optical spectral power below this level (relative to the peak) is not mixed, < 0. [dB]
    max_frequency : float or None
        Highest THz frequency computed (at most half the grid window); default the optical
        bandwidth above the floor, beyond which the generated spectrum vanishes. [Hz]
    frequency_step : float
        Largest THz sample spacing (:mod:`hcfplan.thz.sampling`); the optical spectrum is
        interpolated onto it when its own grid is coarser. [Hz]
    geometry : {"collinear", "tilted_front"}
        Generation geometry; ``"tilted_front"`` is velocity matching by a pulse-front tilt
        (:mod:`hcfplan.thz.tilted`; group-velocity mixing sum, ``phase_matching`` unused).
    """

    crystal: CrystalTable
    thickness: float
    phase_matching: PhaseMatchingName = "full"
    detector: EoDetector | None = None
    cutoff_db: float = -20.0
    cutoff_level: CutoffLevelName = "power"
    beam_radius: float | None = None
    d_eff: float | None = None
    damage_fluence: float | None = None
    band_floor_db: float = -60.0
    max_frequency: float | None = None
    frequency_step: float = DEFAULT_FREQUENCY_STEP
    geometry: GeometryName = "collinear"

    def __post_init__(self) -> None:
        if self.geometry not in GEOMETRIES:
            raise ConfigError(f"geometry = {self.geometry!r}: valid: {', '.join(GEOMETRIES)}")
        if not (math.isfinite(self.thickness) and self.thickness > 0):
            raise ConfigError(f"crystal thickness = {self.thickness} m: must be > 0")
        if self.phase_matching not in PHASE_MATCHING:
            raise ConfigError(f"phase_matching = {self.phase_matching!r}: valid: "
                              f"{', '.join(PHASE_MATCHING)}")
        if self.cutoff_level not in CUTOFF_LEVELS:
            raise ConfigError(f"cutoff level = {self.cutoff_level!r}: valid: "
                              f"{', '.join(CUTOFF_LEVELS)}")
        for name, value in (("cutoff_db", self.cutoff_db),
                            ("band_floor_db", self.band_floor_db)):
            if not (math.isfinite(value) and value < 0):
                raise ConfigError(f"{name} = {value} dB: must be < 0")
        _positive_or_none("beam_radius", self.beam_radius, "m")
        _positive_or_none("d_eff", self.d_eff, "m/V")
        _positive_or_none("damage_fluence", self.damage_fluence, "J/m^2")
        _positive_or_none("max_frequency", self.max_frequency, "Hz")
        _positive_or_none("frequency_step", self.frequency_step, "Hz")
