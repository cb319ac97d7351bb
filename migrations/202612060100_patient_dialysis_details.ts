import type { Kysely } from 'kysely';

// Dialysis details the targets read: 24-h urine output (mL/day, for the fluid allowance) and
// the glucose instilled with peritoneal dialysate (g/day, for the energy it provides).
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema.alterTable('patient').addColumn('urine_output_ml_per_day', 'real').execute();
  await db.schema.alterTable('patient').addColumn('pd_glucose_g_per_day', 'real').execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.alterTable('patient').dropColumn('pd_glucose_g_per_day').execute();
  await db.schema.alterTable('patient').dropColumn('urine_output_ml_per_day').execute();
}
