import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startProductProcess, type RunningProduct } from '@/test/support/product';

// Start-up refusals and the empty fleet: a port in use stops start-up with one
// line naming it and the way out; never another port silently.
let product: RunningProduct;

beforeAll(async () => {
  product = await startProductProcess({ DEMO: 'off' });
}, 300_000);
afterAll(async () => {
  await product?.stop();
}, 60_000);

describe('npm start with the demo fleet off', () => {
  it('serves the empty fleet list from the database, saying how to register units', async () => {
    const html = await (await product.fetch(product.url)).text();
    expect(html).toContain('No units registered yet');
    expect(html).toContain('npx millrace units import FLEET.json');
  });

  it('refuses to start on a web port in use, with one line naming PORT', async () => {
    await expect(startProductProcess({ DEMO: 'off', PORT: String(product.port) }, 120_000)).rejects.toThrow(
      new RegExp(`web port ${product.port} on 127.0.0.1 is already in use: stop what holds it, or set PORT to another port`),
    );
  });

  it('refuses to start the embedded broker on an MQTT port in use, suggesting MQTT_URL', async () => {
    // On embedded defaults the product above holds its MQTT port; against the
    // real broker, that broker holds 1883 (a machine that already runs Mosquitto).
    const port = product.env.MQTT_URL ? new URL(product.env.MQTT_URL).port || '1883' : product.env.MQTT_PORT!;
    await expect(startProductProcess({ DEMO: 'off', MQTT_URL: '', MQTT_PORT: port }, 120_000)).rejects.toThrow(
      new RegExp(`MQTT port ${port} on 127.0.0.1 is already in use .*set MQTT_URL=mqtt://127.0.0.1:${port} to use the broker already there, or MQTT_PORT`),
    );
  });
});
