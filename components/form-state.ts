/**
 * What a server action answers to the form that called it (React's useActionState): whether it
 * worked, one sentence for the person, and on failure the field it concerns with every field's
 * sentence (from parseOrThrow), so the form can mark them. It never echoes a submitted password.
 * The actions under app/ build it (lib/errors.ts failureState for failures); the forms read it.
 */
export type FormState = {
  ok: boolean;
  message: string | null;
  field?: string | null;
  fieldErrors?: Record<string, string>;
};

/** The state of a form before its first submission. */
export const initialFormState: FormState = { ok: false, message: null };
