import { readFile } from 'node:fs/promises';
import path from 'node:path';
import type { Metadata } from 'next';
import ReactMarkdown from 'react-markdown';
import remarkGfm from 'remark-gfm';
import { requireUser } from '@/lib/auth/session';
import { ENGINE_VERSION } from '@/lib/stats/version';

export const metadata: Metadata = { title: 'Method' };

/**
 * The methodology (docs/methodology.md, written for a validator) rendered as a page. Markdown is
 * turned into React elements by react-markdown; raw HTML in the file is dropped, never injected.
 */
export default async function MethodPage() {
  await requireUser();
  const text = await readFile(path.join(process.cwd(), 'docs', 'methodology.md'), 'utf8');
  return (
    <article className="method panel mx-auto max-w-4xl p-6" aria-label="Methodology">
      <p className="no-print mb-3 text-sm text-[var(--color-muted)]">
        This page describes engine {ENGINE_VERSION}, the one running now; every report names the engine version its numbers come from.
      </p>
      <ReactMarkdown remarkPlugins={[remarkGfm]} skipHtml>
        {text}
      </ReactMarkdown>
    </article>
  );
}
