import { createHash } from 'node:crypto';
import { Readable, Transform } from 'node:stream';
import archiver, { type Archiver } from 'archiver';
import type { Logger } from 'pino';
import type { Sequelize } from 'sequelize';
import type { ArchiveFilter, ArchivePage, ArchiveQuery } from '../../contracts/archive';
import { audit } from '../../lib/audit';
import { AppError } from '../../lib/errors';
import type { Person } from '../people/repository';
import { RESULT_LABELS, safeFileName } from '../pdf/format';
import type { PdfService } from '../pdf/service';
import { ArchiveRepository, type ArchiveRow } from './repository';

/** One file of an evidence pack, as its manifest lists it. */
interface PackFile {
  path: string;
  sha256: string;
  bytes: number;
  recordId?: string;
  recordHash?: string | null;
}

export const INDEX_COLUMNS = [
  'record id',
  'machine',
  'asset tag',
  'procedure',
  'version',
  'performed by',
  'approved by',
  'signed at (UTC)',
  'result',
  'record hash',
  'previous hash',
  'pdf file',
] as const;

const README = `Setwright evidence pack

index.csv      one row per signed-off record in this pack
records/       each record's PDF, as stored when it was signed (with any signed addenda)
manifest.json  the SHA-256 of every other file in this pack, and each record's hash

To check a file, compute its SHA-256 and compare it with manifest.json. To check a record itself,
open its Record check page (the QR code on its PDF): it recomputes the record hash from what is stored.
`;

/** A CSV field: quoted when it needs to be, and never read as a formula by a spreadsheet. */
export function csvField(value: string | number | null | undefined): string {
  let text = value === null || value === undefined ? '' : String(value);
  if (/^[=+\-@\t\r]/.test(text)) text = `'${text}`;
  return /[",\r\n]/.test(text) ? `"${text.replace(/"/g, '""')}"` : text;
}

const csvLine = (fields: (string | number | null | undefined)[]) => fields.map(csvField).join(',') + '\r\n';

/** Where a record's PDF sits inside the pack. */
function pdfPath(row: ArchiveRow): string {
  return `records/${safeFileName([(row.signedAt ?? '').slice(0, 10), row.machine.assetTag, row.procedure.key, `v${row.procedure.version}`, row.id], 'pdf')}`;
}

/** A pass-through that hashes and counts what flows through it. */
function hashing(): Transform & { digest(): { sha256: string; bytes: number } } {
  const hash = createHash('sha256');
  let bytes = 0;
  const t = new Transform({
    transform(chunk: Buffer, _enc, done) {
      hash.update(chunk);
      bytes += chunk.length;
      done(null, chunk);
    },
  });
  return Object.assign(t, { digest: () => ({ sha256: hash.digest('hex'), bytes }) });
}

/** The auditor's archive: the Records list with paging and filters, and evidence packs. */
export class ArchiveService {
  private readonly repo: ArchiveRepository;

  constructor(
    sequelize: Sequelize,
    private readonly pdfs: PdfService,
    private readonly workshopName: string,
    private readonly logger: Logger,
  ) {
    this.repo = new ArchiveRepository(sequelize);
  }

  page(query: ArchiveQuery): Promise<ArchivePage> {
    return this.repo.page(query);
  }

  /**
   * An evidence pack: a zip of every signed-off record the filter selects (as it stood when the export began),
   * built while it is sent. Returns the record count at once, so it can go in a header before the first byte.
   */
  async evidencePack(person: Person, filter: ArchiveFilter): Promise<{ count: number; fileName: string; stream: Readable }> {
    if (filter.status && filter.status !== 'signed_off') {
      throw AppError.badRequest('An evidence pack holds signed-off records only.', [
        { pointer: '#/query/status', detail: 'Leave the state out, or choose signed_off.' },
      ]);
    }
    const until = new Date();
    const count = await this.repo.countSigned(filter, until);
    await audit('records.exported', person.id, null, { filter, count, until: until.toISOString() });
    const zip = archiver('zip', { zlib: { level: 6 } });
    zip.on('warning', (err) => this.logger.warn({ err }, 'evidence pack warning'));
    this.fill(zip, filter, until, person).catch((err: unknown) => {
      if (zip.destroyed) return; // the client stopped the download; nothing more to do
      this.logger.error({ err }, 'an evidence pack failed while it was being built');
      zip.abort();
      zip.destroy(err instanceof Error ? err : new Error(String(err)));
    });
    const range = [filter.from?.slice(0, 10) ?? 'start', 'to', filter.to?.slice(0, 10) ?? until.toISOString().slice(0, 10)];
    return { count, fileName: safeFileName(['evidence-pack', ...range, `${count}-records`], 'zip'), stream: zip };
  }

  /** Add one entry and wait until the zip has taken all of it (one source open at a time keeps memory flat). */
  private add(zip: Archiver, source: Readable | Buffer, name: string, store: boolean, date: Date): Promise<PackFile> {
    const counter = hashing();
    const input = Buffer.isBuffer(source) ? Readable.from([source]) : source;
    return new Promise((ok, fail) => {
      const done = (err?: Error) => {
        zip.off('entry', onEntry);
        zip.off('error', done);
        zip.off('close', onClose);
        if (!err) return ok({ path: name, ...counter.digest() });
        input.destroy(); // never leave a store connection open
        fail(err);
      };
      const onEntry = (entry: archiver.EntryData) => {
        if (entry.name === name) done();
      };
      // The response went away (the client stopped the download): stop reading this file.
      const onClose = () => done(new Error('the evidence pack was closed before it was finished'));
      zip.on('entry', onEntry);
      zip.once('error', done);
      zip.once('close', onClose);
      input.once('error', (err) => counter.destroy(err));
      counter.once('error', done);
      input.pipe(counter);
      zip.append(counter, { name, store, date });
    });
  }

  private async *indexLines(filter: ArchiveFilter, until: Date): AsyncGenerator<string> {
    yield csvLine([...INDEX_COLUMNS]);
    for await (const batch of this.repo.signedInBatches(filter, until)) {
      yield batch
        .map((r) =>
          csvLine([
            r.id,
            r.machine.name,
            r.machine.assetTag,
            r.procedure.title,
            r.procedure.version,
            r.performedBy,
            r.approvedBy,
            r.signedAt,
            r.result ? RESULT_LABELS[r.result] : '',
            r.recordHash,
            r.previousHash,
            pdfPath(r),
          ]),
        )
        .join('');
    }
  }

  private async fill(zip: Archiver, filter: ArchiveFilter, until: Date, person: Person): Promise<void> {
    const files: PackFile[] = [];
    files.push(await this.add(zip, Buffer.from(README, 'utf8'), 'README.txt', false, until));
    files.push(await this.add(zip, Readable.from(this.indexLines(filter, until)), 'index.csv', false, until));
    for await (const batch of this.repo.signedInBatches(filter, until)) {
      for (const row of batch) {
        if (zip.destroyed) return; // the client went away
        const pdf = await this.pdfs.open(row.id);
        const file = await this.add(zip, pdf.body, pdfPath(row), true, new Date(row.signedAt ?? until)); // PDFs are compressed already
        files.push({ ...file, recordId: row.id, recordHash: row.recordHash });
      }
    }
    const manifest = {
      schema: 'setwright.evidence-pack/1',
      workshop: this.workshopName,
      exportedAt: new Date().toISOString(),
      exportedBy: person.displayName,
      recordsSignedUntil: until.toISOString(),
      filter,
      recordCount: files.filter((f) => f.recordId).length,
      files: files.map(({ path, sha256, bytes }) => ({ path, sha256, bytes })),
      records: files.filter((f) => f.recordId).map((f) => ({ id: f.recordId, recordHash: f.recordHash, file: f.path })),
    };
    await this.add(zip, Buffer.from(JSON.stringify(manifest, null, 2) + '\n', 'utf8'), 'manifest.json', false, until);
    await zip.finalize();
  }
}
