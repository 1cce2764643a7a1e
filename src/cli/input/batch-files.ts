/**
 * The files of a batch fit: one readings file whose `meter` column names the
 * meter of each row (and, optionally, a `station` column naming its weather
 * station), and one weather file holding either one station's days or, with
 * a `station` column, every station's. Each meter's rows and each station's
 * days become their own table, keeping their line numbers in the file, so
 * the single-meter readers check them exactly as `mvledger fit` does.
 */
import { cell, requireColumns, type CsvRow, type CsvTable } from '../../lib/csv/csv-table.js';
import { InputFileError } from '../../lib/csv/input-error.js';

/** One meter's rows of the batch readings file. */
export interface MeterTable {
  meter: string;
  /** The weather station named on its rows; null when the file has no station column (one weather series for all). */
  station: string | null;
  table: CsvTable;
}

/** Split the readings by meter, in order of first appearance. A meter whose rows name two stations is refused. */
export function splitReadingsByMeter(table: CsvTable): MeterTable[] {
  requireColumns(table, ['meter']);
  const hasStation = table.columns.includes('station');
  const meters = new Map<string, { station: string | null; stationLine: number; rows: CsvRow[] }>();
  for (const row of table.rows) {
    const meter = cell(row, 'meter');
    if (meter === '')
      throw new InputFileError(table.file, row.line, 'meter', 'the meter is empty: every row names its meter');
    const station = hasStation ? cell(row, 'station') : null;
    if (station === '')
      throw new InputFileError(table.file, row.line, 'station', `meter ${JSON.stringify(meter)}: the station is empty`);
    const entry = meters.get(meter);
    if (!entry) {
      meters.set(meter, { station, stationLine: row.line, rows: [row] });
      continue;
    }
    if (entry.station !== station) {
      throw new InputFileError(
        table.file,
        row.line,
        'station',
        `meter ${JSON.stringify(meter)} is read on station ${JSON.stringify(entry.station)} (row ${entry.stationLine}), here ${JSON.stringify(station)}: one station per meter`,
      );
    }
    entry.rows.push(row);
  }
  return [...meters].map(([meter, { station, rows }]) => ({
    meter,
    station,
    table: { file: table.file, headerLine: table.headerLine, columns: table.columns, rows },
  }));
}

/** Split the weather by its station column (one table per station), or keep it whole as the one series for every meter (key null). */
export function splitWeatherByStation(table: CsvTable): Map<string | null, CsvTable> {
  if (!table.columns.includes('station')) return new Map([[null, table]]);
  const stations = new Map<string, CsvRow[]>();
  for (const row of table.rows) {
    const station = cell(row, 'station');
    if (station === '')
      throw new InputFileError(table.file, row.line, 'station', 'the station is empty: every row names its station');
    const rows = stations.get(station);
    if (rows) rows.push(row);
    else stations.set(station, [row]);
  }
  return new Map([...stations].map(([station, rows]) => [station, { ...table, rows }]));
}
