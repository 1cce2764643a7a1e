/** The day-to-day noise levels the calibration runs use: independent days and AR(1) spells. */
export interface NoiseLevel {
  label: string;
  /** Lag-1 correlation φ of each meter's daily noise. */
  persistence: number;
}

export const IID: NoiseLevel = { label: 'iid', persistence: 0 };
export const AR06: NoiseLevel = { label: 'AR(1) φ=0.6', persistence: 0.6 };
export const AR08: NoiseLevel = { label: 'AR(1) φ=0.8', persistence: 0.8 };
