/**
 * Temperature units. The engine works in the station's own unit; these
 * convert for limits and display.
 */
import type { TemperatureUnit } from './types.js';

export function fahrenheitToCelsius(f: number): number {
  return ((f - 32) * 5) / 9;
}

export function celsiusToFahrenheit(c: number): number {
  return (c * 9) / 5 + 32;
}

/** Convert a temperature in `unit` to °F. */
export function toFahrenheit(value: number, unit: TemperatureUnit): number {
  return unit === 'F' ? value : celsiusToFahrenheit(value);
}

/**
 * Plausible outdoor daily temperatures: −80 °F to 140 °F (a sanity bound
 * beyond the recorded surface extremes, common practice for input checks).
 */
export const PLAUSIBLE_TEMPERATURE_F = { min: -80, max: 140 } as const;

export function isPlausibleTemperature(value: number, unit: TemperatureUnit): boolean {
  const f = toFahrenheit(value, unit);
  return Number.isFinite(f) && f >= PLAUSIBLE_TEMPERATURE_F.min && f <= PLAUSIBLE_TEMPERATURE_F.max;
}

export function unitSymbol(unit: TemperatureUnit): string {
  return unit === 'F' ? '°F' : '°C';
}
