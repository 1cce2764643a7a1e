/** The benchmarks' seeded random source: the project's own (src/lib/seeded-random.ts). */
export { seededRandom, type Random as SeededRandom } from '../../src/lib/seeded-random.js';
