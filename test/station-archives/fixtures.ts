/**
 * Station files written by hand to the published layouts, with invented
 * station ids and invented values (constructed to the layout; no real
 * station's data):
 * - GHCN-Daily .dly: NOAA NCEI GHCN-Daily readme.txt, section III;
 * - GHCN-Daily by-station CSV: NOAA NCEI readme-by_station.txt;
 * - GSOD CSV: NOAA NCEI GSOD readme.txt and its sample.csv header.
 */

/** An invented GHCN-Daily id: 2-letter country code, network code, 8 characters. */
export const GHCN_ID = 'ZZX00012345';
/** An invented GSOD id: 6-digit USAF and 5-digit WBAN. */
export const GSOD_ID = '99999912345';

/** One value slot of a .dly line: value (tenths), M-, Q- and S-flag. */
export type Slot = [value: number, mflag?: string, qflag?: string, sflag?: string];

/**
 * A .dly line as the readme lays it out: ID (11), YEAR (4), MONTH (2),
 * ELEMENT (4), then 31 × (VALUE right-aligned in 5, MFLAG, QFLAG, SFLAG);
 * days not given are −9999 with blank flags.
 */
export function dlyLine(id: string, year: number, month: number, element: string, slots: readonly Slot[]): string {
  let line = `${id}${year}${String(month).padStart(2, '0')}${element}`;
  for (let day = 0; day < 31; day++) {
    const [value, m = ' ', q = ' ', s = ' '] = slots[day] ?? [-9999];
    line += `${String(value).padStart(5, ' ')}${m}${q}${s}`;
  }
  return line;
}

/** n days of the same value with source flag 'S' (invented). */
export function repeat(value: number, n: number): Slot[] {
  return Array.from({ length: n }, () => [value, ' ', ' ', 'S'] as Slot);
}

export const GSOD_HEADER =
  '"STATION","DATE","LATITUDE","LONGITUDE","ELEVATION","NAME","TEMP","TEMP_ATTRIBUTES","DEWP","DEWP_ATTRIBUTES","SLP","SLP_ATTRIBUTES","STP","STP_ATTRIBUTES","VISIB","VISIB_ATTRIBUTES","WDSP","WDSP_ATTRIBUTES","MXSPD","GUST","MAX","MAX_ATTRIBUTES","MIN","MIN_ATTRIBUTES","PRCP","PRCP_ATTRIBUTES","SNDP","FRSHTT"';

/** A GSOD row as the access files write it: quoted cells, values padded, 9999.9 / 999.9 / 99.99 missing. */
export function gsodRow(
  id: string,
  date: string,
  temp: string,
  count: string,
  max: string,
  maxAttr: string,
  min: string,
  minAttr: string,
): string {
  const cells = [
    id,
    date,
    '10.0',
    '-20.0',
    '100.0',
    'INVENTED FIELD, ZZ',
    temp,
    count,
    '  30.1',
    count,
    '1015.2',
    count,
    '999.9',
    '0',
    '  9.9',
    count,
    '  5.0',
    count,
    ' 12.0',
    '999.9',
    max,
    maxAttr,
    min,
    minAttr,
    ' 0.00',
    'G',
    '999.9',
    '000000',
  ];
  return cells.map((c) => `"${c}"`).join(',');
}

/**
 * NOAA daily normals CSV (1991–2020 daily normals, one file per station), constructed to the layouts
 * of NOAA NCEI's "Readme By-Variable By-Station Normals Files" and its Normals_DLY_1991-2020_sample.csv,
 * with an invented station and invented values: no real station's normals.
 */
export const NORMALS_ID = 'ZZC00054321';

/** Every calendar day MM-DD of a leap year, 02-29 included (366). */
export function normalsDays(): string[] {
  const days: string[] = [];
  for (let t = Date.UTC(2024, 0, 1); t < Date.UTC(2025, 0, 1); t += 86_400_000)
    days.push(new Date(t).toISOString().slice(5, 10));
  return days;
}

/** One invented daily row's values in °F, tenths: a seasonal wave (synthetic: the test sets the truth). */
export function normalsValues(index: number): { tavg: string; tmax: string; tmin: string } {
  const tavg = Math.round(10 * (52 - 22 * Math.cos((2 * Math.PI * (index - 15)) / 366))) / 10;
  return { tavg: tavg.toFixed(1), tmax: (tavg + 9.5).toFixed(1), tmin: (tavg - 9.5).toFixed(1) };
}

const quote = (cells: readonly string[]) => cells.map((c) => `"${c}"`).join(',');

/**
 * The access form, as the sample: quoted cells, STATION, NAME, LATITUDE, LONGITUDE, ELEVATION, DATE (MM-DD),
 * quantities padded to width 8, and day, hour (99), month at the end. `change` edits a row's cells by name.
 */
export function normalsAccessCsv(
  options: { days?: readonly string[]; change?: (day: string, cells: Record<string, string>) => void } = {},
): string {
  const columns = [
    'STATION',
    'NAME',
    'LATITUDE',
    'LONGITUDE',
    'ELEVATION',
    'DATE',
    'DLY-HTDD-NORMAL',
    'DLY-TAVG-NORMAL',
    'DLY-TMAX-NORMAL',
    'DLY-TMIN-NORMAL',
    'day',
    'hour',
    'month',
  ];
  const all = normalsDays();
  const rows = (options.days ?? all).map((day) => {
    const v = normalsValues(all.indexOf(day));
    const cells: Record<string, string> = {
      STATION: NORMALS_ID,
      NAME: 'INVENTED VALLEY 2 N, ZZ',
      LATITUDE: ' 12.3456',
      LONGITUDE: ' -65.4321',
      ELEVATION: ' 123.4',
      DATE: day,
      'DLY-HTDD-NORMAL': '     9.9',
      'DLY-TAVG-NORMAL': v.tavg.padStart(8),
      'DLY-TMAX-NORMAL': v.tmax.padStart(8),
      'DLY-TMIN-NORMAL': v.tmin.padStart(8),
      day: day.slice(3),
      hour: '99',
      month: day.slice(0, 2),
    };
    options.change?.(day, cells);
    return quote(columns.map((c) => cells[c] ?? ''));
  });
  return `${[quote(columns), ...rows].join('\n')}\n`;
}

/**
 * The by-station archive form of the readme: STATION, LATITUDE, LONGITUDE, ELEVATION, NAME, month, day,
 * hour, then per quantity four columns (value, meas_flag_, comp_flag_, years_); unquoted except the name.
 */
export function normalsArchiveCsv(
  options: { change?: (day: string, cells: Record<string, string>) => void } = {},
): string {
  const quantities = ['DLY-TAVG-NORMAL', 'DLY-TMAX-NORMAL', 'DLY-TMIN-NORMAL'];
  const columns = [
    'STATION',
    'LATITUDE',
    'LONGITUDE',
    'ELEVATION',
    'NAME',
    'month',
    'day',
    'hour',
    ...quantities.flatMap((q) => [q, `meas_flag_${q}`, `comp_flag_${q}`, `years_${q}`]),
  ];
  const rows = normalsDays().map((day, index) => {
    const v = normalsValues(index);
    const cells: Record<string, string> = {
      STATION: NORMALS_ID,
      LATITUDE: ' 12.3456',
      LONGITUDE: '-65.4321',
      ELEVATION: '123.4',
      NAME: '"INVENTED VALLEY 2 N, ZZ"',
      month: day.slice(0, 2),
      day: day.slice(3),
      hour: '99',
    };
    const values = [v.tavg, v.tmax, v.tmin];
    quantities.forEach((q, i) =>
      Object.assign(cells, {
        [q]: values[i]!.padStart(8),
        [`meas_flag_${q}`]: ' ',
        [`comp_flag_${q}`]: 'S',
        [`years_${q}`]: '30',
      }),
    );
    options.change?.(day, cells);
    return columns.map((c) => cells[c] ?? '').join(',');
  });
  return `${[columns.join(','), ...rows].join('\n')}\n`;
}
