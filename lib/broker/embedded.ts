/**
 * The embedded MQTT broker of the default set-up (aedes, MQTT 3.1.1, no shared
 * subscriptions), listening on 127.0.0.1 only. Messages for persistent
 * sessions are kept in memory while a client is away.
 */
import { createServer, type Server } from 'node:net';
import { Aedes } from 'aedes';
import { AppError } from '../errors/app-error';
import { createEmbeddedPersistence } from './embedded-persistence';
import type { Logger } from '../log/logger';
import { isPortFree } from '../server/ports';

export interface EmbeddedBroker {
  url: string;
  port: number;
  clients(): number;
  close(): Promise<void>;
}

/**
 * Starts the broker on `host:port`. A port already in use stops start-up with
 * an AppError whose message suggests MQTT_URL or another MQTT_PORT.
 */
export async function startEmbeddedBroker({
  port,
  host = '127.0.0.1',
  log,
}: {
  port: number;
  host?: string;
  log?: Logger;
}): Promise<EmbeddedBroker> {
  if (!(await isPortFree(port, host))) {
    throw new AppError(
      'config',
      'broker',
      `MQTT port ${port} on ${host} is already in use (another MQTT broker?): set MQTT_URL=mqtt://127.0.0.1:${port} to use the broker already there, or MQTT_PORT to another port`,
      { expose: true },
    );
  }
  // Sessions in memory, with acknowledgements matched to the connection they came on (embedded-persistence.ts).
  const aedes = await Aedes.createBroker({ persistence: createEmbeddedPersistence() as never });
  aedes.on('clientError', (client, error) => log?.debug('client error', { client: client?.id, error }));
  const server: Server = createServer(aedes.handle);
  await new Promise<void>((resolve, reject) => {
    server.once('error', (error: NodeJS.ErrnoException) =>
      reject(
        error.code === 'EADDRINUSE'
          ? new AppError('config', 'broker', `MQTT port ${port} on ${host} is already in use: set MQTT_URL or MQTT_PORT`, { expose: true })
          : error,
      ),
    );
    server.listen({ port, host }, () => resolve());
  });
  const url = `mqtt://${host}:${port}`;
  log?.info('embedded MQTT broker listening', { url });
  return {
    url,
    port,
    clients: () => aedes.connectedClients,
    close: () =>
      new Promise<void>((resolve) => {
        server.close(() => resolve());
        aedes.close(() => {});
        // Open client sockets would hold server.close; end them.
        setTimeout(() => resolve(), 1000).unref();
      }),
  };
}
