"""The pump side of the generation crystal: the fluences at which two-photon absorption of the
pump, the free-carrier absorption of the THz it causes, and damage set in.

Three limits on the peak fluence F = 2 E / (pi w^2) of a Gaussian pump (1/e^2 radius w) on the
crystal; each scales with the pulse at a fixed shape, so it is reported as a fluence:

* **two-photon absorption of the pump**: dI/dz = -beta I^2 [1] loses a share ~beta I0 L of the
  pump over the crystal length L (peak intensity I0 = 2 P / (pi w^2)); its limit is the fluence
  at which beta I0 L = 1 (the pump is then depleted and the THz no longer grows as F^2).
* **free-carrier absorption of the THz**: two-photon absorption leaves N = beta / (2 hbar omega)
  int I^2 dt electron-hole pairs per volume at the beam centre (one pair per two photons). In
  the low-frequency Drude limit (Omega tau << 1) they absorb the THz power with
  alpha_fc = N e mu / (eps0 n_THz c), mu the sum of the electron and hole mobilities of the
  crystal table (common practice, no source; the saturation of optical-rectification THz by
  these carriers is reported in [2]). Its limit is the fluence at which alpha_fc L = 1; since
  N ~ F^2, it is F (alpha_fc L)^(-1/2). The carriers are taken at their density after the pulse
  over the whole crystal (an upper bound: the THz generated early in the pulse sees fewer).
* **damage**: the table's (or the user's) damage fluence, a screening level.

Two-photon absorption counts only when twice the photon energy exceeds a band gap of the table
and its coefficient was given at a wavelength within :data:`TWO_PHOTON_WAVELENGTH_SPAN` of the
pump (beta depends strongly on wavelength). The limit that binds is the lowest of the three.

References
----------
.. [1] M. Sheik-Bahae, A. A. Said, T.-H. Wei, D. J. Hagan, E. W. Van Stryland, "Sensitive
       measurement of optical nonlinearities using a single beam," IEEE J. Quantum Electron.
       26, 760 (1990) (dI/dz = -alpha I - beta I^2) [from memory, not retrieved].
.. [2] S. A. Ku, C. M. Tu, W.-C. Chu, C.-W. Luo, K. H. Wu, A. Yabushita, C. C. Chi, T. Kobayashi,
       "Saturation of the free carrier absorption in ZnTe crystals," Opt. Express 21, 13930
       (2013) [from memory, not retrieved].
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from hcfplan.constants import c, e, epsilon_0, hbar
from hcfplan.materials.crystals import CrystalTable, thz_index

#: Relative distance between the pump wavelength and the wavelength of the table's
#: two-photon coefficient within which the coefficient is used (common practice, no source).
TWO_PHOTON_WAVELENGTH_SPAN = 0.15
#: THz frequency at which n_THz enters the free-carrier absorption. [Hz]
FREE_CARRIER_FREQUENCY = 1.0e12
#: Names of the limits, as reported in ``binding``.
LIMIT_NAMES = ("damage", "two_photon_absorption", "free_carrier_absorption")


@dataclass(frozen=True)
class CrystalLimits:
    """The pump fluence on the crystal and its limits (``None`` where a limit is not known).

    Attributes
    ----------
    fluence : float
        Peak fluence 2 E / (pi w^2). [J/m^2]
    peak_intensity : float
        Peak intensity 2 P / (pi w^2). [W/m^2]
    damage_fluence, two_photon_fluence, free_carrier_fluence : float or None
        The three limits of the module docstring. [J/m^2]
    two_photon_loss : float or None
        beta I0 L at the given pulse. [-]
    free_carrier_absorption : float or None
        alpha_fc L of the THz power at the given pulse. [-]
    binding : str or None
        Name of the lowest limit (:data:`LIMIT_NAMES`), ``None`` when none is known.
    notes : tuple of str
        Why a limit is missing.
    """

    fluence: float
    peak_intensity: float
    damage_fluence: float | None
    two_photon_fluence: float | None
    free_carrier_fluence: float | None
    two_photon_loss: float | None
    free_carrier_absorption: float | None
    binding: str | None
    notes: tuple[str, ...] = ()

    @property
    def limit_fluence(self) -> float | None:
        """The binding limit's fluence. [J/m^2]"""
        return None if self.binding is None else self.limits()[self.binding]

    @property
    def margin(self) -> float | None:
        """Binding limit / fluence (>= 1: below every known limit). [-]"""
        limit = self.limit_fluence
        return None if limit is None else float(limit / self.fluence)

    def limits(self) -> dict[str, float]:
        """Known limits by name. [J/m^2]"""
        values = (self.damage_fluence, self.two_photon_fluence, self.free_carrier_fluence)
        return {n: float(v) for n, v in zip(LIMIT_NAMES, values, strict=True) if v is not None}


def two_photon_coefficient(crystal: CrystalTable, omega_pump: float) -> tuple[float | None, str]:
    """The table's two-photon coefficient if it applies at the pump, else ``None`` and why.

    Parameters
    ----------
    crystal : CrystalTable
        Generation crystal.
    omega_pump : float
        Pump centre angular frequency. [rad/s]

    Returns
    -------
    (float or None, str)
        beta [m/W] and an empty string, or ``None`` and the reason.

    References
    ----------
    The coefficient is the table's (its source string); the gap test is common practice, no
    source.
    """
    gaps = [g for g in (crystal.band_gap_indirect, crystal.band_gap_direct) if g is not None]
    if not gaps or 2 * hbar * omega_pump <= min(gaps):
        return None, ""
    beta, wavelength = crystal.two_photon_coefficient, crystal.two_photon_wavelength
    pump_wavelength = 2 * np.pi * c / omega_pump
    if beta is None or wavelength is None:
        return None, (f"{crystal.name}: two-photon absorption expected but the table gives no "
                      "coefficient: its fluence limit is not estimated")
    if abs(pump_wavelength / wavelength - 1) > TWO_PHOTON_WAVELENGTH_SPAN:
        return None, (f"{crystal.name}: the table's two-photon coefficient is for "
                      f"{wavelength * 1e9:.0f} nm, not {pump_wavelength * 1e9:.0f} nm: its "
                      "fluence limit is not estimated")
    return float(beta), ""


def crystal_fluence_limits(crystal: CrystalTable, thickness: float, *, pump_energy: float,
                           peak_power: float, power_squared_integral: float,
                           omega_pump: float, beam_radius: float,
                           damage_fluence: float | None = None) -> CrystalLimits:
    """Pump fluence on the crystal and its damage, two-photon and free-carrier limits.

    Parameters
    ----------
    crystal : CrystalTable
        Generation crystal.
    thickness : float
        Interaction length in the crystal. [m]
    pump_energy : float
        Pulse energy on the crystal. [J]
    peak_power : float
        Peak power. [W]
    power_squared_integral : float
        int P(t)^2 dt of the pulse. [W^2 s]
    omega_pump : float
        Pump centre angular frequency. [rad/s]
    beam_radius : float
        Pump 1/e^2 intensity radius. [m]
    damage_fluence : float or None
        Damage fluence; ``None`` uses the table's. [J/m^2]

    Returns
    -------
    CrystalLimits

    References
    ----------
    .. [1] M. Sheik-Bahae et al., IEEE J. Quantum Electron. 26, 760 (1990) [from memory].
    .. [2] S. A. Ku et al., Opt. Express 21, 13930 (2013) [from memory].
    Drude free-carrier absorption and the Gaussian-beam peak fluence: common practice, no
    source.
    """
    area = np.pi * beam_radius**2 / 2  # peak value of a Gaussian: 2 X / (pi w^2)
    fluence, intensity = pump_energy / area, peak_power / area
    damage = damage_fluence if damage_fluence is not None else crystal.damage_fluence
    notes = []
    beta, why = two_photon_coefficient(crystal, omega_pump)
    tpa_fluence = fc_fluence = loss = alpha_l = None
    if why:
        notes.append(why)
    if beta is not None:
        loss = beta * intensity * thickness  # beta I0 L
        tpa_fluence = fluence / loss
        pairs = beta / (2 * hbar * omega_pump) * power_squared_integral / area**2  # [1/m^3]
        mobility = crystal.carrier_mobility
        if mobility is None:
            notes.append(f"{crystal.name}: no carrier mobility in the table: the free-carrier "
                         "limit is not estimated")
        else:
            n_thz = float(thz_index(crystal, 2 * np.pi * FREE_CARRIER_FREQUENCY).real)
            alpha_l = pairs * e * mobility / (epsilon_0 * n_thz * c) * thickness  # Drude
            fc_fluence = fluence / np.sqrt(alpha_l)
    limits = {n: v for n, v in zip(LIMIT_NAMES, (damage, tpa_fluence, fc_fluence), strict=True)
              if v is not None}
    binding = min(limits, key=limits.get) if limits else None
    return CrystalLimits(float(fluence), float(intensity), damage, tpa_fluence, fc_fluence,
                         loss, alpha_l, binding, tuple(notes))


def limit_warnings(crystal_name: str, limits: CrystalLimits) -> list[str]:
    """One warning when the pump fluence exceeds the binding limit, naming it.

    Parameters
    ----------
    crystal_name : str
        For the message.
    limits : CrystalLimits
        From :func:`crystal_fluence_limits`.

    Returns
    -------
    list of str

    References
    ----------
    None: message helper.
    """
    if limits.binding is None or limits.margin >= 1:
        return []
    text = {"damage": "its damage fluence (screening level of the table or thz."
                      "damage_fluence_j_per_cm2)",
            "two_photon_absorption": "the two-photon absorption limit (beta I L = 1: the pump "
                                     "is depleted, THz no longer grows as F^2)",
            "free_carrier_absorption": "the free-carrier limit (carriers from two-photon "
                                       "absorption absorb the THz, alpha_fc L = 1)"}
    over = [n for n, v in limits.limits().items() if v < limits.fluence]
    return [f"{crystal_name}: pump peak fluence {limits.fluence * 1e-4:.3g} J/cm^2 exceeds "
            f"{text[limits.binding]} at {limits.limit_fluence * 1e-4:.3g} J/cm^2, the limit "
            f"that binds (exceeded: {', '.join(over)}); the estimate above it is not valid"]
