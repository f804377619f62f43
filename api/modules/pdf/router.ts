import { pipeline } from 'node:stream/promises';
import { Router } from 'express';
import { z } from 'zod';
import { allow, ANY_ROLE } from '../../lib/access';
import { audit } from '../../lib/audit';
import { validate, validated } from '../../lib/validate';
import type { RecordService } from '../records/service';
import type { PdfService } from './service';

const idParams = z.object({ id: z.uuid({ error: 'A record id is a UUID.' }) });

/** The signed record's PDF (mounted under /records). */
export function pdfRouter(pdfs: PdfService, records: RecordService): Router {
  const router = Router();

  router.get('/:id/pdf', allow(...ANY_ROLE), validate({ params: idParams }), async (req, res) => {
    const { id } = validated<z.infer<typeof idParams>>(res, 'params');
    await records.assertReadable(req.user!, id); // the same read rule as the record itself
    const file = await pdfs.open(id);
    await audit('record.downloaded', req.user!.id, id, { key: file.key, bytes: file.length ?? null });
    res.set({
      'Content-Type': 'application/pdf',
      'Content-Disposition': `attachment; filename="${file.fileName}"`,
      'X-Content-Type-Options': 'nosniff',
    });
    if (file.length !== undefined) res.set('Content-Length', String(file.length));
    if (Buffer.isBuffer(file.body)) {
      res.end(file.body);
      return;
    }
    await pipeline(file.body, res);
  });

  return router;
}
