import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { simpleParser } from 'mailparser';

/** One message as the SMTP stand-in stored it, read back from its .eml file. */
export interface StoredMail {
  file: string;
  messageId: string;
  to: string[];
  from: string;
  subject: string;
  text: string;
  html: string;
}

/** Every .eml file in the stand-in's folder, parsed (the real MIME parser, not our own code). */
export async function readMailbox(directory: string): Promise<StoredMail[]> {
  let files: string[];
  try {
    files = readdirSync(directory).filter((f) => f.endsWith('.eml')).sort();
  } catch {
    return [];
  }
  const out: StoredMail[] = [];
  for (const file of files) {
    const parsed = await simpleParser(readFileSync(join(directory, file)));
    const to = ([] as { value: { address?: string }[] }[]).concat(parsed.to ?? []).flatMap((a) => a.value.map((v) => v.address ?? ''));
    out.push({
      file,
      messageId: parsed.messageId ?? '',
      to,
      from: parsed.from?.value[0]?.address ?? '',
      subject: parsed.subject ?? '',
      text: parsed.text ?? '',
      html: typeof parsed.html === 'string' ? parsed.html : '',
    });
  }
  return out;
}

/** Wait until `check` returns something truthy, polling; fails with `what` after `ms`. */
export async function waitFor<T>(what: string, check: () => Promise<T | undefined | null | false>, ms = 30_000): Promise<T> {
  const until = Date.now() + ms;
  for (;;) {
    const value = await check();
    if (value) return value;
    if (Date.now() > until) throw new Error(`gave up waiting: ${what}`);
    await new Promise((resolve) => setTimeout(resolve, 250));
  }
}

/** The set-password token in an invitation e-mail's link. */
export function tokenFrom(text: string): string {
  const match = /\/set-password\?token=([A-Za-z0-9_-]+)/.exec(text);
  if (!match) throw new Error(`no set-password link in:\n${text}`);
  return match[1]!;
}
