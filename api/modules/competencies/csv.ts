import { AUTHORISATION_STATE_LABELS, MATRIX_CSV_COLUMNS, type CompetencyMatrix } from '../../contracts/competencies';
import { ROLE_LABELS } from '../../contracts/roles';
import { workshopDate } from './service';

/**
 * One CSV field (RFC 4180): quoted when it holds a comma, quote or line break. A field that a
 * spreadsheet would read as a formula (= + - @, tab, carriage return) starts with an apostrophe.
 */
export function csvField(value: string | number | null | undefined): string {
  let text = value === null || value === undefined ? '' : String(value);
  if (/^[=+\-@\t\r]/.test(text)) text = `'${text}`;
  return /[",\r\n]/.test(text) ? `"${text.replace(/"/g, '""')}"` : text;
}

/** The competency matrix as CSV: a header row, then one line per person and procedure; CRLF line ends. */
export function matrixCsv(matrix: CompetencyMatrix, timeZone: string): string {
  const lines = [MATRIX_CSV_COLUMNS.map(csvField).join(',')];
  const day = (iso: string | null) => (iso ? workshopDate(timeZone, new Date(iso)) : '');
  for (const row of matrix.rows) {
    for (const p of matrix.procedures) {
      const c = row.cells[p.key];
      const a = c?.authorisation ?? null;
      lines.push(
        [
          row.person.displayName,
          row.person.email,
          row.person.roles.map((r) => ROLE_LABELS[r]).join('; '),
          p.title,
          p.key,
          c?.witnessedRuns ?? 0,
          c?.signedRuns ?? 0,
          day(c?.lastSignedAt ?? null),
          a ? AUTHORISATION_STATE_LABELS[a.state] : 'Not authorised',
          a?.grantedBy.displayName ?? '',
          a ? day(a.grantedAt) : '',
          a?.expiresOn ?? '',
          a?.note ?? '',
        ]
          .map(csvField)
          .join(','),
      );
    }
  }
  return lines.join('\r\n') + '\r\n';
}
