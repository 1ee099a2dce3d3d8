/**
 * Traceability of one job (product.md §6, `GET /api/v1/trace/jobs/{jobNumber}`): its dip runs
 * with the bath as it was at dip time (charge, lot, bath age against pot life, the last check
 * before the dip and its viscosity against the window), the oven load(s) with the cure record,
 * verdict and the alarms during the load, its tests, and its siblings — every other job that
 * shared a load with it, or was dipped from the same bath charge within ± N hours (default 8,
 * site setting `trace.bathSiblingHours`) — with their test status and holds.
 */
import { bathAge, type BathAge } from '../../domain/film/bath-maintenance.ts';
import { DEFAULT_TRACE_SETTINGS, TraceSettingsSchema, type TestKind, type TestResult } from '../../shared/quality.ts';
import type { StoredCureRecord } from '../../shared/jobs.ts';
import type { Range } from '../../shared/windows.ts';
import { Hold, Job, QualityTest, TestFile, User } from '../../../../db/models/index.ts';
import { sequelize } from '../db.ts';
import { selectRows } from '../../core/record-db.ts';

/** A raw SELECT through the web process's Sequelize instance (bind parameters). */
const rawRows = <T extends object>(sql: string, bind: unknown[] = []) => selectRows<T>(sequelize(), sql, bind);
import { readSetting } from '../../core/settings-store.ts';
import { alarmsDuring } from './loads.ts';
import type { TraceDipRun, TraceLoad, TraceTest, TraceSibling, TraceResult } from '../../shared/trace-views.ts';

const iso = (d: Date | null) => (d ? d.toISOString() : null);

/** The sibling window in hours (site setting, default 8 h). */
export async function siblingHours(): Promise<number> {
  return (await readSetting(sequelize(), 'trace', TraceSettingsSchema, DEFAULT_TRACE_SETTINGS)).bathSiblingHours;
}

/** The trace of a job, or null when the job is unknown. */
export async function traceJob(jobNumber: string, hoursOverride?: number): Promise<TraceResult | null> {
  const hours = hoursOverride ?? (await siblingHours());
  const j = (await Job.findOne({
    attributes: ['id', 'jobNumber', 'customerRef', 'lensMaterial', 'status'],
    where: { jobNumber },
    include: [
      {
        model: Hold,
        attributes: ['id', 'reason', 'placedAt'],
        where: { status: 'active' },
        required: false,
        include: [{ model: User, as: 'placer', attributes: ['displayName'] }],
      },
    ],
  })) as (Job & { Holds: (Hold & { placer: User | null })[] }) | null;
  if (!j) return null;
  const hold = j.Holds[0] ?? null;

  // Dip runs with the bath as it was at the dip.
  const dr = await rawRows<{
    id: number;
    dipped_at: Date;
    line_id: number;
    line_code: string;
    line_name: string;
    tank_id: number | null;
    tank_code: string | null;
    tank_name: string | null;
    rack_code: string | null;
    speed: number | null;
    samples: number | null;
    window_id: number | null;
    window_name: string | null;
    window_version: number | null;
    limits: { withdrawalSpeedMmS?: Range; viscosityMm2S?: Range } | null;
    charge_id: number | null;
    charged_at: Date | null;
    lot_code: string | null;
    lacquer: string | null;
    expires_on: string | null;
    pot_life_days: number | null;
    check_id: number | null;
    check_at: Date | null;
    kinematic_mm2s: number | null;
    method: string | null;
    cup: string | null;
    efflux_seconds: number | null;
    bath_temp_c: number | null;
    solids_pct: number | null;
    check_by: string | null;
    jobs_in_run: number;
    sensor_visc: number | null;
  }>(
    `select d.id, d.dipped_at, la.id as line_id, la.code as line_code, la.name as line_name, ta.id as tank_id, ta.code as tank_code, ta.name as tank_name,
            k.code as rack_code, d.withdrawal_speed_mm_s as speed, d.stroke_samples as samples, pw.id as window_id, pw.name as window_name,
            pw.version as window_version, pw.limits, ch.id as charge_id, ch.charged_at, lo.lot_code, lq.name as lacquer,
            to_char(lo.expires_on, 'YYYY-MM-DD') as expires_on, ch.pot_life_days, bc.id as check_id, bc.at as check_at, bc.kinematic_mm2s, bc.method,
            bc.cup, bc.efflux_seconds, bc.bath_temp_c, bc.solids_pct, bc.by_label as check_by,
            (select count(*)::int from dip_run_jobs x where x.dip_run_id = d.id) as jobs_in_run,
            (select r.value from readings r join channels c on c.id = r.channel_id
              where c.asset_id = d.tank_asset_id and c.kind = 'viscosity' and r.quality < 2
                and r.ts <= d.dipped_at and r.ts > d.dipped_at - interval '30 minutes' order by r.ts desc limit 1) as sensor_visc
       from dip_run_jobs dj
       join dip_runs d on d.id = dj.dip_run_id
       join assets la on la.id = d.line_asset_id
       left join assets ta on ta.id = d.tank_asset_id
       left join racks k on k.id = d.rack_id
       left join process_windows pw on pw.id = d.window_id
       left join bath_charges ch on ch.id = d.bath_charge_id
       left join lacquer_lots lo on lo.id = ch.lot_id
       left join lacquers lq on lq.id = lo.lacquer_id
       left join bath_checks bc on bc.id = d.last_check_id
      where dj.job_id = $1 order by d.dipped_at`,
    [j.id],
  );
  const dipRuns: TraceDipRun[] = dr.map((r) => {
    const vw = r.limits?.viscosityMm2S ?? null;
    const v = r.kinematic_mm2s;
    let age: BathAge | null = null;
    if (r.charged_at && r.pot_life_days && r.dipped_at.getTime() >= r.charged_at.getTime()) {
      age = bathAge({ chargedAtMs: r.charged_at.getTime(), nowMs: r.dipped_at.getTime(), potLifeDays: r.pot_life_days });
    }
    return {
      id: r.id,
      dippedAt: r.dipped_at.toISOString(),
      line: { id: r.line_id, code: r.line_code, name: r.line_name },
      tank: r.tank_id ? { id: r.tank_id, code: r.tank_code!, name: r.tank_name! } : null,
      rackCode: r.rack_code,
      withdrawalSpeedMmS: r.speed,
      strokeSamples: r.samples,
      speedWindow: r.limits?.withdrawalSpeedMmS ?? null,
      window: r.window_id ? { id: r.window_id, name: r.window_name!, version: r.window_version! } : null,
      jobsInRun: r.jobs_in_run,
      bath: {
        charge: r.charge_id
          ? {
              id: r.charge_id,
              chargedAt: r.charged_at!.toISOString(),
              lotCode: r.lot_code!,
              lacquer: r.lacquer!,
              lotExpiresOn: r.expires_on!,
              potLifeDays: r.pot_life_days!,
              age,
            }
          : null,
        lastCheck: r.check_id
          ? {
              id: r.check_id,
              at: r.check_at!.toISOString(),
              minutesBeforeDip: (r.dipped_at.getTime() - r.check_at!.getTime()) / 60_000,
              kinematicMm2S: r.kinematic_mm2s!,
              method: r.method!,
              cup: r.cup,
              effluxSeconds: r.efflux_seconds,
              bathTempC: r.bath_temp_c,
              solidsPct: r.solids_pct,
              by: r.check_by!,
            }
          : null,
        sensorViscosityMm2S: r.sensor_visc,
        viscosityWindow: vw,
        viscosityStatus: v === null || !vw ? 'unknown' : v < vw.min ? 'low' : v > vw.max ? 'high' : 'in',
      },
    };
  });

  // Loads with record and alarms.
  const lr = await rawRows<{
    id: number;
    oven_id: number;
    oven_code: string;
    oven_name: string;
    opened_at: Date;
    closed_at: Date | null;
    status: 'open' | 'closed';
    verdict: StoredCureRecord['verdict'] | null;
    record: StoredCureRecord | null;
    jobs_in_load: number;
  }>(
    `select l.id, o.id as oven_id, o.code as oven_code, o.name as oven_name, l.opened_at, l.closed_at, l.status, l.verdict, l.record,
            (select count(*)::int from load_jobs x where x.load_id = l.id) as jobs_in_load
       from load_jobs lj join oven_loads l on l.id = lj.load_id join assets o on o.id = l.oven_asset_id
      where lj.job_id = $1 order by l.opened_at`,
    [j.id],
  );
  const loads: TraceLoad[] = [];
  for (const r of lr) {
    loads.push({
      id: r.id,
      oven: { id: r.oven_id, code: r.oven_code, name: r.oven_name },
      openedAt: r.opened_at.toISOString(),
      closedAt: iso(r.closed_at),
      status: r.status,
      verdict: r.verdict,
      record: r.record,
      alarms: await alarmsDuring(r.oven_id, r.id, r.opened_at.getTime(), r.closed_at?.getTime() ?? Date.now()),
      jobsInLoad: r.jobs_in_load,
    });
  }

  const tr = (await QualityTest.findAll({
    attributes: ['id', 'kind', 'result', 'testedAt', 'testedByLabel', 'computed', 'boilCycles'],
    where: { jobId: j.id },
    include: [{ model: TestFile, attributes: ['id'] }],
    order: [['testedAt', 'ASC']],
  })) as (QualityTest & { TestFiles: TestFile[] })[];
  const tests: TraceTest[] = tr.map((t) => ({
    id: t.id,
    kind: t.kind,
    result: t.result,
    testedAt: t.testedAt.toISOString(),
    testedBy: t.testedByLabel,
    summary: String(t.computed['summary'] ?? ''),
    boilCycles: t.boilCycles,
    files: t.TestFiles.length,
  }));

  // Siblings: same load(s); same tank and bath charge within ± hours of each of the job's dips.
  const sr = await rawRows<{
    job_id: number;
    job_number: string;
    status: string;
    load_ids: number[] | null;
    bath_runs: { dipRunId: number; dippedAt: string; hoursApart: number }[] | null;
    tests: number;
    failed: number;
    last_kind: TestKind | null;
    last_result: TestResult | null;
    last_at: Date | null;
    hold_id: number | null;
  }>(
    `with my_loads as (select load_id from load_jobs where job_id = $1),
          my_dips as (select d.id, d.tank_asset_id, d.bath_charge_id, d.dipped_at from dip_run_jobs dj join dip_runs d on d.id = dj.dip_run_id where dj.job_id = $1),
          by_load as (
            select lj.job_id, array_agg(distinct lj.load_id order by lj.load_id) as load_ids
              from load_jobs lj where lj.load_id in (select load_id from my_loads) and lj.job_id <> $1 group by lj.job_id),
          by_bath as (
            select dj2.job_id,
                   jsonb_agg(distinct jsonb_build_object('dipRunId', d2.id, 'dippedAt', to_char(d2.dipped_at at time zone 'UTC', 'YYYY-MM-DD"T"HH24:MI:SS.MS"Z"'),
                     'hoursApart', round((abs(extract(epoch from d2.dipped_at - m.dipped_at)) / 3600)::numeric, 2))) as bath_runs
              from my_dips m
              join dip_runs d2 on d2.tank_asset_id is not distinct from m.tank_asset_id
                               and d2.bath_charge_id is not distinct from m.bath_charge_id
                               and d2.dipped_at between m.dipped_at - make_interval(secs => $2 * 3600) and m.dipped_at + make_interval(secs => $2 * 3600)
              join dip_run_jobs dj2 on dj2.dip_run_id = d2.id
             where dj2.job_id <> $1 and m.tank_asset_id is not null
             group by dj2.job_id),
          sib as (select job_id from by_load union select job_id from by_bath)
     select j.id as job_id, j.job_number, j.status, bl.load_ids, bb.bath_runs,
            (select count(*)::int from quality_tests t where t.job_id = j.id) as tests,
            (select count(*)::int from quality_tests t where t.job_id = j.id and t.result = 'fail') as failed,
            lt.kind as last_kind, lt.result as last_result, lt.tested_at as last_at, h.id as hold_id
       from sib s join jobs j on j.id = s.job_id
       left join by_load bl on bl.job_id = s.job_id
       left join by_bath bb on bb.job_id = s.job_id
       left join lateral (select kind, result, tested_at from quality_tests t where t.job_id = j.id order by tested_at desc limit 1) lt on true
       left join holds h on h.job_id = j.id and h.status = 'active'
      order by (bl.load_ids is not null) desc, j.job_number`,
    [j.id, hours],
  );
  const siblings: TraceSibling[] = sr.map((r) => ({
    jobNumber: r.job_number,
    status: r.status,
    sameLoads: r.load_ids ?? [],
    sameBathRuns: (r.bath_runs ?? [])
      .map((b) => ({ ...b, hoursApart: Number(b.hoursApart) }))
      .sort((a, b) => a.dippedAt.localeCompare(b.dippedAt)),
    tests: r.tests,
    failed: r.failed,
    lastTest:
      r.last_kind && r.last_result && r.last_at
        ? { kind: r.last_kind, result: r.last_result, testedAt: r.last_at.toISOString() }
        : null,
    activeHoldId: r.hold_id,
  }));

  return {
    job: {
      id: j.id,
      jobNumber: j.jobNumber,
      customerRef: j.customerRef,
      lensMaterial: j.lensMaterial,
      status: j.status,
      activeHold: hold
        ? { id: hold.id, reason: hold.reason, placedAt: hold.placedAt.toISOString(), placedBy: hold.placer?.displayName ?? null }
        : null,
    },
    dipRuns,
    loads,
    tests,
    siblings,
    siblingWindowHours: hours,
  };
}
