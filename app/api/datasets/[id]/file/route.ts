import { Readable } from 'node:stream';
import { requireUser } from '@/lib/auth/session';
import { openDatasetFile } from '@/lib/dal/datasets';
import { safeDownloadName } from '@/lib/http/download';
import { datasetIdFrom } from '@/lib/http/route-params';
import { errorResponse } from '@/lib/errors';

export const runtime = 'nodejs';

/** The original uploaded file, exactly as stored (gzip-compressed: `<name>.gz`). */
export async function GET(_req: Request, ctx: { params: Promise<{ id: string }> }) {
  try {
    const actor = await requireUser();
    const { fileName, pieces } = await openDatasetFile(actor, await datasetIdFrom(ctx));
    const body = Readable.toWeb(Readable.from(pieces)) as ReadableStream<Uint8Array>;
    return new Response(body, {
      headers: {
        'Content-Type': 'application/gzip',
        'Content-Disposition': `attachment; filename="${safeDownloadName(fileName)}.gz"`,
      },
    });
  } catch (err) {
    return errorResponse(err);
  }
}
