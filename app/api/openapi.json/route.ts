import { openApiDocument } from '@/lib/assumptions/openapi';

/** The OpenAPI 3.1 document of the consumer API (public, like the API's own 401 answers). */
export function GET() {
  return Response.json(openApiDocument());
}
