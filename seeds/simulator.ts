/**
 * Demo-plant simulator: publishes the invented plant's live readings over MQTT with each
 * gateway's own credentials, continuing the seeded history from now with the generators of
 * `plant-model.ts`. `npm start` runs it unless SIMULATOR=0.
 *
 * - One MQTT client per device (clean session, last will `offline` retained on
 *   `{prefix}/status`, `online` retained on connect, `offline` on a clean stop); mqtt.js
 *   reconnects by itself after a broker restart. While disconnected a gateway keeps its
 *   samples (up to 30 minutes per channel) and sends them as one batch per channel
 *   (`{"samples": […]}`) when it is back — store and forward, as a PLC gateway does.
 * - Ovens every 2 s (setpoint, door, zone 1 and zone 2 air), bath temperature and room every
 *   10 s, viscosity every 60 s, withdrawal speed once per dip stroke (~every 40 s), UV
 *   irradiance and spin speed every 5 s. Single samples are `{"t": <epoch ms>, "v": <number>}`.
 * - Oven cycles run at real length (180-minute soak), so live cure records come out complete;
 *   SIM_FAST_OVENS=1 compresses them to ~25 minutes to watch the phases change (their cure
 *   records are then honestly under-cured). The bath evaporates sixty times faster (one minute
 *   of wall time is one running hour).
 * - In the first minutes: oven A's door opens mid-soak (≈ 8 °C dip), oven B's zone 2
 *   thermocouple stops reporting for 2 minutes, and line 1's viscosity drifts above the
 *   window high (12.5 mm²/s) from about minute 5 until a solvent addition at minute 8 brings
 *   it back.
 *
 * Logs one line per minute. Stop with SIGTERM or SIGINT.
 */
import mqtt, { type MqttClient } from 'mqtt';
import { startProcessMetrics } from '../src/lib/core/process-metrics.ts';
import { deviceTopicPrefix } from '../src/lib/shared/topics.ts';
import { DEMO_DEVICES, DEMO_SITE, demoDevicePassword, demoTopic } from './demo-plant.ts';
import {
  DEMO_OVEN_DYNAMICS,
  DIP_LINES,
  HISTORY_OVEN_DYNAMICS,
  MINUTE_MS,
  OVENS,
  SOAK_MINUTES,
  VISCOSITY_WINDOW_HIGH_MM2_S,
  bathStateAt,
  bathTempC,
  buildPlantModel,
  driftOffset,
  freshLacquerTopUp,
  ovenSampleAt,
  planCycle,
  rngFrom,
  roomRhPct,
  roomTempC,
  seedOf,
  solventTopUp,
  spinSpeed,
  stepBath,
  strokeSpeed,
  uvIrradianceAt,
  viscosityAtTemp,
  viscosityOfSolids,
  viscositySensorReading,
  BATH_RATES,
  solidsForViscosity,
  type BathState,
  type DipLineCode,
  type OvenCode,
  type OvenCycle,
  type OvenCycleKind,
  type OvenTrack,
} from './plant-model.ts';

const secret = process.env['SIM_DEVICE_SECRET'];
if (!secret) {
  console.error('[simulator] SIM_DEVICE_SECRET is not set');
  process.exit(1);
}
const url = process.env['MQTT_URL'] || `mqtt://127.0.0.1:${process.env['MQTT_PORT'] || 1883}`;
// Real-length oven cycles by default, so live cure records are honest (a compressed cycle cannot
// reach the window's equivalent minutes and would fill the queue with cure alarms).
const realTimeOvens = !['1', 'true', 'yes'].includes((process.env['SIM_FAST_OVENS'] ?? '').toLowerCase());
const say = (s: string) => console.log(`[simulator] ${s}`);

/**
 * SIM_SPEED (default 1) runs the plant faster than the wall clock (bench:soak runs it at 20×);
 * SIM_START_MS starts its clock in the past so that a fast run never publishes ahead of now.
 */
const speed = Math.max(1, Number(process.env['SIM_SPEED'] ?? 1) || 1);
const wallStartMs = Date.now();
const startMs = Math.ceil((Number(process.env['SIM_START_MS'] ?? '') || wallStartMs) / 1000) * 1000;
/**
 * The plant's own clock: when this demo plant was first started (SIM_EPOCH_MS, kept by
 * `npm start` in var/). Oven schedules are laid from it, so a restart of the software finds
 * each oven where it would be on the wall clock instead of starting every oven cold (which
 * looked like an aborted cure per oven and restart). The opening story plays only on a fresh plant.
 */
const epochMs = Math.min(startMs, Number(process.env['SIM_EPOCH_MS'] ?? '') || startMs);
const freshPlant = startMs - epochMs < 10 * MINUTE_MS;
const model = buildPlantModel(epochMs);
const rng = rngFrom(seedOf('simulator', startMs));
/** What happened since the last minute line; repeats are counted, not repeated. */
const events = new Map<string, number>();
const note = (s: string) => events.set(s, (events.get(s) ?? 0) + 1);

// ───────────────────────────── gateways ─────────────────────────────

const BUFFER_LIMIT = 900; // samples per channel kept while disconnected (30 min at 2 s)
const BATCH_MAX = 1000;

interface Sample {
  t: number;
  v: number;
}

class Gateway {
  readonly client: MqttClient;
  readonly statusTopic: string;
  private readonly held = new Map<string, Sample[]>();
  private everConnected = false;
  dropped = 0;
  sent = 0;
  /** Samples handed to the broker since start (single and batched), for bench:soak's count. */
  samplesSent = 0;

  constructor(readonly username: string) {
    this.statusTopic = `${deviceTopicPrefix(DEMO_SITE.code, username)}/status`;
    this.client = mqtt.connect(url, {
      username,
      password: demoDevicePassword(secret!, username),
      clientId: `${username}-sim-${process.pid}`, // bound to the credential by the broker
      protocolVersion: 4,
      clean: true,
      reconnectPeriod: 1000,
      connectTimeout: 10_000,
      will: { topic: this.statusTopic, payload: Buffer.from('offline'), qos: 1, retain: true },
    });
    this.client.on('connect', () => {
      this.client.publish(this.statusTopic, 'online', { qos: 1, retain: true });
      this.flush();
      this.everConnected = true;
    });
    this.client.on('error', (e) => note(`${username}: ${e.message}`));
    this.client.on('offline', () => note(`${username} lost the broker; holding samples`));
  }

  publish(asset: string, key: string, t: number, v: number): void {
    const topic = demoTopic(this.username, asset, key);
    if (this.client.connected && !this.held.has(topic)) {
      this.client.publish(topic, JSON.stringify({ t, v }), { qos: 1 });
      this.sent++;
      this.samplesSent++;
      return;
    }
    const list = this.held.get(topic) ?? [];
    list.push({ t, v });
    if (list.length > BUFFER_LIMIT) {
      list.shift();
      this.dropped++;
    }
    this.held.set(topic, list);
  }

  /** Sends what was held while disconnected, one batch per channel. */
  private flush(): void {
    for (const [topic, list] of this.held) {
      for (let i = 0; i < list.length; i += BATCH_MAX) {
        const batch = list.slice(i, i + BATCH_MAX);
        this.client.publish(topic, JSON.stringify({ samples: batch }), { qos: 1 });
        this.sent++;
        this.samplesSent += batch.length;
      }
    }
    if (this.held.size && this.everConnected) note(`${this.username} reconnected and sent what it held`);
    this.held.clear();
  }

  async stop(): Promise<void> {
    if (this.client.connected)
      await this.client.publishAsync(this.statusTopic, 'offline', { qos: 1, retain: true }).catch(() => {});
    await this.client.endAsync().catch(() => {});
  }
}

const gateways = new Map(DEMO_DEVICES.map((d) => [d.username, new Gateway(d.username)]));
const gw = (username: string) => gateways.get(username)!;

// ───────────────────────────── ovens ─────────────────────────────

interface OvenSim {
  track: OvenTrack;
  gateway: Gateway;
  n: number;
  /** This oven's own random stream, seeded by the plant epoch: the same schedule after any restart. */
  rng: ReturnType<typeof rngFrom>;
}

const ovenDyn = realTimeOvens ? HISTORY_OVEN_DYNAMICS : { ...DEMO_OVEN_DYNAMICS, doorOpenTauS: 150 };
const ovens = new Map<OvenCode, OvenSim>(
  OVENS.map((o) => {
    const s = ovenSampleAt(model.ovens[o], epochMs);
    const initialC: [number, number] = [s.zonesC[0] ?? 24, s.zonesC[1] ?? 24];
    return [
      o,
      {
        track: { oven: o, dyn: ovenDyn, cycles: [], initialMs: epochMs, initialC },
        gateway: gw(`gw-${o}`),
        n: 0,
        rng: rngFrom(seedOf(`simulator-${o}`, epochMs)),
      },
    ];
  }),
);

function addCycle(sim: OvenSim, loadStartMs: number, kind: OvenCycleKind): OvenCycle {
  sim.n++;
  const c = planCycle(sim.track, `${sim.track.oven}-live-${sim.n}`, {
    kind,
    loadStartMs,
    loadInS: realTimeOvens ? sim.rng.range(90, 180) : 40,
    soakMinutes: realTimeOvens ? SOAK_MINUTES : 13,
    rampCPerMin: realTimeOvens ? sim.rng.range(2.8, 3.2) : sim.rng.range(18, 20),
    unloadDelayMin: realTimeOvens ? sim.rng.range(0, 10) : 0.3,
    unloadS: realTimeOvens ? sim.rng.range(120, 240) : 40,
    ...(kind === 'door-opened'
      ? {
          midSoakDoor: {
            afterSoakMin: realTimeOvens ? sim.rng.range(30, 120) : sim.rng.range(0.8, 6),
            durationS: realTimeOvens ? 150 : 45,
          },
        }
      : {}),
    ...(kind === 'tc-dropout'
      ? {
          dropout: {
            zone: sim.rng() < 0.5 ? 1 : 2,
            afterSoakMin: realTimeOvens ? sim.rng.range(20, 120) : sim.rng.range(1, 8),
            durationMin: realTimeOvens ? sim.rng.range(20, 40) : 2,
          },
        }
      : {}),
  });
  sim.track.cycles.push(c);
  return c;
}

// The opening trickle: oven A's door mid-soak, oven B's zone 2 thermocouple out for 2 minutes.
{
  const a = ovens.get('oven-a')!;
  const first = addCycle(a, epochMs + 15_000, 'normal');
  first.kind = 'door-opened';
  // Real-length cycles: the door opens in the first minutes while the oven heats (still a cure in progress).
  const doorAt = realTimeOvens ? epochMs + 5 * MINUTE_MS : first.soakStartMs + 0.8 * MINUTE_MS;
  first.doorOpenings.push({ startMs: doorAt, endMs: doorAt + (realTimeOvens ? 150_000 : 45_000), reason: 'mid-soak' });
  first.doorOpenings.sort((x, y) => x.startMs - y.startMs);
  const b = ovens.get('oven-b')!;
  const second = addCycle(b, epochMs + 60_000, 'normal');
  second.kind = 'tc-dropout';
  second.dropouts.push({ zone: 'oven-b-z2', startMs: epochMs + 3 * MINUTE_MS, endMs: epochMs + 5 * MINUTE_MS });
  addCycle(ovens.get('oven-c')!, epochMs + 8 * MINUTE_MS, 'normal');
}

/** Plan this oven's next cycles until one is still running (or not yet begun) at `t`. */
function extendCycles(sim: OvenSim, t: number): void {
  let last = sim.track.cycles.at(-1);
  while (last && t >= last.loadEndMs) {
    const u = sim.rng();
    const kind: OvenCycleKind = u < 0.15 ? 'door-opened' : u < 0.27 ? 'tc-dropout' : 'normal';
    last = addCycle(sim, last.loadEndMs + sim.rng.range(realTimeOvens ? 10 : 1, realTimeOvens ? 40 : 3) * MINUTE_MS, kind);
  }
}
// A restart: lay the schedule from the epoch up to now, so each oven resumes mid-cycle.
for (const sim of ovens.values()) extendCycles(sim, startMs);

function phaseOf(c: OvenCycle | undefined, t: number): string {
  if (!c || t >= c.loadEndMs || t < c.loadStartMs) return 'idle';
  if (t < c.rampStartMs) return 'loading';
  if (t < c.soakStartMs) return 'ramp';
  if (t < c.soakEndMs) return 'soak';
  return 'cool';
}

const lastEvent = new Map<string, string>();
function ovenTick(t: number): void {
  for (const [code, sim] of ovens) {
    extendCycles(sim, t);
    const s = ovenSampleAt(sim.track, t);
    const g = sim.gateway;
    g.publish(code, 'setpoint', t, s.setpointC);
    g.publish(code, 'door', t, s.door);
    s.zonesC.forEach((v, i) => {
      if (v !== null) g.publish(`${code}-z${i + 1}`, 'air-temp', t, Math.round(v * 100) / 100);
    });
    // Note what happens, for the minute's log line.
    const current = sim.track.cycles.find((c) => t >= c.loadStartMs && t < c.loadEndMs);
    const mid = current?.doorOpenings.find((o) => o.reason === 'mid-soak' && t >= o.startMs && t < o.endMs);
    const drop = current?.dropouts.find((d) => t >= d.startMs && t < d.endMs);
    const state = mid ? 'door open during the cure' : drop ? `${drop.zone} thermocouple not reporting` : phaseOf(current, t);
    if (lastEvent.get(code) !== state) {
      lastEvent.set(code, state);
      if (mid || drop) note(`${code}: ${state}`);
    }
  }
}

// ───────────────────────────── dip lines ─────────────────────────────

interface LineSim {
  line: DipLineCode;
  gateway: Gateway;
  bath: BathState;
  /** Until this time line 1 drifts toward 13.1 mm²/s (the opening story); it creeps on until the top-up at minute 8. */
  driftUntilMs: number;
  driftFrom: number;
  driftTo: number;
  threshold: number;
  topUpAtMs: number | null;
  nextStrokeMs: number;
  drift: { startMs: number; rampMs: number; holdMs: number; amplitude: number } | null;
}

const lines = new Map<DipLineCode, LineSim>(
  DIP_LINES.map((line) => {
    const bath = bathStateAt(model.baths[line], startMs);
    const story = freshPlant && line === 'dip-1';
    const driftTo = Math.max(bath.solids, solidsForViscosity(13.1));
    return [
      line,
      {
        line,
        gateway: gw(`gw-${line}`),
        bath,
        driftUntilMs: story ? startMs + 6 * MINUTE_MS : startMs,
        driftFrom: bath.solids,
        driftTo,
        threshold: rng.range(12.6, 12.9),
        topUpAtMs: story ? startMs + 8 * MINUTE_MS : null,
        nextStrokeMs: startMs + rng.range(5, 20) * 1000,
        drift:
          freshPlant && line === 'dip-2'
            ? { startMs: startMs + 20 * MINUTE_MS, rampMs: 10 * MINUTE_MS, holdMs: 5 * MINUTE_MS, amplitude: 0.08 }
            : null,
      },
    ];
  }),
);

const trueViscosity = (l: LineSim, t: number) => viscosityAtTemp(viscosityOfSolids(l.bath.solids), bathTempC(l.line, t));

/** Advances a bath by one minute of wall time (one running hour of model time) and applies the operator's additions. */
function bathMinute(l: LineSim, t: number): void {
  if (t < l.driftUntilMs) {
    const f = 1 - (l.driftUntilMs - t) / (l.driftUntilMs - startMs);
    l.bath = { massKg: l.bath.massKg, solids: l.driftFrom + (l.driftTo - l.driftFrom) * f };
  } else {
    l.bath = stepBath(l.bath, 1, true);
  }
  if (l.topUpAtMs !== null && t >= l.topUpAtMs) {
    const before = trueViscosity(l, t);
    const r = solventTopUp(l.bath, 0.01 * rng.gauss());
    l.bath = r.after;
    l.topUpAtMs = null;
    l.threshold = rng.range(12.6, 12.9);
    note(
      `${l.line}: solvent addition ${r.massKg.toFixed(1)} kg, viscosity ${before.toFixed(2)} → ${trueViscosity(l, t).toFixed(2)} mm²/s`,
    );
  } else if (l.topUpAtMs === null && t >= l.driftUntilMs && viscosityOfSolids(l.bath.solids) > l.threshold) {
    l.topUpAtMs = t + rng.range(2, 4) * MINUTE_MS; // the operator notices and fetches the solvent
  } else if (l.bath.massKg < BATH_RATES.freshLacquerBelowKg) {
    const r = freshLacquerTopUp(l.bath);
    l.bath = r.after;
    note(`${l.line}: fresh lacquer ${r.massKg.toFixed(1)} kg`);
  }
}

function lineTick(t: number, k: number): void {
  for (const l of lines.values()) {
    const g = l.gateway;
    const hc = `${l.line}-hc`;
    if (k % 60 === 0) {
      if (k > 0) bathMinute(l, t);
      g.publish(hc, 'viscosity', t, Math.round(viscositySensorReading(l.line, trueViscosity(l, t), t) * 1000) / 1000);
    }
    if (k % 10 === 0) {
      g.publish(hc, 'bath-temp', t, Math.round(bathTempC(l.line, t) * 100) / 100);
      g.publish(l.line, 'room-rh', t, Math.round(roomRhPct(l.line, t) * 10) / 10);
      g.publish(l.line, 'room-temp', t, Math.round(roomTempC(l.line, t) * 100) / 100);
    }
    if (t >= l.nextStrokeMs) {
      if (l.drift && t > l.drift.startMs + l.drift.rampMs + l.drift.holdMs) {
        l.drift =
          rng() < 0.5
            ? {
                startMs: t + rng.range(30, 90) * MINUTE_MS,
                rampMs: 10 * MINUTE_MS,
                holdMs: 5 * MINUTE_MS,
                amplitude: (rng() < 0.5 ? -1 : 1) * rng.range(0.06, 0.1),
              }
            : null;
      } else if (!l.drift && rng() < 0.01) {
        l.drift = {
          startMs: t,
          rampMs: 10 * MINUTE_MS,
          holdMs: 5 * MINUTE_MS,
          amplitude: (rng() < 0.5 ? -1 : 1) * rng.range(0.06, 0.1),
        };
      }
      g.publish(hc, 'withdrawal-speed', t, strokeSpeed(l.line, driftOffset(l.drift, t), rng.gauss()));
      l.nextStrokeMs = t + rng.range(35, 45) * 1000;
    }
  }
}

// ───────────────────────────── UV coater ─────────────────────────────

function uvTick(t: number): void {
  const g = gw('gw-uv-1');
  const irr = uvIrradianceAt(model.lamp, t, true);
  if (irr !== null) g.publish('uv-1', 'irradiance', t, Math.round(irr * 10) / 10);
  g.publish('uv-1', 'spin-speed', t, spinSpeed(rng.gauss()));
}

// ───────────────────────────── clock ─────────────────────────────

let k = 0;
let timer: NodeJS.Timeout | null = null;
let stopping = false;

function minuteLine(t: number): void {
  const online = [...gateways.values()].filter((g) => g.client.connected).length;
  const sent = [...gateways.values()].reduce((s, g) => s + g.sent, 0);
  const dropped = [...gateways.values()].reduce((s, g) => s + g.dropped, 0);
  for (const g of gateways.values()) g.sent = 0;
  const ov = [...ovens].map(([code, sim]) => {
    const c = sim.track.cycles.find((x) => t >= x.loadStartMs && t < x.loadEndMs);
    const z = ovenSampleAt(sim.track, t).zonesC[0];
    return `${code} ${phaseOf(c, t)} ${z === null ? '—' : z.toFixed(1)} °C`;
  });
  const li = [...lines.values()].map(
    (l) =>
      `${l.line} ${trueViscosity(l, t).toFixed(2)} mm²/s${trueViscosity(l, t) > VISCOSITY_WINDOW_HIGH_MM2_S ? ' (above 12.5)' : ''}`,
  );
  say(
    `${Math.round((t - startMs) / MINUTE_MS)} min: ${sent} messages, ${online}/${gateways.size} gateways connected${dropped ? `, ${dropped} samples dropped while offline` : ''}; ` +
      `${ov.join(', ')}; ${li.join(', ')}${events.size ? `; ${[...events].map(([e, n]) => (n > 1 ? `${e} (×${n})` : e)).join('; ')}` : ''}`,
  );
  events.clear();
}

function tick(): void {
  if (stopping) return;
  const t = startMs + k * 1000;
  try {
    if (k % 2 === 0) ovenTick(t);
    lineTick(t, k);
    if (k % 5 === 0) uvTick(t);
    if (k > 0 && k % 60 === 0) minuteLine(t);
  } catch (e) {
    say(`error: ${(e as Error).message}`);
  }
  k++;
  // Self-correcting: the next tick is due k s (of plant time) after the start; after a stall, catch up at once.
  timer = setTimeout(tick, Math.max(0, wallStartMs + (k * 1000) / speed - Date.now()));
}

say(
  `publishing the demo plant to ${url} as ${gateways.size} gateways${realTimeOvens ? ' (real-length oven cycles)' : ' (oven cycles compressed to ~25 min)'}.`,
);
timer = setTimeout(tick, 0);
const flushMetrics = startProcessMetrics('simulator', () => ({
  samplesSent: [...gateways.values()].reduce((n, g) => n + g.samplesSent, 0),
  samplesDropped: [...gateways.values()].reduce((n, g) => n + g.dropped, 0),
  plantTime: new Date(startMs + k * 1000).toISOString(),
}));

async function stop(): Promise<void> {
  if (stopping) return;
  stopping = true;
  if (timer) clearTimeout(timer);
  await Promise.race([Promise.all([...gateways.values()].map((g) => g.stop())), new Promise((r) => setTimeout(r, 3000))]);
  flushMetrics();
  process.exit(0);
}
process.once('SIGTERM', () => void stop());
process.once('SIGINT', () => void stop());
