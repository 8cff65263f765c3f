import Link from 'next/link';
import { redirect } from 'next/navigation';
import type { ReactNode } from 'react';
import { AppNav } from '@/components/app-nav';
import { Providers } from '@/components/providers';
import { SignOutButton } from '@/components/sign-out-button';
import { DEFERRAL } from '@/lib/assumptions/cautions';
import { roleLabels } from '@/lib/auth/permissions';
import { getCurrentUser } from '@/lib/auth/session';
import { mailIsCaptured } from '@/lib/dal/outbox';
import { navFor } from '@/lib/nav';

export default async function AppLayout({ children }: { children: ReactNode }) {
  const user = await getCurrentUser();
  if (!user) redirect('/sign-in');
  const items = navFor(user.role, mailIsCaptured()).map(({ href, label }) => ({ href, label }));
  return (
    <Providers>
      <header className="border-b border-[var(--color-line)] bg-white">
        <div className="mx-auto flex max-w-7xl flex-wrap items-center gap-4 px-5 py-2.5">
          <Link href="/" className="mr-2 text-lg font-semibold tracking-tight text-[var(--color-ink)] no-underline">
            <span className="text-[var(--color-accent)]">ρ</span> Rhobook
          </Link>
          <AppNav items={items} />
          <div className="ml-auto flex items-center gap-3 text-sm">
            <Link href="/account" data-testid="current-user" className="text-[var(--color-ink)] no-underline hover:underline">
              {user.name} <span className="badge ml-1">{roleLabels[user.role]}</span>
            </Link>
            <SignOutButton />
          </div>
        </div>
      </header>
      <main className="mx-auto max-w-7xl px-5 py-6">{children}</main>
      <footer className="mx-auto max-w-7xl px-5 pb-8 text-xs text-[var(--color-muted)]">
        Rhobook supports the estimation and governance of correlation assumptions. {DEFERRAL}
      </footer>
    </Providers>
  );
}
