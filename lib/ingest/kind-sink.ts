import { mapColumns, type ColumnSpec } from './columns';
import type { CsvSink, Delimiter } from './csv-reader';
import type { FindingCollector } from './findings';
import { SegmentNames } from './values';

/**
 * What the row checks of the cohort and vintage kinds share: the header mapped to the kind's
 * columns (missing ones stop the reading), the delimiter (named in messages about stray
 * delimiters) and the segment names. A kind implements `row`.
 */
export abstract class KindSink<R extends string, O extends string> implements CsvSink {
  protected cols: ({ [K in R]: number } & { [K in O]?: number }) | null = null;
  delimiter: Delimiter = ',';
  protected readonly segments: SegmentNames;

  constructor(
    protected readonly findings: FindingCollector,
    private readonly spec: ColumnSpec<R, O>,
    private readonly kindLabel: string,
  ) {
    this.segments = new SegmentNames(findings);
  }

  header(names: string[], line: number, delimiter: Delimiter): boolean {
    this.delimiter = delimiter;
    this.cols = mapColumns(names, this.spec, line, this.findings, this.kindLabel);
    return this.cols !== null;
  }

  abstract row(fields: string[], line: number): void;
}
