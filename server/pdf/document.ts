import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import path from 'node:path';
import PDFDocument from 'pdfkit';
import SVGtoPDF from 'svg-to-pdfkit';
import { woffToSfnt } from './woff.js';

const require = createRequire(import.meta.url);
const fontDir = path.join(path.dirname(require.resolve('@fontsource/dejavu-sans/package.json')), 'files');

/**
 * Fonts shipped with the app, embedded in every PDF. DejaVu Sans rather than the screen's Roboto:
 * pdfkit has no glyph fallback, and the rules printed on these sheets need ≤, π, ⁿ and the like,
 * which Roboto's latin files lack.
 */
export const FONTS = {
  regular: path.join(fontDir, 'dejavu-sans-latin-400-normal.woff'),
  bold: path.join(fontDir, 'dejavu-sans-latin-700-normal.woff'),
};

export const SAFETY_TEXT =
  'Holdline is a coordination record, not a safety device. It does not replace the crane manufacturer’s manual and arrangement data, the lift plan, the crane’s rated capacity limiter, local regulations, or the judgement of competent people. Move only on the signaller’s signal.';

// Unpacked once per thread: pdfkit reads a WOFF font's compressed tables again for every line.
let unpacked: { regular: Buffer; bold: Buffer } | null = null;
const fontBytes = () => (unpacked ??= { regular: woffToSfnt(readFileSync(FONTS.regular)), bold: woffToSfnt(readFileSync(FONTS.bold)) });

export interface PdfWriterOptions {
  /** Printed at the top right of every page (e.g. "in progress"). */
  stamp?: string;
  /** Room at the top of every page, for a header drawn by `eachPage`; 48 points otherwise. */
  marginTop?: number;
  /** Draws on every page once the pages are counted (a running header, a code to scan), margins set to 0 at the top and bottom. */
  eachPage?: (doc: PDFKit.PDFDocument, page: { index: number; count: number }) => void;
}

/** A small writer over pdfkit: headings, key/value rows, tables, drawings, page breaks. */
export class PdfWriter {
  readonly doc: PDFKit.PDFDocument;
  private readonly chunks: Buffer[] = [];
  private readonly done: Promise<Buffer>;

  /**
   * `footer` is printed at the foot of every page with "page N of M"; a second line (e.g. a hash)
   * goes above it. `stamp`, when given, is printed at the top of every page (e.g. "in progress").
   */
  constructor(title: string, footer: string | [string, string], options: PdfWriterOptions = {}) {
    this.doc = new PDFDocument({ size: 'A4', margins: { top: options.marginTop ?? 48, bottom: 56, left: 48, right: 48 }, info: { Title: title, Creator: 'Holdline' }, bufferPages: true });
    this.doc.registerFont('Body', fontBytes().regular);
    this.doc.registerFont('Body-Bold', fontBytes().bold);
    this.doc.font('Body');
    this.doc.on('data', (c: Buffer) => this.chunks.push(c));
    this.done = new Promise((resolve) => this.doc.on('end', () => resolve(Buffer.concat(this.chunks))));
    this.footer = typeof footer === 'string' ? [footer] : footer;
    this.stamp = options.stamp ?? null;
    this.eachPage = options.eachPage ?? null;
  }

  private readonly footer: string[];
  private readonly stamp: string | null;
  private readonly eachPage: PdfWriterOptions['eachPage'] | null;

  get width(): number {
    return this.doc.page.width - this.doc.page.margins.left - this.doc.page.margins.right;
  }

  /** Starts a new page when fewer than `points` remain. */
  ensure(points: number): void {
    if (this.doc.y + points > this.doc.page.height - this.doc.page.margins.bottom) this.doc.addPage();
  }

  title(text: string, sub?: string): this {
    this.doc.font('Body-Bold').fontSize(20).fillColor('#14181d').text(text);
    if (sub) this.doc.font('Body').fontSize(11).fillColor('#3b434c').text(sub);
    this.doc.moveDown(0.6);
    return this;
  }

  heading(text: string): this {
    this.ensure(60);
    this.doc.moveDown(0.6).font('Body-Bold').fontSize(14).fillColor('#14181d').text(text);
    this.doc.moveDown(0.2);
    return this;
  }

  paragraph(text: string, options: { size?: number; color?: string } = {}): this {
    this.doc.font('Body').fontSize(options.size ?? 10).fillColor(options.color ?? '#14181d').text(text, { width: this.width });
    this.doc.moveDown(0.3);
    return this;
  }

  notice(text: string): this {
    this.ensure(70);
    const x = this.doc.page.margins.left;
    const y = this.doc.y;
    const h = this.doc.font('Body').fontSize(9).heightOfString(text, { width: this.width - 16 }) + 12;
    this.doc.rect(x, y, 5, h).fill('#f2b53a');
    this.doc.fillColor('#14181d').text(text, x + 14, y + 6, { width: this.width - 16 });
    this.doc.x = x;
    this.doc.y = y + h + 6;
    return this;
  }

  /** Rows of label and value. */
  facts(rows: [string, string][]): this {
    for (const [label, value] of rows) {
      this.ensure(16);
      const y = this.doc.y;
      this.doc.font('Body-Bold').fontSize(10).fillColor('#3b434c').text(label, this.doc.page.margins.left, y, { width: 170 });
      const labelBottom = this.doc.y;
      this.doc.font('Body').fillColor('#14181d').text(value, this.doc.page.margins.left + 180, y, { width: this.width - 180 });
      this.doc.y = Math.max(this.doc.y, labelBottom) + 2;
    }
    this.doc.x = this.doc.page.margins.left;
    return this;
  }

  /** A table with fixed column widths (fractions of the page width); rows wrap. */
  table(headers: string[], widths: number[], rows: string[][], options: { size?: number } = {}): this {
    const size = options.size ?? 9;
    const left = this.doc.page.margins.left;
    const cols = widths.map((w) => w * this.width);
    const draw = (cells: string[], font: string) => {
      this.doc.font(font).fontSize(size);
      const height = Math.max(...cells.map((c, i) => this.doc.heightOfString(c, { width: cols[i] - 6 }))) + 6;
      this.ensure(height);
      const y = this.doc.y;
      let x = left;
      cells.forEach((c, i) => {
        this.doc.fillColor('#14181d').text(c, x + 3, y + 3, { width: cols[i] - 6 });
        x += cols[i];
      });
      this.doc.moveTo(left, y + height).lineTo(left + this.width, y + height).lineWidth(0.5).strokeColor('#b9ad97').stroke();
      this.doc.y = y + height;
    };
    if (headers.length) draw(headers, 'Body-Bold');
    for (const row of rows) draw(row, 'Body');
    this.doc.x = left;
    this.doc.moveDown(0.4);
    return this;
  }

  /** Draws one of our SVG drawings at the page width. */
  drawing(svg: string, heightRatio: number): this {
    const height = this.width * heightRatio;
    this.ensure(height + 10);
    SVGtoPDF(this.doc, svg, this.doc.page.margins.left, this.doc.y, { width: this.width, height, preserveAspectRatio: 'xMinYMin meet', assumePt: true, fontCallback: () => 'Body' });
    this.doc.y += height + 8;
    this.doc.x = this.doc.page.margins.left;
    return this;
  }

  /** Places a raster image (JPEG or PNG bytes) within a box, keeping its proportions. */
  image(bytes: Uint8Array, x: number, y: number, box: { width: number; height: number }): this {
    this.doc.image(Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength), x, y, { fit: [box.width, box.height], align: 'center', valign: 'center' });
    return this;
  }

  /** Numbers every page with the footer line and returns the finished file. */
  async finish(): Promise<Buffer> {
    const range = this.doc.bufferedPageRange();
    for (let i = range.start; i < range.start + range.count; i++) {
      this.doc.switchToPage(i);
      const bottom = this.doc.page.height - 36;
      // Writing inside the bottom margin would make pdfkit start a new page.
      this.doc.page.margins.bottom = 0;
      const lines = [...this.footer];
      lines[lines.length - 1] += `  ·  page ${i + 1} of ${range.count}`;
      lines.forEach((line, n) => {
        this.doc.font('Body').fontSize(8).fillColor('#3b434c').text(line, this.doc.page.margins.left, bottom - (lines.length - 1 - n) * 10, { width: this.width, lineBreak: false });
      });
      if (this.stamp) {
        const top = this.doc.page.margins.top;
        this.doc.page.margins.top = 0;
        this.doc.font('Body-Bold').fontSize(9).fillColor('#9a1c12').text(this.stamp, this.doc.page.margins.left, 20, { width: this.width, align: 'right', lineBreak: false });
        this.doc.page.margins.top = top;
      }
      if (this.eachPage) {
        const top = this.doc.page.margins.top;
        this.doc.page.margins.top = 0;
        this.eachPage(this.doc, { index: i - range.start, count: range.count });
        this.doc.page.margins.top = top;
      }
    }
    this.doc.end();
    return this.done;
  }
}

/** Height over width of an SVG from its viewBox, for placing it in a PDF. */
export function svgAspect(svg: string): number {
  const m = /viewBox="0 0 ([\d.]+) ([\d.]+)"/.exec(svg);
  return m ? Number(m[2]) / Number(m[1]) : 0.5;
}
