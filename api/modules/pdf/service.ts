import type { Readable } from 'node:stream';
import type { Logger } from 'pino';
import { Op } from 'sequelize';
import { AppError } from '../../lib/errors';
import type { ObjectStore } from '../../lib/object-store';
import { Machine } from '../machines/model';
import { ProcedureVersion } from '../procedures/model';
import { SetupRecord } from '../records/model';
import { RecordAddendum } from '../signoff/model';
import { loadRecordPdfData } from './data';
import { safeFileName } from './format';
import { renderRecordPdf } from './render';

export interface PdfSettings {
  workshopName: string;
  timeZone: string;
  /** The app's own address, for the QR code's link to the Record check page. */
  publicUrl: string;
}

/** A stored PDF ready to send: a stream from the store, or bytes just rendered. */
export interface PdfFile {
  key: string;
  fileName: string;
  length: number | undefined;
  body: Readable | Buffer;
}

const PDF = 'application/pdf';

/**
 * Keys are ours: the PDF made at sign-off is `records/<id>.pdf` (the key the record keeps, set once);
 * addenda come later and never change the signed record, so a copy with them is kept beside it,
 * one per number of addenda (addenda are only ever added, so each copy never changes either).
 */
export function pdfKey(recordId: string, addenda: number): string {
  return addenda === 0 ? `records/${recordId}.pdf` : `records/${recordId}/with-${addenda}-addenda.pdf`;
}

/** Record PDFs: rendered once, kept in the object store, handed out as they were stored. */
export class PdfService {
  constructor(
    private readonly store: ObjectStore,
    private readonly settings: PdfSettings,
    private readonly logger: Logger,
  ) {}

  /** Render a record as it stands (with or without its addenda), without storing it. */
  async render(recordId: string, withAddenda = true): Promise<Buffer> {
    const data = await loadRecordPdfData(recordId, this.store, this.settings);
    if (!withAddenda) data.addenda = [];
    return renderRecordPdf(data);
  }

  /**
   * Called after a sign-off commits: render and keep the signed PDF. A failure is logged and never undoes
   * the signature; the download renders it on demand instead.
   */
  async afterSignOff(recordId: string): Promise<void> {
    try {
      const record = await SetupRecord.findByPk(recordId);
      if (record?.status === 'signed_off' && !record.pdfKey) await this.storeSigned(record.id);
    } catch (err) {
      this.logger.error({ err, record: recordId }, 'could not render or store the signed record’s PDF; it will be made on first download');
    }
  }

  /** The file name a download is saved as: machine, procedure, version, date and the record's short id. */
  fileName(record: SetupRecord & { machine?: Machine; procedureVersion?: ProcedureVersion }): string {
    const when = (record.signedAt ?? record.createdAt).toISOString().slice(0, 10);
    return safeFileName(
      [record.machine?.assetTag ?? 'machine', record.procedureVersion?.key ?? 'procedure', `v${record.procedureVersion?.version ?? ''}`, when, record.id.slice(0, 8)],
      'pdf',
    );
  }

  /** The signed record's PDF, with any addenda: from the store, or rendered and stored now when it is missing. */
  async open(recordId: string): Promise<PdfFile> {
    const record = await SetupRecord.findByPk(recordId, {
      include: [
        { model: Machine, as: 'machine' },
        { model: ProcedureVersion, as: 'procedureVersion' },
      ],
    });
    if (!record) throw AppError.notFound('There is no record with that id.');
    if (record.status !== 'signed_off') throw AppError.conflict('Only a signed-off record has a PDF. This one is not signed off yet.');
    const fileName = this.fileName(record);
    if (!record.pdfKey) await this.storeSigned(record.id);
    const addenda = await RecordAddendum.count({ where: { recordId } });
    const key = pdfKey(recordId, addenda);
    const stored = await this.store.getStream(key);
    if (stored) return { key, fileName, length: stored.contentLength, body: stored.body };
    if (addenda === 0) {
      // The key is on the record but the file is gone from the store: make it again (the same bytes, as rendering is deterministic).
      this.logger.warn({ record: recordId, key }, 'a signed record’s PDF was missing from the store; rendering it again');
    }
    const bytes = await this.render(recordId, true);
    await this.store.put(key, bytes, PDF, { record: recordId });
    return { key, fileName, length: bytes.length, body: bytes };
  }

  /** Render the PDF as signed (no addenda), keep it, and fill in the record's pdf_key (the lock allows that once). */
  private async storeSigned(recordId: string): Promise<string> {
    const key = pdfKey(recordId, 0);
    const bytes = await this.render(recordId, false);
    await this.store.put(key, bytes, PDF, { record: recordId });
    // Only where it is still empty: two renderers racing both store the same bytes, and one of them fills the key.
    await SetupRecord.update({ pdfKey: key }, { where: { id: recordId, status: 'signed_off', pdfKey: { [Op.is]: null } } });
    return key;
  }
}
