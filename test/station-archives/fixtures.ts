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
