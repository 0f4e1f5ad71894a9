/**
 * Writes the demo scenario (demo-jobs.ts) into the store: technicians, assets, jobs, readings
 * worked out by the engine in the worker, finishes. Times are set relative to now, so the open
 * jobs are today's.
 */
import { MAINS_REGIONS } from '../engine/diagnosis';
import type { MeterValue, ReadingBand, ReadingKind } from '../engine/diagnosis/types';
import type { SupplyResult, SupplySpecInput } from '../engine/types';
import type { Asset, Reading } from '../model/job';
import { putAsset, putTechnician } from '../store/assets';
import { putDraft } from '../store/drafts';
import { newId } from '../store/ids';
import { createJob, setJobFields } from '../store/jobs';
import { addReading } from '../store/readings';
import type { Database } from '../store/schema';
import { DEFAULT_SETTINGS } from '../store/settings';
import type { EngineClient } from '../ui/bridges/engine-bridge';
import { bandFor, verdictFor } from '../ui/readings';
import { buildSupply, DEFAULT_NAMEPLATE, type NameplateForm } from '../ui/screens/Supply/nameplate';
import { DEMO_JOBS, DEMO_TECHNICIANS, type DemoFault, type DemoJob, type DemoReading } from './demo-jobs';

const HOUR_MS = 3_600_000;
const MINUTE_MS = 60_000;

/** The supply with the job's real fault put in. */
export function faultedSpec(spec: SupplySpecInput, fault: DemoFault): SupplySpecInput {
  switch (fault.kind) {
    case 'healthy':
      return spec;
    case 'capacitor': {
      const scale = (c: { farads: number; esr?: number }) => ({ farads: c.farads * fault.faradsFactor, esr: fault.esrOhms ?? c.esr ?? 0 });
      const capacitor = spec.capacitor;
      if (capacitor === undefined) return spec;
      return { ...spec, capacitor: Array.isArray(capacitor) ? [scale(capacitor[0]), scale(capacitor[1])] : scale(capacitor) };
    }
    case 'diode-open':
      return { ...spec, diodeCondition: { [fault.label]: 'open' } };
    case 'overload':
      return { ...spec, load: 'amps' in spec.load ? { amps: spec.load.amps * fault.factor } : { ohms: spec.load.ohms / fault.factor } };
  }
}

/**
 * A value as a 6000-count meter shows it on auto-range (ranges 6, 60, 600, 6000: three, two,
 * one, no decimals), typed with a point or a comma.
 */
export function meterText(value: number, comma: boolean): string {
  const magnitude = Math.abs(value);
  const decimals = magnitude < 6 ? 3 : magnitude < 60 ? 2 : magnitude < 600 ? 1 : 0;
  const text = value.toFixed(decimals);
  return comma ? text.replace('.', ',') : text;
}

interface TakenReading {
  kind: ReadingKind;
  target?: string;
  value: MeterValue;
  text: string;
}

/** What the technician would read for each reading on the supply as it really was. */
function takeReadings(wanted: readonly DemoReading[], result: SupplyResult, mainsVolts: number, job: DemoJob, spec: SupplySpecInput): TakenReading[] {
  const comma = job.decimalComma === true;
  const out: TakenReading[] = [];
  for (const reading of wanted) {
    if (typeof reading === 'object') {
      const open = job.fault.kind === 'diode-open' && job.fault.label === reading.diode;
      // Diode test on a good silicon junction about 0.55 V at the meter's milliamp (DOMAIN.md §3).
      out.push({ kind: 'diodeForward', target: reading.diode, value: open ? 'OL' : 0.552, text: open ? 'OL' : meterText(0.552, comma) });
      out.push({ kind: 'diodeReverse', target: reading.diode, value: 'OL', text: 'OL' });
      continue;
    }
    if (reading === 'capacitance') {
      const cap = Array.isArray(spec.capacitor) ? spec.capacitor[0] : spec.capacitor;
      if (cap === undefined) continue;
      const factor = job.fault.kind === 'capacitor' ? job.fault.faradsFactor : 1;
      const microfarads = Math.round(cap.farads * factor * 1e6);
      out.push({ kind: 'capacitance', target: 'C1', value: microfarads / 1e6, text: String(microfarads) });
      continue;
    }
    const value =
      reading === 'mainsAc' ? mainsVolts
        : reading === 'acSecondary' ? result.secondaryRms
          : reading === 'dcOut' ? result.dc
            : reading === 'rippleAc' ? result.rippleRms
              : reading === 'rippleHz' ? result.rippleHz
                : result.regulator?.dc;
    if (value === undefined) continue;
    const text = meterText(value, comma);
    out.push({ kind: reading, value: Number(text.replace(',', '.')), text });
  }
  return out;
}

function toReading(taken: TakenReading, jobId: string, at: number, phase: Reading['phase'], bands: readonly ReadingBand[]): Reading {
  const band = bandFor(bands, taken.kind, taken.target);
  return {
    id: newId(),
    jobId,
    kind: taken.kind,
    ...(taken.target === undefined ? {} : { target: taken.target }),
    value: taken.value,
    text: taken.text,
    takenAt: new Date(at).toISOString(),
    phase,
    ...(band === undefined ? {} : { expectedLow: band.low, expectedHigh: band.high, verdict: verdictFor(taken.value, band) }),
  };
}

/**
 * Writes the demo into the store.
 * @param now  the moment the demo is made (ms since 1970), default now
 * @returns the first technician's id (made the device's technician) and the number of jobs
 * @throws when the engine or the store fails (nothing is rolled back: the demo is only a demo)
 */
export async function seedDemo(db: Database, engine: EngineClient, now = Date.now()): Promise<{ technicianId: string; jobs: number }> {
  const technicianIds = new Map<string, string>();
  for (const name of DEMO_TECHNICIANS) {
    const id = newId();
    technicianIds.set(name, id);
    await putTechnician(db, { id, name });
  }
  const assets = new Map<string, Asset>();
  // Oldest first, so a unit's earlier visit is on file before its later one.
  const jobs = [...DEMO_JOBS].sort((a, b) => b.startedHoursAgo - a.startedHoursAgo);
  for (const demo of jobs) {
    let asset = assets.get(demo.asset.key);
    if (asset === undefined) {
      const { key: _key, ...fields } = demo.asset;
      asset = { id: newId(), ...fields, customer: demo.customer, site: demo.site };
      assets.set(demo.asset.key, asset);
      await putAsset(db, asset);
    }
    const form: NameplateForm = { ...DEFAULT_NAMEPLATE, region: DEFAULT_SETTINGS.region, ...demo.nameplate };
    const built = buildSupply(form);
    if ('problems' in built) throw new Error(`demo supply for ${demo.customer}: ${JSON.stringify(built.problems)}`);
    const meter = DEFAULT_SETTINGS.meter;
    const { diagnosis } = await engine.diagnose({ spec: built.spec, meter, tolerances: { region: form.region } }, {});
    const mains = MAINS_REGIONS[form.region];
    const startedAt = now - demo.startedHoursAgo * HOUR_MS;
    const job = await createJob(
      db,
      {
        customer: demo.customer,
        site: demo.site,
        technicianId: technicianIds.get(demo.technician)!,
        complaint: demo.complaint,
        assetId: asset.id,
        meter,
        supply: built.spec,
        nameplate: built.nameplate,
      },
      new Date(startedAt).toISOString(),
    );
    await putDraft(db, `${job.id}:supply`, form as unknown as Record<string, string>);
    const before = takeReadings(demo.readings, await engine.expect(faultedSpec(built.spec, demo.fault)), mains.nominalVolts * 1.01, demo, built.spec);
    let at = startedAt + 4 * MINUTE_MS;
    for (const taken of before) {
      await addReading(db, toReading(taken, job.id, at, 'before', diagnosis.bands));
      at += 3 * MINUTE_MS;
    }
    if (demo.finish === undefined) {
      if (before.length > 0) await putDraft(db, `${job.id}:progress`, { safetyCheckedAt: new Date(startedAt + 2 * MINUTE_MS).toISOString() });
      continue;
    }
    const { after: afterKinds, ...finish } = demo.finish;
    // After the repair the supply is as it should be.
    const after = takeReadings(afterKinds, await engine.expect(built.spec), mains.nominalVolts * 1.01, { ...demo, fault: { kind: 'healthy' } }, built.spec);
    at = Math.max(at, startedAt + (demo.minutes - 5) * MINUTE_MS);
    for (const taken of after) {
      await addReading(db, toReading(taken, job.id, at, 'after', diagnosis.bands));
      at += MINUTE_MS;
    }
    await setJobFields(db, job.id, { finish, status: 'finished' }, new Date(startedAt + demo.minutes * MINUTE_MS).toISOString());
  }
  return { technicianId: technicianIds.get(DEMO_TECHNICIANS[0])!, jobs: jobs.length };
}
