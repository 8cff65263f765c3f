import 'server-only';
import path from 'node:path';
import PDFDocument from 'pdfkit';
import type { Block, Chart, ReportDocument, Tone } from './document';

/**
 * Renders a review pack (document.ts) as a PDF on the server with pdfkit: A4, the DejaVu Sans
 * faces shipped in lib/reports/fonts (embedded as subsets, so the PDF reads the same everywhere and
 * its text can be searched and extracted), tables that continue across pages with their header,
 * charts drawn as vector paths, and on every page the report's kind, the engine version, the
 * methodology's address and the page number.
 */
const FONT_DIR = path.join(process.cwd(), 'lib', 'reports', 'fonts');
const REGULAR = 'Rhobook-Regular';
const BOLD = 'Rhobook-Bold';
const MARGIN = 50;
const INK = '#1d2428';
const MUTED = '#5c666c';
const LINE = '#dcdcd5';
const TONE: Record<Tone, string> = { plain: INK, caution: '#8a5a00', bad: '#9b2a22', good: '#2f6b34' };

type Doc = PDFKit.PDFDocument;

function contentWidth(doc: Doc): number {
  return doc.page.width - 2 * MARGIN;
}

function bottom(doc: Doc): number {
  return doc.page.height - MARGIN - 18;
}

/** Starts a new page unless `height` more points fit on this one. */
function ensure(doc: Doc, height: number): void {
  if (doc.y + height > bottom(doc)) doc.addPage();
}

function paragraph(doc: Doc, text: string, opts: { size?: number; tone?: Tone; bold?: boolean; gap?: number } = {}): void {
  doc.font(opts.bold ? BOLD : REGULAR).fontSize(opts.size ?? 9.5).fillColor(TONE[opts.tone ?? 'plain']);
  const h = doc.heightOfString(text, { width: contentWidth(doc) });
  ensure(doc, Math.min(h, 200));
  doc.text(text, MARGIN, doc.y, { width: contentWidth(doc) });
  doc.moveDown(opts.gap ?? 0.4);
}

function keyValues(doc: Doc, rows: [string, string][]): void {
  const labelW = 150;
  const valueW = contentWidth(doc) - labelW - 8;
  doc.fontSize(9);
  for (const [k, v] of rows) {
    doc.font(REGULAR);
    const h = Math.max(doc.heightOfString(k, { width: labelW }), doc.heightOfString(v || '—', { width: valueW }));
    ensure(doc, h + 2);
    const y = doc.y;
    doc.fillColor(MUTED).text(k, MARGIN, y, { width: labelW });
    doc.fillColor(INK).text(v || '—', MARGIN + labelW + 8, y, { width: valueW });
    doc.y = y + h + 3;
  }
  doc.moveDown(0.4);
}

/** Column widths in proportion to each column's longest cell, within bounds, filling the width. */
function columnWidths(doc: Doc, columns: string[], rows: string[][]): number[] {
  const total = contentWidth(doc);
  const want = columns.map((c, i) => Math.max(doc.widthOfString(c), ...rows.map((r) => doc.widthOfString(r[i] ?? ''))) + 8);
  // No column narrower than the longest word of its header (headers are not broken inside a word).
  doc.font(BOLD);
  const min = columns.map((c) => Math.max(...c.split(/\s+/).map((w) => doc.widthOfString(w))) + 8);
  doc.font(REGULAR);
  const sum = want.reduce((s, w) => s + w, 0);
  if (sum <= total) return want.map((w) => (w * total) / sum);
  // Too wide: long columns are capped and wrap; the share of each never falls below its minimum.
  const capped = want.map((w, i) => Math.max(min[i], Math.min(w, total * 0.45)));
  const fixedW = capped.reduce((s, w, i) => s + (w === min[i] ? w : 0), 0);
  const flexible = capped.reduce((s, w, i) => s + (w === min[i] ? 0 : w), 0);
  const room = Math.max(0, total - fixedW);
  return capped.map((w, i) => (w === min[i] || flexible === 0 ? w : (w * room) / flexible));
}

function table(doc: Doc, b: Extract<Block, { kind: 'table' }>): void {
  doc.fontSize(8.5);
  if (b.caption) paragraph(doc, b.caption, { size: 9, bold: true, gap: 0.2 });
  doc.font(REGULAR).fontSize(8.5);
  const widths = columnWidths(doc, b.columns, b.rows);
  const pad = 3;
  const rowHeight = (cells: string[], font: string) => {
    doc.font(font);
    return Math.max(...cells.map((c, i) => doc.heightOfString(c || ' ', { width: widths[i] - 2 * pad }))) + 2 * pad;
  };
  const drawRow = (cells: string[], font: string, header: boolean) => {
    const h = rowHeight(cells, font);
    const y = doc.y;
    let x = MARGIN;
    doc.font(font).fillColor(header ? INK : INK);
    cells.forEach((c, i) => {
      const align = b.align?.[i] === 'right' ? 'right' : 'left';
      doc.text(c || '', x + pad, y + pad, { width: widths[i] - 2 * pad, align });
      x += widths[i];
    });
    doc.moveTo(MARGIN, y + h).lineTo(MARGIN + contentWidth(doc), y + h).lineWidth(header ? 0.8 : 0.4).strokeColor(header ? INK : LINE).stroke();
    doc.y = y + h;
  };
  ensure(doc, rowHeight(b.columns, BOLD) + (b.rows[0] ? rowHeight(b.rows[0], REGULAR) : 0));
  drawRow(b.columns, BOLD, true);
  for (const r of b.rows) {
    const h = rowHeight(r, REGULAR);
    if (doc.y + h > bottom(doc)) {
      doc.addPage();
      drawRow(b.columns, BOLD, true);
    }
    drawRow(r, REGULAR, false);
  }
  doc.x = MARGIN;
  doc.moveDown(0.6);
}

function list(doc: Doc, items: string[], tone: Tone = 'plain'): void {
  doc.font(REGULAR).fontSize(9.5).fillColor(TONE[tone]);
  const indent = 12;
  for (const item of items) {
    const h = doc.heightOfString(item, { width: contentWidth(doc) - indent });
    ensure(doc, Math.min(h, 200));
    const y = doc.y;
    doc.text('•', MARGIN, y);
    doc.text(item, MARGIN + indent, y, { width: contentWidth(doc) - indent });
    doc.moveDown(0.2);
  }
  doc.fillColor(INK).moveDown(0.3);
}

function chart(doc: Doc, c: Chart): void {
  const scale = Math.min(1, contentWidth(doc) / c.width);
  const h = c.height * scale;
  doc.font(BOLD).fontSize(9);
  ensure(doc, h + 40);
  doc.fillColor(INK).text(c.title, MARGIN, doc.y);
  const top = doc.y + 2;
  doc.save();
  doc.translate(MARGIN, top).scale(scale);
  for (const p of c.paths) {
    doc.save();
    doc.path(p.d);
    if (p.dash) doc.dash(p.dash[0], { space: p.dash[1] ?? p.dash[0] });
    if (p.opacity !== undefined) doc.opacity(p.opacity);
    if (p.fill && p.stroke) doc.lineWidth(p.width ?? 1).fillAndStroke(p.fill, p.stroke);
    else if (p.fill) doc.fill(p.fill);
    else doc.lineWidth(p.width ?? 1).stroke(p.stroke ?? INK);
    doc.undash();
    doc.restore();
  }
  for (const d of c.dots) doc.circle(d.x, d.y, d.r).fill(d.fill);
  doc.font(REGULAR).fillColor(MUTED);
  for (const t of c.texts) {
    doc.fontSize(t.size);
    const w = doc.widthOfString(t.text);
    const x = t.anchor === 'middle' ? t.x - w / 2 : t.anchor === 'end' ? t.x - w : t.x;
    if (t.rotate) {
      doc.save();
      doc.rotate(t.rotate, { origin: [t.x, t.y] });
      doc.text(t.text, t.x - w / 2, t.y - t.size / 2, { lineBreak: false });
      doc.restore();
    } else {
      doc.text(t.text, x, t.y - t.size * 0.8, { lineBreak: false });
    }
  }
  doc.restore();
  doc.x = MARGIN;
  doc.y = top + h + 4;
  paragraph(doc, c.description, { size: 8, tone: 'plain', gap: 0.6 });
}

function block(doc: Doc, b: Block): void {
  switch (b.kind) {
    case 'p':
      return paragraph(doc, b.text, { tone: b.tone });
    case 'kv':
      return keyValues(doc, b.rows);
    case 'table':
      return table(doc, b);
    case 'list':
      return list(doc, b.items, b.tone);
    case 'chart':
      return chart(doc, b.chart);
  }
}

/** The PDF of a report, as bytes. */
export async function renderReportPdf(report: ReportDocument): Promise<Buffer> {
  const doc = new PDFDocument({
    size: 'A4',
    margins: { top: MARGIN, bottom: MARGIN, left: MARGIN, right: MARGIN },
    bufferPages: true,
    info: { Title: `${report.kind}: ${report.title}`, Author: 'Rhobook', Subject: report.subtitle, Keywords: `engine ${report.engineVersion}` },
    // A reproducible file: no creation date beyond the one the report prints.
    compress: true,
  });
  doc.registerFont(REGULAR, path.join(FONT_DIR, 'DejaVuSans.ttf'));
  doc.registerFont(BOLD, path.join(FONT_DIR, 'DejaVuSans-Bold.ttf'));
  const chunks: Buffer[] = [];
  const done = new Promise<Buffer>((resolve, reject) => {
    doc.on('data', (c: Buffer) => chunks.push(c));
    doc.on('end', () => resolve(Buffer.concat(chunks)));
    doc.on('error', reject);
  });

  doc.font(REGULAR).fontSize(9).fillColor(MUTED).text(report.kind.toUpperCase(), MARGIN, MARGIN);
  doc.font(BOLD).fontSize(16).fillColor(INK).text(report.title, { width: contentWidth(doc) });
  doc.font(REGULAR).fontSize(10).fillColor(MUTED).text(report.subtitle, { width: contentWidth(doc) });
  doc.moveDown(0.6);
  keyValues(doc, [...report.reproduce, ['Method', `${report.methodUrl} (the methodology of engine ${report.engineVersion})`], ['Generated', report.generatedAt.replace('T', ' ').slice(0, 16) + ' UTC']]);

  for (const s of report.sections) {
    const level = s.level ?? 2;
    doc.moveDown(level === 2 ? 0.5 : 0.2);
    ensure(doc, 60);
    doc.font(BOLD).fontSize(level === 2 ? 13 : 11).fillColor(INK).text(s.heading, MARGIN, doc.y, { width: contentWidth(doc) });
    if (level === 2) {
      doc.moveTo(MARGIN, doc.y + 1).lineTo(MARGIN + contentWidth(doc), doc.y + 1).lineWidth(0.6).strokeColor(LINE).stroke();
    }
    doc.moveDown(0.4);
    for (const b of s.blocks) block(doc, b);
  }

  const range = doc.bufferedPageRange();
  for (let i = range.start; i < range.start + range.count; i++) {
    doc.switchToPage(i);
    // Below the bottom margin: lift the margin while writing, or pdfkit would start a new page.
    doc.page.margins.bottom = 0;
    const y = doc.page.height - MARGIN + 6;
    doc.font(REGULAR).fontSize(7.5).fillColor(MUTED);
    doc.text(`Rhobook · ${report.kind} · engine ${report.engineVersion} · method: ${report.methodUrl} · page ${i + 1} of ${range.count}`, MARGIN, y, {
      width: contentWidth(doc),
      align: 'center',
      lineBreak: false,
    });
  }
  doc.end();
  return done;
}
