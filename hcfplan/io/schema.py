"""The configuration key set: every section, key, type, default, allowed range and meaning.

This table is the contract between the TOML files, ``--set``, the README's config reference
and :mod:`hcfplan.io.config` (which converts to SI once, while loading). Keys carry their unit
as a lowercase suffix (see :mod:`hcfplan.units`). Ranges are in the key's own unit.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any


class _Required:
    def __repr__(self) -> str:
        return "REQUIRED"


REQUIRED: Any = _Required()


@dataclass(frozen=True)
class Key:
    """One config key.

    ``kind`` is one of ``float``, ``int``, ``bool``, ``str``, ``choice``, ``float_list``,
    ``band`` (two increasing floats), ``fractions`` (table of name -> fraction), ``path``.
    ``low``/``high`` bound the value (in the key's unit); ``low_open`` makes the low bound strict,
    ``high_open`` the high bound. Bounds that keep values away from zero exclude inputs no model
    here can use (a zero-size beam or crystal, an energy of 1e-300 uJ); they are common
    practice, no source.

    ``fiber_kinds`` names the ``fiber.kind`` values the key applies to (empty: every kind). A
    key given for a kind it does not apply to is refused naming the kind, since the model of
    that kind would ignore it (:func:`hcfplan.io.checks.check_applicability`).
    """

    kind: str
    default: Any
    doc: str
    low: float | None = None
    high: float | None = None
    low_open: bool = True
    high_open: bool = False
    choices: tuple[str, ...] = ()
    fiber_kinds: tuple[str, ...] = ()

    def applies_to(self, fiber_kind: str | None) -> bool:
        """Whether the key is read for ``fiber.kind = fiber_kind`` (every key for None)."""
        return not self.fiber_kinds or fiber_kind is None or fiber_kind in self.fiber_kinds


F = "float"
#: ``Key.fiber_kinds`` of keys that only some fiber models read (what each model reads:
#: ``hcfplan.planning.build.build_waveguide``).
_CAP = ("capillary",)
_ARF = ("antiresonant",)
_HOLLOW = ("capillary", "antiresonant")
_TAYLOR = ("taylor",)

SCHEMA: dict[str, dict[str, Key]] = {
    "laser": {
        "wavelength_nm": Key(F, REQUIRED, "Pump centre wavelength (vacuum).", 150.0, 20000.0),
        "fwhm_fs": Key(F, REQUIRED, "Intensity FWHM of the input pulse.", 1.0, 1.0e5),
        "shape": Key("choice", "sech2", "Temporal shape of the input pulse.",
                     choices=("sech2", "gaussian")),
        "energy_uj": Key(F, REQUIRED, "Pulse energy before the fiber (before coupling).",
                         1.0e-6, 1.0e6, low_open=False),
        "repetition_khz": Key(F, None, "Repetition rate (for average power; optional).",
                              0.0, 1.0e6),
        "gdd_fs2": Key(F, 0.0, "Input chirp as spectral GDD.", -1.0e7, 1.0e7, low_open=False),
        "spectrum_csv": Key("path", None,
                            "Measured input spectrum, CSV columns wavelength_nm, intensity; "
                            "replaces the analytic shape (flat phase plus gdd_fs2)."),
        "field_csv": Key("path", None,
                         "Measured pulse (intensity and phase), CSV columns wavelength_nm, "
                         "intensity, phase_rad (spectral phase) or time_fs, intensity, "
                         "phase_rad (temporal phase), told apart by the header; replaces the "
                         "analytic shape (gdd_fs2 is added); energy_uj sets its energy; "
                         "fwhm_fs must match its FWHM within 20 % (it sizes the grid). A run "
                         "writes compressed_field.csv in this format."),
        "beam_waist_um": Key(F, None,
                             "1/e^2 intensity radius of the focused beam at the fiber entrance; "
                             "default: the coupling optimum 0.64 a.", 1.0, 1.0e5, low_open=False),
        "polarization": Key("choice", "linear", "Polarisation of the pump: circular lowers the "
                            "Kerr coefficient (electronic 2/3, rotational 1/4) and uses the "
                            "circular-polarisation ionisation rate.",
                            choices=("linear", "circular")),
    },
    "fiber": {
        "kind": Key("choice", REQUIRED, "Fiber model.",
                    choices=("capillary", "antiresonant", "taylor")),
        "core_diameter_um": Key(F, None, "Core (bore) diameter; required for capillary and "
                                "antiresonant.", 1.0, 1.0e4, fiber_kinds=_HOLLOW),
        "length_m": Key(F, REQUIRED, "Fiber length.", 0.0, 100.0),
        "cladding": Key("str", "fused_silica", "Cladding / wall glass (a solid material name)."),
        "wall_thickness_um": Key(F, None, "Tube wall thickness (antiresonant).", 0.0, 100.0,
                                 fiber_kinds=_ARF),
        "bend_radius_m": Key(F, None, "Bend radius (capillary bend loss; optional).", 1.0e-3,
                             1.0e6, low_open=False, fiber_kinds=_CAP),
        "mode": Key("str", "EH11", "Capillary mode EH1m (EH11 is the fundamental).",
                    fiber_kinds=_CAP),
        "modes": Key("int", 1, "Capillary: number N of radially symmetric modes EH11...EH1N "
                     "propagated together (multimode GNLSE); the Gaussian launch is projected "
                     "on them. 1: the single-mode run of fiber.mode. At most 8 (cost grows "
                     "with N; common practice, no source).", 1, 8, low_open=False,
                     fiber_kinds=_CAP),
        "betas_fs_n_per_mm": Key("float_list", None,
                                 "Taylor fiber: [beta2, beta3, ...] about the pump in fs^n/mm.",
                                 fiber_kinds=_TAYLOR),
        "gamma_per_w_per_m": Key(F, None, "Taylor fiber: nonlinear coefficient.", 0.0, 1.0e3,
                                 fiber_kinds=_TAYLOR),
        "loss_db_per_m": Key(F, None, "Flat measured power loss; replaces the model's loss "
                             "(capillary, antiresonant; for taylor the fiber's loss, default 0).",
                             0.0, 1.0e4, low_open=False),
        "loss_csv": Key("path", None, "Measured power loss, CSV columns wavelength_nm, "
                        "loss_db_per_m; replaces the model's loss inside the measured range "
                        "(the model's loss outside it, with a warning where light is there)."),
        "gvd_csv": Key("path", None, "Measured GVD of the fiber itself (evacuated), CSV "
                       "columns wavelength_nm, gvd_fs2_per_m; the gas dispersion at the fill "
                       "density is added; integrated to beta(omega) about the pump (which it "
                       "must contain); the model's beta outside the measured range, with a "
                       "warning where light is there."),
        "self_steepening": Key("bool", True, "Taylor fiber: include self-steepening.",
                               fiber_kinds=_TAYLOR),
        "raman_fraction": Key(F, 0.0, "Taylor fiber: fractional delayed Raman response f_R.",
                              0.0, 1.0, low_open=False, high_open=True, fiber_kinds=_TAYLOR),
        "raman_tau1_fs": Key(F, 12.2, "Taylor fiber: Raman oscillation time tau1.", 0.1, 1.0e4,
                             low_open=False, fiber_kinds=_TAYLOR),
        "raman_tau2_fs": Key(F, 32.0, "Taylor fiber: Raman damping time tau2.", 0.1, 1.0e5,
                             low_open=False, fiber_kinds=_TAYLOR),
        "effective_area_um2": Key(F, None, "Taylor fiber: effective mode area (for intensities).",
                                  0.0, 1.0e8, fiber_kinds=_TAYLOR),
    },
    "gas": {
        "species": Key("str", None, "Fill gas (a table name such as Ar); or use mixture."),
        "mixture": Key("fractions", None, "Gas mixture by mole fraction, e.g. { He = 0.7, "
                       "Ar = 0.3 }; fractions sum to 1."),
        "pressure_bar": Key(F, None, "Static fill pressure (absolute); required unless the "
                            "fill is a gradient (entrance_pressure_bar and exit_pressure_bar).",
                            1.0e-9, 1000.0, low_open=False),
        "entrance_pressure_bar": Key(F, None, "Gradient fill: absolute pressure at the fiber "
                                     "entrance (0: evacuated); give with exit_pressure_bar, "
                                     "instead of pressure_bar. Profile p(z) = sqrt(p0^2 + "
                                     "(pL^2 - p0^2) z/L) (viscous flow).", 0.0, 1000.0,
                                     low_open=False),
        "exit_pressure_bar": Key(F, None, "Gradient fill: absolute pressure at the fiber exit "
                                 "(0: evacuated); give with entrance_pressure_bar.", 0.0,
                                 1000.0, low_open=False),
        "temperature_k": Key(F, 293.15, "Gas temperature.", 1.0, 2000.0),
        "density_scale": Key(F, 1.0, "Calibration factor on the fill's number density (index, "
                             "n2, ionisation) over the equation of state's value at the "
                             "configured pressure; written by calibrate (fit name pressure).",
                             1.0e-3, 1.0e3),
        "n2_scale": Key(F, 1.0, "Calibration factor on the gas's electronic Kerr coefficient "
                        "n2 (the delayed rotational response keeps its table value); "
                        "written by calibrate (fit name n2).", 1.0e-3, 1.0e3),
        "equation_of_state": Key("choice", "coolprop", "Density model.",
                                 choices=("coolprop", "ideal")),
        "ionization_model": Key("choice", "ppt", "Photoionisation rate.",
                                choices=("ppt", "adk")),
        "table_dir": Key("path", None, "Extra folder searched first for gas tables (*.toml)."),
    },
    "cell": {
        "rated_pressure_bar": Key(F, None, "The cell maker's rated maximum pressure.",
                                  0.0, 1.0e4),
        "window_material": Key("str", "fused_silica", "Exit window material."),
        "window_thickness_mm": Key(F, None, "Exit window thickness.", 0.0, 100.0,
                                   low_open=False),
        "window_clear_aperture_mm": Key(F, None, "Unsupported (clear) window diameter.",
                                        0.0, 1000.0),
        "entrance_window_material": Key("str", "fused_silica", "Entrance window material."),
        "entrance_window_thickness_mm": Key(F, None, "Entrance window thickness (optional; its "
                                            "GDD acts on the input pulse, laser.energy_uj is "
                                            "the energy after it).", 0.0, 100.0,
                                            low_open=False),
        "window_coating": Key("choice", "uncoated", "Surfaces of both windows: uncoated "
                              "(Fresnel loss at normal incidence) or ar (anti-reflection "
                              "coated, loss taken as zero).", choices=("uncoated", "ar")),
    },
    "compressor": {
        "air_path_m": Key(F, 0.0, "Air path between cell and crystal.", 0.0, 1000.0,
                          low_open=False),
        "mirror_gdd_fs2": Key(F, None, "GDD per chirped-mirror bounce.", -1.0e6, 1.0e6,
                              low_open=False),
        "mirror_tod_fs3": Key(F, 0.0, "TOD per bounce.", -1.0e8, 1.0e8, low_open=False),
        "mirror_reflectivity": Key(F, 0.99, "Power reflectivity per chirped-mirror bounce "
                                   "(default 0.99: common practice, no source; take the "
                                   "maker's curve).", 0.0, 1.0),
        "mirror_gdd_csv": Key("path", None,
                              "Measured GDD per bounce, CSV columns wavelength_nm, gdd_fs2."),
        "mirror_band_nm": Key("band", None, "Usable mirror band [low, high]; light outside "
                              "is lost."),
        "max_bounces": Key("int", 20, "Largest bounce count tried.", 0, 1000, low_open=False),
        "bounces_in_pairs": Key("bool", False, "Allow even bounce counts only."),
        "objective": Key("choice", "peak_power", "What the bounce count optimises.",
                         choices=("peak_power", "fwhm")),
        "wedge_material": Key("str", None, "Wedge pair material for a fine trim (optional)."),
        "wedge_max_insertion_mm": Key(F, 0.0, "Largest wedge insertion for the trim.", 0.0,
                                      100.0, low_open=False),
    },
    "thz": {
        "crystal": Key("str", "GaP", "Generation crystal."),
        "thickness_mm": Key(F, 0.3, "Generation crystal thickness.", 1.0e-3, 50.0,
                            low_open=False),
        "cutoff_db": Key(F, -20.0, "Share of the THz energy above the cutoff (-20 dB: 99 % "
                         "of it lies below the cutoff).", -200.0, 0.0,
                         low_open=False, high_open=True),
        "cutoff_quantity": Key("choice", "power", "Spectrum whose integral the cutoff divides: "
                               "power (the energy) or field (the field amplitude).",
                               choices=("power", "field")),
        "detector_crystal": Key("str", None, "EO detection crystal (optional)."),
        "detector_thickness_mm": Key(F, None, "EO detection crystal thickness.", 1.0e-3, 50.0,
                                     low_open=False),
        "probe_fwhm_fs": Key(F, None, "Probe pulse FWHM for EO gating (default: the compressed "
                             "pulse).", 1.0, 1.0e5),
        "beam_waist_um": Key(F, None, "Pump 1/e^2 radius on the crystal (absolute estimates).",
                             1.0, 1.0e6, low_open=False),
        "d_eff_pm_per_v": Key(F, None, "Effective chi(2) coefficient (absolute estimates).",
                              0.0, 1.0e4),
        "damage_fluence_j_per_cm2": Key(F, None, "Crystal damage fluence for the pump check.",
                                        0.0, 1.0e3),
        "geometry": Key("choice", "collinear", "Generation geometry: collinear, or "
                        "tilted_front (velocity matching by a pulse-front tilt, e.g. LiNbO3; "
                        "grating and imaging not modelled).",
                        choices=("collinear", "tilted_front")),
        "focus_f_number": Key(F, 2.0, "f-number of the THz focusing optic for the peak field "
                              "(diffraction-limited focus of each frequency).", 0.5, 100.0,
                              low_open=False),
        "table_dir": Key("path", None, "Extra folder searched first for crystal tables "
                         "(*.toml); also HCFPLAN_CRYSTAL_PATH."),
    },
    "limits": {
        "self_focusing_margin": Key(F, 2.0, "Required self-focusing margin P_cr / P (critical "
                                    "power over the coupled peak power); every report shows "
                                    "P_cr / P beside it.", 1.0, 1.0e3, low_open=False),
        "ionization_fraction_limit": Key(F, 1.0e-4, "Ionisation fraction treated as the limit.",
                                         0.0, 1.0, high_open=True),
        "window_safety_factor": Key(F, 4.0, "Safety factor of the window plate formula.",
                                    1.0, 100.0, low_open=False),
        "window_mounting": Key("choice", "clamped", "Window edge support.",
                               choices=("clamped", "unclamped")),
        "window_distance_m": Key(F, None, "Fiber exit to exit window distance (beam size at "
                                 "the window); default: 0.3 m.", 0.0, 100.0),
        "entrance_gas_path_m": Key(F, None, "Gas path from the entrance window to the fiber "
                                   "(static fill), also the entrance window's distance from "
                                   "the focus; default: two Rayleigh ranges for the gas path, "
                                   "0.3 m for the window.", 0.0, 100.0, low_open=False),
        "b_integral_limit_rad": Key(F, 1.0, "B-integral treated as the limit in the exit "
                                    "window.", 0.0, 100.0),
        "cladding_damage_fluence_j_per_cm2": Key(F, None, "Damage fluence of the fiber glass "
                                                 "(default: the solid table).", 0.0, 1.0e3),
        "room_volume_m3": Key(F, None, "Free volume of the laboratory room.", 0.0, 1.0e6),
        "cylinder_volume_l": Key(F, None, "Water volume of the gas cylinder(s).", 0.0, 1.0e5),
        "cylinder_pressure_bar": Key(F, None, "Filling pressure of the cylinder(s).", 0.0,
                                     1000.0),
        "rating_fraction": Key(F, 0.9, "Highest share of cell.rated_pressure_bar that "
                               "recommend searches (common practice, operate at least 10 % "
                               "below the relief or rated pressure, no source).", 0.0, 1.0),
    },
    "spread": {
        "energy_percent": Key(F, 5.0, "Energy half-width used by --spread default.", 0.0, 99.0),
        "pressure_percent": Key(F, 2.0, "Pressure half-width used by --spread default.", 0.0,
                                99.0),
        "fwhm_percent": Key(F, 5.0, "Duration half-width used by --spread default.", 0.0, 99.0),
    },
    "grid": {
        "points": Key("int", None, "Number of grid points (power of two recommended).",
                      64, 2**22, low_open=False),
        "time_window_fs": Key(F, None, "Total time window.", 1.0, 1.0e7),
        "center_wavelength_nm": Key(F, None, "Centre of the frequency window, as a vacuum "
                                    "wavelength (default: the window is placed on the band the "
                                    "run needs). With points and time_window_fs it fixes the "
                                    "whole grid.", 10.0, 1.0e5),
        "z_samples": Key("int", 100, "Number of saved z positions.", 2, 10000, low_open=False),
        "rtol": Key(F, 1.0e-6, "Relative tolerance of the step control (relative L2 norm of "
                    "the local error).", 0.0, 0.1),
        "stop_ionization_fraction": Key(F, 0.1, "Stop the run above this ionisation fraction.",
                                        0.0, 1.0),
    },
}

#: Sections a config must contain.
REQUIRED_SECTIONS = ("laser", "fiber")
