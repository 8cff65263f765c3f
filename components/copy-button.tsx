'use client';

import { useState } from 'react';

/**
 * Copies a text to the clipboard and says so (for a secret shown once, such as a new API token).
 * Falls back to selecting the text in `targetId` when the browser refuses the clipboard, so the
 * person can copy it by hand.
 */
export function CopyButton({ text, targetId, label = 'Copy' }: { text: string; targetId?: string; label?: string }) {
  const [state, setState] = useState<'idle' | 'copied' | 'select'>('idle');
  async function copy() {
    try {
      await navigator.clipboard.writeText(text);
      setState('copied');
    } catch {
      const el = targetId ? document.getElementById(targetId) : null;
      if (el) {
        const range = document.createRange();
        range.selectNodeContents(el);
        window.getSelection()?.removeAllRanges();
        window.getSelection()?.addRange(range);
      }
      setState('select');
    }
  }
  return (
    <span className="inline-flex items-center gap-2">
      <button type="button" className="btn btn-quiet px-2 py-1 text-sm" onClick={copy}>
        {label}
      </button>
      <span role="status" className="text-xs">
        {state === 'copied' ? 'Copied to the clipboard.' : state === 'select' ? 'The browser refused the clipboard: the token is selected, press Ctrl+C (or ⌘C).' : ''}
      </span>
    </span>
  );
}
