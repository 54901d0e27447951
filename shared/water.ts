/**
 * Water in compressed breathing air: one formulation for the whole code base.
 *
 * Saturation vapour pressure over liquid water: IAPWS-95 auxiliary equation, W. Wagner and A. Pruß, "The IAPWS
 * Formulation 1995 for the Thermodynamic Properties of Ordinary Water Substance for General and Scientific Use",
 * J. Phys. Chem. Ref. Data 31 (2002) 387, eq. 2.5. Over ice (frost points below 0.01 °C): IAPWS R14-08(2011),
 * sublimation pressure of ice Ih (Wagner, Riethmann, Feistel, Harvey, J. Phys. Chem. Ref. Data 40 (2011) 043103).
 * Pressures in pascals absolute, temperatures in °C unless named otherwise.
 */

export const KELVIN = 273.15;
/** Molar gas constant, J/(mol·K) (CODATA 2018, exact). */
export const R_GAS = 8.314462618;
/** Molar mass of water, g/mol (IAPWS-95). */
export const M_WATER = 18.015268;

/**
 * Reference state of "free air" for water contents in mg/m³ and free-air volumes: 1013.25 mbar and 20 °C.
 * EN 12021 states its water limits at atmospheric pressure and 20 °C (from memory of the standard's wording).
 */
export const FREE_AIR = { pressurePa: 101_325, temperatureC: 20 } as const;

const TC = 647.096; // K, IAPWS-95 critical temperature
const PC = 22.064e6; // Pa, IAPWS-95 critical pressure
const A = [-7.85951783, 1.84408259, -11.7866497, 22.6807411, -15.9618719, 1.80122502] as const;

/** Saturation vapour pressure of pure water over liquid, Pa (Wagner & Pruß 2002, eq. 2.5; 273.16 K to the critical point). */
export function saturationPressureWater(tC: number): number {
  const T = tC + KELVIN;
  const tau = 1 - T / TC;
  const sum = A[0] * tau + A[1] * tau ** 1.5 + A[2] * tau ** 3 + A[3] * tau ** 3.5 + A[4] * tau ** 4 + A[5] * tau ** 7.5;
  return PC * Math.exp((TC / T) * sum);
}

const TT = 273.16; // K, triple point
const PT = 611.657; // Pa, triple-point pressure
const ICE_A = [-0.212144006e2, 0.273203819e2, -0.61059813e1] as const;
const ICE_B = [0.333333333e-2, 0.120666667e1, 0.170333333e1] as const;

/** Sublimation pressure of ice Ih, Pa (IAPWS R14-08(2011), eq. 6; 50 K to the triple point). */
export function sublimationPressureIce(tC: number): number {
  const theta = (tC + KELVIN) / TT;
  let s = 0;
  for (let i = 0; i < 3; i++) s += ICE_A[i]! * theta ** ICE_B[i]!;
  return PT * Math.exp(s / theta);
}

/** Pressure of water vapour in equilibrium with the condensed phase: liquid above the triple point, ice below. */
export function saturationPressure(tC: number): number {
  return tC + KELVIN >= TT ? saturationPressureWater(tC) : sublimationPressureIce(tC);
}

/** Inverse of saturationPressure (dew point above 0.01 °C, frost point below), by Newton's method on ln p. */
export function dewPointFromVapourPressure(pwPa: number): number {
  if (!(pwPa > 0)) throw new RangeError("vapour pressure must be positive");
  let t = pwPa >= PT ? 20 : -40;
  for (let i = 0; i < 60; i++) {
    const f = Math.log(saturationPressure(t)) - Math.log(pwPa);
    const d = (Math.log(saturationPressure(t + 0.001)) - Math.log(saturationPressure(t - 0.001))) / 0.002;
    const step = f / d;
    t -= step;
    if (Math.abs(step) < 1e-9) break;
  }
  return t;
}

/**
 * Enhancement factor f of water vapour in compressed air: the saturated vapour's mole fraction is f·es/P instead of es/P.
 * NAMED PARAMETER. Second-virial estimate ln f ≈ P·(v_l − 2·B_aw + B_aa)/(R·T) (the Poynting term plus the air–water
 * interaction; the form of Hyland & Wexler, J. Res. NBS 77A (1973) 133, ln f = a + b·P). The coefficients are
 * from memory (B_aw ≈ −28 cm³/mol after Hyland 1975, B_aa ≈ −8 cm³/mol near room temperature, v_l = 18 cm³/mol) and give
 * f ≈ 1.7 at 200 bar and 2.2 at 300 bar near 20 °C; IAPWS G8-10 (virial fugacity of water in humid air) is the full
 * treatment. Third-virial terms are neglected, so above about 200 bar this underestimates f (common practice: treat
 * the water figure at 300 bar as ±15 %).
 */
export const ENHANCEMENT = {
  liquidMolarVolumeM3: 18e-6,
  bAirWaterM3: -28e-6,
  bAirAirM3: -8e-6,
  source: "second-virial estimate, coefficients from memory (Hyland 1975; form of Hyland & Wexler 1973)",
} as const;

export function enhancementFactor(pressurePa: number, tC: number): number {
  const e = ENHANCEMENT;
  return Math.exp((Math.max(0, pressurePa) * (e.liquidMolarVolumeM3 - 2 * e.bAirWaterM3 + e.bAirAirM3)) / (R_GAS * (tC + KELVIN)));
}

/** Mole fraction of water in air saturated at absolute pressure p and temperature t (what leaves the final separator). */
export function saturatedMoleFraction(pressurePa: number, tC: number): number {
  return Math.min(1, (enhancementFactor(pressurePa, tC) * saturationPressure(tC)) / pressurePa);
}

/** Moles of gas in one cubic metre of free air (ideal gas at FREE_AIR). */
export const FREE_AIR_MOL_PER_M3 = FREE_AIR.pressurePa / (R_GAS * (FREE_AIR.temperatureC + KELVIN));

/** ppm by volume (µmol/mol) → mg per m³ of free air. */
export function ppmvToMgPerM3(ppmv: number): number {
  return ppmv * 1e-6 * FREE_AIR_MOL_PER_M3 * M_WATER * 1000;
}

export function mgPerM3ToPpmv(mg: number): number {
  return mg / (1e-6 * FREE_AIR_MOL_PER_M3 * M_WATER * 1000);
}

/** Dew (frost) point at the given absolute pressure of air holding `ppmv` of water; at 1 atm this is the atmospheric dew point. */
export function dewPointFromPpmv(ppmv: number, pressurePa: number = FREE_AIR.pressurePa): number {
  const x = ppmv * 1e-6;
  // f depends weakly on the dew point itself: two passes settle it.
  let t = dewPointFromVapourPressure(x * pressurePa);
  for (let i = 0; i < 3; i++) t = dewPointFromVapourPressure((x * pressurePa) / enhancementFactor(pressurePa, t));
  return t;
}

export function ppmvFromDewPoint(dewPointC: number, pressurePa: number = FREE_AIR.pressurePa): number {
  return (saturatedMoleFraction(pressurePa, dewPointC) * 1e6);
}

/**
 * Grams of water carried by one m³ of free air leaving a separator where it is saturated at `pressurePa` absolute and
 * `tC`: the water per mole of dry air (x / (1 − x)) times the moles of free air per m³.
 */
export function waterPerFreeAirM3(pressurePa: number, tC: number): number {
  const x = saturatedMoleFraction(pressurePa, tC);
  return (x / (1 - x)) * FREE_AIR_MOL_PER_M3 * M_WATER;
}

/** Bar gauge → Pa absolute (standard atmosphere as the ambient; NIST SP 811: 1 bar = 1e5 Pa). */
export function barGaugeToPaAbs(bar: number): number {
  return bar * 1e5 + FREE_AIR.pressurePa;
}

export type WaterUnit = "mg/m3" | "ppmv" | "dewpoint";

/** A water result in any of the three units, as ppm v/v; a pressure dew point is taken at the given gauge pressure. */
export function waterToPpmv(value: number, unit: WaterUnit, pressureBarGauge: number): number {
  if (unit === "ppmv") return value;
  if (unit === "mg/m3") return mgPerM3ToPpmv(value);
  return ppmvFromDewPoint(value, barGaugeToPaAbs(pressureBarGauge));
}
