import { describe, expect, it } from 'vitest';
import { expectReadings } from '../../src/engine';
import { judge, parseMeterText } from '../../src/engine/diagnosis';
import { READING_UNITS } from '../../src/exchange/csv';
import { demoJobFile, generateDemo, DEMO_SHOP_NAME } from '../../src/exchange/demo';
import { readJobFile } from '../../src/exchange/parse';
import { joinParts } from '../../src/exchange/write';
import { assetReadingSeries, buildReviewIndex, filterJobs, timeOnJobByTechnician } from '../../src/exchange/review';
import { demoPayload } from './fixtures';

const shop = demoPayload(600, 5);

describe('the demo shop', () => {
  it('gives the same file for the same options and another for another seed', async () => {
    const a = joinParts(await demoJobFile({ jobs: 25, seed: 42 }));
    expect(joinParts(await demoJobFile({ jobs: 25, seed: 42 }))).toEqual(a);
    expect(joinParts(await demoJobFile({ jobs: 25, seed: 43 }))).not.toEqual(a);
    const read = await readJobFile(a, 'demo.json');
    expect(read.ok).toBe(true);
    if (read.ok) {
      expect(read.file.payload.jobs).toHaveLength(25);
      expect(read.file.exportedBy.name).toContain(DEMO_SHOP_NAME);
    }
  });

  it('refuses a job count outside 1 to 1 000 000', () => {
    for (const jobs of [0, -3, 1.5, 1_000_001]) expect(() => generateDemo({ jobs, seed: 1 })).toThrow(RangeError);
  });

  it('has the hard text cases even in a small demo', () => {
    const payload = generateDemo({ jobs: 12, seed: 9 });
    const texts = [
      ...payload.jobs.flatMap((j) => [j.complaint, j.customer, j.site, j.finish?.notes ?? '', j.finish?.actionTaken ?? '']),
      ...payload.readings.flatMap((r) => [r.text, r.note ?? '']),
    ];
    for (const start of ['=', '+', '-', '@', '\t', '\r']) expect(texts.some((t) => t.startsWith(start)), `starts with ${JSON.stringify(start)}`).toBe(true);
    for (const inside of ['"', ',', '\n', 'ö', 'é', 'µ', 'Ω', '😕']) expect(texts.some((t) => t.includes(inside)), `contains ${JSON.stringify(inside)}`).toBe(true);
  });

  it('types what the diagnosis’s meter-text parser reads back as the stored value', () => {
    for (const r of shop.readings) {
      const parsed = parseMeterText(r.text, READING_UNITS[r.kind]);
      expect(parsed.ok, r.text).toBe(true);
      if (parsed.ok && parsed.value !== 'OL' && r.value !== 'OL') expect(parsed.value).toBeCloseTo(r.value, 12);
      else if (parsed.ok) expect(parsed.value).toBe(r.value);
    }
  });

  it('gives each reading the verdict its stored band implies', () => {
    for (const r of shop.readings) {
      if (r.expectedLow === undefined || r.expectedHigh === undefined || r.verdict === undefined) continue;
      expect(judge(r.value, { kind: r.kind, unit: READING_UNITS[r.kind], nominal: 0, low: r.expectedLow, high: r.expectedHigh }), r.id).toBe(r.verdict);
    }
  });

  it('reads the engine’s healthy figures after a repair, within meter noise', () => {
    const jobs = new Map(shop.jobs.map((j) => [j.id, j]));
    let checked = 0;
    for (const r of shop.readings) {
      if (r.phase !== 'after' || r.kind !== 'dcOut' || typeof r.value !== 'number') continue;
      const expected = expectReadings(jobs.get(r.jobId)!.supply).dc;
      // Noise is 0.3 % (1σ); 2 % is over six sigma plus the display's last digit.
      expect(Math.abs(r.value - expected) / expected).toBeLessThan(0.02);
      checked += 1;
    }
    expect(checked).toBeGreaterThan(100);
  });

  it('shows an open diode in a full-wave supply as ripple at the line frequency (DOMAIN.md §7), from the engine', () => {
    // The table is for full-wave supplies (bridge, centre-tap); a doubler with a diode open gives no DC at all.
    const fullWave = (j: (typeof shop.jobs)[number]) => j.supply?.topology === 'bridge' || j.supply?.topology === 'center-tap';
    const openDiodeJobs = new Set(shop.jobs.filter((j) => j.finish?.faultFound === 'diode-open' && fullWave(j)).map((j) => j.id));
    const hz = shop.readings.filter((r) => openDiodeJobs.has(r.jobId) && r.kind === 'rippleHz' && r.phase === 'before').map((r) => r.value);
    expect(hz.length).toBeGreaterThan(5);
    for (const value of hz) expect(value).toBeCloseTo(50, 0);
  });

  it('has one technician much slower than the others', () => {
    const index = buildReviewIndex(shop);
    const times = timeOnJobByTechnician(index, filterJobs(index, {}));
    const byName = new Map(shop.technicians.map((t) => [t.name, times.get(t.id)!.medianMinutes]));
    const slow = byName.get('Tomas Brenner')!;
    for (const [name, minutes] of byName) if (name !== 'Tomas Brenner') expect(slow).toBeGreaterThan(1.3 * minutes);
  });

  it('has assets whose ripple creeps up over visits until the capacitor is replaced', () => {
    const ageing = shop.assets.filter((asset) => {
      const series = assetReadingSeries(shop, asset.id, 'rippleAc').map((p) => p.value as number);
      let run = 1;
      for (let i = 1; i < series.length; i++) {
        run = series[i]! > series[i - 1]! ? run + 1 : 1;
        if (run >= 3) return true;
      }
      return false;
    });
    expect(ageing.length).toBeGreaterThan(3);
  });

  it('has repeat visits after a first visit that did not fix the fault', () => {
    const repeats = shop.jobs.filter((job) => {
      if (job.finish?.outcome !== 'not-fixed') return false;
      return shop.jobs.some((later) => later.assetId === job.assetId && later.createdAt > job.createdAt && later.finish?.outcome === 'fixed');
    });
    expect(repeats.length).toBeGreaterThan(3);
  });
});
