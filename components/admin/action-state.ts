import type { FormState } from '@/components/form-state';

/** What the administration actions answer: a form state, plus an invitation's one-time password (shown once). */
export type AdminActionState = FormState & { temporaryPassword?: string | null };
