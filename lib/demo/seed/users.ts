import type { Role } from '@/db/schema';

/** The invented demo lender's accounts (one per role). Listed in README.md. */
export const DEMO_ORGANISATION = 'Fenmoor Cooperative Bank';

export const demoUsers: { email: string; name: string; role: Role }[] = [
  { email: 'analyst@fenmoor.example', name: 'Ines Carrow', role: 'analyst' },
  { email: 'validator@fenmoor.example', name: 'Oren Vale', role: 'validator' },
  { email: 'viewer@fenmoor.example', name: 'Tamsin Brook', role: 'viewer' },
  { email: 'admin@fenmoor.example', name: 'Rafe Lindqvist', role: 'admin' },
];
