/**
 * Process windows (recipes): drafts, signed approval, versions with their diff, and which
 * window each line/oven runs over time. Every change is audited in the same transaction.
 */
import type { Transaction } from 'sequelize';
import {
  diffLimits,
  type LimitChange,
  type WindowApprove,
  type WindowAssign,
  type WindowDraftCreate,
  type WindowDraftUpdate,
  type WindowStatus,
} from '../../shared/windows.ts';
import type { LacquerCreate, MaterialCreate } from '../../shared/baths.ts';
import { auditIn, withTransaction } from '../../../../db/transaction.ts';
import { signWithPassword, type SessionUser } from '../auth.ts';
import { sequelize } from '../db.ts';
import { actorOf } from '../guard.ts';
import { HttpProblem } from '../http.ts';
import { select } from '../../core/db.ts';
import {
  listAssignments as listAssignmentRows,
  toWindow,
  WINDOW_SELECT,
  windowById,
  windowInForce as windowInForceAt,
  type AssignmentRow,
  type RawWindow,
  type WindowRow,
} from '../../core/window-store.ts';
import {
  approveWindowDraft,
  assignWindowToAsset,
  createWindowDraft,
  updateWindowDraft,
  type WindowEditor,
} from '../../core/window-commands.ts';

export type { WindowRow };

/** Raw SQL with $n binds, optionally inside a transaction (lacquers and materials have no models in this area). */
export async function q<T extends object>(sql: string, bind: unknown[] = [], transaction?: Transaction): Promise<T[]> {
  return select<T>(transaction ?? sequelize(), sql, bind);
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

export async function listMaterials(): Promise<MaterialRow[]> {
  return q<MaterialRow>(
    `select id, code, name, refractive_index as "refractiveIndex", active from materials order by refractive_index, name`,
  );
}

export async function createMaterial(user: SessionUser, input: MaterialCreate, address: string | null): Promise<MaterialRow> {
  return withTransaction(sequelize(), async (t) => {
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
    await auditIn(t, actorOf(user, address), { action: 'material.create', entity: 'material', entityId: row!.id, after: row });
    return row!;
  });
}

const LACQUER_COLS = `id, name, maker, solids_pct as "solidsPct", density_g_cm3 as "densityGCm3", activation_energy_kj_mol as "activationEnergyKJMol", note`;

export async function listLacquers(): Promise<LacquerRow[]> {
  return q<LacquerRow>(`select ${LACQUER_COLS} from lacquers order by name`);
}

export async function createLacquer(user: SessionUser, input: LacquerCreate, address: string | null): Promise<LacquerRow> {
  return withTransaction(sequelize(), async (t) => {
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
    await auditIn(t, actorOf(user, address), { action: 'lacquer.create', entity: 'lacquer', entityId: row!.id, after: row });
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

export async function getWindow(id: number): Promise<WindowRow> {
  const row = await windowById(sequelize(), id);
  if (!row) throw new HttpProblem(404, 'Not found', 'No such process window.');
  return row;
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
  const assignments = (await listAssignmentRows(sequelize())).filter((a) => ids.has(a.windowId));
  return { window, versions, assignments };
}

function editorOf(user: SessionUser, address: string | null): WindowEditor {
  return { ...actorOf(user, address), username: user.username };
}

export async function createDraft(user: SessionUser, input: WindowDraftCreate, address: string | null): Promise<WindowRow> {
  return createWindowDraft(sequelize(), editorOf(user, address), input);
}

export async function updateDraft(
  user: SessionUser,
  id: number,
  input: WindowDraftUpdate,
  address: string | null,
): Promise<WindowRow> {
  return updateWindowDraft(sequelize(), editorOf(user, address), id, input);
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
  return approveWindowDraft(sequelize(), editorOf(user, address), id, signature);
}

/** Assign a window (its lacquer × substrate recipe) to a line or an oven from a time on. */
export async function assignWindow(user: SessionUser, input: WindowAssign, address: string | null): Promise<AssignmentRow> {
  return assignWindowToAsset(sequelize(), editorOf(user, address), input);
}

/** Assignment history, newest first (optionally for one asset). */
export async function listAssignments(assetId?: number): Promise<AssignmentRow[]> {
  return listAssignmentRows(sequelize(), assetId);
}

/** The window in force for an asset at a time, or null. */
export async function windowInForce(assetId: number, atMs: number) {
  return windowInForceAt(sequelize(), assetId, atMs);
}

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
      window: await windowInForce(a.id, now),
    })),
  );
}
