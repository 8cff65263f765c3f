'use client';

import { signOut } from 'next-auth/react';

export function SignOutButton() {
  return (
    <button type="button" className="btn btn-quiet px-2.5 py-1 text-sm" onClick={() => signOut({ callbackUrl: '/sign-in' })}>
      Sign out
    </button>
  );
}
