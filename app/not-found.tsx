import Link from 'next/link';

export default function NotFound() {
  return (
    <main className="mx-auto max-w-xl px-6 py-16">
      <h1>Not found</h1>
      <p className="mt-2 text-[var(--color-muted)]">There is nothing here, or it is not visible to you.</p>
      <p className="mt-4">
        <Link href="/">Back to the overview</Link>
      </p>
    </main>
  );
}
