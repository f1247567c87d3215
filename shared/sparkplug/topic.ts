/** Sparkplug 3.0 topic namespace: `spBv1.0/{group_id}/{message_type}/{edge_node_id}[/{device_id}]`. */
export const SPARKPLUG_NAMESPACE = 'spBv1.0';

export type SparkplugNodeType = 'NBIRTH' | 'NDEATH' | 'NDATA' | 'NCMD';
export type SparkplugDeviceType = 'DBIRTH' | 'DDEATH' | 'DDATA' | 'DCMD';
export type SparkplugMessageType = SparkplugNodeType | SparkplugDeviceType;

export interface SparkplugTopic {
  groupId: string;
  type: SparkplugMessageType;
  edgeNodeId: string;
  /** Present exactly for the D* message types. */
  deviceId: string | null;
}

/** Ids the specification allows in a topic level: any UTF-8 text without the MQTT separators and wildcards. */
const ID = '([^/+#]{1,64})';
const NODE_TOPIC = new RegExp(`^spBv1\\.0/${ID}/(NBIRTH|NDEATH|NDATA|NCMD)/${ID}$`);
const DEVICE_TOPIC = new RegExp(`^spBv1\\.0/${ID}/(DBIRTH|DDEATH|DDATA|DCMD)/${ID}/${ID}$`);

export function isSparkplugTopic(topic: string): boolean {
  return topic.startsWith(SPARKPLUG_NAMESPACE + '/');
}

/** Parses a node or device topic; null for anything else (STATE, wrong levels, unknown type). */
export function parseSparkplugTopic(topic: string): SparkplugTopic | null {
  let m = NODE_TOPIC.exec(topic);
  if (m) return { groupId: m[1], type: m[2] as SparkplugNodeType, edgeNodeId: m[3], deviceId: null };
  m = DEVICE_TOPIC.exec(topic);
  if (m) return { groupId: m[1], type: m[2] as SparkplugDeviceType, edgeNodeId: m[3], deviceId: m[4] };
  return null;
}

export function sparkplugTopic(groupId: string, type: SparkplugMessageType, edgeNodeId: string, deviceId?: string | null): string {
  const base = `${SPARKPLUG_NAMESPACE}/${groupId}/${type}/${edgeNodeId}`;
  return deviceId ? `${base}/${deviceId}` : base;
}

/** Ids accepted for a device record (stricter than the topic rule: plain, printable, no spaces). */
export const SPARKPLUG_ID_PATTERN = /^[A-Za-z0-9._:-]{1,64}$/;
