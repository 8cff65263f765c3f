import type { Metadata } from 'next';
import Link from 'next/link';
import { forbidden, notFound } from 'next/navigation';
import { z } from 'zod';
import { DraftForm } from '@/components/assumptions/draft-form';
import { todayIso } from '@/lib/assumptions/dates';
import { editableStatuses } from '@/lib/assumptions/lifecycle';
import { can } from '@/lib/auth/permissions';
import { requireUser } from '@/lib/auth/session';
import { getVersion } from '@/lib/dal/assumptions';
import { AppError } from '@/lib/errors';

export const metadata: Metadata = { title: 'Edit assumption' };

export default async function EditVersionPage({ params }: { params: Promise<{ id: string }> }) {
  const actor = await requireUser();
  if (!can(actor.role, 'assumptions:draft')) forbidden();
  const id = z.coerce.number().int().positive().safeParse((await params).id);
  if (!id.success) notFound();
  const v = await getVersion(actor, id.data).catch((err) => {
    if (err instanceof AppError && err.kind === 'not_found') notFound();
    throw err;
  });
  return (
    <div className="space-y-4">
      <p className="text-sm">
        <Link href="/library">Library</Link> / <Link href={`/library/versions/${v.id}`}>{v.segment} v{v.version}</Link> / edit
      </p>
      <h1>
        Edit {v.segment} v{v.version}
      </h1>
      {!editableStatuses.includes(v.status) ? (
        <p className="notice-bad">This version is {v.status} and can no longer be edited: draft a new version instead.</p>
      ) : (
        <>
          {v.status === 'draft' && v.decisionComment ? (
            <p className="notice-caution text-sm" data-testid="changes-requested">
              Changes requested: {v.decisionComment}
            </p>
          ) : null}
          {v.status !== 'draft' ? (
            <p className="notice-caution text-sm">This version is {v.status.replace('_', ' ')}: saving an edit returns it to draft and voids its reviews.</p>
          ) : null}
          <section className="panel p-5">
            <DraftForm
              mode="edit"
              versionId={v.id}
              estimate={v.estimate}
              today={todayIso()}
              initial={{
                margins: {
                  data: { value: v.marginData, rationale: v.marginDataRationale },
                  practice: { value: v.marginPractice, rationale: v.marginPracticeRationale },
                  general: { value: v.marginGeneral, rationale: v.marginGeneralRationale },
                },
                finalValue: v.finalValue,
                intendedUses: v.intendedUses,
                limitations: v.limitations,
                effectiveDate: v.effectiveDate,
                reviewBy: v.reviewBy,
              }}
            />
          </section>
        </>
      )}
    </div>
  );
}
