/**
 * A small validator for the subset of JSON Schema (draft 2020-12) that model-schema.ts uses:
 * type, const, enum, properties, required, additionalProperties: false, items, minItems,
 * minLength, minimum, maximum, exclusiveMinimum, pattern, oneOf, $ref to #/$defs. Returns the
 * first violation as { path, message }, or null. Pure (runs in the browser worker too).
 */
type Schema = Record<string, unknown>;

export interface SchemaViolation {
  path: string;
  message: string;
}

const typeOf = (v: unknown): string => (v === null ? 'null' : Array.isArray(v) ? 'array' : typeof v);

function typeMatches(t: string, v: unknown): boolean {
  if (t === 'integer') return typeof v === 'number' && Number.isInteger(v);
  if (t === 'number') return typeof v === 'number' && Number.isFinite(v);
  return typeOf(v) === t;
}

export function validateJson(root: Schema, value: unknown): SchemaViolation | null {
  const resolve = (s: Schema): Schema => {
    const ref = s.$ref as string | undefined;
    if (!ref) return s;
    const name = ref.replace('#/$defs/', '');
    return (root.$defs as Record<string, Schema>)[name];
  };
  const check = (sIn: Schema, v: unknown, path: string): SchemaViolation | null => {
    const s = resolve(sIn);
    const bad = (message: string) => ({ path: path || '(document)', message });
    if (s.oneOf) {
      const options = s.oneOf as Schema[];
      const results = options.map((o) => check(o, v, path));
      const ok = results.filter((r) => r === null).length;
      if (ok === 1) return null;
      if (ok > 1) return bad('matches more than one alternative');
      // Report the alternative that got furthest (the one whose const/type matched).
      const deepest = results.reduce((a, b) => ((b!.path.length > a!.path.length ? b : a)));
      return deepest!.path !== (path || '(document)') ? deepest : bad(`matches none of ${options.length} alternatives (${results.map((r) => r!.message).join('; ')})`);
    }
    if ('const' in s && v !== s.const) return bad(`is ${JSON.stringify(v)}, expected ${JSON.stringify(s.const)}`);
    if (s.enum && !(s.enum as unknown[]).includes(v)) return bad(`is ${JSON.stringify(v)}, expected one of ${(s.enum as unknown[]).map((x) => JSON.stringify(x)).join(', ')}`);
    if (s.type) {
      const types = Array.isArray(s.type) ? (s.type as string[]) : [s.type as string];
      if (!types.some((t) => typeMatches(t, v))) return bad(`is ${typeOf(v)}, expected ${types.join(' or ')}`);
    }
    if (typeof v === 'number') {
      if (typeof s.minimum === 'number' && !(v >= s.minimum)) return bad(`is ${v}, expected ≥ ${s.minimum}`);
      if (typeof s.maximum === 'number' && !(v <= s.maximum)) return bad(`is ${v}, expected ≤ ${s.maximum}`);
      if (typeof s.exclusiveMinimum === 'number' && !(v > s.exclusiveMinimum)) return bad(`is ${v}, expected > ${s.exclusiveMinimum}`);
    }
    if (typeof v === 'string') {
      if (typeof s.minLength === 'number' && v.length < s.minLength) return bad(`is shorter than ${s.minLength} characters`);
      if (typeof s.pattern === 'string' && !new RegExp(s.pattern, 'u').test(v)) return bad(`is ${JSON.stringify(v)}, expected to match ${s.pattern}`);
    }
    if (Array.isArray(v)) {
      if (typeof s.minItems === 'number' && v.length < s.minItems) return bad(`has ${v.length} items, expected at least ${s.minItems}`);
      if (s.items) for (let i = 0; i < v.length; i++) {
        const r = check(s.items as Schema, v[i], `${path}[${i}]`);
        if (r) return r;
      }
    }
    if (typeOf(v) === 'object') {
      const o = v as Record<string, unknown>;
      const props = (s.properties ?? {}) as Record<string, Schema>;
      for (const k of (s.required ?? []) as string[]) if (!(k in o)) return bad(`lacks the required field "${k}"`);
      for (const [k, x] of Object.entries(o)) {
        const p = path ? `${path}.${k}` : k;
        if (props[k]) {
          const r = check(props[k], x, p);
          if (r) return r;
        } else if (s.additionalProperties === false) return { path: p, message: 'is not a field of this schema' };
      }
    }
    return null;
  };
  return check(root, value, '');
}
