import { readFileSync } from 'node:fs';
import { resolve } from 'node:path';
import PDFDocument from 'pdfkit';
import QRCode from 'qrcode';
import type { Caution, Step, StepInput } from '../../../procedures/schema';
import { SIGNATURE_MEANINGS } from '../../contracts/signoff';
import type { RecordPdfData } from './data';
import { fixed, limitsText, OUTCOME_LABELS, printedTime, resultLabel, statusLabel } from './format';
import { FONT_DIR } from '../../lib/paths';

// Setwright's record PDF: A4, our own plain layout. Everything is drawn from RecordPdfData; no I/O here.
// The fonts are files in the repository (DejaVu, embedded as subsets), so every copy prints the same.

export { FONT_DIR };
let fontFiles: { regular: Buffer; bold: Buffer; mono: Buffer } | undefined;

/** The embedded fonts' bytes, read once per process. */
export function pdfFonts() {
  fontFiles ??= {
    regular: readFileSync(resolve(FONT_DIR, 'DejaVuSans.ttf')),
    bold: readFileSync(resolve(FONT_DIR, 'DejaVuSans-Bold.ttf')),
    mono: readFileSync(resolve(FONT_DIR, 'DejaVuSansMono.ttf')),
  };
  return fontFiles;
}

const PAGE = { width: 595.28, height: 841.89 };
const M = { top: 62, bottom: 58, left: 48, right: 48 };
const CONTENT = PAGE.width - M.left - M.right;
const BOTTOM = PAGE.height - M.bottom;

const INK = '#22262a';
const MUTED = '#5b6367';
const RULE = '#c9cdcb';
const BAND = '#eceeed';
const TEAL = '#0f5f66';
/** ISO 3864 safety colours: only for pass/fail and for cautions. */
const SAFETY = { safe: '#00804a', prohibition: '#c4161c', warning: '#f2c200', mandatory: '#0b5aa6' };

const CAUTION_STYLE: Record<Caution['level'], { word: string; colour: string }> = {
  mandatory: { word: 'Mandatory', colour: SAFETY.mandatory },
  warning: { word: 'Warning', colour: SAFETY.warning },
  prohibition: { word: 'Prohibited', colour: SAFETY.prohibition },
};

const STEP_KIND_LABELS: Record<Step['kind'], string> = {
  instruction: 'Instruction',
  isolation: 'Isolation',
  reading: 'Reading',
  check: 'Check',
  photo: 'Photo',
};

export const SAFETY_NOTE =
  'This record supports, and never replaces, local codes and regulations, the machine maker’s instructions and the supervision of a competent person.';

interface Cell {
  text: string;
  bold?: boolean;
  mono?: boolean;
  /** A small square in a safety colour before the text (the words carry the meaning in print too). */
  marker?: string;
}
type CellLike = Cell | string;
const cell = (c: CellLike): Cell => (typeof c === 'string' ? { text: c } : c);

function outcomeCell(outcome: keyof typeof OUTCOME_LABELS): Cell {
  if (outcome === 'pass') return { text: OUTCOME_LABELS.pass, marker: SAFETY.safe };
  if (outcome === 'fail') return { text: OUTCOME_LABELS.fail, marker: SAFETY.prohibition, bold: true };
  if (outcome === 'warn') return { text: OUTCOME_LABELS.warn, marker: SAFETY.warning, bold: true };
  return { text: OUTCOME_LABELS[outcome] };
}

/** Draws one record; keeps the cursor and the page breaks. */
class Layout {
  readonly doc: PDFKit.PDFDocument;

  constructor(readonly data: RecordPdfData) {
    const fonts = pdfFonts();
    const when = data.record.signedAt ?? data.record.finishedAt ?? data.record.createdAt;
    this.doc = new PDFDocument({
      size: 'A4',
      margins: M,
      bufferPages: true,
      autoFirstPage: true,
      info: {
        Title: `${data.procedure.title} — ${data.machine.assetTag}`,
        Author: data.workshopName,
        Subject: `Set-up record ${data.record.id}`,
        Keywords: data.record.recordHash ?? '',
        Creator: 'Setwright',
        Producer: 'Setwright',
        // Fixed dates, so rendering the same record twice gives the same bytes.
        CreationDate: when,
        ModDate: when,
      },
    });
    this.doc.registerFont('Sans', fonts.regular);
    this.doc.registerFont('Sans-Bold', fonts.bold);
    this.doc.registerFont('Mono', fonts.mono);
    this.doc.font('Sans').fontSize(10).fillColor(INK);
  }

  time(at: Date | string | null | undefined): string {
    return at ? printedTime(at, this.data.timeZone) : '—';
  }

  get y() {
    return this.doc.y;
  }

  /** Start a new page when fewer than `height` points are left. */
  need(height: number) {
    if (this.doc.y + height > BOTTOM) {
      this.doc.addPage();
      this.doc.y = M.top;
    }
  }

  gap(h: number) {
    this.doc.y += h;
  }

  /** Height of a text block in the current font: one line when it fits (cheap), else pdfkit's full wrap. */
  textHeight(text: string, width: number, lineGap = 0): number {
    if (!text.includes('\n') && this.doc.widthOfString(text) <= width) return this.doc.currentLineHeight(true) + lineGap;
    return this.doc.heightOfString(text, { width, lineGap });
  }

  font(name: 'Sans' | 'Sans-Bold' | 'Mono', size: number, colour = INK) {
    this.doc.font(name).fontSize(size).fillColor(colour);
    return this.doc;
  }

  /** A paragraph over the content width (may flow onto the next page). */
  para(text: string, o: { size?: number; colour?: string; bold?: boolean; mono?: boolean; x?: number; width?: number } = {}) {
    const x = o.x ?? M.left;
    const width = o.width ?? CONTENT - (x - M.left);
    this.font(o.mono ? 'Mono' : o.bold ? 'Sans-Bold' : 'Sans', o.size ?? 10, o.colour);
    this.need(3 * (o.size ?? 10)); // at least a couple of lines here; longer text flows onto the next page
    this.doc.text(text, x, this.doc.y, { width, lineGap: 1.5 });
  }

  heading(text: string) {
    this.need(60);
    this.gap(10);
    this.font('Sans-Bold', 13, TEAL).text(text, M.left, this.doc.y, { width: CONTENT });
    const y = this.doc.y + 2;
    this.doc.moveTo(M.left, y).lineTo(M.left + CONTENT, y).lineWidth(0.8).strokeColor(TEAL).stroke();
    this.doc.y = y + 8;
  }

  /** Label/value pairs laid out in `columns` columns. */
  facts(pairs: [string, string][], columns = 2) {
    const colWidth = CONTENT / columns;
    for (let i = 0; i < pairs.length; i += columns) {
      const row = pairs.slice(i, i + columns);
      const heights = row.map(([label, value]) => {
        this.font('Sans', 7.5);
        const lh = this.textHeight(label.toUpperCase(), colWidth - 10 - label.length * 0.4);
        this.font('Sans', 10);
        return lh + this.textHeight(value || '—', colWidth - 10) + 6;
      });
      const h = Math.max(...heights);
      this.need(h);
      const top = this.doc.y;
      row.forEach(([label, value], c) => {
        const x = M.left + c * colWidth;
        this.font('Sans', 7.5, MUTED).text(label.toUpperCase(), x, top, { width: colWidth - 10, characterSpacing: 0.4 });
        this.font('Sans', 10, INK).text(value || '—', x, this.doc.y + 1, { width: colWidth - 10 });
      });
      this.doc.y = top + h;
    }
  }

  /** A table: header on a tinted band, rows split only between rows, the header repeated after a page break. */
  table(columns: { header: string; width: number }[], rows: CellLike[][], o: { size?: number } = {}) {
    const size = o.size ?? 9;
    const pad = 4;
    const total = columns.reduce((n, c) => n + c.width, 0);
    const widths = columns.map((c) => (c.width / total) * CONTENT);
    const xs = widths.map((_, i) => M.left + widths.slice(0, i).reduce((n, w) => n + w, 0));
    const cellHeight = (c: Cell, w: number) => {
      this.font(c.mono ? 'Mono' : c.bold ? 'Sans-Bold' : 'Sans', c.mono ? size - 1 : size);
      return this.textHeight(c.text || ' ', w - 2 * pad - (c.marker ? 10 : 0), 1);
    };
    const drawHeader = () => {
      const h = Math.max(...columns.map((c, i) => cellHeight({ text: c.header, bold: true }, widths[i]!))) + 2 * pad;
      const top = this.doc.y;
      this.doc.rect(M.left, top, CONTENT, h).fill(BAND);
      columns.forEach((c, i) => this.font('Sans-Bold', size, INK).text(c.header, xs[i]! + pad, top + pad, { width: widths[i]! - 2 * pad, lineGap: 1 }));
      this.doc.y = top + h;
    };
    const headerHeight = size + 2 * pad + 4;
    this.need(headerHeight + size * 2 + 2 * pad);
    drawHeader();
    for (const raw of rows) {
      const cells = raw.map(cell);
      const h = Math.max(...cells.map((c, i) => cellHeight(c, widths[i]!))) + 2 * pad;
      if (this.doc.y + h > BOTTOM) {
        this.doc.addPage();
        this.doc.y = M.top;
        drawHeader();
      }
      const top = this.doc.y;
      cells.forEach((c, i) => {
        let x = xs[i]! + pad;
        if (c.marker) {
          this.doc.rect(x, top + pad + size * 0.22, size * 0.72, size * 0.72).fill(c.marker);
          x += 10;
        }
        this.font(c.mono ? 'Mono' : c.bold ? 'Sans-Bold' : 'Sans', c.mono ? size - 1 : size, INK).text(c.text, x, top + pad, {
          width: widths[i]! - 2 * pad - (c.marker ? 10 : 0),
          lineGap: 1,
        });
      });
      this.doc.y = top + h;
      this.doc.moveTo(M.left, this.doc.y).lineTo(M.left + CONTENT, this.doc.y).lineWidth(0.4).strokeColor(RULE).stroke();
    }
    this.gap(4);
  }

  /** One caution with its ISO 3864 colour square, ISO 7010 code and words. */
  caution(c: Caution, x = M.left) {
    const style = CAUTION_STYLE[c.level];
    const label = `${style.word}${c.code ? ` · ${c.code}` : ''}: `;
    const width = CONTENT - (x - M.left) - 16;
    this.font('Sans', 9);
    const h = this.doc.heightOfString(label + c.text, { width }) + 3;
    this.need(h);
    const top = this.doc.y;
    this.doc.rect(x, top + 1.5, 9, 9).fill(style.colour);
    if (c.level === 'warning') this.doc.rect(x, top + 1.5, 9, 9).lineWidth(0.6).strokeColor('#000000').stroke();
    this.font('Sans-Bold', 9).text(label, x + 14, top, { width, continued: true });
    this.font('Sans', 9).text(c.text);
    this.doc.y = Math.max(this.doc.y, top + h);
  }
}

function valueText(input: StepInput, value: unknown): string {
  if (value === undefined || value === null || value === '') return '—';
  switch (input.type) {
    case 'number':
      return typeof value === 'number' ? `${fixed(value, input.decimals)} ${input.unit}` : String(value);
    case 'choice':
      return input.options.find((o) => o.value === value)?.label ?? String(value);
    case 'yesno':
      return value === true ? 'Yes' : value === false ? 'No' : String(value);
    case 'photo': {
      const n = Array.isArray(value) ? value.length : 0;
      return n === 0 ? 'No photo' : `${n} photo${n === 1 ? '' : 's'}, shown below`;
    }
    default:
      return String(value);
  }
}

function header(l: Layout) {
  const { doc, data } = l;
  const r = data.record;
  const top = M.top - 20;
  l.font('Sans-Bold', 9, TEAL).text(data.workshopName.toUpperCase(), M.left, top, { width: CONTENT - 150, characterSpacing: 0.6 });
  l.font('Sans', 20, INK).text(data.procedure.title, M.left, doc.y + 6, { width: CONTENT - 150 });
  l.font('Sans', 10, MUTED).text(`Set-up record · version ${data.procedure.version} of “${data.procedure.key}”`, M.left, doc.y + 2, { width: CONTENT - 150 });
  const textBottom = doc.y;

  // The result panel: ISO 3864 green for a pass, red for a failure.
  const boxX = M.left + CONTENT - 140;
  const colour = r.result === 'passed' ? SAFETY.safe : r.result === 'failed' ? SAFETY.prohibition : MUTED;
  doc.rect(boxX, top, 140, 62).fill(colour);
  l.font('Sans', 8, '#ffffff').text('RESULT', boxX + 10, top + 8, { width: 120, characterSpacing: 0.6 });
  l.font('Sans-Bold', 20, '#ffffff').text(resultLabel(r.result), boxX + 10, top + 19, { width: 120 });
  l.font('Sans', 9, '#ffffff').text(statusLabel(r.status), boxX + 10, top + 45, { width: 120 });
  doc.y = Math.max(textBottom, top + 62) + 12;
}

function summary(l: Layout) {
  const { data } = l;
  const r = data.record;
  const names = (meaning: keyof typeof SIGNATURE_MEANINGS) => [...new Set(data.signatures.filter((s) => s.meaning === meaning).map((s) => s.printedName))].join(', ');
  l.facts([
    ['Machine', data.machine.name],
    ['Asset tag', data.machine.assetTag],
    ['Model', data.machine.model],
    ['Location', data.machine.location],
    ['Procedure', `${data.procedure.title}, version ${data.procedure.version}`],
    ['Procedure key', data.procedure.key],
    ['Started', `${l.time(r.createdAt)} by ${data.startedBy}`],
    ['Finished', l.time(r.finishedAt)],
    ['Performed by', names('performed')],
    ['Witnessed by', names('witnessed')],
    ['Approved by', names('approved')],
    ['Signed off', l.time(r.signedAt)],
    ['State', statusLabel(r.status)],
    ['Result', resultLabel(r.result)],
  ]);
  l.facts(
    [
      ['Record', r.id],
      ['Procedure checksum (SHA-256)', data.procedure.checksum],
    ],
    1,
  );
  if (r.voidReason) l.para(`Voided: ${r.voidReason}`, { bold: true });
}

function signatures(l: Layout) {
  const { data } = l;
  l.heading('Signatures');
  if (!data.signatures.length) {
    l.para('No signatures yet.', { colour: MUTED });
    return;
  }
  const stepTitle = (id: string | null) => (id ? (data.procedure.body.steps.find((s) => s.id === id)?.title ?? id) : 'The whole record');
  l.table(
    [
      { header: 'Meaning', width: 1.15 },
      { header: 'Printed name', width: 1.55 },
      { header: 'Date and time', width: 2 },
      { header: 'For', width: 1.5 },
    ],
    data.signatures.map((s) => [{ text: SIGNATURE_MEANINGS[s.meaning], bold: true }, s.printedName, l.time(s.signedAt), stepTitle(s.stepId)]),
  );
  l.para(`Each signature was made by its signer entering their own password. Times are in the workshop’s time zone (${data.timeZone}), with its offset from UTC.`, {
    size: 8,
    colour: MUTED,
  });
}

function cautions(l: Layout) {
  const body = l.data.procedure.body;
  l.heading('Cautions this procedure carries');
  if (body.ppe.length) {
    l.para('Protective equipment', { bold: true, size: 9.5 });
    l.gap(2);
    for (const c of body.ppe) l.caution(c);
    l.gap(4);
  }
  l.para('Hazards', { bold: true, size: 9.5 });
  l.para(body.hazards.map((h) => `• ${h}`).join('\n'), { size: 9 });
  const stepCautions = body.steps.filter((s) => s.cautions.length).length;
  if (stepCautions) l.para(`${stepCautions} step${stepCautions === 1 ? ' carries' : 's carry'} cautions of their own, printed above their readings below.`, { size: 9, colour: MUTED });
  l.gap(6);
  // The note sits in a ruled box so it is not mistaken for a step's text.
  l.font('Sans', 9);
  const h = l.doc.heightOfString(SAFETY_NOTE, { width: CONTENT - 20 }) + 14;
  l.need(h);
  const top = l.y;
  l.doc.rect(M.left, top, CONTENT, h).lineWidth(0.8).strokeColor(INK).stroke();
  l.font('Sans', 9, INK).text(SAFETY_NOTE, M.left + 10, top + 7, { width: CONTENT - 20 });
  l.doc.y = top + h + 4;
}

function steps(l: Layout) {
  const { data, doc } = l;
  l.heading('Steps, readings and evidence');
  const total = data.procedure.body.steps.length;
  data.procedure.body.steps.forEach((step, index) => {
    l.need(90);
    l.gap(4);
    // Step band
    const top = l.y;
    const badge = step.powered ? 'Power on — witness needed' : '';
    l.font('Sans-Bold', 10.5);
    const titleWidth = CONTENT - 16 - (badge ? 160 : 0);
    const titleText = `${index + 1} of ${total} · ${step.title}`;
    const bandH = Math.max(doc.heightOfString(titleText, { width: titleWidth }), 12) + 16;
    doc.rect(M.left, top, CONTENT, bandH).fill(BAND);
    l.font('Sans-Bold', 10.5, INK).text(titleText, M.left + 8, top + 4, { width: titleWidth });
    l.font('Sans', 7.5, MUTED).text(STEP_KIND_LABELS[step.kind].toUpperCase(), M.left + 8, doc.y, { width: titleWidth, characterSpacing: 0.4 });
    if (badge) {
      // ISO 3864 yellow with black: work done with power on.
      const bx = M.left + CONTENT - 158;
      doc.rect(bx, top + (bandH - 16) / 2, 150, 16).fill(SAFETY.warning);
      l.font('Sans-Bold', 8, '#000000').text(badge, bx, top + (bandH - 16) / 2 + 4, { width: 150, align: 'center' });
    }
    doc.y = top + bandH + 5;

    for (const c of step.cautions) l.caution(c);
    if (step.cautions.length) l.gap(2);
    l.para(step.instruction, { size: 8.5, colour: MUTED });
    l.gap(4);

    const attempts = data.entries.filter((e) => e.stepId === step.id).sort((a, b) => a.attempt - b.attempt);
    if (!attempts.length) {
      l.para('Not done.', { bold: true, size: 9 });
      return;
    }
    for (const entry of attempts) {
      const counts = entry.attempt === attempts[attempts.length - 1]!.attempt;
      const title =
        attempts.length > 1
          ? `Attempt ${entry.attempt} of ${attempts.length} — ${counts ? 'the one that counts' : 'superseded by a later attempt'}`
          : `Attempt ${entry.attempt}`;
      l.need(50);
      l.font('Sans-Bold', 9, INK).text(title, M.left, l.y, { width: CONTENT, continued: true });
      l.font('Sans', 9, MUTED).text(`   entered by ${entry.enteredBy} at ${l.time(entry.createdAt)} · ${entry.outcome === 'done' ? 'Done' : 'Out of limits'}`);
      l.gap(3);

      const rows: CellLike[][] = [];
      for (const input of step.inputs) {
        const judged = entry.evaluation.inputs.find((i) => i.id === input.id);
        const decimals = input.type === 'number' ? input.decimals : 2;
        rows.push([
          input.label,
          { text: valueText(input, entry.values[input.id]), bold: input.type === 'number' },
          limitsText(judged?.limits ?? undefined, decimals),
          outcomeCell(judged?.outcome ?? 'none'),
        ]);
      }
      for (const c of entry.evaluation.computed) {
        const field = step.computed.find((f) => f.id === c.id);
        const value = c.error ? `Could not work out: ${c.error.message}` : c.display;
        rows.push([`${c.label} (worked out)`, { text: value, bold: true }, limitsText(c.limits, field?.decimals ?? 2), outcomeCell(c.outcome)]);
      }
      if (rows.length) {
        l.table(
          [
            { header: 'Reading or answer', width: 2.2 },
            { header: 'Value', width: 1.6 },
            { header: 'Limits', width: 1.3 },
            { header: 'Result', width: 1.1 },
          ],
          rows,
        );
      }
      if (entry.correctiveNote) {
        l.para(`Corrective note: ${entry.correctiveNote}`, { size: 9 });
        l.gap(2);
      }
      if (entry.witnessedBy) {
        l.para(`Witnessed by ${entry.witnessedBy} at ${l.time(entry.witnessedAt)}`, { size: 9, bold: true });
        l.gap(2);
      }
      photos(l, step, entry.values);
      l.gap(4);
    }
  });
}

function photos(l: Layout, step: Step, values: Record<string, unknown>) {
  const ids = step.inputs.filter((i) => i.type === 'photo').flatMap((i) => (Array.isArray(values[i.id]) ? (values[i.id] as string[]) : []));
  if (!ids.length) return;
  const { doc } = l;
  const boxW = 112;
  const boxH = 84;
  const perRow = Math.floor((CONTENT + 10) / (boxW + 10));
  for (let i = 0; i < ids.length; i += perRow) {
    l.need(boxH + 20);
    const top = l.y;
    ids.slice(i, i + perRow).forEach((id, k) => {
      const x = M.left + k * (boxW + 10);
      const photo = l.data.photos.get(id);
      if (photo) {
        doc.image(photo.data, x, top, { fit: [boxW, boxH], align: 'center', valign: 'center' });
        doc.rect(x, top, boxW, boxH).lineWidth(0.4).strokeColor(RULE).stroke();
        l.font('Mono', 6.5, MUTED).text(`Photo ${i + k + 1} · ${photo.sha256.slice(0, 16)}`, x, top + boxH + 2, { width: boxW, lineBreak: false });
      } else {
        doc.rect(x, top, boxW, boxH).lineWidth(0.4).strokeColor(RULE).stroke();
        l.font('Sans', 8, MUTED).text('Photo not available', x + 6, top + boxH / 2 - 5, { width: boxW - 12 });
      }
    });
    doc.y = top + boxH + 14;
  }
}

function returns(l: Layout) {
  const { data } = l;
  l.heading('Sent back');
  if (!data.returns.length) {
    l.para('This record was never sent back.', { size: 9, colour: MUTED });
    return;
  }
  l.table(
    [
      { header: 'Date and time', width: 2 },
      { header: 'Sent back by', width: 1.2 },
      { header: 'Reason', width: 2.8 },
    ],
    data.returns.map((x) => [l.time(x.returnedAt), x.returnedBy, x.reason]),
  );
}

function addenda(l: Layout) {
  const { data } = l;
  l.heading('Addenda');
  if (!data.addenda.length) {
    l.para('No addenda. Corrections after sign-off are added here, signed; the record itself never changes.', { size: 9, colour: MUTED });
    return;
  }
  for (const a of data.addenda) {
    l.need(50);
    l.para(`${a.printedName} · ${l.time(a.signedAt)}`, { bold: true, size: 9 });
    l.para(a.text, { size: 9 });
    l.para(`Addendum hash ${a.addendumHash}`, { mono: true, size: 7.5, colour: MUTED });
    l.gap(6);
  }
}

function integrity(l: Layout) {
  const { data, doc } = l;
  l.heading('Integrity');
  const qrSize = 104;
  l.need(qrSize + 20);
  const top = l.y;
  const textWidth = CONTENT - qrSize - 16;
  const r = data.record;
  l.font('Sans', 7.5, MUTED).text('RECORD HASH (SHA-256 OF THE SIGNED RECORD)', M.left, top, { width: textWidth, characterSpacing: 0.4 });
  l.font('Mono', 8.5, INK).text(r.recordHash ?? 'Not signed off yet, so there is no record hash.', M.left, doc.y + 1, { width: textWidth });
  l.font('Sans', 7.5, MUTED).text('PREVIOUS HASH (THIS MACHINE’S SIGNED RECORD BEFORE IT)', M.left, doc.y + 6, { width: textWidth, characterSpacing: 0.4 });
  l.font('Mono', 8.5, INK).text(r.previousHash ?? (r.recordHash ? 'None: the first signed record of this machine.' : '—'), M.left, doc.y + 1, { width: textWidth });
  l.font('Sans', 8.5, INK).text(
    'Scan the code, or open the address below, to run a Record check: it recomputes the hash from what is stored and follows the chain to the record before it.',
    M.left,
    doc.y + 8,
    { width: textWidth },
  );
  const textBottom = doc.y;
  drawQr(doc, data.checkUrl, M.left + CONTENT - qrSize, top, qrSize);
  doc.y = Math.max(textBottom, top + qrSize) + 4;
  l.font('Mono', 8, TEAL).text(data.checkUrl, M.left, doc.y, { width: CONTENT, link: data.checkUrl });
  l.gap(6);
}

/** The QR code as vector squares (runs of dark modules merged), with its quiet zone. */
function drawQr(doc: PDFKit.PDFDocument, text: string, x: number, y: number, size: number) {
  const qr = QRCode.create(text, { errorCorrectionLevel: 'M' });
  const n = qr.modules.size;
  const cellSize = size / (n + 8);
  const origin = { x: x + 4 * cellSize, y: y + 4 * cellSize };
  doc.rect(x, y, size, size).fill('#ffffff');
  for (let row = 0; row < n; row++) {
    let run = -1;
    for (let col = 0; col <= n; col++) {
      const dark = col < n && qr.modules.get(row, col);
      if (dark && run < 0) run = col;
      if (!dark && run >= 0) {
        doc.rect(origin.x + run * cellSize, origin.y + row * cellSize, (col - run) * cellSize + 0.05, cellSize + 0.05);
        run = -1;
      }
    }
  }
  doc.fill('#000000');
}

/** Running header (after the first page) and "page x of y" footer on every page, drawn once the page count is known. */
function furniture(l: Layout) {
  const { doc, data } = l;
  const range = doc.bufferedPageRange();
  for (let i = range.start; i < range.start + range.count; i++) {
    doc.switchToPage(i);
    const bottomMargin = doc.page.margins.bottom;
    doc.page.margins.bottom = 0; // writing in the margin must not start a new page
    if (i > range.start) {
      l.font('Sans', 7.5, MUTED).text(`${data.workshopName} · ${data.procedure.title}, version ${data.procedure.version} · ${data.machine.assetTag}`, M.left, 28, {
        width: CONTENT,
        lineBreak: false,
      });
      doc.moveTo(M.left, 42).lineTo(M.left + CONTENT, 42).lineWidth(0.4).strokeColor(RULE).stroke();
    }
    const y = PAGE.height - 38;
    doc.moveTo(M.left, y - 6).lineTo(M.left + CONTENT, y - 6).lineWidth(0.4).strokeColor(RULE).stroke();
    l.font('Sans', 7.5, MUTED).text(`Setwright set-up record ${data.record.id} · ${statusLabel(data.record.status)}`, M.left, y, { width: CONTENT - 90, lineBreak: false });
    l.font('Sans-Bold', 7.5, INK).text(`Page ${i - range.start + 1} of ${range.count}`, M.left + CONTENT - 90, y, { width: 90, align: 'right', lineBreak: false });
    doc.page.margins.bottom = bottomMargin;
  }
}

/** Render one record to PDF bytes. */
export function renderRecordPdf(data: RecordPdfData): Promise<Buffer> {
  const l = new Layout(data);
  const chunks: Buffer[] = [];
  const done = new Promise<Buffer>((ok, fail) => {
    l.doc.on('data', (c: Buffer) => chunks.push(c));
    l.doc.on('end', () => ok(Buffer.concat(chunks)));
    l.doc.on('error', fail);
  });
  header(l);
  summary(l);
  signatures(l);
  cautions(l);
  steps(l);
  returns(l);
  addenda(l);
  integrity(l);
  l.gap(6);
  l.para(SAFETY_NOTE, { size: 8, colour: MUTED });
  furniture(l);
  l.doc.end();
  return done;
}
