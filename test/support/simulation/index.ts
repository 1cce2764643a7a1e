/**
 * The simulation library for calibration runs: invented climates, invented
 * buildings that answer each day's temperature, day-to-day noise (own and
 * station-wide), billing, and whole meter and portfolio studies, all seeded.
 * Synthetic throughout: whatever uses it sets the truth.
 */
export * from './seeds.js';
export * from './climates.js';
export * from './buildings.js';
export * from './noise.js';
export * from './billing.js';
export * from './station.js';
export * from './study.js';
export * from './meter.js';
export * from './meter-study.js';
export * from './portfolio.js';
export { seededRandom, type Random } from '../../../src/lib/seeded-random.js';
export { ar1Series, seasonalTemperature, signature, type Building, type Climate } from '../synthetic.js';
