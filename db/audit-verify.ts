/**
 * `npm run audit:verify`: walk the audit trail's hash chain in the database in DATABASE_URL and
 * report the first broken link. Exit 0 when the chain holds, 1 on a break, 2 when it cannot run.
 * The outcome is kept (table audit_verifications) and shown on the admin screen.
 */
import { runAuditVerification } from '../src/lib/core/audit-chain.ts';
import { createSequelize } from './connection.ts';
import { initModels } from './models/index.ts';

const url = process.env['DATABASE_URL'];
if (!url) {
  console.error('Set DATABASE_URL to the database to verify.');
  process.exit(2);
}
const sequelize = createSequelize({ url, max: 1 });
initModels(sequelize);
try {
  const { report } = await runAuditVerification(sequelize, 'audit:verify');
  if (report.ok) {
    console.log(`Audit chain holds: ${report.rowsChecked} rows, last row ${report.lastId ?? 'none'}.`);
  } else {
    const b = report.broken!;
    console.error(`Audit chain BROKEN at row ${b.id} (${b.kind}): ${b.problem}`);
    console.error(`${report.rowsChecked} rows before it verified.`);
    process.exitCode = 1;
  }
} catch (e) {
  console.error(`Could not verify the audit chain: ${(e as Error).message}`);
  process.exitCode = 2;
} finally {
  await sequelize.close();
}
