"""A fiber model with measured loss and/or measured group-velocity dispersion laid over it.

:class:`MeasuredFiber` wraps any :class:`~hcfplan.fibers.base.Waveguide` (capillary,
anti-resonant, Taylor) and replaces

* its loss by a flat measured power loss, or by a measured loss curve versus wavelength
  (linear interpolation in wavelength; the model's loss outside the measured range);
* its dispersion by a measured GVD curve beta2_f(lambda) of the fiber itself (measured
  evacuated), integrated twice about the pump, plus the dispersion of the fill at its density:
  beta(omega) = beta_m(omega0) + beta_m'(omega0) (omega - omega0)
  + int_omega0^omega int_omega0^omega' beta2_f(omega'') domega'' domega' + [g(omega) - g(omega0)
  - g'(omega0)(omega - omega0)], with beta2_f a natural cubic spline in omega through the
  measured points, g(omega) = omega (n_gas(omega) - 1)/c the fill's part (0 without a gas) and
  beta_m the model's propagation constant. The fill's part is additive to first order in
  n_gas - 1 (beta = sqrt((k n)^2 - (u/a)^2) ~ k n - u^2/(2 k n a^2), so the waveguide and gas
  GVDs add; the sum rule "beta2 = beta2,gas + beta2,waveguide" of hollow-fiber planning,
  common practice, no source), so a pressure scan or a pressure gradient keeps using the
  measured fiber. Outside the measured range the model's beta is used, shifted by a constant
  and a term linear in omega so that beta and the group delay stay continuous at the edge (so
  the GVD there is the model's).

Everything else (mode area, gamma, resonances, Raman fields of a Taylor fiber) is the wrapped
model's. Conventions of :mod:`hcfplan.numerics.grid`; ``attenuation`` is the FIELD attenuation.

References
----------
none: measured data replace the model (common practice, no source); the wrapped model cites
its own. Field attenuation alpha = ln(10)/20 x (power loss in dB/m): definition of the decibel.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from hcfplan.constants import c
from hcfplan.errors import ConfigError

#: ``loss_model`` of a fiber with a flat measured loss.
LOSS_FLAT = "measured_flat"
#: ``loss_model`` of a fiber with a measured loss curve.
LOSS_CURVE = "measured_curve"
#: Relative step of the central difference that gives the model's group delay at an edge.
_EDGE_STEP = 1e-4


def _check_curve(name: str, wavelength, values) -> tuple[np.ndarray, np.ndarray]:
    wavelength = np.asarray(wavelength, dtype=float)
    values = np.asarray(values, dtype=float)
    if (wavelength.ndim != 1 or wavelength.shape != values.shape or wavelength.size < 2
            or not np.all(np.diff(wavelength) > 0) or not wavelength[0] > 0
            or not np.all(np.isfinite(values))):
        raise ConfigError(f"{name}: need >= 2 finite samples at strictly increasing "
                          "wavelengths > 0")
    return wavelength, values


@dataclass(frozen=True, eq=False)
class MeasuredFiber:
    """A waveguide model with measured loss and/or GVD (module docstring).

    Parameters
    ----------
    base : Waveguide
        The model whose mode, nonlinearity and (outside measured ranges) loss and dispersion
        are kept.
    omega0 : float
        Pump angular frequency, about which a measured GVD is integrated. [rad/s]
    flat_loss : float or None
        Flat FIELD attenuation replacing the model's everywhere. [1/m]
    loss_wavelength, loss : ndarray or None
        Measured loss curve: vacuum wavelengths [m] (increasing) and FIELD attenuation [1/m].
    gvd_wavelength, gvd : ndarray or None
        Measured GVD curve of the fiber without its fill: vacuum wavelengths [m] (increasing,
        containing the pump) and beta2 [s^2/m]; the fill's dispersion is added.
    """

    base: object
    omega0: float
    flat_loss: float | None = None
    loss_wavelength: np.ndarray | None = None
    loss: np.ndarray | None = None
    gvd_wavelength: np.ndarray | None = None
    gvd: np.ndarray | None = None
    _beta: dict = field(default_factory=dict, repr=False)

    def __post_init__(self) -> None:
        if self.flat_loss is not None and self.loss is not None:
            raise ConfigError("measured fiber: give a flat loss or a loss curve, not both")
        if self.flat_loss is not None and not (np.isfinite(self.flat_loss)
                                               and self.flat_loss >= 0):
            raise ConfigError(f"measured fiber flat loss = {self.flat_loss} 1/m: must be >= 0")
        if self.loss is not None:
            wl, loss = _check_curve("measured loss curve", self.loss_wavelength, self.loss)
            if np.any(loss < 0):
                raise ConfigError("measured loss curve: every loss must be >= 0")
            object.__setattr__(self, "loss_wavelength", wl)
            object.__setattr__(self, "loss", loss)
        if self.gvd is not None:
            wl, gvd = _check_curve("measured GVD curve", self.gvd_wavelength, self.gvd)
            pump = 2 * math.pi * c / self.omega0
            if not wl[0] <= pump <= wl[-1]:
                raise ConfigError(f"measured GVD curve covers {wl[0] * 1e9:.6g}-"
                                  f"{wl[-1] * 1e9:.6g} nm: it must contain the pump "
                                  f"({pump * 1e9:.6g} nm), about which it is integrated")
            object.__setattr__(self, "gvd_wavelength", wl)
            object.__setattr__(self, "gvd", gvd)
            self._beta.update(self._integrated())

    def __getattr__(self, name: str):
        # Everything the wrapper does not replace is the model's (mode area, gamma, resonances,
        # Raman fields, ...). Private and special names are not forwarded (pickling, copies).
        if name.startswith("_") or name == "base":
            raise AttributeError(name)
        return getattr(self.base, name)

    # --- loss ---------------------------------------------------------------------------------

    @property
    def loss_model(self) -> str:
        """Which loss :meth:`attenuation` returns: measured flat, measured curve or the model's.

        References
        ----------
        none: a label
        """
        if self.flat_loss is not None:
            return LOSS_FLAT
        if self.loss is not None:
            return LOSS_CURVE
        return getattr(self.base, "loss_model", "model")

    def attenuation(self, omega: np.ndarray) -> np.ndarray:
        """FIELD attenuation: the measured one where given, else the model's. [1/m]

        References
        ----------
        none: measured data (module docstring)
        """
        omega = np.asarray(omega, dtype=float)
        if self.flat_loss is not None:
            return np.full(np.shape(omega), float(self.flat_loss))
        if self.loss is None:
            return self.base.attenuation(omega)
        wavelength = 2 * math.pi * c / omega
        lo, hi = self.loss_wavelength[0], self.loss_wavelength[-1]
        inside = (wavelength >= lo) & (wavelength <= hi)
        out = np.array(self.base.attenuation(omega), dtype=float) if not np.all(inside) \
            else np.empty(np.shape(omega))
        out[inside] = np.interp(wavelength[inside], self.loss_wavelength, self.loss)
        return out

    # --- dispersion ---------------------------------------------------------------------------

    def _model_beta_and_delay(self, omega: float) -> tuple[float, float]:
        h = _EDGE_STEP * omega
        beta = self.base.propagation_constant(np.array([omega - h, omega, omega + h]))
        return float(beta[1]), float((beta[2] - beta[0]) / (2 * h))

    def _gas_part(self, omega: np.ndarray) -> np.ndarray:
        """g(omega) = omega (n_gas - 1)/c of the fill; 0 for a fiber without gas. [rad/m]"""
        gas = getattr(self.base, "gas", None)
        if gas is None:
            return np.zeros(np.shape(omega))
        return omega * (gas.refractive_index(omega) - 1.0) / c

    def _integrated(self) -> dict:
        from scipy.interpolate import CubicSpline

        omega = 2 * math.pi * c / self.gvd_wavelength[::-1]  # increasing
        spline = CubicSpline(omega, self.gvd[::-1], bc_type="natural")
        twice = spline.antiderivative(2)
        once = spline.antiderivative(1)
        w0 = self.omega0
        beta0, beta1 = self._model_beta_and_delay(w0)
        f0, g0 = float(twice(w0)), float(once(w0))
        h = _EDGE_STEP * w0
        gas0 = self._gas_part(np.array([w0 - h, w0, w0 + h]))
        gas_value, gas_slope = gas0[1], (gas0[2] - gas0[0]) / (2 * h)

        def inside(w):
            fiber = twice(w) - f0 - g0 * (w - w0)
            fill = self._gas_part(w) - gas_value - gas_slope * (w - w0)
            return beta0 + beta1 * (w - w0) + fiber + fill

        edges = {}
        for edge in (omega[0], omega[-1]):
            step = _EDGE_STEP * edge
            values = inside(np.array([edge - step, edge, edge + step]))
            model_beta, model_delay = self._model_beta_and_delay(edge)
            edges[edge] = (float(values[1]), float((values[2] - values[0]) / (2 * step)),
                           model_beta, model_delay)
        return {"inside": inside, "range": (omega[0], omega[-1]), "edges": edges}

    @property
    def dispersion_model(self) -> str:
        """``"measured_gvd"`` when a measured GVD curve replaces the model's, else ``"model"``.

        References
        ----------
        none: a label
        """
        return "measured_gvd" if self.gvd is not None else "model"

    def propagation_constant(self, omega: np.ndarray) -> np.ndarray:
        """beta(omega): integrated measured GVD plus the fill inside its range, the model's
        outside. [rad/m]

        References
        ----------
        none: double integral of the measured beta2 (module docstring)
        """
        omega = np.asarray(omega, dtype=float)
        if self.gvd is None:
            return self.base.propagation_constant(omega)
        lo, hi = self._beta["range"]
        inside = (omega >= lo) & (omega <= hi)
        out = np.empty(np.shape(omega))
        out[inside] = self._beta["inside"](omega[inside])
        for edge, side in ((lo, omega < lo), (hi, omega > hi)):
            if np.any(side):
                beta_e, delay_e, model_e, model_delay_e = self._beta["edges"][edge]
                w = omega[side]
                out[side] = (self.base.propagation_constant(w) - model_e
                             - model_delay_e * (w - edge) + beta_e + delay_e * (w - edge))
        return out

    def describe(self) -> dict:
        """The model's parameters plus what the measured data replace.

        References
        ----------
        none: no physics (the model's defining parameters)
        """
        out = dict(self.base.describe())
        out["loss_model"] = self.loss_model
        out["dispersion_model"] = self.dispersion_model
        return out
