/**
 * A Mosquitto that cannot start rejects startMosquitto() with the reason: a
 * spawn failure must never escape as an unhandled 'error' event (vitest
 * fails the run on one).
 */
import { existsSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { startMosquitto } from './mosquitto';

describe('startMosquitto without a runnable binary', () => {
  it('rejects, saying there is no such file, when the binary is absent', async () => {
    const bin = '/nonexistent/sbin/mosquitto';
    expect(existsSync(bin)).toBe(false);
    await expect(startMosquitto({ bin, auth: 'open-for-tests' })).rejects.toThrow(`cannot start Mosquitto (${bin}): no such file`);
  });

  it('rejects naming the binary when the file is not a program', async () => {
    // Refused by the system (EACCES) or started and failed at once, depending on the machine.
    await expect(startMosquitto({ bin: '/etc/hostname', auth: 'open-for-tests' })).rejects.toThrow(/^(cannot start Mosquitto \(\/etc\/hostname\): |mosquitto \(\/etc\/hostname\) exited with )/);
  });
});
