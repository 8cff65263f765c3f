import { assertSameOrigin } from '@/lib/auth/same-origin';
import { receiveWebhook } from '@/lib/dal/webhook-receiver';
import { errorResponse } from '@/lib/errors';

/**
 * POST: the local webhook receiver (lib/dal/webhook-receiver.ts): 200 for a body signed with its
 * model's secret, 401 otherwise; 404 while mail goes through an SMTP server. A server's POST carries
 * no Origin, so the same-origin check lets it through and refuses a browser of another site.
 */
export async function POST(req: Request) {
  try {
    assertSameOrigin(req);
    return Response.json(await receiveWebhook(await req.text(), req.headers));
  } catch (err) {
    return errorResponse(err);
  }
}
