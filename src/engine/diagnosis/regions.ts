/**
 * Mains supply regions: nominal voltage and frequency, and the band a healthy supply stays in
 * (DOMAIN.md §4).
 */
import type { MainsRegion, ToleranceSettings } from './types';

export interface MainsBand {
  region: MainsRegion;
  nominalVolts: number;
  hz: number;
  lowVolts: number;
  highVolts: number;
  /** Where the band comes from, for display. */
  source: string;
}

/** The published bands (DOMAIN.md §4). */
export const MAINS_REGIONS: Record<Exclude<MainsRegion, 'custom'>, MainsBand> = {
  // ANSI C84.1 Range A service voltage 114–126 V (from memory, DOMAIN.md §4).
  'ansi-120-a': { region: 'ansi-120-a', nominalVolts: 120, hz: 60, lowVolts: 114, highVolts: 126, source: 'ANSI C84.1 Range A' },
  // ANSI C84.1 Range B 110–127 V (from memory, DOMAIN.md §4).
  'ansi-120-b': { region: 'ansi-120-b', nominalVolts: 120, hz: 60, lowVolts: 110, highVolts: 127, source: 'ANSI C84.1 Range B' },
  // IEC 60038 230 V; EN 50160: 95 % of 10-minute means within ±10 % (DOMAIN.md §4).
  'en-230': { region: 'en-230', nominalVolts: 230, hz: 50, lowVolts: 207, highVolts: 253, source: 'IEC 60038 / EN 50160 ±10 %' },
  // Japan 100 V ±10 % (BSI, World Electricity Supplies; DOMAIN.md §4).
  'jp-100-50': { region: 'jp-100-50', nominalVolts: 100, hz: 50, lowVolts: 90, highVolts: 110, source: 'Japan 100 V ±10 % (east, 50 Hz)' },
  'jp-100-60': { region: 'jp-100-60', nominalVolts: 100, hz: 60, lowVolts: 90, highVolts: 110, source: 'Japan 100 V ±10 % (west, 60 Hz)' },
};

/**
 * The mains band for a job: the named region, or a custom one (nominal volts and ± fraction),
 * or by default the common region of the spec's frequency (230 V at 50 Hz, 120 V Range A at 60 Hz).
 * @param hz  the supply's line frequency, for the default
 */
export function mainsBandFor(tol: ToleranceSettings | undefined, hz: number): MainsBand {
  const region = tol?.region ?? (hz === 60 ? 'ansi-120-a' : 'en-230');
  if (region === 'custom') {
    const nominal = tol?.mainsVolts ?? (hz === 60 ? 120 : 230);
    const f = tol?.lineFraction ?? 0.1;
    return { region, nominalVolts: nominal, hz, lowVolts: nominal * (1 - f), highVolts: nominal * (1 + f), source: `custom ±${Math.round(f * 100)} %` };
  }
  return MAINS_REGIONS[region];
}
