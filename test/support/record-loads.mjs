// Registered with `node --import`: every module URL the process loads is appended, one a line,
// to the file MVLEDGER_RECORD_LOADS names (the hooks run off the main thread, so they write a file).
import { register } from 'node:module';

register(
  `data:text/javascript,${encodeURIComponent(`
import { appendFileSync } from 'node:fs';
const file = process.env.MVLEDGER_RECORD_LOADS;
export async function load(url, context, next) {
  if (file) appendFileSync(file, url + '\\n');
  return next(url, context);
}
`)}`,
  import.meta.url,
);
