/** Usage texts of the command line. */
import {
  CONFIDENCE_LEVELS,
  DEFAULT_EXTRAPOLATION_LIMIT,
  MIN_BASELINE_BILLS,
  MIN_BASELINE_DAYS,
  MODEL_NAMES,
} from '../engine/index.js';

const COMMON_OPTIONS = `  --weather FILE      daily weather CSV: date,temp or date,tmin,tmax (mean = (tmin+tmax)/2);
                      an empty temperature cell is a missing day; an optional
                      column filled (interpolation or second-station) marks days
                      filled on record, and fit lists the periods that hold them
  --unit F|C          the weather station's unit (default F)
  --coverage X        share of a period's days that must have weather (default 0.9)
  --alpha X           two-sided level of the slope t-tests and the F-test (default 0.05)
  --min-points N      minimum periods in each segment of a changepoint shape (default 3)
  --temperature daily|mean
                      how each reading's weather enters the fit: daily (day-resolved:
                      each bill against the mean over its days of the daily response)
                      or mean (the response at its mean temperature); default daily
  --variables FILE    independent variables CSV: date,NAME[,NAME…] (daily values) or
                      start,end,NAME[,NAME…] (values over periods); a column named
                      NAME:total holds amounts spread over their days, the others
                      levels holding on each day. Each is offered to the fit and kept
                      only if it earns its place (t-test and partial F-test); every
                      reading the model uses needs its values
  --json              print one JSON document instead of the text report`;

export const FIT_USAGE = `Usage: mvledger fit --readings FILE --weather FILE [options]
       mvledger fit --batch --readings FILE --weather FILE [options]

Fit the ${MODEL_NAMES.join(', ')} shapes to baseline readings and choose one.

  --readings FILE     baseline readings CSV: start,end,quantity[,estimated]
                      (a reading covers [start, end); other columns are ignored)
  --batch             every meter of one readings file with a meter column (and a
                      station column when the weather file has one: one weather file
                      for all stations, or one station's weather for every meter);
                      writes one CSV row per meter (header first), or with --json one
                      JSON line per meter, as each is fitted; a meter that cannot be
                      fitted gets status error and its reason, and the exit code is 2
  --exclusions FILE   baseline readings to leave out, CSV: start,end,reason
                      (each reason is kept in the fit document; more than a
                      fifth of the readings is refused)
${COMMON_OPTIONS}
`;

export const SAVINGS_USAGE = `Usage: mvledger savings --baseline FILE --reporting FILE --weather FILE [options]

Avoided energy of the reporting period against the fitted baseline, with its uncertainty.

  --baseline FILE     baseline readings CSV: start,end,quantity[,estimated]
  --reporting FILE    reporting-period readings CSV, same columns
  --confidence X      confidence of the stated uncertainty: ${CONFIDENCE_LEVELS.join(', ')} (default 0.68)
  --model SHAPE       use this shape instead of the selected one: ${MODEL_NAMES.join(', ')}
  --allow-short-baseline REASON
                      project from a baseline shorter than a full cycle of seasons
                      (${MIN_BASELINE_DAYS} days and, for bills, ${MIN_BASELINE_BILLS} of them), refused otherwise
  --allow-extrapolation REASON
                      project even when more than ${Math.round(DEFAULT_EXTRAPOLATION_LIMIT * 100)}% of the reporting days have
                      weather outside what the baseline saw, refused otherwise
                      (an override and its reason are printed with the result)
${COMMON_OPTIONS}
`;

export const KEYS_USAGE = `Usage: mvledger keys create (--org ID | --org-name NAME) --role ROLE --name NAME
       mvledger keys list [--org ID]
       mvledger keys revoke ID

Manage API keys directly in the database named by DATABASE_URL
(default sqlite:./var/mvledger.sqlite), bringing its schema up to date first.

  create              make a key in an existing organisation (--org ID) or in a new
                      one (--org-name NAME); prints the token alone on stdout, once:
                      it is not stored and cannot be shown again
  --role ROLE         admin, engineer, analyst or integration
  --name NAME         what the key is for
  list                every key (or one organisation's): id, org, name, role,
                      created, revoked; never a token
  revoke ID           the key answers 401 from then on
`;

export const EXPORT_USAGE = `Usage: mvledger export --org ID [--out FILE]

Write one organisation of the database named by DATABASE_URL (default
sqlite:./var/mvledger.sqlite; its schema is brought up to date first) as one
JSON document, format mvledger-export version 4 (versions 1, 2 and 3 are still
read): every row of its API keys, weather stations and observations, normal
years, facilities, contracts, meters, readings, rates, adjustments, baselines
and audit trail, exactly as stored, with the head of its audit chain. API keys
travel as hashes only; idempotency keys stay behind. A row count per table goes
to stderr.

  --org ID            the organisation to export
  --out FILE          write the document to FILE (default: stdout)
`;

export const IMPORT_USAGE = `Usage: mvledger import --in FILE

Add an organisation written by mvledger export to the database named by
DATABASE_URL (default sqlite:./var/mvledger.sqlite), bringing its schema up to
date first. The document is checked before anything is stored: its audit chain
must recompute to the head it states and every frozen baseline must match its
content hash. An organisation already in the database is refused. Everything is
stored in one transaction and checked again there, or nothing is stored. API
keys keep working. A row count per table goes to stderr.

  --in FILE           the document to import
`;

export const BACKUP_USAGE = `Usage: mvledger backup --out FILE

Copy the SQLite database named by DATABASE_URL (default
sqlite:./var/mvledger.sqlite) to FILE while the service keeps running: one
consistent snapshot through SQLite's online backup, written beside FILE and
renamed into place. The copy is then checked (every organisation's audit
chain, every frozen baseline's content hash) and the verdict printed on one
line; a copy of a ledger that does not verify is kept, with exit code 2.
For a postgres:// DATABASE_URL it prints the pg_dump and pg_restore commands
(password left out) and exits 2.

  --out FILE          where to write the backup (replaced if it exists)
`;

export const RESTORE_USAGE = `Usage: mvledger restore --in FILE [--force]

Put a file written by mvledger backup in place of the SQLite database named
by DATABASE_URL (default sqlite:./var/mvledger.sqlite). Stop the service
first: a database in use is refused. The backup is copied beside the
database, brought up to the current schema and checked (every
organisation's audit chain, every frozen baseline's content hash); only
then is it renamed into place, so a backup that does not verify (exit code
2) leaves the database as it was. The verdict is printed on one line.
SQLite only: for a postgres:// DATABASE_URL it prints the pg_restore
command and exits 2.

  --in FILE           the backup to restore
  --force             replace a database that already holds organisations
`;

export const WEATHER_USAGE = `Usage: mvledger weather import --format NAME FILE [--station ID] [--unit F|C]
       mvledger weather import --format NAME FILE --url URL --station-id WST [--key KEY] [--station ID]
       mvledger weather check --format NAME FILE [--station ID] [--unit F|C] [--json]
       mvledger weather normals FILE [--format noaa-daily-normals-csv] [--station ID] [--unit F|C] [--file-unit F|C] [--json]

Read a public daily station file as published. Formats: ghcn-dly (GHCN-Daily
fixed-width .dly), ghcn-csv (GHCN-Daily by-station CSV), gsod-csv (Global
Summary of the Day CSV). Values with a failing quality flag are dropped and
counted; temperatures are converted once to --unit (default F).

  --station ID        the archive's station id every line must carry
  import              writes date,temp to stdout (the mean; (TMIN+TMAX)/2 where
                      the file gives the extremes) and the counts to stderr;
                      with --url, posts the file to the service instead:
  --url URL           the service, e.g. http://127.0.0.1:8080
  --station-id WST    the ledger station to import into
  --key KEY           an API key (or MVLEDGER_API_KEY in the environment)
  check               the record's span, missing days per year, extremes and
                      days outside plausible bounds
  normals             published daily normals (noaa-daily-normals-csv: NOAA's
                      daily normals CSV) as the 365-day normal year, day,temp
                      in --unit, its source to stderr; DLY-TAVG-NORMAL, else
                      (DLY-TMAX-NORMAL + DLY-TMIN-NORMAL)/2; 02-29 left out
  --file-unit F|C     the unit of the normals file's values (default F)
`;

export const VERIFY_USAGE = `Usage: mvledger verify --org ID [--full]
       mvledger verify --export FILE --public-key FILE --checkpoints FILE

With --org, check the organisation in the database named by DATABASE_URL
(default sqlite:./var/mvledger.sqlite): its audit hash chain, every frozen
baseline against the content hash its freeze row recorded and, with --full,
every reading, weather day, rate, contract, normal year, adjustment and API key
against a replay of the audit trail, each difference named.

With --export, check an export (mvledger export) offline, with the service's
checkpoint public key (PEM) and signed checkpoints (a statement's JSON copy, or
the answer of GET /v1/audit/checkpoints): the chain must be intact and, at each
checkpoint, hold the row the service signed. Needs no database and no secret.

Exit code 0 when everything holds, 4 when a check fails.

  --org ID              the organisation to check in the database
  --full                also replay the trail against every table
  --export FILE         an export document to check offline
  --public-key FILE     the service's checkpoint public key, PEM
  --checkpoints FILE    signed checkpoints: statement JSON or checkpoint list
`;

export const GENERAL_USAGE = `mvledger: weather-normalised baselines and avoided energy (IPMVP whole-facility option, ASHRAE Guideline 14 methods)

Usage:
  mvledger fit --readings FILE --weather FILE [options]
  mvledger savings --baseline FILE --reporting FILE --weather FILE [options]
  mvledger weather import|check --format NAME FILE [options]
  mvledger keys create|list|revoke ...
  mvledger export --org ID [--out FILE]
  mvledger import --in FILE
  mvledger backup --out FILE
  mvledger restore --in FILE [--force]
  mvledger verify --org ID [--full] | --export FILE --public-key FILE --checkpoints FILE
  mvledger help [fit|savings|weather|keys|export|import|backup|restore|verify]
  mvledger --version

Dates are ISO (YYYY-MM-DD). Bad input is reported as one line naming the file,
the CSV row (header = row 1) and the field, with exit code 2.

${FIT_USAGE}
${SAVINGS_USAGE}
${WEATHER_USAGE}
${KEYS_USAGE}
${EXPORT_USAGE}
${IMPORT_USAGE}
${BACKUP_USAGE}
${RESTORE_USAGE}
${VERIFY_USAGE}`;
