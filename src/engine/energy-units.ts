/**
 * Energy units with exact or standard factors. Only units whose size is
 * fixed by definition are here: volumes of fuel (m3, ccf, gallons) need a
 * heating value from the supplier or the M&V plan and are never assumed.
 */

/**
 * The International Table British thermal unit in joules, exact by
 * definition: IT calorie 4.1868 J × 453.59237 g/lb × 5/9 K/°F
 * = 1055.05585262 J (BS 350:2004 note; NIST SP 811 (2008) Appendix B.8
 * lists it rounded as 1.055 056 E+03 J).
 */
export const BTU_IT_JOULES = 1055.05585262;

/**
 * Each unit's size as a multiple of one base (the joule or the Btu_IT), so
 * conversions inside one family (kWh ↔ MJ, therm ↔ MMBtu) use exact ratios.
 */
const UNIT_SIZES: Readonly<Record<string, { base: 'J' | 'Btu'; size: number }>> = {
  Wh: { base: 'J', size: 3600 },
  kWh: { base: 'J', size: 3.6e6 },
  MWh: { base: 'J', size: 3.6e9 },
  Btu: { base: 'Btu', size: 1 },
  kBtu: { base: 'Btu', size: 1e3 },
  MMBtu: { base: 'Btu', size: 1e6 },
  therm: { base: 'Btu', size: 1e5 },
  MJ: { base: 'J', size: 1e6 },
  GJ: { base: 'J', size: 1e9 },
};

/**
 * Joules per unit, keyed by canonical spelling: Wh, kWh, MWh (SI: 1 Wh =
 * 3600 J); Btu, kBtu, MMBtu (Btu_IT); therm; MJ, GJ. The therm here is
 * 100,000 Btu_IT = 1.05505585262 E+08 J, the convention of the project's
 * brief and the same size as the therm (EC) of NIST SP 811 (1.055 06 E+08 J);
 * the US therm of NIST SP 811 (1.054 804 E+08 J, based on the 59 °F Btu)
 * is about 0.024% smaller (the two are often quoted as 0.025% apart). The
 * project follows the 100,000 Btu convention of its brief.
 */
export const ENERGY_UNIT_JOULES: Readonly<Record<string, number>> = Object.freeze(
  Object.fromEntries(
    Object.entries(UNIT_SIZES).map(([unit, { base, size }]) => [unit, base === 'J' ? size : size * BTU_IT_JOULES]),
  ),
);

/** Where the factors come from. */
export const ENERGY_FACTOR_SOURCE =
  'SI definitions (1 Wh = 3600 J, so 1 kWh = 3.6 MJ exactly), the International Table Btu of 1055.05585262 J exactly (therm = 100,000 Btu, MMBtu = 1,000,000 Btu), and NIST SP 811 (2008) Appendix B.8.';

/** Lower-case spelling → canonical spelling. */
const CANONICAL = new Map(Object.keys(UNIT_SIZES).map((unit) => [unit.toLowerCase(), unit]));

/**
 * The canonical spelling of `unit`, matched without regard to case after
 * trimming, with a plural 's' allowed ('KWH' → 'kWh', 'Therms' → 'therm',
 * 'mmbtu' → 'MMBtu'); undefined for a unit with no standard factor (m3,
 * gallon, ccf: they need a heating value).
 */
export function canonicalEnergyUnit(unit: string): string | undefined {
  const key = unit.trim().toLowerCase();
  return CANONICAL.get(key) ?? (key.length > 1 && key.endsWith('s') ? CANONICAL.get(key.slice(0, -1)) : undefined);
}

/**
 * `value` in unit `from` expressed in unit `to`. Throws RangeError naming
 * the unit when either has no standard factor.
 */
export function convertEnergy(value: number, from: string, to: string): number {
  const source = sizeOf(from);
  const target = sizeOf(to);
  // Multiply first, divide last: one rounding for exact ratios such as therm → Btu.
  if (source.base === target.base) return (value * source.size) / target.size;
  return (value * ENERGY_UNIT_JOULES[source.unit]!) / ENERGY_UNIT_JOULES[target.unit]!;
}

/** Factors per 1 `unit`: in Btu, MMBtu and GJ; undefined for a unit with no standard factor. */
export function energyFactor(unit: string): { unit: string; btu: number; mmbtu: number; gj: number } | undefined {
  const canonical = canonicalEnergyUnit(unit);
  if (canonical === undefined) return undefined;
  return {
    unit: canonical,
    btu: convertEnergy(1, canonical, 'Btu'),
    mmbtu: convertEnergy(1, canonical, 'MMBtu'),
    gj: convertEnergy(1, canonical, 'GJ'),
  };
}

function sizeOf(unit: string): { unit: string; base: 'J' | 'Btu'; size: number } {
  const canonical = canonicalEnergyUnit(unit);
  if (canonical === undefined) {
    throw new RangeError(
      `no standard energy factor for the unit ${JSON.stringify(unit)} (known: ${Object.keys(UNIT_SIZES).join(', ')}; volumes need a heating value)`,
    );
  }
  return { unit: canonical, ...UNIT_SIZES[canonical]! };
}
