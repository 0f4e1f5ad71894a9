/**
 * Reads what people type from a meter display: "4,25", "4.25 V", "425mV", "1.2k", "OL", "O.L",
 * "-0,7", "470 µF", "470uF", "0.08 Ω". Decimal comma and point, SI prefixes, the meter's
 * overload "OL" (DOMAIN.md §9). Anything else gets a message saying what was not understood.
 */
import type { MeterValue } from './types';

export type MeterUnit = 'V' | 'Hz' | 'F' | 'Ω';

export type ParsedMeterText = { ok: true; value: MeterValue } | { ok: false; message: string };

/** SI prefixes a meter display or a person uses. "u" stands in for µ (common practice). */
const PREFIXES: Record<string, number> = {
  p: 1e-12,
  n: 1e-9,
  u: 1e-6,
  µ: 1e-6,
  μ: 1e-6,
  m: 1e-3,
  k: 1e3,
  K: 1e3,
  M: 1e6,
};

/** Unit spellings accepted for each unit. */
const UNIT_WORDS: Record<MeterUnit, string[]> = {
  V: ['v', 'volt', 'volts', 'vac', 'vdc'],
  Hz: ['hz'],
  F: ['f'],
  Ω: ['ω', 'Ω', 'ohm', 'ohms', 'r'],
};

const OVERLOAD = /^(o\.?\s*l\.?|overload|over)$/i;

/**
 * Parses one typed meter value.
 * @param text            what was typed
 * @param unit            the unit the field measures in
 * @param assumedPrefix   prefix for a bare number, e.g. "µ" for a capacitance field shown in µF
 *                        (default none: a bare number is in the base unit)
 * @returns the value in SI units (or "OL"), or a message naming what was not understood
 */
export function parseMeterText(text: string, unit: MeterUnit, assumedPrefix = ''): ParsedMeterText {
  const raw = text.trim();
  if (raw === '') return { ok: false, message: 'nothing entered' };
  if (OVERLOAD.test(raw)) return { ok: true, value: 'OL' };
  // Number: optional sign, digits with one decimal separator (comma or point), optional exponent.
  const m = /^([+\-−]?)\s*(\d+(?:[.,]\d*)?|[.,]\d+)(?:[eE]([+\-]?\d+))?\s*(.*)$/.exec(raw);
  if (!m) return { ok: false, message: `"${raw}" is not a number` };
  const [, sign, digits, exponent, restRaw] = m;
  const rest = (restRaw ?? '').trim();
  if (/\d[.,]\d{3}[.,]/.test(raw) || /[.,].*[.,]/.test(digits ?? '') || /^[.,]\d/.test(rest)) {
    return { ok: false, message: `"${raw}" has more than one decimal separator` };
  }
  let value = Number((digits ?? '').replace(',', '.'));
  if (exponent !== undefined) value *= 10 ** Number(exponent);
  if (sign === '-' || sign === '−') value = -value;
  const scale = unitScale(rest, unit, assumedPrefix);
  if (scale === null) {
    return { ok: false, message: `"${rest}" is not a unit for ${unitName(unit)} (try e.g. ${examples(unit)})` };
  }
  const result = value * scale;
  if (!Number.isFinite(result)) return { ok: false, message: `"${raw}" is out of range` };
  return { ok: true, value: result };
}

/** Multiplier for a unit suffix such as "mV", "k", "µF", "" (null when not understood). */
function unitScale(suffix: string, unit: MeterUnit, assumedPrefix: string): number | null {
  const s = suffix.replace(/\s+/g, '');
  if (s === '') return assumedPrefix === '' ? 1 : (PREFIXES[assumedPrefix] ?? 1);
  const words = UNIT_WORDS[unit];
  const lower = s.toLowerCase();
  // The unit alone ("V", "Hz", "Ω").
  if (words.includes(lower) || words.includes(s)) return 1;
  // A prefix alone ("k", "m", "u"): the unit is understood from the field.
  if (s.length === 1 && PREFIXES[s] !== undefined) return PREFIXES[s]!;
  // Prefix plus unit ("mV", "kHz", "µF", "kΩ", "mOhm").
  const first = s[0]!;
  const tail = s.slice(1);
  const prefix = PREFIXES[first];
  if (prefix !== undefined && (words.includes(tail.toLowerCase()) || words.includes(tail))) return prefix;
  return null;
}

function unitName(unit: MeterUnit): string {
  return unit === 'V' ? 'volts' : unit === 'Hz' ? 'hertz' : unit === 'F' ? 'farads' : 'ohms';
}

function examples(unit: MeterUnit): string {
  return unit === 'V' ? '"12.3 V" or "425 mV"' : unit === 'Hz' ? '"100 Hz"' : unit === 'F' ? '"470 µF" or "470u"' : '"0.08 Ω" or "80 mΩ"';
}
