/**
 * Schemas of the plant set-up endpoints: devices, channels and the approval
 * of a channel the ingest worker heard from a known device but did not know.
 */
import { z } from 'zod';

/** Channel kinds (the database's check constraint lists the same). */
export const CHANNEL_KINDS = [
  'withdrawal-speed',
  'viscosity',
  'bath-temperature',
  'room-humidity',
  'room-temperature',
  'air-temperature',
  'setpoint',
  'door',
  'irradiance',
  'spin-speed',
  'solids',
  'other',
] as const;
export const ChannelKindSchema = z.enum(CHANNEL_KINDS);
export type ChannelKind = z.infer<typeof ChannelKindSchema>;

/** The usual unit of each kind (a suggestion for forms; the channel's own unit is what counts). */
export const KIND_UNITS: Record<ChannelKind, string> = {
  'withdrawal-speed': 'mm/s',
  viscosity: 'mm²/s',
  'bath-temperature': '°C',
  'room-humidity': '%',
  'room-temperature': '°C',
  'air-temperature': '°C',
  setpoint: '°C',
  door: 'open=1',
  irradiance: 'mW/cm²',
  'spin-speed': 'rpm',
  solids: '%',
  other: '',
};

/** A topic segment: lower-case code [a-z0-9-] (lib/shared/topics.ts). */
export const CodeSchema = z
  .string()
  .trim()
  .regex(/^[a-z0-9][a-z0-9-]{0,31}$/, 'Use up to 32 lower-case letters, digits and dashes, starting with a letter or digit.');

/** Derive a topic code from a name: "Line 1 bath viscosity" → "line-1-bath-viscosity". */
export function codeFromName(name: string, maxLength = 32): string {
  const code = name
    .normalize('NFKD')
    .replace(/[\u0300-\u036f]/g, '')
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, '-')
    .replace(/^-+|-+$/g, '')
    .slice(0, maxLength)
    .replace(/-+$/g, '');
  return code || 'x';
}

/** zod 4 numbers refuse Infinity and NaN already. */
const finite = (what: string) => z.number({ error: `Enter the ${what} as a number.` });

/** Name, kind, unit and valid range: shared by a new channel and the approval of an unknown one. */
export const ChannelSpecSchema = z.object({
  name: z.string().trim().min(2, 'Name the channel.').max(120),
  kind: ChannelKindSchema,
  unit: z.string().trim().min(1, 'Enter the unit (e.g. °C, mm/s, mm²/s).').max(20),
  min: finite('lowest valid value'),
  max: finite('highest valid value'),
});

const rangeCheck = <T extends { min: number; max: number }>(v: T) => v.max > v.min;
const rangeIssue = { message: 'The highest valid value must be above the lowest.', path: ['max'] };

export const ApproveUnknownChannelSchema = ChannelSpecSchema.refine(rangeCheck, rangeIssue);
export type ApproveUnknownChannel = z.infer<typeof ApproveUnknownChannelSchema>;

export const CreateChannelSchema = ChannelSpecSchema.extend({
  assetId: z.number().int().positive(),
  deviceId: z.number().int().positive(),
  /** The last topic segment; derived from the name when absent. */
  key: CodeSchema.optional(),
}).refine(rangeCheck, rangeIssue);
export type CreateChannel = z.infer<typeof CreateChannelSchema>;

export const CreateDeviceSchema = z.object({
  name: z.string().trim().min(2, 'Name the device, e.g. “Dip line 3 PLC gateway”.').max(120),
});

export const UpdateDeviceSchema = z
  .object({
    name: z.string().trim().min(2).max(120).optional(),
    enabled: z.boolean().optional(),
  })
  .refine((v) => v.name !== undefined || v.enabled !== undefined, { message: 'Change at least one field.', path: [] });

export interface DeviceView {
  id: number;
  name: string;
  username: string;
  topicPrefix: string;
  enabled: boolean;
  online: boolean;
  lastSeenAt: string | null;
  createdAt: string;
  channels: number;
}

/** Answer of creating a device or rotating its password: the password is shown this once. */
export interface DeviceCredentials {
  id: number;
  username: string;
  password: string;
  topicPrefix: string;
}

export interface ChannelView {
  id: number;
  name: string;
  key: string;
  kind: string;
  unit: string;
  min: number;
  max: number;
  topic: string;
  deviceId: number;
  assetId: number;
  assetCode: string;
  assetName: string;
}

export interface AssetView {
  id: number;
  siteId: number;
  parentId: number | null;
  kind: string;
  code: string;
  name: string;
}

export interface UnknownChannelView {
  id: number;
  deviceId: number;
  deviceUsername: string;
  topic: string;
  assetCode: string;
  channelKey: string;
  firstSeenAt: string;
  lastSeenAt: string;
  messages: number;
  samplePayload: string | null;
}

/** The `mqtt` CLI (MQTT.js) line that publishes one sample, for the set-up screen and README. */
export function mqttExample(opts: { host: string; port: number; username: string; topic: string; password?: string }): string {
  const pw = opts.password ?? '<device password>';
  return `mqtt pub -h ${opts.host} -p ${opts.port} -u ${opts.username} -P '${pw}' -q 1 -t '${opts.topic}' -m '{"t":"2026-12-02T09:00:00Z","v":12.4}'`;
}
