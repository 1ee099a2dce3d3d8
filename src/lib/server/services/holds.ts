/**
 * Holds and nonconformances. Placing a hold needs the quality role and a reason; releasing a
 * hold or deciding its disposition (release, strip and re-coat, scrap, use as is) is an
 * electronic signature: the signer's password again and the meaning (21 CFR Part 11 §11.50,
 * §11.200). The signature is checked before anything changes, so a wrong password changes
 * nothing. Every hold, release, disposition and nonconformance is audited.
 */
import { toCsv } from '../../shared/csv-table.ts';
import {
  DISPOSITION_JOB_STATUS,
  DISPOSITION_LABELS,
  type Disposition,
  type HoldClose,
  type HoldPlace,
  type NcCreate,
  type NcDisposition,
} from '../../shared/quality.ts';
import type { SignatureRecord } from '../../../../db/models/index.ts';
import { audit } from '../audit.ts';
import { signWithPassword, type SessionUser } from '../auth.ts';
import { pgPool } from '../db.ts';
import { actorOf } from '../guard.ts';
import { HttpProblem } from '../http.ts';
import { siteTimeZone } from '../../core/settings-store.ts';
import type { HoldItem, NcItem, NcDetail } from '../../shared/trace-views.ts';

const bad = (path: string, message: string) =>
  new HttpProblem(400, 'Invalid input', `${path}: ${message}`, { errors: [{ path, message }] });

const HOLD_SELECT = `
  select h.id, j.job_number, j.status as job_status, h.reason, h.placed_at, pu.display_name as placed_by, h.status, h.disposition,
         h.disposition_comment, h.closed_at, cu.display_name as closed_by, h.signature, h.nc_id, n.title as nc_title
    from holds h join jobs j on j.id = h.job_id
    left join users pu on pu.id = h.placed_by
    left join users cu on cu.id = h.closed_by
    left join nonconformances n on n.id = h.nc_id`;

interface HoldRow {
  id: number;
  job_number: string;
  job_status: string;
  reason: string;
  placed_at: Date;
  placed_by: string | null;
  status: 'active' | 'closed';
  disposition: Disposition | null;
  disposition_comment: string | null;
  closed_at: Date | null;
  closed_by: string | null;
  signature: SignatureRecord | null;
  nc_id: number | null;
  nc_title: string | null;
}

const toHold = (r: HoldRow): HoldItem => ({
  id: r.id,
  jobNumber: r.job_number,
  jobStatus: r.job_status,
  reason: r.reason,
  placedAt: r.placed_at.toISOString(),
  placedBy: r.placed_by,
  status: r.status,
  disposition: r.disposition,
  dispositionComment: r.disposition_comment,
  closedAt: r.closed_at?.toISOString() ?? null,
  closedBy: r.closed_by,
  signature: r.signature,
  ncId: r.nc_id,
  ncTitle: r.nc_title,
});

/** Holds (active, closed or all), newest first. */
export async function listHolds(f: {
  status: 'active' | 'closed' | 'all';
  job?: string | undefined;
  ncId?: number;
}): Promise<HoldItem[]> {
  const where: string[] = [];
  const args: unknown[] = [];
  const arg = (v: unknown) => `$${args.push(v)}`;
  if (f.status !== 'all') where.push(`h.status = ${arg(f.status)}`);
  if (f.job) where.push(`j.job_number = ${arg(f.job)}`);
  if (f.ncId) where.push(`h.nc_id = ${arg(f.ncId)}`);
  const { rows } = await pgPool().query<HoldRow>(
    `${HOLD_SELECT} ${where.length ? 'where ' + where.join(' and ') : ''} order by h.placed_at desc, h.id desc limit 2000`,
    args,
  );
  return rows.map(toHold);
}

export async function holdsCsv(items: HoldItem[]): Promise<string> {
  const tz = await siteTimeZone(pgPool());
  const t = (s: string | null) => (s ? new Date(s).toLocaleString('sv-SE', { timeZone: tz }) : '');
  return toCsv(
    [
      'hold',
      'job',
      'status',
      'reason',
      `placed (${tz})`,
      'placed by',
      'disposition',
      'comment',
      `closed (${tz})`,
      'signed by',
      'meaning',
      'nonconformance',
    ],
    items.map((h) => [
      h.id,
      h.jobNumber,
      h.status,
      h.reason,
      t(h.placedAt),
      h.placedBy ?? '',
      h.disposition ? DISPOSITION_LABELS[h.disposition] : '',
      h.dispositionComment ?? '',
      t(h.closedAt),
      h.signature?.displayName ?? '',
      h.signature?.meaning ?? '',
      h.ncId ?? '',
    ]),
  );
}

/**
 * Hold jobs (quality). Unknown job numbers refuse the whole request (400, listing them); jobs
 * already on hold are reported and left as they are.
 */
export async function placeHolds(
  user: SessionUser,
  input: HoldPlace,
  address: string | null,
): Promise<{ placed: { holdId: number; jobNumber: string }[]; alreadyHeld: string[] }> {
  const pool = pgPool();
  const nums = [...new Set(input.jobNumbers)];
  const jobs = await pool.query<{ id: number; job_number: string; status: string }>(
    'select id, job_number, status from jobs where job_number = any($1::text[])',
    [nums],
  );
  const known = new Map(jobs.rows.map((r) => [r.job_number, r]));
  const unknown = nums.filter((n) => !known.has(n));
  if (unknown.length) throw bad('jobNumbers', `Unknown job number(s): ${unknown.join(', ')}.`);
  if (input.ncId !== undefined) {
    const nc = await pool.query('select 1 from nonconformances where id = $1', [input.ncId]);
    if (!nc.rowCount) throw bad('ncId', 'No such nonconformance.');
  }
  const c = await pool.connect();
  const placed: { holdId: number; jobNumber: string }[] = [];
  const alreadyHeld: string[] = [];
  const before = new Map<string, string>();
  try {
    await c.query('begin');
    for (const n of nums) {
      const job = known.get(n)!;
      const r = await c.query<{ id: number }>(
        `insert into holds (job_id, nc_id, reason, placed_by) values ($1, $2, $3, $4)
         on conflict (job_id) where status = 'active' do nothing returning id`,
        [job.id, input.ncId ?? null, input.reason, user.id],
      );
      if (!r.rows[0]) {
        alreadyHeld.push(n);
        continue;
      }
      before.set(n, job.status);
      await c.query(`update jobs set status = 'held', updated_at = now() where id = $1`, [job.id]);
      placed.push({ holdId: r.rows[0].id, jobNumber: n });
    }
    await c.query('commit');
  } catch (e) {
    await c.query('rollback').catch(() => {});
    throw e;
  } finally {
    c.release();
  }
  const actor = actorOf(user, address);
  for (const p of placed) {
    await audit(actor, {
      action: 'hold.place',
      entity: 'hold',
      entityId: p.holdId,
      before: { jobNumber: p.jobNumber, jobStatus: before.get(p.jobNumber) },
      after: { jobNumber: p.jobNumber, jobStatus: 'held', reason: input.reason, ncId: input.ncId ?? null },
    });
  }
  return { placed, alreadyHeld };
}

async function closeHoldsSigned(
  user: SessionUser,
  holdIds: readonly number[],
  disposition: Disposition,
  comment: string,
  signature: SignatureRecord,
  address: string | null,
  ncId: number | null,
): Promise<HoldItem[]> {
  const pool = pgPool();
  const ids = [...new Set(holdIds)];
  const c = await pool.connect();
  const changed: { id: number; jobNumber: string; jobStatusBefore: string }[] = [];
  try {
    await c.query('begin');
    const { rows } = await c.query<{
      id: number;
      job_id: number;
      status: string;
      nc_id: number | null;
      job_number: string;
      job_status: string;
    }>(
      `select h.id, h.job_id, h.status, h.nc_id, j.job_number, j.status as job_status from holds h join jobs j on j.id = h.job_id where h.id = any($1::int[]) for update of h`,
      [ids],
    );
    const found = new Map(rows.map((r) => [r.id, r]));
    const missing = ids.filter((i) => !found.has(i));
    if (missing.length) throw bad('holdIds', `No such hold(s): ${missing.join(', ')}.`);
    const closed = rows.filter((r) => r.status !== 'active');
    if (closed.length)
      throw new HttpProblem(
        409,
        'Hold already closed',
        `Hold(s) ${closed.map((r) => `${r.id} (${r.job_number})`).join(', ')} are already closed.`,
      );
    if (ncId !== null) {
      const other = rows.filter((r) => r.nc_id !== ncId);
      if (other.length)
        throw bad('holdIds', `Hold(s) ${other.map((r) => r.id).join(', ')} do not belong to nonconformance ${ncId}.`);
    }
    for (const r of rows) {
      await c.query(
        `update holds set status = 'closed', disposition = $2, disposition_comment = $3, closed_at = now(), closed_by = $4, signature = $5::jsonb where id = $1`,
        [r.id, disposition, comment || null, user.id, JSON.stringify(signature)],
      );
      await c.query(`update jobs set status = $2, updated_at = now() where id = $1`, [
        r.job_id,
        DISPOSITION_JOB_STATUS[disposition],
      ]);
      changed.push({ id: r.id, jobNumber: r.job_number, jobStatusBefore: r.job_status });
    }
    await c.query('commit');
  } catch (e) {
    await c.query('rollback').catch(() => {});
    throw e;
  } finally {
    c.release();
  }
  const actor = actorOf(user, address);
  for (const h of changed) {
    await audit(actor, {
      action: disposition === 'release' ? 'hold.release' : 'hold.disposition',
      entity: 'hold',
      entityId: h.id,
      before: { status: 'active', jobNumber: h.jobNumber, jobStatus: h.jobStatusBefore },
      after: { status: 'closed', disposition, comment, jobStatus: DISPOSITION_JOB_STATUS[disposition], ncId },
      signature,
    });
  }
  const { rows } = await pool.query<HoldRow>(`${HOLD_SELECT} where h.id = any($1::int[]) order by h.id`, [ids]);
  return rows.map(toHold);
}

/** Release or disposition holds (quality, signed). The password is checked first: a wrong one changes nothing (403). */
export async function closeHolds(user: SessionUser, input: HoldClose, address: string | null): Promise<HoldItem[]> {
  const signature = await signWithPassword(user, input.password, input.meaning, address);
  return closeHoldsSigned(user, input.holdIds, input.disposition, input.comment, signature, address, null);
}

// ---------------------------------------------------------------------------------------------
// Nonconformances

const NC_SELECT = `
  select n.id, n.title, n.description, n.suspected_cause, n.suspected_load_id, n.suspected_bath_charge_id, n.status, n.opened_at,
         ou.display_name as opened_by, n.closed_at, cu.display_name as closed_by, n.close_signature,
         (select count(*)::int from nc_tests x where x.nc_id = n.id) as tests,
         (select count(*)::int from holds h where h.nc_id = n.id and h.status = 'active') as active_holds,
         (select count(*)::int from holds h where h.nc_id = n.id) as holds
    from nonconformances n left join users ou on ou.id = n.opened_by left join users cu on cu.id = n.closed_by`;

interface NcRow {
  id: number;
  title: string;
  description: string;
  suspected_cause: string;
  suspected_load_id: number | null;
  suspected_bath_charge_id: number | null;
  status: 'open' | 'closed';
  opened_at: Date;
  opened_by: string | null;
  closed_at: Date | null;
  closed_by: string | null;
  close_signature: SignatureRecord | null;
  tests: number;
  active_holds: number;
  holds: number;
}

const toNc = (r: NcRow): NcItem => ({
  id: r.id,
  title: r.title,
  description: r.description,
  suspectedCause: r.suspected_cause,
  suspectedLoadId: r.suspected_load_id,
  suspectedBathChargeId: r.suspected_bath_charge_id,
  status: r.status,
  openedAt: r.opened_at.toISOString(),
  openedBy: r.opened_by,
  closedAt: r.closed_at?.toISOString() ?? null,
  closedBy: r.closed_by,
  closeSignature: r.close_signature,
  tests: r.tests,
  activeHolds: r.active_holds,
  holds: r.holds,
});

export async function listNcs(status?: 'open' | 'closed'): Promise<NcItem[]> {
  const { rows } = await pgPool().query<NcRow>(
    `${NC_SELECT} ${status ? 'where n.status = $1' : ''} order by n.opened_at desc limit 1000`,
    status ? [status] : [],
  );
  return rows.map(toNc);
}

export async function getNc(id: number): Promise<NcDetail | null> {
  const pool = pgPool();
  const { rows } = await pool.query<NcRow>(`${NC_SELECT} where n.id = $1`, [id]);
  const n = rows[0];
  if (!n) return null;
  const tests = await pool.query<{
    id: number;
    job_number: string;
    kind: string;
    result: string;
    tested_at: Date;
    computed: Record<string, unknown>;
  }>(
    `select t.id, j.job_number, t.kind, t.result, t.tested_at, t.computed from nc_tests x join quality_tests t on t.id = x.test_id join jobs j on j.id = t.job_id where x.nc_id = $1 order by t.tested_at`,
    [id],
  );
  const disp = await pool.query<{
    id: number;
    disposition: Disposition;
    job_numbers: string[];
    comment: string;
    signature: SignatureRecord;
    at: Date;
  }>(
    `select d.id, d.disposition, array(select j.job_number from jobs j where j.id = any(d.job_ids) order by j.job_number) as job_numbers, d.comment, d.signature, d.at
       from nc_dispositions d where d.nc_id = $1 order by d.at`,
    [id],
  );
  const load = n.suspected_load_id
    ? (
        await pool.query<{ id: number; oven_name: string; opened_at: Date; verdict: string | null }>(
          `select l.id, a.name as oven_name, l.opened_at, l.verdict from oven_loads l join assets a on a.id = l.oven_asset_id where l.id = $1`,
          [n.suspected_load_id],
        )
      ).rows[0]
    : undefined;
  const charge = n.suspected_bath_charge_id
    ? (
        await pool.query<{ id: number; tank_code: string; lot_code: string; charged_at: Date }>(
          `select c.id, a.code as tank_code, lo.lot_code, c.charged_at from bath_charges c join assets a on a.id = c.tank_asset_id join lacquer_lots lo on lo.id = c.lot_id where c.id = $1`,
          [n.suspected_bath_charge_id],
        )
      ).rows[0]
    : undefined;
  return {
    ...toNc(n),
    testList: tests.rows.map((t) => ({
      id: t.id,
      jobNumber: t.job_number,
      kind: t.kind,
      result: t.result,
      testedAt: t.tested_at.toISOString(),
      summary: String(t.computed['summary'] ?? ''),
    })),
    holdList: await listHolds({ status: 'all', ncId: id }),
    dispositions: disp.rows.map((d) => ({
      id: d.id,
      disposition: d.disposition,
      jobNumbers: d.job_numbers,
      comment: d.comment,
      signature: d.signature,
      at: d.at.toISOString(),
    })),
    load: load ? { id: load.id, ovenName: load.oven_name, openedAt: load.opened_at.toISOString(), verdict: load.verdict } : null,
    bathCharge: charge
      ? { id: charge.id, tankCode: charge.tank_code, lotCode: charge.lot_code, chargedAt: charge.charged_at.toISOString() }
      : null,
  };
}

/** Write a nonconformance (quality) tying failed test(s), the suspected cause and existing holds together. */
export async function createNc(user: SessionUser, input: NcCreate, address: string | null): Promise<NcDetail> {
  const pool = pgPool();
  const tests = await pool.query<{ id: number; result: string }>(
    'select id, result from quality_tests where id = any($1::int[])',
    [input.testIds],
  );
  const missing = input.testIds.filter((t) => !tests.rows.some((r) => r.id === t));
  if (missing.length) throw bad('testIds', `No such test(s): ${missing.join(', ')}.`);
  const passed = tests.rows.filter((r) => r.result !== 'fail');
  if (passed.length)
    throw bad('testIds', `Test(s) ${passed.map((r) => r.id).join(', ')} passed; a nonconformance ties failed tests.`);
  if (
    input.suspectedLoadId !== undefined &&
    !(await pool.query('select 1 from oven_loads where id = $1', [input.suspectedLoadId])).rowCount
  )
    throw bad('suspectedLoadId', 'No such oven load.');
  if (
    input.suspectedBathChargeId !== undefined &&
    !(await pool.query('select 1 from bath_charges where id = $1', [input.suspectedBathChargeId])).rowCount
  )
    throw bad('suspectedBathChargeId', 'No such bath charge.');
  const c = await pool.connect();
  let id: number;
  try {
    await c.query('begin');
    const r = await c.query<{ id: number }>(
      `insert into nonconformances (title, description, suspected_cause, suspected_load_id, suspected_bath_charge_id, opened_by)
       values ($1, $2, $3, $4, $5, $6) returning id`,
      [
        input.title,
        input.description,
        input.suspectedCause,
        input.suspectedLoadId ?? null,
        input.suspectedBathChargeId ?? null,
        user.id,
      ],
    );
    id = r.rows[0]!.id;
    await c.query('insert into nc_tests (nc_id, test_id) select $1, unnest($2::int[]) on conflict do nothing', [
      id,
      input.testIds,
    ]);
    if (input.holdIds.length) {
      const h = await c.query(`update holds set nc_id = $1 where id = any($2::int[]) and status = 'active'`, [id, input.holdIds]);
      if ((h.rowCount ?? 0) !== new Set(input.holdIds).size)
        throw bad('holdIds', 'Only active holds can be tied to a nonconformance.');
    }
    await c.query('commit');
  } catch (e) {
    await c.query('rollback').catch(() => {});
    throw e;
  } finally {
    c.release();
  }
  await audit(actorOf(user, address), { action: 'nc.create', entity: 'nonconformance', entityId: id, after: input });
  return (await getNc(id))!;
}

/** Disposition held jobs of a nonconformance (quality, signed). */
export async function dispositionNc(
  user: SessionUser,
  ncId: number,
  input: NcDisposition,
  address: string | null,
): Promise<NcDetail> {
  const pool = pgPool();
  const nc = await pool.query<{ status: string }>('select status from nonconformances where id = $1', [ncId]);
  if (!nc.rows[0]) throw new HttpProblem(404, 'Not found', 'No such nonconformance.');
  if (nc.rows[0].status !== 'open')
    throw new HttpProblem(409, 'Nonconformance closed', 'A closed nonconformance takes no more dispositions.');
  const signature = await signWithPassword(user, input.password, input.meaning, address);
  const holds = await closeHoldsSigned(user, input.holdIds, input.disposition, input.comment, signature, address, ncId);
  const jobIds = await pool.query<{ id: number }>('select id from jobs where job_number = any($1::text[])', [
    holds.map((h) => h.jobNumber),
  ]);
  const r = await pool.query<{ id: number }>(
    `insert into nc_dispositions (nc_id, disposition, job_ids, comment, signature) values ($1, $2, $3, $4, $5::jsonb) returning id`,
    [ncId, input.disposition, jobIds.rows.map((x) => x.id), input.comment, JSON.stringify(signature)],
  );
  await audit(actorOf(user, address), {
    action: 'nc.disposition',
    entity: 'nonconformance',
    entityId: ncId,
    after: {
      dispositionId: r.rows[0]!.id,
      disposition: input.disposition,
      jobs: holds.map((h) => h.jobNumber),
      comment: input.comment,
    },
    signature,
  });
  return (await getNc(ncId))!;
}

/** Close a nonconformance (quality, signed) once none of its holds is active. */
export async function closeNc(
  user: SessionUser,
  ncId: number,
  input: { comment: string; password: string; meaning: string },
  address: string | null,
): Promise<NcDetail> {
  const pool = pgPool();
  const nc = await pool.query<{ status: string; active: number }>(
    `select n.status, (select count(*)::int from holds h where h.nc_id = n.id and h.status = 'active') as active from nonconformances n where n.id = $1`,
    [ncId],
  );
  const row = nc.rows[0];
  if (!row) throw new HttpProblem(404, 'Not found', 'No such nonconformance.');
  if (row.status !== 'open') throw new HttpProblem(409, 'Already closed', 'This nonconformance is already closed.');
  if (row.active > 0)
    throw new HttpProblem(
      409,
      'Jobs still on hold',
      `${row.active} job(s) tied to this nonconformance are still on hold; disposition them first.`,
    );
  const signature = await signWithPassword(user, input.password, input.meaning, address);
  await pool.query(
    `update nonconformances set status = 'closed', closed_at = now(), closed_by = $2, close_signature = $3::jsonb where id = $1`,
    [ncId, user.id, JSON.stringify(signature)],
  );
  await audit(actorOf(user, address), {
    action: 'nc.close',
    entity: 'nonconformance',
    entityId: ncId,
    before: { status: 'open' },
    after: { status: 'closed', comment: input.comment },
    signature,
  });
  return (await getNc(ncId))!;
}
