// The one equation of state for air in Airkeep: the simulator, the board (time to stop pressure), delivery health and
// the reports all compute compressibility and free air here and nowhere else.
// Compressibility of dry air: a 20-term fit, Z − 1 = Σ a_ij δ^i τ^j (i = 1..5, j = 0..3),
// δ = ρ/ρr and τ = Tr/T with the reducing constants of Lemmon et al. (2000). Least-squares fit to that equation
// (air-lemmon.ts) over 233–393 K and 0.5–520 bar; largest deviation 0.02 % in Z. Density form keeps pressure explicit.

import { LEMMON_MOLAR_MASS, LEMMON_R, LEMMON_RHO_REDUCING, LEMMON_T_REDUCING } from "./air-lemmon";

export const AIR_R = LEMMON_R;
export const AIR_MOLAR_MASS = LEMMON_MOLAR_MASS;
/** Standard atmosphere, bar: gauge + this = absolute. */
export const ATMOSPHERE_BAR = 1.01325;
export const Z_FIT_RANGE = { minK: 233.15, maxK: 393.15, maxBarAbs: 520 } as const;

const A: readonly (readonly [number, number, number, number])[] = [
  [0.3956947431, -0.7756615256, -0.6781180302, 0.04300009032],
  [0.1586698924, 0.1185191323, -0.7719738507, 0.9818608193],
  [-0.1273687477, 0.1112179624, 0.8784389027, -1.022980138],
  [0.1876337591, -0.3136971699, -0.4186295168, 0.6015576839],
  [-0.08171480889, 0.2622837589, -0.1494345349, -0.02990168362],
];

// local copies: imported bindings are getters once transpiled, and this runs every step
const R = LEMMON_R;
const RHO_R = LEMMON_RHO_REDUCING;
const T_R = LEMMON_T_REDUCING;

const clampK = (tK: number) => Math.min(Z_FIT_RANGE.maxK, Math.max(Z_FIT_RANGE.minK, tK));

/** Z and dZ/dδ at molar density ρ (mol/m³) and temperature T (K). */
function zAndSlope(rhoMol: number, tK: number): [number, number] {
  const tau = T_R / clampK(tK);
  const delta = rhoMol / RHO_R;
  let z = 1;
  let dz = 0;
  let dPow = 1; // δ^(i-1)
  for (let i = 0; i < A.length; i++) {
    const a = A[i]!;
    const c = a[0] + tau * (a[1] + tau * (a[2] + tau * a[3]));
    dz += (i + 1) * c * dPow;
    dPow *= delta;
    z += c * dPow;
  }
  return [z, dz / RHO_R];
}

export function airZFromDensity(rhoMol: number, tK: number): number {
  return zAndSlope(rhoMol, tK)[0];
}

/** Absolute pressure, Pa, of air at molar density ρ (mol/m³) and T (K). */
export function airPressurePa(rhoMol: number, tK: number): number {
  return rhoMol * R * tK * zAndSlope(rhoMol, tK)[0];
}

/** Molar density (mol/m³) at absolute pressure p (Pa) and T (K). */
export function airDensityMol(pPa: number, tK: number): number {
  if (pPa <= 0) return 0;
  const rt = R * tK;
  let rho = pPa / rt;
  for (let i = 0; i < 30; i++) {
    const [z, dz] = zAndSlope(rho, tK);
    const f = rho * rt * z - pPa;
    const step = f / (rt * (z + rho * dz));
    rho -= step;
    if (Math.abs(step) < 1e-10 * rho) break;
  }
  return rho;
}

/** Compressibility factor Z(p, T) of dry air; p absolute in bar, T in kelvin. */
export function airZ(pBarAbs: number, tK: number): number {
  if (pBarAbs <= 0) return 1;
  return airZFromDensity(airDensityMol(pBarAbs * 1e5, tK), tK);
}

export const celsiusToKelvin = (c: number) => c + 273.15;

/**
 * "Free air" in Airkeep is dry air at 1 bar absolute and 20 °C: the standard inlet conditions of ISO 1217 (displacement
 * compressors, acceptance tests; Annex E of the 1996 edition; the values from memory), to which makers refer the free
 * air delivery they rate. Rated delivery and every figure Airkeep derives from it use this one reference, so they compare
 * like with like. Gauge pressures still become absolute with the standard atmosphere (ATMOSPHERE_BAR).
 */
export const FREE_AIR_REFERENCE = { pBarAbs: 1, tC: 20, tK: 293.15 } as const;
/** Printed wherever free air or l/min appears. */
export const FREE_AIR_BASIS = "free air at 1 bar(a), 20 °C, dry (ISO 1217 inlet reference)";
export const FREE_AIR_BASIS_SHORT = "free air, 1 bar(a) 20 °C";
/** Moles in one litre of free air. */
export const MOL_PER_FREE_LITRE = airDensityMol(FREE_AIR_REFERENCE.pBarAbs * 1e5, FREE_AIR_REFERENCE.tK) / 1000;

/** Moles of air in a vessel of `waterVolumeL` litres at gauge pressure p (bar) and T (°C). */
export function molesInVessel(waterVolumeL: number, pBarGauge: number, tC: number): number {
  return airDensityMol((pBarGauge + ATMOSPHERE_BAR) * 1e5, celsiusToKelvin(tC)) * (waterVolumeL / 1000);
}

/** Gauge pressure (bar) of `moles` of air in a vessel of `waterVolumeL` litres at T (°C). */
export function vesselPressureBar(waterVolumeL: number, moles: number, tC: number): number {
  return airPressurePa(moles / (waterVolumeL / 1000), celsiusToKelvin(tC)) / 1e5 - ATMOSPHERE_BAR;
}

/** Litres of free air a vessel holds at gauge pressure p (bar) and T (°C). */
export function freeAirLitres(waterVolumeL: number, pBarGauge: number, tC: number): number {
  return molesInVessel(waterVolumeL, pBarGauge, tC) / MOL_PER_FREE_LITRE;
}

/** Free air delivered per minute (l/min) that raised a vessel from (p0, t0) to (p1, t1) in `minutes`. */
export function deliveredFreeAirLpm(
  waterVolumeL: number,
  from: { pBarGauge: number; tC: number },
  to: { pBarGauge: number; tC: number },
  minutes: number,
): number {
  return (freeAirLitres(waterVolumeL, to.pBarGauge, to.tC) - freeAirLitres(waterVolumeL, from.pBarGauge, from.tC)) / minutes;
}

/**
 * Minutes until a vessel filling at `rateBarPerMin` (the slope of pressure measured around `atBarGauge`) reaches `stopBarGauge`,
 * when the compressor delivers a constant amount of air per minute: the slope becomes a molar rate with the local
 * dρ/dp of the real gas, and the time is the moles still to go over that rate. The vessel volume cancels out.
 */
export function realGasMinutesToPressure(atBarGauge: number, rateBarPerMin: number, stopBarGauge: number, tC: number): number {
  if (!(rateBarPerMin > 0)) return Infinity;
  if (atBarGauge >= stopBarGauge) return 0;
  const tK = celsiusToKelvin(tC);
  const rho = (pGauge: number) => airDensityMol(Math.max(0, pGauge + ATMOSPHERE_BAR) * 1e5, tK);
  const h = 0.5;
  const dRhoDp = (rho(atBarGauge + h) - rho(atBarGauge - h)) / (2 * h);
  return (rho(stopBarGauge) - rho(atBarGauge)) / (dRhoDp * rateBarPerMin);
}

/** Minutes a compressor delivering `deliveryLpm` of free air takes to raise a vessel from one gauge pressure to another. */
export function fillMinutes(waterVolumeL: number, fromBarGauge: number, toBarGauge: number, tC: number, deliveryLpm: number): number {
  return (freeAirLitres(waterVolumeL, toBarGauge, tC) - freeAirLitres(waterVolumeL, fromBarGauge, tC)) / deliveryLpm;
}
