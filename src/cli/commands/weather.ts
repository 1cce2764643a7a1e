/**
 * `mvledger weather import|check`: a public station file (GHCN-Daily .dly or
 * by-station CSV, GSOD CSV) read by the same pure readers the service uses.
 * `import` writes `date,temp` to stdout with the account on stderr, or, with
 * --url and --station-id, posts the file to the service's import route;
 * `check` prints the record's summary (years, missing, extremes);
 * `normals` reads published daily normals (NOAA's daily normals CSV) and
 * prints the 365-day normal year as `day,temp`.
 */
import { readFile, stat } from 'node:fs/promises';
import { summariseStationRecord, unitSymbol, type TemperatureUnit } from '../../engine/index.js';
import {
  ARCHIVE_FORMATS,
  ArchiveFormatError,
  NORMALS_FORMATS,
  publishedNormalsSource,
  readDailyNormalsCsv,
  MAX_ARCHIVE_CHARACTERS,
  readStationArchive,
  type ArchiveCounts,
  type ArchiveFormat,
  type ArchiveImport,
} from '../../station-archives/index.js';
import { InputFileError, UsageError } from '../errors.js';
import { parseOptions } from '../shared.js';

const SPEC = {
  format: { type: 'string' },
  station: { type: 'string' },
  unit: { type: 'string' },
  url: { type: 'string' },
  key: { type: 'string' },
  'station-id': { type: 'string' },
  'file-unit': { type: 'string' },
  json: { type: 'boolean' },
} as const;

export interface WeatherOutput {
  stdout: string;
  note?: string;
}

/** The API key for --url: --key, or MVLEDGER_API_KEY (kept out of the process list). */
const KEY_VARIABLE = 'MVLEDGER_API_KEY';

export async function runWeather(
  args: readonly string[],
  env: NodeJS.ProcessEnv = process.env,
): Promise<WeatherOutput> {
  const [sub, ...rest] = args;
  if (sub !== 'import' && sub !== 'check' && sub !== 'normals')
    throw new UsageError(`weather: give import, check or normals (got ${JSON.stringify(sub ?? '')})`);
  const { values, positionals } = parseOptions(rest, SPEC, true);
  if (positionals.length !== 1)
    throw new UsageError(`weather ${sub}: give exactly one FILE (got ${positionals.length})`);
  const file = positionals[0]!;
  if (sub === 'normals') return printNormals(file, values);
  const format = values.format;
  if (typeof format !== 'string' || !(ARCHIVE_FORMATS as readonly string[]).includes(format)) {
    throw new UsageError(`--format: one of ${ARCHIVE_FORMATS.join(', ')} (got ${JSON.stringify(format ?? '')})`);
  }
  const unit = (values.unit ?? 'F') as string;
  if (unit !== 'F' && unit !== 'C') throw new UsageError(`--unit: F or C (got ${JSON.stringify(unit)})`);
  const station = typeof values.station === 'string' ? values.station : undefined;
  const text = await readArchiveFile(file);

  if (sub === 'import' && values.url !== undefined) {
    return postToService(file, format as ArchiveFormat, text, station, values, env);
  }
  let archive: ArchiveImport;
  try {
    archive = readStationArchive(format as ArchiveFormat, text, {
      unit,
      ...(station !== undefined ? { expectedStationId: station } : {}),
    });
  } catch (error) {
    if (error instanceof ArchiveFormatError) throw new InputFileError(file, null, null, error.message);
    throw error;
  }
  const days = archive.days.map((d) => ({ date: d.date, temp: d.temp ?? (d.tmin! + d.tmax!) / 2 }));
  if (sub === 'check') {
    const summary = summariseStationRecord(days, unit);
    if (values.json)
      return {
        stdout: `${JSON.stringify({ archive: { format, stationId: archive.archiveStationId, counts: archive.counts }, summary }, null, 2)}\n`,
      };
    return { stdout: describeSummary(archive, summary, unit) };
  }
  const csv = ['date,temp', ...days.map((d) => `${d.date},${d.temp}`)].join('\n');
  return { stdout: `${csv}\n`, note: `${file}: ${describeCounts(archive.archiveStationId, archive.counts)}\n` };
}

function unitOption(name: string, value: string | boolean | undefined): TemperatureUnit {
  const unit = (value ?? 'F') as string;
  if (unit !== 'F' && unit !== 'C') throw new UsageError(`--${name}: F or C (got ${JSON.stringify(unit)})`);
  return unit;
}

/** `weather normals FILE`: the published daily normals read into a 365-day normal year, printed as day,temp (or JSON). */
async function printNormals(
  file: string,
  values: Record<string, string | boolean | undefined>,
): Promise<WeatherOutput> {
  const format = values.format ?? NORMALS_FORMATS[0];
  if (typeof format !== 'string' || !(NORMALS_FORMATS as readonly string[]).includes(format)) {
    throw new UsageError(`--format: ${NORMALS_FORMATS.join(', ')} for weather normals (got ${JSON.stringify(format)})`);
  }
  const unit = unitOption('unit', values.unit);
  const fileUnit = unitOption('file-unit', values['file-unit']);
  const station = typeof values.station === 'string' ? values.station : undefined;
  const text = await readArchiveFile(file);
  let year;
  try {
    year = readDailyNormalsCsv(text, {
      unit,
      fileUnit,
      ...(station !== undefined ? { expectedStationId: station } : {}),
    });
  } catch (error) {
    if (error instanceof ArchiveFormatError) throw new InputFileError(file, null, null, error.message);
    throw error;
  }
  const source = publishedNormalsSource(year, unit);
  if (values.json)
    return { stdout: `${JSON.stringify({ temperatureUnit: unit, source, days: year.days }, null, 2)}\n` };
  const csv = ['day,temp', ...year.days.map((d) => `${d.day},${d.temp}`)].join('\n');
  return { stdout: `${csv}\n`, note: `${file}: ${source}\n` };
}

async function readArchiveFile(file: string): Promise<string> {
  let size: number;
  try {
    size = (await stat(file)).size;
  } catch (error) {
    throw new InputFileError(
      file,
      null,
      null,
      `cannot read the file (${(error as NodeJS.ErrnoException).code ?? 'error'})`,
    );
  }
  if (size > MAX_ARCHIVE_CHARACTERS) {
    throw new InputFileError(
      file,
      null,
      null,
      `the file is ${(size / 1e6).toFixed(1)} MB; the largest accepted is 16 MiB: split it by years`,
    );
  }
  return readFile(file, 'utf8');
}

export function describeCounts(stationId: string, counts: ArchiveCounts): string {
  const flags = Object.entries(counts.droppedFlags)
    .sort(([a], [b]) => (a < b ? -1 : 1))
    .map(([flag, n]) => `${flag} ${n}`)
    .join(', ');
  return (
    `station ${stationId}: ${counts.daysRead} days read, ${counts.imported} imported, ` +
    `${counts.droppedByFlag} values dropped by quality flag${flags ? ` (${flags})` : ''}, ${counts.missing} days missing` +
    (counts.otherElements > 0 ? `; ${counts.otherElements} lines of other elements skipped` : '')
  );
}

function describeSummary(
  archive: ArchiveImport,
  summary: ReturnType<typeof summariseStationRecord>,
  unit: TemperatureUnit,
): string {
  const symbol = unitSymbol(unit);
  const pct = (x: number) => `${(x * 100).toFixed(1)}%`;
  const lines = [
    describeCounts(archive.archiveStationId, archive.counts),
    `span ${summary.first ?? '—'} .. ${summary.last ?? '—'}: ${summary.spanDays} days (${summary.yearsCovered.toFixed(2)} years)`,
    `missing ${summary.missing} days (${pct(summary.shareMissing)}); outside plausible bounds ${summary.outsideBounds}`,
    `lowest ${summary.min ? `${summary.min.temp.toFixed(1)} ${symbol} on ${summary.min.date}` : '—'}; highest ${summary.max ? `${summary.max.temp.toFixed(1)} ${symbol} on ${summary.max.date}` : '—'}`,
    '',
    'year   days  observed  missing',
    ...summary.years.map(
      (y) =>
        `${y.year}  ${String(y.days).padStart(5)}  ${String(y.observed).padStart(8)}  ${String(y.missing).padStart(7)}`,
    ),
  ];
  return `${lines.join('\n')}\n`;
}

async function postToService(
  file: string,
  format: ArchiveFormat,
  text: string,
  station: string | undefined,
  values: Record<string, string | boolean | undefined>,
  env: NodeJS.ProcessEnv,
): Promise<WeatherOutput> {
  const stationId = values['station-id'];
  if (typeof stationId !== 'string')
    throw new UsageError('--station-id: the ledger station (wst_…) to import into is needed with --url');
  const key = typeof values.key === 'string' ? values.key : env[KEY_VARIABLE];
  if (!key) throw new UsageError(`--key or ${KEY_VARIABLE}: an API key is needed with --url`);
  let base: URL;
  try {
    base = new URL(String(values.url));
  } catch {
    throw new UsageError(`--url: not a URL (${JSON.stringify(values.url)})`);
  }
  const target = new URL(`/v1/weather-stations/${encodeURIComponent(stationId)}/imports`, base);
  target.searchParams.set('format', format);
  if (station !== undefined) target.searchParams.set('station', station);
  let response: Response;
  try {
    response = await fetch(target, {
      method: 'POST',
      headers: { authorization: `Bearer ${key}`, 'content-type': format === 'ghcn-dly' ? 'text/plain' : 'text/csv' },
      body: text,
    });
  } catch (error) {
    throw new InputFileError(
      file,
      null,
      null,
      `the service at ${base.origin} did not answer (${(error as Error).message})`,
    );
  }
  const body = (await response.json().catch(() => null)) as {
    detail?: string;
    counts?: ArchiveCounts;
    archiveStationId?: string;
  } | null;
  if (!response.ok)
    throw new InputFileError(
      file,
      null,
      null,
      `the service refused the import (${response.status}): ${body?.detail ?? 'no detail'}`,
    );
  const note =
    body?.counts && body.archiveStationId
      ? `${file}: ${describeCounts(body.archiveStationId, body.counts)}\n`
      : undefined;
  return { stdout: `${JSON.stringify(body, null, 2)}\n`, ...(note ? { note } : {}) };
}
