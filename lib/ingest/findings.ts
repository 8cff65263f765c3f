/**
 * Findings: what validation says about an uploaded file.
 *
 * A finding names the physical line of the file (header = 1; null when it concerns the whole file
 * or a converted row), the column, a stable kebab-case rule code, a severity, the offending value
 * and a plain sentence saying what is wrong and how to fix it. Errors block an upload; warnings can
 * be waived with a reason.
 *
 * A broken million-row file could produce a million findings, so the collector stores at most
 * `maxPerRule` findings per rule (default 1,000) and counts the rest.
 */
import { z } from 'zod';

export const severitySchema = z.enum(['error', 'warning']);
export type Severity = z.infer<typeof severitySchema>;

export const findingSchema = z.object({
  line: z.number().int().positive().nullable(),
  column: z.string().nullable(),
  rule: z.string().regex(/^[a-z0-9]+(-[a-z0-9]+)*$/),
  severity: severitySchema,
  value: z.string().nullable(),
  message: z.string().min(1),
});
export type Finding = z.infer<typeof findingSchema>;

/** Counts per rule, including findings that were not stored because of the cap. */
export interface FindingSummary {
  errors: number;
  warnings: number;
  /** rule -> { severity, total count, stored count } */
  byRule: Record<string, { severity: Severity; count: number; stored: number }>;
  /** true when some findings were counted but not stored */
  truncated: boolean;
}

export const DEFAULT_MAX_FINDINGS_PER_RULE = 1000;
/** Longest offending value kept in a finding; longer values are cut with an ellipsis. */
export const MAX_FINDING_VALUE_CHARS = 200;

export function clipValue(value: string | null): string | null {
  if (value === null) return null;
  return value.length > MAX_FINDING_VALUE_CHARS ? value.slice(0, MAX_FINDING_VALUE_CHARS) + '…' : value;
}

/** Collects findings with a cap per rule; messages may be passed lazily to avoid building them for findings that are only counted. */
export class FindingCollector {
  readonly findings: Finding[] = [];
  private readonly counts = new Map<string, { severity: Severity; count: number; stored: number }>();
  private errorCount = 0;
  private warningCount = 0;

  constructor(private readonly maxPerRule: number = DEFAULT_MAX_FINDINGS_PER_RULE) {}

  add(
    rule: string,
    severity: Severity,
    line: number | null,
    column: string | null,
    value: string | null,
    message: string | (() => string),
  ): void {
    let entry = this.counts.get(rule);
    if (!entry) {
      entry = { severity, count: 0, stored: 0 };
      this.counts.set(rule, entry);
    }
    entry.count++;
    if (severity === 'error') this.errorCount++;
    else this.warningCount++;
    if (entry.stored >= this.maxPerRule) return;
    entry.stored++;
    this.findings.push({
      line,
      column,
      rule,
      severity,
      value: clipValue(value),
      message: typeof message === 'function' ? message() : message,
    });
  }

  error(rule: string, line: number | null, column: string | null, value: string | null, message: string | (() => string)): void {
    this.add(rule, 'error', line, column, value, message);
  }

  warning(rule: string, line: number | null, column: string | null, value: string | null, message: string | (() => string)): void {
    this.add(rule, 'warning', line, column, value, message);
  }

  get errors(): number {
    return this.errorCount;
  }

  get warnings(): number {
    return this.warningCount;
  }

  /** Findings sorted by line (file-level findings first), then in the order found. */
  sorted(): Finding[] {
    return this.findings
      .map((f, i) => ({ f, i }))
      .sort((a, b) => (a.f.line ?? 0) - (b.f.line ?? 0) || a.i - b.i)
      .map(({ f }) => f);
  }

  summary(): FindingSummary {
    const byRule: FindingSummary['byRule'] = {};
    let truncated = false;
    for (const [rule, e] of this.counts) {
      byRule[rule] = { ...e };
      if (e.count > e.stored) truncated = true;
    }
    return { errors: this.errorCount, warnings: this.warningCount, byRule, truncated };
  }
}

/** A finding as API answers and the upload screens show it: `row` is the file's physical line (header = 1). */
export type UploadIssue = {
  row: number | null;
  column: string | null;
  rule: string;
  severity: Severity;
  value: string | null;
  message: string;
};

export function toIssue(f: Finding): UploadIssue {
  return { row: f.line, column: f.column, rule: f.rule, severity: f.severity, value: f.value, message: f.message };
}
