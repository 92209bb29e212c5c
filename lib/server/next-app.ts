/**
 * Serves the Next.js app from a plain Node HTTP server, in this process, so
 * that pages share the process's database handle.
 */
import { createServer, type Server } from 'node:http';
import { resolve, dirname } from 'node:path';
import { fileURLToPath } from 'node:url';
import next from 'next';
import { AppError } from '@/lib/errors/app-error';
import { isPortFree } from '@/lib/net/ports';

export const PROJECT_ROOT = resolve(dirname(fileURLToPath(import.meta.url)), '../..');

export interface WebServer {
  url: string;
  close(): Promise<void>;
}

/** Starts the built Next app on `host:port`; a port in use stops start-up with one clear line. */
export async function startWebServer({ host, port }: { host: string; port: number }): Promise<WebServer> {
  if (!(await isPortFree(port, host))) {
    throw new AppError('config', 'web', `web port ${port} on ${host} is already in use: stop what holds it, or set PORT to another port`, {
      expose: true,
    });
  }
  const app = next({ dev: false, dir: PROJECT_ROOT, hostname: host, port });
  await app.prepare();
  const handle = app.getRequestHandler();
  const server: Server = createServer((req, res) => {
    // The client's address for sign-in throttling and the audit log (lib/auth/request.ts); never what a client sent.
    req.headers['x-millrace-client-ip'] = req.socket.remoteAddress ?? 'unknown';
    handle(req, res).catch((error: unknown) => {
      res.statusCode = 500;
      res.end('internal error');
      process.stderr.write(`${JSON.stringify({ time: new Date().toISOString(), level: 'error', area: 'web', msg: 'request failed', error: String(error) })}\n`);
    });
  });
  await new Promise<void>((resolveListen, reject) => {
    server.once('error', reject);
    server.listen({ port, host }, () => resolveListen());
  });
  const shown = host === '0.0.0.0' || host === '127.0.0.1' || host === '::' ? 'localhost' : host;
  return {
    url: `http://${shown}:${port}`,
    close: () =>
      new Promise<void>((resolveClose) => {
        server.close(() => resolveClose());
        server.closeAllConnections();
      }),
  };
}
