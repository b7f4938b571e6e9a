"""Physical constants (CODATA 2022 recommended values) and named numerical limits.

Everything here is SI. Import constants from this module rather than from a library so that
there is one place to look. The values are written out rather than read from
``scipy.constants``: importing any part of scipy loads its array-API layer (about 0.1 s of a
command's start-up, measured), and the main command needs no other part of scipy. The tests
check every value here against ``scipy.constants`` (tests/test_constants.py).

Since the 2019 revision of the SI, c, h, e, k_B and N_A are exact by definition [1]; hbar, R
and the electronvolt follow from them exactly. epsilon_0, mu_0, m_e and the atomic units are
measured values [2].

References
----------
.. [1] Bureau International des Poids et Mesures, *The International System of Units (SI)*,
       9th ed., 2019 (the defining constants).
.. [2] P. J. Mohr, D. B. Newell, B. N. Taylor and E. Tiesinga, "CODATA recommended values of
       the fundamental physical constants: 2022," Rev. Mod. Phys. 97, 025002 (2025)
       [journal reference from memory; the values are checked against scipy.constants].
"""

from math import pi as _pi

c = 299792458.0  #: speed of light in vacuum [m/s] (exact)
h = 6.62607015e-34  #: Planck constant [J s] (exact)
hbar = h / (2 * _pi)  #: reduced Planck constant [J s] (exact)
e = 1.602176634e-19  #: elementary charge [C] (exact)
k_B = 1.380649e-23  #: Boltzmann constant [J/K] (exact)
N_A = 6.02214076e23  #: Avogadro constant [1/mol] (exact)
R_gas = N_A * k_B  #: molar gas constant [J/(mol K)] (exact)
eV = e  #: one electronvolt [J] (exact)
epsilon_0 = 8.8541878188e-12  #: vacuum permittivity [F/m] (CODATA 2022)
mu_0 = 1.25663706127e-6  #: vacuum permeability [H/m] (CODATA 2022)
m_e = 9.1093837139e-31  #: electron mass [kg] (CODATA 2022)

#: Atomic units (Hartree), used by the ionisation rates (CODATA 2022).
au_energy = 4.359744722206e-18  # [J]
au_time = 2.4188843265864e-17  # [s]
au_field = 5.14220675112e11  # [V/m]

#: Standard conditions used to state reference densities.
T_0C = 273.15  #: 0 degC [K]
P_1BAR = 1.0e5  #: one bar [Pa]
P_1ATM = 101325.0  #: one standard atmosphere [Pa] (exact by definition)
T_ROOM = 293.15  #: default fill temperature, 20 degC [K]
