"""Physical and conventional constants used by the engine.

=====================  ========  =========  ==============  ==============================================
name                   symbol    unit       value           source
=====================  ========  =========  ==============  ==============================================
P_ATM_BAR              P0        bar        1.01325         ISO 2533 / ICAO standard atmosphere, sea level
FSW_PER_ATM            -         fsw/atm    33              U.S. Navy Diving Manual convention (33 fsw = 1 atm)
BAR_PER_FSW            -         bar/fsw    1.01325 / 33    derived from the two rows above
BAR_PER_MSW            -         bar/msw    0.1             definition of the metre of sea water
G0                     g         m/s^2      9.80665         standard gravity (CGPM 1901)
RHO_SALT               rho_s     kg/m^3     1025.0          common practice, no source (mean sea water)
RHO_FRESH              rho_f     kg/m^3     1000.0          common practice, no source
FT_PER_M               -         ft/m       1 / 0.3048      international foot (1959 agreement)
BAR_PER_PSI            -         bar/psi    0.0689475729    NIST SP 811 (1 psi = 6894.757 Pa)
PH2O_BAR               PH2O      bar        0.0627          lung water vapour at 37 C, Bühlmann convention
                                                            (RQ 1); from memory, see tables/models
R_GAS                  R         J/(mol K)  8.314462618     CODATA 2018
M_O2, M_N2, M_HE       M         g/mol      31.999, 28.013, IUPAC standard atomic weights, from memory
                                            4.0026
M_AIR                  M_air     g/mol      28.9655         CoolProp ``PropsSI('M','Air')`` (Lemmon 2000)
ISA_T0_K               T0        K          288.15          ISO 2533 / ICAO standard atmosphere
ISA_LAPSE_K_PER_M      L         K/m        0.0065          ISO 2533 / ICAO standard atmosphere
ISA_M_AIR              M         kg/mol     0.0289644       U.S. Standard Atmosphere 1976
FO2_AIR                -         -          0.21            convention of the air tables (21 % O2, 79 % N2)
=====================  ========  =========  ==============  ==============================================
"""

from __future__ import annotations

P_ATM_BAR: float = 1.01325
FSW_PER_ATM: float = 33.0
BAR_PER_FSW: float = P_ATM_BAR / FSW_PER_ATM
BAR_PER_MSW: float = 0.1
G0: float = 9.80665
RHO_SALT: float = 1025.0
RHO_FRESH: float = 1000.0
M_PER_FT: float = 0.3048
FT_PER_M: float = 1.0 / M_PER_FT
BAR_PER_PSI: float = 0.0689475729
PH2O_BAR: float = 0.0627
R_GAS: float = 8.314462618
M_O2: float = 31.999
M_N2: float = 28.013
M_HE: float = 4.0026
M_AIR: float = 28.9655
ISA_T0_K: float = 288.15
ISA_LAPSE_K_PER_M: float = 0.0065
ISA_M_AIR: float = 0.0289644
FO2_AIR: float = 0.21
