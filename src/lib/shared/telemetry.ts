/**
 * The MQTT telemetry payload: one zod schema for every reading a device publishes on
 * `coatrail/v1/{site}/{device}/{asset}/{channel}` (see lib/shared/topics.ts), plus the reasons a
 * message can be refused and the query schemas of the readings and rejections endpoints.
 *
 * Accepted payloads (JSON, UTF-8), all normalised to `{u?, samples: [{t, v, q}]}`:
 *
 *   {"t": "2026-12-02T10:00:00.250Z", "v": 9.52}                one sample
 *   {"t": 1796205600250, "v": 9.52, "q": 1, "u": "mm²/s"}     one sample, quality flag and unit
 *   {"u": "°C", "samples": [{"t": …, "v": …}, …]}              a batch (1 … 10 000 samples)
 *   [{"t": …, "v": …}, …]                                       a batch as a bare array
 *
 * - `t`: ISO 8601 with a zone designator (`Z` or `±hh:mm`; a local time without zone is
 *   ambiguous and refused) or epoch milliseconds. Years 2000–2099 only: an epoch in seconds
 *   (10 digits) would land in 1970 and is refused rather than stored at the wrong time.
 * - `v`: a finite number in the channel's unit.
 * - `q`: optional quality flag, 0 = good (default), 1 = uncertain, 2 = bad.
 * - `u`: optional unit; when present it must match the channel's unit (see {@link sameUnit}).
 */
import { z } from 'zod';

/** 2000-01-01T00:00:00Z and 2100-01-01T00:00:00Z in epoch ms: the plausible range of a timestamp. */
export const T_MIN_MS = 946_684_800_000;
export const T_MAX_MS = 4_102_444_800_000;

/** ISO 8601 date-time with a zone designator (a subset of RFC 3339; fractional seconds allowed). */
const ISO_WITH_ZONE = /^\d{4}-\d{2}-\d{2}[T ]\d{2}:\d{2}(:\d{2}(\.\d{1,9})?)?(Z|[+-]\d{2}:?\d{2})$/i;

const TIME_RANGE_MESSAGE = 'time must lie in 2000–2099 (epoch milliseconds, not seconds)';

/**
 * A timestamp: epoch ms (a number in 2000–2099), or ISO 8601 with zone (→ epoch ms). The
 * number branch has no transform on purpose: it is the hot path (about 0.3 µs a sample
 * instead of 3 µs); {@link normalisePayload} rounds sub-millisecond digits.
 */
export const SampleTimeSchema = z.union([
  z.number().min(T_MIN_MS, TIME_RANGE_MESSAGE).lt(T_MAX_MS, TIME_RANGE_MESSAGE),
  z
    .string()
    .regex(ISO_WITH_ZONE, 'an ISO 8601 time needs a zone designator (Z or ±hh:mm)')
    .transform((t, ctx) => {
      const ms = Date.parse(t);
      if (!(ms >= T_MIN_MS && ms < T_MAX_MS)) {
        ctx.addIssue({ code: 'custom', message: TIME_RANGE_MESSAGE });
        return z.NEVER;
      }
      return ms;
    }),
]);

/** Quality flag: 0 good, 1 uncertain, 2 bad. */
export const QualitySchema = z.union([z.literal(0), z.literal(1), z.literal(2)]);
export type Quality = z.infer<typeof QualitySchema>;
export const QUALITY_LABELS: Record<Quality, string> = { 0: 'good', 1: 'uncertain', 2: 'bad' };

const UnitSchema = z.string().min(1).max(32);

export const SampleSchema = z.object({
  t: SampleTimeSchema,
  v: z.number(),
  q: QualitySchema.optional(),
  u: UnitSchema.optional(),
});
export type Sample = z.infer<typeof SampleSchema>;

/** Most samples one message may carry. */
export const MAX_SAMPLES_PER_MESSAGE = 10_000;

/** The one schema of a telemetry message: one sample, a `{u?, samples}` batch, or a bare array of samples. */
export const TelemetryPayloadSchema = z.union([
  SampleSchema,
  z.object({ u: UnitSchema.optional(), samples: z.array(SampleSchema).min(1).max(MAX_SAMPLES_PER_MESSAGE) }),
  z.array(SampleSchema).min(1).max(MAX_SAMPLES_PER_MESSAGE),
]);

/** A validated message in one shape: the batch unit (if any) and its samples, times in whole epoch ms. */
export interface TelemetryPayload {
  u: string | undefined;
  samples: Sample[];
}

/** One shape for the three accepted forms; sub-millisecond digits of epoch times are rounded. */
export function normalisePayload(p: z.infer<typeof TelemetryPayloadSchema>): TelemetryPayload {
  const out: TelemetryPayload = Array.isArray(p)
    ? { u: undefined, samples: p }
    : 'samples' in p
      ? { u: p.u, samples: p.samples }
      : { u: undefined, samples: [p] };
  for (const s of out.samples) if (!Number.isInteger(s.t)) s.t = Math.round(s.t);
  return out;
}

/**
 * The same rules as {@link SampleSchema} without unions, used only to explain a refusal (a
 * union's own error says little more than "Invalid input").
 */
const ExplainTimeSchema = z.unknown().superRefine((t, ctx) => {
  if (typeof t === 'number') {
    if (!(t >= T_MIN_MS && t < T_MAX_MS)) ctx.addIssue({ code: 'custom', message: TIME_RANGE_MESSAGE });
  } else if (typeof t === 'string') {
    if (!ISO_WITH_ZONE.test(t))
      ctx.addIssue({ code: 'custom', message: 'an ISO 8601 time needs a zone designator (Z or ±hh:mm)' });
    else if (!(Date.parse(t) >= T_MIN_MS && Date.parse(t) < T_MAX_MS))
      ctx.addIssue({ code: 'custom', message: TIME_RANGE_MESSAGE });
  } else {
    ctx.addIssue({ code: 'custom', message: 't must be epoch milliseconds (a number) or an ISO 8601 time (a string)' });
  }
});
const ExplainSampleSchema = z.object({
  t: ExplainTimeSchema,
  v: z.number(),
  q: z.int().min(0, 'must be 0 (good), 1 (uncertain) or 2 (bad)').max(2, 'must be 0 (good), 1 (uncertain) or 2 (bad)').optional(),
  u: UnitSchema.optional(),
});

/** Validate and normalise a parsed JSON message. */
export function parseTelemetryPayload(
  json: unknown,
): { success: true; data: TelemetryPayload } | { success: false; error: z.ZodError } {
  const r = TelemetryPayloadSchema.safeParse(json);
  if (r.success) return { success: true, data: normalisePayload(r.data) };
  const explain = Array.isArray(json)
    ? z.array(ExplainSampleSchema).min(1).max(MAX_SAMPLES_PER_MESSAGE)
    : json !== null && typeof json === 'object' && 'samples' in json
      ? z.object({ u: UnitSchema.optional(), samples: z.array(ExplainSampleSchema).min(1).max(MAX_SAMPLES_PER_MESSAGE) })
      : json !== null && typeof json === 'object'
        ? ExplainSampleSchema
        : z.object(
            { t: ExplainTimeSchema, v: z.number() },
            { error: 'expected a JSON object {"t", "v"}, a {"samples": […]} batch or an array of samples' },
          );
  const e = explain.safeParse(json);
  return { success: false, error: e.success ? r.error : e.error };
}

/** A device's status topic (`…/{device}/status`): plain `online` / `offline`, or JSON `{"status": …}`. */
export const DeviceStatusSchema = z.enum(['online', 'offline']);

/** Spellings of the same unit that devices commonly send (ASCII stand-ins for symbols). */
const UNIT_ALIASES: Record<string, string> = {
  'mm2/s': 'mm²/s',
  cst: 'mm²/s',
  degc: '°C',
  '℃': '°C',
  'deg c': '°C',
  'mw/cm2': 'mW/cm²',
  rh: '%',
  '%rh': '%',
};

/** Canonical spelling of a unit for comparison (trimmed, NFC; a few ASCII aliases mapped to the symbol). */
export function canonicalUnit(u: string): string {
  const s = u.normalize('NFC').trim();
  return UNIT_ALIASES[s.toLowerCase()] ?? s;
}

/** Whether a unit sent by a device is the channel's unit (case matters: mW ≠ MW). */
export function sameUnit(sent: string, channelUnit: string): boolean {
  return canonicalUnit(sent) === canonicalUnit(channelUnit);
}

/** Why a message (or some of its samples) was refused; stored in `ingest_rejections.reason`. */
export const REJECTION_REASONS = [
  'malformed-json',
  'schema',
  'topic',
  'unknown-device',
  'unknown-asset',
  'unknown-channel',
  'out-of-range',
  'wrong-unit',
  'future-timestamp',
  'too-old',
  'duplicate',
] as const;
export const RejectionReasonSchema = z.enum(REJECTION_REASONS);
export type RejectionReason = z.infer<typeof RejectionReasonSchema>;

export const REJECTION_LABELS: Record<RejectionReason, string> = {
  'malformed-json': 'Not valid JSON',
  schema: 'Payload does not match the schema',
  topic: 'Topic outside the scheme',
  'unknown-device': 'Unknown device',
  'unknown-asset': 'Unknown asset',
  'unknown-channel': 'Unknown channel',
  'out-of-range': 'Value outside the channel range',
  'wrong-unit': 'Wrong unit',
  'future-timestamp': 'Time in the future',
  'too-old': 'Older than raw retention',
  duplicate: 'Already stored (same channel and time)',
};

/** A time query parameter: ISO 8601 (with zone) or epoch ms. */
const QueryTimeSchema = z
  .string()
  .trim()
  .min(1)
  .transform((s, ctx) => {
    const ms = /^-?\d+(\.\d+)?$/.test(s) ? Number(s) : ISO_WITH_ZONE.test(s) ? Date.parse(s) : Number.NaN;
    if (!Number.isFinite(ms) || ms < T_MIN_MS || ms >= T_MAX_MS) {
      ctx.addIssue({ code: 'custom', message: 'expected an ISO 8601 time with zone or epoch milliseconds (2000–2099)' });
      return z.NEVER;
    }
    return Math.round(ms);
  })
  .meta({ description: 'ISO 8601 time with zone, or epoch milliseconds' });

export const READINGS_DEFAULT_RANGE_MS = 3_600_000;
export const READINGS_DEFAULT_MAX_POINTS = 1000;
export const READINGS_MAX_POINTS = 5000;

/** `GET /api/v1/channels/{id}/readings?from&to&maxPoints` (defaults: the last hour, 1 000 points). */
export const ReadingsQuerySchema = z
  .object({
    from: QueryTimeSchema.optional(),
    to: QueryTimeSchema.optional(),
    maxPoints: z.coerce
      .number()
      .int('maxPoints must be a whole number')
      .min(1, 'maxPoints must be at least 1')
      .max(READINGS_MAX_POINTS, `maxPoints must be at most ${READINGS_MAX_POINTS}`)
      .default(READINGS_DEFAULT_MAX_POINTS),
  })
  .transform((q, ctx) => {
    const to = q.to ?? (q.from !== undefined ? q.from + READINGS_DEFAULT_RANGE_MS : Date.now());
    const from = q.from ?? to - READINGS_DEFAULT_RANGE_MS;
    if (!(from < to)) {
      ctx.addIssue({ code: 'custom', path: ['from'], message: 'from must be before to' });
      return z.NEVER;
    }
    return { from, to, maxPoints: q.maxPoints };
  });
export type ReadingsQuery = z.infer<typeof ReadingsQuerySchema>;

/** The answer of the readings endpoint; times are epoch ms. */
export type ReadingsResponse =
  | {
      channelId: number;
      unit: string;
      from: number;
      to: number;
      mode: 'raw';
      bucketMs: null;
      points: { t: number; v: number; q?: number }[];
    }
  | {
      channelId: number;
      unit: string;
      from: number;
      to: number;
      mode: 'bucketed';
      bucketMs: number;
      source: 'raw' | 'minute' | 'hour';
      buckets: { t: number; min: number; max: number; mean: number; n: number }[];
    };

/** `GET /api/v1/ingest/rejections?reason&limit&before` (before: an id, for paging back). */
export const RejectionsQuerySchema = z.object({
  reason: RejectionReasonSchema.optional(),
  limit: z.coerce.number().int().min(1).max(1000).default(200),
  before: z.coerce.number().int().min(1).optional(),
});
export type RejectionsQuery = z.infer<typeof RejectionsQuerySchema>;

/** `GET /api/v1/ingest/unknown-channels?resolved=1` includes the ones already resolved. */
export const UnknownChannelsQuerySchema = z.object({ resolved: z.enum(['0', '1']).default('0') });

export interface RejectionRow {
  id: number;
  receivedAtMs: number;
  topic: string;
  deviceUsername: string | null;
  channelId: number | null;
  reason: RejectionReason;
  detail: string | null;
  payload: string;
}

export interface UnknownChannelRow {
  id: number;
  deviceId: number;
  deviceUsername: string;
  topic: string;
  assetCode: string;
  channelKey: string;
  firstSeenMs: number;
  lastSeenMs: number;
  messages: number;
  samplePayload: string | null;
  resolvedAtMs: number | null;
  resolution: string | null;
}

/** Raw retention per channel kind (site_settings key `retention`); rollups are kept longer. */
export const RetentionSettingsSchema = z.object({
  /** Raw readings, days, per channel kind; kinds not listed use the channel's own `raw_retention_days`. */
  rawDaysByKind: z.record(z.string(), z.number().int().min(1).max(36_500)),
  /** Per-minute rollups, days. */
  minuteRollupDays: z.number().int().min(1).max(36_500),
  /** Hourly rollups, days; null keeps them for ever. */
  hourRollupDays: z.number().int().min(1).max(36_500).nullable(),
  /** Refused messages, days. */
  rejectionDays: z.number().int().min(1).max(36_500),
});
export type RetentionSettings = z.infer<typeof RetentionSettingsSchema>;
