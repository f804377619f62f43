// Check every signed record of a database: its hash and its link in its machine's chain.
// Usage: DATABASE_URL=postgres://… npx tsx scripts/check-records.ts  (prints JSON; exit 1 if any is broken)
import { createDatabase } from '../api/db/database';
import { SetupRecord } from '../api/modules/records/model';
import type { AuthService } from '../api/modules/auth/service';
import { SignOffService } from '../api/modules/signoff/service';

const url = process.env['DATABASE_URL'];
if (!url) {
  console.error('Set DATABASE_URL to the database to check.');
  process.exit(2);
}
const sequelize = createDatabase(url, 2);
try {
  // The record check never signs anything, so it needs no sign-in service.
  const service = new SignOffService(sequelize, undefined as unknown as AuthService);
  const signed = await SetupRecord.findAll({ where: { status: 'signed_off' }, order: [['signedAt', 'ASC']], attributes: ['id'] });
  const results = [];
  for (const { id } of signed) {
    const check = await service.check(id, null);
    results.push({ id, intact: check.intact, failed: check.checks.filter((c) => !c.ok).map((c) => c.name) });
  }
  const broken = results.filter((r) => !r.intact);
  console.log(JSON.stringify({ checked: results.length, broken: broken.length, results }));
  process.exitCode = broken.length ? 1 : 0;
} finally {
  await sequelize.close();
}
