import bcrypt from 'bcryptjs';
import { randomBytes } from 'node:crypto';

const ROUNDS = 10;

export function hashPassword(plain: string): Promise<string> {
  return bcrypt.hash(plain, ROUNDS);
}

export function verifyPassword(plain: string, hash: string): Promise<boolean> {
  return bcrypt.compare(plain, hash);
}

/** A one-time password for an invitation: 16 characters, no look-alike letters. */
export function generateTemporaryPassword(): string {
  const alphabet = 'abcdefghjkmnpqrstuvwxyzABCDEFGHJKLMNPQRSTUVWXYZ23456789';
  const bytes = randomBytes(16);
  return Array.from(bytes, (b) => alphabet[b % alphabet.length]).join('');
}

/** A bcrypt hash of nothing anyone knows, compared against when the e-mail is unknown, so that
 * unknown and known e-mails take the same time to refuse. */
export const DUMMY_HASH = '$2b$10$Az.xa0AXzuY18Gr5gqJfeOjV0YOjs8G4e/6srPnFTe71/IoxoEkUe';
