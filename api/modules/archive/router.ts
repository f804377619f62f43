import { pipeline } from 'node:stream/promises';
import { Router } from 'express';
import { archiveFilterSchema, archiveQuerySchema, RECORD_COUNT_HEADER, type ArchiveFilter, type ArchiveQuery } from '../../contracts/archive';
import type { Role } from '../../contracts/roles';
import { allow } from '../../lib/access';
import { validate, validated } from '../../lib/validate';
import type { ArchiveService } from './service';

/** Who may search the archive and export from it: the same people who may read every record. */
export const ARCHIVE_READERS: readonly Role[] = ['auditor', 'competent_person', 'workshop_admin'];

/** The archive: the Records list (paged, sorted, filtered on the server) and evidence packs. Read-only. */
export function archiveRouter(archive: ArchiveService): Router {
  const router = Router();

  router.get('/records', allow(...ARCHIVE_READERS), validate({ query: archiveQuerySchema }), async (_req, res) => {
    res.json(await archive.page(validated<ArchiveQuery>(res, 'query')));
  });

  router.get('/evidence-pack', allow(...ARCHIVE_READERS), validate({ query: archiveFilterSchema }), async (req, res) => {
    const pack = await archive.evidencePack(req.user!, validated<ArchiveFilter>(res, 'query'));
    res.set({
      'Content-Type': 'application/zip',
      'Content-Disposition': `attachment; filename="${pack.fileName}"`,
      'X-Content-Type-Options': 'nosniff',
      [RECORD_COUNT_HEADER]: String(pack.count),
    });
    res.flushHeaders(); // the count reaches the client before the first record is packed
    try {
      await pipeline(pack.stream, res);
    } catch (err) {
      // A client that stops the download is not a server error; the pack stops being built.
      if ((err as { code?: string }).code === 'ERR_STREAM_PREMATURE_CLOSE' || res.destroyed) return;
      throw err;
    }
  });

  return router;
}
