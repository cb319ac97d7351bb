import { z } from 'zod';
import { ANALYTES, ANALYTE_DEFINITIONS, type Analyte } from './analytes.js';
import { toCanonical } from './lab-units.js';

/** Where a result came from: typed on a screen or the CLI, a results file, a FHIR Bundle. */
export const LAB_SOURCES = ['typed', 'file', 'fhir'] as const;
export type LabSource = (typeof LAB_SOURCES)[number];

export const isoDateSchema = z
  .string()
  .regex(/^\d{4}-\d{2}-\d{2}$/, 'date must be YYYY-MM-DD')
  .refine(
    (s) =>
      !Number.isNaN(Date.parse(`${s}T00:00:00Z`)) &&
      new Date(`${s}T00:00:00Z`).toISOString().startsWith(s),
    'date is not a real calendar date',
  );

/** One result as typed: the unit as written on the report; refused when implausible. */
export const labResultInputSchema = z
  .object({
    analyte: z.enum(ANALYTES, { error: `analyte must be one of ${ANALYTES.join(', ')}` }),
    value: z.number({ error: 'value must be a number' }).positive('value must be greater than 0'),
    unit: z.string().trim().min(1, 'unit is required').max(20),
    date: isoDateSchema,
  })
  .strict()
  .superRefine((lab, ctx) => {
    const c = toCanonical(lab.analyte, lab.value, lab.unit);
    if (!c.ok) {
      const unitProblem = c.reason.startsWith('unit ') || c.reason.startsWith('cannot convert');
      ctx.addIssue({ code: 'custom', path: [unitProblem ? 'unit' : 'value'], message: c.reason });
    }
  });
export type LabResultInput = z.infer<typeof labResultInputSchema>;

/** A stored result. */
export interface LabRecord {
  id: number;
  patientId: number;
  analyte: Analyte;
  value: number;
  unit: string;
  canonicalValue: number;
  canonicalUnit: string;
  /** Date the sample was taken, YYYY-MM-DD. */
  date: string;
  /** The FHIR effective time when one was given (UTC ISO), else null. */
  takenAt: string | null;
  source: LabSource;
  sourceRef: string | null;
  loincCode: string | null;
  enteredBy: string | null;
  createdAt: string;
}

/** The row shape the repository writes (the database gives the id and creation time). */
export type NewLabRecord = Omit<LabRecord, 'id' | 'createdAt'>;

/** The `labs list --json` and API shape (a fixed contract). */
export interface LabListItem {
  analyte: Analyte;
  value: number;
  unit: string;
  canonicalValue: number;
  canonicalUnit: string;
  date: string;
  source: LabSource;
}

export function toLabListItem(r: LabRecord): LabListItem {
  return {
    analyte: r.analyte,
    value: r.value,
    unit: r.unit,
    canonicalValue: r.canonicalValue,
    canonicalUnit: r.canonicalUnit,
    date: r.date,
    source: r.source,
  };
}

/** Newest first: by date, then time, then the order they were stored. */
export function newestFirst(a: LabRecord, b: LabRecord): number {
  return (
    b.date.localeCompare(a.date) || (b.takenAt ?? '').localeCompare(a.takenAt ?? '') || b.id - a.id
  );
}

/** A latest value in the analyte's canonical unit. */
export interface LatestLab {
  value: number;
  unit: string;
  date: string;
}

/**
 * The latest result of each analyte, in its canonical unit (phosphate and calcium mg/dL, albumin
 * g/dL, PTH pg/mL, potassium and bicarbonate mmol/L, 25-OH vitamin D ng/mL). Pure.
 */
export function latestByAnalyte(
  results: readonly LabRecord[],
): Partial<Record<Analyte, LatestLab>> {
  const out: Partial<Record<Analyte, LatestLab>> = {};
  for (const r of [...results].sort(newestFirst)) {
    if (out[r.analyte]) continue;
    out[r.analyte] = { value: r.canonicalValue, unit: r.canonicalUnit, date: r.date };
  }
  return out;
}

/** Builds the record to store for a typed result (already validated by the schema). */
export function typedLab(
  patientId: number,
  input: LabResultInput,
  enteredBy: string | null,
): NewLabRecord {
  const c = toCanonical(input.analyte, input.value, input.unit);
  if (!c.ok) throw new Error(`unvalidated lab result reached typedLab: ${c.reason}`);
  return {
    patientId,
    analyte: input.analyte,
    value: input.value,
    unit: input.unit,
    canonicalValue: c.canonicalValue,
    canonicalUnit: c.canonicalUnit,
    date: input.date,
    takenAt: null,
    source: 'typed',
    sourceRef: null,
    loincCode: null,
    enteredBy,
  };
}

export function analyteLabel(a: Analyte): string {
  return ANALYTE_DEFINITIONS[a].label;
}

/**
 * Two results are the same when they measure the same analyte at the same time with the same
 * value: times compared when both carry one, else the dates (a typed result has no time).
 */
export function isSameResult(
  a: Pick<LabRecord, 'analyte' | 'date' | 'takenAt' | 'canonicalValue'>,
  b: Pick<LabRecord, 'analyte' | 'date' | 'takenAt' | 'canonicalValue'>,
): boolean {
  if (a.analyte !== b.analyte) return false;
  const sameTime = a.takenAt && b.takenAt ? a.takenAt === b.takenAt : a.date === b.date;
  return (
    sameTime &&
    Math.abs(a.canonicalValue - b.canonicalValue) <= 1e-9 * Math.max(1, Math.abs(a.canonicalValue))
  );
}
