// Reference equation of state for dry air as a pseudo-pure fluid:
// Lemmon, Jacobsen, Penoncello, Friend (2000), J. Phys. Chem. Ref. Data 29:331, residual Helmholtz energy (Table 12 there).
// Slow (exp and pow per term, Newton for density); everything else uses the compact fit in air.ts, checked against this.

export const LEMMON_R = 8.31451; // J/(mol·K), the value used by the equation
export const LEMMON_MOLAR_MASS = 28.9586e-3; // kg/mol
export const LEMMON_T_REDUCING = 132.6312; // K
export const LEMMON_RHO_REDUCING = 10447.7; // mol/m³

// [N, d (density exponent), t (temperature exponent), l (exponent of δ inside exp(-δ^l)), 0 = no exponential]
const terms: readonly (readonly [number, number, number, number])[] = [
  [0.118160747229, 1, 0, 0],
  [0.713116392079, 1, 0.33, 0],
  [-1.61824192067, 1, 1.01, 0],
  [0.0714140178971, 2, 0, 0],
  [-0.0865421396646, 3, 0, 0],
  [0.134211176704, 3, 0.15, 0],
  [0.0112626704218, 4, 0, 0],
  [-0.0420533228842, 4, 0.2, 0],
  [0.0349008431982, 4, 0.35, 0],
  [0.000164957183186, 6, 1.35, 0],
  [-0.101365037912, 1, 1.6, 1],
  [-0.17381369097, 3, 0.8, 1],
  [-0.0472103183731, 5, 0.95, 1],
  [-0.0122523554253, 6, 1.25, 1],
  [-0.146629609713, 1, 3.6, 2],
  [-0.0316055879821, 3, 6, 2],
  [0.000233594806142, 11, 3.25, 2],
  [0.0148287891978, 1, 3.5, 3],
  [-0.00938782884667, 3, 15, 3],
];

/** Residual Helmholtz energy α_r(δ, τ) and its first two δ-derivatives. */
export function lemmonResidual(delta: number, tau: number): { ar: number; arD: number; arDD: number } {
  let ar = 0;
  let arD = 0;
  let arDD = 0;
  for (const [n, d, t, l] of terms) {
    const e = l === 0 ? 1 : Math.exp(-(delta ** l));
    const dl = l === 0 ? 0 : l * delta ** l;
    const base = n * tau ** t * e;
    ar += base * delta ** d;
    arD += base * delta ** (d - 1) * (d - dl);
    arDD += base * delta ** (d - 2) * ((d - dl) * (d - 1 - dl) - l * dl);
  }
  return { ar, arD, arDD };
}

/** Pressure in Pa at molar density rho (mol/m³) and temperature T (K). */
export function lemmonPressure(rhoMol: number, tK: number): number {
  const delta = rhoMol / LEMMON_RHO_REDUCING;
  const { arD } = lemmonResidual(delta, LEMMON_T_REDUCING / tK);
  return rhoMol * LEMMON_R * tK * (1 + delta * arD);
}

/** Molar density (mol/m³) of the gas phase at pressure p (Pa) and temperature T (K), by Newton's method. */
export function lemmonDensity(pPa: number, tK: number): number {
  const tau = LEMMON_T_REDUCING / tK;
  let rho = pPa / (LEMMON_R * tK);
  for (let i = 0; i < 100; i++) {
    const delta = rho / LEMMON_RHO_REDUCING;
    const { arD, arDD } = lemmonResidual(delta, tau);
    const p = rho * LEMMON_R * tK * (1 + delta * arD);
    const dpdrho = LEMMON_R * tK * (1 + 2 * delta * arD + delta * delta * arDD);
    const step = (p - pPa) / dpdrho;
    rho = Math.max(rho - step, rho / 2);
    if (Math.abs(step) < 1e-12 * rho) return rho;
  }
  throw new Error(`density did not converge at ${pPa} Pa, ${tK} K`);
}

/** Compressibility factor Z = p / (ρ R T) from the reference equation. */
export function lemmonZ(pPa: number, tK: number): number {
  return pPa / (lemmonDensity(pPa, tK) * LEMMON_R * tK);
}
