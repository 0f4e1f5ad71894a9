// @vitest-environment happy-dom
import { cleanup, fireEvent, render, screen, waitFor, within } from '@testing-library/preact';
import { h } from 'preact';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import type { JobPayload } from '../../src/exchange/format';
import { importJobFiles } from '../../src/exchange/import';
import { readJobFile } from '../../src/exchange/parse';
import { writeJobFile } from '../../src/exchange/write';
import { idbImportStore, loadExchangePayload } from '../../src/store/exchange';
import type { Database } from '../../src/store/schema';
import { App } from '../../src/ui/App';
import { faultWords } from '../../src/ui/screens/Review/words';
import { smallPayload, T3 } from '../exchange/fixtures';
import { freshDb, inProcessEngine } from './helpers';

const charts: { type: string; data: { labels?: unknown[]; datasets: { label: string; data: unknown[] }[] } }[] = [];
vi.mock('chart.js', () => {
  class Chart {
    static register() {}
    constructor(_canvas: unknown, config: (typeof charts)[number]) {
      charts.push(config);
    }
    destroy() {}
  }
  const part = {};
  return { Chart, BarController: part, BarElement: part, CategoryScale: part, LinearScale: part, LineController: part, LineElement: part, PointElement: part, Legend: part, Tooltip: part };
});

let db: Database;
const engine = inProcessEngine();
const copy = <T>(value: T): T => JSON.parse(JSON.stringify(value)) as T;

beforeEach(async () => {
  db = await freshDb();
  charts.length = 0;
});

afterEach(() => {
  cleanup();
  db.close();
  vi.restoreAllMocks();
  delete (navigator as { canShare?: unknown }).canShare;
  delete (navigator as { share?: unknown }).share;
});

function renderApp(hash: string) {
  location.hash = hash;
  const open = () => Promise.resolve(db);
  return render(h(App, { open, engine }));
}

async function seed(payload: JobPayload = smallPayload()) {
  const text = await writeJobFile(payload, { exportedAt: T3, exportedBy: { device: 'test' } });
  await importJobFiles([{ name: 'seed.json', content: text }], idbImportStore(db), { storeAt: T3 });
}

/** Catches what the download path hands to <a download>: name and blob. */
function catchDownloads() {
  const blobs = new Map<string, Blob>();
  const saved: { name: string; blob: Blob }[] = [];
  let n = 0;
  vi.spyOn(URL, 'createObjectURL').mockImplementation((blob) => {
    const url = `blob:test/${++n}`;
    blobs.set(url, blob as Blob);
    return url;
  });
  vi.spyOn(URL, 'revokeObjectURL').mockImplementation(() => undefined);
  vi.spyOn(HTMLAnchorElement.prototype, 'click').mockImplementation(function (this: HTMLAnchorElement) {
    saved.push({ name: this.download, blob: blobs.get(this.href)! });
  });
  return saved;
}

function pick(input: HTMLElement, files: File[]) {
  Object.defineProperty(input, 'files', { value: files, configurable: true });
  fireEvent.change(input);
}

describe('the job files screen: sending', () => {
  it('downloads every job as a job file that reads back with its digest, and as CSV when asked', async () => {
    await seed();
    const saved = catchDownloads();
    renderApp('#/files');
    fireEvent.click(await screen.findByLabelText(/Spreadsheet of the readings/));
    fireEvent.click(screen.getByRole('button', { name: 'Send or save' }));
    await screen.findByText(/^Downloaded .*\.json and .*\.csv \(3 jobs, 8 readings\)/);
    expect(saved.map((file) => file.name.replace(/\d{4}-\d\d-\d\d/, 'DATE'))).toEqual(['ripplewright-jobs-DATE.json', 'ripplewright-jobs-DATE.csv']);
    const read = await readJobFile(new Uint8Array(await saved[0]!.blob.arrayBuffer()), 'back.json');
    if (!read.ok) throw new Error('the exported file should read back');
    expect(read.file.payload.jobs.map((job) => job.id).sort()).toEqual(['job-a', 'job-b', 'job-c']);
    expect(read.file.payload.readings.some((reading) => 'assetId' in reading)).toBe(false);
    expect(screen.getByText(new RegExp(`SHA-256\\): ${read.file.sha256.slice(0, 16)}`))).toBeTruthy();
    const csv = await saved[1]!.blob.text();
    expect(csv.split('\r\n').filter((line) => line !== '')).toHaveLength(1 + 8);
  });

  it('sends one job from the job’s own link, through the share sheet when the device can share files', async () => {
    await seed();
    const shared: File[][] = [];
    Object.assign(navigator, {
      canShare: (data: { files?: File[] }) => Array.isArray(data.files),
      share: async (data: { files: File[] }) => void shared.push(data.files),
    });
    renderApp('#/files/job-b');
    await screen.findByLabelText(/This job \(\+Greywick/);
    fireEvent.click(screen.getByRole('button', { name: 'Send or save' }));
    await screen.findByText(/^Shared ripplewright-job-greywick-cafe-the-one-by-the-bridge-.*\.json \(1 job, 4 readings\)/);
    const read = await readJobFile(await shared[0]![0]!.text(), 'shared.json');
    expect(read.ok && read.file.payload.jobs.map((job) => job.id)).toEqual(['job-b']);
  });

  it('asks for a fresh tap when the share sheet refuses a share that waited on the export', async () => {
    await seed();
    const shared: File[][] = [];
    let refusals = 1;
    Object.assign(navigator, {
      canShare: () => true,
      share: async (data: { files: File[] }) => {
        if (refusals-- > 0) throw new DOMException('needs a user gesture', 'NotAllowedError');
        shared.push(data.files);
      },
    });
    const saved = catchDownloads();
    renderApp('#/files');
    fireEvent.click(await screen.findByRole('button', { name: 'Send or save' }));
    fireEvent.click(await screen.findByRole('button', { name: 'Share the files' }));
    await screen.findByText(/^Shared ripplewright-jobs-.*\.json \(3 jobs, 8 readings\)/);
    expect(shared).toHaveLength(1);
    expect(saved).toHaveLength(0);
    expect(screen.queryByRole('button', { name: 'Share the files' })).toBeNull();
  });

  it('says so when the chosen dates hold no job, and sends nothing', async () => {
    await seed();
    const saved = catchDownloads();
    renderApp('#/files');
    fireEvent.click(await screen.findByLabelText('Jobs worked on between two dates'));
    fireEvent.input(screen.getByLabelText('From (first day)'), { target: { value: '2030-01-01' } });
    fireEvent.click(screen.getByRole('button', { name: 'Send or save' }));
    await screen.findByText(/No jobs to send/);
    expect(saved).toHaveLength(0);
  });
});

describe('the job files screen: taking in', () => {
  it('takes in the good files, leaves a bad one out whole naming the file and field, and lists the conflicts', async () => {
    await seed();
    const changed = copy(smallPayload());
    const later = '2026-03-05T08:00:00.000Z';
    changed.jobs[0]!.customer = 'Foxmere Bakery Ltd';
    changed.jobs[0]!.edits.customer = later;
    changed.jobs[0]!.updatedAt = later;
    const newer = await writeJobFile(changed, { exportedAt: later, exportedBy: { name: 'Ada Quill' } });
    const broken = copy(smallPayload());
    for (const job of broken.jobs) job.id = `x-${job.id}`;
    for (const r of broken.readings) {
      r.id = `x-${r.id}`;
      r.jobId = `x-${r.jobId}`;
      if (r.supersedes) r.supersedes = `x-${r.supersedes}`;
    }
    // The mains reading (231 V) of the reading table typed as words.
    const written = await writeJobFile(broken, { exportedAt: later });
    const badText = written.replace(/("value":\[[^\]]*)\b231\b/, '$1"two hundred"');
    expect(badText).not.toBe(written);
    const before = await loadExchangePayload(db);

    renderApp('#/files');
    const input = await screen.findByLabelText('Choose job files');
    pick(input, [new File([badText], 'office.json', { type: 'application/json' }), new File([newer], 'ada.json', { type: 'application/json' })]);

    const report = (await screen.findByRole('heading', { name: /1 file taken in, 1 file left out/ })).closest('section') as HTMLElement;
    const items = within(report).getAllByRole('listitem').filter((li) => li.parentElement?.classList.contains('report-list'));
    expect(items[0]!.textContent).toContain('office.json');
    expect(items[0]!.textContent).toMatch(/Nothing from this file was stored/);
    expect(items[0]!.textContent).toMatch(/office\.json: line \d+: job x-job-c: .*payload\.readings\[\d+\]\.value/);
    expect(items[1]!.textContent).toMatch(/ada\.json.*1 job brought up to date/);
    const conflicts = within(items[1]!).getByRole('table');
    const row = within(conflicts).getByRole('row', { name: /job job-a: customer/ });
    expect(row.textContent).toContain('Foxmere Bakery Ltd');
    expect(row.textContent).toContain('Foxmere Bakery');
    expect(row.textContent).toContain('this device');

    const after = await loadExchangePayload(db);
    expect(after.jobs.map((job) => job.id).sort()).toEqual(before.jobs.map((job) => job.id).sort());
    expect(after.readings).toHaveLength(before.readings.length);
    expect(after.conflicts).toHaveLength(1);
  });

  it('changes nothing when the same file is taken in again, and says nothing new came', async () => {
    const text = await writeJobFile(smallPayload(), { exportedAt: T3 });
    renderApp('#/files');
    const input = await screen.findByLabelText('Choose job files');
    pick(input, [new File([text], 'shop.json')]);
    await screen.findByText(/3 new jobs, 8 new readings/);
    const first = await loadExchangePayload(db);
    pick(input, [new File([text], 'shop.json')]);
    await screen.findByText(/Nothing new: everything in it was already here/);
    expect(await loadExchangePayload(db)).toEqual(first);
  });
});

describe('the shop review', () => {
  it('filters the job table by technician and fault, draws the charts, and links each row to its job', async () => {
    await seed();
    renderApp('#/review');
    await screen.findByText('3 of 3 jobs');
    const table = screen.getByRole('table');
    expect(within(table).getAllByRole('row')).toHaveLength(1 + 3);
    await waitFor(() => expect(charts.map((chart) => chart.type)).toContain('bar'));
    // job-b, finished in March 2026 with a low capacitor, is the one fault found.
    const faultChart = charts.find((chart) => chart.data.datasets.some((d) => d.label === faultWords('capacitor-low')));
    expect(faultChart?.data.labels).toEqual(['2026-03']);
    expect(faultChart?.data.datasets.map((d) => d.data)).toEqual([[1]]);

    fireEvent.change(screen.getByLabelText('Technician'), { target: { value: 'tech-2' } });
    await screen.findByText('1 of 3 jobs');
    const link = within(screen.getByRole('table')).getAllByRole('link')[0]!;
    expect(link.getAttribute('href')).toBe('#/job/job-b/summary');

    fireEvent.change(screen.getByLabelText('Technician'), { target: { value: '' } });
    fireEvent.change(screen.getByLabelText('Fault found'), { target: { value: '-' } });
    await screen.findByText('2 of 3 jobs');
    fireEvent.input(screen.getByLabelText('Customer or site'), { target: { value: 'nobody here' } });
    await screen.findByText('0 of 3 jobs');
    expect(screen.getByText('No job matches.')).toBeTruthy();
  });

  it('offers one unit’s history only once the jobs are narrowed to a few units', async () => {
    const payload = smallPayload();
    for (let i = 0; i < 61; i++) {
      payload.assets.push({ ...copy(payload.assets[0]!), id: `many-${i}`, serial: `SER-${i}` });
      payload.jobs.push({ ...copy(payload.jobs[0]!), id: `many-job-${i}`, assetId: `many-${i}` });
    }
    await seed(payload);
    renderApp('#/review');
    await screen.findByText('64 of 64 jobs');
    expect(screen.queryByLabelText('One unit’s history')).toBeNull();
    expect(screen.getByText(/narrow the jobs to a few units first/)).toBeTruthy();
    fireEvent.input(screen.getByLabelText('Unit (kind, make, model, serial)'), { target: { value: 'ser-1' } });
    await screen.findByText(/^\d+ of 64 jobs$/);
    const unit = await screen.findByLabelText('One unit’s history');
    // SER-1 and SER-10 … SER-19 hold the text "ser-1".
    expect(within(unit).getAllByRole('option')).toHaveLength(1 + 11);
  });

  it('follows one unit’s readings across its visits when the unit is picked', async () => {
    const payload = smallPayload();
    const second = copy(payload.jobs[0]!);
    second.id = 'job-a2';
    second.createdAt = second.startedAt = '2026-06-02T09:00:00.000Z';
    second.updatedAt = '2026-06-02T10:00:00.000Z';
    payload.jobs.push(second);
    payload.readings.push({ ...copy(payload.readings[0]!), id: 'r-9', jobId: 'job-a2', value: 12.1, text: '12.1', takenAt: '2026-06-02T09:30:00.000Z' });
    await seed(payload);
    renderApp('#/review');
    await screen.findByText('4 of 4 jobs');
    const unit = screen.getByLabelText('One unit’s history');
    fireEvent.change(unit, { target: { value: 'asset-1' } });
    await screen.findByText('2 of 4 jobs');
    await waitFor(() => expect(charts.some((chart) => chart.data.datasets[0]?.label === 'measured')).toBe(true));
    const series = charts.filter((chart) => chart.data.datasets[0]?.label === 'measured').at(-1)!;
    expect(series.data.datasets[0]!.data).toEqual([13.58, 12.1]);
    expect(screen.getByRole('img', { name: /This unit’s DC output across visits/i })).toBeTruthy();
  });
});

describe('the job report', () => {
  it('shows the bands, verdicts and safety cautions, and offers print and send', async () => {
    await seed();
    const printed = vi.fn();
    vi.stubGlobal('print', printed);
    renderApp('#/job/job-b/summary');
    const table = await screen.findByRole('table', { name: 'Readings before the repair' });
    expect(within(table).getByRole('columnheader', { name: 'Expected' })).toBeTruthy();
    expect(table.textContent).toContain('700 µF – 1200 µF');
    expect(screen.getByRole('note', { name: 'Power-off tests' }).textContent).toMatch(/discharge/);
    fireEvent.click(screen.getByRole('button', { name: 'Print the report' }));
    expect(printed).toHaveBeenCalledOnce();
    expect(screen.getByRole('link', { name: 'Send this job' }).getAttribute('href')).toBe('#/files/job-b');
    vi.unstubAllGlobals();
  });
});
