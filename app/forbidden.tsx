import Link from 'next/link';

export default function Forbidden() {
  return (
    <main className="mx-auto max-w-xl px-6 py-16">
      <h1>Not allowed</h1>
      <p className="mt-2 text-[var(--color-muted)]">
        Your role does not give access to this page. If you need it, ask an administrator to change your role.
      </p>
      <p className="mt-4">
        <Link href="/">Back to the overview</Link>
      </p>
    </main>
  );
}
