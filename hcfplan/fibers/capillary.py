"""Gas-filled hollow capillary (dielectric tube): the Marcatili-Schmeltzer EH1m modes.

Conventions of :mod:`hcfplan.numerics.grid`: fields vary as exp(i(beta z - omega t));
``attenuation`` is the FIELD attenuation alpha, so the guided power falls as exp(-2 alpha z).

References
----------
.. [1] E. A. J. Marcatili, R. A. Schmeltzer, "Hollow metallic and dielectric waveguides for long
       distance optical transmission and lasers," Bell Syst. Tech. J. 43, 1783-1809 (1964),
       doi:10.1002/j.1538-7305.1964.tb04108.x.
"""

from __future__ import annotations

import warnings
from dataclasses import dataclass

import numpy as np

from hcfplan.constants import c
from hcfplan.errors import ConfigError, ValidityWarning
from hcfplan.fibers.base import GasLike
from hcfplan.fibers.modes import effective_area_j0, eh_eigenvalue, peak_intensity_area
from hcfplan.materials.solids import SolidMaterial, load_material
from hcfplan.materials.solids import refractive_index as solid_index

#: Text used by ``describe()``: what ``attenuation`` returns.
ATTENUATION_CONVENTION = "field attenuation alpha [1/m]; power ~ exp(-2 alpha z)"
#: The model needs k a >> u; below k a = MIN_KA_OVER_U * u a ValidityWarning is issued.
MIN_KA_OVER_U = 5.0


def _eh_wall_factor(nu: np.ndarray) -> np.ndarray:
    """Re[(nu^2 + 1) / (2 sqrt(nu^2 - 1))], the EH_nm factor of [1] for index ratio nu."""
    nu = np.asarray(nu, dtype=complex)
    return np.real((nu**2 + 1.0) / (2.0 * np.sqrt(nu**2 - 1.0)))


def capillary_propagation_constant(
    omega: np.ndarray, core_radius: float, n_gas: np.ndarray, u: float
) -> np.ndarray:
    """Phase constant of an EH1m capillary mode in a gas of index ``n_gas``.

    Parameters
    ----------
    omega : ndarray
        Angular frequency. [rad/s]
    core_radius : float
        Core radius a. [m]
    n_gas : ndarray
        Refractive index of the filling gas at ``omega``. [-]
    u : float
        Mode eigenvalue u_1m (zero of J0). [-]

    Returns
    -------
    ndarray
        beta = sqrt((omega n_gas / c)^2 - (u/a)^2); 0 below the cut-off. [rad/m]

    Notes
    -----
    Re of Eq. for gamma_nm of [1] with the core index 1 replaced by n_gas, written as the exact
    square root of the transverse-resonance condition k_t = u/a (expanding it to first order in
    (u/(k a))^2 gives Marcatili's form). The square-root form for gas filling is common practice
    in the hollow-fiber literature (from memory, no specific source verified).

    References
    ----------
    E. A. J. Marcatili and R. A. Schmeltzer, Bell Syst. Tech. J. 43, 1783 (1964).
    """
    arg = (omega * n_gas / c) ** 2 - (u / core_radius) ** 2
    return np.sqrt(np.maximum(arg, 0.0))


def capillary_attenuation_marcatili1964(
    omega: np.ndarray, core_radius: float, n_gas: np.ndarray, n_clad: np.ndarray, u: float
) -> np.ndarray:
    """Field attenuation of an EH1m mode of a straight dielectric tube.

    Parameters
    ----------
    omega : ndarray
        Angular frequency. [rad/s]
    core_radius : float
        Core radius a. [m]
    n_gas, n_clad : ndarray
        Indices of the core gas and of the wall. [-]
    u : float
        Mode eigenvalue u_1m. [-]

    Returns
    -------
    ndarray
        alpha = (u/2pi)^2 (lambda_g^2 / a^3) Re[(nu^2+1)/(2 sqrt(nu^2-1))] with
        lambda_g = 2 pi c/(omega n_gas) and nu = n_clad/n_gas. FIELD attenuation. [1/m]

    Notes
    -----
    alpha = Im gamma_nm of [1] for the EH_nm modes (fields ~ exp(i gamma z), so power falls as
    exp(-2 alpha z)). Marcatili treat an empty tube (core index 1); for a gas core the
    wavelength in the gas and the index ratio nu are used (our generalisation; the change
    relative to the vacuum form is of order n_gas - 1). Valid for a >> lambda and |nu| a >> lambda.

    References
    ----------
    E. A. J. Marcatili and R. A. Schmeltzer, Bell Syst. Tech. J. 43, 1783 (1964).
    """
    wavelength_gas = 2.0 * np.pi * c / (omega * n_gas)
    nu = n_clad / n_gas
    return (u / (2.0 * np.pi)) ** 2 * wavelength_gas**2 / core_radius**3 * _eh_wall_factor(nu)


def capillary_bend_attenuation_marcatili1964(
    omega: np.ndarray,
    core_radius: float,
    bend_radius: float,
    n_gas: np.ndarray,
    n_clad: np.ndarray,
    u: float,
) -> np.ndarray:
    """Extra field attenuation of an EH1m mode in a tube bent to radius R.

    Parameters
    ----------
    omega : ndarray
        Angular frequency. [rad/s]
    core_radius : float
        Core radius a. [m]
    bend_radius : float
        Radius of curvature R of the fiber axis. [m]
    n_gas, n_clad : ndarray
        Indices of the core gas and of the wall. [-]
    u : float
        Mode eigenvalue u_1m. [-]

    Returns
    -------
    ndarray
        alpha_bend = (4/3) (2pi/u)^2 a^3 / (lambda_g^2 R^2) (1 + 1/u^2)
        * Re[(nu^2+1)/(2 sqrt(nu^2-1))].
        FIELD attenuation, to be added to the straight-tube value. [1/m]

    Notes
    -----
    Curvature term of [1] for the EH_nm modes, [1 - n(n-2)/u_nm^2] = 1 + 1/u^2 for n = 1,
    **written from memory, not checked against the paper**. The paper's dependence on the
    angle between the polarisation and the plane of the bend is averaged out here (taken as
    its mean, an assumption). Equivalent form: alpha(inf) (4/3) (2 pi a/(u lambda))^4 (a/R)^2
    (1 + 1/u^2). Valid for a bend that is gentle on the scale of the mode (the paper's
    perturbation regime, a/R small).

    References
    ----------
    E. A. J. Marcatili and R. A. Schmeltzer, Bell Syst. Tech. J. 43, 1783 (1964); the bend
    term written from memory, not checked against the paper.
    """
    wavelength_gas = 2.0 * np.pi * c / (omega * n_gas)
    nu = n_clad / n_gas
    geometry = (4.0 / 3.0) * (2.0 * np.pi / u) ** 2 * core_radius**3
    polarisation_averaged = (1.0 + 1.0 / u**2) * _eh_wall_factor(nu)
    return geometry / (wavelength_gas**2 * bend_radius**2) * polarisation_averaged


def check_gas_filled_fiber(core_radius: float, length: float, gas) -> None:
    """Check the inputs every gas-filled hollow-core model shares.

    Parameters
    ----------
    core_radius : float
        Core radius, > 0. [m]
    length : float
        Fiber length, > 0. [m]
    gas : GasLike
        Filling medium with ``refractive_index(omega)`` and ``n2`` [m^2/W].

    Raises
    ------
    ConfigError
        Naming the first bad input (``fiber core_radius``, ``fiber length`` or ``fiber gas``).

    References
    ----------
    none: numerical helper (input checks)
    """
    if not core_radius > 0:
        raise ConfigError(f"fiber core_radius = {core_radius} m: must be > 0")
    if not length > 0:
        raise ConfigError(f"fiber length = {length} m: must be > 0")
    if not isinstance(gas, GasLike):
        raise ConfigError(
            f"fiber gas = {gas!r}: must provide refractive_index(omega) and n2 [m^2/W]"
        )


class GasFilledCore:
    """Methods shared by the gas-filled hollow-core models (capillary, anti-resonant).

    A base for frozen dataclasses with the fields ``core_radius`` [m], ``gas``
    (:class:`~hcfplan.fibers.base.GasLike`) and ``cladding`` (name or
    :class:`~hcfplan.materials.solids.SolidMaterial`) and the property ``u``, the eigenvalue of
    the J0 core mode [-]. It gives them the wall material, the Kerr coefficient of the fill, and
    the mode area, nonlinear coefficient and peak-intensity area of the J0 mode of radius
    ``core_radius`` (items 3-6 of :mod:`hcfplan.fibers.base`).
    """

    def _material(self) -> SolidMaterial:
        if isinstance(self.cladding, SolidMaterial):
            return self.cladding
        return load_material(self.cladding)

    @property
    def kerr_n2(self) -> float:
        """n2 of the filling gas used in gamma. [m^2/W]

        References
        ----------
        none: the n2 of the fill (the gas table cites its source)
        """
        return float(self.gas.n2)

    def effective_area(self, omega: np.ndarray) -> np.ndarray:
        """A_eff of the J0 mode of radius ``core_radius`` (frequency independent). [m^2]

        References
        ----------
        J0 mode of E. A. J. Marcatili and R. A. Schmeltzer, Bell Syst. Tech. J. 43, 1783 (1964).
        """
        return np.full(np.shape(omega), effective_area_j0(self.core_radius, self.u))

    def nonlinear_coefficient(self, omega: np.ndarray) -> np.ndarray:
        """gamma(omega) = n2 omega / (c A_eff). [1/(W m)]

        References
        ----------
        none: definition of gamma (common practice, no source)
        """
        omega = np.asarray(omega, dtype=float)
        return self.kerr_n2 * omega / (c * self.effective_area(omega))

    @property
    def peak_intensity_area(self) -> float:
        """A_I = pi a^2 J1(u)^2 so that the on-axis intensity is P / A_I (J0 mode). [m^2]

        References
        ----------
        J0 mode of E. A. J. Marcatili and R. A. Schmeltzer, Bell Syst. Tech. J. 43, 1783 (1964).
        """
        return peak_intensity_area(self.core_radius, self.u)


@dataclass(frozen=True)
class CapillaryFiber(GasFilledCore):
    """Gas-filled dielectric capillary, EH1m mode of Marcatili & Schmeltzer [1].

    Parameters
    ----------
    core_radius : float
        Bore radius a. [m]
    length : float
        Fiber length. [m]
    gas : GasLike
        Filling medium (``refractive_index(omega)``, ``n2`` [m^2/W]).
    cladding : str or SolidMaterial
        Wall material (name from :func:`hcfplan.materials.solids.material_names`).
    mode : tuple of int
        (n, m) = (1, m) for EH1m; only n = 1 is modelled.
    bend_radius : float or None
        Radius of curvature of the fiber axis, None for straight. [m]

    Notes
    -----
    ``attenuation`` returns the FIELD attenuation alpha [1/m]: the power falls as
    exp(-2 alpha z) (Im gamma of [1]). gamma(omega) = n2 omega / (c A_eff) carries the full
    frequency dependence of the Kerr term (A_eff of the J0 mode does not depend on omega).
    Valid for a >> wavelength (a ValidityWarning below k a = 5 u).
    """

    core_radius: float
    length: float
    gas: GasLike
    cladding: str | SolidMaterial = "fused_silica"
    mode: tuple[int, int] = (1, 1)
    bend_radius: float | None = None

    def __post_init__(self) -> None:
        check_gas_filled_fiber(self.core_radius, self.length, self.gas)
        if len(self.mode) != 2 or self.mode[0] != 1:
            raise ConfigError(f"fiber mode = {self.mode!r}: only EH1m modes (1, m) are modelled")
        eh_eigenvalue(self.mode[1])
        if self.bend_radius is not None and not self.bend_radius > 0:
            raise ConfigError(f"fiber bend_radius = {self.bend_radius} m: must be > 0 or None")
        self._material()

    @property
    def u(self) -> float:
        """Mode eigenvalue u_1m (m-th zero of J0). [-]

        References
        ----------
        E. A. J. Marcatili and R. A. Schmeltzer, Bell Syst. Tech. J. 43, 1783 (1964).
        """
        return eh_eigenvalue(self.mode[1])

    def _indices(self, omega: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        omega = np.asarray(omega, dtype=float)
        if np.any(omega * self.core_radius / c < MIN_KA_OVER_U * self.u):
            warnings.warn(
                f"capillary a = {self.core_radius:.3g} m: some wavelengths are not << a "
                f"(k a < {MIN_KA_OVER_U:g} u); Marcatili model extrapolated",
                ValidityWarning,
                stacklevel=3,
            )
        return omega, self.gas.refractive_index(omega), solid_index(self._material(), omega)

    def propagation_constant(self, omega: np.ndarray) -> np.ndarray:
        """beta(omega) of the mode including the gas dispersion. [rad/m]

        References
        ----------
        E. A. J. Marcatili and R. A. Schmeltzer, Bell Syst. Tech. J. 43, 1783 (1964).
        """
        omega = np.asarray(omega, dtype=float)
        return capillary_propagation_constant(
            omega, self.core_radius, self.gas.refractive_index(omega), self.u
        )

    def attenuation(self, omega: np.ndarray) -> np.ndarray:
        """FIELD attenuation alpha(omega), straight tube plus bend term. [1/m]

        References
        ----------
        E. A. J. Marcatili and R. A. Schmeltzer, Bell Syst. Tech. J. 43, 1783 (1964).
        """
        omega, n_gas, n_clad = self._indices(omega)
        alpha = capillary_attenuation_marcatili1964(omega, self.core_radius, n_gas, n_clad, self.u)
        if self.bend_radius is not None:
            alpha = alpha + capillary_bend_attenuation_marcatili1964(
                omega, self.core_radius, self.bend_radius, n_gas, n_clad, self.u
            )
        return alpha

    #: What :meth:`attenuation` is (the summary's ``fiber.loss_model``).
    loss_model = "capillary_marcatili1964"

    def describe(self) -> dict:
        """Defining SI parameters of the model.

        References
        ----------
        none: no physics (the model's defining parameters)
        """
        material = self._material()
        return {
            "model": "capillary",
            "mode": f"EH1{self.mode[1]}",
            "core_radius": self.core_radius,
            "length": self.length,
            "cladding": material.name,
            "bend_radius": self.bend_radius,
            "kerr_n2": self.kerr_n2,
            "attenuation": ATTENUATION_CONVENTION,
        }
