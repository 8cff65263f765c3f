import { z } from 'zod';
import { consumerMatrixListSchema, consumerMatrixVersionsSchema } from '@/lib/factor-matrices/consumer';
import { consumerAnswerSchema, consumerListSchema, errorSchema } from './consumer';

/**
 * The OpenAPI 3.1 document of the consumer API, generated from the same zod schemas the answers are
 * checked against (lib/assumptions/consumer.ts), so the document cannot drift from the code
 * without the tests noticing.
 */
function schema(s: z.ZodType) {
  const j = z.toJSONSchema(s, { target: 'draft-2020-12', unrepresentable: 'any' }) as Record<string, unknown>;
  delete j.$schema;
  return j;
}

export function openApiDocument(serverUrl?: string) {
  const errors = {
    '401': { description: 'No token, or an unknown, expired or revoked one.', content: { 'application/json': { schema: { $ref: '#/components/schemas/Error' } } } },
    '403': { description: 'The token lacks the scope.', content: { 'application/json': { schema: { $ref: '#/components/schemas/Error' } } } },
  };
  const notFound = { description: 'Nothing in force, or no such version.', content: { 'application/json': { schema: { $ref: '#/components/schemas/Error' } } } };
  const asOf = {
    name: 'asOf',
    in: 'query',
    required: false,
    description:
      'The date (YYYY-MM-DD) at which the version in force is wanted; today (UTC) by default. The answer is the version that was the published one at the end of that day (UTC), or now for today and later dates: versions follow one another by publication time, so an answer for a past date never changes once given. A version past its review-by date on that day is not in force.',
    schema: { type: 'string', format: 'date' },
  };
  return {
    openapi: '3.1.0',
    info: {
      title: 'Rhobook consumer API',
      version: '1',
      description:
        'Published asset-correlation assumptions for downstream models, with their lineage and cautions. ' +
        'Authenticate with an API token created by an administrator: "Authorization: Bearer <token>". ' +
        'Approval in Rhobook is neither an independent validation nor a regulator\'s approval.',
    },
    ...(serverUrl ? { servers: [{ url: serverUrl }] } : {}),
    security: [{ bearer: [] }],
    paths: {
      '/api/v1/assumptions': {
        get: {
          operationId: 'getAssumptionsInForce',
          summary: 'The version in force at a date: of one segment, or of every segment',
          description: 'Scope assumptions:read. With `segment`, answers one assumption; without, every segment with a version in force.',
          parameters: [{ name: 'segment', in: 'query', required: false, schema: { type: 'string' } }, asOf],
          responses: {
            '200': {
              description: 'With segment: one assumption. Without: the list.',
              content: {
                'application/json': {
                  schema: { oneOf: [{ $ref: '#/components/schemas/Answer' }, { $ref: '#/components/schemas/List' }] },
                },
              },
            },
            '400': { description: 'A bad date.', content: { 'application/json': { schema: { $ref: '#/components/schemas/Error' } } } },
            ...errors,
            '404': notFound,
          },
        },
      },
      '/api/v1/assumptions/{id}/versions/{version}': {
        get: {
          operationId: 'getAssumptionVersion',
          summary: 'An exact published version (also superseded, expired or retired ones)',
          description: 'Scope assumptions:read.',
          parameters: [
            { name: 'id', in: 'path', required: true, schema: { type: 'integer' } },
            { name: 'version', in: 'path', required: true, schema: { type: 'integer' } },
          ],
          responses: {
            '200': { description: 'The version.', content: { 'application/json': { schema: { $ref: '#/components/schemas/Answer' } } } },
            ...errors,
            '404': notFound,
          },
        },
      },
      '/api/v1/assumptions/export': {
        get: {
          operationId: 'exportPublishedLibrary',
          summary: 'The published library as CSV (one row per segment, lineage columns included)',
          description: 'Scope assumptions:export. Cells starting with = + - @ are prefixed with an apostrophe.',
          responses: {
            '200': { description: 'CSV, UTF-8, header row first.', content: { 'text/csv': { schema: { type: 'string' } } } },
            ...errors,
          },
        },
      },
      '/api/v1/factor-matrices': {
        get: {
          operationId: 'getFactorMatricesInForce',
          summary: 'The factor-correlation matrices in force at a date (each matrix is the assumption of one set of segments)',
          description:
            'Scope assumptions:read. Each matrix answers its version in force by the same rule as the segment assumptions (publication time, the state at the end of the day, the overdue policy of then). `value` is the matrix to use: a valid correlation matrix checked by its eigenvalues.',
          parameters: [
            asOf,
            {
              name: 'segments',
              in: 'query',
              required: false,
              description: 'Only the matrix of exactly this set of segments (in any order), comma-separated: segments=A,B,C. 404 when no such matrix has been published.',
              schema: { type: 'string' },
            },
          ],
          responses: {
            '200': { description: 'The matrices in force, and those without a version in force with the reason.', content: { 'application/json': { schema: { $ref: '#/components/schemas/MatrixList' } } } },
            '400': { description: 'A bad date or segment list.', content: { 'application/json': { schema: { $ref: '#/components/schemas/Error' } } } },
            ...errors,
            '404': notFound,
          },
        },
      },
      '/api/v1/factor-matrices/{id}/versions': {
        get: {
          operationId: 'getFactorMatrixVersions',
          summary: 'Every published version of a matrix (also superseded, expired or retired ones), newest first',
          description: 'Scope assumptions:read.',
          parameters: [{ name: 'id', in: 'path', required: true, schema: { type: 'integer' } }],
          responses: {
            '200': { description: 'The versions.', content: { 'application/json': { schema: { $ref: '#/components/schemas/MatrixVersions' } } } },
            ...errors,
            '404': notFound,
          },
        },
      },
      '/api/v1/factor-matrices/export': {
        get: {
          operationId: 'exportFactorMatrices',
          summary: 'The published factor-correlation matrices as CSV in long format (one row per pair: matrix_id, version, segment_a, segment_b, r, lower, upper, value_used, ...)',
          description: 'Scope assumptions:export. The cautions as `# ` comment lines above the header (`comments=0` leaves them out). Cells starting with = + - @ are prefixed with an apostrophe.',
          responses: {
            '200': { description: 'CSV, UTF-8, header row after the comment lines.', content: { 'text/csv': { schema: { type: 'string' } } } },
            ...errors,
          },
        },
      },
    },
    components: {
      securitySchemes: { bearer: { type: 'http', scheme: 'bearer', description: 'An API token (rhb_...).' } },
      schemas: {
        Answer: schema(consumerAnswerSchema),
        List: schema(consumerListSchema),
        Error: schema(errorSchema),
        MatrixList: schema(consumerMatrixListSchema),
        MatrixVersions: schema(consumerMatrixVersionsSchema),
      },
    },
  };
}
