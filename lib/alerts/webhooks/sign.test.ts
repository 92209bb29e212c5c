/**
 * Webhook signatures against their outside reference: the Standard Webhooks
 * specification (signature scheme `v1`, headers webhook-id, webhook-timestamp,
 * webhook-signature; secret `whsec_` + base64 key) and the maintained
 * `standardwebhooks` npm library as the reference verifier.
 */
import { Webhook, WebhookVerificationError } from 'standardwebhooks';
import { describe, expect, it } from 'vitest';
import { WEBHOOK_SECRET_BYTES, newWebhookSecret, signWebhook, webhookHeaders, webhookSecretKey } from './sign';

const nowS = () => Math.floor(Date.now() / 1000);
const body = JSON.stringify({ type: 'alert.opened', timestamp: '2026-03-01T10:00:00.000Z', data: { id: '1', message: 'Speed 470 rpm, above the limit of 420 rpm' } });

describe('webhook signature', () => {
  it('matches the worked example of the Standard Webhooks libraries (from memory; the reference library gives the same)', () => {
    // Secret, id, timestamp, payload and signature as the specification's libraries test them.
    const example = { secret: 'whsec_MfKQ9r8GKYqrTwjUPD8ILPZIo2LaLaSw', id: 'msg_p5jXN8AQM9LWM0D4loKWxJek', timestampS: 1614265330, body: '{"test": 2432232314}' };
    const expected = 'v1,g0hM9SsE+OTPJTGt/tmIKtSyZlE3uFJELVlNIOLJ1OE=';
    expect(signWebhook(example)).toBe(expected);
    // Reference library: its own signer agrees.
    expect(new Webhook(example.secret).sign(example.id, new Date(example.timestampS * 1000), example.body)).toBe(expected);
  });

  it('is accepted by the reference verifier, and refused there with a wrong secret or a changed body', () => {
    const secret = newWebhookSecret();
    const headers = webhookHeaders({ secret, id: 'msg_abc123', timestampS: nowS(), body });
    // Reference library: verify() returns the parsed payload on a good signature.
    expect(new Webhook(secret).verify(body, headers)).toEqual(JSON.parse(body));
    // Reference library: another secret, or one changed byte of the body, fails verification.
    expect(() => new Webhook(newWebhookSecret()).verify(body, headers)).toThrow(WebhookVerificationError);
    expect(() => new Webhook(secret).verify(body.replace('470', '471'), headers)).toThrow(WebhookVerificationError);
    // Specification: the id is part of what is signed.
    expect(() => new Webhook(secret).verify(body, { ...headers, 'webhook-id': 'msg_other' })).toThrow(WebhookVerificationError);
  });

  it('signs bodies with characters beyond ASCII as UTF-8 bytes (specification: the body as sent)', () => {
    const secret = newWebhookSecret();
    const text = JSON.stringify({ message: 'Stator 131 °C — über der Grenze' });
    const headers = webhookHeaders({ secret, id: 'msg_utf8', timestampS: nowS(), body: text });
    expect(new Webhook(secret).verify(Buffer.from(text, 'utf8'), headers)).toEqual(JSON.parse(text));
  });

  it('sends the headers the specification names, with a JSON content type', () => {
    const headers = webhookHeaders({ secret: newWebhookSecret(), id: 'msg_1', timestampS: 1772323200, body: '{}' });
    expect(Object.keys(headers).sort()).toEqual(['content-type', 'webhook-id', 'webhook-signature', 'webhook-timestamp']);
    expect(headers['webhook-timestamp']).toBe('1772323200');
    expect(headers['content-type']).toBe('application/json');
    expect(headers['webhook-signature']).toMatch(/^v1,[A-Za-z0-9+/]{43}=$/);
  });
});

describe('webhook secret', () => {
  it('is whsec_ and base64 of 32 random bytes, new each time (contract section 7: 24 to 64 bytes)', () => {
    const a = newWebhookSecret();
    expect(a).toMatch(/^whsec_[A-Za-z0-9+/]{43}=$/);
    expect(webhookSecretKey(a)).toHaveLength(WEBHOOK_SECRET_BYTES);
    expect(newWebhookSecret()).not.toBe(a);
    // Reference library: it reads the same form.
    expect(() => new Webhook(a)).not.toThrow();
  });

  it('accepts keys of 24 and 64 bytes and refuses 23 and 65, naming the secret and never echoing it', () => {
    const of = (n: number) => `whsec_${Buffer.alloc(n, 7).toString('base64')}`;
    expect(webhookSecretKey(of(24))).toHaveLength(24);
    expect(webhookSecretKey(of(64))).toHaveLength(64);
    expect(() => webhookSecretKey(of(23))).toThrow(new RangeError('secret: the key must be 24 to 64 bytes, got 23'));
    expect(() => webhookSecretKey(of(65))).toThrow(new RangeError('secret: the key must be 24 to 64 bytes, got 65'));
    const wrongPrefix = `wh_${Buffer.alloc(32, 1).toString('base64')}`;
    expect(() => signWebhook({ secret: wrongPrefix, id: 'msg_1', timestampS: 1, body: '{}' })).toThrow(/^secret: expected "whsec_"/);
    const words = (() => {
      try {
        webhookSecretKey(wrongPrefix);
        return 'accepted';
      } catch (error) {
        return (error as Error).message;
      }
    })();
    expect(words).toMatch(/^secret: /);
    expect(words).not.toContain(wrongPrefix.slice(3));
    expect(() => webhookSecretKey('whsec_not base64!')).toThrow(/^secret: the part after "whsec_" is not base64/);
    expect(() => webhookSecretKey('whsec_AAAA*AAA')).toThrow(RangeError);
  });

  it('refuses an id a header cannot carry and a timestamp that is not whole seconds, naming them', () => {
    const secret = newWebhookSecret();
    expect(() => signWebhook({ secret, id: '', timestampS: 1, body: '{}' })).toThrow(/^id: /);
    expect(() => signWebhook({ secret, id: 'msg 1', timestampS: 1, body: '{}' })).toThrow(/^id: /);
    expect(() => signWebhook({ secret, id: 'msg_1\r\nx: y', timestampS: 1, body: '{}' })).toThrow(/^id: /);
    expect(() => signWebhook({ secret, id: 'msg_1', timestampS: 1.5, body: '{}' })).toThrow(new RangeError('timestampS: expected whole Unix seconds, got 1.5'));
    expect(() => signWebhook({ secret, id: 'msg_1', timestampS: Date.now(), body: '{}' })).not.toThrow();
  });
});
