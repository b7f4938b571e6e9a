"""Calibration against measured output spectra: fit config parameters so the modelled output
spectra match measured ones.

The fit is a bounded nonlinear least-squares problem (:func:`scipy.optimize.least_squares`,
trust-region reflective) on log spectra: for each measured spectrum the residual is the modelled
minus the measured level in dB at the measured wavelengths inside the measured band (samples
above :data:`DYNAMIC_RANGE_DB` below the measured peak; both spectra floored there). A
spectrometer's scale is unknown, so each spectrum's mean offset in dB is removed (the
least-squares optimal scale). The parameters are fitted as logarithms of their value over the
starting value, within :data:`FIT_PARAMETERS` bounds.

Each model evaluation is the fiber run of the chain (:func:`modelled_output`) on a fixed grid
per spectrum (that of the config's run at the spectrum's settings and the start values, so
that every evaluation sees the same sampling),
with the solver tolerance :data:`FIT_RTOL` (coarser than a run's default, to keep the fit
cheap), without the first-look report, compressor or THz, and at most ``max_evaluations``
evaluations of the whole residual vector (finite-difference Jacobians included).

Uncertainties come from the Jacobian J of the residuals at the solution: covariance
``s^2 (J^T J)^-1`` with ``s^2 = sum(r^2) / (m - n)`` (m residuals, n parameters) [1]. A fit is
reported as poor (``fit.quality = "poor"``) when its RMS residual exceeds
:data:`POOR_FIT_RESIDUAL_DB`, a parameter ends at a bound, or a relative uncertainty exceeds
:data:`POOR_FIT_RELATIVE_UNCERTAINTY`; then the values are not a confident answer.

References
----------
.. [1] W. H. Press, S. A. Teukolsky, W. T. Vetterling, B. P. Flannery, *Numerical Recipes*,
       3rd ed., Cambridge Univ. Press, 2007, Sec. 15.5 (nonlinear models; the covariance
       matrix from the curvature matrix). [section number from memory]
.. [2] M. A. Branch, T. F. Coleman, Y. Li, "A subspace, interior, and conjugate gradient method
       for large-scale bound-constrained minimization problems," SIAM J. Sci. Comput. 21,
       1-23 (1999), doi:10.1137/S1064827595289108 (the trust-region reflective method of
       scipy.optimize.least_squares).
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass
from pathlib import Path
from typing import Any

import numpy as np

from hcfplan.constants import c
from hcfplan.errors import ConfigError


@dataclass(frozen=True)
class FitParameter:
    """A fitted quantity: the config key it sets and its bounds relative to the start value."""

    section: str
    key: str
    low: float  #: lowest value as a multiple of the start value
    high: float  #: highest value as a multiple of the start value
    doc: str

    @property
    def path(self) -> str:
        return f"{self.section}.{self.key}"


#: The parameters ``--fit`` accepts (name -> key and bounds). The bounds are wide enough for a
#: calibration and keep the model inside its range (common practice, no source).
FIT_PARAMETERS: dict[str, FitParameter] = {
    "energy": FitParameter("laser", "energy_uj", 0.2, 5.0,
                           "pulse energy before the fiber (the coupled energy follows it)"),
    "fwhm": FitParameter("laser", "fwhm_fs", 0.3, 3.0, "input intensity FWHM"),
    "pressure": FitParameter("gas", "density_scale", 0.2, 5.0,
                             "effective density factor of the fill (effective pressure)"),
    "n2": FitParameter("gas", "n2_scale", 0.2, 5.0, "scale factor on the electronic n2"),
}
#: Measured samples more than this far below the measured peak are outside the fitted band,
#: and both spectra are floored there. [dB]
DYNAMIC_RANGE_DB = 30.0
#: Solver tolerance of the fit's model evaluations (a run's default is 1e-6). At 1e-4 the
#: output spectra of the demo configs differed from those at 1e-6 by 0.07 dB RMS, enough to
#: bias a fit to spectra made at 1e-6 by several standard errors; at 1e-5 by 0.008 dB.
FIT_RTOL = 1e-5
#: Saved z positions per evaluation (only the output spectrum is used).
FIT_Z_SAMPLES = 2
#: Default cap on the evaluations of the residual vector, finite-difference Jacobians included
#: (each costs one evaluation per fitted parameter).
MAX_EVALUATIONS = 60
#: Relative finite-difference step on the log parameters (above the solver's noise at FIT_RTOL).
DIFF_STEP = 1e-2
#: RMS residual above which a fit is reported as poor. [dB] (common practice, no source)
POOR_FIT_RESIDUAL_DB = 3.0
#: Relative uncertainty above which a fitted value is reported as undetermined (poor fit).
POOR_FIT_RELATIVE_UNCERTAINTY = 0.5
#: Distance from a bound, in log units, at which a value counts as stuck at the bound.
AT_BOUND = 1e-3


@dataclass(frozen=True)
class Measurement:
    """One measured output spectrum and the settings it was taken at."""

    source: Path
    wavelength: np.ndarray  #: [m], increasing
    intensity: np.ndarray  #: per unit wavelength, >= 0 [arb.]
    overrides: tuple[str, ...] = ()  #: ``section.key=value`` settings of this spectrum


@dataclass(frozen=True, eq=False)
class CalibrationResult:
    """Fitted values (config units), their uncertainties, the residual and the spectra."""

    names: tuple[str, ...]
    values: dict[str, float]
    uncertainties: dict[str, float]
    start: dict[str, float]
    residual_db: float
    quality: str  #: "good" or "poor"
    reasons: tuple[str, ...]  #: why a fit is poor (empty when good)
    evaluations: int
    success: bool
    message: str
    measurements: tuple[Measurement, ...]
    modelled_db: tuple[np.ndarray, ...]  #: model level at the measured wavelengths [dB]
    measured_db: tuple[np.ndarray, ...]  #: measured level [dB] (peak 0, floored)
    band: tuple[np.ndarray, ...]  #: boolean mask of the fitted samples

    def as_dict(self) -> dict[str, Any]:
        """The JSON report: ``fit.<name>.value``, ``fit.<name>.uncertainty``,
        ``fit.residual_db`` and the fit's quality."""
        fit: dict[str, Any] = {
            name: {"key": FIT_PARAMETERS[name].path, "value": self.values[name],
                   "uncertainty": self.uncertainties[name], "start": self.start[name]}
            for name in self.names}
        fit.update({"residual_db": self.residual_db, "quality": self.quality,
                    "poor_fit_reasons": list(self.reasons), "evaluations": self.evaluations,
                    "success": self.success, "message": self.message,
                    "spectra": [{"file": str(m.source), "at": list(m.overrides)}
                                for m in self.measurements]})
        return {"fit": fit}


def parse_fit_names(text: str) -> tuple[str, ...]:
    """``"energy,n2"`` -> ``("energy", "n2")``; unknown or repeated names are refused."""
    names = tuple(part.strip() for part in text.split(",") if part.strip())
    if not names:
        raise ConfigError(f"--fit {text!r}: name at least one of {', '.join(FIT_PARAMETERS)}")
    for name in names:
        if name not in FIT_PARAMETERS:
            raise ConfigError(f"--fit {name!r}: unknown parameter (choose from "
                              f"{', '.join(FIT_PARAMETERS)})")
    if len(set(names)) != len(names):
        raise ConfigError(f"--fit {text!r}: a parameter is named twice")
    return names


def read_measurement(path: str | Path, overrides=()) -> Measurement:
    """A measured output spectrum (CSV columns ``wavelength_nm, intensity``) with its
    settings; the file's problems are refused naming it."""
    from hcfplan.io.config import parse_override
    from hcfplan.io.csvdata import read_spectrum_csv

    for text in overrides:
        section, key, _ = parse_override(text)
        if f"{section}.{key}" in {p.path for p in FIT_PARAMETERS.values()}:
            raise ConfigError(f"--at {text}: {section}.{key} is a fitted quantity, not a setting")
    try:
        wavelength, intensity = read_spectrum_csv(path)
    except ConfigError as exc:
        raise ConfigError(f"--measured: {exc}") from None
    return Measurement(Path(path), wavelength, intensity, tuple(overrides))


def _levels_db(values: np.ndarray) -> np.ndarray:
    """10 log10(values / peak), floored at -DYNAMIC_RANGE_DB. [dB]"""
    peak = float(np.max(values))
    if not peak > 0:
        return np.full(values.shape, -DYNAMIC_RANGE_DB)
    ratio = np.maximum(values / peak, 10 ** (-DYNAMIC_RANGE_DB / 10))
    return 10 * np.log10(ratio)


def spectrum_per_wavelength(grid, spectrum: np.ndarray, wavelength: np.ndarray) -> np.ndarray:
    """|A~|^2 per unit frequency on the grid -> per unit wavelength at ``wavelength`` [m],
    S_lambda = S_nu c / lambda^2, interpolated linearly in frequency (0 outside the grid)."""
    nu = grid.shifted(grid.frequency)
    density = grid.shifted(np.abs(spectrum) ** 2)
    return np.interp(c / wavelength, nu, density, left=0.0, right=0.0) * c / wavelength**2


def modelled_output(config, grid):
    """The fiber's output spectrum (``grid.to_spectrum`` convention) for ``config`` on the
    given grid: the chain's fiber run without its first-look report, grid refinement,
    compressor or THz, at the solver tolerance :data:`FIT_RTOL`. A failed run is refused.
    A multimode run (``fiber.modes`` > 1) gives the whole beam, sqrt of the modes' spectral
    densities summed (phase dropped), as a spectrometer fed with the whole beam sees it."""
    from hcfplan.planning.fiber_run import fiber_setup, run_fiber
    from hcfplan.planning.input_field import input_field

    setup = fiber_setup(config)
    field0 = input_field(config, grid, setup.energy)
    result = run_fiber(config, setup, grid, field0, rtol=max(FIT_RTOL, config.grid.rtol),
                       z_samples=FIT_Z_SAMPLES)
    if not result.success:
        raise ConfigError(f"calibrate: the fiber run failed ({result.message}); narrow the "
                          "fit or check the config")
    modes = getattr(result, "mode_spectra_out", None)
    if modes is not None:
        return np.sqrt(np.sum(np.abs(modes) ** 2, axis=0))
    return result.field_out_spectrum


class _Problem:
    """The residual function of a calibration: loads the config at given parameter values
    and runs the fiber for each measurement on one fixed grid."""

    def __init__(self, load, names, measurements, start):
        from hcfplan.planning.chain import run_chain

        self.load, self.names, self.measurements = load, names, measurements
        self.start = start
        self.measured_db = tuple(_levels_db(m.intensity) for m in measurements)
        self.band = tuple(level > -DYNAMIC_RANGE_DB for level in self.measured_db)
        # per spectrum, the grid of the config's run at its settings and the start values
        # (refined until its checks pass), kept for every evaluation: the same sampling keeps
        # the residuals smooth
        self.grids = []
        for m in measurements:
            nominal = self.load(m.overrides)
            self.grids.append(run_chain(dataclasses.replace(nominal, present_sections=tuple(
                s for s in nominal.present_sections if s != "thz"))).grid)
        self.evaluations = 0

    def overrides(self, x: np.ndarray) -> tuple[str, ...]:
        return tuple(f"{FIT_PARAMETERS[n].path}={self.start[n] * math.exp(v)!r}"
                     for n, v in zip(self.names, x, strict=True))

    def modelled(self, x: np.ndarray) -> tuple[np.ndarray, ...]:
        """Model levels [dB] at each measurement's wavelengths (peak 0, floored)."""
        self.evaluations += 1
        out = []
        for m, grid in zip(self.measurements, self.grids, strict=True):
            config = self.load((*m.overrides, *self.overrides(x)))
            spectrum = modelled_output(config, grid)
            out.append(_levels_db(spectrum_per_wavelength(grid, spectrum, m.wavelength)))
        return tuple(out)

    def residuals(self, x: np.ndarray) -> np.ndarray:
        parts = []
        for model, measured, band in zip(self.modelled(x), self.measured_db, self.band,
                                         strict=True):
            diff = model[band] - measured[band]
            parts.append(diff - diff.mean())  # the unknown spectrometer scale
        return np.concatenate(parts)


def _quality(names, x, low, high, relative, residual_db) -> tuple[str, tuple[str, ...]]:
    reasons = []
    if residual_db > POOR_FIT_RESIDUAL_DB:
        reasons.append(f"RMS residual {residual_db:.2f} dB > {POOR_FIT_RESIDUAL_DB:g} dB: the "
                       "model does not describe the measured spectra")
    for name, v, lo, hi, rel in zip(names, x, low, high, relative, strict=True):
        if v - lo < AT_BOUND or hi - v < AT_BOUND:
            reasons.append(f"{name} ended at a bound of its range")
        if not rel <= POOR_FIT_RELATIVE_UNCERTAINTY:
            reasons.append(f"{name}: relative uncertainty {rel:.2g} > "
                           f"{POOR_FIT_RELATIVE_UNCERTAINTY:g} (not determined by the spectra)")
    return ("poor" if reasons else "good"), tuple(reasons)


def _uncertainty(jac: np.ndarray, residuals: np.ndarray) -> np.ndarray:
    """Standard errors of the (log) parameters from the Jacobian [1]; inf where singular."""
    m, n = jac.shape
    dof = max(m - n, 1)
    s2 = float(residuals @ residuals) / dof
    try:
        cov = np.linalg.inv(jac.T @ jac) * s2
    except np.linalg.LinAlgError:
        return np.full(n, np.inf)
    diag = np.diag(cov)
    return np.where(diag >= 0, np.sqrt(np.abs(diag)), np.inf)


def calibrate_config(load, start_config, names, measurements, *,
                     max_evaluations: int = MAX_EVALUATIONS) -> CalibrationResult:
    """Fit ``names`` (keys of :data:`FIT_PARAMETERS`) to the measured spectra.

    Parameters
    ----------
    load : callable
        ``load(overrides) -> PlanConfig``: the config with ``section.key=value`` overrides.
    start_config : PlanConfig
        The config as given (the start values).
    names : tuple of str
        The fitted parameters.
    measurements : sequence of Measurement
        The measured output spectra and their settings.
    max_evaluations : int
        Cap on the evaluations of the residual vector.

    Returns
    -------
    CalibrationResult

    References
    ----------
    See the module docstring ([1] covariance, [2] the bounded least-squares method).
    """
    from scipy.optimize import least_squares

    start = {n: _start_value(start_config, n) for n in names}
    problem = _Problem(load, names, tuple(measurements), start)
    low = np.log([FIT_PARAMETERS[n].low for n in names])
    high = np.log([FIT_PARAMETERS[n].high for n in names])
    # max_nfev counts the function evaluations only; each iteration also spends len(names)
    # on its finite-difference Jacobian
    fit = least_squares(problem.residuals, np.zeros(len(names)), bounds=(low, high),
                        method="trf", diff_step=DIFF_STEP,
                        max_nfev=max(1, max_evaluations // (len(names) + 1)), x_scale=1.0)
    sigma = _uncertainty(fit.jac, fit.fun)
    residual_db = float(np.sqrt(np.mean(fit.fun**2)))
    values = {n: start[n] * math.exp(v) for n, v in zip(names, fit.x, strict=True)}
    quality, reasons = _quality(names, fit.x, low, high, sigma, residual_db)
    modelled = problem.modelled(fit.x)
    return CalibrationResult(
        names=tuple(names), values=values,
        uncertainties={n: values[n] * float(s) for n, s in zip(names, sigma, strict=True)},
        start=start, residual_db=residual_db, quality=quality, reasons=reasons,
        evaluations=problem.evaluations, success=bool(fit.success), message=str(fit.message),
        measurements=tuple(measurements), modelled_db=modelled,
        measured_db=problem.measured_db, band=problem.band)


def _start_value(config, name: str) -> float:
    """The config's value of a fitted quantity (in the key's unit)."""
    laser, gas = config.laser, config.gas
    if name in ("pressure", "n2") and gas is None:
        raise ConfigError(f"--fit {name}: the config has no [gas] section")
    if name == "fwhm" and (laser.field is not None or laser.spectrum is not None):
        raise ConfigError("--fit fwhm: the input pulse comes from a measured file "
                          "(laser.field_csv or laser.spectrum_csv), not from laser.fwhm_fs")
    return {"energy": lambda: laser.energy * 1e6, "fwhm": lambda: laser.duration_fwhm * 1e15,
            "pressure": lambda: gas.density_scale, "n2": lambda: gas.n2_scale}[name]()


def calibrated_mapping(raw: dict, base_dir: Path, result: CalibrationResult) -> dict:
    """The config mapping with the fitted values as keys and paths made absolute (the
    calibrated config may be written elsewhere)."""
    from hcfplan.io.schema import SCHEMA

    data = {s: (dict(t) if isinstance(t, dict) else t) for s, t in raw.items()}
    for section, table in data.items():
        if not isinstance(table, dict):
            continue
        for key, value in table.items():
            spec = SCHEMA.get(section, {}).get(key)
            if spec is not None and spec.kind == "path" and isinstance(value, str):
                path = Path(value).expanduser()
                table[key] = str(path if path.is_absolute() else (base_dir / path).resolve())
    for name in result.names:
        p = FIT_PARAMETERS[name]
        data.setdefault(p.section, {})[p.key] = float(f"{result.values[name]:.6g}")
    return data


def calibration_comment(result: CalibrationResult) -> str:
    """The comment block at the top of a calibrated config."""
    lines = ["# Calibrated by hcfplan calibrate against measured output spectra:"]
    for m in result.measurements:
        at = f" at {', '.join(m.overrides)}" if m.overrides else ""
        lines.append(f"#   {m.source}{at}")
    for name in result.names:
        p = FIT_PARAMETERS[name]
        lines.append(f"#   {p.path} = {result.values[name]:.6g} +- "
                     f"{result.uncertainties[name]:.2g} (fit '{name}', start "
                     f"{result.start[name]:.6g})")
    lines.append(f"#   residual {result.residual_db:.2f} dB RMS; fit quality: {result.quality}")
    lines += [f"#   poor fit: {reason}" for reason in result.reasons]
    return "\n".join(lines) + "\n"


def calibrate_files(config_path: str | Path, spectra, names, out: str | Path | None = None, *,
                    overrides=(), extra_gas_dirs=(),
                    max_evaluations: int = MAX_EVALUATIONS) -> tuple[CalibrationResult, dict]:
    """Calibrate the config file ``config_path`` against ``spectra`` (pairs of a CSV path and
    its ``section.key=value`` settings) and write the calibrated config to ``out`` (atomically;
    None: not written). Returns the result and its JSON report."""
    from hcfplan.io.config import load_config
    from hcfplan.io.tomlio import dump_toml, read_toml
    from hcfplan.limits.cautions import caution_lines
    from hcfplan.numerics.storage import write_text

    config_path = Path(config_path)
    base = list(overrides)

    def load(extra):
        return load_config(config_path, overrides=(*base, *extra),
                           extra_gas_dirs=extra_gas_dirs)

    start_config = load(())
    measurements = [read_measurement(path, settings) for path, settings in spectra]
    for m in measurements:
        load(m.overrides)  # refuse a bad --at before any run
    result = calibrate_config(load, start_config, tuple(names), measurements,
                              max_evaluations=max_evaluations)
    report = result.as_dict()
    if out is not None:
        from hcfplan.io.config import apply_overrides

        raw = apply_overrides(read_toml(config_path), base)
        mapping = calibrated_mapping(raw, config_path.parent.resolve(), result)
        write_text(Path(out), calibration_comment(result) + "\n" + dump_toml(mapping))
        report["calibrated_config"] = str(out)
    report["cautions"] = caution_lines()
    return result, report
