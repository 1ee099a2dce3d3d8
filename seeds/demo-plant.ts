/**
 * The invented demo plant "Fernhollow Lens Works": two dip lines, three cure ovens, a UV
 * spin coater, their devices and channels, and one demo user per role. All names and data
 * are invented. Idempotent: does nothing when the site already exists; `unseedDemoPlant`
 * reverses it on a database that holds nothing else.
 */
import { createHmac } from 'node:crypto';
import type { Sequelize } from 'sequelize';
import { Asset, Channel, Device, Site, User, initModels } from '../db/models/index.ts';
import { hashPassword } from '../src/lib/server/passwords.ts';
import { channelTopic, deviceTopicPrefix } from '../src/lib/shared/topics.ts';

export const DEMO_SITE = { code: 'fernhollow', name: 'Fernhollow Lens Works', timeZone: 'Europe/London' };

export const DEMO_USERS = [
  { username: 'admin', displayName: 'Ada Admin', role: 'admin' },
  { username: 'engineer', displayName: 'Emil Engineer', role: 'engineer' },
  { username: 'operator', displayName: 'Olu Operator', role: 'operator' },
  { username: 'quality', displayName: 'Quinn Quality', role: 'quality' },
  { username: 'viewer', displayName: 'Vera Viewer', role: 'viewer' },
] as const;

interface ChannelSpec {
  key: string;
  name: string;
  kind: string;
  unit: string;
  min: number;
  max: number;
}
interface AssetSpec {
  code: string;
  name: string;
  kind: 'line' | 'tank' | 'oven' | 'zone' | 'coater' | 'room';
  details?: Record<string, unknown>;
  channels?: ChannelSpec[];
  children?: AssetSpec[];
}
interface DeviceSpec {
  username: string;
  name: string;
  asset: AssetSpec;
}

const dipLine = (n: number): DeviceSpec => ({
  username: `gw-dip-${n}`,
  name: `Dip line ${n} PLC gateway`,
  asset: {
    code: `dip-${n}`,
    name: `Dip line ${n}`,
    kind: 'line',
    channels: [
      { key: 'room-rh', name: `Line ${n} room humidity`, kind: 'room-humidity', unit: '%', min: 0, max: 100 },
      { key: 'room-temp', name: `Line ${n} room temperature`, kind: 'room-temperature', unit: '°C', min: -10, max: 50 },
    ],
    children: [
      { code: `dip-${n}-wash`, name: `Line ${n} ultrasonic wash`, kind: 'tank', details: { role: 'wash' } },
      { code: `dip-${n}-primer`, name: `Line ${n} primer tank`, kind: 'tank', details: { role: 'primer' } },
      {
        code: `dip-${n}-hc`,
        name: `Line ${n} hard-coat bath`,
        kind: 'tank',
        details: { role: 'hard-coat', volumeL: 40 },
        channels: [
          {
            key: 'withdrawal-speed',
            name: `Line ${n} withdrawal speed`,
            kind: 'withdrawal-speed',
            unit: 'mm/s',
            min: 0,
            max: 10,
          },
          { key: 'viscosity', name: `Line ${n} bath viscosity`, kind: 'viscosity', unit: 'mm²/s', min: 0, max: 60 },
          { key: 'bath-temp', name: `Line ${n} bath temperature`, kind: 'bath-temperature', unit: '°C', min: -5, max: 40 },
        ],
      },
    ],
  },
});

const oven = (letter: string): DeviceSpec => ({
  username: `gw-oven-${letter}`,
  name: `Oven ${letter.toUpperCase()} controller gateway`,
  asset: {
    code: `oven-${letter}`,
    name: `Cure oven ${letter.toUpperCase()}`,
    kind: 'oven',
    details: { zones: 2 },
    channels: [
      { key: 'setpoint', name: `Oven ${letter.toUpperCase()} setpoint`, kind: 'setpoint', unit: '°C', min: 0, max: 250 },
      { key: 'door', name: `Oven ${letter.toUpperCase()} door`, kind: 'door', unit: 'open=1', min: 0, max: 1 },
    ],
    children: [1, 2].map((z) => ({
      code: `oven-${letter}-z${z}`,
      name: `Oven ${letter.toUpperCase()} zone ${z}`,
      kind: 'zone' as const,
      channels: [
        {
          key: 'air-temp',
          name: `Oven ${letter.toUpperCase()} zone ${z} air`,
          kind: 'air-temperature',
          unit: '°C',
          min: -20,
          max: 300,
        },
      ],
    })),
  },
});

export const DEMO_DEVICES: DeviceSpec[] = [
  dipLine(1),
  dipLine(2),
  oven('a'),
  oven('b'),
  oven('c'),
  {
    username: 'gw-uv-1',
    name: 'UV spin coater controller',
    asset: {
      code: 'uv-1',
      name: 'UV spin coater 1',
      kind: 'coater',
      channels: [
        { key: 'irradiance', name: 'UV lamp irradiance', kind: 'irradiance', unit: 'mW/cm²', min: 0, max: 500 },
        { key: 'spin-speed', name: 'Spin speed', kind: 'spin-speed', unit: 'rpm', min: 0, max: 6000 },
      ],
    },
  },
];

/** The simulator's device password, derived from a local secret (never stored in git). */
export function demoDevicePassword(secret: string, username: string): string {
  return createHmac('sha256', secret).update(username).digest('base64url').slice(0, 24);
}

export interface SeedOptions {
  demoPassword: string;
  deviceSecret: string;
  log?: (line: string) => void;
}

/** Seed when the database holds no site yet; returns true when it seeded. */
export async function seedDemoPlant(sequelize: Sequelize, opts: SeedOptions): Promise<boolean> {
  initModels(sequelize);
  if ((await Site.count()) > 0) return false;
  const log = opts.log ?? (() => {});
  log('Seeding the demo plant “Fernhollow Lens Works”…');
  const userHash = await hashPassword(opts.demoPassword);
  await sequelize.transaction(async (transaction) => {
    const site = await Site.create(DEMO_SITE, { transaction });
    await Asset.create(
      { siteId: site.id, parentId: null, kind: 'room', code: 'coat-room', name: 'Coating room', details: {} },
      { transaction },
    );
    for (const d of DEMO_DEVICES) {
      const prefix = deviceTopicPrefix(site.code, d.username);
      const device = await Device.create(
        {
          siteId: site.id,
          name: d.name,
          username: d.username,
          passwordHash: await hashPassword(demoDevicePassword(opts.deviceSecret, d.username)),
          topicPrefix: prefix,
          lastSeenAt: null,
        },
        { transaction },
      );
      const walk = async (a: AssetSpec, parentId: number | null) => {
        const asset = await Asset.create(
          { siteId: site.id, parentId, kind: a.kind, code: a.code, name: a.name, details: a.details ?? {} },
          { transaction },
        );
        for (const c of a.channels ?? []) {
          await Channel.create({ assetId: asset.id, deviceId: device.id, ...c }, { transaction });
        }
        for (const child of a.children ?? []) await walk(child, asset.id);
      };
      await walk(d.asset, null);
    }
    for (const u of DEMO_USERS) {
      await User.create({ ...u, email: `${u.username}@fernhollow.example`, passwordHash: userHash }, { transaction });
    }
  });
  return true;
}

/** Topic of a demo channel, for the simulator. */
export function demoTopic(deviceUsername: string, assetCode: string, channelKey: string): string {
  return channelTopic(deviceTopicPrefix(DEMO_SITE.code, deviceUsername), assetCode, channelKey);
}
