/**
 * Strong-field rules of thumb for high-harmonic generation: the ponderomotive energy and the
 * classical cutoff law Ecut = Ip + 3.17·Up (Krause, Schafer & Kulander, PRL 68, 3535 (1992);
 * Corkum, PRL 71, 1994 (1993)).
 */

/** Electron charge (C) and speed of light (m/s), exact in the 2019 SI. */
const E_CHARGE = 1.602176634e-19;
const C_LIGHT = 299792458;
/** Electron mass (kg) and vacuum permittivity (F/m), CODATA 2018. */
const M_ELECTRON = 9.1093837015e-31;
const EPSILON_0 = 8.8541878128e-12;

/**
 * Up[eV] = e·I·λ² / (8π² m_e c³ ε0) expressed per (W/cm²)·µm²: 9.33729e-14 from the constants
 * (the textbook rounding is 9.33e-14).
 */
export const PONDEROMOTIVE_EV_PER_WCM2_UM2 = (E_CHARGE * 1e4 * 1e-12) / (8 * Math.PI ** 2 * M_ELECTRON * C_LIGHT ** 3 * EPSILON_0);

/** Classical maximum return energy in units of Up (3.1731…, commonly rounded to 3.17). */
export const CUTOFF_UP_FACTOR = 3.17;

/** Ponderomotive energy (eV) of a linearly polarised field of peak intensity I (W/cm²) at λ (µm). */
export function ponderomotiveEnergyEv(intensityWcm2: number, wavelengthUm: number): number {
  return PONDEROMOTIVE_EV_PER_WCM2_UM2 * intensityWcm2 * wavelengthUm * wavelengthUm;
}

/** Classical cutoff photon energy Ip + 3.17·Up, eV. */
export function cutoffEnergyEv(ipEv: number, intensityWcm2: number, wavelengthUm: number): number {
  return ipEv + CUTOFF_UP_FACTOR * ponderomotiveEnergyEv(intensityWcm2, wavelengthUm);
}
