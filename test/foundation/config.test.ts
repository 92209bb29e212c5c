import { describe, expect, it } from 'vitest';
import { knownVariables, loadConfig } from '@/lib/config/env';

describe('configuration', () => {
  it('has the documented defaults', () => {
    const config = loadConfig({});
    expect(config.PORT).toBe(3000);
    expect(config.MQTT_PORT).toBe(1883);
    expect(config.DATA_DIR).toBe('./data');
    expect(config.DATABASE_URL).toBeUndefined();
    expect(config.MQTT_URL).toBeUndefined();
    expect(config.DEMO).toBe(true);
    expect(config.RETENTION_DAYS).toBe(90);
  });

  it('treats an empty value as unset', () => {
    expect(loadConfig({ DATABASE_URL: '', PORT: '' }).PORT).toBe(3000);
  });

  it.each([
    [{ PORT: 'eighty' }, /^PORT: expected a TCP port number, got "eighty"$/],
    [{ PORT: '70000' }, /^PORT: expected a TCP port from 1 to 65535, got "70000"$/],
    [{ DATABASE_URL: 'mysql://x' }, /^DATABASE_URL: expected a URL starting with postgres:\/\/ or postgresql:\/\//],
    [{ MQTT_URL: 'http://broker' }, /^MQTT_URL: expected a URL starting with mqtt:\/\//],
    [{ DEMO: 'maybe' }, /^DEMO: expected on or off, got "maybe"$/],
    [{ LOG_LEVEL: 'loud' }, /^LOG_LEVEL: expected debug, info, warn, error or silent/],
    [{ INGEST_BATCH_SAMPLES: '0' }, /^INGEST_BATCH_SAMPLES: expected a number of samples per batch of at least 1/],
  ])('rejects %o with one line naming the variable', (env, message) => {
    let error: Error | undefined;
    try {
      loadConfig(env);
    } catch (e) {
      error = e as Error;
    }
    expect(error?.message).toMatch(message);
    expect(error?.message).not.toContain('\n');
  });

  it('never echoes a password', () => {
    expect(() => loadConfig({ MQTT_PASSWORD: '' })).not.toThrow();
    expect(knownVariables).toContain('MQTT_PASSWORD');
  });
});
