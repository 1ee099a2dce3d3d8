/**
 * Process windows (recipes): drafts, signed approval, versions with their diff, and which
 * window each line/oven runs over time. Every change is audited in the same transaction.
 */
import { QueryTypes, type Transaction } from 'sequelize';
import type { SignatureRecord } from '../../../../db/models/index.ts';
import {
  diffLimits,
  type LimitChange,
  type ProcessWindowLimits,
  type WindowApprove,
  type WindowAssign,
  type WindowDraftCreate,
  type WindowDraftUpdate,
  type WindowStatus,
} from '../../shared/windows.ts';
import type { LacquerCreate, MaterialCreate } from '../../shared/baths.ts';
import { audit, type Actor } from '../audit.ts';
import { signWithPassword, type SessionUser } from '../auth.ts';
import { db, pgPool } from '../db.ts';
import { actorOf } from '../guard.ts';
import { HttpProblem } from '../http.ts';
import { listAssignments, windowInForce, type AssignmentRow } from '../../core/window-store.ts';

/** Raw SQL with $n binds, optionally inside a transaction. */
export async function q<T extends object>(sql: string, bind: unknown[] = [], transaction?: Transaction): Promise<T[]> {
  return db().query<T>(sql, { bind, type: QueryTypes.SELECT, ...(transaction ? { transaction } : {}) });
}

export interface MaterialRow {
  id: number;
  code: string;
  name: string;
  refractiveIndex: number;
  active: boolean;
}

export interface LacquerRow {
  id: number;
  name: string;
  maker: string;
  solidsPct: number;
  densityGCm3: number;
  activationEnergyKJMol: number;
  note: string | null;
}

export interface WindowRow {
  id: number;
  lacquerId: number;
  lacquer: string;
  materialId: number;
  substrate: string;
  version: number;
  name: string;
  status: WindowStatus;
  limits: ProcessWindowLimits;
  note: string | null;
  createdBy: string | null;
  createdAt: string;
  updatedAt: string;
  approvedBy: string | null;
  approvedSignature: SignatureRecord | null;
  effectiveFrom: string | null;
  supersededAt: string | null;
}

const iso = (d: Date | string | null): string | null => (d == null ? null : new Date(d).toISOString());

const WINDOW_SELECT = `
  select pw.id, pw.lacquer_id as "lacquerId", l.name as lacquer, pw.material_id as "materialId", m.name as substrate,
         pw.version, pw.name, pw.status, pw.limits, pw.note, cu.username as "createdBy", pw.created_at as "createdAt",
         pw.updated_at as "updatedAt", au.username as "approvedBy", pw.approved_signature as "approvedSignature",
         pw.effective_from as "effectiveFrom", pw.superseded_at as "supersededAt"
    from process_windows pw
    join lacquers l on l.id = pw.lacquer_id
    join materials m on m.id = pw.material_id
    left join users cu on cu.id = pw.created_by
    left join users au on au.id = pw.approved_by`;

type RawWindow = Omit<WindowRow, 'createdAt' | 'updatedAt' | 'effectiveFrom' | 'supersededAt'> & {
  createdAt: Date;
  updatedAt: Date;
  effectiveFrom: Date | null;
  supersededAt: Date | null;
};

function toWindow(r: RawWindow): WindowRow {
  return {
    ...r,
    createdAt: iso(r.createdAt)!,
    updatedAt: iso(r.updatedAt)!,
    effectiveFrom: iso(r.effectiveFrom),
    supersededAt: iso(r.supersededAt),
  };
}

export async function listMaterials(): Promise<MaterialRow[]> {
  return q<MaterialRow>(
    `select id, code, name, refractive_index as "refractiveIndex", active from materials order by refractive_index, name`,
  );
}

export async function createMaterial(user: SessionUser, input: MaterialCreate, address: string | null): Promise<MaterialRow> {
  return db().transaction(async (t) => {
    const dup = await q(`select 1 from materials where code = $1`, [input.code], t);
    if (dup.length)
      throw new HttpProblem(409, 'Already exists', `A substrate with code ${input.code} exists.`, {
        errors: [{ path: 'code', message: 'This code is taken.' }],
      });
    const [row] = await q<MaterialRow>(
      `insert into materials (code, name, refractive_index) values ($1, $2, $3) returning id, code, name, refractive_index as "refractiveIndex", active`,
      [input.code, input.name, input.refractiveIndex],
      t,
    );
    await audit(actorOf(user, address), { action: 'material.create', entity: 'material', entityId: row!.id, after: row }, t);
    return row!;
  });
}

const LACQUER_COLS = `id, name, maker, solids_pct as "solidsPct", density_g_cm3 as "densityGCm3", activation_energy_kj_mol as "activationEnergyKJMol", note`;

export async function listLacquers(): Promise<LacquerRow[]> {
  return q<LacquerRow>(`select ${LACQUER_COLS} from lacquers order by name`);
}

export async function createLacquer(user: SessionUser, input: LacquerCreate, address: string | null): Promise<LacquerRow> {
  return db().transaction(async (t) => {
    const dup = await q(`select 1 from lacquers where lower(name) = lower($1)`, [input.name], t);
    if (dup.length)
      throw new HttpProblem(409, 'Already exists', `A lacquer named ${input.name} exists.`, {
        errors: [{ path: 'name', message: 'This name is taken.' }],
      });
    const [row] = await q<LacquerRow>(
      `insert into lacquers (name, maker, solids_pct, density_g_cm3, activation_energy_kj_mol, note) values ($1,$2,$3,$4,$5,$6) returning ${LACQUER_COLS}`,
      [input.name, input.maker, input.solidsPct, input.densityGCm3, input.activationEnergyKJMol, input.note ?? null],
      t,
    );
    await audit(actorOf(user, address), { action: 'lacquer.create', entity: 'lacquer', entityId: row!.id, after: row }, t);
    return row!;
  });
}

/** Every window version, newest first within each lacquer × substrate. */
export async function listWindows(filter: { status?: WindowStatus } = {}): Promise<WindowRow[]> {
  const rows = await q<RawWindow>(
    `${WINDOW_SELECT} where ($1::text is null or pw.status = $1) order by l.name, m.refractive_index, m.name, pw.version desc`,
    [filter.status ?? null],
  );
  return rows.map(toWindow);
}

export async function getWindow(id: number, t?: Transaction): Promise<WindowRow> {
  const [row] = await q<RawWindow>(`${WINDOW_SELECT} where pw.id = $1`, [id], t);
  if (!row) throw new HttpProblem(404, 'Not found', 'No such process window.');
  return toWindow(row);
}

export interface WindowVersion extends WindowRow {
  /** Changes against the previous version (empty for version 1). */
  changes: LimitChange[];
  previousId: number | null;
}

/** A window with all versions of its lacquer × substrate and each version's diff vs the previous one. */
export async function windowWithVersions(
  id: number,
): Promise<{ window: WindowRow; versions: WindowVersion[]; assignments: AssignmentRow[] }> {
  const window = await getWindow(id);
  const rows = (
    await q<RawWindow>(`${WINDOW_SELECT} where pw.lacquer_id = $1 and pw.material_id = $2 order by pw.version`, [
      window.lacquerId,
      window.materialId,
    ])
  ).map(toWindow);
  const versions = rows
    .map((w, i) => {
      const prev = i > 0 ? rows[i - 1]! : null;
      return { ...w, changes: prev ? diffLimits(prev.limits, w.limits) : [], previousId: prev?.id ?? null };
    })
    .reverse();
  const ids = new Set(rows.map((r) => r.id));
  const assignments = (await listAssignments(pgPool())).filter((a) => ids.has(a.windowId));
  return { window, versions, assignments };
}

export async function createDraft(user: SessionUser, input: WindowDraftCreate, address: string | null): Promise<WindowRow> {
  return db().transaction(async (t) => {
    const [pair] = await q<{ lacquer: number | null; material: number | null }>(
      `select (select id from lacquers where id = $1) as lacquer, (select id from materials where id = $2 and active) as material`,
      [input.lacquerId, input.materialId],
      t,
    );
    if (!pair?.lacquer)
      throw new HttpProblem(400, 'Invalid input', 'No such lacquer.', {
        errors: [{ path: 'lacquerId', message: 'No such lacquer.' }],
      });
    if (!pair.material)
      throw new HttpProblem(400, 'Invalid input', 'No such active substrate.', {
        errors: [{ path: 'materialId', message: 'No such active substrate.' }],
      });
    // Serialise versions of this lacquer × substrate.
    await q(`select pg_advisory_xact_lock(hashtext('process_windows'), $1)`, [input.lacquerId * 1000 + input.materialId], t);
    const [draft] = await q<{ id: number; version: number }>(
      `select id, version from process_windows where lacquer_id = $1 and material_id = $2 and status = 'draft'`,
      [input.lacquerId, input.materialId],
      t,
    );
    if (draft) {
      throw new HttpProblem(
        409,
        'A draft exists',
        `Version ${draft.version} of this window is still a draft: edit or approve it first.`,
        { draftId: draft.id },
      );
    }
    const [next] = await q<{ v: number }>(
      `select coalesce(max(version), 0) + 1 as v from process_windows where lacquer_id = $1 and material_id = $2`,
      [input.lacquerId, input.materialId],
      t,
    );
    const [row] = await q<{ id: number }>(
      `insert into process_windows (lacquer_id, material_id, version, name, status, limits, note, created_by)
       values ($1, $2, $3, $4, 'draft', $5::jsonb, $6, $7) returning id`,
      [input.lacquerId, input.materialId, next!.v, input.name, JSON.stringify(input.limits), input.note ?? null, user.id],
      t,
    );
    const created = await getWindow(row!.id, t);
    await audit(
      actorOf(user, address),
      { action: 'window.draft', entity: 'process_window', entityId: created.id, after: created },
      t,
    );
    return created;
  });
}

export async function updateDraft(
  user: SessionUser,
  id: number,
  input: WindowDraftUpdate,
  address: string | null,
): Promise<WindowRow> {
  return db().transaction(async (t) => {
    const [locked] = await q<{ status: string }>(`select status from process_windows where id = $1 for update`, [id], t);
    if (!locked) throw new HttpProblem(404, 'Not found', 'No such process window.');
    if (locked.status !== 'draft')
      throw new HttpProblem(
        409,
        'Not a draft',
        `This version is ${locked.status}; only drafts can be edited. Create a new draft instead.`,
      );
    const before = await getWindow(id, t);
    await q(
      `update process_windows set name = coalesce($2, name), limits = coalesce($3::jsonb, limits), note = coalesce($4, note), updated_at = now() where id = $1 returning id`,
      [id, input.name ?? null, input.limits ? JSON.stringify(input.limits) : null, input.note ?? null],
      t,
    );
    const after = await getWindow(id, t);
    await audit(actorOf(user, address), { action: 'window.edit', entity: 'process_window', entityId: id, before, after }, t);
    return after;
  });
}

/**
 * Approve a draft with an electronic signature: it becomes effective from now and the
 * previously effective version of the same lacquer × substrate is superseded at that instant.
 */
export async function approveWindow(
  user: SessionUser,
  id: number,
  input: WindowApprove,
  address: string | null,
): Promise<WindowRow> {
  const current = await getWindow(id);
  if (current.status !== 'draft') throw new HttpProblem(409, 'Not a draft', `This version is already ${current.status}.`);
  const signature = await signWithPassword(user, input.password, input.meaning, address);
  return db().transaction(async (t) => {
    await q(`select pg_advisory_xact_lock(hashtext('process_windows'), $1)`, [current.lacquerId * 1000 + current.materialId], t);
    const [locked] = await q<{ status: string }>(`select status from process_windows where id = $1 for update`, [id], t);
    if (locked?.status !== 'draft') throw new HttpProblem(409, 'Not a draft', 'This version was approved meanwhile.');
    const [{ now }] = (await q<{ now: Date }>(`select clock_timestamp() as now`, [], t)) as [{ now: Date }];
    const superseded = await q<{ id: number; version: number }>(
      `update process_windows set status = 'superseded', superseded_at = $3, updated_at = $3
        where lacquer_id = $1 and material_id = $2 and status = 'effective' returning id, version`,
      [current.lacquerId, current.materialId, now],
      t,
    );
    await q(
      `update process_windows set status = 'effective', effective_from = $2, approved_by = $3, approved_signature = $4::jsonb, updated_at = $2
        where id = $1 returning id`,
      [id, now, user.id, JSON.stringify(signature)],
      t,
    );
    const after = await getWindow(id, t);
    const actor: Actor = actorOf(user, address);
    await audit(
      actor,
      { action: 'window.approve', entity: 'process_window', entityId: id, before: current, after, signature },
      t,
    );
    for (const s of superseded) {
      await audit(
        actor,
        {
          action: 'window.supersede',
          entity: 'process_window',
          entityId: s.id,
          before: { status: 'effective' },
          after: { status: 'superseded', supersededAt: now.toISOString(), by: id },
        },
        t,
      );
    }
    return after;
  });
}

/** Assign a window (its lacquer × substrate recipe) to a line or an oven from a time on. */
export async function assignWindow(user: SessionUser, input: WindowAssign, address: string | null): Promise<AssignmentRow> {
  return db().transaction(async (t) => {
    const [asset] = await q<{ id: number; kind: string; code: string }>(
      `select id, kind, code from assets where id = $1`,
      [input.assetId],
      t,
    );
    if (!asset)
      throw new HttpProblem(400, 'Invalid input', 'No such line or oven.', {
        errors: [{ path: 'assetId', message: 'No such line or oven.' }],
      });
    if (!['line', 'oven', 'coater'].includes(asset.kind)) {
      throw new HttpProblem(400, 'Invalid input', 'Windows are assigned to a dip line, an oven or a coater.', {
        errors: [{ path: 'assetId', message: `A ${asset.kind} cannot run a window; choose its line or oven.` }],
      });
    }
    const w = await getWindow(input.windowId, t);
    if (w.status === 'draft') {
      throw new HttpProblem(400, 'Invalid input', 'A draft cannot be assigned; approve it first.', {
        errors: [{ path: 'windowId', message: 'This version is a draft.' }],
      });
    }
    const [{ now }] = (await q<{ now: Date }>(`select clock_timestamp() as now`, [], t)) as [{ now: Date }];
    const from = input.from ? new Date(input.from) : now;
    await q(`select pg_advisory_xact_lock(hashtext('window_assignments'), $1)`, [asset.id], t);
    const [latest] = await q<{ id: number; valid_from: Date; valid_to: Date | null; window_id: number }>(
      `select id, valid_from, valid_to, window_id from window_assignments where asset_id = $1 order by valid_from desc limit 1 for update`,
      [asset.id],
      t,
    );
    if (latest && from.getTime() <= latest.valid_from.getTime()) {
      throw new HttpProblem(
        409,
        'Overlaps the history',
        `The latest assignment of ${asset.code} starts ${latest.valid_from.toISOString()}; a new one must start after it.`,
        {
          errors: [{ path: 'from', message: 'Must be after the start of the current assignment.' }],
        },
      );
    }
    if (latest && latest.valid_to === null) {
      await q(`update window_assignments set valid_to = $2 where id = $1 returning id`, [latest.id, from], t);
    }
    const [row] = await q<{ id: number }>(
      `insert into window_assignments (asset_id, window_id, valid_from, assigned_by, note) values ($1, $2, $3, $4, $5) returning id`,
      [asset.id, w.id, from, user.id, input.note ?? null],
      t,
    );
    await audit(
      actorOf(user, address),
      {
        action: 'window.assign',
        entity: 'window_assignment',
        entityId: row!.id,
        before: latest ? { assignmentId: latest.id, windowId: latest.window_id, validTo: from.toISOString() } : null,
        after: {
          assetId: asset.id,
          asset: asset.code,
          windowId: w.id,
          window: `${w.name} v${w.version}`,
          validFrom: from.toISOString(),
          note: input.note ?? null,
        },
      },
      t,
    );
    return {
      id: row!.id,
      assetId: asset.id,
      assetCode: asset.code,
      assetName: asset.code,
      windowId: w.id,
      windowName: w.name,
      windowVersion: w.version,
      lacquer: w.lacquer,
      substrate: w.substrate,
      validFrom: from.toISOString(),
      validTo: null,
      assignedBy: user.username,
      note: input.note ?? null,
    };
  });
}

export { listAssignments, windowInForce };

/** Lines, ovens and coaters a window can be assigned to. */
export async function assignableAssets(): Promise<{ id: number; code: string; name: string; kind: string }[]> {
  return q(`select id, code, name, kind from assets where kind in ('line','oven','coater') order by kind, code`);
}

/** What each line/oven runs now (for the windows overview). */
export async function inForceNow(): Promise<
  { assetId: number; code: string; name: string; kind: string; window: Awaited<ReturnType<typeof windowInForce>> }[]
> {
  const assets = await assignableAssets();
  const now = Date.now();
  return Promise.all(
    assets.map(async (a) => ({
      assetId: a.id,
      code: a.code,
      name: a.name,
      kind: a.kind,
      window: await windowInForce(pgPool(), a.id, now),
    })),
  );
}
