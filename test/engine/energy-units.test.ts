import { describe, it, expect } from 'vitest';
import {
  BTU_IT_JOULES,
  ENERGY_FACTOR_SOURCE,
  ENERGY_UNIT_JOULES,
  canonicalEnergyUnit,
  convertEnergy,
  energyFactor,
} from '../../src/engine/energy-units.js';

/** |actual − expected| ≤ half a unit in the last place the source states. */
function toStatedPrecision(actual: number, expected: number, lastPlace: number): void {
  expect(Math.abs(actual - expected)).toBeLessThanOrEqual(lastPlace / 2);
}

describe('BTU_IT_JOULES', () => {
  it('is the IT calorie definition carried through (hand-worked: 4.1868 J/cal × 453.59237 g/lb × 5/9 K/°F = 1055.05585262 J)', () => {
    // 4.1868 (IT calorie) and 453.59237 (international pound) are exact by definition (from memory).
    expect(BTU_IT_JOULES).toBeCloseTo((4.1868 * 453.59237 * 5) / 9, 9);
  });

  it('rounds to the published table value (NIST SP 811 (2008) App. B.8: Btu_IT = 1.055 056 E+03 J)', () => {
    toStatedPrecision(BTU_IT_JOULES, 1.055056e3, 0.001);
  });
});

describe('ENERGY_UNIT_JOULES against published values', () => {
  it('kWh is 3.6 E+06 J exactly (NIST SP 811 (2008) App. B.8, an exact factor; SI: 1 W·h = 3600 J)', () => {
    expect(ENERGY_UNIT_JOULES.kWh).toBe(3.6e6);
    expect(ENERGY_UNIT_JOULES.Wh).toBe(3600);
    expect(ENERGY_UNIT_JOULES.MWh).toBe(3.6e9);
  });

  it('MJ and GJ are SI prefixes of the joule (SI: mega = 1e6, giga = 1e9)', () => {
    expect(ENERGY_UNIT_JOULES.MJ).toBe(1e6);
    expect(ENERGY_UNIT_JOULES.GJ).toBe(1e9);
  });

  it('therm = 100,000 Btu_IT, which rounds to the therm (EC) of NIST SP 811 (2008) App. B.8: 1.055 06 E+08 J', () => {
    toStatedPrecision(ENERGY_UNIT_JOULES.therm!, 1.05506e8, 0.00001e8);
    // hand-worked: 1e5 × 1055.05585262 = 105,505,585.262 J
    expect(ENERGY_UNIT_JOULES.therm).toBeCloseTo(105_505_585.262, 3);
  });

  it('the US therm of NIST SP 811 App. B.8 (1.054 804 E+08 J) is about 0.024% smaller (hand-worked: (105,505,585 − 105,480,400) / 105,505,585 = 0.000239)', () => {
    const usTherm = 1.054804e8; // NIST SP 811 (2008) App. B.8, therm (U.S.)
    expect((ENERGY_UNIT_JOULES.therm! - usTherm) / ENERGY_UNIT_JOULES.therm!).toBeCloseTo(0.000239, 6);
  });

  it('kBtu and MMBtu are 1e3 and 1e6 Btu_IT (common practice: k = thousand, MM = million in US energy usage)', () => {
    expect(ENERGY_UNIT_JOULES.kBtu).toBeCloseTo(1_055_055.85262, 5);
    expect(ENERGY_UNIT_JOULES.MMBtu).toBeCloseTo(1_055_055_852.62, 2);
  });

  it('lists exactly the canonical spellings', () => {
    expect(Object.keys(ENERGY_UNIT_JOULES).sort()).toEqual(
      ['Btu', 'GJ', 'MJ', 'MMBtu', 'MWh', 'Wh', 'kBtu', 'kWh', 'therm'].sort(),
    );
  });
});

describe("convertEnergy against the brief's standard values", () => {
  it('1 kWh = 3,412.14 Btu (project brief; hand-worked: 3.6e6 / 1055.05585262 = 3412.1416)', () => {
    toStatedPrecision(convertEnergy(1, 'kWh', 'Btu'), 3412.14, 0.01);
  });

  it('1 GJ = 947,817 Btu (project brief; hand-worked: 1e9 / 1055.05585262 = 947,817.12)', () => {
    toStatedPrecision(convertEnergy(1, 'GJ', 'Btu'), 947_817, 1);
  });

  it('1 therm = 100,000 Btu and 1 MMBtu = 1e6 Btu exactly (project brief; definitions)', () => {
    expect(convertEnergy(1, 'therm', 'Btu')).toBe(100_000);
    expect(convertEnergy(1, 'MMBtu', 'Btu')).toBe(1_000_000);
    expect(convertEnergy(1, 'MMBtu', 'therm')).toBe(10);
    expect(convertEnergy(250, 'therm', 'MMBtu')).toBe(25); // hand-worked: 250 × 1e5 / 1e6
  });

  it('keeps exact SI ratios exact (hand-worked: 1 kWh = 3.6 MJ; 1000 kWh = 1 MWh; 1 GJ = 277.777… kWh)', () => {
    expect(convertEnergy(1, 'kWh', 'MJ')).toBe(3.6);
    expect(convertEnergy(1000, 'kWh', 'MWh')).toBe(1);
    expect(convertEnergy(1, 'GJ', 'kWh')).toBeCloseTo(1e9 / 3.6e6, 12);
  });

  it('round-trips every pair of units (synthetic: the test sets the value)', () => {
    const units = Object.keys(ENERGY_UNIT_JOULES);
    for (const from of units) {
      for (const to of units) {
        const value = 12_345.678;
        const back = convertEnergy(convertEnergy(value, from, to), to, from);
        expect(Math.abs(back - value) / value, `${from} → ${to} → ${from}`).toBeLessThan(1e-14);
      }
    }
  });

  it('accepts any spelling canonicalEnergyUnit accepts (hand-worked: 2 therms = 200,000 Btu)', () => {
    expect(convertEnergy(2, ' Therms ', 'BTU')).toBe(200_000);
  });

  it('throws RangeError naming the unit with no standard factor', () => {
    expect(() => convertEnergy(1, 'm3', 'kWh')).toThrow(RangeError);
    expect(() => convertEnergy(1, 'm3', 'kWh')).toThrow(/"m3"/);
    expect(() => convertEnergy(1, 'kWh', 'gallon')).toThrow(/"gallon"/);
  });
});

describe('canonicalEnergyUnit', () => {
  it('matches without regard to case, after trimming, plural allowed', () => {
    expect(canonicalEnergyUnit('KWH')).toBe('kWh');
    expect(canonicalEnergyUnit(' kwh ')).toBe('kWh');
    expect(canonicalEnergyUnit('Therms')).toBe('therm');
    expect(canonicalEnergyUnit('therms')).toBe('therm');
    expect(canonicalEnergyUnit('THERM')).toBe('therm');
    expect(canonicalEnergyUnit('mmbtu')).toBe('MMBtu');
    expect(canonicalEnergyUnit('BTU')).toBe('Btu');
    expect(canonicalEnergyUnit('kbtu')).toBe('kBtu');
    expect(canonicalEnergyUnit('gj')).toBe('GJ');
    expect(canonicalEnergyUnit('wh')).toBe('Wh');
  });

  it('knows no unit that needs a heating value (volumes of fuel are never assumed)', () => {
    for (const unit of ['m3', 'gallon', 'ccf', 'mcf', 'litre', '', ' ', 's', 'kW']) {
      expect(canonicalEnergyUnit(unit), JSON.stringify(unit)).toBeUndefined();
    }
  });
});

describe('energyFactor', () => {
  it('gives factors per 1 unit (hand-worked from the definitions above)', () => {
    const kwh = energyFactor('kwh')!;
    expect(kwh.unit).toBe('kWh');
    expect(kwh.btu).toBeCloseTo(3.6e6 / 1055.05585262, 9);
    expect(kwh.mmbtu).toBeCloseTo(3.6 / 1055.05585262, 15);
    expect(kwh.gj).toBe(0.0036);

    const therm = energyFactor('therm')!;
    expect(therm).toEqual({ unit: 'therm', btu: 100_000, mmbtu: 0.1, gj: therm.gj });
    expect(therm.gj).toBeCloseTo(0.105505585262, 12);
  });

  it('is undefined for a unit with no standard factor', () => {
    expect(energyFactor('ccf')).toBeUndefined();
  });
});

describe('ENERGY_FACTOR_SOURCE', () => {
  it('names its sources', () => {
    expect(ENERGY_FACTOR_SOURCE).toMatch(/3\.6 MJ/);
    expect(ENERGY_FACTOR_SOURCE).toMatch(/1055\.05585262 J/);
    expect(ENERGY_FACTOR_SOURCE).toMatch(/NIST SP 811 \(2008\) Appendix B\.8/);
  });
});
