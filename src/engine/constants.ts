/**
 * Physical constants and unit conversions. SI 2019 exact values (CODATA 2018): the elementary
 * charge e and the Planck constant h are exact by definition; hbar = h / (2 pi).
 */
export const ELEMENTARY_CHARGE_C = 1.602176634e-19;
export const PLANCK_JS = 6.62607015e-34;
export const HBAR_JS = PLANCK_JS / (2 * Math.PI);
export const BOLTZMANN_J_PER_K = 1.380649e-23; // exact (SI 2019)
/** Conductance quantum per spin and valley, e^2/h in siemens. */
export const CONDUCTANCE_QUANTUM_S = (ELEMENTARY_CHARGE_C * ELEMENTARY_CHARGE_C) / PLANCK_JS;
/** Resistance quantum h/e^2 in ohms (von Klitzing constant). */
export const RESISTANCE_QUANTUM_OHM = PLANCK_JS / (ELEMENTARY_CHARGE_C * ELEMENTARY_CHARGE_C);
/** Flux quantum h/e in webers (the period of the Aharonov-Bohm phase for charge e). */
export const FLUX_QUANTUM_WB = PLANCK_JS / ELEMENTARY_CHARGE_C;
/** Graphene lattice constant (common practice, physics.md section 4). */
export const GRAPHENE_LATTICE_NM = 0.246;
export const JOULE_PER_MEV = ELEMENTARY_CHARGE_C * 1e-3;

/** Moire period l = a / (2 sin(theta / 2)) in nm. */
export function periodFromTwistNm(twistDegrees: number): number {
  const theta = (twistDegrees * Math.PI) / 180;
  return GRAPHENE_LATTICE_NM / (2 * Math.sin(theta / 2));
}

/** Inverse of periodFromTwistNm. */
export function twistFromPeriodDegrees(periodNm: number): number {
  return (2 * Math.asin(GRAPHENE_LATTICE_NM / (2 * periodNm)) * 180) / Math.PI;
}

/** Energy scale hbar v / l in meV (l in nm, v in m/s). One energy period is 2 pi times this. */
export function energyScaleMeV(periodNm: number, modeVelocityMps: number): number {
  return (HBAR_JS * modeVelocityMps) / (periodNm * 1e-9) / JOULE_PER_MEV;
}

/** Energy period 2 pi hbar v / l in meV. */
export function energyPeriodMeV(periodNm: number, modeVelocityMps: number): number {
  return 2 * Math.PI * energyScaleMeV(periodNm, modeVelocityMps);
}
