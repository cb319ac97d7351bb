import ucum from '@lhncbc/ucum-lhc';
import { ANALYTE_DEFINITIONS, type Analyte } from './analytes.js';

/**
 * Unit conversion of serum results into each analyte's canonical unit. Every conversion goes
 * through the UCUM implementation of the U.S. National Library of Medicine (`@lhncbc/ucum-lhc`):
 * mass <-> mass directly, mass <-> amount of substance with the analyte's molar mass, and
 * milliequivalents with its charge. Nothing here reads a clock or a file.
 */

let utils: ReturnType<typeof ucum.UcumLhcUtils.getInstance> | undefined;
function ucumUtils() {
  utils ??= ucum.UcumLhcUtils.getInstance();
  return utils;
}

export type Conversion =
  | { ok: true; canonicalValue: number; canonicalUnit: string; ucumCode: string }
  | { ok: false; reason: string };

/** The UCUM code behind a unit as entered (case-sensitive UCUM first, then the report forms). */
export function ucumCodeFor(analyte: Analyte, unit: string): string | undefined {
  const def = ANALYTE_DEFINITIONS[analyte];
  const direct = def.units[unit];
  if (direct) return direct;
  const codes = new Set(Object.values(def.units));
  if (codes.has(unit)) return unit;
  const lower = unit.toLowerCase();
  return Object.entries(def.units).find(([k]) => k.toLowerCase() === lower)?.[1];
}

/**
 * Canonical units per unit entered, asked of UCUM once per analyte and unit: every unit here is
 * a ratio scale (no offset), so converting 1 gives the factor for any value.
 */
const factors = new Map<string, number | string>();
function factorToCanonical(analyte: Analyte, code: string): number | string {
  const key = `${analyte}|${code}`;
  let f = factors.get(key);
  if (f === undefined) {
    const def = ANALYTE_DEFINITIONS[analyte];
    const r = ucumUtils().convertUnitTo(code, 1, def.canonicalUnit, {
      ...(def.molarMass ? { molecularWeight: def.molarMass.gPerMol } : {}),
      ...(def.charge ? { charge: def.charge } : {}),
    });
    f = r.status === 'succeeded' && r.toVal !== null ? r.toVal : r.msg.join('; ');
    factors.set(key, f);
  }
  return f;
}

/** Units accepted for an analyte, as written on a report. */
export function acceptedUnits(analyte: Analyte): string[] {
  return Object.keys(ANALYTE_DEFINITIONS[analyte].units);
}

/**
 * Converts a value in `unit` to the analyte's canonical unit; refuses units the analyte does not
 * take and values outside the plausible bounds (typing errors), saying where and why.
 */
export function toCanonical(analyte: Analyte, value: number, unit: string): Conversion {
  const def = ANALYTE_DEFINITIONS[analyte];
  if (!Number.isFinite(value) || value <= 0) {
    return { ok: false, reason: `${analyte} value must be a number greater than 0` };
  }
  const code = ucumCodeFor(analyte, unit);
  if (!code) {
    return {
      ok: false,
      reason: `unit '${unit}' is not taken for ${analyte}: use ${acceptedUnits(analyte).join(', ')}`,
    };
  }
  const factor = factorToCanonical(analyte, code);
  if (typeof factor === 'string') {
    return { ok: false, reason: `cannot convert ${unit} to ${def.canonicalUnit}: ${factor}` };
  }
  const canonicalValue = roundSig(value * factor, 6);
  const { min, max } = def.plausible;
  if (canonicalValue < min || canonicalValue > max) {
    return {
      ok: false,
      reason: `${analyte} ${value} ${unit} (${roundSig(canonicalValue, 3)} ${def.canonicalUnit}) is outside ${min}-${max} ${def.canonicalUnit}: check the value and its unit`,
    };
  }
  return { ok: true, canonicalValue, canonicalUnit: def.canonicalUnit, ucumCode: code };
}

/** Converts between two units the analyte takes (for showing a result in another unit). */
export function convertBetween(
  analyte: Analyte,
  value: number,
  fromUnit: string,
  toUnit: string,
): number | null {
  const def = ANALYTE_DEFINITIONS[analyte];
  const from = ucumCodeFor(analyte, fromUnit);
  const to = ucumCodeFor(analyte, toUnit) ?? (toUnit === def.canonicalUnit ? toUnit : undefined);
  if (!from || !to) return null;
  const r = ucumUtils().convertUnitTo(from, value, to, {
    ...(def.molarMass ? { molecularWeight: def.molarMass.gPerMol } : {}),
    ...(def.charge ? { charge: def.charge } : {}),
  });
  return r.status === 'succeeded' && r.toVal !== null ? roundSig(r.toVal, 6) : null;
}

/** Rounds to significant figures (drops the floating-point tail of a unit conversion). */
function roundSig(x: number, digits: number): number {
  return Number(x.toPrecision(digits));
}

export const CORRECTED_CALCIUM_SOURCE =
  'Payne RB, Little AJ, Williams RB, Milner JR. Interpretation of serum calcium in patients with abnormal serum proteins. BMJ 1973;4(5893):643-646: corrected Ca (mg/dL) = total Ca (mg/dL) + 0.8 x (4.0 - albumin g/dL), i.e. mmol/L + 0.02 x (40 - albumin g/L)';

export const CORRECTED_CALCIUM_CAUTION =
  'An estimate: KDIGO 2017 CKD-MBD notes that albumin-corrected calcium agrees poorly with ionised calcium in CKD; the care team interprets it.';

/** Albumin-corrected calcium, mg/dL, from total calcium (mg/dL) and albumin (g/dL) (Payne 1973). */
export function correctedCalciumMgPerDl(
  totalCalciumMgPerDl: number,
  albuminGPerDl: number,
): number {
  return totalCalciumMgPerDl + 0.8 * (4.0 - albuminGPerDl);
}
