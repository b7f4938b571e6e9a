"""Gas-filled tube-type anti-resonant hollow-core fiber: analytic model of Zeisberger & Schmidt.

The fiber is modelled as a core of radius R bounded by one glass wall of thickness d with gas
on both sides (the "tube-type" model of [1]). Conventions of :mod:`hcfplan.numerics.grid`;
``attenuation`` is the FIELD attenuation (power ~ exp(-2 alpha z)).

What was checked here (the formula of [1] was written from memory, then re-derived):
the wall correction below was derived independently, to first order in the wall impedance, from
(i) the J0 core field and the boundary condition at r = R, (ii) the transfer of the transverse
wave impedance through a planar wall of thickness d terminated by gas, for TE- and TM-like
polarisation, (iii) the average of the two for the hybrid HE11 mode as in Marcatili &
Schmeltzer [3]. It reproduces the remembered form of [1] exactly, and: it has the Marcatili
term as its limit for a thick absorbing wall (cot phi -> -i), and its loss diverges where
cot phi diverges, phi = m pi, i.e. at the ARROW resonances of [2]. The equation numbers of [1]
were not checked.

References
----------
.. [1] M. Zeisberger, M. A. Schmidt, "Analytic model for the complex effective index of the leaky
       modes of tube-type anti-resonant hollow core fibers," Sci. Rep. 7, 11761 (2017),
       doi:10.1038/s41598-017-12234-5.
.. [2] N. M. Litchinitser, A. K. Abeeluck, C. Headley, B. J. Eggleton, "Antiresonant reflecting
       photonic crystal optical waveguides," Opt. Lett. 27, 1592-1594 (2002),
       doi:10.1364/OL.27.001592 [from memory].
.. [3] E. A. J. Marcatili, R. A. Schmeltzer, Bell Syst. Tech. J. 43, 1783 (1964).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from hcfplan.constants import c
from hcfplan.errors import ConfigError
from hcfplan.fibers.base import GasLike
from hcfplan.fibers.capillary import (
    ATTENUATION_CONVENTION,
    GasFilledCore,
    capillary_propagation_constant,
    check_gas_filled_fiber,
)
from hcfplan.fibers.modes import U11
from hcfplan.materials.solids import SolidMaterial
from hcfplan.materials.solids import refractive_index as solid_index

_RESONANCE_ITERATIONS = 60  # most fixed-point steps for lambda_m = (2d/m) sqrt(n_glass^2 - n_gas^2)
#: Relative change of every lambda_m at which the iteration stops: 17-25 steps for 6-8 orders
#: of the demo fiber (all 60 steps, each evaluating both indices, were 10 % of its scan point).
#: Orders whose lambda_m lies beyond the glass table's range need not settle (seen at m >= 11,
#: below 115 nm for a 0.7 um silica wall) and take all 60 steps, as before.
_RESONANCE_TOLERANCE = 1e-14
#: Resonance wavelengths solved so far, per fiber (equal fibers share them): a chain asks for
#: them seven times (fiber report, recorder, limits), 4-6 ms each for the demo fiber.
_KNOWN_RESONANCES: dict = {}
_KNOWN_RESONANCES_KEPT = 32
#: What the single-tube loss means for a real fiber (shown by the fiber report).
SINGLE_TUBE_LOSS_NOTE = (
    "the anti-resonant loss is the confinement loss of a single tube wall (Zeisberger & "
    "Schmidt 2017), which overstates the loss of real single-ring and tube-lattice fibers by "
    "one to two orders of magnitude (they are commonly well below 1 dB/m near 1 um for "
    "25-50 um cores: from memory, no source verified); plan a real fiber with its measured "
    "loss, fiber.loss_db_per_m or fiber.loss_csv")


def wall_phase(omega: np.ndarray, wall_thickness: float, n_glass, n_gas) -> np.ndarray:
    """Transverse phase phi = k0 d sqrt(n_glass^2 - n_gas^2) across the wall. [rad]

    (omega [rad/s], wall_thickness [m]; complex ``n_glass`` allowed.)

    References
    ----------
    M. Zeisberger and M. A. Schmidt, Sci. Rep. 7, 11761 (2017).
    Resonances at phi = m pi: N. M. Litchinitser et al., Opt. Lett. 27, 1592 (2002) [from memory].
    """
    return omega / c * wall_thickness * np.sqrt(np.asarray(n_glass, dtype=complex) ** 2 - n_gas**2)


def arf_wall_index_zeisberger2017(
    omega: np.ndarray, core_radius: float, wall_thickness: float, n_glass, n_gas
) -> np.ndarray:
    """Complex wall correction to the effective index of the HE11-like core mode.

    Parameters
    ----------
    omega : ndarray
        Angular frequency. [rad/s]
    core_radius : float
        Core radius R. [m]
    wall_thickness : float
        Glass wall thickness d. [m]
    n_glass : ndarray
        Wall index (complex allowed, e.g. for the absorbing-wall limit). [-]
    n_gas : ndarray
        Gas index (inside and outside the wall). [-]

    Returns
    -------
    ndarray (complex)
        Delta n_eff; n_eff = n_gas - j01^2/(2 k0^2 n_gas R^2) + Delta n_eff. [-]

    Notes
    -----
    With eps = n_glass^2/n_gas^2, k0 = omega/c, j01 = u11, phi = :func:`wall_phase`:

    .. math::
        \\Delta n = \\frac{i j_{01}^2}{k_0^3 n_g^2 R^3} \\frac{1}{2\\sqrt{\\varepsilon-1}}
        \\left[i(\\varepsilon+1)\\cot\\phi
        + \\frac{j_{01}(\\varepsilon^2+1)}{k_0 n_g R \\sqrt{\\varepsilon-1}}(1+\\cot^2\\phi)\\right]

    For real indices: Re = -j01^2/(k0^3 n_g^2 R^3) (eps+1)/(2 sqrt(eps-1)) cot(phi) and
    Im = j01^3/(k0^4 n_g^3 R^4) (1 + cot^2 phi)(eps^2+1)/(2(eps-1)), the form of [1]
    (leading order in 1/(k0 R); d << R). Diverges at phi = m pi (resonances, [2]) where the
    perturbation expansion fails; trust it only outside the resonance bands.

    Real indices (eps > 1, the usual case) are computed with these real-valued forms: the
    complex square root, sine and cosine took most of a fiber report (the derivative rule
    evaluates the model at about 10^5 frequencies per call).

    References
    ----------
    M. Zeisberger and M. A. Schmidt, Sci. Rep. 7, 11761 (2017); written from memory and
    re-derived (module docstring).
    Resonances: N. M. Litchinitser et al., Opt. Lett. 27, 1592 (2002) [from memory].
    Thick-wall limit: E. A. J. Marcatili and R. A. Schmeltzer, Bell Syst. Tech. J. 43, 1783 (1964).
    """
    k0 = omega / c
    n_glass = np.asarray(n_glass)
    if not np.iscomplexobj(n_glass):
        eps_real = n_glass**2 / n_gas**2
        if np.all(eps_real > 1.0):
            root_real = np.sqrt(eps_real - 1.0)
            phase = k0 * wall_thickness * np.sqrt(n_glass**2 - n_gas**2)  # wall_phase, real
            cot_real = np.cos(phase) / np.sin(phase)
            half = U11**2 / (k0**3 * n_gas**2 * core_radius**3) / (2.0 * root_real)
            leak_real = U11 / (k0 * n_gas * core_radius * root_real)
            out = np.empty(np.broadcast(k0, eps_real).shape, dtype=complex)
            out.real = -half * (eps_real + 1.0) * cot_real
            out.imag = half * leak_real * (eps_real**2 + 1.0) * (1.0 + cot_real**2)
            return out
    eps = np.asarray(n_glass, dtype=complex) ** 2 / n_gas**2
    root = np.sqrt(eps - 1.0)
    phi = wall_phase(omega, wall_thickness, n_glass, n_gas)
    cot = np.cos(phi) / np.sin(phi)
    scale = U11**2 / (k0**3 * n_gas**2 * core_radius**3)
    leak = U11 / (k0 * n_gas * core_radius * root)
    bracket = 1j * (eps + 1.0) * cot + leak * (eps**2 + 1.0) * (1.0 + cot**2)
    return 1j * scale / (2.0 * root) * bracket


@dataclass(frozen=True)
class AntiresonantFiber(GasFilledCore):
    """Gas-filled tube-type anti-resonant fiber (Zeisberger & Schmidt model [1]).

    Parameters
    ----------
    core_radius : float
        Core radius R (inscribed radius of the tube ring). [m]
    wall_thickness : float
        Wall thickness d of the tubes. [m]
    length : float
        Fiber length. [m]
    gas : GasLike
        Filling medium (``refractive_index(omega)``, ``n2`` [m^2/W]).
    cladding : str or SolidMaterial
        Wall glass (name from :func:`hcfplan.materials.solids.material_names`).

    Notes
    -----
    beta = sqrt((k0 n_gas)^2 - (j01/R)^2) + k0 Re(Delta n) with Delta n from
    :func:`arf_wall_index_zeisberger2017`; the first term is the capillary phase constant of
    :mod:`hcfplan.fibers.capillary` (the paper's first-order expansion of it differs by
    O((j01/(k0 R))^4)). alpha = k0 Im(Delta n) is the FIELD attenuation. The mode area is that of
    the J0 mode of radius R (approximation: the plain core radius, no effective-radius
    correction). Valid away from the resonance bands (see :meth:`in_resonance_band`), for
    R >> wavelength and d << R.
    """

    core_radius: float
    wall_thickness: float
    length: float
    gas: GasLike
    cladding: str | SolidMaterial = "fused_silica"

    def __post_init__(self) -> None:
        check_gas_filled_fiber(self.core_radius, self.length, self.gas)
        if not 0 < self.wall_thickness < self.core_radius:
            raise ConfigError(
                f"fiber wall_thickness = {self.wall_thickness} m: must be > 0 and < core_radius"
            )
        self._material()

    @property
    def u(self) -> float:
        """Eigenvalue of the J0 core mode, u11 (first zero of J0). [-]

        References
        ----------
        J0 mode of E. A. J. Marcatili and R. A. Schmeltzer, Bell Syst. Tech. J. 43, 1783 (1964).
        """
        return U11

    def _wall_index(self, omega: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        omega = np.asarray(omega, dtype=float)
        n_gas = self.gas.refractive_index(omega)
        n_glass = solid_index(self._material(), omega)
        delta = arf_wall_index_zeisberger2017(
            omega, self.core_radius, self.wall_thickness, n_glass, n_gas
        )
        return n_gas, delta

    def propagation_constant(self, omega: np.ndarray) -> np.ndarray:
        """beta(omega) including the gas and the wall (anti-resonance) dispersion. [rad/m]

        References
        ----------
        M. Zeisberger and M. A. Schmidt, Sci. Rep. 7, 11761 (2017).
        E. A. J. Marcatili and R. A. Schmeltzer, Bell Syst. Tech. J. 43, 1783 (1964).
        """
        omega = np.asarray(omega, dtype=float)
        n_gas, delta = self._wall_index(omega)
        core = capillary_propagation_constant(omega, self.core_radius, n_gas, U11)
        return core + omega / c * delta.real

    def attenuation(self, omega: np.ndarray) -> np.ndarray:
        """FIELD attenuation alpha(omega) = k0 Im(Delta n). [1/m]

        References
        ----------
        M. Zeisberger and M. A. Schmidt, Sci. Rep. 7, 11761 (2017).
        """
        omega = np.asarray(omega, dtype=float)
        return omega / c * self._wall_index(omega)[1].imag

    def resonance_wavelengths(self, m_max: int) -> np.ndarray:
        """ARROW resonance wavelengths lambda_m, m = 1..m_max, with the dispersive indices. [m]

        Solves lambda_m = (2 d / m) sqrt(n_glass(lambda_m)^2 - n_gas(lambda_m)^2) ([2]) by
        fixed-point iteration (the right side varies slowly with lambda, so it converges fast).
        Each order stops at its own convergence, so lambda_m does not depend on ``m_max``; the
        orders solved are kept per fiber (:data:`_KNOWN_RESONANCES`) and reused.

        References
        ----------
        N. M. Litchinitser et al., Opt. Lett. 27, 1592 (2002) [from memory].
        """
        if not (isinstance(m_max, (int, np.integer)) and m_max >= 1):
            raise ConfigError(f"m_max = {m_max!r}: must be an integer >= 1")
        try:
            known = _KNOWN_RESONANCES.get(self)
        except TypeError:  # a gas or material that cannot be hashed: solve every time
            return self._solve_resonances(int(m_max))
        if known is None or known.size < m_max:
            known = self._solve_resonances(int(m_max))
            if len(_KNOWN_RESONANCES) >= _KNOWN_RESONANCES_KEPT:
                _KNOWN_RESONANCES.pop(next(iter(_KNOWN_RESONANCES)))
            _KNOWN_RESONANCES[self] = known
        return known[:m_max].copy()

    def _solve_resonances(self, m_max: int) -> np.ndarray:
        orders = np.arange(1, m_max + 1, dtype=float)
        material = self._material()
        wavelength = 2.0 * self.wall_thickness / orders * 1.45  # start from a typical glass
        active = np.ones(m_max, dtype=bool)
        for _ in range(_RESONANCE_ITERATIONS):
            omega = 2.0 * np.pi * c / wavelength[active]
            # high orders lie below the glass table's range, where its index may be nan: those
            # orders stay nan (handled below), so numpy's invalid-value warning is not news
            with np.errstate(invalid="ignore"):
                n_glass = solid_index(material, omega)
                n_gas = self.gas.refractive_index(omega)
                found = (2.0 * self.wall_thickness / orders[active]
                         * np.sqrt(n_glass**2 - n_gas**2))
            previous = wavelength[active]
            wavelength[active] = found
            # settled orders, and nan (beyond a table), stay as they are
            still = ~((np.abs(found - previous) <= _RESONANCE_TOLERANCE * found) | np.isnan(found))
            active[active] = still
            if not active.any():
                break
        return wavelength

    def in_resonance_band(self, omega: np.ndarray, width: float = 0.05) -> np.ndarray:
        """True where a wavelength lies within a relative band around a resonance.

        Parameters
        ----------
        omega : ndarray
            Angular frequency. [rad/s]
        width : float
            Full relative width of each band: |lambda - lambda_m| < width lambda_m / 2. [-]

        Returns
        -------
        ndarray of bool

        References
        ----------
        N. M. Litchinitser et al., Opt. Lett. 27, 1592 (2002) [from memory]; the band width is a
        choice (common practice, no source).
        """
        if not 0 < width < 1:
            raise ConfigError(f"resonance band width = {width}: must be in (0, 1)")
        omega = np.asarray(omega, dtype=float)
        wavelength = 2.0 * np.pi * c / omega
        m_needed = int(np.ceil(2.0 * self.wall_thickness * 2.0 / np.min(wavelength))) + 1
        resonances = self.resonance_wavelengths(max(m_needed, 1))
        distance = np.abs(wavelength[..., None] / resonances - 1.0)
        return np.any(distance < width / 2.0, axis=-1)

    #: What :meth:`attenuation` is (the summary's ``fiber.loss_model``): the confinement loss of
    #: one tube wall, which overstates the loss of real single-ring fibers (see
    #: :data:`SINGLE_TUBE_LOSS_NOTE`).
    loss_model = "antiresonant_single_tube_zeisberger2017"

    def describe(self) -> dict:
        """Defining SI parameters of the model.

        References
        ----------
        none: no physics (the model's defining parameters)
        """
        return {
            "model": "antiresonant",
            "mode": "HE11",
            "core_radius": self.core_radius,
            "wall_thickness": self.wall_thickness,
            "length": self.length,
            "cladding": self._material().name,
            "kerr_n2": self.kerr_n2,
            "attenuation": ATTENUATION_CONVENTION,
        }
