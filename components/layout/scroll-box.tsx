import type { ReactNode } from 'react';

/**
 * A box that scrolls sideways when its table is wider than the screen, marked as such: shadows at
 * the edge that has more to show (globals.css `.scroll-box`), and for screen readers a named region
 * that takes the keyboard focus so it can be scrolled with the arrow keys. `relative` keeps
 * absolutely placed children (screen-reader-only headings) inside it.
 */
export function ScrollBox({ label, children, className = '' }: { label: string; children: ReactNode; className?: string }) {
  return (
    <div className={`scroll-box relative overflow-x-auto ${className}`} role="region" aria-label={label} tabIndex={0}>
      {children}
    </div>
  );
}
