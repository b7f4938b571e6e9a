"""Physical constants (CODATA values via scipy.constants) and named numerical limits.

Everything here is SI. Import constants from this module rather than from scipy directly so
that there is one place to look.
"""

from scipy import constants as _sc

c = _sc.c  #: speed of light in vacuum [m/s]
epsilon_0 = _sc.epsilon_0  #: vacuum permittivity [F/m]
mu_0 = _sc.mu_0  #: vacuum permeability [H/m]
e = _sc.e  #: elementary charge [C]
m_e = _sc.m_e  #: electron mass [kg]
hbar = _sc.hbar  #: reduced Planck constant [J s]
h = _sc.h  #: Planck constant [J s]
k_B = _sc.k  #: Boltzmann constant [J/K]
N_A = _sc.N_A  #: Avogadro constant [1/mol]
R_gas = _sc.R  #: molar gas constant [J/(mol K)]
eV = _sc.electron_volt  #: one electronvolt [J]

#: Atomic units (Hartree), used by the ionisation rates.
au_energy = _sc.physical_constants["atomic unit of energy"][0]  # [J]
au_time = _sc.physical_constants["atomic unit of time"][0]  # [s]
au_field = _sc.physical_constants["atomic unit of electric field"][0]  # [V/m]

#: Standard conditions used to state reference densities.
T_0C = 273.15  #: 0 degC [K]
P_1BAR = 1.0e5  #: one bar [Pa]
P_1ATM = _sc.atm  #: one standard atmosphere [Pa]
T_ROOM = 293.15  #: default fill temperature, 20 degC [K]
