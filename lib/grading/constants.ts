/**
 * Physical constants used by the grading engine.
 *
 * Each constant carries its name, value, unit, standard uncertainty and source, so that
 * the source can be printed in feedback and checked in tests (the astropy.constants idea).
 * Values: CODATA 2018 recommended values (E. Tiesinga, P. J. Mohr, D. B. Newell,
 * B. N. Taylor, Rev. Mod. Phys. 93, 025010 (2021)). Since the 2019 SI redefinition
 * c, h, k_B, N_A and e are exact (uncertainty 0).
 */
export interface PhysicalConstant {
  readonly name: string;
  readonly symbol: string;
  readonly value: number;
  readonly unit: string;
  /** Standard uncertainty in the same unit; 0 for constants exact by definition of the SI. */
  readonly uncertainty: number;
  readonly source: string;
}

const CODATA_2018 = 'CODATA 2018 recommended values (Tiesinga et al., Rev. Mod. Phys. 93, 025010 (2021))';

function constant(name: string, symbol: string, value: number, unit: string, uncertainty: number): PhysicalConstant {
  return Object.freeze({ name, symbol, value, unit, uncertainty, source: CODATA_2018 });
}

export const SPEED_OF_LIGHT = constant('speed of light in vacuum', 'c', 299792458, 'm s⁻¹', 0);
export const PLANCK_CONSTANT = constant('Planck constant', 'h', 6.62607015e-34, 'J s', 0);
export const BOLTZMANN_CONSTANT = constant('Boltzmann constant', 'k_B', 1.380649e-23, 'J K⁻¹', 0);
export const AVOGADRO_CONSTANT = constant('Avogadro constant', 'N_A', 6.02214076e23, 'mol⁻¹', 0);
export const ELEMENTARY_CHARGE = constant('elementary charge', 'e', 1.602176634e-19, 'C', 0);
export const ATOMIC_MASS_CONSTANT = constant(
  'atomic mass constant (unified atomic mass unit)',
  'm_u',
  1.6605390666e-27,
  'kg',
  0.0000000005e-27,
);

export const PHYSICAL_CONSTANTS: readonly PhysicalConstant[] = [
  SPEED_OF_LIGHT,
  PLANCK_CONSTANT,
  BOLTZMANN_CONSTANT,
  AVOGADRO_CONSTANT,
  ELEMENTARY_CHARGE,
  ATOMIC_MASS_CONSTANT,
];

// Short names for the formulas below; all SI.
export const c = SPEED_OF_LIGHT.value;
export const h = PLANCK_CONSTANT.value;
export const kB = BOLTZMANN_CONSTANT.value;
export const NA = AVOGADRO_CONSTANT.value;
export const e = ELEMENTARY_CHARGE.value;
export const u = ATOMIC_MASS_CONSTANT.value;

/** Students work in cm⁻¹; the engine stores wavenumbers in m⁻¹ (SI). 1 cm⁻¹ = 100 m⁻¹. */
export const PER_CM_IN_PER_M = 100;
