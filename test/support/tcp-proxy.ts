/**
 * A TCP proxy the test controls, to cut the ingester off its database and
 * restore it (a network outage, not a server restart).
 */
import { createServer, connect, type Socket } from 'node:net';

export interface TcpProxy {
  port: number;
  /** Closes every connection and refuses new ones until `restore`. */
  cut(): void;
  restore(): void;
  close(): Promise<void>;
  /** Connections accepted so far. */
  accepted(): number;
}

export async function startTcpProxy({ host, port }: { host: string; port: number }): Promise<TcpProxy> {
  const sockets = new Set<Socket>();
  let isCut = false;
  let accepted = 0;
  const server = createServer((client) => {
    if (isCut) {
      client.destroy();
      return;
    }
    accepted++;
    const upstream = connect({ host, port });
    sockets.add(client);
    sockets.add(upstream);
    const drop = () => {
      client.destroy();
      upstream.destroy();
      sockets.delete(client);
      sockets.delete(upstream);
    };
    client.on('error', drop).on('close', drop);
    upstream.on('error', drop).on('close', drop);
    client.pipe(upstream);
    upstream.pipe(client);
  });
  await new Promise<void>((resolve) => server.listen({ port: 0, host: '127.0.0.1' }, () => resolve()));
  const address = server.address();
  const proxyPort = typeof address === 'object' && address ? address.port : 0;
  return {
    port: proxyPort,
    accepted: () => accepted,
    cut() {
      isCut = true;
      for (const s of sockets) s.destroy();
      sockets.clear();
    },
    restore() {
      isCut = false;
    },
    close: () =>
      new Promise<void>((resolve) => {
        for (const s of sockets) s.destroy();
        server.close(() => resolve());
      }),
  };
}
