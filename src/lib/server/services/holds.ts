/**
 * Holds and nonconformances. Placing a hold needs the quality role and a reason; releasing a
 * hold or deciding its disposition (release, strip and re-coat, scrap, use as is) is an
 * electronic signature: the signer's password again and the meaning (21 CFR Part 11 §11.50,
 * §11.200). The signature is checked before anything changes, so a wrong password changes
 * nothing. Every hold, release, disposition and nonconformance is audited.
 */
import { toCsv } from '../../shared/csv-table.ts';
import {
  DISPOSITION_LABELS,
  type Disposition,
  type HoldClose,
  type HoldPlace,
  type NcCreate,
  type NcDisposition,
} from '../../shared/quality.ts';
import type { SignatureRecord } from '../../../../db/models/index.ts';
import { Op } from 'sequelize';
import { Asset, Job, NcDisposition as NcDispositionRow, NcTest, OvenLoad, QualityTest } from '../../../../db/models/index.ts';
import * as core from '../../core/hold-store.ts';
import { signWithPassword, type SessionUser } from '../auth.ts';
import { sequelize } from '../db.ts';
import { selectRows } from '../../core/record-db.ts';

/** A raw SELECT through the web process's Sequelize instance (bind parameters). */
const rawRows = <T extends object>(sql: string, bind: unknown[] = []) => selectRows<T>(sequelize(), sql, bind);
import { actorOf } from '../guard.ts';
import { siteTimeZone } from '../../core/settings-store.ts';
import type { HoldItem, NcItem, NcDetail } from '../../shared/trace-views.ts';

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
  const rows = await rawRows<HoldRow>(
    `${HOLD_SELECT} ${where.length ? 'where ' + where.join(' and ') : ''} order by h.placed_at desc, h.id desc limit 2000`,
    args,
  );
  return rows.map(toHold);
}

export async function holdsCsv(items: HoldItem[]): Promise<string> {
  const tz = await siteTimeZone(sequelize());
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
  return core.placeHolds(
    sequelize(),
    { jobNumbers: input.jobNumbers, reason: input.reason, ncId: input.ncId, userId: user.id },
    actorOf(user, address),
  );
}

async function holdsById(ids: readonly number[]): Promise<HoldItem[]> {
  const rows = await rawRows<HoldRow>(`${HOLD_SELECT} where h.id = any($1::int[]) order by h.id`, [[...ids]]);
  return rows.map(toHold);
}

/** The signer's signature: the password again and the meaning (checked by the auth service). */
const signer =
  (user: SessionUser, password: string, meaning: string, address: string | null): core.Sign =>
  () =>
    signWithPassword(user, password, meaning, address);

/** Release or disposition holds (quality, signed). A wrong password changes nothing (403). */
export async function closeHolds(user: SessionUser, input: HoldClose, address: string | null): Promise<HoldItem[]> {
  const ids = await core.closeHolds(
    sequelize(),
    { holdIds: input.holdIds, disposition: input.disposition, comment: input.comment, userId: user.id },
    signer(user, input.password, input.meaning, address),
    actorOf(user, address),
  );
  return holdsById(ids);
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
  const rows = await rawRows<NcRow>(
    `${NC_SELECT} ${status ? 'where n.status = $1' : ''} order by n.opened_at desc limit 1000`,
    status ? [status] : [],
  );
  return rows.map(toNc);
}

export async function getNc(id: number): Promise<NcDetail | null> {
  const rows = await rawRows<NcRow>(`${NC_SELECT} where n.id = $1`, [id]);
  const n = rows[0];
  if (!n) return null;
  const tests = (await QualityTest.findAll({
    attributes: ['id', 'kind', 'result', 'testedAt', 'computed'],
    where: { id: { [Op.in]: (await NcTest.findAll({ attributes: ['testId'], where: { ncId: id } })).map((x) => x.testId) } },
    include: [{ model: Job, attributes: ['jobNumber'], required: true }],
    order: [['testedAt', 'ASC']],
  })) as (QualityTest & { Job: Job })[];
  const disp = await NcDispositionRow.findAll({ where: { ncId: id }, order: [['at', 'ASC']] });
  const dispJobs = new Map(
    (
      await Job.findAll({
        attributes: ['id', 'jobNumber'],
        where: { id: { [Op.in]: [...new Set(disp.flatMap((d) => d.jobIds))] } },
      })
    ).map((j) => [j.id, j.jobNumber]),
  );
  const load = n.suspected_load_id
    ? ((await OvenLoad.findByPk(n.suspected_load_id, {
        attributes: ['id', 'openedAt', 'verdict'],
        include: [{ model: Asset, as: 'oven', attributes: ['name'], required: true }],
      })) as (OvenLoad & { oven: Asset }) | null)
    : null;
  const charge = n.suspected_bath_charge_id
    ? (
        await rawRows<{ id: number; tank_code: string; lot_code: string; charged_at: Date }>(
          `select c.id, a.code as tank_code, lo.lot_code, c.charged_at from bath_charges c join assets a on a.id = c.tank_asset_id join lacquer_lots lo on lo.id = c.lot_id where c.id = $1`,
          [n.suspected_bath_charge_id],
        )
      )[0]
    : undefined;
  return {
    ...toNc(n),
    testList: tests.map((t) => ({
      id: t.id,
      jobNumber: t.Job.jobNumber,
      kind: t.kind,
      result: t.result,
      testedAt: t.testedAt.toISOString(),
      summary: String(t.computed['summary'] ?? ''),
    })),
    holdList: await listHolds({ status: 'all', ncId: id }),
    dispositions: disp.map((d) => ({
      id: d.id,
      disposition: d.disposition,
      jobNumbers: d.jobIds
        .map((j) => dispJobs.get(j))
        .filter((j): j is string => j !== undefined)
        .sort(),
      comment: d.comment,
      signature: d.signature,
      at: d.at.toISOString(),
    })),
    load: load ? { id: load.id, ovenName: load.oven.name, openedAt: load.openedAt.toISOString(), verdict: load.verdict } : null,
    bathCharge: charge
      ? { id: charge.id, tankCode: charge.tank_code, lotCode: charge.lot_code, chargedAt: charge.charged_at.toISOString() }
      : null,
  };
}

/** Write a nonconformance (quality) tying failed test(s), the suspected cause and existing holds together. */
export async function createNc(user: SessionUser, input: NcCreate, address: string | null): Promise<NcDetail> {
  const id = await core.createNc(sequelize(), { ...input, userId: user.id }, actorOf(user, address), input);
  return (await getNc(id))!;
}

/** Disposition held jobs of a nonconformance (quality, signed). */
export async function dispositionNc(
  user: SessionUser,
  ncId: number,
  input: NcDisposition,
  address: string | null,
): Promise<NcDetail> {
  await core.dispositionNc(
    sequelize(),
    ncId,
    { holdIds: input.holdIds, disposition: input.disposition, comment: input.comment, userId: user.id },
    signer(user, input.password, input.meaning, address),
    actorOf(user, address),
  );
  return (await getNc(ncId))!;
}

/** Close a nonconformance (quality, signed) once none of its holds is active. */
export async function closeNc(
  user: SessionUser,
  ncId: number,
  input: { comment: string; password: string; meaning: string },
  address: string | null,
): Promise<NcDetail> {
  await core.closeNc(
    sequelize(),
    ncId,
    { comment: input.comment, userId: user.id },
    signer(user, input.password, input.meaning, address),
    actorOf(user, address),
  );
  return (await getNc(ncId))!;
}
