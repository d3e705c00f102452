/** A one-dimensional infrared spectrum as Oscillab handles it. */
export type YKind = 'absorbance' | 'transmittance';

export interface Spectrum {
  /** Wavenumber in cm⁻¹, ascending. */
  x: number[];
  /**
   * Absorbance (decadic), or transmittance as a fraction (0–1). Percent transmittance
   * is converted to a fraction on reading.
   */
  y: number[];
  yKind: YKind;
  title: string;
}
