/**
 * Webhook signatures of contract section 7, as the open Standard Webhooks
 * specification has them: `webhook-signature` is `v1,` then the base64
 * HMAC-SHA256 of `{webhook-id}.{webhook-timestamp}.{body}`, keyed with the
 * bytes of the endpoint's secret (`whsec_` then base64 of 24 to 64 bytes).
 */
import { createHmac, randomBytes } from 'node:crypto';

/** What every secret starts with. */
export const WEBHOOK_SECRET_PREFIX = 'whsec_';
/** Bytes of key a new secret carries (the contract allows 24 to 64). */
export const WEBHOOK_SECRET_BYTES = 32;
const MIN_KEY_BYTES = 24;
const MAX_KEY_BYTES = 64;
const BASE64 = /^(?:[A-Za-z0-9+/]{4})*(?:[A-Za-z0-9+/]{2}==|[A-Za-z0-9+/]{3}=)?$/;
/** A header value: visible ASCII, no spaces (the id is also the receiver's key to drop a repeat). */
const MESSAGE_ID = /^[\x21-\x7e]{1,255}$/;

/**
 * A new endpoint secret: `whsec_` and base64 of 32 random bytes.
 * @example newWebhookSecret() // 'whsec_3q2+7w…=' (50 characters)
 */
export function newWebhookSecret(): string {
  return `${WEBHOOK_SECRET_PREFIX}${randomBytes(WEBHOOK_SECRET_BYTES).toString('base64')}`;
}

/**
 * The key bytes of a secret. Throws RangeError naming what is wrong with it
 * (never echoing the secret, which would land in a log).
 */
export function webhookSecretKey(secret: string): Buffer {
  if (typeof secret !== 'string' || !secret.startsWith(WEBHOOK_SECRET_PREFIX)) {
    throw new RangeError(`secret: expected "${WEBHOOK_SECRET_PREFIX}" then base64 of ${MIN_KEY_BYTES} to ${MAX_KEY_BYTES} bytes, got a value that does not start with "${WEBHOOK_SECRET_PREFIX}"`);
  }
  const encoded = secret.slice(WEBHOOK_SECRET_PREFIX.length);
  if (!BASE64.test(encoded)) {
    throw new RangeError(`secret: the part after "${WEBHOOK_SECRET_PREFIX}" is not base64 (A-Z, a-z, 0-9, + and /, padded with = to a multiple of 4)`);
  }
  const key = Buffer.from(encoded, 'base64');
  if (key.length < MIN_KEY_BYTES || key.length > MAX_KEY_BYTES) {
    throw new RangeError(`secret: the key must be ${MIN_KEY_BYTES} to ${MAX_KEY_BYTES} bytes, got ${key.length}`);
  }
  return key;
}

export interface WebhookSignInput {
  /** The endpoint's secret, `whsec_…`. */
  readonly secret: string;
  /** The message id (`webhook-id`), the same on every retry. */
  readonly id: string;
  /** The attempt's time in Unix seconds (`webhook-timestamp`). */
  readonly timestampS: number;
  /** The exact body sent. */
  readonly body: string;
}

function checkSignInput({ id, timestampS, body }: WebhookSignInput): void {
  if (typeof id !== 'string' || !MESSAGE_ID.test(id)) throw new RangeError(`id: expected 1 to 255 visible ASCII characters without spaces, got ${JSON.stringify(id)}`);
  if (!Number.isSafeInteger(timestampS) || timestampS < 0) throw new RangeError(`timestampS: expected whole Unix seconds, got ${timestampS}`);
  if (typeof body !== 'string') throw new RangeError(`body: expected the JSON text sent, got ${typeof body}`);
}

/**
 * The `webhook-signature` value for one attempt.
 * @example signWebhook({ secret, id: 'msg_1', timestampS: 1772323200, body: '{}' }) // 'v1,K5o…='
 */
export function signWebhook(input: WebhookSignInput): string {
  checkSignInput(input);
  const key = webhookSecretKey(input.secret);
  const mac = createHmac('sha256', key).update(`${input.id}.${input.timestampS}.${input.body}`, 'utf8').digest('base64');
  return `v1,${mac}`;
}

/** The headers of one attempt: id, timestamp, signature and the content type. */
export function webhookHeaders(input: WebhookSignInput): Record<'webhook-id' | 'webhook-timestamp' | 'webhook-signature' | 'content-type', string> {
  return {
    'webhook-id': input.id,
    'webhook-timestamp': String(input.timestampS),
    'webhook-signature': signWebhook(input),
    'content-type': 'application/json',
  };
}
