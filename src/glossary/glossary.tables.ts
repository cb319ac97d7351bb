/** The clinic's patient-facing food names, one per food and handout language. */
export interface FoodGlossaryTable {
  food_id: number;
  language: string;
  name: string;
  status: 'drafted' | 'reviewed';
  updated_by: number | null;
  updated_at: string;
}

/** A food's own name in another language as its table gives it. */
export interface FoodLocalNameTable {
  food_id: number;
  language: string;
  name: string;
}

/** The plate ledger's unsaved edits of a plan (one draft per plan). */
export interface PlanDraftTable {
  plan_id: number;
  base_version: number;
  input_json: string;
  updated_by: number | null;
  updated_at: string;
}

export interface GlossaryTables {
  food_glossary: FoodGlossaryTable;
  food_local_name: FoodLocalNameTable;
  plan_draft: PlanDraftTable;
}
