"""Physical constants and reference states used throughout tablegen (no thermodynamics).

Sources: BIPM, The International System of Units (SI), 9th ed. (2019), table 1,
for the defining constants; IUPAC (1982) for the 1 bar standard-state pressure.
"""

#: Avogadro constant, 1/mol: exact by the 2019 SI redefinition.
N_AVOGADRO = 6.02214076e23
#: Boltzmann constant, J/K: exact by the 2019 SI redefinition.
K_BOLTZMANN = 1.380649e-23
#: Molar gas constant R = N_A k, J/(mol K): 8.31446261815324, exact (CODATA 2018 prints
#: it to these digits; the 10-digit 8.314462618 often quoted is a truncation).
R_MOLAR = N_AVOGADRO * K_BOLTZMANN
#: Standard-state pressure of the polynomials, Pa (IUPAC 1982 standard, 1 bar).
P_STD = 100000.0
#: Thermochemical reference temperature, K.
T_REF = 298.15
