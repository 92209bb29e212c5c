/**
 * The embedded MQTT broker of the default set-up (aedes, MQTT 3.1.1, no shared
 * subscriptions), listening on 127.0.0.1 only. Messages for persistent
 * sessions are kept in memory while a client is away.
 *
 * Access (access.ts): every client signs in with a username and password the
 * host's authoriser accepts; a device publishes only to its own topics and
 * subscribes to nothing, an ingester subscribes to telemetry and presence and
 * publishes nothing. A client id belongs to the first account that used it
 * (while the broker runs), so no account can take over another's session.
 * `auth: 'open-for-tests'` turns all of this off; only tests pass it.
 */
import { createServer, type Server } from 'node:net';
import { Aedes, type Client, type Subscription } from 'aedes';
import { createCredentialCache, mayPublish, maySubscribe, type BrokerAuthoriser, type BrokerIdentity } from './access';
import { AppError } from '@/lib/errors/app-error';
import { createEmbeddedPersistence } from './embedded-persistence';
import type { Logger } from '@/lib/log/logger';
import { isPortFree } from '@/lib/net/ports';

export interface EmbeddedBroker {
  url: string;
  port: number;
  clients(): number;
  /**
   * Forgets the unit's cached credentials and disconnects its device now (its
   * password was rotated or revoked): it must sign in again, with the new one.
   */
  disconnectUnit(siteId: string, unitId: string): number;
  close(): Promise<void>;
}

/** An error aedes answers a CONNECT with (MQTT 3.1.1 return codes: 2 identifier rejected, 4 bad username or password, 5 not authorised). */
function refusal(returnCode: 2 | 4 | 5, message: string) {
  return Object.assign(new Error(message), { returnCode });
}

/**
 * Starts the broker on `host:port`. A port already in use stops start-up with
 * an AppError whose message suggests MQTT_URL or another MQTT_PORT.
 */
export async function startEmbeddedBroker({
  port,
  host = '127.0.0.1',
  log,
  auth,
}: {
  port: number;
  host?: string;
  log?: Logger;
  /** Who may connect and what they may do; 'open-for-tests' lets anyone do anything (ingest tests without accounts only). */
  auth: BrokerAuthoriser | 'open-for-tests';
}): Promise<EmbeddedBroker> {
  if (auth === undefined || auth === null) throw new RangeError('startEmbeddedBroker needs an authoriser (auth)');
  if (!(await isPortFree(port, host))) {
    throw new AppError(
      'config',
      'broker',
      `MQTT port ${port} on ${host} is already in use (another MQTT broker?): set MQTT_URL=mqtt://127.0.0.1:${port} to use the broker already there, or MQTT_PORT to another port`,
      { expose: true },
    );
  }
  // Sessions in memory, with acknowledgements matched to the connection they came on (embedded-persistence.ts).
  const hooks = auth === 'open-for-tests' ? undefined : accessHooks(auth, log);
  const aedes = await Aedes.createBroker({ persistence: createEmbeddedPersistence() as never, ...hooks?.options });
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
    disconnectUnit: (siteId, unitId) => {
      if (!hooks) return 0;
      hooks.credentialsChanged();
      hooks.cache.forgetUnit(siteId, unitId);
      let closed = 0;
      const all = (aedes as unknown as { clients: Record<string, Client> }).clients;
      for (const client of Object.values(all)) {
        const who = hooks.identityOf(client);
        if (who?.kind === 'device' && who.siteId === siteId && who.unitId === unitId) {
          closed++;
          client.close();
        }
      }
      if (closed > 0) log?.info('device disconnected: its credentials changed', { siteId, unitId, connections: closed });
      return closed;
    },
    close: () =>
      new Promise<void>((resolve) => {
        server.close(() => resolve());
        aedes.close(() => {});
        // Open client sockets would hold server.close; end them.
        setTimeout(() => resolve(), 1000).unref();
      }),
  };
}

/** aedes's hooks for `auth`, and what the broker needs of them afterwards. */
function accessHooks(auth: BrokerAuthoriser, log: Logger | undefined) {
  const cache = createCredentialCache();
  const identities = new WeakMap<Client, BrokerIdentity>();
  const wills = new WeakMap<Client, string>();
  /** Which account first used each client id. */
  const owners = new Map<string, string>();
  /** Counts credential changes: a check that began before one is not cached (it may have read the old password). */
  let changes = 0;
  const options = {
    preConnect(client: Client, packet: { will?: { topic: string } }, done: (error: Error | null, ok: boolean) => void) {
      if (packet.will) wills.set(client, packet.will.topic);
      done(null, true);
    },
    authenticate(client: Client, username: string | undefined, password: Buffer | undefined, done: (error: never, ok: boolean | null) => void) {
      const refuse = (code: 2 | 4 | 5, why: string) => {
        log?.info('connection refused', { client: client.id, username, why });
        done(refusal(code, why) as never, false);
      };
      if (!username || !password || password.length === 0) return refuse(5, 'no username and password (anonymous access is off)');
      const cached = cache.get(username, password);
      const changesBefore = changes;
      const checked = cached ? Promise.resolve(cached) : auth.verify(username, password);
      checked.then(
        (identity) => {
          if (!identity) return refuse(4, 'unknown username, wrong password, or revoked');
          if (!cached && changes === changesBefore) cache.set(username, password, identity);
          const will = wills.get(client);
          if (will !== undefined && !mayPublish(identity, will)) return refuse(5, `last will on ${will}, not a topic of this account`);
          const owner = owners.get(client.id);
          if (owner !== undefined && owner !== username) return refuse(2, `client id ${client.id} belongs to another account`);
          owners.set(client.id, username);
          identities.set(client, identity);
          done(null as never, true);
        },
        (error: unknown) => {
          log?.error('could not check credentials', { client: client.id, username, error });
          done(refusal(5, 'credentials could not be checked') as never, false);
        },
      );
    },
    authorizePublish(client: Client | null, packet: { topic: string }, done: (error?: Error | null) => void) {
      const identity = client ? identities.get(client) : undefined;
      if (mayPublish(identity, packet.topic)) return done(null);
      log?.info('publish refused', { client: client?.id, username: identity?.username, topic: packet.topic });
      done(new Error(`not allowed to publish to ${packet.topic}`));
    },
    authorizeSubscribe(client: Client, sub: Subscription, done: (error: Error | null, sub?: Subscription | null) => void) {
      const identity = identities.get(client);
      if (maySubscribe(identity, sub.topic)) return done(null, sub);
      log?.info('subscription refused', { client: client.id, username: identity?.username, filter: sub.topic });
      done(null, null);
    },
  };
  return {
    options,
    cache,
    identityOf: (client: Client) => identities.get(client),
    credentialsChanged: () => {
      changes++;
    },
  };
}
