/**
 * A TCP proxy in front of one of the fakes, so a test can make that service vanish and come
 * back on the same address, as a stopped and restarted S3 or mail server would: `stop()`
 * closes the listener and drops every open connection (connections are then refused),
 * `start()` listens again on the same port, and `cutAfter(bytes)` stops it once that many
 * more bytes have passed in either direction (a fault in the middle of a transfer).
 */
import { connect, createServer, type Server, type Socket } from 'node:net';

export interface FaultProxy {
  /** `http://127.0.0.1:<port>` (or `smtp://…` when made with scheme 'smtp'). */
  readonly url: string;
  readonly port: number;
  start(): Promise<void>;
  stop(): Promise<void>;
  /** Stops the proxy once `bytes` more bytes have passed; resolves when it has stopped. */
  cutAfter(bytes: number): Promise<void>;
  readonly running: boolean;
}

export async function startFaultProxy(target: string, scheme = 'http'): Promise<FaultProxy> {
  const to = new URL(target);
  const targetPort = Number(to.port);
  const targetHost = to.hostname;
  const sockets = new Set<Socket>();
  let server: Server | null = null;
  let port = 0;
  let budget = Number.POSITIVE_INFINITY;
  let onCut: (() => void) | null = null;

  function count(bytes: number) {
    budget -= bytes;
    if (budget <= 0 && onCut) {
      const done = onCut;
      onCut = null;
      budget = Number.POSITIVE_INFINITY;
      void proxy.stop().then(done);
    }
  }

  function listen(): Promise<void> {
    return new Promise((resolve, reject) => {
      const s = createServer((client) => {
        const upstream = connect(targetPort, targetHost);
        sockets.add(client);
        sockets.add(upstream);
        const drop = () => {
          client.destroy();
          upstream.destroy();
          sockets.delete(client);
          sockets.delete(upstream);
        };
        client.on('data', (chunk: Buffer) => count(chunk.length));
        upstream.on('data', (chunk: Buffer) => count(chunk.length));
        client.pipe(upstream);
        upstream.pipe(client);
        client.on('error', drop).on('close', drop);
        upstream.on('error', drop).on('close', drop);
      });
      s.once('error', reject);
      s.listen(port, '127.0.0.1', () => {
        const address = s.address();
        port = typeof address === 'object' && address ? address.port : port;
        server = s;
        resolve();
      });
    });
  }

  const proxy: FaultProxy = {
    get url() {
      return `${scheme}://127.0.0.1:${port}`;
    },
    get port() {
      return port;
    },
    get running() {
      return server !== null;
    },
    start: () => (server ? Promise.resolve() : listen()),
    stop() {
      const s = server;
      server = null;
      for (const socket of sockets) socket.destroy();
      sockets.clear();
      return s ? new Promise<void>((resolve) => s.close(() => resolve())) : Promise.resolve();
    },
    cutAfter(bytes) {
      budget = bytes;
      return new Promise<void>((resolve) => {
        onCut = resolve;
      });
    },
  };
  await listen();
  return proxy;
}
