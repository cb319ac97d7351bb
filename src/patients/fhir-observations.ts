import type { Bundle, Identifier, Observation, Patient as FhirPatient } from '@medplum/fhirtypes';
import { ANALYTE_BY_LOINC, type Analyte } from './analytes.js';
import { toCanonical } from './lab-units.js';

/**
 * Reads a FHIR R4 Bundle of Observation resources into lab results (pure: no database, no clock).
 * Each entry becomes a result or a rejection naming the entry and the field; Patient entries in
 * the Bundle only serve to resolve `subject` references to their identifiers.
 */

export const LOINC_SYSTEM = 'http://loinc.org';
export const UCUM_SYSTEM = 'http://unitsofmeasure.org';

/** Statuses whose value is a result a clinician stands by (FHIR R4 ObservationStatus). */
const IMPORTED_STATUSES = new Set(['final', 'amended', 'corrected']);

export interface ObservationResult {
  entry: number;
  /** Identifiers the subject carries (from `subject.identifier` or the referenced Patient). */
  subjectIdentifiers: Array<{ system: string | null; value: string }>;
  analyte: Analyte;
  loincCode: string;
  value: number;
  unit: string;
  canonicalValue: number;
  canonicalUnit: string;
  date: string;
  takenAt: string | null;
  observationId: string | null;
}

export interface EntryRejection {
  entry: number;
  reason: string;
}

export type BundleReading =
  | { ok: true; results: ObservationResult[]; rejected: EntryRejection[] }
  | { ok: false; reason: string };

type Reading = { ok: true; value: ObservationResult } | { ok: false; reason: string };

function identifiersOf(ids: readonly Identifier[] | undefined) {
  return (ids ?? [])
    .filter(
      (i): i is Identifier & { value: string } => typeof i.value === 'string' && i.value !== '',
    )
    .map((i) => ({ system: i.system ?? null, value: i.value }));
}

/** Patient entries by every name a reference may use: fullUrl and `Patient/<id>`. */
function patientIndex(bundle: Bundle): Map<string, FhirPatient> {
  const out = new Map<string, FhirPatient>();
  for (const e of bundle.entry ?? []) {
    const r = e.resource;
    if (r?.resourceType !== 'Patient') continue;
    if (e.fullUrl) out.set(e.fullUrl, r);
    if (r.id) out.set(`Patient/${r.id}`, r);
  }
  return out;
}

/** `2026-03-01` stays a date; a time is kept as UTC ISO, the date as written (the clinic's day). */
function effective(o: Observation): { date: string; takenAt: string | null } | string {
  const raw = o.effectiveDateTime ?? o.effectivePeriod?.start ?? o.effectiveInstant;
  if (!raw) return 'the time the sample was taken is missing';
  const m = /^(\d{4}-\d{2}-\d{2})(T.+)?$/.exec(raw);
  if (!m?.[1]) return `'${raw}' is not a full date (YYYY-MM-DD[Thh:mm:ss+zz:zz])`;
  const date = m[1];
  if (Number.isNaN(Date.parse(`${date}T00:00:00Z`))) return `'${raw}' is not a real date`;
  if (!m[2]) return { date, takenAt: null };
  const t = Date.parse(raw);
  if (Number.isNaN(t)) return `'${raw}' is not a valid time`;
  return { date, takenAt: new Date(t).toISOString() };
}

function readObservation(
  o: Observation,
  entry: number,
  patients: Map<string, FhirPatient>,
): Reading {
  const fail = (where: string, why: string): Reading => ({
    ok: false,
    reason: `entry[${entry}]${o.id ? ` (Observation ${o.id})` : ''} ${where}: ${why}`,
  });
  if (!IMPORTED_STATUSES.has(o.status)) {
    return fail(
      'status',
      `'${String(o.status)}' is not imported (final, amended or corrected only)`,
    );
  }
  const codings = o.code?.coding ?? [];
  const loinc = codings.find(
    (c) => c.system === LOINC_SYSTEM && c.code && ANALYTE_BY_LOINC.has(c.code),
  );
  if (!loinc?.code) {
    const seen = codings.map((c) => `${c.system ?? '?'}|${c.code ?? '?'}`).join(', ') || 'none';
    return fail('code.coding', `no LOINC code this product follows (found ${seen})`);
  }
  const analyte = ANALYTE_BY_LOINC.get(loinc.code) as Analyte;
  const q = o.valueQuantity;
  if (!q || typeof q.value !== 'number')
    return fail('valueQuantity.value', 'a numeric result is missing');
  if (q.comparator)
    return fail('valueQuantity.comparator', `'${q.comparator}' results are not stored as values`);
  if (q.system && q.system !== UCUM_SYSTEM) {
    return fail('valueQuantity.system', `'${q.system}' is not UCUM (${UCUM_SYSTEM})`);
  }
  const unit = q.code ?? q.unit;
  if (!unit) return fail('valueQuantity.code', 'the unit is missing');
  const c = toCanonical(analyte, q.value, unit);
  if (!c.ok) return fail('valueQuantity', c.reason);
  const when = effective(o);
  if (typeof when === 'string') return fail('effectiveDateTime', when);
  let subjectIdentifiers = o.subject?.identifier ? identifiersOf([o.subject.identifier]) : [];
  const ref = o.subject?.reference;
  if (subjectIdentifiers.length === 0 && ref) {
    const p = patients.get(ref);
    if (!p) return fail('subject.reference', `'${ref}' names no Patient entry in this Bundle`);
    subjectIdentifiers = identifiersOf(p.identifier);
  }
  if (subjectIdentifiers.length === 0)
    return fail('subject', 'the patient carries no identifier to match');
  return {
    ok: true,
    value: {
      entry,
      subjectIdentifiers,
      analyte,
      loincCode: loinc.code,
      value: q.value,
      unit,
      canonicalValue: c.canonicalValue,
      canonicalUnit: c.canonicalUnit,
      date: when.date,
      takenAt: when.takenAt,
      observationId: o.id ?? null,
    },
  };
}

/** Reads a parsed JSON document as a Bundle of Observations; per-entry problems are rejections. */
export function readObservationBundle(doc: unknown): BundleReading {
  const b = doc as Partial<Bundle> | null;
  if (b === null || typeof b !== 'object' || Array.isArray(b)) {
    return { ok: false, reason: 'the file is not a JSON object (a FHIR Bundle is expected)' };
  }
  if (b.resourceType !== 'Bundle') {
    return {
      ok: false,
      reason: `resourceType is '${String(b.resourceType)}', a FHIR Bundle is expected`,
    };
  }
  if (b.entry !== undefined && !Array.isArray(b.entry)) {
    return { ok: false, reason: 'entry must be a list of Bundle entries' };
  }
  const patients = patientIndex(b as Bundle);
  const results: ObservationResult[] = [];
  const rejected: EntryRejection[] = [];
  (b.entry ?? []).forEach((e, i) => {
    const r = (e as { resource?: { resourceType?: unknown } } | null)?.resource;
    if (!r || typeof r !== 'object') {
      rejected.push({ entry: i, reason: `entry[${i}] resource: missing` });
      return;
    }
    if (r.resourceType === 'Patient') return;
    if (r.resourceType !== 'Observation') {
      rejected.push({
        entry: i,
        reason: `entry[${i}] resourceType: '${String(r.resourceType)}' is not imported (Observation only)`,
      });
      return;
    }
    const read = readObservation(r as Observation, i, patients);
    if (read.ok) results.push(read.value);
    else rejected.push({ entry: i, reason: read.reason });
  });
  return { ok: true, results, rejected };
}
