"""Physical constants in SI units (CODATA values, through scipy.constants)."""

from scipy import constants as _c

#: Vacuum permittivity, F/m.
EPSILON_0_F_PER_M: float = _c.epsilon_0
#: Vacuum permeability, H/m.
MU_0_H_PER_M: float = _c.mu_0
#: Speed of light in vacuum, m/s.
SPEED_OF_LIGHT_M_PER_S: float = _c.c
