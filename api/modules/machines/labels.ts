import { existsSync, readFileSync } from 'node:fs';
import { resolve } from 'node:path';
import PDFDocument from 'pdfkit';
import QRCode from 'qrcode';
import { MACHINE_KIND_LABELS, type MachineKind } from '../../contracts/machine-spec';
import { FONT_DIR } from '../../lib/paths';

/** One QR label: what is printed, and where the code leads. */
export interface LabelMachine {
  id: string;
  name: string;
  assetTag: string;
  kind: string;
  location: string;
}

/** A4 in points: five strip labels (about 190 × 51 mm) down the page, with room to cut between them. */
export const LABEL_SHEET = {
  pageWidth: 595.28,
  pageHeight: 841.89,
  margin: 28,
  gap: 14,
  columns: 1,
  rows: 5,
  /** The QR code's side, quiet zone included (about 46 mm: a tablet reads it from arm's length). */
  qrSide: 130,
  padding: 10,
} as const;

export const cellWidth = (LABEL_SHEET.pageWidth - 2 * LABEL_SHEET.margin - (LABEL_SHEET.columns - 1) * LABEL_SHEET.gap) / LABEL_SHEET.columns;
export const cellHeight = (LABEL_SHEET.pageHeight - 2 * LABEL_SHEET.margin - (LABEL_SHEET.rows - 1) * LABEL_SHEET.gap) / LABEL_SHEET.rows;

/** Where label n (0-based) sits on its page: its top-left corner, in points. */
export function labelBox(n: number): { page: number; x: number; y: number; width: number; height: number } {
  const perPage = LABEL_SHEET.columns * LABEL_SHEET.rows;
  const i = n % perPage;
  const col = i % LABEL_SHEET.columns;
  const row = Math.floor(i / LABEL_SHEET.columns);
  return {
    page: Math.floor(n / perPage),
    x: LABEL_SHEET.margin + col * (cellWidth + LABEL_SHEET.gap),
    y: LABEL_SHEET.margin + row * (cellHeight + LABEL_SHEET.gap),
    width: cellWidth,
    height: cellHeight,
  };
}

/** The address a machine's QR code carries: its page in the app. */
export function machineUrl(publicUrl: string, id: string): string {
  return `${publicUrl.replace(/\/+$/, '')}/machines/${id}`;
}

// The repository's own fonts when they are there (so every sheet prints the same), else pdfkit's Helvetica.
const FONTS = { regular: 'DejaVuSans.ttf', bold: 'DejaVuSans-Bold.ttf', mono: 'DejaVuSansMono.ttf' };
let fonts: { regular: Buffer; bold: Buffer; mono: Buffer } | null | undefined;
function fontFiles() {
  if (fonts === undefined) {
    const paths = Object.values(FONTS).map((f) => resolve(FONT_DIR, f));
    fonts = paths.every(existsSync)
      ? { regular: readFileSync(resolve(FONT_DIR, FONTS.regular)), bold: readFileSync(resolve(FONT_DIR, FONTS.bold)), mono: readFileSync(resolve(FONT_DIR, FONTS.mono)) }
      : null;
  }
  return fonts;
}

const INK = '#111111';
const MUTED = '#4a4f53';

/** Draw the QR code as filled squares (sharp at any printer's resolution), quiet zone included. */
function drawQr(doc: PDFKit.PDFDocument, text: string, x: number, y: number, side: number) {
  const qr = QRCode.create(text, { errorCorrectionLevel: 'M' });
  const size = qr.modules.size;
  const quiet = 4;
  const cell = side / (size + 2 * quiet);
  doc.save();
  doc.rect(x, y, side, side).fill('#ffffff');
  for (let row = 0; row < size; row++) {
    let col = 0;
    while (col < size) {
      if (!qr.modules.get(row, col)) {
        col++;
        continue;
      }
      const start = col;
      while (col < size && qr.modules.get(row, col)) col++;
      // A hair of overlap so no white seams show between neighbouring squares.
      doc.rect(x + (quiet + start) * cell, y + (quiet + row) * cell, (col - start) * cell + 0.05, cell + 0.05);
    }
  }
  doc.fill(INK);
  doc.restore();
}

/** The largest font size (down to a floor) at which the text fits the width on one line. */
function fitSize(doc: PDFKit.PDFDocument, font: string, text: string, width: number, largest: number, smallest: number): number {
  doc.font(font);
  for (let size = largest; size > smallest; size -= 0.5) {
    if (doc.fontSize(size).widthOfString(text) <= width) return size;
  }
  return smallest;
}

/**
 * A printable sheet of QR labels: each with the machine's name and asset tag and a QR code that
 * opens its page (PUBLIC_URL/machines/<id>), so a trainee can scan the saw to open it.
 */
export function renderLabels(machines: LabelMachine[], publicUrl: string, workshopName: string): Promise<Buffer> {
  const doc = new PDFDocument({
    size: [LABEL_SHEET.pageWidth, LABEL_SHEET.pageHeight],
    margin: 0,
    autoFirstPage: false,
    info: { Title: 'Setwright QR labels', Author: workshopName, Subject: 'Machine QR labels' },
  });
  const f = fontFiles();
  if (f) {
    doc.registerFont('Sans', f.regular);
    doc.registerFont('Sans-Bold', f.bold);
    doc.registerFont('Mono', f.mono);
  }
  const font = (name: 'Sans' | 'Sans-Bold' | 'Mono') => (f ? name : name === 'Sans' ? 'Helvetica' : name === 'Mono' ? 'Courier-Bold' : 'Helvetica-Bold');
  const chunks: Buffer[] = [];
  doc.on('data', (c: Buffer) => chunks.push(c));
  const done = new Promise<Buffer>((ok, fail) => {
    doc.on('end', () => ok(Buffer.concat(chunks)));
    doc.on('error', fail);
  });

  const { padding, qrSide } = LABEL_SHEET;
  machines.forEach((m, n) => {
    const box = labelBox(n);
    if (n % (LABEL_SHEET.columns * LABEL_SHEET.rows) === 0) doc.addPage();
    const url = machineUrl(publicUrl, m.id);
    // A thin cut line round each label.
    doc.save().lineWidth(0.6).dash(3, { space: 3 }).strokeColor('#8a9094').roundedRect(box.x, box.y, box.width, box.height, 6).stroke().restore();
    const qrY = box.y + (box.height - qrSide) / 2;
    drawQr(doc, url, box.x + padding / 2, qrY, qrSide);

    const tx = box.x + qrSide + padding * 1.5;
    const tw = box.x + box.width - padding * 1.5 - tx;
    let ty = box.y + padding + 6;
    doc.font(font('Sans')).fontSize(8).fillColor(MUTED).text('QR LABEL · SCAN TO OPEN THIS MACHINE IN SETWRIGHT', tx, ty, { width: tw, characterSpacing: 0.4, lineBreak: false });
    ty += 16;
    doc.font(font('Sans-Bold')).fontSize(fitSize(doc, font('Sans-Bold'), m.name, tw, 18, 11)).fillColor(INK).text(m.name, tx, ty, { width: tw, height: 46, ellipsis: true });
    ty = Math.max(doc.y, ty + 24) + 8;
    doc.font(font('Sans')).fontSize(8).fillColor(MUTED).text('ASSET TAG', tx, ty, { width: tw, characterSpacing: 0.4, lineBreak: false });
    doc.font(font('Mono')).fontSize(fitSize(doc, font('Mono'), m.assetTag, tw, 22, 9)).fillColor(INK).text(m.assetTag, tx, ty + 11, { width: tw, lineBreak: false });
    const kind = MACHINE_KIND_LABELS[m.kind as MachineKind] ?? m.kind;
    doc.font(font('Sans')).fontSize(8).fillColor(MUTED).text(`${kind} · ${workshopName}`, tx, box.y + box.height - padding - 10, { width: tw, height: 10, ellipsis: true, lineBreak: false });
  });
  if (!machines.length) doc.addPage();
  doc.end();
  return done;
}
