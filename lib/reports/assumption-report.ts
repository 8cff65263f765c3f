import { assumptionCautions } from '@/lib/assumptions/cautions';
import { versionCautions } from '@/lib/assumptions/consumer';
import { statusLabels } from '@/lib/assumptions/lifecycle';
import { priorText, valueSourceLabel } from '@/lib/assumptions/posterior-evidence';
import { nuIntervalText, nuText } from '@/lib/assumptions/t-copula-evidence';
import type { VersionPageDto } from '@/lib/dal/assumptions';
import type { FindingDto } from '@/lib/dal/findings';
import type { FitSegmentResult } from '@/lib/fits/results';
import { level as levelText, pd as pdText, rho as rhoText, seedsText, when } from '@/lib/format';
import { describeSpans } from '@/lib/ingest/default-definition';
import type { ReportDocument, Section } from './document';
import { dataBlocks, findingsBlocks, type DatasetFacts } from './fit-report';
import { segmentSections } from './segment-blocks';

/**
 * The assumption report: one version of a segment's correlation assumption: the value, its PD and
 * interval, the margins with their rationale, intended uses and limitations, the decision history
 * with its comments, the findings, the state of its evidence and its review, the models that use
 * it, the cautions, the frozen evidence of its fit (data, estimators, charts, diagnostics, audit)
 * and what reproduces it.
 */
export function buildAssumptionReport(input: {
  page: VersionPageDto;
  segment: FitSegmentResult | null;
  dataset: DatasetFacts | null;
  findings: FindingDto[];
  models: { name: string; ownerName: string; intendedUse: string }[];
  methodUrl: string;
  generatedAt: string;
}): ReportDocument {
  const { page, segment } = input;
  const v = page.version;
  const specific = versionCautions({ ...v, evidence: page.evidence, review: page.review });
  const sections: Section[] = [
    {
      heading: 'The value',
      blocks: [
        {
          kind: 'kv',
          rows: [
            ['Final value (rho to use)', rhoText(v.finalValue)],
            ['With the PD', pdText(v.pd)],
            ['Estimator', `${valueSourceLabel(v.estimator)}: ${rhoText(v.estimate)}`],
            ['Interval', `[${rhoText(v.intervalLower)}, ${rhoText(v.intervalUpper)}] ${v.intervalMethod}, ${levelText(v.intervalLevel)}`],
            [
              'Mixing law',
              v.mixingLaw === 't'
                ? `Student-t copula (t), nu ${nuText(v.nu)}${v.nuInterval ? `, profile interval of nu ${nuIntervalText(v.nuInterval)}` : ''}: use the value with the t copula and this nu, not in the Gaussian (Vasicek) formula`
                : 'Gaussian copula (gaussian)',
            ],
            ...(v.prior ? [['Prior', `${priorText(v.prior)} (the value is the posterior median under it; the PD the posterior median of p)`] as [string, string]] : []),
            ['Estimate plus margins', rhoText(v.conservativeValue)],
            ['Data window', `${v.windowFrom} to ${v.windowTo}`],
            ['Definition of default', v.defaultDefinitions ? (describeSpans(v.defaultDefinitions) ?? 'not stated in the data') : 'not recorded (drafted before it was carried)'],
            ['State', `${statusLabels[v.status]}${page.publication ? `: ${page.publication.text}` : ''}`],
            ['Effective date', v.effectiveDate],
            ['Review by', `${v.reviewBy}${page.review.overdue ? ` (overdue; policy: ${page.review.policy})` : ''}`],
          ],
        },
      ],
    },
    {
      heading: 'Margins of conservatism',
      blocks: [
        {
          kind: 'table',
          columns: ['Part', 'Margin', 'Rationale'],
          rows: [
            ['Data and method deficiencies', rhoText(v.marginData), v.marginDataRationale],
            ['Changes in lending or recovery practice', rhoText(v.marginPractice), v.marginPracticeRationale],
            ['General estimation error', rhoText(v.marginGeneral), v.marginGeneralRationale],
            ['Estimate plus margins', rhoText(v.conservativeValue), `Final value ${rhoText(v.finalValue)}`],
          ],
          align: ['left', 'right', 'left'],
        },
      ],
    },
    {
      heading: 'Intended uses and limitations',
      blocks: [
        { kind: 'kv', rows: [['Intended uses', v.intendedUses], ['Limitations', v.limitations]] },
      ],
    },
    {
      heading: 'Decision history',
      blocks: [
        {
          kind: 'kv',
          rows: [
            ['Author', v.author?.name ?? '—'],
            ['Validator', v.validator ? `${v.validator.name}, decided ${when(v.decidedAt)}` : 'not decided yet'],
            ['Decision comment', v.decisionComment ?? '—'],
          ],
        },
        {
          kind: 'table',
          caption: 'Audit trail of the assumption (append-only)',
          columns: ['When (UTC)', 'Version', 'Action', 'Who', 'From → to', 'Comment'],
          rows: page.audit.map((a) => [
            a.at.replace('T', ' ').slice(0, 16),
            `v${a.version}`,
            a.action,
            `${a.actorEmail} (${a.actorRole})`,
            `${a.fromStatus ?? '—'} → ${a.toStatus}`,
            a.comment ?? '',
          ]),
        },
      ],
    },
    { heading: 'Validation findings on this version, its fit and its dataset', blocks: findingsBlocks(input.findings) },
    {
      heading: 'Evidence and monitoring',
      blocks: page.evidence.flagged
        ? [
            { kind: 'p', tone: 'caution', text: specific.find((c) => c.includes('dataset')) ?? 'The evidence behind this value has aged.' },
            ...(page.evidence.backtest?.result
              ? [
                  { kind: 'p' as const, text: `Backtest on the new years (${page.evidence.backtest.verdict}): ${page.evidence.backtest.summary}` },
                  { kind: 'list' as const, items: page.evidence.backtest.years },
                ]
              : [{ kind: 'p' as const, text: page.evidence.newPeriods.length ? 'The backtest on the new years has not run yet.' : 'There are no new years to backtest.' }]),
          ]
        : [{ kind: 'p', text: 'The dataset of this value is current: not superseded, and no newer dataset holds later years of the segment.' }],
    },
    {
      heading: 'Models that use this assumption',
      blocks: input.models.length
        ? [{ kind: 'table', columns: ['Model', 'Owner', 'Intended use'], rows: input.models.map((m) => [m.name, m.ownerName, m.intendedUse]) }]
        : [{ kind: 'p', text: 'No consuming model is registered as using it.' }],
    },
    {
      heading: 'Cautions',
      blocks: [
        { kind: 'list', tone: 'caution', items: [...assumptionCautions, ...specific] },
        {
          kind: 'p',
          text: "This report supports a judgement. It does not replace independent model validation, the institution's model-risk policy, supervisory requirements or qualified professional judgement.",
        },
      ],
    },
  ];
  if (input.dataset) sections.push({ heading: 'The data it was drawn from', blocks: dataBlocks(input.dataset, v.defaultDefinitions ? [{ segment: v.segment, spans: v.defaultDefinitions }] : []) });
  if (segment) {
    sections.push({ heading: `The frozen evidence of fit ${v.fitRunId}`, blocks: [{ kind: 'p', text: 'As computed when the version was drafted; the fit run is never changed.' }] });
    sections.push(...segmentSections(segment));
  } else {
    sections.push({ heading: 'The frozen evidence', blocks: [{ kind: 'p', text: 'The fit run of this version has no results in the current layout; its numbers are those above.' }] });
  }
  return {
    kind: 'Assumption report',
    title: `${v.segment}, version ${v.version}: rho ${rhoText(v.finalValue)}`,
    subtitle: `${statusLabels[v.status]}; effective ${v.effectiveDate}, review by ${v.reviewBy}`,
    reproduce: [
      ['Engine version', v.engineVersion],
      ['Dataset SHA-256', v.datasetSha256],
      ['Fit run', v.fitRunId === null ? '—' : String(v.fitRunId)],
      ['Seeds', seedsText(v.seeds)],
      ['Content hash', v.contentHash],
    ],
    sections,
    methodUrl: input.methodUrl,
    engineVersion: v.engineVersion,
    generatedAt: input.generatedAt,
    fileBase: `rhobook-${v.segment.replace(/[^A-Za-z0-9_-]+/g, '-').replace(/^-|-$/g, '')}-v${v.version}-report`,
  };
}
