import { assumptionCautions } from '@/lib/assumptions/cautions';
import type { FindingDto } from '@/lib/dal/findings';
import type { FitDto } from '@/lib/dal/fits';
import { isCurrentResults, segmentsInOrder } from '@/lib/fits/results';
import { level as levelText } from '@/lib/format';
import { describeSpans, mixedDefinitionCaution } from '@/lib/ingest/default-definition';
import type { Block, ReportDocument, Section } from './document';
import { segmentSections } from './segment-blocks';

/**
 * The fit report: one fit run over a dataset, for a committee or a validator's file: the data and
 * its conventions, the window, every segment's estimators with their intervals, charts,
 * diagnostics, stability and estimator audit, the findings, the cautions, and the engine version
 * and seeds that reproduce every number.
 */
export type DatasetFacts = {
  id: number;
  name: string;
  kind: string;
  sha256: string;
  fileName: string;
  conventions: string | null;
  censored: number;
  defaultDefinition: string | null;
  supersededBy: { id: number; name: string } | null;
};

export function findingsBlocks(findings: readonly FindingDto[]): Block[] {
  if (!findings.length) return [{ kind: 'p', text: 'No validation finding is recorded.' }];
  return [
    {
      kind: 'table',
      columns: ['Finding', 'Severity', 'Status', 'On', 'Owner', 'Due'],
      rows: findings.map((f) => [
        `${f.id}. ${f.title}${f.rationale ? ` (accepted: ${f.rationale})` : ''}`,
        f.severity,
        f.statusLabel,
        f.target.label,
        f.owner?.name ?? '—',
        `${f.dueDate}${f.overdue ? ' (overdue)' : ''}`,
      ]),
    },
  ];
}

/** One definition for every segment is said once; otherwise each segment's, with their years. */
function definitionText(spans: { segment: string; spans: Parameters<typeof describeSpans>[0] }[], uploadField: string | null): string {
  if (!spans.length) return uploadField ?? 'not stated';
  const texts = spans.map((s) => describeSpans(s.spans) ?? 'not stated');
  if (new Set(texts).size === 1) return `${texts[0]}${spans.length > 1 ? ' (every segment)' : ''}`;
  return spans.map((s, i) => `${s.segment}: ${texts[i]}`).join('; ');
}

export function dataBlocks(d: DatasetFacts, spans: { segment: string; spans: Parameters<typeof describeSpans>[0] }[]): Block[] {
  return [
    {
      kind: 'kv',
      rows: [
        ['Dataset', `${d.id} “${d.name}” (${d.kind}), file ${d.fileName}`],
        ['SHA-256 of the file', d.sha256],
        ['Conventions', d.conventions ?? 'none recorded'],
        ['Censored vintage-years', d.censored ? `${d.censored}, left out of the annual cohorts` : 'none'],
        ['Definition of default', definitionText(spans, d.defaultDefinition)],
        ['Superseded', d.supersededBy ? `yes, by dataset ${d.supersededBy.id} “${d.supersededBy.name}”` : 'no'],
      ],
    },
  ];
}

export function buildFitReport(input: { fit: FitDto; dataset: DatasetFacts; findings: FindingDto[]; methodUrl: string; generatedAt: string }): ReportDocument {
  const { fit, dataset, findings } = input;
  const r = fit.request;
  const window = r.from === undefined && r.to === undefined ? 'every year of the dataset' : `${r.from ?? 'the first year'} to ${r.to ?? 'the last year'}`;
  const sections: Section[] = [
    { heading: 'Data', blocks: dataBlocks(dataset, fit.defaultDefinitions) },
    {
      heading: 'The fit',
      blocks: [
        {
          kind: 'kv',
          rows: [
            ['Segments', fit.segments.join(', ')],
            ['Window', window],
            ['Interval level', levelText(r.level)],
            ['Bootstrap', r.bootstrap ? `${r.bootstrap.replications} replications, seed ${r.bootstrap.seed}` : 'not requested'],
            ['Small-sample simulation study', r.audit ? `${r.audit.replications} panels, seed ${r.audit.seed}` : 'not requested'],
            ...(r.mixingLaws
              ? [['Challenge of the Gaussian copula', `${r.mixingLaws.laws.map((l) => ({ t: 't copula', beta: 'beta mixing', logitNormal: 'logit-normal mixing' })[l]).join(', ')}; test ${r.mixingLaws.replications} and power ${r.mixingLaws.powerReplications} replications, seed ${r.mixingLaws.seed}`] as [string, string]]
              : []),
            ['Requested by', `${fit.createdBy}, ${fit.createdAt.slice(0, 10)}`],
            ['Status', fit.status],
          ],
        },
      ],
    },
  ];
  const mixed = fit.defaultDefinitions.map((d) => (mixedDefinitionCaution(d.spans) ? `${d.segment}: ${mixedDefinitionCaution(d.spans)}` : null)).filter((x): x is string => !!x);
  if (fit.results && isCurrentResults(fit.results)) {
    for (const item of segmentsInOrder(fit.results)) {
      if (item.kind === 'failed') {
        sections.push({ heading: `Segment ${item.failure.segment}`, blocks: [{ kind: 'p', tone: 'bad', text: `Not fitted: ${item.failure.reason}` }] });
        continue;
      }
      sections.push({ heading: `Segment ${item.fit.segment}`, blocks: [] });
      sections.push(...segmentSections(item.fit));
    }
  } else {
    sections.push({ heading: 'Results', blocks: [{ kind: 'p', text: fit.results ? 'The results of this run are stored in an older layout and are not reported here.' : 'The fit has no results yet.' }] });
  }
  sections.push({ heading: 'Validation findings on this fit and its dataset', blocks: findingsBlocks(findings) });
  sections.push({
    heading: 'Cautions',
    blocks: [
      { kind: 'list', tone: 'caution', items: [...assumptionCautions, ...mixed] },
      { kind: 'p', text: 'This report supports a judgement. It does not replace independent model validation, the institution\'s model-risk policy, supervisory requirements or qualified professional judgement.' },
    ],
  });
  return {
    kind: 'Fit report',
    title: `Fit ${fit.id}: ${fit.segments.join(', ')}`,
    subtitle: `Dataset ${dataset.id} “${dataset.name}”, window ${window}`,
    reproduce: [
      ['Engine version', fit.engineVersion],
      ['Dataset SHA-256', fit.datasetSha256],
      ['Seeds', `bootstrap ${fit.seeds.bootstrap ?? 'not run'}; audit ${fit.seeds.audit ?? 'not run'}${fit.seeds.mixingLaws !== undefined ? `; mixing laws ${fit.seeds.mixingLaws}` : ''}`],
      ['Fit run', String(fit.id)],
    ],
    sections,
    methodUrl: input.methodUrl,
    engineVersion: fit.engineVersion,
    generatedAt: input.generatedAt,
    fileBase: `rhobook-fit-${fit.id}-report`,
  };
}
