/**
 * `npm run db:migrate` / `npm run db:rollback`: apply every pending migration to, or revert every
 * migration from, the database in DATABASE_URL (the local one of `npm start` lives in var/pg;
 * its URL is printed by `tsx db/pg-control.ts start`).
 */
import { createSequelize } from './connection.ts';
import { migrateDownAll, migrateUp } from './migrate.ts';

const url = process.env['DATABASE_URL'];
const cmd = process.argv[2];
if (!url) {
  console.error('Set DATABASE_URL to the database to migrate.');
  process.exit(2);
}
if (cmd !== 'migrate' && cmd !== 'rollback') {
  console.error('usage: tsx db/cli.ts migrate|rollback');
  process.exit(2);
}
const sequelize = createSequelize({ url, max: 1 });
try {
  const names = cmd === 'migrate' ? await migrateUp(sequelize) : await migrateDownAll(sequelize);
  console.log(names.length ? `${cmd === 'migrate' ? 'Applied' : 'Reverted'}: ${names.join(', ')}` : 'Nothing to do.');
} catch (e) {
  console.error(`Migration failed: ${(e as Error).message}`);
  process.exitCode = 1;
} finally {
  await sequelize.close();
}
