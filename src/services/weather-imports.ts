/**
 * Importing a public station file into a station: the file is read by the
 * pure readers of src/station-archives in the station's unit, checked as any
 * batch of observations is, and written in one transaction with one audit
 * row that carries the import's account (days read, dropped by flag,
 * missing). A file that does not follow its layout stores nothing.
 */
import {
  ArchiveFormatError,
  readStationArchive,
  type ArchiveCounts,
  type ArchiveFormat,
} from '../station-archives/index.js';
import { DomainError } from '../domain/errors.js';
import { inTransaction, type ServiceContext } from './context.js';
import { checkObservations, writeObservations, type ObservationInput } from './observations.js';
import { getStationRow } from './weather-stations.js';

export interface ImportInput {
  format: ArchiveFormat;
  /** The file's text. */
  text: string;
  /** When given, the file must carry this station id (the archive's, not the ledger's). */
  archiveStationId?: string;
}

export interface ImportResult {
  stationId: string;
  format: ArchiveFormat;
  archiveStationId: string;
  /** How each day's temperature was taken from the file. */
  method: string;
  counts: ArchiveCounts;
  /** First and last day imported; null when the file had none usable. */
  firstDate: string | null;
  lastDate: string | null;
  /** What the write did with the imported days. */
  created: number;
  updated: number;
  unchanged: number;
}

export async function importStationFile(
  ctx: ServiceContext,
  stationId: string,
  input: ImportInput,
): Promise<ImportResult> {
  return inTransaction(ctx, async (trx) => {
    const station = await getStationRow(trx, ctx.principal.organisationId, stationId);
    let archive;
    try {
      archive = readStationArchive(input.format, input.text, {
        unit: station.temperature_unit,
        ...(input.archiveStationId !== undefined ? { expectedStationId: input.archiveStationId } : {}),
      });
    } catch (error) {
      if (!(error instanceof ArchiveFormatError)) throw error;
      throw new DomainError('invalid', `${input.format} file, ${error.message}`, [
        { field: error.place, message: error.detail },
      ]);
    }
    const base = {
      stationId,
      format: archive.format,
      archiveStationId: archive.archiveStationId,
      method: archive.method,
      counts: archive.counts,
      firstDate: archive.days[0]?.date ?? null,
      lastDate: archive.days.at(-1)?.date ?? null,
    };
    if (archive.days.length === 0) {
      throw new DomainError(
        'unprocessable',
        `the ${input.format} file holds no usable temperature (${archive.counts.daysRead} days read, ${archive.counts.droppedByFlag} values dropped by their quality flag, ${archive.counts.missing} missing): nothing stored`,
      );
    }
    const locate = (index: number, field?: string): string =>
      `line ${archive.days[index]!.line}${field ? `, field ${field}` : ''}`;
    const records: ObservationInput[] = archive.days.map(({ date, temp, tmin, tmax }) =>
      temp !== undefined ? { date, temp } : { date, tmin: tmin!, tmax: tmax! },
    );
    const days = checkObservations(records, station.temperature_unit, locate);
    const written = await writeObservations(trx, ctx, stationId, days, locate, {
      action: 'import-observations',
      details: {
        import: {
          format: archive.format,
          archiveStationId: archive.archiveStationId,
          method: archive.method,
          counts: archive.counts,
        },
      },
    });
    return { ...base, created: written.created, updated: written.updated, unchanged: written.unchanged };
  });
}
