import type { Outcome } from '../../../procedures/engine';
import type { RecordResult, RecordStatus } from '../../contracts/records';
import { RECORD_STATUS_LABELS } from '../../contracts/records';

const formatters = new Map<string, Intl.DateTimeFormat>();

function formatter(timeZone: string): Intl.DateTimeFormat {
  let f = formatters.get(timeZone);
  if (!f) {
    f = new Intl.DateTimeFormat('en-GB', {
      timeZone,
      hourCycle: 'h23',
      year: 'numeric',
      month: '2-digit',
      day: '2-digit',
      hour: '2-digit',
      minute: '2-digit',
      second: '2-digit',
    });
    formatters.set(timeZone, f);
  }
  return f;
}

/**
 * A moment as printed on records: local date and time in the workshop's zone with its offset from UTC,
 * e.g. "2026-12-02 14:05:09 UTC+01:00", so nobody has to guess which clock it was.
 */
export function printedTime(at: Date | string, timeZone: string): string {
  const date = typeof at === 'string' ? new Date(at) : at;
  const parts = Object.fromEntries(formatter(timeZone).formatToParts(date).map((p) => [p.type, p.value]));
  const local = Date.UTC(+parts['year']!, +parts['month']! - 1, +parts['day']!, +parts['hour']!, +parts['minute']!, +parts['second']!);
  const offsetMinutes = Math.round((local - Math.floor(date.getTime() / 1000) * 1000) / 60000);
  const sign = offsetMinutes < 0 ? '-' : '+';
  const abs = Math.abs(offsetMinutes);
  const offset = `${sign}${String(Math.floor(abs / 60)).padStart(2, '0')}:${String(abs % 60).padStart(2, '0')}`;
  return `${parts['year']}-${parts['month']}-${parts['day']} ${parts['hour']}:${parts['minute']}:${parts['second']} UTC${offset}`;
}

export const RESULT_LABELS: Record<RecordResult, string> = { passed: 'Passed', failed: 'Failed' };

export function resultLabel(result: RecordResult | null): string {
  return result ? RESULT_LABELS[result] : 'No result yet';
}

export function statusLabel(status: RecordStatus): string {
  return RECORD_STATUS_LABELS[status];
}

/** How a reading's or computed value's judgement is printed. */
export const OUTCOME_LABELS: Record<Outcome, string> = {
  pass: 'Pass',
  fail: 'Out of limits',
  warn: 'Warning',
  missing: 'Not entered',
  none: '—',
};

/** A number with at most `decimals` places, as the runner shows it. */
export function fixed(value: number, decimals: number): string {
  return value.toFixed(decimals);
}

/** "700–900 kgf", "at least 0.08 mm", "at most 12 mm". */
export function limitsText(limits: { min?: number; max?: number; unit?: string } | undefined, decimals = 2): string {
  if (!limits || (limits.min === undefined && limits.max === undefined)) return '—';
  const n = (v: number) => String(Number(v.toFixed(Math.max(decimals, 0))));
  const u = limits.unit ? ` ${limits.unit}` : '';
  if (limits.min !== undefined && limits.max !== undefined) return `${n(limits.min)}–${n(limits.max)}${u}`;
  if (limits.min !== undefined) return `at least ${n(limits.min)}${u}`;
  return `at most ${n(limits.max!)}${u}`;
}

/** A file name that is safe in a Content-Disposition header and on any file system. */
export function safeFileName(parts: string[], extension: string): string {
  const stem = parts
    .join('-')
    .normalize('NFKD')
    .replace(/[^A-Za-z0-9._-]+/g, '-')
    .replace(/-+/g, '-')
    .replace(/^[-.]+|[-.]+$/g, '')
    .slice(0, 100);
  return `${stem || 'record'}.${extension}`;
}
