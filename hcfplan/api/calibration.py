"""``hcfplan.calibrate``: fit config parameters to measured output spectra (as the
``calibrate`` command does)."""

from __future__ import annotations

from pathlib import Path

from hcfplan.api.config import ConfigFile, ConfigLike, gas_dirs, override_texts
from hcfplan.errors import ConfigError


def calibrate(config: ConfigLike, measured, *, fit, at=None, out: str | Path | None = None,
              overrides=None, max_evaluations: int = 60):
    """Fit parameters of ``config`` so its modelled output spectra match measured ones.

    Parameters
    ----------
    config : path, mapping or PlanConfig
        The config (the start values).
    measured : path or sequence of paths
        Measured output spectra, CSV columns ``wavelength_nm, intensity``.
    fit : str or sequence of str
        Parameters to fit: ``energy`` (laser.energy_uj), ``fwhm`` (laser.fwhm_fs),
        ``pressure`` (gas.density_scale), ``n2`` (gas.n2_scale).
    at : sequence, optional
        Settings of each spectrum, one entry per spectrum: a ``{"section.key": value}`` mapping
        or ``section.key=value`` text(s), as ``overrides``.
    out : path, optional
        Write the calibrated config (TOML) here.
    overrides : mapping or texts, optional
        Overrides applied to ``config`` for every spectrum.
    max_evaluations : int
        Cap on the model evaluations of the fit.

    Returns
    -------
    CalibrationResult
        ``values``, ``uncertainties``, ``residual_db``, ``quality``; ``as_dict()`` is the
        JSON report (``fit.<name>.value``, ``fit.<name>.uncertainty``, ``fit.residual_db``).
    """
    from hcfplan.planning.calibrate import calibrate_files, parse_fit_names

    names = parse_fit_names(fit if isinstance(fit, str) else ",".join(fit))
    paths = [measured] if isinstance(measured, (str, Path)) else list(measured)
    settings = [override_texts(a) for a in at] if at is not None else [()] * len(paths)
    if len(settings) != len(paths):
        raise ConfigError(f"at: {len(settings)} setting(s) for {len(paths)} measured spectra; "
                          "give one per spectrum")
    with ConfigFile(config, overrides) as source:
        result, _ = calibrate_files(source.path, list(zip(paths, settings, strict=True)), names,
                                    out, overrides=source.overrides,
                                    extra_gas_dirs=gas_dirs(),
                                    max_evaluations=max_evaluations)
    return result
