/**
 * Default normal bands per channel and engine state, in stored units (°C, kPa gauge, µS/cm).
 * These are common practice for jacket-water systems, not values from a published standard:
 * the engine maker's figures and the site's own rules override them.
 */
import { ChannelKey } from './channels';

export interface NormalBand {
  low: number;
  high: number;
}

/** How an engine is doing, as the band choice needs it. */
export type BandRunState = 'running' | 'stopped' | 'no-data';

/** Running: jacket water at working temperature, thermostat open (common practice 70-95 °C). */
export const RUNNING_COOLANT_TEMP_BAND: NormalBand = { low: 70, high: 95 };
/** Stopped with a jacket-water heater: kept warm for a quick start (common practice 30-50 °C). */
export const STANDBY_WARM_COOLANT_TEMP_BAND: NormalBand = { low: 30, high: 50 };
/** Running: pressurised by the cap and the pump (common practice 40-110 kPa gauge). */
export const RUNNING_COOLANT_PRESSURE_BAND: NormalBand = { low: 40, high: 110 };
/** Any state: conductivity of glycol coolant with additive (common practice up to 5000 µS/cm). */
export const COOLANT_CONDUCTIVITY_BAND: NormalBand = { low: 0, high: 5000 };

/** Range a compact indicator spans, wide enough to show a value well outside its band. */
export const DISPLAY_SCALES: Partial<Record<ChannelKey, NormalBand>> = {
  coolant_temp: { low: 0, high: 120 },
  coolant_pressure: { low: 0, high: 160 },
  coolant_conductivity: { low: 0, high: 8000 },
};

export interface BandEngine {
  /** Null when the engine has no jacket-water heater. */
  heaterSetpointC?: number | null;
}

/**
 * The band a channel should stay in for this engine's state; null when there is none to judge by
 * (no data, or a stopped engine's temperature without a heater, or pressure while stopped).
 */
export function normalBand(channel: ChannelKey, state: BandRunState, engine: BandEngine = {}): NormalBand | null {
  if (state === 'no-data') return null;
  switch (channel) {
    case 'coolant_temp':
      if (state === 'running') return RUNNING_COOLANT_TEMP_BAND;
      return engine.heaterSetpointC != null ? STANDBY_WARM_COOLANT_TEMP_BAND : null;
    case 'coolant_pressure':
      return state === 'running' ? RUNNING_COOLANT_PRESSURE_BAND : null;
    case 'coolant_conductivity':
      return COOLANT_CONDUCTIVITY_BAND;
    default:
      return null;
  }
}

export type BandPosition = 'low' | 'normal' | 'high';

/** Where a value sits against a band (the band ends count as inside). */
export function bandPosition(value: number, band: NormalBand): BandPosition {
  if (value < band.low) return 'low';
  if (value > band.high) return 'high';
  return 'normal';
}
