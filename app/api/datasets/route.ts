import { assertMultipartRequest } from '@/lib/auth/same-origin';
import { requireUser } from '@/lib/auth/session';
import { assertMayUpload, listDatasets, uploadDataset } from '@/lib/dal/datasets';
import { uploadLimits } from '@/lib/env';
import { errorResponse } from '@/lib/errors';
import { withReceivedUpload } from '@/lib/http/multipart';

export const runtime = 'nodejs';

export async function GET() {
  try {
    const actor = await requireUser();
    return Response.json({ datasets: await listDatasets(actor) });
  } catch (err) {
    return errorResponse(err);
  }
}

/**
 * Upload (multipart/form-data: kind, name, optional description, supersedes, loan-tape options, and
 * the file in a part named "file"). 201 accepted; 202 loan tape queued for conversion; 422
 * `invalid:upload` with the findings; 409 the same file is already a dataset; 413 over the limit.
 */
export async function POST(req: Request) {
  try {
    const actor = await requireUser();
    assertMultipartRequest(req);
    assertMayUpload(actor);
    const limits = uploadLimits();
    const result = await withReceivedUpload(req, limits.maxBytes, (upload) => uploadDataset(actor, upload, limits));
    return Response.json(result.body, { status: result.status });
  } catch (err) {
    return errorResponse(err);
  }
}
