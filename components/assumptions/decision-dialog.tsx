'use client';

import { useEffect, useRef } from 'react';
import { interval as intervalText, level, pd as pdText, rho as rhoText } from '@/lib/format';

/** What a person confirms before approving or publishing: the value and everything it stands with. */
export type DecisionFacts = SegmentDecisionFacts | MatrixDecisionFacts;

/** A factor-correlation matrix: what it is, as label and text lines (its value is a matrix, shown on the page). */
export type MatrixDecisionFacts = {
  kind: 'matrix';
  /** "the matrix of A, B, C" */
  segment: string;
  version: number;
  lines: [label: string, text: string][];
  effectiveDate: string;
  publishes: string | null;
  cautions: readonly string[];
  findings: { id: number; title: string; severity: string; status: string; dueDate: string }[];
};

type SegmentDecisionFacts = {
  kind?: 'segment';
  segment: string;
  version: number;
  value: number;
  pd: number;
  interval: { lower: number; upper: number; method: string; level: number };
  /** The mixing law the value must be used with, in words ("Gaussian copula", "Student-t copula, nu 6.73"). */
  mixingLaw: string;
  effectiveDate: string;
  /** When it publishes, in a sentence (lib/assumptions/publication.ts). */
  publishes: string | null;
  cautions: readonly string[];
  /** Findings on the version, its fit or its dataset that do not block approval (medium and low, not closed). */
  findings: { id: number; title: string; severity: string; status: string; dueDate: string }[];
};

/**
 * A modal confirmation (the native dialog element: focus stays inside, Escape cancels) that says
 * what the decision does before it is sent.
 */
export function DecisionDialog({
  action,
  facts,
  comment,
  onConfirm,
  onCancel,
}: {
  action: 'approve' | 'publish';
  facts: DecisionFacts;
  comment: string;
  onConfirm: () => void;
  onCancel: () => void;
}) {
  const ref = useRef<HTMLDialogElement>(null);
  useEffect(() => {
    const d = ref.current;
    if (d && !d.open) d.showModal();
  }, []);
  const verb = action === 'approve' ? 'Approve' : 'Publish';
  return (
    <dialog
      ref={ref}
      className="decision-dialog panel w-[min(40rem,95vw)] p-5"
      aria-labelledby="decision-title"
      onCancel={(e) => {
        e.preventDefault();
        onCancel();
      }}
    >
      <h2 id="decision-title" className="mb-2">
        {verb} {facts.segment} version {facts.version}?
      </h2>
      {facts.kind === 'matrix' ? (
        <dl className="grid grid-cols-[10rem_1fr] gap-x-3 gap-y-1 text-sm" data-testid="decision-facts">
          {facts.lines.map(([label, text]) => (
            <div key={label} className="contents">
              <dt>{label}</dt>
              <dd>{text}</dd>
            </div>
          ))}
          <dt>Effective date</dt>
          <dd className="num">{facts.effectiveDate}</dd>
        </dl>
      ) : (
      <dl className="grid grid-cols-[10rem_1fr] gap-x-3 gap-y-1 text-sm" data-testid="decision-facts">
        <dt>Value</dt>
        <dd className="num font-semibold">{rhoText(facts.value)}</dd>
        <dt>With the PD</dt>
        <dd className="num">{pdText(facts.pd)}</dd>
        <dt>Interval</dt>
        <dd className="num">
          {intervalText(facts.interval.lower, facts.interval.upper)} {facts.interval.method}, {level(facts.interval.level)}
        </dd>
        <dt>Mixing law</dt>
        <dd>{facts.mixingLaw}</dd>
        <dt>Effective date</dt>
        <dd className="num">{facts.effectiveDate}</dd>
      </dl>
      )}
      {facts.publishes ? <p className="mt-2 text-sm font-medium">{facts.publishes}</p> : null}
      {action === 'approve' ? (
        <div className="mt-2 text-sm">
          <p className="font-medium">Your conclusion</p>
          <p className="whitespace-pre-wrap">{comment.trim() || '—'}</p>
        </div>
      ) : null}
      {facts.findings.length ? (
        <div className="notice-caution mt-3 text-sm" data-testid="decision-findings">
          <p className="font-medium">Findings still open (medium and low do not block approval):</p>
          <ul className="mt-1 list-disc pl-5">
            {facts.findings.map((f) => (
              <li key={f.id}>
                {f.severity}: {f.title} ({f.status.replace('_', ' ')}, due {f.dueDate})
              </li>
            ))}
          </ul>
        </div>
      ) : null}
      <div className="notice-caution mt-3 text-sm">
        <p className="font-medium">Cautions that travel with this value</p>
        <ul className="mt-1 list-disc pl-5">
          {facts.cautions.map((c) => (
            <li key={c}>{c}</li>
          ))}
        </ul>
      </div>
      <div className="mt-4 flex justify-end gap-2">
        <button type="button" className="btn btn-quiet" onClick={onCancel}>
          Cancel
        </button>
        <button type="button" className="btn" onClick={onConfirm} autoFocus>
          {verb} now
        </button>
      </div>
    </dialog>
  );
}
