/**
 * Checks that a TCP port is free before a server binds it, so that start-up
 * stops with one clear line instead of picking another port silently.
 * Neutral ground: the web server, the embedded broker and the tests all
 * use it, so none of them imports another for it.
 */
import { createServer } from 'node:net';

/** Resolves true when `host:port` can be bound now. */
export function isPortFree(port: number, host: string): Promise<boolean> {
  return new Promise((resolve) => {
    const server = createServer();
    server.once('error', () => resolve(false));
    server.listen({ port, host, exclusive: true }, () => server.close(() => resolve(true)));
  });
}

/** A port the OS picks as free (for tests). */
export function freePort(host = '127.0.0.1'): Promise<number> {
  return new Promise((resolve, reject) => {
    const server = createServer();
    server.once('error', reject);
    server.listen({ port: 0, host }, () => {
      const address = server.address();
      const port = typeof address === 'object' && address ? address.port : 0;
      server.close(() => resolve(port));
    });
  });
}
