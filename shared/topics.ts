/** MQTT topic layout shared by the broker, the server and the simulator. */
export const TOPIC_ROOT = 'jw/v1/engines';

export function telemetryTopic(engineId: number): string {
  return `${TOPIC_ROOT}/${engineId}/telemetry`;
}

export function statusTopic(engineId: number): string {
  return `${TOPIC_ROOT}/${engineId}/status`;
}

/** Prefix under which one engine's gateway may publish and subscribe. */
export function engineTopicPrefix(engineId: number): string {
  return `${TOPIC_ROOT}/${engineId}/`;
}

export type TopicKind = 'telemetry' | 'status';

/** Parse `jw/v1/engines/{id}/{kind}`; null for anything else. */
export function parseEngineTopic(topic: string): { engineId: number; kind: TopicKind } | null {
  const m = /^jw\/v1\/engines\/([1-9][0-9]{0,9})\/(telemetry|status)$/.exec(topic);
  if (!m) return null;
  return { engineId: Number(m[1]), kind: m[2] as TopicKind };
}
