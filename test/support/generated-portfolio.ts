/**
 * A small seeded portfolio (src/demo/portfolio.ts) in a database of its own
 * for one test file, on whichever database the test project runs: open it
 * in beforeAll, close and drop it in afterAll.
 */
import { generatePortfolio, type PortfolioOptions } from '../../src/demo/portfolio.js';
import { openStore, type Store } from '../../src/store/connect.js';
import { migrateToLatest } from '../../src/store/migrate.js';
import { dropTestDatabase, freshTestDatabaseUrl } from './database.js';

export interface GeneratedPortfolioStore {
  store: Store;
  organisationId: string;
  close(): Promise<void>;
}

export async function openGeneratedPortfolio(options: PortfolioOptions): Promise<GeneratedPortfolioStore> {
  const url = freshTestDatabaseUrl();
  const store = openStore(url);
  await migrateToLatest(store.db);
  const { organisationId } = await generatePortfolio(store.db, options);
  return {
    store,
    organisationId,
    close: async () => {
      await store.close();
      await dropTestDatabase(url);
    },
  };
}
