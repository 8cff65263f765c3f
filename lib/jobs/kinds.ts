import type { z } from 'zod';

/**
 * The registry of job kinds and their payload schemas. A kind is declared once, in lib (so that
 * the web app can enqueue and validate without loading worker code); its handler is registered in
 * workers/handlers. Declarations live in lib/jobs/kinds/<kind>.ts and are imported by
 * lib/jobs/kinds/index.ts.
 */
const registry = new Map<string, z.ZodType>();

export function defineJobKind<S extends z.ZodType>(kind: string, payloadSchema: S): { kind: string; schema: S } {
  if (!/^[a-z][a-z0-9-]{1,39}$/.test(kind)) throw new Error(`Job kind "${kind}" must be kebab-case, 2-40 characters.`);
  const existing = registry.get(kind);
  if (existing && existing !== payloadSchema) throw new Error(`Job kind "${kind}" is declared twice.`);
  registry.set(kind, payloadSchema);
  return { kind, schema: payloadSchema };
}

export function payloadSchemaFor(kind: string): z.ZodType | undefined {
  return registry.get(kind);
}

export function declaredKinds(): string[] {
  return [...registry.keys()];
}
