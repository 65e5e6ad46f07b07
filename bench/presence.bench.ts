/**
 * Presence: 100 clients in one room each send an awareness update once a second (cursor moves);
 * five of them time every other client's update from send to arrival (the send time travels in the
 * state). Gloss (the real server, signed in) beside the y-websocket 2.1.0 reference utilities.
 * Target (DESIGN.md §9): p95 < 50 ms.
 */
import * as decoding from 'lib0/decoding';
import * as encoding from 'lib0/encoding';
import { openSocket, percentile, startBenchServer, type ServerKind } from './relay.bench.js';

const CLIENTS = 100;
const LISTENERS = 5;
const WARMUP_MS = 1_500;
const MEASURE_MS = 6_000;

function awarenessMessage(clientId: number, clock: number, state: unknown): Uint8Array {
  const update = encoding.createEncoder();
  encoding.writeVarUint(update, 1);
  encoding.writeVarUint(update, clientId);
  encoding.writeVarUint(update, clock);
  encoding.writeVarString(update, JSON.stringify(state));
  const e = encoding.createEncoder();
  encoding.writeVarUint(e, 1);
  encoding.writeVarUint8Array(e, encoding.toUint8Array(update));
  return encoding.toUint8Array(e);
}

/** Send times carried in awareness messages (field `t`), for entries other than `self`. */
function sendTimes(message: Uint8Array, self: number): number[] {
  const d = decoding.createDecoder(message);
  if (decoding.readVarUint(d) !== 1) return [];
  const u = decoding.createDecoder(decoding.readVarUint8Array(d));
  const out: number[] = [];
  for (let n = decoding.readVarUint(u); n > 0; n--) {
    const id = decoding.readVarUint(u);
    decoding.readVarUint(u);
    const state = JSON.parse(decoding.readVarString(u)) as { t?: number } | null;
    if (id !== self && typeof state?.t === 'number') out.push(state.t);
  }
  return out;
}

export async function measure(kind: ServerKind): Promise<Record<string, unknown> & { name: string }> {
  const server = await startBenchServer(kind);
  try {
    const latencies: number[] = [];
    let measuring = false;
    let sent = 0;
    const sockets = await Promise.all(
      Array.from({ length: CLIENTS }, (_, i) =>
        openSocket(
          server,
          i < LISTENERS
            ? (message) => {
                const now = performance.now();
                for (const t of sendTimes(message, i + 1)) if (measuring && t >= 0) latencies.push(now - t);
              }
            : undefined,
        ),
      ),
    );
    const timers = sockets.map((ws, i) => {
      const clientId = i + 1;
      let clock = 0;
      const beat = () => {
        const t = measuring ? performance.now() : -1;
        ws.send(awarenessMessage(clientId, ++clock, { user: { name: `coder ${clientId}` }, cursor: { anchor: clock * 7 }, t }));
        if (measuring) sent++;
      };
      let interval: NodeJS.Timeout | undefined;
      const start = setTimeout(() => {
        beat();
        interval = setInterval(beat, 1000);
      }, (i * 1000) / CLIENTS);
      return () => (clearTimeout(start), clearInterval(interval));
    });
    await new Promise((resolve) => setTimeout(resolve, WARMUP_MS));
    measuring = true;
    await new Promise((resolve) => setTimeout(resolve, MEASURE_MS));
    measuring = false;
    for (const stop of timers) stop();
    await new Promise((resolve) => setTimeout(resolve, 300));
    for (const ws of sockets) ws.terminate();
    latencies.sort((a, b) => a - b);
    return {
      name: 'presence',
      server: kind === 'reference' ? 'y-websocket-2.1.0-utils (memory)' : kind,
      clients: CLIENTS,
      hz: 1,
      updatesSent: sent,
      deliveriesTimed: latencies.length,
      p50Ms: Math.round(percentile(latencies, 50) * 100) / 100,
      p95Ms: Math.round(percentile(latencies, 95) * 100) / 100,
      p99Ms: Math.round(percentile(latencies, 99) * 100) / 100,
      target: kind === 'reference' ? 'reference' : 'p95 < 50 ms',
    };
  } finally {
    await server.stop();
  }
}

export async function run(): Promise<Array<Record<string, unknown> & { name: string }>> {
  return [await measure('reference'), await measure('gloss-pglite')];
}
