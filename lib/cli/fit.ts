/**
 * `rhobook fit FILE.csv [--json] [--models independent,ar1,t,beta,logitNormal] [--copula-bootstrap B] [--segment NAME] [--from PERIOD]
 * [--to PERIOD] [--level 0.95] [--bootstrap B] [--seed N] [--audit R] [--audit-seed N]
 * [--rolling-window N] [--threads N] [--asset-class CLASS] [--turnover S]`: fits every segment of a cohort
 * CSV (DESIGN.md, `segment,period,obligors,defaults`) and prints the engine's JSON document or a
 * readable table. The file is validated by lib/ingest's validateCohortText, the same rules as an
 * upload; any error stops the run with exit code 2 and the file's line, column and problem.
 */
import { readFile } from 'node:fs/promises';
import { parseArgs } from 'node:util';
import { assumptionCautions } from '../assumptions/cautions';
import { validateCohortText, type CohortRow, type Finding } from '../ingest';
import { EnginePool, fitPanelParallel } from '../engine';
import { segmentFailure, type PanelInput, type SegmentFailure, type TimedSegmentFit } from '../stats/fit-panel';
import { FIT_MODELS, type FitModel } from '../stats/fit-models';
import { MIXING_LAW_MODELS, type MixingLawModel } from '../stats/mixing-laws-block';
import { ASSET_CLASSES, type AssetClass } from '../stats/irb';
import { ENGINE_VERSION } from '../stats/version';
import { formatTable } from './format';
import { parsePortfolioArgs, portfolioBlocks, PORTFOLIO_OPTIONS, PORTFOLIO_USAGE, type PortfolioArgs } from './portfolio';
import type { FitDocument } from './document';

/** Where the CLI writes; injectable for tests. */
export interface CliIo {
  out: (text: string) => void;
  err: (text: string) => void;
}


/** Exit code when some segments (one or more) failed and the others were fitted. */
export const EXIT_SOME_SEGMENTS_FAILED = 3;

/** A problem with the command line or the input: exit code 2, message shown as is. */
export class CliInputError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'CliInputError';
  }
}

export const FIT_USAGE = `Usage: npm run --silent cli -- fit FILE.csv [--json] [--models independent,ar1,t,beta,logitNormal] [--segment NAME]
                              [--from PERIOD] [--to PERIOD] [--level 0.95] [--bootstrap B] [--seed N]
                              [--audit R] [--audit-seed N] [--rolling-window N] [--threads N]
                              [--asset-class CLASS] [--turnover S] [--group "A,B,C"] [--common-window] [--pairs]
                              [--prior flat|supervisory:S|beta:A,B] [--prudent RHO,CONFIDENCE]

Fits the asset correlation of every segment of a cohort CSV (columns segment,period,obligors,defaults).
  --json            print one JSON document (engine version, one entry per segment) instead of a table
  --models M        the factor models to run, comma-separated: independent (years independent: the five
                    estimators of the design and the stability across the window), ar1 (a persistent
                    factor: ar1Mle and the autocorrelation-corrected moments); default both.
                    binomialMle is always fitted: the diagnostics check it and the AR(1) model nests it;
                    and the mixing laws that challenge the Gaussian copula: t (the Student-t copula),
                    beta, logitNormal, compared with it under "modelComparison"; default both factor
                    models and no mixing law (the fit job does not run the laws yet)
  --copula-bootstrap B  the bootstrap p-value of the LR test of the Gaussian against the t copula and the
                    test's power at these cohort sizes, each from B seeded replications on the threads
                    (2 to 100000; the issue's default is 200); without it the statistic and the
                    asymptotic p-value only (far from nominal at these sample sizes)
  --segment NAME    fit only this segment
  --from, --to      first and last period to use (years, inclusive)
  --level L         level of every interval, between 0 and 1 (default 0.95)
  --bootstrap B     run every parametric bootstrap with B replications (2 to 100000): binomialMle's and
                    the moment estimators' intervals and the break test's p-value
  --seed N          seed of the bootstraps (and of the mixing laws' randomised PIT), 0 to 4294967295 (default 1)
  --audit R         add the small-sample simulation study: R panels simulated at the fit (2 to 100000); with the AR(1)
                    model, at its fitted persistence
  --audit-seed N    seed of the simulation study, 0 to 4294967295 (default 2)
  --rolling-window N  length of the rolling window of the stability block, in periods (2 to 1000; default 10)
  --threads N       worker threads for the bootstrap and the audit (default: available cores; 0 = this thread)
  --asset-class C   compare with the Basel IRB supervisory correlation of ${ASSET_CLASSES.join(', ')}
  --turnover S      annual turnover in EUR millions, for the SME size adjustment of sme-corporate
${PORTFOLIO_USAGE}

Exit codes: 0 every segment fitted; 2 bad command line or file (nothing fitted); 3 some segments
failed (each named with its reason on stderr and under "failures" in the JSON, the others fitted);
1 any other failure.`;

function parseNumber(name: string, raw: string | undefined, check: (v: number) => boolean, expected: string): number | undefined {
  if (raw === undefined) return undefined;
  const v = Number(raw);
  if (raw.trim() === '' || !Number.isFinite(v) || !check(v)) throw new CliInputError(`--${name} must be ${expected}; got "${raw}".`);
  return v;
}

const ALL_MODELS: readonly string[] = [...FIT_MODELS, ...MIXING_LAW_MODELS];

/**
 * `--models independent,ar1,t,beta,logitNormal`: the factor models and the mixing laws, each once;
 * default every factor model and no mixing law (so that the default document is the fit job's,
 * which does not run the laws yet).
 */
function parseModels(raw: string | undefined): { models: FitModel[]; mixingLaws: MixingLawModel[] } {
  if (raw === undefined) return { models: [...FIT_MODELS], mixingLaws: [] };
  const names = raw.split(',').map((m) => m.trim());
  const unknown = names.filter((m) => !ALL_MODELS.includes(m));
  if (names.length === 0 || unknown.length > 0) {
    throw new CliInputError(`--models takes a comma-separated list of ${ALL_MODELS.join(', ')}; got "${raw}".`);
  }
  if (new Set(names).size !== names.length) throw new CliInputError(`--models names a model twice: "${raw}".`);
  const models = FIT_MODELS.filter((m) => names.includes(m));
  if (models.length === 0) {
    throw new CliInputError(`--models needs a factor model (${FIT_MODELS.join(' or ')}) beside the mixing laws: the laws are compared with its Gaussian fit; got "${raw}".`);
  }
  return { models, mixingLaws: MIXING_LAW_MODELS.filter((m) => names.includes(m)) };
}

function parseYear(name: string, raw: string | undefined): number | undefined {
  if (raw === undefined) return undefined;
  if (!/^\d{4}$/.test(raw.trim())) throw new CliInputError(`--${name} must be a year written YYYY (the cohort file's periods), for example 2010; got "${raw}".`);
  return Number(raw.trim());
}

export interface FitArgs {
  file: string;
  json: boolean;
  /** The factor models to run (default every one). */
  models: FitModel[];
  /** The other mixing laws to fit and compare (default none). */
  mixingLaws: MixingLawModel[];
  /** Replications of the LR test's bootstrap and of its power study (absent: the statistic and its asymptotic p-value only). */
  copulaBootstrap?: number;
  /** Length of the rolling window (default 10). */
  rollingWindow: number;
  segment?: string;
  from?: number;
  to?: number;
  level: number;
  bootstrap?: number;
  seed: number;
  /** Estimator audit replications (lib/stats/audit.ts), on the worker threads. */
  audit?: number;
  auditSeed: number;
  threads?: number;
  assetClass?: AssetClass;
  turnoverMillions?: number;
  /** Grades, pairs, posterior and most prudent PD (lib/cli/portfolio.ts). */
  portfolio: PortfolioArgs;
}

/** Parses the arguments after `fit`; throws CliInputError with a sentence for anything wrong. */
export function parseFitArgs(argv: string[]): FitArgs {
  let parsed;
  try {
    parsed = parseArgs({
      args: argv,
      allowPositionals: true,
      strict: true,
      options: {
        json: { type: 'boolean' },
        models: { type: 'string' },
        'copula-bootstrap': { type: 'string' },
        'rolling-window': { type: 'string' },
        segment: { type: 'string' },
        from: { type: 'string' },
        to: { type: 'string' },
        level: { type: 'string' },
        bootstrap: { type: 'string' },
        seed: { type: 'string' },
        audit: { type: 'string' },
        'audit-seed': { type: 'string' },
        threads: { type: 'string' },
        'asset-class': { type: 'string' },
        turnover: { type: 'string' },
        ...PORTFOLIO_OPTIONS,
      },
    });
  } catch (err) {
    throw new CliInputError(`${err instanceof Error ? err.message : String(err)}\n\n${FIT_USAGE}`);
  }
  const { values, positionals } = parsed;
  if (positionals.length !== 1) {
    throw new CliInputError(`fit needs exactly one cohort CSV file; got ${positionals.length === 0 ? 'none' : positionals.join(', ')}.\n\n${FIT_USAGE}`);
  }
  const level = parseNumber('level', values.level, (v) => v > 0 && v < 1, 'a number strictly between 0 and 1, for example 0.95') ?? 0.95;
  const bootstrap = parseNumber('bootstrap', values.bootstrap, (v) => Number.isInteger(v) && v >= 2 && v <= 100_000, 'a whole number of replications from 2 to 100000');
  const seed = parseNumber('seed', values.seed, (v) => Number.isInteger(v) && v >= 0 && v <= 0xffffffff, 'a whole number from 0 to 4294967295') ?? 1;
  const audit = parseNumber('audit', values.audit, (v) => Number.isInteger(v) && v >= 2 && v <= 100_000, 'a whole number of replications from 2 to 100000');
  const auditSeed = parseNumber('audit-seed', values['audit-seed'], (v) => Number.isInteger(v) && v >= 0 && v <= 0xffffffff, 'a whole number from 0 to 4294967295') ?? 2;
  if (values['audit-seed'] !== undefined && audit === undefined) {
    throw new CliInputError('--audit-seed is the seed of the estimator audit; give --audit R as well (or leave --audit-seed out).');
  }
  const { models, mixingLaws } = parseModels(values.models);
  const copulaBootstrap = parseNumber(
    'copula-bootstrap',
    values['copula-bootstrap'],
    (v) => Number.isInteger(v) && v >= 2 && v <= 100_000,
    'a whole number of replications from 2 to 100000',
  );
  if (copulaBootstrap !== undefined && !mixingLaws.includes('t')) {
    throw new CliInputError('--copula-bootstrap tests the Gaussian copula against the t copula; add t to --models (or leave --copula-bootstrap out).');
  }
  const rollingWindow =
    parseNumber('rolling-window', values['rolling-window'], (v) => Number.isInteger(v) && v >= 2 && v <= 1000, 'a whole number of periods from 2 to 1000') ?? 10;
  if (values['rolling-window'] !== undefined && !models.includes('independent')) {
    throw new CliInputError('--rolling-window is part of the stability block, which belongs to the independent model; add independent to --models (or leave --rolling-window out).');
  }
  const threads = parseNumber('threads', values.threads, (v) => Number.isInteger(v) && v >= 0 && v <= 64, 'a whole number from 0 to 64');
  const from = parseYear('from', values.from);
  const to = parseYear('to', values.to);
  if (from !== undefined && to !== undefined && from > to) throw new CliInputError(`--from (${from}) is after --to (${to}); give the earlier year first.`);
  const rawClass = values['asset-class'];
  if (rawClass !== undefined && !(ASSET_CLASSES as readonly string[]).includes(rawClass)) {
    throw new CliInputError(`--asset-class must be one of ${ASSET_CLASSES.join(', ')}; got "${rawClass}".`);
  }
  const turnover = parseNumber('turnover', values.turnover, (v) => v > 0, 'a positive number of EUR millions, for example 25');
  if (rawClass === 'sme-corporate' && turnover === undefined) {
    throw new CliInputError('--asset-class sme-corporate needs --turnover S, the annual turnover in EUR millions (BCBS 2006 para 273).');
  }
  if (turnover !== undefined && rawClass !== 'sme-corporate') {
    throw new CliInputError('--turnover applies only to --asset-class sme-corporate (the SME size adjustment).');
  }
  if (values.seed !== undefined && bootstrap === undefined && copulaBootstrap === undefined) {
    throw new CliInputError('--seed is the seed of the bootstraps; give --bootstrap B or --copula-bootstrap B as well (or leave --seed out).');
  }
  return {
    file: positionals[0],
    json: values.json ?? false,
    models,
    mixingLaws,
    ...(copulaBootstrap !== undefined ? { copulaBootstrap } : {}),
    rollingWindow,
    ...(values.segment !== undefined ? { segment: values.segment } : {}),
    ...(from !== undefined ? { from } : {}),
    ...(to !== undefined ? { to } : {}),
    level,
    ...(bootstrap !== undefined ? { bootstrap } : {}),
    seed,
    ...(audit !== undefined ? { audit } : {}),
    auditSeed,
    ...(threads !== undefined ? { threads } : {}),
    ...(rawClass !== undefined ? { assetClass: rawClass as AssetClass } : {}),
    ...(turnover !== undefined ? { turnoverMillions: turnover } : {}),
    portfolio: parsePortfolioArgs(values, (m) => new CliInputError(m)),
  };
}

function describeFinding(file: string, f: Finding): string {
  const where = f.line === null ? file : `${file} line ${f.line}`;
  const column = f.column ? `, column ${f.column}` : '';
  return `${where}${column}: ${f.message} [${f.rule}]`;
}

/** Groups validated rows into panels by segment (first-seen order), periods increasing, within [from, to]. */
export function panelsFromRows(rows: readonly CohortRow[], args: Pick<FitArgs, 'segment' | 'from' | 'to'>): PanelInput[] {
  const bySegment = new Map<string, CohortRow[]>();
  for (const row of rows) {
    const list = bySegment.get(row.segment) ?? [];
    list.push(row);
    bySegment.set(row.segment, list);
  }
  if (args.segment !== undefined && !bySegment.has(args.segment)) {
    throw new CliInputError(`The file has no segment "${args.segment}". Its segments: ${[...bySegment.keys()].map((s) => `"${s}"`).join(', ')}.`);
  }
  const panels: PanelInput[] = [];
  for (const [segment, list] of bySegment) {
    if (args.segment !== undefined && segment !== args.segment) continue;
    const kept = list
      .filter((r) => (args.from === undefined || Number(r.period) >= args.from) && (args.to === undefined || Number(r.period) <= args.to))
      .sort((a, b) => Number(a.period) - Number(b.period));
    if (kept.length === 0) {
      throw new CliInputError(
        `Segment "${segment}" has no period from ${args.from ?? 'the first'} to ${args.to ?? 'the last'}; its periods run ${list.map((r) => r.period).sort()[0]}-${list.map((r) => r.period).sort().at(-1)}.`,
      );
    }
    panels.push({ segment, periods: kept.map((r) => r.period), obligors: kept.map((r) => r.obligors), defaults: kept.map((r) => r.defaults) });
  }
  return panels;
}

async function fitSegment(panel: PanelInput, options: Parameters<typeof fitPanelParallel>[1], pool: EnginePool | undefined): Promise<TimedSegmentFit> {
  return await fitPanelParallel(panel, options, pool ? { pool } : { threads: 0 });
}

/** Runs `fit`; resolves with the process exit code (0 done, 2 bad input, 3 some segments failed). */
export async function runFit(argv: string[], io: CliIo): Promise<number> {
  const args = parseFitArgs(argv);
  let bytes: Uint8Array;
  try {
    bytes = await readFile(args.file);
  } catch (err) {
    const code = (err as NodeJS.ErrnoException).code;
    throw new CliInputError(
      code === 'ENOENT' ? `Cannot read ${args.file}: there is no such file.` : `Cannot read ${args.file}: ${err instanceof Error ? err.message : String(err)}`,
    );
  }
  const validation = validateCohortText(bytes);
  const errors = validation.findings.filter((f) => f.severity === 'error');
  const warnings = validation.findings.filter((f) => f.severity === 'warning');
  for (const w of warnings) io.err(`warning: ${describeFinding(args.file, w)}`);
  if (!validation.ok) {
    const shown = errors.slice(0, 20).map((f) => `error: ${describeFinding(args.file, f)}`);
    const more = validation.summary.errors - shown.length;
    throw new CliInputError(
      `${args.file} is not a valid cohort file (${validation.summary.errors} error${validation.summary.errors === 1 ? '' : 's'}); nothing was fitted.\n${shown.join('\n')}${more > 0 ? `\n... and ${more} more.` : ''}`,
    );
  }
  const panels = panelsFromRows(validation.rows, args);
  const unknown = (args.portfolio.group ?? []).filter((g) => !panels.some((p) => p.segment === g));
  if (unknown.length > 0) {
    throw new CliInputError(`--group names ${unknown.map((g) => `"${g}"`).join(', ')}, which the file (in the window) does not have. Its segments: ${panels.map((p) => `"${p.segment}"`).join(', ')}.`);
  }
  const anyBootstrap = args.bootstrap !== undefined;
  const pool = (anyBootstrap || args.audit !== undefined || args.copulaBootstrap !== undefined || args.portfolio.pairs) && args.threads !== 0 ? new EnginePool(args.threads ?? undefined) : undefined;
  let blocks: Awaited<ReturnType<typeof portfolioBlocks>> | null = null;
  const segments: TimedSegmentFit[] = [];
  const failures: SegmentFailure[] = [];
  try {
    await pool?.start(); // thread start-up is not part of any segment's timing
    for (const [position, panel] of panels.entries()) {
      try {
        segments.push(
          await fitSegment(
            panel,
            {
              level: args.level,
              models: args.models,
              bootstrap: anyBootstrap ? { replications: args.bootstrap!, seed: args.seed } : null,
              // --bootstrap B sets every parametric bootstrap, the break test's included (DESIGN.md)
              stability: { rollingWindow: args.rollingWindow, breakTest: anyBootstrap ? { replications: args.bootstrap!, seed: args.seed } : null },
              audit: args.audit !== undefined ? { replications: args.audit, seed: args.auditSeed } : null,
              mixingLaws:
                args.mixingLaws.length > 0
                  ? { models: args.mixingLaws, replications: args.copulaBootstrap ?? 0, powerReplications: args.copulaBootstrap ?? 0, seed: args.seed }
                  : null,
              assetClass: args.assetClass ?? null,
              turnoverMillions: args.turnoverMillions ?? null,
            },
            pool,
          ),
        );
      } catch (err) {
        // One segment's failure (bad numbers inside the engine, a refused cohort size) is reported
        // in its place; the other segments are fitted.
        failures.push(segmentFailure(panel.segment, position, err));
        io.err(`error: segment "${panel.segment}" was not fitted: ${failures.at(-1)!.reason}`);
      }
    }
    blocks = await portfolioBlocks(
      panels,
      args.portfolio,
      {
        level: args.level,
        assetClass: args.assetClass ?? null,
        turnoverMillions: args.turnoverMillions ?? null,
        ...(pool ? { pool } : {}),
        ...(args.audit !== undefined ? { audit: { replications: args.audit, seed: args.auditSeed } } : {}),
      },
      (m) => new CliInputError(m),
    );
  } finally {
    await pool?.close();
  }
  const doc: FitDocument = {
    engine: { version: ENGINE_VERSION },
    segments: segments.map((s) => ({
      ...s,
      ...(blocks?.posterior.has(s.segment) ? { posterior: blocks.posterior.get(s.segment)! } : {}),
      ...(blocks?.prudentPd.has(s.segment) ? { prudentPd: blocks.prudentPd.get(s.segment)! } : {}),
    })),
    ...(blocks?.group ? { group: blocks.group } : {}),
    ...(blocks?.pairs ? { pairs: blocks.pairs } : {}),
    failures,
    cautions: assumptionCautions,
  };
  io.out(args.json ? JSON.stringify(doc, null, 2) : formatTable(doc));
  return failures.length > 0 ? EXIT_SOME_SEGMENTS_FAILED : 0;
}
