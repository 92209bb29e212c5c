import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { parse } from 'yaml';
import { knownVariables } from '@/lib/config/env';

// No Docker engine runs where these tests run, so the compose file is checked
// by reading it: every variable it passes to a millrace service must be one
// the configuration module knows, and the services must be wired as documented.
const compose = parse(readFileSync(new URL('../../docker-compose.yml', import.meta.url), 'utf8'), { merge: true }) as {
  services: Record<string, { environment?: Record<string, string>; command?: string[]; configs?: Array<{ source: string }>; volumes?: string[] }>;
  configs: Record<string, { content: string }>;
};

const MILLRACE_SERVICES = ['web', 'ingest'];

describe('docker-compose.yml', () => {
  it('runs PostgreSQL, Mosquitto, the web app and the ingester as separate services', () => {
    expect(Object.keys(compose.services).sort()).toEqual(['ingest', 'mosquitto', 'postgres', 'web']);
    expect(compose.services.web?.command).toEqual(['npm', 'run', 'web']);
    expect(compose.services.ingest?.command).toEqual(['npm', 'run', 'ingest']);
  });

  it.each(MILLRACE_SERVICES)('passes %s only variables the config module knows', (name) => {
    const env = compose.services[name]?.environment ?? {};
    expect(Object.keys(env).length).toBeGreaterThan(0);
    const unknown = Object.keys(env).filter((v) => !knownVariables.includes(v));
    expect(unknown).toEqual([]);
  });

  it('wires the services to the database and the broker by name', () => {
    for (const name of MILLRACE_SERVICES) {
      const env = compose.services[name]!.environment!;
      // As compose resolves it with POSTGRES_PASSWORD set.
      const url = new URL(env.DATABASE_URL!.replace(/\$\{POSTGRES_PASSWORD:\?[^}]*\}/, 'secret'));
      expect(url.host).toBe('postgres:5432');
      expect(url.password).toBe('secret');
      expect(env.MQTT_URL).toBe('mqtt://mosquitto:1883');
    }
  });

  it('has no default database password: every use of POSTGRES_PASSWORD refuses when it is unset', () => {
    const text = readFileSync(new URL('../../docker-compose.yml', import.meta.url), 'utf8');
    const uses = [...text.matchAll(/\$\{POSTGRES_PASSWORD([^}]*)\}/g)].map((m) => m[1]!);
    expect(uses.length).toBeGreaterThanOrEqual(2);
    for (const use of uses) expect(use).toMatch(/^:\?set POSTGRES_PASSWORD/);
    expect(compose.services.postgres?.environment?.POSTGRES_PASSWORD).toMatch(/^\$\{POSTGRES_PASSWORD:\?/);
    // The password file the header suggests stays out of git and out of the image.
    expect(readFileSync(new URL('../../.gitignore', import.meta.url), 'utf8')).toMatch(/^\.env$/m);
    expect(readFileSync(new URL('../../.dockerignore', import.meta.url), 'utf8')).toMatch(/^\.env$/m);
  });

  it('lets nobody into Mosquitto anonymously: password and ACL files exported by millrace, mounted read-only', () => {
    const conf = compose.configs.mosquitto_conf!.content;
    expect(conf).toMatch(/^allow_anonymous false$/m);
    expect(conf).not.toMatch(/^allow_anonymous true$/m);
    const passwordFile = /^password_file (\S+)$/m.exec(conf)?.[1];
    const aclFile = /^acl_file (\S+)$/m.exec(conf)?.[1];
    expect(passwordFile).toBe('/mosquitto/auth/passwords');
    expect(aclFile).toBe('/mosquitto/auth/acl');
    // The folder `npx millrace device export-broker-auth --dir broker-auth` writes, mounted where the two lines point.
    expect(compose.services.mosquitto?.volumes).toContain('./broker-auth:/mosquitto/auth:ro');
    // Its hashes stay out of git and out of the image.
    expect(readFileSync(new URL('../../.gitignore', import.meta.url), 'utf8')).toMatch(/^broker-auth\/$/m);
    expect(readFileSync(new URL('../../.dockerignore', import.meta.url), 'utf8')).toMatch(/^broker-auth\/$/m);
  });

  it('gives the ingester its broker account from .env, with no default, and the web app none', () => {
    const text = readFileSync(new URL('../../docker-compose.yml', import.meta.url), 'utf8');
    for (const name of ['MQTT_USERNAME', 'MQTT_PASSWORD']) {
      expect(compose.services.ingest?.environment?.[name]).toMatch(new RegExp(`^\\$\\{${name}:\\?set ${name}`));
      const uses = [...text.matchAll(new RegExp(`\\$\\{${name}([^}]*)\\}`, 'g'))].map((m) => m[1]!);
      expect(uses.length).toBeGreaterThanOrEqual(1);
      for (const use of uses) expect(use).toMatch(new RegExp(`^:\\?set ${name}`));
      expect(compose.services.web?.environment?.[name]).toBeUndefined();
    }
  });

  it('gives Mosquitto the inline configuration, with persistence and no queue limit', () => {
    expect(compose.services.mosquitto?.configs?.[0]?.source).toBe('mosquitto_conf');
    const conf = compose.configs.mosquitto_conf!.content;
    expect(conf).toMatch(/^persistence true$/m);
    expect(conf).toMatch(/^max_queued_messages 0$/m);
  });
});
