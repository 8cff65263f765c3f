import Link from 'next/link';
import type { Block, Chart, ReportDocument, Tone } from '@/lib/reports/document';
import { PrintButton } from './print-button';

/**
 * A review pack as one printable page: the same document the PDF is drawn from
 * (lib/reports/pdf.ts), with the charts as inline SVG. The print stylesheet (app/globals.css)
 * leaves out the application's header, footer and buttons.
 */
const tone: Record<Tone, string> = { plain: '', caution: 'notice-caution', bad: 'notice-bad', good: 'notice-good' };

function ChartFigure({ chart }: { chart: Chart }) {
  return (
    <figure className="report-chart my-3">
      <figcaption className="text-sm font-medium">{chart.title}</figcaption>
      <svg viewBox={`0 0 ${chart.width} ${chart.height}`} width="100%" style={{ maxWidth: chart.width }} role="img" aria-label={chart.description}>
        {chart.paths.map((p, i) => (
          <path
            key={i}
            d={p.d}
            fill={p.fill ?? 'none'}
            stroke={p.stroke ?? (p.fill ? 'none' : '#1d2428')}
            strokeWidth={p.width ?? 1}
            strokeDasharray={p.dash?.join(' ')}
            opacity={p.opacity}
          />
        ))}
        {chart.dots.map((d, i) => (
          <circle key={i} cx={d.x} cy={d.y} r={d.r} fill={d.fill} />
        ))}
        {chart.texts.map((t, i) => (
          <text
            key={i}
            x={t.x}
            y={t.y}
            fontSize={t.size}
            fill="#5c666c"
            textAnchor={t.anchor}
            transform={t.rotate ? `rotate(${t.rotate} ${t.x} ${t.y})` : undefined}
          >
            {t.text}
          </text>
        ))}
      </svg>
      <p className="text-xs text-[var(--color-muted)]">{chart.description}</p>
    </figure>
  );
}

function BlockView({ b }: { b: Block }) {
  switch (b.kind) {
    case 'p':
      return <p className={`my-2 text-sm ${tone[b.tone ?? 'plain']}`}>{b.text}</p>;
    case 'kv':
      return (
        <dl className="my-2 grid grid-cols-[13rem_1fr] gap-x-4 gap-y-1 text-sm">
          {b.rows.map(([k, v]) => (
            <div key={k} className="contents">
              <dt className="text-[var(--color-muted)]">{k}</dt>
              <dd className="whitespace-pre-wrap break-words">{v || '—'}</dd>
            </div>
          ))}
        </dl>
      );
    case 'table':
      return (
        <div className="my-2 overflow-x-auto">
          <table className="table report-table">
            {b.caption ? <caption className="text-left text-sm font-medium">{b.caption}</caption> : null}
            <thead>
              <tr>
                {b.columns.map((c, i) => (
                  <th key={c} className={b.align?.[i] === 'right' ? 'text-right' : ''}>
                    {c}
                  </th>
                ))}
              </tr>
            </thead>
            <tbody>
              {b.rows.map((r, j) => (
                <tr key={j}>
                  {r.map((c, i) => (
                    <td key={i} className={`${b.align?.[i] === 'right' ? 'num text-right' : ''} whitespace-pre-wrap`}>
                      {c}
                    </td>
                  ))}
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      );
    case 'list':
      return (
        <ul className={`my-2 list-disc space-y-1 pl-5 text-sm ${tone[b.tone ?? 'plain']}`}>
          {b.items.map((it) => (
            <li key={it}>{it}</li>
          ))}
        </ul>
      );
    case 'chart':
      return <ChartFigure chart={b.chart} />;
  }
}

export function ReportView({ report, pdfHref, backHref, backLabel }: { report: ReportDocument; pdfHref: string; backHref: string; backLabel: string }) {
  return (
    <article className="report mx-auto max-w-4xl space-y-4" aria-label={report.kind}>
      <div className="no-print flex flex-wrap items-center gap-2 text-sm">
        <Link href={backHref}>← {backLabel}</Link>
        <span className="ml-auto" />
        <PrintButton />
        <a className="btn no-underline" href={pdfHref} download data-testid="report-pdf">
          Download PDF
        </a>
      </div>
      <header className="panel p-5">
        <p className="text-xs tracking-wide text-[var(--color-muted)] uppercase">{report.kind}</p>
        <h1>{report.title}</h1>
        <p className="text-sm text-[var(--color-muted)]">{report.subtitle}</p>
        <dl className="mt-3 grid grid-cols-[13rem_1fr] gap-x-4 gap-y-1 text-sm">
          {report.reproduce.map(([k, v]) => (
            <div key={k} className="contents">
              <dt className="text-[var(--color-muted)]">{k}</dt>
              <dd className="num break-all">{v}</dd>
            </div>
          ))}
          <dt className="text-[var(--color-muted)]">Method</dt>
          <dd>
            <Link href="/method">The methodology</Link> of engine {report.engineVersion} <span className="print-only text-xs">({report.methodUrl})</span>
          </dd>
          <dt className="text-[var(--color-muted)]">Generated</dt>
          <dd className="num">{report.generatedAt.replace('T', ' ').slice(0, 16)} UTC</dd>
        </dl>
      </header>
      {report.sections.map((s, i) => (
        <section key={i} className={`report-section ${s.level === 3 ? '' : 'panel p-5'}`}>
          {s.level === 3 ? <h3 className="mt-2">{s.heading}</h3> : <h2>{s.heading}</h2>}
          {s.blocks.map((b, j) => (
            <BlockView key={j} b={b} />
          ))}
        </section>
      ))}
    </article>
  );
}
