/**
 * The demo's traceability story: jobs dipped on the two lines, racks, dip runs
 * with their bath charge, last bath check and the stroke's withdrawal speed from the seeded
 * readings, an oven load for every seeded cycle with its cure record computed from the seeded
 * readings (through the load store, as the worker would), and quality tests.
 *
 * The story: oven B's load about 9 days back was taken out after 70 minutes of soak instead of
 * 180 — the record says under-cured and a cure alarm was raised. Two days later six of its jobs
 * failed the cross-cut test (10–25 % of the lattice removed: ISO 2409 class 2–3 / ASTM D3359
 * 3B–2B); a few more of that load were inspected and looked fine; the rest were never tested.
 * Every other load's sampled tests pass, apart from an occasional class-1 cross-cut. A quality
 * user can go Quality → failed test → trace → the under-cured load → hold its siblings.
 *
 * Invented data. Deterministic for a given history (the lists of plant-model.ts and the
 * `demoHistory` setting written by seeds/history.ts). Idempotent: the `demoStory` setting marks
 * it done; `unseedStory` removes it again.
 */
import type pg from 'pg';
import type { Sequelize } from 'sequelize';
import { judgeTest, type TestMeasurement } from '../src/lib/domain/quality/acceptance.ts';
import { AMS2750_CLASSES, uniformitySurvey } from '../src/lib/domain/oven/uniformity.ts';
import { acceptanceSettings, attachFile } from '../src/lib/core/quality-store.ts';
import { recordPastLoad } from '../src/lib/core/load-store.ts';
import { windowInForce } from '../src/lib/core/window-store.ts';
import type { DefectType } from '../src/lib/shared/quality.ts';
import { autoStabilisedIndex, parseSurveyCsv } from '../src/lib/shared/surveys.ts';
import {
  HOUR_MS,
  MINUTE_MS,
  atLocal,
  demoDipStrokes,
  demoOvenCycles,
  localDayKey,
  rngFrom,
  seedOf,
  type DipStroke,
  type OvenCycle,
} from './plant-model.ts';

export interface SeedStoryOptions {
  /** "Now" of the history; default: the `demoHistory` setting's nowMs, else Date.now(). */
  nowMs?: number;
  days?: number;
  log?: (line: string) => void;
}

export interface SeedStoryResult {
  seeded: boolean;
  reason?: string;
  jobs: number;
  dipRuns: number;
  loads: number;
  tests: number;
  storyLoadId: number | null;
  failedJobs: string[];
}

/** Flash-off between the dip and the oven, minutes (common practice: 5–20 min). */
const FLASH_OFF_MIN = 15;
/** Most racks in one oven load. */
const MAX_RACKS_PER_LOAD = 60;
/** Oven groups per line (the windows seed runs CR-39-type on line 1, ovens A and B; polycarbonate on line 2, oven C). */
const OVENS_OF_LINE: Record<string, string[]> = { 'dip-1': ['oven-a', 'oven-b'], 'dip-2': ['oven-c'] };
const MATERIAL_OF_LINE: Record<string, string> = { 'dip-1': 'CR-39-type 1.50', 'dip-2': 'Polycarbonate 1.59' };
/** The story's failing cross-cuts: percent of the lattice removed (ISO 2409 class 2–3). */
const STORY_FAILS_PCT = [12, 18, 22, 14, 25, 16];

interface Rack {
  stroke: DipStroke;
  code: string;
  jobs: string[];
}

const empty = (reason: string): SeedStoryResult => ({
  seeded: false,
  reason,
  jobs: 0,
  dipRuns: 0,
  loads: 0,
  tests: 0,
  storyLoadId: null,
  failedJobs: [],
});

/**
 * `sequelize` carries the records the core writes (oven loads and their cure records, files);
 * `pool` the story's bulk inserts of jobs, racks, dip runs and tests (thousands of rows).
 */
export async function seedStory(sequelize: Sequelize, pool: pg.Pool, opts: SeedStoryOptions = {}): Promise<SeedStoryResult> {
  const log = opts.log ?? (() => {});
  const done = await pool.query(`select 1 from site_settings where key = 'demoStory'`);
  if (done.rowCount) return empty('the story is already seeded');
  const hist = await pool.query<{ value: { nowMs?: number; days?: number } }>(
    `select value from site_settings where key = 'demoHistory'`,
  );
  const nowMs = opts.nowMs ?? hist.rows[0]?.value.nowMs ?? Date.now();
  const days = opts.days ?? hist.rows[0]?.value.days;
  const listOpts = days ? { days } : {};

  const assets = await pool.query<{ id: number; code: string }>(`select id, code from assets`);
  const asset = new Map(assets.rows.map((a) => [a.code, a.id]));
  if (!asset.get('oven-b') || !asset.get('dip-1')) return empty('the demo plant is not seeded');

  const cycles = demoOvenCycles(nowMs, listOpts);
  const strokes = demoDipStrokes(nowMs, listOpts);
  const story = cycles.find((c) => c.kind === 'under-cured');
  if (!story) return empty('the history holds no under-cured load');
  const probe = await pool.query(
    `select 1 from readings r join channels c on c.id = r.channel_id join assets a on a.id = c.asset_id
      where a.code = 'oven-b-z1' and r.ts between $1 and $2 limit 1`,
    [new Date(story.soakStartMs), new Date(story.soakEndMs)],
  );
  if (!probe.rowCount) return empty('the seeded history has no oven readings for the story load (seed the history first)');
  const quality = (
    await pool.query<{ id: number; display_name: string }>(`select id, display_name from users where username = 'quality'`)
  ).rows[0];
  const operator = (await pool.query<{ id: number }>(`select id from users where username = 'operator'`)).rows[0];

  // ---- racks and jobs: one rack per stroke, 2–4 jobs on it
  const racks: Rack[] = [];
  let next = 240_001;
  const rackNo: Record<string, number> = {};
  for (const s of strokes) {
    const rng = rngFrom(seedOf('story-rack', s.line, s.tMs));
    const n = 2 + Math.floor(rng() * 3);
    rackNo[s.line] = ((rackNo[s.line] ?? 0) % 80) + 1;
    const jobs = Array.from({ length: n }, () => `FH-${next++}`);
    racks.push({ stroke: s, code: `R${s.line.slice(-1)}-${String(rackNo[s.line]).padStart(2, '0')}`, jobs });
  }
  const allJobs = racks.flatMap((r) => r.jobs.map((j) => ({ j, line: r.stroke.line })));

  const c = await pool.connect();
  try {
    await c.query('begin');
    await c.query(
      `insert into jobs (job_number, lens_material, customer_ref)
         select * from unnest($1::text[], $2::text[], $3::text[]) on conflict (job_number) do nothing`,
      [
        allJobs.map((x) => x.j),
        allJobs.map((x) => MATERIAL_OF_LINE[x.line] ?? null),
        allJobs.map((_x, i) => `C-${(70_000 + ((i * 7919) % 29_000)).toString()}`),
      ],
    );
    const rackCodes = [...new Set(racks.map((r) => r.code))];
    await c.query(`insert into racks (code) select unnest($1::text[]) on conflict (code) do nothing`, [rackCodes]);
    // Dip runs: bath charge and last check as of the dip; withdrawal speed = the seeded stroke reading.
    const windows = new Map<string, number | null>();
    for (const line of Object.keys(OVENS_OF_LINE)) {
      const id = asset.get(line);
      windows.set(line, id ? ((await windowInForce(pool, id, strokes[0]?.tMs ?? nowMs))?.id ?? null) : null);
    }
    const ins = await c.query<{ id: number; dipped_at: Date; line_code: string }>(
      `with src as (
         select * from unnest($1::text[], $2::float8[], $3::text[], $4::int[]) as u(line_code, t_ms, rack_code, window_id)
       ), rows as (
         select la.id as line_id, ta.id as tank_id, k.id as rack_id, to_timestamp(s.t_ms / 1000.0) as dipped_at, s.window_id, s.line_code
           from src s join assets la on la.code = s.line_code join assets ta on ta.code = s.line_code || '-hc' join racks k on k.code = s.rack_code
       )
       insert into dip_runs (line_asset_id, tank_asset_id, rack_id, dipped_at, bath_charge_id, last_check_id, window_id,
                             withdrawal_speed_mm_s, stroke_started_at, stroke_ended_at, stroke_samples, source, recorded_by)
       select r.line_id, r.tank_id, r.rack_id, r.dipped_at,
              (select id from bath_charges b where b.tank_asset_id = r.tank_id and b.charged_at <= r.dipped_at order by b.charged_at desc limit 1),
              (select id from bath_checks b where b.tank_asset_id = r.tank_id and b.at <= r.dipped_at order by b.at desc limit 1),
              r.window_id, sp.value, case when sp.value is null then null else r.dipped_at end,
              case when sp.value is null then null else r.dipped_at end, case when sp.value is null then null else 1 end, 'seed', $5
         from rows r
         left join lateral (select x.value from readings x join channels ch on ch.id = x.channel_id
                             where ch.asset_id = r.tank_id and ch.kind = 'withdrawal-speed' and x.ts = r.dipped_at limit 1) sp on true
       returning id, dipped_at, (select code from assets where id = line_asset_id) as line_code`,
      [
        racks.map((r) => r.stroke.line),
        racks.map((r) => r.stroke.tMs),
        racks.map((r) => r.code),
        racks.map((r) => windows.get(r.stroke.line) ?? null),
        operator?.id ?? null,
      ],
    );
    const runId = new Map(ins.rows.map((r) => [`${r.line_code}|${r.dipped_at.getTime()}`, r.id]));
    const dj: [number, string][] = [];
    for (const r of racks) {
      const id = runId.get(`${r.stroke.line}|${r.stroke.tMs}`);
      if (id) for (const j of r.jobs) dj.push([id, j]);
    }
    await c.query(
      `insert into dip_run_jobs (dip_run_id, job_id) select u.d, j.id from unnest($1::int[], $2::text[]) as u(d, n) join jobs j on j.job_number = u.n on conflict do nothing`,
      [dj.map((x) => x[0]), dj.map((x) => x[1])],
    );
    await c.query('commit');
  } catch (e) {
    await c.query('rollback').catch(() => {});
    throw e;
  } finally {
    c.release();
  }
  log(`Story: ${allJobs.length} jobs on ${racks.length} dip runs.`);

  // ---- oven loads: each seeded cycle, opened when its setpoint rose, closed when the door shut after unloading
  const loadOf = new Map<OvenCycle, number>();
  let storyLoadId: number | null = null;
  for (const cy of cycles) {
    const oven = asset.get(cy.oven);
    if (!oven) continue;
    const r = await recordPastLoad(sequelize, {
      ovenAssetId: oven,
      openedAtMs: cy.rampStartMs,
      closedAtMs: cy.loadEndMs,
      by: 'auto',
    });
    loadOf.set(cy, r.loadId);
    if (cy === story) storyLoadId = r.loadId;
  }
  // Racks go into the next load of their line's ovens that starts after the flash-off.
  const lineLoads = new Map<string, OvenCycle[]>();
  for (const [line, ovens] of Object.entries(OVENS_OF_LINE))
    lineLoads.set(
      line,
      cycles.filter((cy) => ovens.includes(cy.oven)),
    );
  const filled = new Map<OvenCycle, Rack[]>();
  for (const r of racks) {
    const list = lineLoads.get(r.stroke.line) ?? [];
    // The next two loads after the flash-off: the emptier one takes the rack (racks spread over the line's ovens).
    const next2 = list
      .filter(
        (cy) =>
          cy.rampStartMs >= r.stroke.tMs + FLASH_OFF_MIN * MINUTE_MS &&
          cy.rampStartMs - r.stroke.tMs < 18 * HOUR_MS &&
          (filled.get(cy)?.length ?? 0) < MAX_RACKS_PER_LOAD,
      )
      .slice(0, 2);
    const target = next2.reduce<OvenCycle | undefined>(
      (a, b) => (!a || (filled.get(b)?.length ?? 0) < (filled.get(a)?.length ?? 0) ? b : a),
      undefined,
    );
    if (!target) continue;
    filled.set(target, [...(filled.get(target) ?? []), r]);
  }
  const lj: { load: number; job: string; rack: string; at: number }[] = [];
  for (const [cy, list] of filled) {
    const load = loadOf.get(cy);
    if (load) for (const r of list) for (const j of r.jobs) lj.push({ load, job: j, rack: r.code, at: cy.loadStartMs });
  }
  await pool.query(
    `insert into load_jobs (load_id, job_id, rack_id, added_at, added_by)
       select u.l, j.id, k.id, to_timestamp(u.t / 1000.0), $5 from unnest($1::int[], $2::text[], $3::text[], $4::float8[]) as u(l, n, r, t)
       join jobs j on j.job_number = u.n join racks k on k.code = u.r
     on conflict do nothing`,
    [lj.map((x) => x.load), lj.map((x) => x.job), lj.map((x) => x.rack), lj.map((x) => x.at), operator?.id ?? null],
  );
  log(`Story: ${loadOf.size} oven loads, ${lj.length} jobs loaded.`);

  // ---- quality tests
  const acceptance = await acceptanceSettings(sequelize);
  const tests: {
    job: string;
    kind: string;
    at: number;
    inputs: Record<string, unknown>;
    m: TestMeasurement;
    boil: number | null;
  }[] = [];
  const failedJobs: string[] = [];
  const onDay = (afterMs: number, dayOffset: number, rng: () => number): number => {
    let k = localDayKey(afterMs) + dayOffset;
    if ((((k + 4) % 7) + 7) % 7 === 0) k++; // no tests on Sunday
    return atLocal(k, 8.5 + rng() * 7.5);
  };
  for (const [cy, list] of filled) {
    const jobs = list.flatMap((r) => r.jobs);
    if (jobs.length === 0) continue;
    const rng = rngFrom(seedOf('story-tests', cy.code));
    const pick = () => jobs[Math.floor(rng() * jobs.length)] as string;
    if (cy === story) {
      // Six jobs fail the cross-cut two days later; six more pass a visual inspection that day.
      const shuffled = [...jobs].sort((a, b) => seedOf(a, 'x') - seedOf(b, 'x'));
      STORY_FAILS_PCT.forEach((pct, i) => {
        const job = shuffled[i] as string;
        failedJobs.push(job);
        tests.push({
          job,
          kind: 'crosscut',
          at: onDay(cy.loadEndMs, 2, rng),
          inputs: { percentRemoved: pct },
          m: { kind: 'crosscut', percentRemoved: pct },
          boil: 0,
        });
      });
      for (const job of shuffled.slice(STORY_FAILS_PCT.length, STORY_FAILS_PCT.length + 6)) {
        tests.push({
          job,
          kind: 'cosmetic',
          at: onDay(cy.loadEndMs, 2, rng),
          inputs: { defects: [] },
          m: { kind: 'cosmetic', defects: [] },
          boil: null,
        });
      }
      continue;
    }
    // One adhesion test per load: a dry cross-cut, or (about one load in three) a cross-cut after two boil cycles.
    const pct = rng() < 0.004 ? Math.round((1 + rng() * 3) * 10) / 10 : 0; // an occasional class 1
    if (rng() < 0.3) {
      tests.push({
        job: pick(),
        kind: 'boil',
        at: onDay(cy.loadEndMs, 1, rng),
        inputs: { percentRemoved: pct, boilCycles: 2 },
        m: { kind: 'boil', percentRemoved: pct, boilCycles: 2 },
        boil: 2,
      });
    } else {
      tests.push({
        job: pick(),
        kind: 'crosscut',
        at: onDay(cy.loadEndMs, 1, rng),
        inputs: { percentRemoved: pct },
        m: { kind: 'crosscut', percentRemoved: pct },
        boil: 0,
      });
    }
    const um = Math.round((1.9 + rng() * 0.6) * 100) / 100;
    tests.push({
      job: pick(),
      kind: 'thickness',
      at: onDay(cy.loadEndMs, 1, rng),
      inputs: { method: 'measured', thicknessUm: um },
      m: { kind: 'thickness', thicknessUm: um },
      boil: null,
    });
    const dust = rng() < 0.02 ? 1 : 0;
    const defects: { type: DefectType; count: number }[] = dust ? [{ type: 'dust-inclusions', count: 1 }] : [];
    tests.push({
      job: pick(),
      kind: 'cosmetic',
      at: onDay(cy.loadEndMs, 1, rng),
      inputs: { defects },
      m: { kind: 'cosmetic', defects },
      boil: null,
    });
    if (rng() < 0.4) {
      const ref = Math.round((28 + rng() * 8) * 10) / 10;
      const test = Math.round((ref / (2.5 + rng() * 2)) * 10) / 10;
      tests.push({
        job: pick(),
        kind: 'abrasion',
        at: onDay(cy.loadEndMs, 2, rng),
        inputs: { referenceHazeGainPct: ref, testHazeGainPct: test },
        m: { kind: 'abrasion', referenceHazeGainPct: ref, testHazeGainPct: test },
        boil: null,
      });
    }
  }
  const done2 = tests.filter((t) => t.at <= nowMs);
  const judged = done2.map((t) => ({ ...t, j: judgeTest(t.m, acceptance) }));
  await pool.query(
    `insert into quality_tests (job_id, kind, tested_at, tested_by, tested_by_label, inputs, computed, result, reasons, boil_cycles, acceptance)
       select j.id, u.kind, to_timestamp(u.at / 1000.0), $7, $8, u.inputs, u.computed, u.result, array(select jsonb_array_elements_text(u.reasons)), u.boil, $9::jsonb
         from unnest($1::text[], $2::text[], $3::float8[], $4::jsonb[], $5::jsonb[], $6::text[], $10::jsonb[], $11::int[]) as u(n, kind, at, inputs, computed, result, reasons, boil)
         join jobs j on j.job_number = u.n`,
    [
      judged.map((t) => t.job),
      judged.map((t) => t.kind),
      judged.map((t) => t.at),
      judged.map((t) => JSON.stringify(t.inputs)),
      judged.map((t) => JSON.stringify({ ...t.j.computed, summary: t.j.summary })),
      judged.map((t) => t.j.result),
      quality?.id ?? null,
      quality?.display_name ?? 'Quality (demo seed)',
      JSON.stringify(acceptance),
      judged.map((t) => JSON.stringify(t.j.reasons)),
      judged.map((t) => t.boil),
    ],
  );
  await seedSurveys(sequelize, pool, nowMs, asset);
  const result: SeedStoryResult = {
    seeded: true,
    jobs: allJobs.length,
    dipRuns: racks.length,
    loads: loadOf.size,
    tests: judged.length,
    storyLoadId,
    failedJobs: failedJobs.filter((j) => judged.some((t) => t.job === j)),
  };
  await pool.query(
    `insert into site_settings (key, value, updated_at) values ('demoStory', $1::jsonb, now()) on conflict (key) do update set value = excluded.value, updated_at = now()`,
    [
      JSON.stringify({
        nowMs,
        storyLoadId,
        failedJobs: result.failedJobs,
        storyLoadCode: story.code,
        seededAt: new Date().toISOString(),
      }),
    ],
  );
  log(
    `Story: ${judged.length} quality tests; under-cured load ${storyLoadId} (${story.oven}), failed cross-cuts on ${result.failedJobs.join(', ')}.`,
  );
  return result;
}

/** Survey age per oven (days before now): oven B's last survey is older than the 90-day interval. */
const SURVEY_DAYS_AGO: Record<string, number> = { 'oven-a': 41, 'oven-b': 118, 'oven-c': 63 };

/**
 * One uniformity survey per oven, from an invented 9-thermocouple survey file (1-minute rows,
 * heat-up at about 3 °C/min to a per-sensor offset around the 110 °C setpoint, ±0.15 °C noise),
 * computed like an uploaded one: automatic stabilised soak, AMS2750F Table 11 class table.
 */
async function seedSurveys(sequelize: Sequelize, pool: pg.Pool, nowMs: number, asset: Map<string, number>): Promise<void> {
  const engineer = (await pool.query<{ id: number }>(`select id from users where username = 'engineer'`)).rows[0];
  for (const [code, daysAgo] of Object.entries(SURVEY_DAYS_AGO)) {
    const oven = asset.get(code);
    if (!oven) continue;
    const rng = rngFrom(seedOf('survey', code));
    const start = Math.floor((nowMs - daysAgo * 86_400_000) / 60_000) * 60_000;
    const spread = code === 'oven-b' ? 4.2 : 2.4;
    // Every sensor settles no lower than setpoint − 1.6 °C, so the automatic stabilisation rule finds the soak.
    const offsets = Array.from({ length: 9 }, () => -1.6 + rng() * (spread + 1.6));
    const lines = ['time,' + offsets.map((_, i) => `TC${i + 1}`).join(',')];
    for (let m = 0; m <= 110; m++) {
      const cells = offsets.map((o) => {
        const target = 110 + o;
        const lin = 24 + 3 * m;
        const v = lin < target - 3 ? lin : target - 3 * Math.exp(-(m - (target - 3 - 24) / 3) / 2.5);
        return (v + 0.15 * rng.gauss()).toFixed(2);
      });
      lines.push(`${new Date(start + m * 60_000).toISOString()},${cells.join(',')}`);
    }
    const csv = lines.join('\n') + '\n';
    const table = parseSurveyCsv(csv);
    const idx = autoStabilisedIndex(table, 110);
    if (idx === null) continue;
    const r = uniformitySurvey({
      setpointC: 110,
      sensors: table.sensors,
      stabilisedFromIndex: idx,
      classTable: AMS2750_CLASSES,
    });
    const v = table.sensors.map((x) => {
      const w = x.readingsC.slice(idx);
      return {
        name: x.name,
        correctionC: 0,
        minC: Math.min(...w),
        maxC: Math.max(...w),
        meanC: w.reduce((a, b) => a + b, 0) / w.length,
      };
    });
    const ins = await pool.query<{ id: number }>(
      `insert into oven_surveys (oven_asset_id, surveyed_at, setpoint_c, sensors, stabilised_from, stabilised_auto, hottest_deviation_c, coldest_deviation_c,
          uniformity_class, class_table_name, class_table, result, note, recorded_by)
       values ($1, to_timestamp($2 / 1000.0), 110, $3::jsonb, to_timestamp($4 / 1000.0), true, $5, $6, $7, 'SAE AMS2750F furnace classes (Table 11)', $8::jsonb, $9::jsonb, 'demo seed (invented survey)', $10)
       returning id`,
      [
        oven,
        start,
        JSON.stringify(v),
        start + (table.minutes[idx] as number) * 60_000,
        r.hottestDeviationC,
        r.coldestDeviationC,
        r.uniformityClass,
        JSON.stringify(AMS2750_CLASSES),
        JSON.stringify({
          ...r,
          rows: table.minutes.length,
          durationMinutes: table.minutes.at(-1),
          stabilisedFromMinutes: table.minutes[idx],
        }),
        engineer?.id ?? null,
      ],
    );
    await attachFile(sequelize, {
      surveyId: ins.rows[0]!.id,
      name: `survey-${code}.csv`,
      bytes: new TextEncoder().encode(csv),
      userId: engineer?.id ?? null,
    });
  }
}

/** Removes what seedStory wrote (on a database where the story's rows are the only ones of their kind). */
export async function unseedStory(pool: pg.Pool): Promise<void> {
  const c = await pool.connect();
  try {
    await c.query('begin');
    await c.query(
      `delete from quality_tests where job_id in (select dj.job_id from dip_run_jobs dj join dip_runs d on d.id = dj.dip_run_id where d.source = 'seed')`,
    );
    await c.query(
      `delete from load_jobs where job_id in (select dj.job_id from dip_run_jobs dj join dip_runs d on d.id = dj.dip_run_id where d.source = 'seed')`,
    );
    await c.query(
      `delete from alarms where source_kind = 'cure' and load_id in (select id from oven_loads where opened_by = 'auto' and opened_by_user is null)`,
    );
    await c.query(
      `delete from oven_loads l where opened_by = 'auto' and not exists (select 1 from load_jobs lj where lj.load_id = l.id)`,
    );
    const jobs = await c.query<{ id: number }>(
      `select distinct dj.job_id as id from dip_run_jobs dj join dip_runs d on d.id = dj.dip_run_id where d.source = 'seed'`,
    );
    await c.query(`delete from dip_runs where source = 'seed'`);
    await c.query(
      `delete from jobs where id = any($1::int[]) and not exists (select 1 from dip_run_jobs x where x.job_id = jobs.id) and not exists (select 1 from holds h where h.job_id = jobs.id)`,
      [jobs.rows.map((r) => r.id)],
    );
    await c.query(`delete from racks k where not exists (select 1 from dip_runs d where d.rack_id = k.id)`);
    await c.query(`delete from oven_surveys where note = 'demo seed (invented survey)'`);
    await c.query(`delete from site_settings where key = 'demoStory'`);
    await c.query('commit');
  } catch (e) {
    await c.query('rollback').catch(() => {});
    throw e;
  } finally {
    c.release();
  }
}
