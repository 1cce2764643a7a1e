/**
 * Limits on one request that every layer checks alike (the HTTP schemas, the
 * services behind the CLI and the import): defined here once.
 */

/** Most records (readings, weather days) one request may carry or fill: a bound of our own on memory and transaction length. */
export const MAX_RECORDS_PER_BATCH = 50_000;

/** Largest magnitude of an independent variable's value: far beyond any count, share or production figure, well inside double precision. */
export const MAX_VARIABLE_MAGNITUDE = 1e12;
