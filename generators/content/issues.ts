/**
 * Translation of zod issues into KilnInputError: file, field path (`detectors[1].stack.sensor.depletionUm`),
 * YAML line, the value found and what was expected. Pure.
 */
import { z } from 'zod';
import { KilnInputError, throwInputErrors } from '../errors.ts';
import type { FieldPath, Position } from './yaml.ts';

/** `a.b[2].c` from ['a', 'b', 2, 'c']. */
export function formatPath(path: FieldPath): string {
  let s = '';
  for (const seg of path) s += typeof seg === 'number' ? `[${seg}]` : s === '' ? seg : `.${seg}`;
  return s;
}

export function valueAt(root: unknown, path: FieldPath): unknown {
  let v: unknown = root;
  for (const seg of path) {
    if (v === null || typeof v !== 'object') return undefined;
    v = (v as Record<string | number, unknown>)[seg];
  }
  return v;
}

/** Strips wrappers so that a field's schema can be looked up by path. */
function unwrap(s: z.ZodTypeAny): z.ZodTypeAny {
  for (;;) {
    if (s instanceof z.ZodEffects) s = s.innerType();
    else if (s instanceof z.ZodOptional || s instanceof z.ZodNullable) s = s.unwrap();
    else if (s instanceof z.ZodDefault) s = s.removeDefault();
    else if (s instanceof z.ZodPipeline) s = s._def.in;
    else return s;
  }
}

/** The schema of the object at `path` (following the raw value through discriminated unions). */
function schemaAt(schema: z.ZodTypeAny, path: FieldPath, raw: unknown): z.ZodTypeAny | undefined {
  let s: z.ZodTypeAny | undefined = unwrap(schema);
  let v = raw;
  for (const seg of [...path, null]) {
    if (s instanceof z.ZodDiscriminatedUnion) {
      const d = v && typeof v === 'object' ? (v as Record<string, unknown>)[s.discriminator] : undefined;
      s = s.optionsMap.get(d as z.Primitive);
      if (!s) return undefined;
    }
    if (seg === null) return s;
    if (s instanceof z.ZodObject) s = s.shape[seg];
    else if (s instanceof z.ZodArray) s = s.element;
    else if (s instanceof z.ZodRecord) s = s.valueSchema;
    else return undefined;
    if (!s) return undefined;
    s = unwrap(s);
    v = v && typeof v === 'object' ? (v as Record<string | number, unknown>)[seg] : undefined;
  }
  return s;
}

function bound(kind: 'min' | 'max', inclusive: boolean, n: number | bigint, type: string): string {
  if (type === 'array') return kind === 'min' ? `at least ${n} item${n === 1 ? '' : 's'}` : `at most ${n} items`;
  if (type === 'string') return kind === 'min' ? `at least ${n} character${n === 1 ? '' : 's'} (not blank)` : `at most ${n} characters`;
  return `${kind === 'min' ? (inclusive ? '≥' : '>') : inclusive ? '≤' : '<'} ${n}`;
}

/** Message and expectation of one issue. */
function describe(iss: z.ZodIssue, schema: z.ZodTypeAny | undefined, raw: unknown): { message: string; expected: string; extraPath?: string } {
  switch (iss.code) {
    case 'invalid_type':
      if (iss.received === 'undefined') return { message: 'missing required field', expected: `a ${iss.expected}` };
      return { message: `wrong type (${iss.received})`, expected: `a ${iss.expected}` };
    case 'unrecognized_keys': {
      const obj = schema ? schemaAt(schema, iss.path, raw) : undefined;
      const known = obj instanceof z.ZodObject ? Object.keys(obj.shape) : [];
      return {
        message: `unknown field${iss.keys.length > 1 ? 's' : ''} ${iss.keys.map((k) => `"${k}"`).join(', ')}`,
        expected: known.length ? `one of the fields ${known.join(', ')}` : 'no other fields',
        extraPath: iss.keys[0],
      };
    }
    case 'invalid_enum_value':
      return { message: 'not an allowed value', expected: `one of ${iss.options.map((o) => JSON.stringify(o)).join(', ')}` };
    case 'invalid_literal':
      return { message: 'not the allowed value', expected: JSON.stringify(iss.expected) };
    case 'invalid_union_discriminator':
      return { message: 'unknown variant', expected: `one of ${iss.options.map((o) => JSON.stringify(o)).join(', ')}` };
    case 'invalid_union':
      return { message: 'matches none of the allowed forms', expected: 'one of the documented forms' };
    case 'too_small':
      return { message: 'too small', expected: bound('min', iss.inclusive, iss.minimum, iss.type) };
    case 'too_big':
      return { message: 'too large', expected: bound('max', iss.inclusive, iss.maximum, iss.type) };
    case 'not_finite':
      return { message: 'not a finite number', expected: 'a finite number' };
    case 'custom':
      return { message: iss.message, expected: (iss.params?.expected as string | undefined) ?? 'a valid value' };
    default:
      return { message: iss.message, expected: 'a valid value' };
  }
}

export interface IssueContext {
  file: string;
  /** The raw parsed document (to quote the bad value). */
  raw: unknown;
  locate?: (path: FieldPath) => Position | undefined;
  /** The schema that was applied (to list the known fields of an object). */
  schema?: z.ZodTypeAny;
}

/** One issue → one KilnInputError. `pathPrefix` locates a sub-document inside the file. */
export function issueToError(iss: z.ZodIssue, cx: IssueContext, pathPrefix: FieldPath = []): KilnInputError {
  const { message, expected, extraPath } = describe(iss, cx.schema, cx.raw);
  const path = [...pathPrefix, ...iss.path, ...(extraPath !== undefined ? [extraPath] : [])];
  const value = extraPath !== undefined ? extraPath : valueAt(cx.raw, iss.path);
  const pos = cx.locate?.(path);
  return new KilnInputError(message, {
    file: cx.file,
    line: pos?.line,
    field: formatPath(path) || undefined,
    value: value === undefined && iss.code === 'invalid_type' ? undefined : value,
    expected,
  });
}

/**
 * Parses `raw` with `schema`; on failure throws every issue (a KilnInputErrors when there are
 * several), the one that comes first in the file first.
 */
export function parseWith<S extends z.ZodTypeAny>(schema: S, raw: unknown, cx: Omit<IssueContext, 'raw' | 'schema'>, pathPrefix: FieldPath = []): z.output<S> {
  const r = schema.safeParse(raw);
  if (r.success) return r.data;
  // A misspelt field also shows up as a missing one: report the unknown name first, then by line.
  const ranked = r.error.issues.map((i) => ({ unknown: i.code === 'unrecognized_keys' ? 0 : 1, err: issueToError(i, { ...cx, raw, schema }, pathPrefix) }));
  ranked.sort((a, b) => a.unknown - b.unknown || (a.err.where.line ?? Infinity) - (b.err.where.line ?? Infinity));
  throwInputErrors(ranked.map((x) => x.err));
  throw new Error('unreachable: a failed parse has at least one issue');
}
