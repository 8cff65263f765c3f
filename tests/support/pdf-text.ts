import { getDocument } from 'pdfjs-dist/legacy/build/pdf.mjs';

/**
 * The text of a PDF, page by page, extracted with Mozilla's pdf.js (an independent reader, not
 * the library that wrote the file): each page's text items joined with spaces.
 */
export async function pdfText(bytes: Uint8Array): Promise<{ pages: string[]; text: string; info: Record<string, unknown> }> {
  const doc = await getDocument({ data: new Uint8Array(bytes), useSystemFonts: false, isEvalSupported: false, verbosity: 0 }).promise;
  const pages: string[] = [];
  for (let i = 1; i <= doc.numPages; i++) {
    const page = await doc.getPage(i);
    const content = await page.getTextContent();
    pages.push(content.items.map((it) => ('str' in it ? it.str : '')).join(' ').replace(/\s+/g, ' '));
  }
  const meta = await doc.getMetadata();
  await doc.destroy();
  return { pages, text: pages.join('\n'), info: (meta.info ?? {}) as Record<string, unknown> };
}
