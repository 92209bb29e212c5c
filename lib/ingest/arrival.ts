/**
 * What the ingester makes of a delivery as it arrives: its topic split, its
 * payload decoded and validated, ready for the batcher.
 */
import type { PendingMessage } from './batch-queue';
import type { Delivery } from './connections';
import { NO_ENTRIES, NO_FIELDS, QUARANTINE_PAYLOAD_CHARS, boundText, decodePresencePayload, type TelemetryDecoder } from './decode';
import { EMPTY_BLOCK } from './sample-block';
import { parseUnitTopic } from './topics';
import type { UnitDirectory } from './unit-directory';

/**
 * The delivery as a message for the batcher: a telemetry payload decoded by
 * `decoder`, a presence payload read, a topic that cannot be used marked
 * with why. Never throws on bad input.
 */
export function pendingMessageOf(delivery: Delivery, directory: UnitDirectory, decoder: TelemetryDecoder): PendingMessage {
  const topic = parseUnitTopic(delivery.topic);
  // The text is kept only where a whole-message quarantine row may need it: not for a unit known here.
  const known = topic.ok && directory.knows(topic.siteId, topic.unitId);
  // One object literal per message, no spreads: this runs for every message (see DESIGN.md, "Speed").
  const message: PendingMessage = {
    topic: delivery.topic,
    siteId: topic.siteId,
    unitId: topic.unitId,
    kind: 'bad-topic',
    receivedAtMs: delivery.receivedAtMs,
    retained: delivery.retain,
    samples: EMPTY_BLOCK,
    quarantined: NO_ENTRIES,
    presence: undefined,
    unknownFields: NO_FIELDS,
    preview: known
      ? ''
      : boundText(delivery.payload.subarray(0, QUARANTINE_PAYLOAD_CHARS).toString('utf8'), QUARANTINE_PAYLOAD_CHARS, delivery.payload.byteLength),
    payloadBytes: delivery.payload.byteLength,
    topicProblem: undefined,
    qos: delivery.qos,
    receipt: delivery.receipt,
  };
  if (!topic.ok) {
    message.topicProblem = topic.reason;
  } else if (topic.kind === 'presence') {
    message.kind = 'presence';
    const presence = decodePresencePayload(delivery.payload);
    if (presence.ok) message.presence = presence.presence;
    else {
      message.presence = null;
      message.quarantined = [presence.entry];
    }
  } else {
    message.kind = 'telemetry';
    const decoded = decoder.decode(delivery.payload, delivery.receivedAtMs);
    message.samples = decoded.samples;
    message.quarantined = decoded.quarantined;
    message.unknownFields = decoded.unknownFields;
  }
  return message;
}
