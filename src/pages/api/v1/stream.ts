import type { APIRoute } from 'astro';
import { z } from 'zod';
import { brokerLink, type LiveMessage } from '../../../lib/server/broker-link.ts';
import { requireRole } from '../../../lib/server/guard.ts';
import { readQuery } from '../../../lib/server/http.ts';
import { operation } from '../../../lib/server/api-operation.ts';

export const contract = {
  GET: operation({
    summary: 'Live events (server-sent events; ?kinds=readings,alarms,points,devices,loads)',
    tag: 'service',
    action: 'view',
    query: z.object({
      kinds: z
        .string()
        .optional()
        .meta({ description: 'Comma list of event kinds to receive (default all)', example: 'readings,alarms' }),
    }),
    responses: {
      200: {
        eventStream: true,
        description: 'Server-sent events named readings, alarms, points, devices or loads (`?kinds=` a comma list picks some)',
      },
    },
  }),
};

/**
 * Live updates for islands as server-sent events (signed-in users only). The ingest worker
 * (and the web server itself) publish to `coatrail/v1/_live/{kind}`; each becomes an SSE
 * event named {kind}: readings, alarms, points, devices, loads.
 */
export const GET: APIRoute = async ({ locals, url, request }) => {
  requireRole(locals, contract.GET.action);
  const { kinds } = readQuery(url, contract.GET.query);
  const wanted = new Set((kinds ?? '').split(',').filter(Boolean));
  const link = brokerLink();
  const enc = new TextEncoder();
  let onLive: ((m: LiveMessage) => void) | null = null;
  let ping: ReturnType<typeof setInterval> | null = null;
  const stream = new ReadableStream<Uint8Array>({
    start(controller) {
      const send = (s: string) => {
        try {
          controller.enqueue(enc.encode(s));
        } catch {
          /* closed */
        }
      };
      send(`retry: 2000\n: connected\n\n`);
      onLive = (m) => {
        const kind = m.topic.split('/')[3] ?? 'misc';
        if (wanted.size && !wanted.has(kind)) return;
        send(`event: ${kind}\ndata: ${JSON.stringify(m.payload)}\n\n`);
      };
      link.on('live', onLive);
      ping = setInterval(() => send(': ping\n\n'), 15_000);
      request.signal.addEventListener('abort', () => {
        if (onLive) link.off('live', onLive);
        if (ping) clearInterval(ping);
        try {
          controller.close();
        } catch {
          /* already closed */
        }
      });
    },
    cancel() {
      if (onLive) link.off('live', onLive);
      if (ping) clearInterval(ping);
    },
  });
  return new Response(stream, {
    headers: {
      'content-type': 'text/event-stream',
      'cache-control': 'no-store',
      connection: 'keep-alive',
      'x-accel-buffering': 'no',
    },
  });
};
