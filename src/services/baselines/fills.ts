/**
 * A baseline's periods that rest on weather filled on record, by method
 * ("3 of 31 days filled by interpolation"), so a draft, a frozen baseline
 * and every answer that carries a fit say which of its periods used filled
 * days. Read from the station's record over the baseline's readings: inside
 * a frozen (or superseded) baseline's window no fill can be added and no
 * filled day replaced (services/frozen-windows.ts), so a frozen baseline's
 * fills are those it was frozen with.
 */
import { filledDaysByPeriod, type PeriodFills } from '../../engine/index.js';
import { fromStoredJson } from '../../store/baseline-content.js';
import type { BaselineRow } from '../../store/schema.js';
import type { Executor } from '../context.js';
import { loadFilledDays } from '../weather-gaps.js';
import type { BaselineInputs } from './types.js';

/** The periods of the baseline's readings with at least one filled day (empty for a row without its inputs). */
export async function baselineWeatherFills(
  db: Executor,
  row: Pick<BaselineRow, 'meter_id' | 'inputs_json'>,
): Promise<PeriodFills[]> {
  const inputs = fromStoredJson<Partial<BaselineInputs>>(row.inputs_json);
  const readings = Array.isArray(inputs.readings) ? inputs.readings : [];
  if (readings.length === 0) return [];
  const meter = await db
    .selectFrom('meters')
    .select('weather_station_id')
    .where('id', '=', row.meter_id)
    .executeTakeFirst();
  if (!meter) return [];
  let from = readings[0]!.start;
  let to = readings[0]!.end;
  for (const reading of readings) {
    if (reading.start < from) from = reading.start;
    if (reading.end > to) to = reading.end;
  }
  return filledDaysByPeriod(readings, await loadFilledDays(db, meter.weather_station_id, from, to));
}
