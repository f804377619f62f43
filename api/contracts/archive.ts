import { z } from 'zod';
import { RECORD_STATUSES, type RecordResult, type RecordStatus } from './records';

export const ARCHIVE_SORTS = ['signedAt', 'createdAt', 'machine', 'procedure', 'result'] as const;
export type ArchiveSort = (typeof ARCHIVE_SORTS)[number];
export const ARCHIVE_DATE_FIELDS = ['signedAt', 'createdAt'] as const;
export const ARCHIVE_PAGE_SIZES = [10, 25, 50, 100] as const;
export const ARCHIVE_MAX_PAGE_SIZE = 100;

/** A calendar day (taken whole) or an instant with its offset. */
const day = z.union([z.iso.date(), z.iso.datetime({ offset: true })], { error: 'Give a date as YYYY-MM-DD, or a date and time with its offset.' });

/** Which records: the filters the Records list and the evidence pack share. */
export const archiveFilterSchema = z
  .object({
    machineId: z.uuid({ error: 'A machine id is a UUID.' }).optional(),
    procedure: z
      .string()
      .regex(/^[a-z][a-z0-9-]*$/, 'A procedure key is lower-case letters, digits and hyphens.')
      .max(60)
      .optional(),
    status: z.enum(RECORD_STATUSES, { error: `A state is one of: ${RECORD_STATUSES.join(', ')}.` }).optional(),
    result: z.enum(['passed', 'failed'], { error: 'A result is passed or failed.' }).optional(),
    /** Part of a name or e-mail of whoever performed or signed the record. */
    person: z.string().trim().min(2, 'Type at least two letters of a name.').max(120).optional(),
    from: day.optional(),
    to: day.optional(),
    dateField: z.enum(ARCHIVE_DATE_FIELDS, { error: 'The dates filter signedAt or createdAt.' }).default('signedAt'),
  })
  .refine((f) => !f.from || !f.to || archiveBound(f.from, 'from') < archiveBound(f.to, 'to'), {
    path: ['to'],
    message: 'The end of the range is before its start.',
  });
export type ArchiveFilter = z.infer<typeof archiveFilterSchema>;

export const archiveQuerySchema = z.intersection(
  archiveFilterSchema,
  z.object({
    /** Counted from 0, as the paginator counts. */
    page: z.coerce.number({ error: 'The page is a whole number from 0.' }).int('The page is a whole number from 0.').min(0, 'The page is a whole number from 0.').max(100_000).default(0),
    size: z.coerce
      .number({ error: `The page size is 1 to ${ARCHIVE_MAX_PAGE_SIZE}.` })
      .int(`The page size is 1 to ${ARCHIVE_MAX_PAGE_SIZE}.`)
      .min(1, `The page size is 1 to ${ARCHIVE_MAX_PAGE_SIZE}.`)
      .max(ARCHIVE_MAX_PAGE_SIZE, `The page size is 1 to ${ARCHIVE_MAX_PAGE_SIZE}.`)
      .default(25),
    sort: z.enum(ARCHIVE_SORTS, { error: `Sort by one of: ${ARCHIVE_SORTS.join(', ')}.` }).default('signedAt'),
    dir: z.enum(['asc', 'desc'], { error: 'The direction is asc or desc.' }).default('desc'),
  }),
);
export type ArchiveQuery = z.infer<typeof archiveQuerySchema>;

/**
 * The instant a bound stands for: a bare date "from" starts at 00:00 UTC that day; a bare date "to"
 * runs to the end of that day (the next midnight, exclusive).
 */
export function archiveBound(value: string, which: 'from' | 'to'): number {
  if (/^\d{4}-\d{2}-\d{2}$/.test(value)) {
    const start = Date.parse(`${value}T00:00:00Z`);
    return which === 'from' ? start : start + 86_400_000;
  }
  return Date.parse(value);
}

export interface ArchiveItem {
  id: string;
  status: RecordStatus;
  result: RecordResult | null;
  machine: { id: string; name: string; assetTag: string };
  procedure: { key: string; version: number; title: string };
  performedBy: string;
  approvedBy: string | null;
  createdAt: string;
  signedAt: string | null;
  recordHash: string | null;
}

export interface ArchivePage {
  items: ArchiveItem[];
  total: number;
}

/** The header that carries the number of records in an evidence pack, sent before its first byte. */
export const RECORD_COUNT_HEADER = 'X-Record-Count';
