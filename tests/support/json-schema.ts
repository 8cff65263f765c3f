/**
 * A small validator for the subset of JSON Schema 2020-12 that zod emits (type, properties,
 * required, additionalProperties, items, enum, anyOf, oneOf, $ref): the consumer API's real
 * answers are checked against the OpenAPI document with it. Returns the problems, [] when valid.
 */
export type Schema = Record<string, unknown>;
export function validate(value: unknown, schema: Schema, root: Schema, path = '$'): string[] {
  if (typeof schema.$ref === 'string') {
    const target = schema.$ref.replace(/^#\//, '').split('/').reduce<unknown>((o, k) => (o as Schema)[k], root);
    return validate(value, target as Schema, root, path);
  }
  for (const key of ['anyOf', 'oneOf'] as const) {
    if (Array.isArray(schema[key])) {
      const ok = (schema[key] as Schema[]).filter((s) => validate(value, s, root, path).length === 0).length;
      if (key === 'anyOf' ? ok === 0 : ok !== 1) return [`${path}: matches ${ok} of ${key}`];
    }
  }
  const errs: string[] = [];
  const types = schema.type === undefined ? [] : ([] as string[]).concat(schema.type as string | string[]);
  const actual = value === null ? 'null' : Array.isArray(value) ? 'array' : typeof value;
  const fits = (t: string) => (t === 'integer' ? Number.isInteger(value) : t === actual);
  if (types.length && !types.some(fits)) return [`${path}: expected ${types.join(' or ')}, got ${actual}`];
  const t = types.find(fits);
  if (Array.isArray(schema.enum) && !schema.enum.includes(value)) errs.push(`${path}: ${String(value)} not in enum`);
  if (t === 'object' && value && typeof value === 'object') {
    const props = (schema.properties ?? {}) as Record<string, Schema>;
    for (const r of (schema.required ?? []) as string[]) if (!(r in value)) errs.push(`${path}.${r}: required`);
    for (const [k, v] of Object.entries(value)) {
      if (props[k]) errs.push(...validate(v, props[k], root, `${path}.${k}`));
      else if (schema.additionalProperties === false) errs.push(`${path}.${k}: not in the document`);
    }
  }
  if (t === 'array' && Array.isArray(value) && schema.items) value.forEach((v, i) => errs.push(...validate(v, schema.items as Schema, root, `${path}[${i}]`)));
  return errs;
}
