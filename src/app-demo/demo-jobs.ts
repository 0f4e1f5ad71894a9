/**
 * The "Try with demo data" scenario: a few days at an invented repair shop, Tallow Lane Repairs
 * (the shop of the exchange demo too). Every person, customer, site, make, model and serial
 * here is made up. Readings are not typed in here: the seed works them out with the engine from
 * the fault each job really had, so they agree with the diagnosis.
 */
import type { DiodeLabel } from '../engine/types';
import type { JobFinish } from '../model/job';
import type { NameplateForm } from '../ui/screens/Supply/nameplate';

export const DEMO_SHOP = 'Tallow Lane Repairs';

export const DEMO_TECHNICIANS = ['Ada Quill', 'Tomas Brenner', 'Inès Marlow'] as const;

/** What was really wrong, put into the supply to work out the readings. */
export type DemoFault =
  | { kind: 'healthy' }
  | { kind: 'capacitor'; faradsFactor: number; esrOhms?: number }
  | { kind: 'diode-open'; label: DiodeLabel }
  | { kind: 'overload'; factor: number };

export type DemoReading =
  | 'mainsAc'
  | 'acSecondary'
  | 'dcOut'
  | 'rippleAc'
  | 'rippleHz'
  | 'regulatorOut'
  | { diode: DiodeLabel }
  | 'capacitance';

export interface DemoJob {
  technician: (typeof DEMO_TECHNICIANS)[number];
  customer: string;
  site: string;
  asset: { key: string; kind: string; make: string; model: string; serial: string; tag?: string };
  complaint: string;
  /** Hours before now the job started (fractions for today's). */
  startedHoursAgo: number;
  /** Minutes on site. */
  minutes: number;
  nameplate: Partial<NameplateForm>;
  fault: DemoFault;
  /** Readings taken, in order. */
  readings: DemoReading[];
  /** Present for finished jobs. */
  finish?: JobFinish & { after: DemoReading[] };
  /** Types a decimal comma. */
  decimalComma?: boolean;
}

export const DEMO_JOBS: readonly DemoJob[] = [
  {
    technician: 'Ada Quill',
    customer: 'Foxmere Laundrette',
    site: 'Unit 4, Marshcote Yard',
    asset: { key: 'washer-7', kind: 'washing machine', make: 'Ostrel', model: 'WM-612', serial: 'OS612-40917', tag: 'M7' },
    complaint: 'Resets mid-cycle, worse in the afternoon',
    startedHoursAgo: 24 * 92 + 3,
    minutes: 50,
    nameplate: { topology: 'bridge', secondaryVolts: '12', transformerVa: '6', capacitorMicrofarads: '1000', capacitorVoltRating: '25', regulatorKind: 'linear', regulatorVolts: '5', loadText: '0.25 A' },
    fault: { kind: 'capacitor', faradsFactor: 0.22 },
    readings: ['acSecondary', 'dcOut', 'rippleAc', 'rippleHz', 'regulatorOut', 'capacitance'],
    finish: {
      suspectedPart: 'C1',
      faultFound: 'capacitor-low',
      actionTaken: 'Replaced C1; board ran three full cycles without a reset.',
      partsUsed: ['1000 µF 25 V electrolytic, 105 °C'],
      outcome: 'fixed',
      notes: 'C1 top slightly domed. Machine M7 of 9 in the shop.',
      after: ['dcOut', 'rippleAc', 'regulatorOut'],
    },
  },
  {
    technician: 'Tomas Brenner',
    customer: 'Greywick Care Home',
    site: 'Plant room',
    asset: { key: 'boiler-2', kind: 'boiler', make: 'Hestwick', model: 'BX-24', serial: 'HW24-0081193' },
    complaint: 'Relays chatter, display dim',
    startedHoursAgo: 24 * 6 + 5,
    minutes: 75,
    nameplate: { topology: 'center-tap', secondaryVolts: '9', transformerVa: '10', capacitorMicrofarads: '2200', capacitorVoltRating: '16', regulatorKind: 'linear', regulatorVolts: '5', loadText: '0.4 A' },
    fault: { kind: 'diode-open', label: 'D2' },
    readings: ['mainsAc', 'acSecondary', 'dcOut', 'rippleAc', 'rippleHz', { diode: 'D2' }],
    decimalComma: true,
    finish: {
      suspectedPart: 'D2',
      faultFound: 'diode-open',
      actionTaken: 'D2 read OL both ways out of circuit. Replaced D1 and D2 as a pair.',
      partsUsed: ['silicon diode 1 A 1000 V', 'silicon diode 1 A 1000 V'],
      outcome: 'fixed',
      notes: 'Ripple was at 50 Hz, not 100 Hz: half the rectifier missing.',
      after: ['dcOut', 'rippleAc', 'rippleHz'],
    },
  },
  {
    technician: 'Inès Marlow',
    customer: 'Sallowbridge Dental Practice',
    site: 'Back office, ceiling void',
    asset: { key: 'ahu-1', kind: 'air handler', make: 'Tamberlin', model: 'AH-40', serial: 'TMB-AH40-5521', tag: 'AHU-1' },
    complaint: 'Trips out after ten minutes, board runs hot',
    startedHoursAgo: 24 * 13 + 2,
    minutes: 95,
    nameplate: { topology: 'bridge', secondaryVolts: '24', transformerVa: '40', capacitorMicrofarads: '470', capacitorVoltRating: '50', loadText: '0.2 A' },
    fault: { kind: 'overload', factor: 3.5 },
    readings: ['mainsAc', 'acSecondary', 'dcOut', 'rippleAc', 'rippleHz'],
    decimalComma: true,
    finish: {
      suspectedPart: 'relay coil or damper actuator',
      faultFound: 'overload',
      actionTaken: 'Supply itself fine off load. Damper actuator draws far too much; isolated it.',
      partsUsed: [],
      outcome: 'referred',
      notes: 'Referred to the controls contractor for a new actuator.',
      after: ['dcOut', 'rippleAc'],
    },
  },
  {
    technician: 'Ada Quill',
    customer: 'Kettlemere Café',
    site: 'Kitchen',
    asset: { key: 'dryer-1', kind: 'tumble dryer', make: 'Vessmark', model: 'TD-90', serial: 'VM90-33710' },
    complaint: 'Stopped once last week, fine since',
    startedHoursAgo: 22,
    minutes: 35,
    nameplate: { topology: 'bridge', transformer: 'none', windingOhms: '6', capacitorMicrofarads: '47', capacitorVoltRating: '400', loadText: '0.12 A' },
    fault: { kind: 'healthy' },
    readings: ['mainsAc', 'dcOut', 'rippleAc'],
    finish: {
      suspectedPart: '',
      faultFound: 'healthy',
      actionTaken: 'Supply healthy. Door switch contacts cleaned.',
      partsUsed: [],
      outcome: 'no-fault-found',
      notes: 'Asked the café to call if it stops again.',
      after: [],
    },
  },
  {
    technician: 'Ada Quill',
    customer: 'Foxmere Laundrette',
    site: 'Unit 4, Marshcote Yard',
    asset: { key: 'washer-7', kind: 'washing machine', make: 'Ostrel', model: 'WM-612', serial: 'OS612-40917', tag: 'M7' },
    complaint: 'Display flickers, resets again',
    startedHoursAgo: 0.7,
    minutes: 0,
    nameplate: { topology: 'bridge', secondaryVolts: '12', transformerVa: '6', capacitorMicrofarads: '1000', capacitorVoltRating: '25', regulatorKind: 'linear', regulatorVolts: '5', loadText: '0.25 A' },
    fault: { kind: 'capacitor', faradsFactor: 0.9, esrOhms: 2.5 },
    readings: ['acSecondary', 'dcOut'],
  },
  {
    technician: 'Tomas Brenner',
    customer: 'Penwhistle Bakery',
    site: 'Shop floor',
    asset: { key: 'fridge-3', kind: 'fridge-freezer', make: 'Polvane', model: 'FZ-300', serial: 'PV300-771204' },
    complaint: 'Display dead, compressor runs',
    startedHoursAgo: 0.2,
    minutes: 0,
    nameplate: { topology: 'half-wave', secondaryVolts: '12', transformerVa: '2', capacitorMicrofarads: '470', capacitorVoltRating: '25', regulatorKind: 'zener', regulatorVolts: '5.1', seriesOhms: '68', loadText: '60 mA' },
    fault: { kind: 'capacitor', faradsFactor: 0.02 },
    readings: [],
    decimalComma: true,
  },
];
