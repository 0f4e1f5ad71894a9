import type { MeterValue, ReadingBand } from '../engine/diagnosis/types';
import type { UnitSettings } from '../store/settings';

export type DisplayUnit = 'V' | 'A' | 'Hz' | 'W';
export type MeterUnit = ReadingBand['unit'];

/**
 * A reading as a meter would show it: three significant figures, with a milli prefix below one
 * volt, amp or watt (frequencies keep their unit). Returns "—" for a value that is not finite.
 */
export function formatQuantity(value: number, unit: DisplayUnit, decimal: UnitSettings['decimal'] = 'point'): string {
  if (!Number.isFinite(value)) return '—';
  const magnitude = Math.abs(value);
  if (unit !== 'Hz' && magnitude > 0 && magnitude < 1) return withMark(`${toThreeFigures(value * 1000)} m${unit}`, decimal);
  return withMark(`${toThreeFigures(value)} ${unit}`, decimal);
}

function toThreeFigures(value: number): string {
  // toPrecision switches to exponent form at 1000 and above; a whole number reads better there.
  return Math.abs(value) >= 1000 ? value.toFixed(0) : value.toPrecision(3);
}

function withMark(text: string, decimal: UnitSettings['decimal']): string {
  return decimal === 'comma' ? text.replace('.', ',') : text;
}

/**
 * A meter value in SI units as a technician reads it: "14.8 V", "412 mV", "2200 µF", "470 nF",
 * "80 mΩ", "100 Hz", "OL". Capacitance takes µF from 1 µF up, nF below.
 */
export function formatMeterValue(value: MeterValue, unit: MeterUnit, decimal: UnitSettings['decimal'] = 'point'): string {
  if (value === 'OL') return 'OL';
  if (!Number.isFinite(value)) return '—';
  const magnitude = Math.abs(value);
  switch (unit) {
    case 'V':
      return magnitude > 0 && magnitude < 1 ? withMark(`${toThreeFigures(value * 1e3)} mV`, decimal) : withMark(`${toThreeFigures(value)} V`, decimal);
    case 'Hz':
      return withMark(`${magnitude >= 10 ? value.toFixed(0) : value.toPrecision(2)} Hz`, decimal);
    case 'F':
      return magnitude >= 1e-6 || magnitude === 0
        ? withMark(`${toThreeFigures(value * 1e6)} µF`, decimal)
        : withMark(`${toThreeFigures(value * 1e9)} nF`, decimal);
    case 'Ω':
      if (magnitude > 0 && magnitude < 1) return withMark(`${toThreeFigures(value * 1e3)} mΩ`, decimal);
      if (magnitude >= 1e3) return withMark(`${toThreeFigures(value / 1e3)} kΩ`, decimal);
      return withMark(`${toThreeFigures(value)} Ω`, decimal);
  }
}

/** The expected band in words: "14.2 – 15.6 V", or "OL" where a good part reads overload. */
export function formatBand(band: ReadingBand, decimal: UnitSettings['decimal'] = 'point'): string {
  if (band.expectOverload) return 'OL (overload)';
  return `${formatMeterValue(band.low, band.unit, decimal)} – ${formatMeterValue(band.high, band.unit, decimal)}`;
}

/** A date-time for lists: "09:42" today, "3 Mar 09:42" this year, "3 Mar 2025" before. */
export function formatWhen(iso: string, now: Date = new Date()): string {
  const at = new Date(iso);
  const time = at.toLocaleTimeString('en-GB', { hour: '2-digit', minute: '2-digit' });
  if (at.toDateString() === now.toDateString()) return time;
  const day = at.toLocaleDateString('en-GB', { day: 'numeric', month: 'short' });
  if (at.getFullYear() === now.getFullYear()) return `${day} ${time}`;
  return at.toLocaleDateString('en-GB', { day: 'numeric', month: 'short', year: 'numeric' });
}
