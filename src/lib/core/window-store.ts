/**
 * Which process window is in force for an asset at a time (worker-safe: takes a pg.Pool,
 * imports neither astro:env nor the web app's db handles).
 *
 * An assignment names a window (a lacquer × substrate recipe, any version) for a line or an
 * oven over [valid_from, valid_to). The version in force at `atMs` is the one of that recipe
 * that was effective then (approved at or before `atMs` and not yet superseded), so approving
 * a new version takes effect on every line running the recipe without re-assigning.
 * A tank, zone or coater walks up the asset tree to the nearest assigned ancestor.
 */
import type pg from 'pg';
import type { ProcessWindowInForce, ProcessWindowLimits } from '../shared/windows.ts';

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
export async function windowInForce(pool: pg.Pool, assetId: number, atMs: number): Promise<ProcessWindowInForce | null> {
  const { rows } = await pool.query<Row>(IN_FORCE_SQL, [assetId, new Date(atMs)]);
  return rows[0] ? toInForce(rows[0]) : null;
}

/** The windows in force for several assets at one time (a map keyed by asset id; absent = none). */
export async function windowsInForce(
  pool: pg.Pool,
  assetIds: readonly number[],
  atMs: number,
): Promise<Map<number, ProcessWindowInForce>> {
  const out = new Map<number, ProcessWindowInForce>();
  for (const id of new Set(assetIds)) {
    const w = await windowInForce(pool, id, atMs);
    if (w) out.set(id, w);
  }
  return out;
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
export async function listAssignments(pool: pg.Pool, assetId?: number): Promise<AssignmentRow[]> {
  const { rows } = await pool.query<{
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
