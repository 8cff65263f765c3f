import { getHealth } from '@/lib/dal/health';

export const dynamic = 'force-dynamic';

/** Public health check: 200 when the database answers, 503 naming the failing part otherwise. */
export async function GET() {
  const h = await getHealth();
  return Response.json(h, { status: h.db === 'ok' ? 200 : 503, headers: { 'Cache-Control': 'no-store' } });
}
