import { createHash } from 'node:crypto';
import type {
  Bundle,
  DocumentReference,
  NutritionOrder,
  NutritionOrderOralDietNutrient,
  Patient,
  Reference,
} from '@medplum/fhirtypes';
import type { Target, TargetKey, Targets } from '../patients/targets.js';

/**
 * A plan version as FHIR R4: a NutritionOrder (oral diet with the daily nutrient limits and the
 * energy target; texture and schedule left empty) and the handout PDF as a DocumentReference,
 * in one `collection` Bundle. Pure: the time, ids and PDF bytes are handed in.
 */

export const UCUM_SYSTEM = 'http://unitsofmeasure.org';

export interface PlanExportInput {
  plan: { id: number; name: string; version: number; savedAt: string };
  patient: {
    label: string;
    identifier: { system: string | null; value: string } | null;
  };
  /** The targets the version froze when it was saved. */
  targets: Targets;
  handout: { pdf: Uint8Array; language: string; title: string };
  caution: string;
  /** Export time (ISO instant) and the two urn:uuid ids for the entries. */
  now: string;
  ids: { nutritionOrder: string; documentReference: string; bundle: string };
}

const NUTRIENTS: ReadonlyArray<{ key: TargetKey; name: string; ucum: string }> = [
  { key: 'phosphorusMg', name: 'Phosphorus', ucum: 'mg' },
  { key: 'proteinG', name: 'Protein', ucum: 'g' },
  { key: 'sodiumMg', name: 'Sodium', ucum: 'mg' },
  { key: 'potassiumMg', name: 'Potassium', ucum: 'mg' },
  { key: 'energyKcal', name: 'Energy', ucum: 'kcal' },
];

/**
 * One nutrient entry per end of a target range ("at least", "at most"), amounts per day: FHIR's
 * nutrient amount is a single quantity, so a range is written as its two ends, never as one
 * figure that could be read as the whole prescription.
 */
function nutrientsOf(targets: Targets): NutritionOrderOralDietNutrient[] {
  const out: NutritionOrderOralDietNutrient[] = [];
  for (const n of NUTRIENTS) {
    const t: Target = targets[n.key];
    const ends: Array<['at least' | 'at most', number | null]> = [
      ['at least', t.min],
      ['at most', t.max],
    ];
    for (const [side, value] of ends) {
      if (value === null) continue;
      out.push({
        modifier: { text: `${n.name}, ${side} per day (${sourceText(t)})` },
        amount: { value, unit: n.ucum, system: UCUM_SYSTEM, code: n.ucum },
      });
    }
  }
  return out;
}

function sourceText(t: Target): string {
  return t.setBy === 'dietitian' ? 'set by the dietitian' : t.source;
}

function subjectOf(p: PlanExportInput['patient']): Reference<Patient> {
  return p.identifier
    ? {
        identifier: {
          ...(p.identifier.system ? { system: p.identifier.system } : {}),
          value: p.identifier.value,
        },
        display: p.label,
      }
    : { display: p.label };
}

export function nutritionOrderOf(x: PlanExportInput): NutritionOrder {
  return {
    resourceType: 'NutritionOrder',
    identifier: [{ value: `phosledger-plan-${x.plan.id}-v${x.plan.version}` }],
    // a proposal: the product estimates for the care team, it does not order
    status: 'active',
    intent: 'proposal',
    patient: subjectOf(x.patient),
    dateTime: x.plan.savedAt,
    oralDiet: {
      type: [{ text: `Phosphorus-aware meal plan "${x.plan.name}", version ${x.plan.version}` }],
      nutrient: nutrientsOf(x.targets),
      instruction: `Daily amounts the plan was built against (estimates). ${x.caution}`,
    },
    note: [{ text: x.caution }],
  };
}

export function handoutReferenceOf(x: PlanExportInput): DocumentReference {
  const data = Buffer.from(x.handout.pdf);
  return {
    resourceType: 'DocumentReference',
    status: 'current',
    type: { text: 'Take-home sheet (patient handout of a meal plan)' },
    subject: subjectOf(x.patient),
    date: x.now,
    description: x.handout.title,
    content: [
      {
        attachment: {
          contentType: 'application/pdf',
          language: x.handout.language,
          data: data.toString('base64'),
          size: data.length,
          hash: createHash('sha1').update(data).digest('base64'),
          title: x.handout.title,
          creation: x.now,
        },
      },
    ],
    context: { related: [{ reference: `urn:uuid:${x.ids.nutritionOrder}` }] },
  };
}

/** The Bundle exported for a plan version. */
export function planBundle(x: PlanExportInput): Bundle {
  return {
    resourceType: 'Bundle',
    identifier: { system: 'urn:ietf:rfc:3986', value: `urn:uuid:${x.ids.bundle}` },
    type: 'collection',
    timestamp: x.now,
    entry: [
      { fullUrl: `urn:uuid:${x.ids.nutritionOrder}`, resource: nutritionOrderOf(x) },
      { fullUrl: `urn:uuid:${x.ids.documentReference}`, resource: handoutReferenceOf(x) },
    ],
  };
}
