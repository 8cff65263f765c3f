/**
 * A review pack as a document: headed sections of paragraphs, label-value lists, tables, lists,
 * notes and vector charts. The fit report and the assumption report are built as such documents
 * (fit-report.ts, assumption-report.ts) from what the data access layer reads, and two renderers
 * draw the same document: the printable page (components/reports/report-view.tsx) and the PDF
 * (pdf.ts). Pure: no I/O.
 */
export type Tone = 'plain' | 'caution' | 'bad' | 'good';

/** A chart as vector primitives in its own coordinates (0..width, 0..height, y downwards). */
export type Chart = {
  title: string;
  width: number;
  height: number;
  /** SVG path data (M, L, Z only), drawn in order. */
  paths: { d: string; stroke?: string; fill?: string; width?: number; dash?: number[]; opacity?: number }[];
  /** Small circles (observed points). */
  dots: { x: number; y: number; r: number; fill: string }[];
  texts: { x: number; y: number; text: string; anchor: 'start' | 'middle' | 'end'; size: number; rotate?: number }[];
  /** One sentence saying what the chart shows, for readers who cannot see it. */
  description: string;
};

export type Block =
  | { kind: 'p'; text: string; tone?: Tone }
  | { kind: 'kv'; rows: [string, string][] }
  | { kind: 'table'; caption?: string; columns: string[]; rows: string[][]; align?: ('left' | 'right')[] }
  | { kind: 'list'; items: string[]; tone?: Tone }
  | { kind: 'chart'; chart: Chart };

export type Section = { heading: string; level?: 2 | 3; blocks: Block[] };

export type ReportDocument = {
  /** "Fit report" or "Assumption report". */
  kind: string;
  title: string;
  subtitle: string;
  /** Printed under the title: what reproduces the numbers. */
  reproduce: [string, string][];
  sections: Section[];
  /** Where the methodology lives (absolute URL) and the engine version it describes. */
  methodUrl: string;
  engineVersion: string;
  generatedAt: string;
  /** The file name of the PDF, without extension. */
  fileBase: string;
};
