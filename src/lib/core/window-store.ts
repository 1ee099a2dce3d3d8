/**
 * Which process window is in force for an asset at a time, and the window versions as the
 * screens show them (worker-safe: takes the Sequelize instance or a transaction, imports neither
 * astro:env nor the web app's db handles).
 *
 * These reads stay SQL through `sequelize.query`: "in force" is one recursive walk up the asset
 * tree that the worker runs per channel and the floor per asset (one round trip instead of one
 * per ancestor), and the views join lacquers and materials, which are the baths area's tables.
 *
 * An assignment names a window (a lacquer × substrate recipe, any version) for a line or an
 * oven over [valid_from, valid_to). The version in force at `atMs` is the one of that recipe
 * that was effective then (approved at or before `atMs` and not yet superseded), so approving
 * a new version takes effect on every line running the recipe without re-assigning.
 * A tank, zone or coater walks up the asset tree to the nearest assigned ancestor.
 */
import type { SignatureRecord } from '../../../db/models/index.ts';
import type { ProcessWindowInForce, ProcessWindowLimits, WindowStatus } from '../shared/windows.ts';
import { select, type AnyDb } from './db.ts';

interface Row {
  id: number;
  version: number;
  name: string;
  lacquer: string;
  substrate: string;
  limits: ProcessWindowLimits;
  effective_from: Date;
}

const IN_FORCE_SQL = `
  with recursive up(id, parent_id, depth) as (
    select id, parent_id, 0 from assets where id = $1
    union all
    select a.id, a.parent_id, up.depth + 1 from assets a join up on a.id = up.parent_id where up.depth < 16
  ), asg as (
    select wa.window_id from up join window_assignments wa on wa.asset_id = up.id
    where wa.valid_from <= $2 and (wa.valid_to is null or wa.valid_to > $2)
    order by up.depth, wa.valid_from desc
    limit 1
  )
  select pw.id, pw.version, pw.name, l.name as lacquer, m.name as substrate, pw.limits, pw.effective_from
  from asg
  join process_windows base on base.id = asg.window_id
  join process_windows pw on pw.lacquer_id = base.lacquer_id and pw.material_id = base.material_id
  join lacquers l on l.id = pw.lacquer_id
  join materials m on m.id = pw.material_id
  where pw.status <> 'draft' and pw.effective_from <= $2 and (pw.superseded_at is null or pw.superseded_at > $2)
  order by pw.version desc
  limit 1`;

function toInForce(r: Row): ProcessWindowInForce {
  return {
    id: r.id,
    version: r.version,
    name: r.name,
    lacquer: r.lacquer,
    substrate: r.substrate,
    limits: r.limits,
    effectiveFrom: r.effective_from.toISOString(),
  };
}

/** The window in force for `assetId` (line, tank, oven, zone…) at `atMs`, or null. */
export async function windowInForce(q: AnyDb, assetId: number, atMs: number): Promise<ProcessWindowInForce | null> {
  const rows = await select<Row>(q, IN_FORCE_SQL, [assetId, new Date(atMs)]);
  return rows[0] ? toInForce(rows[0]) : null;
}

export interface AssignmentRow {
  id: number;
  assetId: number;
  assetCode: string;
  assetName: string;
  windowId: number;
  windowName: string;
  windowVersion: number;
  lacquer: string;
  substrate: string;
  validFrom: string;
  validTo: string | null;
  assignedBy: string | null;
  note: string | null;
}

/** Assignment history, newest first (optionally for one asset). */
export async function listAssignments(q: AnyDb, assetId?: number): Promise<AssignmentRow[]> {
  const rows = await select<{
    id: number;
    asset_id: number;
    asset_code: string;
    asset_name: string;
    window_id: number;
    window_name: string;
    version: number;
    lacquer: string;
    substrate: string;
    valid_from: Date;
    valid_to: Date | null;
    assigned_by: string | null;
    note: string | null;
  }>(
    q,
    `select wa.id, wa.asset_id, a.code as asset_code, a.name as asset_name, wa.window_id, pw.name as window_name, pw.version,
            l.name as lacquer, m.name as substrate, wa.valid_from, wa.valid_to, u.username as assigned_by, wa.note
       from window_assignments wa
       join assets a on a.id = wa.asset_id
       join process_windows pw on pw.id = wa.window_id
       join lacquers l on l.id = pw.lacquer_id
       join materials m on m.id = pw.material_id
       left join users u on u.id = wa.assigned_by
      where ($1::int is null or wa.asset_id = $1)
      order by wa.valid_from desc, wa.id desc`,
    [assetId ?? null],
  );
  return rows.map((r) => ({
    id: r.id,
    assetId: r.asset_id,
    assetCode: r.asset_code,
    assetName: r.asset_name,
    windowId: r.window_id,
    windowName: r.window_name,
    windowVersion: r.version,
    lacquer: r.lacquer,
    substrate: r.substrate,
    validFrom: r.valid_from.toISOString(),
    validTo: r.valid_to ? r.valid_to.toISOString() : null,
    assignedBy: r.assigned_by,
    note: r.note,
  }));
}

/** One version of a process window as the screens show it. */
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

export const WINDOW_SELECT = `
  select pw.id, pw.lacquer_id as "lacquerId", l.name as lacquer, pw.material_id as "materialId", m.name as substrate,
         pw.version, pw.name, pw.status, pw.limits, pw.note, cu.username as "createdBy", pw.created_at as "createdAt",
         pw.updated_at as "updatedAt", au.username as "approvedBy", pw.approved_signature as "approvedSignature",
         pw.effective_from as "effectiveFrom", pw.superseded_at as "supersededAt"
    from process_windows pw
    join lacquers l on l.id = pw.lacquer_id
    join materials m on m.id = pw.material_id
    left join users cu on cu.id = pw.created_by
    left join users au on au.id = pw.approved_by`;

export type RawWindow = Omit<WindowRow, 'createdAt' | 'updatedAt' | 'effectiveFrom' | 'supersededAt'> & {
  createdAt: Date;
  updatedAt: Date;
  effectiveFrom: Date | null;
  supersededAt: Date | null;
};

export function toWindow(r: RawWindow): WindowRow {
  return {
    ...r,
    createdAt: iso(r.createdAt)!,
    updatedAt: iso(r.updatedAt)!,
    effectiveFrom: iso(r.effectiveFrom),
    supersededAt: iso(r.supersededAt),
  };
}

/** One window version by id, or null. */
export async function windowById(q: AnyDb, id: number): Promise<WindowRow | null> {
  const [row] = await select<RawWindow>(q, `${WINDOW_SELECT} where pw.id = $1`, [id]);
  return row ? toWindow(row) : null;
}
