/**
 * Where a form shows each error. The server names fields by their path in the request
 * (`margins.data.rationale`, parseOrThrow's `details.fieldErrors`); a form lists the paths it has
 * and the element id of each. Every error whose path is one of them (or lies under or above one)
 * goes beside that field; the others, and a summary, go at the form. Paths are for placing errors,
 * never shown: a person reads only the sentences.
 */

/** What a form was told went wrong: an AppError's JSON or message and details, or a FormState. */
export type FormProblem = {
  message: string;
  field?: string | null;
  fieldErrors?: Record<string, string>;
} | null;

/** A field of a form: its path in the request and the id of its element. */
export type FormFieldRef = readonly [path: string, elementId: string];

export type PlacedErrors = {
  /** Error sentence by element id. */
  byId: Record<string, string>;
  /** Element ids with an error, in the order of the form's fields (the first gets the focus). */
  order: string[];
  /** What to say at the form: a summary when fields are marked, and every error that has no field here. */
  formMessage: string | null;
};

function matches(errorPath: string, fieldPath: string): boolean {
  return errorPath === fieldPath || fieldPath.startsWith(`${errorPath}.`) || errorPath.startsWith(`${fieldPath}.`);
}

export function placeErrors(problem: FormProblem, fields: readonly FormFieldRef[]): PlacedErrors {
  if (!problem) return { byId: {}, order: [], formMessage: null };
  const errors = problem.fieldErrors && Object.keys(problem.fieldErrors).length > 0 ? problem.fieldErrors : problem.field ? { [problem.field]: problem.message } : {};
  const byId: Record<string, string> = {};
  const unplaced: string[] = [];
  for (const [path, message] of Object.entries(errors)) {
    const hit = fields.find(([fieldPath]) => matches(path, fieldPath));
    if (hit && !(hit[1] in byId)) byId[hit[1]] = message;
    else if (!hit && !unplaced.includes(message)) unplaced.push(message);
  }
  const order = fields.map(([, id]) => id).filter((id, i, all) => id in byId && all.indexOf(id) === i);
  if (order.length === 0) {
    return { byId, order, formMessage: [problem.message, ...unplaced.filter((m) => m !== problem.message)].join(' ') };
  }
  const summary = order.length === 1 ? 'One field needs a change: see the marked field.' : `${order.length} fields need a change: see the marked fields.`;
  return { byId, order, formMessage: [summary, ...unplaced].join(' ') };
}

/**
 * The problem of anything a form may be told: an AppError (its sentence, `details.field` and
 * `details.fieldErrors`), a server action's FormState, or any other error (its message only).
 */
export function problemOf(x: unknown): FormProblem {
  if (!x || typeof x !== 'object') return null;
  const o = x as { message?: unknown; field?: unknown; fieldErrors?: unknown; details?: { field?: unknown; fieldErrors?: unknown }; ok?: unknown };
  if (o.ok === true || typeof o.message !== 'string' || o.message === '') return null;
  const field = typeof o.details?.field === 'string' ? o.details.field : typeof o.field === 'string' ? o.field : null;
  const fe = (o.details?.fieldErrors ?? o.fieldErrors) as Record<string, string> | undefined;
  return { message: o.message, field, fieldErrors: fe && typeof fe === 'object' ? fe : undefined };
}
