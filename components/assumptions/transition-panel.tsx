'use client';

import { useMutation } from '@tanstack/react-query';
import { useRouter } from 'next/navigation';
import { useMemo, useState } from 'react';
import { FormField, FormMessage } from '@/components/forms/form-field';
import { useFieldErrors } from '@/components/forms/use-field-errors';
import { actionLabels, transitionRules, type UserAction } from '@/lib/assumptions/lifecycle';
import { apiSend } from '@/lib/client/api';
import { problemOf, type FormFieldRef } from '@/lib/forms/place-errors';
import { DecisionDialog, type DecisionFacts } from './decision-dialog';

const FIELDS: readonly FormFieldRef[] = [['comment', 'transition-comment']];

const confirmText = {
  retire: 'Retire this published version? Consumers will no longer receive it, and it cannot be published again.',
  reject: 'Reject this version? A rejected version cannot be reopened; the analyst drafts a new one.',
} as const;

/**
 * The actions open to the signed-in person on a version; the server decides again on each. Approve
 * and publish ask for confirmation in a dialog that shows the value and what it stands with.
 */
export function TransitionPanel({
  versionId,
  actions,
  facts,
  endpoint = `/api/assumptions/${versionId}/transitions`,
}: {
  versionId: number;
  actions: UserAction[];
  facts: DecisionFacts;
  /** Where the transition is sent (a factor-correlation matrix's own route). */
  endpoint?: string;
}) {
  const router = useRouter();
  const [comment, setComment] = useState('');
  const [done, setDone] = useState<string | null>(null);
  const [confirming, setConfirming] = useState<'approve' | 'publish' | null>(null);
  const m = useMutation({
    mutationFn: (action: UserAction) =>
      apiSend<{ status: string }>('POST', endpoint, { action, comment: comment.trim() || undefined }),
    onSuccess: (r) => {
      setDone(`Done: the version is now ${r.status.replace('_', ' ')}.`);
      setComment('');
      router.refresh();
    },
  });
  const problem = useMemo(() => problemOf(m.error), [m.error]);
  const { error, formMessage } = useFieldErrors(problem, FIELDS);
  const doneNote = done ? (
    <p className="notice-good text-sm" role="status">
      {done}
    </p>
  ) : null;
  // After a decision that leaves this person nothing more to do, the page refreshes with no actions:
  // the sentence saying what was done stays.
  if (!actions.length) {
    return (
      <div className="space-y-3">
        {doneNote}
        <p className="text-sm text-[var(--color-muted)]">Nothing for you to do on this version now.</p>
      </div>
    );
  }
  const needsComment = actions.some((a) => transitionRules[a].commentRequired);
  const commentFor = actions.filter((a) => transitionRules[a].commentRequired).map((a) => actionLabels[a].toLowerCase());
  return (
    <div className="space-y-3">
      <FormField
        id="transition-comment"
        label={`Comment${needsComment ? ` (required to ${commentFor.join(', ').replace(/, ([^,]*)$/, ' or $1')})` : ' (optional)'}`}
        error={error('transition-comment')}
      >
        {(a) => <textarea {...a} className="field" rows={3} value={comment} onChange={(e) => setComment(e.target.value)} />}
      </FormField>
      <div className="flex flex-wrap gap-2">
        {actions.map((a) => (
          <button
            key={a}
            type="button"
            className={`btn ${a === 'reject' ? 'btn-danger' : a === 'approve' || a === 'submit' || a === 'publish' ? '' : 'btn-quiet'}`}
            disabled={m.isPending}
            onClick={() => {
              setDone(null);
              // Retiring and rejecting cannot be undone: ask once.
              if ((a === 'retire' || a === 'reject') && !window.confirm(confirmText[a])) return;
              // Approving and publishing: say what the decision does first (a missing comment is the server's sentence).
              if (a === 'publish' || (a === 'approve' && comment.trim())) {
                setConfirming(a);
                return;
              }
              m.mutate(a);
            }}
          >
            {actionLabels[a]}
          </button>
        ))}
      </div>
      {confirming ? (
        <DecisionDialog
          action={confirming}
          facts={facts}
          comment={comment}
          onCancel={() => setConfirming(null)}
          onConfirm={() => {
            setConfirming(null);
            m.mutate(confirming);
          }}
        />
      ) : null}
      <FormMessage message={formMessage} />
      {doneNote}
    </div>
  );
}
