/**
 * Demo-plant simulator: publishes invented readings for every demo channel with the
 * devices' own credentials, as real gateways would. (First version: steady values with
 * noise; the telemetry work makes the plant's story.)
 */
import mqtt from 'mqtt';
import { DEMO_DEVICES, demoDevicePassword, demoTopic } from './demo-plant.ts';

const secret = process.env['SIM_DEVICE_SECRET'];
if (!secret) {
  console.error('[simulator] SIM_DEVICE_SECRET is not set');
  process.exit(1);
}
const url = process.env['MQTT_URL'] ?? `mqtt://127.0.0.1:${process.env['MQTT_PORT'] ?? 1883}`;
const nominal: Record<string, number> = {
  'withdrawal-speed': 2.0, viscosity: 9.5, 'bath-temp': 12, 'room-rh': 42, 'room-temp': 21,
  setpoint: 110, door: 0, 'air-temp': 110, irradiance: 180, 'spin-speed': 1500,
};
const clients = DEMO_DEVICES.map((d) => {
  const c = mqtt.connect(url, { username: d.username, password: demoDevicePassword(secret, d.username), protocolVersion: 4, reconnectPeriod: 1000 });
  c.on('error', (e) => console.error(`[simulator] ${d.username}: ${e.message}`));
  return { d, c };
});
type Spec = { asset: { code: string; channels?: { key: string }[]; children?: Spec['asset'][] } };
const walk = (a: Spec['asset'], out: { asset: string; key: string }[]) => {
  for (const ch of a.channels ?? []) out.push({ asset: a.code, key: ch.key });
  for (const child of a.children ?? []) walk(child, out);
  return out;
};
const timer = setInterval(() => {
  const t = Date.now();
  for (const { d, c } of clients) {
    if (!c.connected) continue;
    for (const { asset, key } of walk(d.asset, [])) {
      const base = nominal[key] ?? 1;
      const v = key === 'door' ? 0 : base * (1 + (Math.random() - 0.5) * 0.02);
      c.publish(demoTopic(d.username, asset, key), JSON.stringify({ t, v: Math.round(v * 1000) / 1000 }), { qos: 1 });
    }
  }
}, 5000);
const stop = () => {
  clearInterval(timer);
  for (const { c } of clients) c.end(true);
  process.exit(0);
};
process.once('SIGTERM', stop);
process.once('SIGINT', stop);
