// The page furniture every Dipledger document shares: an archival PDF (PDF/A-3b, fonts
// embedded, fixed dates so the same record gives the same bytes), running header and footer with
// "page x of y", headings, wrapped text, boxed tables that break across pages and repeat their
// header, and the closing "end of document" line.
//
// Tables are drawn here rather than with pdfkit's own table(): documents need the header row
// repeated after a page break, rows kept whole, and the page furniture left clear, which is a
// few lines of layout code.
import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import path from 'node:path';
import PDFDocument from 'pdfkit';

const require = createRequire(import.meta.url);

/** The DejaVu TTFs from the `dejavu-fonts-ttf` package: embeddable, with the symbols we need (±, µ, Ω). */
export function fontPath(file: string): string {
  return path.join(path.dirname(require.resolve('dejavu-fonts-ttf/package.json')), 'ttf', file);
}

const fontCache = new Map<string, Buffer>();
/** Font files are read once per process; every document embeds its own subset. */
function fontBytes(file: string): Buffer {
  let b = fontCache.get(file);
  if (!b) {
    b = readFileSync(fontPath(file));
    fontCache.set(file, b);
  }
  return b;
}

export const FONTS = {
  regular: 'DejaVuSans.ttf',
  bold: 'DejaVuSans-Bold.ttf',
  condensed: 'DejaVuSansCondensed.ttf',
  condensedBold: 'DejaVuSansCondensed-Bold.ttf',
  mono: 'DejaVuSansMono.ttf',
} as const;
export type FontName = keyof typeof FONTS;

export const PAGE = {
  width: 595.28,
  height: 841.89,
  margin: 48,
  /** Space kept for the running header and footer. */
  top: 92,
  bottom: 790,
} as const;
export const CONTENT_WIDTH = PAGE.width - 2 * PAGE.margin;

export const INK = '#111111';
export const MUTED = '#555555';
export const RULE = '#999999';
export const SHADE = '#e9edf2';
export const ACCENT = '#1d4e89';

export interface DocumentMeta {
  title: string;
  /** e.g. "Certificate C-2026-0001 revision 1": printed on every page (ISO/IEC 17025:2017 7.8.2.1 d). */
  identification: string;
  /** Lab name for the running header. */
  labName: string;
  author: string;
  subject: string;
  keywords: string;
  /** Issue time; also the PDF's creation date, so the same inputs give the same bytes. */
  createdAt: string;
  /** Extra entries of the PDF information dictionary (strings). */
  info?: Record<string, string>;
}

export interface Attachment {
  name: string;
  bytes: Buffer;
  mimeType: string;
  description: string;
  /** PDF/A-3 associated-file relationship of the attachment to the document. */
  relationship: 'Data' | 'Source' | 'Alternative' | 'Supplement';
}

/** XMP (written by pdfkit from the info strings) is XML: keep markup characters out of it. */
function xmpSafe(s: string): string {
  return s.replace(/[<>&"]/g, (c) => ({ '<': '(', '>': ')', '&': 'and', '"': "'" })[c] ?? c);
}

export class Page {
  readonly doc: PDFKit.PDFDocument;
  readonly meta: DocumentMeta;
  y: number = PAGE.top;
  private repeatHeader: (() => void) | null = null;

  constructor(meta: DocumentMeta) {
    this.meta = meta;
    const created = new Date(meta.createdAt);
    this.doc = new PDFDocument({
      size: 'A4',
      margin: PAGE.margin,
      bufferPages: true,
      autoFirstPage: true,
      subset: 'PDF/A-3b',
      pdfVersion: '1.7',
      tagged: true,
      lang: 'en',
      displayTitle: true,
      info: {
        Title: xmpSafe(meta.title),
        Author: xmpSafe(meta.author),
        Subject: xmpSafe(meta.subject),
        Keywords: xmpSafe(meta.keywords),
        Creator: 'Dipledger',
        Producer: 'Dipledger (pdfkit)',
        CreationDate: created,
        ModDate: created,
        ...(meta.info ?? {}),
      },
    });
    for (const [name, file] of Object.entries(FONTS)) this.doc.registerFont(name, fontBytes(file));
    this.font('regular', 9);
    this.doc.fillColor(INK).strokeColor(INK);
  }

  font(name: FontName, size: number): this {
    this.doc.font(name).fontSize(size);
    return this;
  }

  /** Starts a new page if fewer than `height` points remain. */
  ensure(height: number): void {
    if (this.y + height > PAGE.bottom) this.newPage();
  }

  newPage(): void {
    this.doc.addPage();
    this.y = PAGE.top;
    this.repeatHeader?.();
  }

  gap(points = 6): void {
    this.y += points;
  }

  heading(text: string, clause?: string): void {
    this.ensure(40);
    this.gap(6);
    this.font('bold', 11).doc.fillColor(ACCENT).text(text, PAGE.margin, this.y, {
      width: CONTENT_WIDTH,
      lineBreak: false,
    });
    if (clause) {
      this.font('regular', 7)
        .doc.fillColor(MUTED)
        .text(clause, PAGE.margin, this.y + 3, {
          width: CONTENT_WIDTH,
          align: 'right',
          lineBreak: false,
        });
    }
    this.y += 15;
    this.doc
      .moveTo(PAGE.margin, this.y)
      .lineTo(PAGE.margin + CONTENT_WIDTH, this.y)
      .lineWidth(0.6)
      .strokeColor(ACCENT)
      .stroke();
    this.doc.fillColor(INK).strokeColor(INK);
    this.y += 5;
  }

  /** A paragraph that wraps and breaks across pages line by line. */
  paragraph(
    text: string,
    options: { font?: FontName; size?: number; color?: string; indent?: number } = {},
  ): void {
    const size = options.size ?? 9;
    const indent = options.indent ?? 0;
    this.font(options.font ?? 'regular', size);
    const width = CONTENT_WIDTH - indent;
    const lines = this.wrap(text, width);
    const lineHeight = size * 1.3;
    for (const line of lines) {
      this.ensure(lineHeight);
      this.doc.fillColor(options.color ?? INK).text(line, PAGE.margin + indent, this.y, { lineBreak: false });
      this.y += lineHeight;
    }
    this.doc.fillColor(INK);
    this.gap(2);
  }

  /** Label and value pairs in two columns, the label muted. */
  fields(rows: [string, string][], labelWidth = 150): void {
    for (const [label, value] of rows) {
      this.font('regular', 9);
      const valueLines = this.wrap(value, CONTENT_WIDTH - labelWidth);
      const labelLines = this.wrap(label, labelWidth - 8);
      const h = Math.max(valueLines.length, labelLines.length) * 11.7 + 2;
      this.ensure(h);
      this.doc.fillColor(MUTED);
      labelLines.forEach((line, i) => {
        this.doc.text(line, PAGE.margin, this.y + i * 11.7, { lineBreak: false });
      });
      this.doc.fillColor(INK);
      valueLines.forEach((line, i) => {
        this.doc.text(line, PAGE.margin + labelWidth, this.y + i * 11.7, { lineBreak: false });
      });
      this.y += h;
    }
  }

  /** Splits text into lines that fit `width` in the current font (explicit newlines kept). */
  wrap(text: string, width: number): string[] {
    const out: string[] = [];
    for (const para of text.split('\n')) {
      const words = para.split(/\s+/).filter(Boolean);
      let line = '';
      for (const w of words) {
        const candidate = line ? `${line} ${w}` : w;
        if (this.doc.widthOfString(candidate) <= width || !line) {
          line = candidate;
          // A single word wider than the column is cut so it never runs off the page.
          while (this.doc.widthOfString(line) > width && line.length > 1) {
            let cut = line.length - 1;
            while (cut > 1 && this.doc.widthOfString(line.slice(0, cut)) > width) cut--;
            out.push(line.slice(0, cut));
            line = line.slice(cut);
          }
        } else {
          out.push(line);
          line = w;
        }
      }
      out.push(line);
    }
    return out;
  }

  /** A boxed table; rows never split, and the header repeats on a new page. */
  table(columns: Column[], rows: string[][], options: TableOptions = {}): void {
    const size = options.size ?? 8;
    const fontName: FontName = options.font ?? 'condensed';
    const total = columns.reduce((s, c) => s + c.width, 0);
    const scale = CONTENT_WIDTH / total;
    const widths = columns.map((c) => c.width * scale);
    const pad = 3;
    const lineHeight = size * 1.25;
    const cellLines = (text: string, w: number, bold: boolean): string[] => {
      this.font(bold ? 'condensedBold' : fontName, size);
      return this.wrap(text, w - 2 * pad);
    };
    const drawRow = (cells: string[], header: boolean, minHeight = 0): void => {
      const wrapped = cells.map((c, i) => cellLines(c, widths[i] ?? 20, header));
      const h = Math.max(minHeight, ...wrapped.map((l) => l.length * lineHeight + 2 * pad));
      if (this.y + h > PAGE.bottom) {
        this.newPage();
        if (!header)
          drawRow(
            columns.map((c) => c.title),
            true,
          );
      }
      let x = PAGE.margin;
      if (header) this.doc.rect(x, this.y, CONTENT_WIDTH, h).fillColor(SHADE).fill();
      this.doc.fillColor(INK);
      wrapped.forEach((lines, i) => {
        const w = widths[i] ?? 20;
        this.font(header ? 'condensedBold' : fontName, size);
        const align = header ? 'left' : (columns[i]?.align ?? 'left');
        lines.forEach((line, j) => {
          const tw = this.doc.widthOfString(line);
          const tx = align === 'right' ? x + w - pad - tw : align === 'center' ? x + (w - tw) / 2 : x + pad;
          this.doc.text(line, tx, this.y + pad + j * lineHeight, { lineBreak: false });
        });
        x += w;
      });
      // Cell borders: the box of each cell, drawn after the text.
      x = PAGE.margin;
      this.doc.lineWidth(0.4).strokeColor(RULE);
      for (const w of widths) {
        this.doc.rect(x, this.y, w, h).stroke();
        x += w;
      }
      this.doc.strokeColor(INK);
      this.y += h;
    };
    const headerHeight =
      Math.max(...columns.map((c, i) => cellLines(c.title, widths[i] ?? 20, true).length)) * lineHeight +
      2 * pad;
    const firstRow = rows[0];
    const firstHeight = firstRow
      ? Math.max(
          options.rowHeight ?? 0,
          ...firstRow.map((c, i) => cellLines(c, widths[i] ?? 20, false).length * lineHeight + 2 * pad),
        )
      : 0;
    this.ensure(headerHeight + firstHeight + (options.keepWithHeader ?? 0));
    drawRow(
      columns.map((c) => c.title),
      true,
    );
    for (const r of rows) drawRow(r, false, options.rowHeight ?? 0);
    this.gap(6);
  }

  /** Empty boxes to fill in by hand, with labels above them. */
  boxes(labels: string[], height = 26): void {
    const w = CONTENT_WIDTH / labels.length;
    this.ensure(height + 12);
    this.font('regular', 7);
    labels.forEach((label, i) => {
      const x = PAGE.margin + i * w;
      this.doc.fillColor(MUTED).text(label, x + 2, this.y, { width: w - 4, lineBreak: false });
      this.doc
        .lineWidth(0.5)
        .strokeColor(RULE)
        .rect(x + 2, this.y + 9, w - 6, height)
        .stroke();
    });
    this.doc.fillColor(INK).strokeColor(INK);
    this.y += height + 14;
  }

  /** A shaded box of cautions, kept on one page. */
  cautions(title: string, items: string[]): void {
    this.font('regular', 8.5);
    const width = CONTENT_WIDTH - 20;
    const lines = items.map((t) => this.wrap(t, width - 10));
    const h = 22 + lines.reduce((s, l) => s + l.length * 11 + 3, 0);
    this.ensure(h + 6);
    this.doc.rect(PAGE.margin, this.y, CONTENT_WIDTH, h).fillColor('#fff4e0').fill();
    this.doc.lineWidth(1).strokeColor('#b86e00').rect(PAGE.margin, this.y, CONTENT_WIDTH, h).stroke();
    this.font('bold', 9)
      .doc.fillColor('#7a4100')
      .text(title, PAGE.margin + 8, this.y + 6, { lineBreak: false });
    let y = this.y + 20;
    this.font('regular', 8.5).doc.fillColor(INK);
    for (const l of lines) {
      this.doc.text('•', PAGE.margin + 10, y, { lineBreak: false });
      l.forEach((line, i) => this.doc.text(line, PAGE.margin + 20, y + i * 11, { lineBreak: false }));
      y += l.length * 11 + 3;
    }
    this.doc.strokeColor(INK);
    this.y += h + 8;
  }

  /** Until cleared, called after every page break (e.g. a repeated table header). */
  onNewPage(fn: (() => void) | null): void {
    this.repeatHeader = fn;
  }

  /** The clear end of the document (ISO/IEC 17025:2017 7.8.2.1 d). */
  end(text: string): void {
    this.ensure(22);
    this.gap(4);
    const y = this.y + 6;
    this.font('bold', 9);
    const tw = this.doc.widthOfString(text);
    const left = PAGE.margin + (CONTENT_WIDTH - tw) / 2;
    this.doc.lineWidth(0.8).strokeColor(INK);
    this.doc
      .moveTo(PAGE.margin, y)
      .lineTo(left - 10, y)
      .stroke();
    this.doc
      .moveTo(left + tw + 10, y)
      .lineTo(PAGE.margin + CONTENT_WIDTH, y)
      .stroke();
    this.doc.text(text, left, this.y, { lineBreak: false });
    this.y += 16;
  }

  /** Writes the running header and footer on every page, then the PDF. */
  finish(attachments: Attachment[] = [], beforeEnd?: (doc: PDFKit.PDFDocument) => void): Buffer {
    const created = new Date(this.meta.createdAt);
    for (const a of attachments) {
      this.doc.file(a.bytes, {
        name: a.name,
        type: a.mimeType,
        description: a.description,
        relationship: a.relationship,
        creationDate: created,
        modifiedDate: created,
      } as PDFKit.Mixins.PDFAttachmentOptions);
    }
    const range = this.doc.bufferedPageRange();
    for (let i = 0; i < range.count; i++) {
      this.doc.switchToPage(range.start + i);
      this.furniture(i + 1, range.count);
    }
    beforeEnd?.(this.doc);
    return finishPdf(this.doc);
  }

  private furniture(page: number, pages: number): void {
    const d = this.doc;
    // The footer sits below the bottom margin; without this pdfkit would start a new page for it.
    d.page.margins.bottom = 0;
    const top = PAGE.margin - 12;
    this.font('bold', 10);
    d.fillColor(INK).text(this.meta.labName, PAGE.margin, top, {
      width: CONTENT_WIDTH * 0.55,
      lineBreak: false,
      height: 12,
    });
    this.font('regular', 8);
    d.fillColor(MUTED).text(this.meta.identification, PAGE.margin, top + 2, {
      width: CONTENT_WIDTH,
      align: 'right',
      lineBreak: false,
    });
    d.text(this.meta.title, PAGE.margin, top + 14, {
      width: CONTENT_WIDTH,
      align: 'right',
      lineBreak: false,
    });
    d.lineWidth(0.8)
      .strokeColor(ACCENT)
      .moveTo(PAGE.margin, top + 28)
      .lineTo(PAGE.margin + CONTENT_WIDTH, top + 28)
      .stroke();
    const fy = PAGE.bottom + 14;
    d.lineWidth(0.4)
      .strokeColor(RULE)
      .moveTo(PAGE.margin, fy)
      .lineTo(PAGE.margin + CONTENT_WIDTH, fy)
      .stroke();
    this.font('regular', 7.5);
    d.fillColor(MUTED).text(this.meta.identification, PAGE.margin, fy + 5, { lineBreak: false });
    d.fillColor(INK).text(`page ${page} of ${pages}`, PAGE.margin, fy + 5, {
      width: CONTENT_WIDTH,
      align: 'right',
      lineBreak: false,
    });
    d.fillColor(INK).strokeColor(INK);
  }
}

export interface Column {
  title: string;
  /** Relative width; the table fills the content width. */
  width: number;
  align?: 'left' | 'right' | 'center';
}

export interface TableOptions {
  size?: number;
  font?: FontName;
  rowHeight?: number;
  /** Extra room to keep with the header so it never sits alone at a page foot. */
  keepWithHeader?: number;
}

/** Ends a pdfkit document and collects its bytes synchronously. pdfkit writes everything
 * during end() when no image or font is still loading (ours are registered up front), so the
 * service can render inside one synchronous operation, like every other write. */
export function finishPdf(doc: PDFKit.PDFDocument): Buffer {
  doc.end();
  const state = (doc as unknown as { _readableState?: { ended?: boolean } })._readableState;
  if (!state?.ended) throw new Error('the PDF did not finish synchronously');
  const chunks: Buffer[] = [];
  let chunk: Buffer | null;
  while ((chunk = doc.read() as Buffer | null) !== null) chunks.push(chunk);
  return Buffer.concat(chunks);
}
