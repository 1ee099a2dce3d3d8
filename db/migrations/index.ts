/**
 * Every migration, in order. Add a new file named `YYYYMMDD-HHMM-what.ts` exporting
 * `migration` and list it here (an explicit list works the same under tsx, Vite and Node).
 */
import type { Migration } from './types.ts';
import { migration as m0900 } from './20261202-0900-plant-users-audit.ts';
import { migration as m0910 } from './20261202-0910-readings.ts';
import { migration as m0920 } from './20261202-0920-auth.ts';
import { migration as m1000 } from './20261202-1000-ingest-pipeline.ts';
import { migration as m1020 } from './20261202-1020-alarms.ts';
import { migration as m1030 } from './20261202-1030-spc.ts';
import { migration as m1040 } from './20261202-1040-windows-baths.ts';
import { migration as m1050 } from './20261202-1050-loads-quality-trace.ts';
import { migration as m20261204_1100 } from './20261204-1100-config-notify.ts';
import { migration as m1700 } from './20261204-1700-must-change-password.ts';
import { migration as m1710 } from './20261204-1710-token-expiry.ts';
import { migration as m1720 } from './20261204-1720-sessions-hashed.ts';
import { migration as m1800gauge } from './20261204-1800-gauge-studies.ts';
import { migration as m1900 } from './20261204-1900-audit-hash-chain.ts';

export const migrations: Migration[] = [
  m0900,
  m0910,
  m0920,
  m1000,
  m1020,
  m1030,
  m1040,
  m1050,
  m20261204_1100,
  m1700,
  m1710,
  m1720,
  m1800gauge,
  m1900,
];
