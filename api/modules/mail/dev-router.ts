import { readdir, readFile } from 'node:fs/promises';
import { join } from 'node:path';
import { Router } from 'express';
import { simpleParser, type AddressObject } from 'mailparser';
import type { StandInMessage } from '../../contracts/people';
import { allow } from '../../lib/access';

const NEWEST = 100;

function addresses(field: AddressObject | AddressObject[] | undefined): string[] {
  const list = field ? ([] as AddressObject[]).concat(field) : [];
  return list.flatMap((a) => a.value.map((v) => (v.name ? `${v.name} <${v.address}>` : (v.address ?? ''))));
}

/** The newest messages the local SMTP stand-in has stored (one .eml file each), newest first. */
export async function readStandInMailbox(directory: string, limit = NEWEST): Promise<StandInMessage[]> {
  const files = (await readdir(directory).catch(() => [] as string[])).filter((f) => f.endsWith('.eml')).sort().reverse().slice(0, limit);
  const messages: StandInMessage[] = [];
  for (const file of files) {
    const parsed = await simpleParser(await readFile(join(directory, file)));
    const text = parsed.text ?? '';
    messages.push({
      id: file.replace(/\.eml$/, ''),
      receivedAt: (parsed.date ?? new Date(0)).toISOString(),
      from: addresses(parsed.from)[0] ?? '',
      to: addresses(parsed.to),
      subject: parsed.subject ?? '',
      text,
      links: [...new Set(text.match(/https?:\/\/[^\s<>"]+/g) ?? [])],
    });
  }
  return messages;
}

/** GET /api/dev/mail — what the stand-in received, for workshop admins; only mounted outside production. */
export function devMailRouter(directory: string): Router {
  const router = Router();
  router.get('/', allow('workshop_admin'), async (_req, res) => {
    res.json(await readStandInMailbox(directory));
  });
  return router;
}
