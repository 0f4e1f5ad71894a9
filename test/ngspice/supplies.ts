/**
 * The reference supplies: an invented but ordinary mix of what a field technician meets, used by
 * the ngspice cross-check (test/engine/ngspice.test.ts) and the benchmark (bench/). Written as
 * the JSON a caller sends (`SupplySpecInput`) and normalised with the engine's `parseSupplySpec`.
 *
 * Coverage: every topology, filtered and unfiltered, resistive and constant-current loads,
 * nonzero ESR and winding resistance, 50 and 60 Hz, mains front ends and 9–24 V secondaries,
 * silicon / schottky / ideal presets and explicit Shockley and piecewise-linear diodes, a linear
 * regulator (held and in dropout), a zener shunt, an open and a shorted bridge diode, and a diode
 * temperature other than 25 °C.
 */
import { parseSupplySpec } from '../../src/engine/spec';
import type { SupplySpec, SupplySpecInput } from '../../src/engine/types';

export interface ReferenceSupply {
  /** Short kebab-case name, used in test names and bench rows. */
  name: string;
  /** What it stands for, in words. */
  description: string;
  input: SupplySpecInput;
}

export const REFERENCE_SUPPLIES: readonly ReferenceSupply[] = [
  {
    name: 'hw-9v-unfiltered',
    description: 'half-wave, 9 V 60 Hz secondary, no capacitor, 47 Ω',
    input: {
      topology: 'half-wave',
      source: { vrms: 9, hz: 60, ohms: 0.8 },
      diode: { preset: 'silicon' },
      load: { ohms: 47 },
    },
  },
  {
    name: 'hw-12v-cap',
    description: 'half-wave, 12 V 50 Hz, 2200 µF, 150 Ω',
    input: {
      topology: 'half-wave',
      source: { vrms: 12, hz: 50, ohms: 1.2 },
      diode: { preset: 'silicon' },
      capacitor: { farads: 2200e-6, esr: 0.06 },
      load: { ohms: 150 },
    },
  },
  {
    name: 'hw-24v-pwl-cc',
    description: 'half-wave, 24 V 60 Hz, piecewise-linear 0.7 V diode, 1000 µF, 0.2 A constant current',
    input: {
      topology: 'half-wave',
      source: { vrms: 24, hz: 60, ohms: 0.5 },
      diode: { vf: 0.7, ohms: 0.05 },
      capacitor: { farads: 1000e-6, esr: 0.08 },
      load: { amps: 0.2 },
    },
  },
  {
    name: 'ct-12v-unfiltered-schottky',
    description: 'centre-tapped 2 × 12 V 60 Hz, schottky, no capacitor, 22 Ω',
    input: {
      topology: 'center-tap',
      source: { vrms: 12, hz: 60, ohms: 0.3 },
      diode: { preset: 'schottky' },
      load: { ohms: 22 },
    },
  },
  {
    name: 'ct-15v-cap-cc',
    description: 'centre-tapped 2 × 15 V 50 Hz, 4700 µF, 1 A constant current',
    input: {
      topology: 'center-tap',
      source: { vrms: 15, hz: 50, ohms: 0.4 },
      diode: { preset: 'silicon' },
      capacitor: { farads: 4700e-6, esr: 0.03 },
      load: { amps: 1 },
    },
  },
  {
    name: 'bridge-24v-unfiltered',
    description: 'bridge, 24 V 60 Hz control transformer, no capacitor, 120 Ω',
    input: {
      topology: 'bridge',
      source: { vrms: 24, hz: 60, ohms: 0.6 },
      diode: { preset: 'silicon' },
      load: { ohms: 120 },
    },
  },
  {
    name: 'bridge-18v-cap',
    description: 'bridge, 18 V 50 Hz, 3300 µF, 33 Ω',
    input: {
      topology: 'bridge',
      source: { vrms: 18, hz: 50, ohms: 0.5 },
      diode: { preset: 'silicon' },
      capacitor: { farads: 3300e-6, esr: 0.04 },
      load: { ohms: 33 },
    },
  },
  {
    name: 'bridge-12v-schottky-cc',
    description: 'bridge, 12 V 60 Hz, schottky, 2200 µF, 0.8 A constant current',
    input: {
      topology: 'bridge',
      source: { vrms: 12, hz: 60, ohms: 0.25 },
      diode: { preset: 'schottky' },
      capacitor: { farads: 2200e-6, esr: 0.1 },
      load: { amps: 0.8 },
    },
  },
  {
    name: 'bridge-12v-ideal-cap',
    description: 'bridge, 12 V 50 Hz, ideal diodes, 2200 µF, 47 Ω',
    input: {
      topology: 'bridge',
      source: { vrms: 12, hz: 50, ohms: 0.5 },
      diode: { preset: 'ideal' },
      capacitor: { farads: 2200e-6, esr: 0.05 },
      load: { ohms: 47 },
    },
  },
  {
    name: 'bridge-230v-offline',
    description: 'off-line front end: bridge on 230 V 50 Hz mains, 150 µF bulk capacitor, 0.3 A (about 90 W)',
    input: {
      topology: 'bridge',
      // Winding resistance here stands for the inrush limiter plus line impedance.
      source: { vrms: 230, hz: 50, ohms: 5 },
      diode: { preset: 'silicon' },
      capacitor: { farads: 150e-6, esr: 0.6 },
      load: { amps: 0.3 },
    },
  },
  {
    name: 'doubler-120v-offline',
    description: 'off-line front end on 120 V 60 Hz, doubler, 2 × 470 µF, 0.25 A',
    input: {
      topology: 'doubler',
      source: { vrms: 120, hz: 60, ohms: 2 },
      diode: { preset: 'silicon' },
      capacitor: { farads: 470e-6, esr: 0.3 },
      load: { amps: 0.25 },
    },
  },
  {
    name: 'doubler-9v-schottky',
    description: 'doubler, 9 V 50 Hz, schottky, 1000 µF + 1000 µF of different ESR, 330 Ω',
    input: {
      topology: 'doubler',
      source: { vrms: 9, hz: 50, ohms: 0.6 },
      diode: { preset: 'schottky' },
      capacitor: [
        { farads: 1000e-6, esr: 0.05 },
        { farads: 1000e-6, esr: 0.09 },
      ],
      load: { ohms: 330 },
    },
  },
  {
    name: 'bridge-12v-linear-5v',
    description: 'bridge, 12 V 50 Hz, 2200 µF, 5 V linear regulator (2 V dropout, 5 mA quiescent), 10 Ω',
    input: {
      topology: 'bridge',
      source: { vrms: 12, hz: 50, ohms: 0.5 },
      diode: { preset: 'silicon' },
      capacitor: { farads: 2200e-6, esr: 0.05 },
      load: { ohms: 10 },
      regulator: { volts: 5, dropout: 2, quiescentAmps: 0.005 },
    },
  },
  {
    name: 'bridge-9v-linear-dropout',
    description: 'bridge, 9 V 60 Hz, 1000 µF, 6 V linear regulator dropping out at the valleys, 0.4 A',
    input: {
      topology: 'bridge',
      source: { vrms: 9, hz: 60, ohms: 0.8 },
      diode: { preset: 'silicon' },
      capacitor: { farads: 1000e-6, esr: 0.1 },
      load: { amps: 0.4 },
      regulator: { volts: 6, dropout: 2, quiescentAmps: 0.004 },
    },
  },
  {
    name: 'ct-12v-zener',
    description: 'centre-tapped 2 × 12 V 60 Hz, 470 µF, 9.1 V zener shunt with 47 Ω, 680 Ω',
    input: {
      topology: 'center-tap',
      source: { vrms: 12, hz: 60, ohms: 0.5 },
      diode: { preset: 'silicon' },
      capacitor: { farads: 470e-6, esr: 0.2 },
      load: { ohms: 680 },
      regulator: { zenerVolts: 9.1, seriesOhms: 47, zenerOhms: 5 },
    },
  },
  {
    name: 'bridge-24v-d3-open',
    description: 'bridge, 24 V 60 Hz, 2200 µF, 47 Ω, D3 open',
    input: {
      topology: 'bridge',
      source: { vrms: 24, hz: 60, ohms: 0.6 },
      diode: { preset: 'silicon' },
      capacitor: { farads: 2200e-6, esr: 0.05 },
      load: { ohms: 47 },
      diodeCondition: { D3: 'open' },
    },
  },
  {
    name: 'bridge-15v-d1-short',
    description: 'bridge, 15 V 50 Hz, 1000 µF, 100 Ω, D1 shorted (winding current limited by its 3 Ω)',
    input: {
      topology: 'bridge',
      source: { vrms: 15, hz: 50, ohms: 3 },
      diode: { preset: 'silicon' },
      capacitor: { farads: 1000e-6, esr: 0.1 },
      load: { ohms: 100 },
      diodeCondition: { D1: 'short' },
    },
  },
  {
    name: 'bridge-20v-shockley-60c',
    description: 'bridge, 20 V 50 Hz, explicit Shockley diode at 60 °C, 1000 µF, 0.5 A constant current',
    input: {
      topology: 'bridge',
      source: { vrms: 20, hz: 50, ohms: 1 },
      diode: { is: 5e-9, n: 1.8, ohms: 0.05 },
      capacitor: { farads: 1000e-6, esr: 0.07 },
      load: { amps: 0.5 },
      temperatureC: 60,
    },
  },
];

/**
 * The reference supplies normalised by the engine's parser.
 * @returns name, description and `SupplySpec` of each, in list order.
 * @throws SpecError if a supply above stops being valid input.
 */
export function referenceSupplySpecs(): { name: string; description: string; spec: SupplySpec }[] {
  return REFERENCE_SUPPLIES.map(({ name, description, input }) => ({
    name,
    description,
    spec: parseSupplySpec(input),
  }));
}
