import 'server-only';
import { assertCan, type SessionUser } from '@/lib/auth/guard';
import { appUrl } from '@/lib/env';
import { buildAssumptionReport } from '@/lib/reports/assumption-report';
import type { ReportDocument } from '@/lib/reports/document';
import { buildFitReport, type DatasetFacts } from '@/lib/reports/fit-report';
import { getVersionPage } from './assumptions';
import { getDataset } from './datasets';
import { listFindings, listFindingsForVersion } from './findings';
import { getFit, getFitSegment } from './fits';
import { modelsUsing } from './models';

/**
 * The review packs: a fit's report and an assumption version's report, as documents
 * (lib/reports) that the printable pages and the PDF routes render. Every read goes through the
 * data access function that authorises it, so a report shows exactly what its reader may see.
 */
async function datasetFacts(actor: SessionUser, id: number): Promise<DatasetFacts> {
  const d = await getDataset(actor, id);
  return {
    id: d.id,
    name: d.name,
    kind: d.kind,
    sha256: d.sha256,
    fileName: d.fileName,
    conventions: d.conventions?.text ?? null,
    censored: d.censored.length,
    defaultDefinition: d.defaultDefinition,
    supersededBy: d.supersededBy,
  };
}

export async function fitReportDocument(actor: SessionUser, fitId: number, now: Date = new Date()): Promise<ReportDocument> {
  assertCan(actor, 'fits:read');
  const fit = await getFit(actor, fitId);
  const dataset = await datasetFacts(actor, fit.datasetId);
  const findings = await listFindings(actor, { targets: [{ type: 'fit', id: fit.id }, { type: 'dataset', id: fit.datasetId }] }, now);
  return buildFitReport({ fit, dataset, findings, methodUrl: appUrl('/method'), generatedAt: now.toISOString() });
}

export async function assumptionReportDocument(actor: SessionUser, versionId: number, now: Date = new Date()): Promise<ReportDocument> {
  assertCan(actor, 'assumptions:read');
  const page = await getVersionPage(actor, versionId, now);
  const v = page.version;
  const [segment, dataset, findings, models] = await Promise.all([
    v.fitRunId ? getFitSegment(actor, v.fitRunId, v.segment) : Promise.resolve(null),
    v.datasetId ? datasetFacts(actor, v.datasetId) : Promise.resolve(null),
    listFindingsForVersion(actor, v.id, now),
    modelsUsing(actor, v.assumptionId),
  ]);
  return buildAssumptionReport({ page, segment: segment?.segment ?? null, dataset, findings, models, methodUrl: appUrl('/method'), generatedAt: now.toISOString() });
}
