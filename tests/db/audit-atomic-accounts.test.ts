/**
 * Every audited change of the accounts, plant set-up, bath log and survey records commits
 * together with its audit row or not at all. Each core function runs in-process on its own
 * Sequelize instance against the test database, twice: first with a failure injected after
 * the work and before the commit (`setBeforeCommitHookForTests` throwing) — afterwards neither
 * the change nor an audit row may be there — then without it, when both must be.
 * The subjects (users, a line, a tank, an oven, devices) are this file's own.
 */
import { randomBytes } from 'node:crypto';
import pg from 'pg';
import type { Sequelize } from 'sequelize';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { createSequelize } from '../../db/connection.ts';
import { Asset, Lacquer, Site, initModels } from '../../db/models/index.ts';
import { setBeforeCommitHookForTests, type AuditActor } from '../../db/transaction.ts';
import * as accounts from '../../src/lib/core/accounts-store.ts';
import * as baths from '../../src/lib/core/bath-store.ts';
import * as plant from '../../src/lib/core/plant-store.ts';
import * as surveys from '../../src/lib/core/survey-store.ts';
import { AMS2750_CLASSES, uniformitySurvey } from '../../src/lib/domain/oven/uniformity.ts';
import type { SurveySettings } from '../../src/lib/shared/surveys.ts';
import type { SurveyComputation } from '../../src/lib/shared/trace-views.ts';

const tag = randomBytes(3).toString('hex');
const actor: AuditActor = { id: null, label: `atomic-${tag}`, address: '127.0.0.1' };
const INJECTED = 'injected failure before commit';

let seq: Sequelize;
let pool: pg.Pool;
let siteId: number;

const one = async <T = Record<string, unknown>>(sql: string, params: unknown[] = []): Promise<T | undefined> =>
  (await pool.query(sql, params)).rows[0] as T | undefined;
const count = async (sql: string, params: unknown[] = []): Promise<number> =>
  Number((await pool.query<{ n: string }>(`select count(*) as n from (${sql}) x`, params)).rows[0]!.n);

/** Audit rows of `action`, optionally about one entity id, written since this file started. */
const auditRows = (action: string, entityId?: string | number) =>
  entityId === undefined
    ? count(`select 1 from audit_log where action = $1 and actor_label = $2`, [action, actor.label])
    : count(`select 1 from audit_log where action = $1 and entity_id = $2`, [action, String(entityId)]);

/**
 * Run `work` with the injected failure (must reject, leave `changed()` false and the audit
 * count as it was), then for real (`changed()` true, exactly one more audit row).
 */
async function commitsTogether<T>(
  work: () => Promise<T>,
  changed: () => Promise<boolean>,
  audits: () => Promise<number>,
): Promise<T> {
  const before = await audits();
  expect(await changed()).toBe(false);
  setBeforeCommitHookForTests(() => {
    throw new Error(INJECTED);
  });
  try {
    await expect(work()).rejects.toThrow(INJECTED);
  } finally {
    setBeforeCommitHookForTests(null);
  }
  expect(await changed()).toBe(false);
  expect(await audits()).toBe(before);
  const out = await work();
  expect(await changed()).toBe(true);
  expect(await audits()).toBe(before + 1);
  return out;
}

beforeAll(async () => {
  const url = inject('stack').databaseUrl;
  seq = createSequelize({ url, max: 2 });
  initModels(seq);
  pool = new pg.Pool({ connectionString: url, max: 2 });
  siteId = (await Site.findOne({ order: [['id', 'ASC']] }))!.id;
});

afterAll(async () => {
  setBeforeCommitHookForTests(null);
  await seq.close();
  await pool.end();
});

describe('accounts: change and audit row commit together', () => {
  let userId: number;
  let adminId: number;

  it('creating and changing a user', async () => {
    const username = `atomic-u-${tag}`;
    const u = await commitsTogether(
      () =>
        accounts.createUserRecord(seq, actor, {
          username,
          displayName: 'Atomic test user',
          email: `${username}@example.test`,
          role: 'operator',
          passwordHash: 'not-a-real-hash',
        }),
      async () => (await count(`select 1 from users where username = $1`, [username])) === 1,
      () => auditRows('user.created'),
    );
    userId = u.id;
    await commitsTogether(
      () => accounts.updateUserRecord(seq, actor, userId, { role: 'quality' }),
      async () => (await one<{ role: string }>(`select role from users where id = $1`, [userId]))?.role === 'quality',
      () => auditRows('user.role-changed', userId),
    );
    // A second admin of this file's own: the token's issuer.
    adminId = (
      await accounts.createUserRecord(seq, actor, {
        username: `atomic-a-${tag}`,
        displayName: 'Atomic test admin',
        email: null,
        role: 'admin',
        passwordHash: 'not-a-real-hash',
      })
    ).id;
  });

  it('sessions: sign-in and sign-out', async () => {
    const session = {
      id: `atomic-${tag}-${randomBytes(8).toString('hex')}`,
      userId,
      expiresAt: new Date(Date.now() + 3_600_000),
    };
    // stored by the SHA-256 of the id
    const exists = async () =>
      (await count(`select 1 from user_sessions where id = $1`, [accounts.sessionKey(session.id)])) === 1;
    await commitsTogether(
      () => accounts.createSessionRecord(seq, actor, session),
      exists,
      () => auditRows('auth.signed-in', userId),
    );
    await commitsTogether(
      () => accounts.endSessionRecord(seq, actor, session.id, userId),
      async () => !(await exists()),
      () => auditRows('auth.signed-out', userId),
    );
  });

  it('deactivation ends the sessions in the same transaction', async () => {
    const session = {
      id: `atomic-${tag}-${randomBytes(8).toString('hex')}`,
      userId,
      expiresAt: new Date(Date.now() + 3_600_000),
    };
    await accounts.createSessionRecord(seq, actor, session);
    await commitsTogether(
      () => accounts.updateUserRecord(seq, actor, userId, { active: false }),
      async () =>
        (await one<{ active: boolean }>(`select active from users where id = $1`, [userId]))?.active === false &&
        (await count(`select 1 from user_sessions where user_id = $1`, [userId])) === 0,
      () => auditRows('user.deactivated', userId),
    );
    await accounts.updateUserRecord(seq, actor, userId, { active: true });
  });

  it('password reset: issuing a link and using it', async () => {
    const tokenHash = randomBytes(32).toString('hex');
    await commitsTogether(
      () =>
        accounts.issueResetRecord(seq, actor, {
          userId,
          tokenHash,
          expiresAt: new Date(Date.now() + 600_000),
          kind: 'admin',
          to: 'someone@example.test',
        }),
      async () => (await count(`select 1 from password_resets where token_hash = $1`, [tokenHash])) === 1,
      () => auditRows('user.password-reset-sent', userId),
    );
    const result = await commitsTogether(
      () => accounts.completeResetRecord(seq, { tokenHash, passwordHash: `new-hash-${tag}`, address: null }),
      async () =>
        (await one<{ h: string }>(`select password_hash as h from users where id = $1`, [userId]))?.h === `new-hash-${tag}` &&
        (await count(`select 1 from password_resets where token_hash = $1 and used_at is not null`, [tokenHash])) === 1,
      () => auditRows('user.password-set', userId),
    );
    expect(result).toEqual({ username: `atomic-u-${tag}` });
  });

  it('API tokens: creating and revoking', async () => {
    const issuer: AuditActor = { id: adminId, label: actor.label };
    const tokenHash = randomBytes(32).toString('hex');
    const tok = await commitsTogether(
      () => accounts.createTokenRecord(seq, issuer, { name: `atomic-${tag}`, role: 'viewer', tokenHash, prefix: 'ct_atomi' }),
      async () => (await count(`select 1 from api_tokens where token_hash = $1`, [tokenHash])) === 1,
      () => auditRows('token.created'),
    );
    await commitsTogether(
      () => accounts.revokeTokenRecord(seq, issuer, tok.id),
      async () => (await count(`select 1 from api_tokens where id = $1 and revoked_at is not null`, [tok.id])) === 1,
      () => auditRows('token.revoked', tok.id),
    );
  });

  it('sign-in throttle: a new lock and lifting it', async () => {
    const key = `user:atomic-lock-${tag}`;
    const locked = async () =>
      (await count(`select 1 from login_throttles where key = $1 and locked_until > now()`, [key])) === 1;
    await commitsTogether(
      () => accounts.recordFailureRecord(seq, key, { lockAfter: 1, lockMinutes: 15, resetAfterMinutes: 60 }, null),
      locked,
      () => auditRows('auth.locked', key),
    );
    await commitsTogether(
      () => accounts.unlockRecord(seq, actor, key),
      async () => (await count(`select 1 from login_throttles where key = $1`, [key])) === 0,
      () => auditRows('auth.unlocked', key),
    );
  });

  it('an audit-only event is written through the same primitive', async () => {
    const login = `atomic-nobody-${tag}`;
    setBeforeCommitHookForTests(() => {
      throw new Error(INJECTED);
    });
    try {
      await expect(
        accounts.recordAuditEvent(seq, actor, { action: 'auth.failed', entity: 'login', entityId: login }),
      ).rejects.toThrow(INJECTED);
    } finally {
      setBeforeCommitHookForTests(null);
    }
    expect(await auditRows('auth.failed', login)).toBe(0);
    await accounts.recordAuditEvent(seq, actor, { action: 'auth.failed', entity: 'login', entityId: login });
    expect(await auditRows('auth.failed', login)).toBe(1);
  });
});

describe('plant set-up: change and audit row commit together', () => {
  let deviceId: number;
  let assetId: number;

  beforeAll(async () => {
    assetId = (await Asset.create({ siteId, parentId: null, kind: 'line', code: `atomic-${tag}`, name: `Atomic line ${tag}` }))
      .id;
  });

  it('devices: create, rotate the password, disable', async () => {
    const code = `atomic-gw-${tag}`;
    const d = await commitsTogether(
      () => plant.createDeviceRecord(seq, actor, { name: `Atomic gateway ${tag}`, code, passwordHash: 'hash-1' }),
      async () => (await count(`select 1 from devices where username = $1`, [code])) === 1,
      () => auditRows('device.created'),
    );
    expect(d.username).toBe(code);
    deviceId = d.id;
    await commitsTogether(
      () => plant.rotateDevicePasswordRecord(seq, actor, deviceId, 'hash-2'),
      async () => (await one<{ h: string }>(`select password_hash as h from devices where id = $1`, [deviceId]))?.h === 'hash-2',
      () => auditRows('device.password-rotated', deviceId),
    );
    await commitsTogether(
      () => plant.updateDeviceRecord(seq, actor, deviceId, { enabled: false }),
      async () => (await one<{ enabled: boolean }>(`select enabled from devices where id = $1`, [deviceId]))?.enabled === false,
      () => auditRows('device.disabled', deviceId),
    );
  });

  it('channels: create one, and approve an unknown topic', async () => {
    const spec = {
      assetId,
      deviceId,
      key: 'speed',
      name: 'Atomic speed',
      kind: 'withdrawal-speed',
      unit: 'mm/s',
      min: 0,
      max: 10,
    };
    await commitsTogether(
      () => plant.createChannelRecord(seq, actor, spec),
      async () => (await count(`select 1 from channels where device_id = $1 and key = 'speed'`, [deviceId])) === 1,
      () => auditRows('channel.created'),
    );
    const device = (await one<{ topic_prefix: string }>(`select topic_prefix from devices where id = $1`, [deviceId]))!;
    const topic = `${device.topic_prefix}/atomic-${tag}/temp`;
    const unknown = (await one<{ id: number }>(
      `insert into unknown_channels (device_id, topic, asset_code, channel_key, first_seen_at, last_seen_at, messages)
       values ($1, $2, $3, 'temp', now(), now(), 1) returning id`,
      [deviceId, topic, `atomic-${tag}`],
    ))!;
    await commitsTogether(
      () =>
        plant.approveUnknownChannelRecord(seq, actor, unknown.id, {
          name: 'Atomic temperature',
          kind: 'bath-temperature',
          unit: '°C',
          min: -20,
          max: 80,
        }),
      async () =>
        (await count(`select 1 from channels where device_id = $1 and key = 'temp'`, [deviceId])) === 1 &&
        (await count(`select 1 from unknown_channels where id = $1 and resolved_at is not null`, [unknown.id])) === 1,
      () => auditRows('channel.approved'),
    );
  });
});

describe('bath log: entry and audit row commit together', () => {
  let tankId: number;
  let lotId: number;
  let checkId: number;

  beforeAll(async () => {
    const line = await Asset.create({
      siteId,
      parentId: null,
      kind: 'line',
      code: `atomic-bl-${tag}`,
      name: `Atomic bath line ${tag}`,
    });
    tankId = (
      await Asset.create({
        siteId,
        parentId: line.id,
        kind: 'tank',
        code: `atomic-bl-${tag}-hc`,
        name: `Atomic tank ${tag}`,
        details: { role: 'hard-coat', volumeL: 40 },
      })
    ).id;
  });

  const author = { userId: null, label: `atomic-${tag}` };
  const day = (ms: number) => new Date(ms).toISOString().slice(0, 10);

  it('a lot and a charge', async () => {
    const lacquer = (await Lacquer.findOne({ order: [['id', 'ASC']] }))!;
    const lotCode = `ATOMIC-${tag}`;
    const lot = await commitsTogether(
      () =>
        baths.createLotRecord(seq, actor, author, {
          lacquerId: lacquer.id,
          lotCode,
          receivedOn: day(Date.now() - 5 * 86_400_000),
          expiresOn: day(Date.now() + 100 * 86_400_000),
          solidsPct: 30,
        }),
      async () => (await count(`select 1 from lacquer_lots where lot_code = $1`, [lotCode])) === 1,
      () => auditRows('lot.create'),
    );
    lotId = lot.id;
    expect(lot).toMatchObject({ lotCode, lacquer: lacquer.name, charges: 0 });
    await commitsTogether(
      () =>
        baths.createChargeRecord(
          seq,
          actor,
          author,
          { tankAssetId: tankId, lotId, massKg: 30, potLifeDays: 60, chargedAt: new Date(Date.now() - 3_600_000).toISOString() },
          Date.now(),
        ),
      async () => (await count(`select 1 from bath_charges where tank_asset_id = $1`, [tankId])) === 1,
      () => auditRows('bath.charge'),
    );
  });

  it('a check, an addition and a filter change', async () => {
    const checks = () => count(`select 1 from bath_checks where tank_asset_id = $1`, [tankId]);
    const recorded = await commitsTogether(
      () => baths.recordBathCheck(seq, actor, author, { tankAssetId: tankId, measuredMm2S: 12, solidsPct: 31 }, Date.now()),
      async () => (await checks()) === 1,
      () => auditRows('bath.check'),
    );
    checkId = recorded.check.id;
    expect(recorded.check).toMatchObject({ kinematicMm2S: 12, solidsPct: 31, by: author.label });
    await commitsTogether(
      () =>
        baths.recordBathAddition(seq, actor, author, { tankAssetId: tankId, kind: 'solvent', massKg: 0.5, checkId }, Date.now()),
      async () => (await count(`select 1 from bath_additions where tank_asset_id = $1`, [tankId])) === 1,
      () => auditRows('bath.addition'),
    );
    await commitsTogether(
      () =>
        baths.recordFilterChangeRecord(
          seq,
          actor,
          author,
          { tankAssetId: tankId, filterType: 'Atomic 5 µm cartridge', ratingUm: 5 },
          Date.now(),
        ),
      async () => (await count(`select 1 from filter_changes where tank_asset_id = $1`, [tankId])) === 1,
      () => auditRows('bath.filter'),
    );
  });
});

describe('oven surveys: record, file and audit row commit together', () => {
  it('a survey with its raw file', async () => {
    const oven = await Asset.create({
      siteId,
      parentId: null,
      kind: 'oven',
      code: `atomic-ov-${tag}`,
      name: `Atomic oven ${tag}`,
    });
    const sensors = [
      { name: 'TC1', readingsC: [119.5, 120.2, 120.4], correctionC: 0 },
      { name: 'TC2', readingsC: [121.0, 121.5, 121.1], correctionC: 0 },
    ];
    const result = uniformitySurvey({ setpointC: 120, sensors, stabilisedFromIndex: 0, classTable: AMS2750_CLASSES });
    const c: SurveyComputation = {
      result,
      setpointC: 120,
      surveyedAtMs: Date.parse('2026-01-10T08:00:00Z'),
      stabilisedFromMinutes: 0,
      stabilisedAuto: false,
      rows: 3,
      durationMinutes: 2,
      sensors: sensors.map((s) => ({
        name: s.name,
        correctionC: 0,
        minC: Math.min(...s.readingsC),
        maxC: Math.max(...s.readingsC),
        meanC: 0,
      })),
      classTableName: 'atomic table',
      classTable: AMS2750_CLASSES.map((x) => ({ ...x })),
      series: [],
    };
    const csv = 'minutes,TC1,TC2\n0,119.5,121.0\n1,120.2,121.5\n2,120.4,121.1\n';
    await commitsTogether(
      () =>
        surveys.recordSurveyRecord(
          seq,
          actor,
          { ovenAssetId: oven.id, setpointC: 120, note: null, userId: null, fileName: 'atomic.csv', csv },
          c,
        ),
      async () =>
        (await count(`select 1 from oven_surveys where oven_asset_id = $1`, [oven.id])) === 1 &&
        (await count(`select 1 from test_files f join oven_surveys s on s.id = f.survey_id where s.oven_asset_id = $1`, [
          oven.id,
        ])) === 1,
      () => auditRows('survey.record'),
    );
  });

  it('a change of the survey settings (restored afterwards)', async () => {
    const stored = async () =>
      (await one<{ value: SurveySettings }>(`select value from site_settings where key = 'ovenSurveys'`))?.value;
    const original = await stored();
    const changed: SurveySettings = {
      intervalDays: 77,
      classTableName: `atomic ${tag}`,
      classTable: AMS2750_CLASSES.map((x) => ({ ...x })),
    };
    try {
      await commitsTogether(
        () => surveys.writeSurveySettings(seq, actor, changed),
        async () => (await stored())?.classTableName === changed.classTableName,
        () => auditRows('settings.ovenSurveys'),
      );
    } finally {
      if (original) await surveys.writeSurveySettings(seq, actor, original);
      else await pool.query(`delete from site_settings where key = 'ovenSurveys'`);
    }
  });
});
