import { describe, expect, it } from 'vitest';
import { DEFAULT_LAB_BANDS, LAB_BAND_SOURCES } from '../../src/patients/lab-bands.js';
import type { LabRecord } from '../../src/patients/lab-results.js';
import { buildTrends, binderText } from '../../src/patients/trends.js';

let seq = 0;
function lab(analyte: LabRecord['analyte'], canonicalValue: number, date: string): LabRecord {
  seq += 1;
  return {
    id: seq,
    patientId: 1,
    analyte,
    value: canonicalValue,
    unit: analyte === 'albumin' ? 'g/dL' : analyte === 'pth' ? 'pg/mL' : 'mg/dL',
    canonicalValue,
    canonicalUnit: analyte === 'albumin' ? 'g/dL' : analyte === 'pth' ? 'pg/mL' : 'mg/dL',
    date,
    takenAt: null,
    source: 'typed',
    sourceRef: null,
    loincCode: null,
    enteredBy: null,
    createdAt: '2026-03-05T09:30:00Z',
  };
}

// invented demo results
const LABS = [
  lab('phosphate', 5.2, '2026-02-14'),
  lab('phosphate', 6.4, '2026-01-10'),
  lab('calcium', 8.4, '2026-03-01'),
  lab('albumin', 3.2, '2026-03-01'),
  lab('calcium', 9.6, '2026-01-10'),
  lab('pth', 420, '2026-01-10'),
];

describe('trend view data (pure)', () => {
  const base = {
    labs: LABS,
    bands: DEFAULT_LAB_BANDS,
    defaultBands: DEFAULT_LAB_BANDS,
    planVersions: [],
    binderChanges: [],
  };

  it('orders each analyte oldest first and takes the band for the modality', () => {
    const hd = buildTrends({ ...base, dialysis: 'hemodialysis' });
    const p = hd.analytes.find((a) => a.analyte === 'phosphate');
    expect(p?.points.map((x) => x.date)).toEqual(['2026-01-10', '2026-02-14']);
    // KDIGO 2017 4.2.3: 2-9 x an assumed 65 pg/mL upper limit = 130-585 pg/mL on dialysis
    const pthHd = hd.analytes.find((a) => a.analyte === 'pth')?.band;
    expect(pthHd).toMatchObject({ min: 130, max: 585, source: LAB_BAND_SOURCES.pth });
    const off = buildTrends({ ...base, dialysis: 'none' });
    expect(off.analytes.find((a) => a.analyte === 'pth')?.band).toMatchObject({
      min: null,
      max: 65,
    });
  });

  it('says "set by the clinic" for a band the clinic changed', () => {
    const bands = {
      ...DEFAULT_LAB_BANDS,
      phosphate: {
        notOnDialysis: { min: 2.7, max: 4.6 },
        onDialysis: { min: 3.5, max: 5.5 },
      },
    };
    const t = buildTrends({ ...base, bands, dialysis: 'hemodialysis' });
    expect(t.analytes[0]?.band).toEqual({ min: 3.5, max: 5.5, source: 'set by the clinic' });
  });

  it('corrects calcium only with albumin of the same day (Payne 1973)', () => {
    const t = buildTrends({ ...base, dialysis: 'none' });
    // 8.4 + 0.8 x (4.0 - 3.2) = 8.4 + 0.64 = 9.04 mg/dL; 10 Jan has no albumin
    expect(t.correctedCalcium.points).toEqual([
      { date: '2026-03-01', totalMgPerDl: 8.4, albuminGPerDl: 3.2, correctedMgPerDl: 9.04 },
    ]);
    expect(t.correctedCalcium.formula).toMatch(/Payne RB.*BMJ 1973/);
  });

  it('names binder changes as written and sorts plan versions by save time', () => {
    const t = buildTrends({
      ...base,
      dialysis: 'hemodialysis',
      planVersions: [
        {
          planId: 1,
          planName: 'B',
          version: 2,
          savedAt: '2026-02-03T10:00:00Z',
          date: '2026-02-03',
          absorbablePhosphorusMgPerDay: { low: 445, typical: 666, high: 890 },
        },
        {
          planId: 1,
          planName: 'A',
          version: 1,
          savedAt: '2026-01-05T10:00:00Z',
          date: '2026-01-05',
          absorbablePhosphorusMgPerDay: { low: 634, typical: 952, high: 1269 },
        },
      ],
      binderChanges: [
        {
          changedAt: '2026-02-03T10:00:00Z',
          binder: {
            ingredient: 'calcium-acetate',
            unitStrengthMg: 667,
            schedule: 'per-meal',
            units: 2,
            otherMedicines: [],
          },
        },
        { changedAt: '2026-03-01T10:00:00Z', binder: null },
      ],
    });
    expect(t.planVersions.map((v) => v.version)).toEqual([1, 2]);
    expect(t.binderChanges).toEqual([
      {
        changedAt: '2026-02-03T10:00:00Z',
        date: '2026-02-03',
        text: 'calcium acetate 667 mg, 2 units with each meal',
      },
      { changedAt: '2026-03-01T10:00:00Z', date: '2026-03-01', text: 'no phosphate binder' },
    ]);
    expect(binderText(null)).toBe('no phosphate binder');
  });
});
