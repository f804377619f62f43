/** The words of every e-mail Setwright sends: plain text, and the same in simple HTML. */

export interface Letter {
  subject: string;
  text: string;
  html: string;
}

/** What every letter needs to know about where it comes from. */
export interface LetterContext {
  workshop: string;
  /** The app's address, without a trailing slash. */
  publicUrl: string;
  timeZone: string;
}

export function escapeHtml(value: string): string {
  return value.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);
}

/** "Tuesday 12 May 2026, 14:05 BST", in the workshop's time zone. */
export function formatWhen(at: Date, timeZone: string): string {
  const parts = new Intl.DateTimeFormat('en-GB', {
    timeZone,
    weekday: 'long',
    day: 'numeric',
    month: 'long',
    year: 'numeric',
    hour: '2-digit',
    minute: '2-digit',
    hourCycle: 'h23',
    timeZoneName: 'short',
  }).formatToParts(at);
  const get = (type: Intl.DateTimeFormatPartTypes) => parts.find((p) => p.type === type)?.value ?? '';
  return `${get('weekday')} ${get('day')} ${get('month')} ${get('year')}, ${get('hour')}:${get('minute')} ${get('timeZoneName')}`;
}

/** "Tuesday 12 May 2026". A plain date (YYYY-MM-DD) is taken as that calendar day, whatever the zone. */
export function formatDay(day: Date | string, timeZone: string): string {
  const plain = typeof day === 'string' && /^\d{4}-\d{2}-\d{2}$/.test(day);
  const at = plain ? new Date(`${day}T12:00:00Z`) : new Date(day);
  const parts = new Intl.DateTimeFormat('en-GB', { timeZone: plain ? 'UTC' : timeZone, weekday: 'long', day: 'numeric', month: 'long', year: 'numeric' }).formatToParts(at);
  const get = (type: Intl.DateTimeFormatPartTypes) => parts.find((p) => p.type === type)?.value ?? '';
  return `${get('weekday')} ${get('day')} ${get('month')} ${get('year')}`;
}

/** A paragraph of the letter: text, or text with a link. */
type Part = { p: string } | { link: string; label: string } | { quote: string } | { list: string[] };

function compose(ctx: LetterContext, subject: string, greeting: string, parts: Part[]): Letter {
  const text: string[] = [`${greeting},`, ''];
  const html: string[] = [`<p>${escapeHtml(greeting)},</p>`];
  for (const part of parts) {
    if ('p' in part) {
      text.push(part.p, '');
      html.push(`<p>${escapeHtml(part.p)}</p>`);
    } else if ('link' in part) {
      text.push(`${part.label}: ${part.link}`, '');
      html.push(`<p><a href="${escapeHtml(part.link)}">${escapeHtml(part.label)}</a></p>`);
    } else if ('quote' in part) {
      text.push(...part.quote.split('\n').map((line) => `> ${line}`), '');
      html.push(`<blockquote style="margin:0 0 1em;padding:8px 12px;border-left:4px solid #2f5f63;background:#f1f3f2">${escapeHtml(part.quote).replace(/\n/g, '<br>')}</blockquote>`);
    } else {
      text.push(...part.list.map((item) => `- ${item}`), '');
      html.push(`<ul>${part.list.map((item) => `<li>${escapeHtml(item)}</li>`).join('')}</ul>`);
    }
  }
  text.push('--', `Setwright at ${ctx.workshop}`);
  html.push(`<p style="color:#555;border-top:1px solid #ccc;padding-top:8px">Setwright at ${escapeHtml(ctx.workshop)}</p>`);
  return {
    subject,
    text: text.join('\n') + '\n',
    html: `<!doctype html><html lang="en"><head><meta charset="utf-8"><title>${escapeHtml(subject)}</title></head><body style="font-family:system-ui,sans-serif;color:#222;line-height:1.5;max-width:640px">${html.join('')}</body></html>`,
  };
}

const machineLabel = (m: { name: string; assetTag: string }) => `${m.name} (${m.assetTag})`;

export interface RecordFacts {
  id: string;
  procedureTitle: string;
  procedureVersion: number;
  machine: { id: string; name: string; assetTag: string };
  performer: string;
  result: 'passed' | 'failed' | null;
}

export function awaitingSignOff(ctx: LetterContext, to: string, r: RecordFacts): Letter {
  const result = r.result === 'failed' ? 'It finished as failed: some readings stayed out of limits.' : 'Every reading finished within its limits.';
  return compose(ctx, `To sign: ${r.procedureTitle} on ${machineLabel(r.machine)}`, `Hello ${to}`, [
    { p: `${r.performer} has finished "${r.procedureTitle}" (version ${r.procedureVersion}) on ${machineLabel(r.machine)}. The record is ready for sign-off.` },
    { p: result },
    { link: `${ctx.publicUrl}/to-sign/${r.id}`, label: 'Review and sign it' },
    { p: 'You get this because you are a competent person here. Someone other than the person who did the work must sign it off.' },
  ]);
}

export function recordReturned(ctx: LetterContext, to: string, r: RecordFacts, reviewer: string, reason: string): Letter {
  return compose(ctx, `Sent back: ${r.procedureTitle} on ${machineLabel(r.machine)}`, `Hello ${to}`, [
    { p: `${reviewer} has sent back your record of "${r.procedureTitle}" on ${machineLabel(r.machine)}. What needs correcting:` },
    { quote: reason },
    { p: 'Correct the steps named, then finish the record again. Your first version is kept beside the corrected one.' },
    { link: `${ctx.publicUrl}/records/${r.id}`, label: 'Open the record' },
  ]);
}

export function machineTaggedOut(
  ctx: LetterContext,
  to: string,
  machine: { id: string; name: string; assetTag: string; location?: string | null },
  record: { id: string; procedureTitle: string | null; performer: string | null } | null,
): Letter {
  const where = machine.location ? ` at ${machine.location}` : '';
  const why = record?.procedureTitle
    ? `It failed "${record.procedureTitle}"${record.performer ? `, done by ${record.performer}` : ''}.`
    : 'A check on it failed.';
  const parts: Part[] = [
    { p: `${machineLabel(machine)}${where} is tagged out. ${why}` },
    { p: 'Nobody may use it for cutting until a later record of that procedure passes and is signed off.' },
    { link: `${ctx.publicUrl}/machines/${machine.id}`, label: 'Open the machine' },
  ];
  if (record) parts.push({ link: `${ctx.publicUrl}/records/${record.id}`, label: 'Open the failed record' });
  return compose(ctx, `Tagged out: ${machineLabel(machine)}`, `Hello ${to}`, parts);
}

/** One procedure falling due on one machine. */
export interface DueItem {
  machine: { id: string; name: string; assetTag: string };
  procedureTitle: string;
  /** The day it falls due (YYYY-MM-DD or a date). */
  dueOn: Date | string;
  /** Why it is due, when there is more to say than the date ("after a blade change"). */
  reason?: string;
}

export function dueThisWeek(ctx: LetterContext, to: string, items: DueItem[]): Letter {
  const lines = items.map((i) => `${formatDay(i.dueOn, ctx.timeZone)}: ${i.procedureTitle} on ${machineLabel(i.machine)}${i.reason ? ` (${i.reason})` : ''}`);
  const count = items.length === 1 ? '1 procedure' : `${items.length} procedures`;
  return compose(ctx, `Due this week: ${count}`, `Hello ${to}`, [
    { p: `These procedures fall due in the next seven days:` },
    { list: lines },
    { link: `${ctx.publicUrl}/today`, label: 'See them in Today' },
  ]);
}

export function authorisationExpiring(ctx: LetterContext, to: string, procedureTitle: string, expiresOn: Date | string): Letter {
  const day = formatDay(expiresOn, ctx.timeZone);
  return compose(ctx, `Your authorisation for "${procedureTitle}" ends on ${day}`, `Hello ${to}`, [
    { p: `Your authorisation to carry out "${procedureTitle}" on your own ends on ${day}.` },
    { p: 'To keep it, do the procedure again with a competent person witnessing, and ask them to renew your authorisation.' },
    { link: `${ctx.publicUrl}/today`, label: 'Open Setwright' },
  ]);
}

export function invitation(ctx: LetterContext, to: string, invitedBy: string, roles: string[], link: string, expiresAt: Date): Letter {
  return compose(ctx, `Your Setwright account at ${ctx.workshop}`, `Hello ${to}`, [
    { p: `${invitedBy} has made you an account in Setwright, where ${ctx.workshop} keeps its bandsaw set-up records. ${roles.length > 1 ? 'Your roles' : 'Your role'}: ${roles.join(', ')}.` },
    { p: `Choose your password with the link below. It works once, until ${formatWhen(expiresAt, ctx.timeZone)}.` },
    { link, label: 'Set your password' },
    { p: 'If you were not expecting this, ignore it: nothing happens until the link is used.' },
  ]);
}
