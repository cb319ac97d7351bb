import { describe, expect, it } from 'vitest';
import { readObservationBundle } from '../../src/patients/fhir-observations.js';

// Invented demo entries in the shape of the FHIR R4 Observation examples.
function observation(over: Record<string, unknown> = {}) {
  return {
    resourceType: 'Observation',
    id: 'p1',
    status: 'final',
    code: { coding: [{ system: 'http://loinc.org', code: '2777-1' }] },
    subject: { identifier: { system: 'https://clinic.example.org/mrn', value: 'DEMO-1' } },
    effectiveDateTime: '2026-02-10T07:45:00+01:00',
    valueQuantity: {
      value: 1.9,
      unit: 'mmol/L',
      system: 'http://unitsofmeasure.org',
      code: 'mmol/L',
    },
    ...over,
  };
}
const bundle = (...resources: unknown[]) => ({
  resourceType: 'Bundle',
  type: 'collection',
  entry: resources.map((resource) => ({ resource })),
});

describe('reading a FHIR R4 Bundle of Observations (pure)', () => {
  it('keeps the date as written and the time in UTC; converts with UCUM', () => {
    const r = readObservationBundle(bundle(observation()));
    expect(r.ok && r.rejected).toEqual([]);
    // 1.9 mmol/L x 3.0974 (IUPAC P 30.974 g/mol / 10) = 5.88506 mg/dL
    expect(r.ok && r.results[0]).toMatchObject({
      analyte: 'phosphate',
      date: '2026-02-10',
      takenAt: '2026-02-10T06:45:00.000Z',
      canonicalUnit: 'mg/dL',
      subjectIdentifiers: [{ system: 'https://clinic.example.org/mrn', value: 'DEMO-1' }],
    });
    expect(r.ok && r.results[0]?.canonicalValue).toBeCloseTo(5.88506, 4);
  });

  it('names the entry, the Observation and the field of every refusal', () => {
    const r = readObservationBundle(
      bundle(
        observation({ effectiveDateTime: '2026-02' }),
        observation({ valueQuantity: { value: 2, comparator: '<', code: 'mmol/L' } }),
        observation({
          valueQuantity: { value: 2, system: 'http://example.org/units', code: 'mmol/L' },
        }),
        observation({ subject: { reference: 'Patient/nobody' } }),
        observation({ status: 'entered-in-error' }),
        { resourceType: 'Condition', id: 'c1' },
        observation({ valueQuantity: undefined }),
      ),
    );
    expect(r.ok && r.rejected.map((x) => x.reason)).toEqual([
      "entry[0] (Observation p1) effectiveDateTime: '2026-02' is not a full date (YYYY-MM-DD[Thh:mm:ss+zz:zz])",
      "entry[1] (Observation p1) valueQuantity.comparator: '<' results are not stored as values",
      "entry[2] (Observation p1) valueQuantity.system: 'http://example.org/units' is not UCUM (http://unitsofmeasure.org)",
      "entry[3] (Observation p1) subject.reference: 'Patient/nobody' names no Patient entry in this Bundle",
      "entry[4] (Observation p1) status: 'entered-in-error' is not imported (final, amended or corrected only)",
      "entry[5] resourceType: 'Condition' is not imported (Observation only)",
      'entry[6] (Observation p1) valueQuantity.value: a numeric result is missing',
    ]);
  });

  it('resolves a subject reference to the Patient entry and its identifiers', () => {
    const r = readObservationBundle({
      resourceType: 'Bundle',
      type: 'collection',
      entry: [
        {
          fullUrl: 'urn:uuid:11111111-2222-3333-4444-555555555555',
          resource: {
            resourceType: 'Patient',
            id: 'x',
            identifier: [{ system: 'https://clinic.example.org/mrn', value: 'DEMO-9' }],
          },
        },
        { resource: observation({ subject: { reference: 'Patient/x' } }) },
      ],
    });
    expect(r.ok && r.results[0]?.subjectIdentifiers).toEqual([
      { system: 'https://clinic.example.org/mrn', value: 'DEMO-9' },
    ]);
  });

  it('refuses a document that is not a Bundle as a whole', () => {
    expect(readObservationBundle([])).toEqual({
      ok: false,
      reason: 'the file is not a JSON object (a FHIR Bundle is expected)',
    });
    expect(readObservationBundle(observation())).toMatchObject({ ok: false });
  });
});
