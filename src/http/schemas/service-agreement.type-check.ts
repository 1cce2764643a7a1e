/**
 * Compile-time checks that each route's zod schemas and the service function
 * behind it agree: a request schema's parsed type is exactly what the service
 * takes, and what the service returns is exactly what the response schema
 * describes (so the OpenAPI document cannot drift from the code). Nothing here
 * runs: `npm run typecheck` fails, naming the line, when a pair drifts apart.
 */
import type { z } from 'zod';
import type { createFacilityBody, facilitySchema } from './facilities.js';
import type { createMeterBody, listMetersQuery, meterSchema } from './meters.js';
import type { createStationBody, stationRecordSchema, stationSchema } from './weather-stations.js';
import type { adjustmentList, adjustmentSchema, createAdjustmentBody, withdrawAdjustmentBody } from './adjustments.js';
import type { apiKeySchema, callerSchema, createApiKeyBody, createdApiKeySchema } from './api-keys.js';
import type { auditPageSchema, chainVerdictSchema } from './audit.js';
import type {
  baselineHistorySchema,
  baselinePointsSchema,
  baselineSchema,
  chooseBody,
  createBaselineBody,
  freezeBody,
  verifiedBaselineSchema,
} from './baselines.js';
import type { contractSchema, putContractBody } from './contracts.js';
import type { normalYearFromHistoryBody, normalYearSchema, normalsFormat, putNormalYearBody } from './normal-years.js';
import type { observationsList, putObservationsBody, putObservationsResult } from './observations.js';
import type { putRatesBody, rateScheduleSchema } from './rates.js';
import type { dateRangeQuery, postReadingsBody, postReadingsResult, readingsList, seriesQuery } from './readings.js';
import type { savingsQuery, savingsSchema } from './savings.js';
import type { reportJsonSchema, reportQuery, streamedReportQuery } from './reports.js';
import type {
  issueStatementBody,
  reasonBody,
  statementComparison,
  statementList,
  statementSchema,
  voidStatementBody,
} from './statements.js';
import type { gapFillBody, gapFillResult } from './weather-gaps.js';
import type { archiveFormat, importResult } from './weather-imports.js';
import type { pageQuery } from './common.js';
import type {
  createVariableBody,
  postVariableValuesBody,
  postVariableValuesResult,
  variableListSchema,
  variableSchema,
  variableValuesList,
} from './variables.js';
import type { calendarSchema, putCalendarBody } from './calendars.js';
import type { getCalendar, putCalendar } from '../../services/calendars.js';
import type {
  createVariable,
  listVariableValues,
  listVariables,
  postVariableValues,
} from '../../services/variables.js';
import type { PageRequest } from '../../services/paging.js';
import type { createFacility, listFacilities, toFacility } from '../../services/facilities.js';
import type { createMeter, listMeters, listOrganisationMeters, toMeter } from '../../services/meters.js';
import type { createStation, listStations, toStation } from '../../services/weather-stations.js';
import type { stationRecordSummary } from '../../services/station-records.js';
import type { createAdjustment, listAdjustments, withdrawAdjustment } from '../../services/adjustments.js';
import type { createApiKey, describeCaller, listApiKeys, revokeApiKey } from '../../services/api-keys.js';
import type { listAuditEntries, verifyAudit } from '../../services/audit.js';
import type {
  baselinePoints,
  chooseModel,
  createBaseline,
  freezeBaseline,
  getBaseline,
  getNewestBaseline,
  listBaselines,
  newestBaselinePoints,
} from '../../services/baselines/index.js';
import type { getContract, putContract } from '../../services/contracts.js';
import type {
  getNormalYear,
  normalYearFromPublishedNormals,
  normalYearFromStationHistory,
  putNormalYear,
} from '../../services/normal-years.js';
import type { listObservations, putObservations } from '../../services/observations.js';
import type { getRates, putRates } from '../../services/rates.js';
import type { listReadings, postReadings } from '../../services/readings.js';
import type {
  approveStatement,
  compareStatement,
  getStatement,
  issueStatement,
  listStatements,
  rejectStatement,
  voidStatement,
} from '../../services/statements.js';
import type { fillWeatherGaps } from '../../services/weather-gaps.js';
import type { importStationFile } from '../../services/weather-imports.js';
import type { MeterSavings } from '../../services/savings.js';
import type { SavingsCache } from '../../services/savings-cache.js';
import type { savingsReport } from '../../services/reports.js';
import type { streamSavingsReport } from '../../services/report-stream.js';

/** True when A and B are the same type (not merely assignable one way). */
type Identical<A, B> = (<T>() => T extends A ? 1 : 2) extends <T>() => T extends B ? 1 : 2 ? true : false;
/** A compile error unless T is true. */
type Expect<T extends true> = T;

/** An object's named keys (an index signature's `string` is no name). */
type Named<T> = keyof { [K in keyof T as K extends string ? (string extends K ? never : K) : never]: 0 } &
  keyof T &
  string;
/**
 * Every field's path ("fit.candidates.model"), through arrays, null and
 * each member of a union; nine levels deep at most (the deepest document,
 * a baseline's fit, has six).
 */
type Paths<T, Depth extends unknown[] = []> = Depth['length'] extends 9
  ? never
  : T extends readonly (infer Element)[]
    ? Paths<Element, Depth>
    : T extends object
      ? { [K in Named<T>]: K | `${K}.${Paths<NonNullable<T[K]>, [...Depth, 1]> & string}` }[Named<T>]
      : never;

/**
 * What flows from `From` into `To` fits (assignable: an enum may flow into a
 * string, a mutable array into a readonly one) and both name exactly the same
 * fields at every depth: a field one side adds and the other does not know
 * (a service output the response schema would strip, a service input no
 * request can set) is a compile error.
 */
type Agree<From, To> = [From] extends [To] ? Identical<Paths<From>, Paths<To>> : false;

type Fn = (...args: never[]) => unknown;
/** The service's argument at `index`. */
type Takes<F extends Fn, Index extends number> = Parameters<F>[Index];
/** What the service resolves to. */
type Gives<F extends Fn> = Awaited<ReturnType<F>>;
/** A request schema as the handler receives it (parsed; a query object is always present). */
type Parsed<S extends z.ZodType> = NonNullable<z.output<S>>;
/** A response schema as the serialiser accepts it. */
type Answer<S extends z.ZodType> = z.input<S>;

/** Every list's limit and cursor (pageQuery) are what the services' keyset pages take. */
export type Paging = [Expect<Agree<Parsed<z.ZodObject<ReturnType<typeof pageQuery>>>, PageRequest>>];

export type FacilityRoutes = [
  Expect<Agree<Parsed<typeof createFacilityBody>, Takes<typeof createFacility, 1>>>,
  Expect<Agree<Gives<typeof createFacility>, Answer<typeof facilitySchema>>>,
  Expect<Agree<Gives<typeof toFacility>, Answer<typeof facilitySchema>>>,
  Expect<Agree<Gives<typeof listFacilities>['facilities'], Answer<typeof facilitySchema>[]>>,
];

export type MeterRoutes = [
  Expect<Agree<Parsed<typeof createMeterBody>, Takes<typeof createMeter, 2>>>,
  Expect<Agree<Gives<typeof createMeter>, Answer<typeof meterSchema>>>,
  Expect<Agree<Gives<typeof toMeter>, Answer<typeof meterSchema>>>,
  Expect<Agree<Gives<typeof listMeters>['meters'], Answer<typeof meterSchema>[]>>,
  Expect<Agree<Gives<typeof listOrganisationMeters>['meters'], Answer<typeof meterSchema>[]>>,
  // The route extends the query with the page fields (checked with the paging below).
  Expect<
    Agree<Parsed<typeof listMetersQuery>, Omit<NonNullable<Takes<typeof listOrganisationMeters, 2>>, keyof PageRequest>>
  >,
];

export type WeatherStationRoutes = [
  Expect<Agree<Parsed<typeof createStationBody>, Takes<typeof createStation, 1>>>,
  Expect<Agree<Gives<typeof createStation>, Answer<typeof stationSchema>>>,
  Expect<Agree<Gives<typeof toStation>, Answer<typeof stationSchema>>>,
  Expect<Agree<Gives<typeof listStations>['stations'], Answer<typeof stationSchema>[]>>,
  Expect<Agree<Parsed<typeof dateRangeQuery>, Takes<typeof stationRecordSummary, 3>>>,
  Expect<Agree<Gives<typeof stationRecordSummary>, Answer<typeof stationRecordSchema>>>,
];

export type AdjustmentRoutes = [
  Expect<Agree<Parsed<typeof createAdjustmentBody>, Takes<typeof createAdjustment, 2>>>,
  Expect<Agree<Gives<typeof createAdjustment>, Answer<typeof adjustmentSchema>>>,
  Expect<Agree<Parsed<typeof withdrawAdjustmentBody>, Takes<typeof withdrawAdjustment, 2>>>,
  Expect<Agree<Gives<typeof withdrawAdjustment>, Answer<typeof adjustmentSchema>>>,
  Expect<Agree<Gives<typeof listAdjustments>, Answer<typeof adjustmentList>>>,
];

export type ApiKeyRoutes = [
  Expect<Agree<Parsed<typeof createApiKeyBody>, Takes<typeof createApiKey, 1>>>,
  Expect<Agree<Gives<typeof createApiKey>, Answer<typeof createdApiKeySchema>>>,
  Expect<Agree<Gives<typeof listApiKeys>['keys'], Answer<typeof apiKeySchema>[]>>,
  Expect<Agree<Gives<typeof revokeApiKey>, Answer<typeof apiKeySchema>>>,
  Expect<Agree<Gives<typeof describeCaller>, Answer<typeof callerSchema>>>,
];

export type AuditRoutes = [
  Expect<Agree<Gives<typeof listAuditEntries>, Answer<typeof auditPageSchema>>>,
  // Deliberate: the verdict leaves out the broken row's organisation, which is always the caller's own.
  Expect<Agree<WithoutBrokenOrganisation<Gives<typeof verifyAudit>>, Answer<typeof chainVerdictSchema>>>,
];

export type BaselineRoutes = [
  Expect<Agree<Parsed<typeof createBaselineBody>, Takes<typeof createBaseline, 2>>>,
  Expect<Agree<Gives<typeof createBaseline>, Answer<typeof baselineSchema>>>,
  Expect<Agree<Gives<typeof listBaselines>, Answer<typeof baselineHistorySchema>>>,
  Expect<Agree<Gives<typeof getBaseline>, Answer<typeof verifiedBaselineSchema>>>,
  Expect<Agree<Parsed<typeof chooseBody>, Takes<typeof chooseModel, 2>>>,
  Expect<Agree<Gives<typeof chooseModel>, Answer<typeof baselineSchema>>>,
  Expect<Agree<Parsed<typeof freezeBody>, Takes<typeof freezeBaseline, 2>>>,
  Expect<Agree<Gives<typeof freezeBaseline>, Answer<typeof baselineSchema>>>,
  Expect<Agree<Gives<typeof baselinePoints>, Answer<typeof baselinePointsSchema>>>,
  Expect<Agree<Gives<typeof getNewestBaseline>, Answer<typeof verifiedBaselineSchema>>>,
  Expect<Agree<Gives<typeof newestBaselinePoints>, Answer<typeof baselinePointsSchema>>>,
];

export type ContractRoutes = [
  Expect<Agree<Parsed<typeof putContractBody>, Takes<typeof putContract, 2>>>,
  Expect<Agree<Gives<typeof putContract>, Answer<typeof contractSchema>>>,
  Expect<Agree<Gives<typeof getContract>, Answer<typeof contractSchema>>>,
];

export type NormalYearRoutes = [
  Expect<Agree<Parsed<typeof putNormalYearBody>, Takes<typeof putNormalYear, 2>>>,
  Expect<Agree<Gives<typeof putNormalYear>, Answer<typeof normalYearSchema>>>,
  Expect<Agree<Parsed<typeof normalYearFromHistoryBody>, Takes<typeof normalYearFromStationHistory, 2>>>,
  Expect<Agree<Gives<typeof normalYearFromStationHistory>, Answer<typeof normalYearSchema>>>,
  Expect<Agree<Gives<typeof getNormalYear>, Answer<typeof normalYearSchema>>>,
  Expect<Agree<z.output<typeof normalsFormat>, Takes<typeof normalYearFromPublishedNormals, 2>['format']>>,
  Expect<Agree<Gives<typeof normalYearFromPublishedNormals>, Answer<typeof normalYearSchema>>>,
];

export type ObservationRoutes = [
  Expect<Agree<Parsed<typeof putObservationsBody>, Takes<typeof putObservations, 2>>>,
  Expect<Agree<Gives<typeof putObservations>, Answer<typeof putObservationsResult>>>,
  Expect<Agree<Parsed<ReturnType<typeof seriesQuery>>, Takes<typeof listObservations, 3>>>,
  Expect<Agree<Gives<typeof listObservations>, Answer<typeof observationsList>>>,
];

export type RateRoutes = [
  Expect<Agree<Parsed<typeof putRatesBody>, Takes<typeof putRates, 2>>>,
  Expect<Agree<Gives<typeof putRates>, Answer<typeof rateScheduleSchema>>>,
  Expect<Agree<Gives<typeof getRates>, Answer<typeof rateScheduleSchema>>>,
];

export type CalendarRoutes = [
  Expect<Agree<Parsed<typeof putCalendarBody>, Takes<typeof putCalendar, 2>>>,
  Expect<Agree<Gives<typeof putCalendar>, Answer<typeof calendarSchema>>>,
  Expect<Agree<Gives<typeof getCalendar>, Answer<typeof calendarSchema>>>,
];

export type VariableRoutes = [
  Expect<Agree<Parsed<typeof createVariableBody>, Takes<typeof createVariable, 2>>>,
  Expect<Agree<Gives<typeof createVariable>, Answer<typeof variableSchema>>>,
  Expect<Agree<Gives<typeof listVariables>, Answer<typeof variableListSchema>>>,
  // The route adds the query's correctionReason to the body's values.
  Expect<Agree<Parsed<typeof postVariableValuesBody>['values'], Takes<typeof postVariableValues, 2>['values']>>,
  Expect<Agree<Gives<typeof postVariableValues>, Answer<typeof postVariableValuesResult>>>,
  Expect<Agree<Gives<typeof listVariableValues>, Answer<typeof variableValuesList>>>,
];

export type ReadingRoutes = [
  // The route adds the query's correctionReason to the body's readings.
  Expect<Agree<Parsed<typeof postReadingsBody>['readings'], Takes<typeof postReadings, 2>['readings']>>,
  Expect<Agree<Gives<typeof postReadings>, Answer<typeof postReadingsResult>>>,
  Expect<Agree<Parsed<ReturnType<typeof seriesQuery>>, Takes<typeof listReadings, 3>>>,
  Expect<Agree<Gives<typeof listReadings>, Answer<typeof readingsList>>>,
];

/**
 * Deliberate: the schema describes the window's resolved dates and words and
 * lets the request's own form ({quarter}, {contractYear}) through as it was
 * sent (a loose object), so those two fields are not named there.
 */
type WindowAsDescribed<T extends { window: { from: string; to: string; kind: string; label: string } }> = Omit<
  T,
  'window'
> & {
  window: Pick<T['window'], 'from' | 'to' | 'kind' | 'label'>;
};
/** Deliberate: the audit verdict names the broken row but not its organisation (the caller's own). */
type WithoutBrokenOrganisation<T extends { broken?: { organisationId: string } }> = Omit<T, 'broken'> & {
  broken?: Omit<NonNullable<T['broken']>, 'organisationId'>;
};

export type StatementRoutes = [
  // The route resolves the window's one form ({quarter}, {contractYear} or {from, to}) itself.
  Expect<Agree<Omit<Parsed<typeof issueStatementBody>, 'window'>, Omit<Takes<typeof issueStatement, 1>, 'window'>>>,
  Expect<Agree<WindowAsDescribed<Gives<typeof issueStatement>>, Answer<typeof statementSchema>>>,
  Expect<
    Agree<
      { statements: WindowAsDescribed<Gives<typeof listStatements>['statements'][number]>[] },
      Answer<typeof statementList>
    >
  >,
  Expect<Agree<WindowAsDescribed<Gives<typeof getStatement>>, Answer<typeof statementSchema>>>,
  Expect<Agree<WindowAsDescribed<Gives<typeof approveStatement>>, Answer<typeof statementSchema>>>,
  Expect<Agree<Parsed<typeof reasonBody>, Takes<typeof rejectStatement, 2>>>,
  Expect<Agree<WindowAsDescribed<Gives<typeof rejectStatement>>, Answer<typeof statementSchema>>>,
  Expect<Agree<Parsed<typeof voidStatementBody>, Takes<typeof voidStatement, 2>>>,
  Expect<Agree<WindowAsDescribed<Gives<typeof voidStatement>>, Answer<typeof statementSchema>>>,
  Expect<Agree<Gives<typeof compareStatement>, Answer<typeof statementComparison>>>,
];

export type WeatherGapRoutes = [
  Expect<Agree<Parsed<typeof gapFillBody>, Takes<typeof fillWeatherGaps, 2>>>,
  Expect<Agree<Gives<typeof fillWeatherGaps>, Answer<typeof gapFillResult>>>,
];

export type WeatherImportRoutes = [
  Expect<Agree<z.output<typeof archiveFormat>, Takes<typeof importStationFile, 2>['format']>>,
  Expect<Agree<Gives<typeof importStationFile>, Answer<typeof importResult>>>,
];

export type SavingsRoutes = [
  Expect<Agree<Parsed<typeof savingsQuery>, Takes<SavingsCache['savings'], 3>>>,
  Expect<Agree<MeterSavings, Answer<typeof savingsSchema>>>,
];

export type ReportRoutes = [
  // The route takes the format for itself and hands the rest to the service.
  Expect<Agree<Omit<Parsed<typeof reportQuery>, 'format'>, NonNullable<Takes<typeof savingsReport, 2>>>>,
  // The schema describes the report's head only (a loose object: the rest goes out as the service built it).
  Expect<
    Agree<Pick<Gives<typeof savingsReport>, Named<Answer<typeof reportJsonSchema>>>, Answer<typeof reportJsonSchema>>
  >,
  // The streamed report takes the same window and options; its format goes to the service as its own argument.
  Expect<Agree<Omit<Parsed<typeof streamedReportQuery>, 'format'>, Takes<typeof streamSavingsReport, 2>>>,
];
