/** Reads a model document: JSON, then the schema (model-schema.ts). Bad input names the field. Pure. */
import { KilnInputError } from '../errors.ts';
import { MODEL_JSON_SCHEMA } from './model-schema.ts';
import { MODEL_SCHEMA, type ModelDocument } from './types.ts';
import { validateJson } from './validate-json.ts';

export function parseModelDocument(text: string, file: string): ModelDocument {
  let value: unknown;
  try {
    value = JSON.parse(text);
  } catch (e) {
    throw new KilnInputError('model document is not JSON', { file, value: e instanceof Error ? e.message : String(e), expected: `a ${MODEL_SCHEMA} document written by kiln build` });
  }
  const v = validateJson(MODEL_JSON_SCHEMA as unknown as Record<string, unknown>, value);
  if (v) throw new KilnInputError(`model document does not follow ${MODEL_SCHEMA}: ${v.path} ${v.message}`, { file, field: v.path, expected: `a ${MODEL_SCHEMA} document (model.schema.json)` });
  return value as ModelDocument;
}
