import { describe, expect, it } from 'vitest';
import { patientUpdateSchema } from '../../src/patients/patient.js';

describe('patient updates (invented demo data)', () => {
  it('keeps the stored language when an update leaves it out', () => {
    const parsed = patientUpdateSchema.parse({ weightKg: 71 });
    expect(parsed).toEqual({ weightKg: 71 });
    expect('language' in parsed).toBe(false);
  });

  it('still validates a language that is given', () => {
    expect(patientUpdateSchema.safeParse({ language: 'es' }).success).toBe(true);
    expect(patientUpdateSchema.safeParse({ language: 'Spanish!' }).success).toBe(false);
  });
});
