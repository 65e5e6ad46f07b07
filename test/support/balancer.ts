/**
 * A TCP load balancer for fault tests, standing in for the proxy in front of several nodes: each new
 * connection goes to the next backend in turn, and a backend that refuses the connection (a killed
 * node) is skipped for the next one, as a proxy's passive health check does (nginx `proxy_next_upstream
 * error`). Bytes are piped unchanged, so WebSocket upgrades pass. It counts connections per backend.
 */
import { once } from 'node:events';
import { connect, createServer, type Socket } from 'node:net';

export interface Balancer {
  readonly url: string;
  /** Open connections per backend port. */
  open(port: number): number;
  /** Connections ever made to each backend port. */
  made(port: number): number;
  /** While true, new connections are closed at once (clients retry): lets a test look before they return. */
  refuseNew: boolean;
  close(): Promise<void>;
}

export async function startBalancer(backends: number[]): Promise<Balancer> {
  const openCount = new Map<number, number>();
  const madeCount = new Map<number, number>();
  const sockets = new Set<Socket>();
  let next = 0;
  const state = { refuseNew: false };

  const server = createServer((client) => {
    sockets.add(client);
    client.on('close', () => sockets.delete(client));
    client.on('error', () => undefined); // a reset from either side just ends the pair
    if (state.refuseNew) {
      client.destroy();
      return;
    }
    client.pause();
    const first = next++ % backends.length;
    const attempt = (tried: number) => {
      if (tried === backends.length) {
        client.destroy();
        return;
      }
      const port = backends[(first + tried) % backends.length]!;
      const upstream = connect(port, '127.0.0.1');
      sockets.add(upstream);
      let connected = false;
      upstream.once('error', () => {
        if (!connected) {
          // refused: this backend is down; try the next one
          sockets.delete(upstream);
          attempt(tried + 1);
        }
      });
      upstream.once('connect', () => {
        connected = true;
        upstream.on('error', () => undefined);
        openCount.set(port, (openCount.get(port) ?? 0) + 1);
        madeCount.set(port, (madeCount.get(port) ?? 0) + 1);
        upstream.on('close', () => {
          openCount.set(port, openCount.get(port)! - 1);
          sockets.delete(upstream);
          client.destroy();
        });
        client.on('close', () => upstream.destroy());
        client.pipe(upstream);
        upstream.pipe(client);
        client.resume();
      });
    };
    attempt(0);
  });
  server.listen(0, '127.0.0.1');
  await once(server, 'listening');
  const { port } = server.address() as { port: number };
  return {
    url: `http://127.0.0.1:${port}`,
    open: (p) => openCount.get(p) ?? 0,
    made: (p) => madeCount.get(p) ?? 0,
    get refuseNew() {
      return state.refuseNew;
    },
    set refuseNew(value: boolean) {
      state.refuseNew = value;
    },
    async close() {
      for (const s of sockets) s.destroy();
      server.close();
      await once(server, 'close');
    },
  };
}
