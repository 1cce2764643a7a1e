/** Global setup of the postgres test project: at the end, drop every schema this run made. */
import { dropRunSchemas } from './database.js';

export default function setup(): () => Promise<void> {
  return async () => {
    await dropRunSchemas();
  };
}
