import type { PhosphorusProfile } from './profile.js';

const r1 = (x: number | null): number | null => (x === null ? null : Math.round(x * 10) / 10);
const r2 = (x: number | null): number | null => (x === null ? null : Math.round(x * 100) / 100);

/**
 * The `phosphorus` object of a food in the JSON contract: `{totalMg, organicAnimalMg,
 * organicPlantMg, phytateMg, additiveMg, method, evidence, absorbableMg: {low, typical, high},
 * ratioMgPerG, ratioBand}` plus `additiveLikely` and `additiveEvidentFromName`. mg to 0.1, ratio to 0.01.
 */
export function toPhosphorusJson(p: PhosphorusProfile) {
  return {
    totalMg: r1(p.totalMg),
    organicAnimalMg: r1(p.organicAnimalMg),
    organicPlantMg: r1(p.organicPlantMg),
    phytateMg: r1(p.phytateMg),
    additiveMg: r1(p.additiveMg),
    method: p.method,
    evidence: p.evidence,
    absorbableMg: p.absorbableMg
      ? {
          low: r1(p.absorbableMg.low) as number,
          typical: r1(p.absorbableMg.typical) as number,
          high: r1(p.absorbableMg.high) as number,
        }
      : null,
    ratioMgPerG: r2(p.ratioMgPerG),
    ratioBand: p.ratioBand,
    additiveLikely: p.additiveLikely,
    additiveEvidentFromName: p.additiveEvidentFromName,
  };
}
export type PhosphorusJson = ReturnType<typeof toPhosphorusJson>;
