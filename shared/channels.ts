/** The measured quantities of an engine. Storage is always in the SI-style unit given here. */
export type ChannelKey = 'coolant_temp' | 'coolant_pressure' | 'coolant_conductivity' | 'engine_speed' | 'ambient_temp';
export type Quantity = 'temperature' | 'pressure' | 'conductivity' | 'speed';

export interface ChannelInfo {
  key: ChannelKey;
  /** Small integer stored in the readings table. */
  code: number;
  label: string;
  quantity: Quantity;
  /** Unit of storage: degC, kPa (gauge), uS/cm, rpm. */
  unit: 'degC' | 'kPa' | 'uS/cm' | 'rpm';
  /** Values outside this range cannot come from a working sensor: stored with a bad-quality flag. */
  physicalMin: number;
  physicalMax: number;
}

export const CHANNELS: Record<ChannelKey, ChannelInfo> = {
  coolant_temp: { key: 'coolant_temp', code: 1, label: 'Coolant temperature', quantity: 'temperature', unit: 'degC', physicalMin: -40, physicalMax: 150 },
  coolant_pressure: {
    key: 'coolant_pressure',
    code: 2,
    label: 'Coolant pressure',
    quantity: 'pressure',
    unit: 'kPa',
    physicalMin: -101.325,
    physicalMax: 1000,
  },
  coolant_conductivity: {
    key: 'coolant_conductivity',
    code: 3,
    label: 'Coolant conductivity',
    quantity: 'conductivity',
    unit: 'uS/cm',
    physicalMin: 0,
    physicalMax: 20000,
  },
  engine_speed: { key: 'engine_speed', code: 4, label: 'Engine speed', quantity: 'speed', unit: 'rpm', physicalMin: 0, physicalMax: 4000 },
  ambient_temp: { key: 'ambient_temp', code: 5, label: 'Ambient temperature', quantity: 'temperature', unit: 'degC', physicalMin: -60, physicalMax: 70 },
};

export const CHANNEL_KEYS = Object.keys(CHANNELS) as ChannelKey[];

const BY_CODE = new Map<number, ChannelInfo>(Object.values(CHANNELS).map((c) => [c.code, c]));

export function isChannelKey(key: string): key is ChannelKey {
  return Object.prototype.hasOwnProperty.call(CHANNELS, key);
}

export function channelByCode(code: number): ChannelInfo | undefined {
  return BY_CODE.get(code);
}

/** Quality flag stored with each reading. */
export const QUALITY_GOOD = 0;
export const QUALITY_BAD = 1;

/** Above this speed the engine counts as running (common practice: well below any idle speed). */
export const RUNNING_RPM = 100;
