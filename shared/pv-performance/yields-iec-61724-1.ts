/**
 * Yields and performance ratio as defined by IEC 61724-1:2021, *Photovoltaic system performance — Part 1: Monitoring*
 * (terms also in IEC TS 61836; summarised on the Sandia PV Performance Modeling Collaborative's "Performance Ratio"
 * page):
 * - reference yield Yr = Hi / Gi,ref [h], Hi the in-plane irradiation [kWh/m²], Gi,ref = 1 kW/m²;
 * - final yield Yf = Eout / P0 [kWh/kWp = h], P0 the array's rated DC power at STC [kWp];
 * - performance ratio PR = Yf / Yr [1];
 * - temperature-corrected PR (IEC 61724-1 annex, from memory; the form matches published secondary pages):
 *   PR_STC = Σk Eout,k / Σk [P0 · Ck · Gi,k · τk / Gi,ref], with Ck = 1 + γ · (Tmod,k − 25 °C),
 *   γ the relative power temperature coefficient [1/K] (negative for crystalline silicon), τk the interval [h].
 * Inputs must be finite; P0 > 0, Hi ≥ 0, Eout ≥ 0. A yield over zero irradiation is undefined (null), never Infinity.
 */

/** In-plane reference irradiance of the definitions [kW/m²]. */
export const G_REF_KW_M2 = 1;
/** Module temperature the temperature correction is referred to (standard test conditions) [°C]. */
export const T_REF_C = 25;

function finite(name: string, v: number, min = -Infinity): void {
  if (!Number.isFinite(v)) throw new RangeError(`${name}: must be a finite number; got ${v}`);
  if (v < min) throw new RangeError(`${name}: must be at least ${min}; got ${v}`);
}

/** Reference yield Yr = Hi / Gi,ref [h] from in-plane irradiation [kWh/m²]. */
export function referenceYieldH(hiKwhM2: number): number {
  finite('hiKwhM2', hiKwhM2, 0);
  return hiKwhM2 / G_REF_KW_M2;
}

/** Final (specific) yield Yf = Eout / P0 [kWh/kWp]. */
export function finalYieldH(eoutKwh: number, p0Kwp: number): number {
  finite('eoutKwh', eoutKwh, 0);
  finite('p0Kwp', p0Kwp);
  if (p0Kwp <= 0) throw new RangeError(`p0Kwp: must be greater than 0; got ${p0Kwp}`);
  return eoutKwh / p0Kwp;
}

/** PR = Yf / Yr; null when Yr is 0 (no irradiation, no ratio). */
export function performanceRatio(yfH: number, yrH: number): number | null {
  finite('yfH', yfH, 0);
  finite('yrH', yrH, 0);
  return yrH > 0 ? yfH / yrH : null;
}

/** Temperature correction factor Ck = 1 + γ · (Tmod − 25 °C), γ [1/K]. */
export function temperatureFactor(gammaPerK: number, tmodC: number): number {
  finite('gammaPerK', gammaPerK);
  finite('tmodC', tmodC);
  if (Math.abs(gammaPerK) > 0.05) throw new RangeError(`gammaPerK: must be within ±0.05 1/K (±5 %/K); got ${gammaPerK}`);
  return 1 + gammaPerK * (tmodC - T_REF_C);
}

/** One interval k of a temperature-corrected PR: its output [kWh], in-plane irradiation [kWh/m²] and module temperature [°C]. */
export interface PrInterval {
  eoutKwh: number;
  hiKwhM2: number;
  tmodC: number;
}

/**
 * Temperature-corrected PR over intervals: Σ Eout,k / Σ (P0 · Ck · Hi,k / Gi,ref) (Hi,k = Gi,k · τk). Null when the
 * expected-energy denominator is not positive (no irradiation).
 */
export function temperatureCorrectedPr(intervals: readonly PrInterval[], p0Kwp: number, gammaPerK: number): number | null {
  finite('p0Kwp', p0Kwp);
  if (p0Kwp <= 0) throw new RangeError(`p0Kwp: must be greater than 0; got ${p0Kwp}`);
  let num = 0;
  let den = 0;
  for (const [i, k] of intervals.entries()) {
    finite(`intervals[${i}].eoutKwh`, k.eoutKwh, 0);
    finite(`intervals[${i}].hiKwhM2`, k.hiKwhM2, 0);
    num += k.eoutKwh;
    den += (p0Kwp * temperatureFactor(gammaPerK, k.tmodC) * k.hiKwhM2) / G_REF_KW_M2;
  }
  return den > 0 ? num / den : null;
}

/** Yr, Yf, PR and (with γ and Tmod) the temperature-corrected PR of one period with one representative module temperature. */
export function yieldsOf(input: { p0Kwp: number; hiKwhM2: number; eoutKwh: number; gammaPerK?: number; tmodC?: number }): {
  yrH: number;
  yfH: number;
  pr: number | null;
  prTempCorrected: number | null;
} {
  const yrH = referenceYieldH(input.hiKwhM2);
  const yfH = finalYieldH(input.eoutKwh, input.p0Kwp);
  const pr = performanceRatio(yfH, yrH);
  const hasT = input.gammaPerK !== undefined && input.tmodC !== undefined;
  const prTempCorrected = hasT
    ? temperatureCorrectedPr([{ eoutKwh: input.eoutKwh, hiKwhM2: input.hiKwhM2, tmodC: input.tmodC! }], input.p0Kwp, input.gammaPerK!)
    : null;
  return { yrH, yfH, pr, prTempCorrected };
}
