// @vitest-environment happy-dom
import { cleanup, fireEvent, render, screen, waitFor, within } from '@testing-library/preact';
import { h } from 'preact';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { createJob, getJob, listJobs } from '../../src/store/jobs';
import { addReading, readingsForJob } from '../../src/store/readings';
import type { Database } from '../../src/store/schema';
import { getSettings } from '../../src/store/settings';
import { App } from '../../src/ui/App';
import { buildSupply, DEFAULT_NAMEPLATE } from '../../src/ui/screens/Supply/nameplate';
import { freshDb, inProcessEngine } from './helpers';

vi.mock('../../src/store/readings', async (importOriginal) => {
  const real = await importOriginal<typeof import('../../src/store/readings')>();
  return { ...real, addReading: vi.fn(real.addReading) };
});

const charts: { data: { datasets: { label: string }[] } }[] = [];
vi.mock('chart.js', () => {
  class Chart {
    static register() {}
    constructor(_canvas: unknown, config: { data: { datasets: { label: string }[] } }) {
      charts.push(config);
    }
    destroy() {}
  }
  return { Chart, LineController: {}, LineElement: {}, PointElement: {}, LinearScale: {}, Legend: {}, Tooltip: {} };
});

let db: Database;
const engine = inProcessEngine();

beforeEach(async () => {
  db = await freshDb();
  location.hash = '#/jobs';
});

afterEach(() => {
  cleanup();
  db.close();
});

function renderApp(hash: string) {
  location.hash = hash;
  const open = () => Promise.resolve(db);
  return render(h(App, { open, engine }));
}

async function jobWithSupply(): Promise<string> {
  const supply = buildSupply(DEFAULT_NAMEPLATE);
  if ('problems' in supply) throw new Error('default nameplate invalid');
  const job = await createJob(db, { customer: 'Wren Court', site: 'Flat 3', technicianId: 't1', complaint: 'Dead', supply: supply.spec, nameplate: supply.nameplate });
  return job.id;
}


describe('the app shell', () => {
  it('opens on the jobs screen and offers the demo on a device with no jobs', async () => {
    renderApp('#/jobs');
    await screen.findByText(/No jobs yet/);
    expect(screen.getByRole('button', { name: 'Try with demo data' })).toBeTruthy();
    expect(within(screen.getByRole('navigation', { name: 'Main' })).getByRole('link', { name: 'Jobs' }).getAttribute('aria-current')).toBe('page');
  });

  it('keeps half-typed new-job text through a restart, then starts the job on the supply screen', async () => {
    const first = renderApp('#/new');
    const customer = await screen.findByLabelText('Customer');
    fireEvent.input(customer, { target: { value: 'Fenn & Daughters' } });
    await waitFor(async () => expect((await db.get('drafts', 'new-job'))?.fields.customer).toBe('Fenn & Daughters'));
    first.unmount();

    renderApp('#/new');
    await waitFor(() => expect((screen.getByLabelText('Customer') as HTMLInputElement).value).toBe('Fenn & Daughters'));
    fireEvent.input(screen.getByLabelText('What it is'), { target: { value: 'dishwasher' } });
    fireEvent.input(screen.getByLabelText('Your name'), { target: { value: 'Lena Hart' } });
    fireEvent.click(screen.getByRole('button', { name: 'Start the job' }));
    await waitFor(() => expect(location.hash).toMatch(/^#\/job\/.+\/supply$/));
    const [job] = await listJobs(db);
    expect(job?.customer).toBe('Fenn & Daughters');
    expect(job?.assetId).toBeDefined();
    expect((await getSettings(db)).technicianId).toBe(job?.technicianId);
    expect(await db.get('drafts', 'new-job')).toBeUndefined();
  });

  it('says what is missing instead of starting a job without a customer', async () => {
    renderApp('#/new');
    fireEvent.click(await screen.findByRole('button', { name: 'Start the job' }));
    expect((await screen.findByRole('alert')).textContent).toContain('Enter the customer');
    expect(await listJobs(db)).toEqual([]);
  });
});

describe('the guided test', () => {
  it('starts with the safety check and cannot be started until every check is ticked', async () => {
    const jobId = await jobWithSupply();
    renderApp(`#/job/${jobId}/test`);
    await screen.findByRole('heading', { name: /Safety first/ });
    const start = screen.getByRole('button', { name: /Tick all 5 checks/ }) as HTMLButtonElement;
    expect(start.disabled).toBe(true);
    expect(screen.queryByRole('heading', { name: 'DC output' })).toBeNull();
    const boxes = screen.getAllByRole('checkbox');
    for (const box of boxes.slice(0, -1)) fireEvent.click(box);
    expect((screen.getByRole('button', { name: /Tick all/ }) as HTMLButtonElement).disabled).toBe(true);
    fireEvent.click(boxes[boxes.length - 1]!);
    expect((screen.getByRole('button', { name: 'Start the readings' }) as HTMLButtonElement).disabled).toBe(false);
  });

  it('shows the band, meter mode and probe points before measuring, saves the reading with its verdict, and ranks the faults', async () => {
    const jobId = await jobWithSupply();
    await db.put('drafts', { key: `${jobId}:progress`, savedAt: '', fields: { safetyCheckedAt: '2026-03-02T09:00:00.000Z' } });
    renderApp(`#/job/${jobId}/test`);
    const card = (await screen.findByText(/Next reading/)).closest('.step-card') as HTMLElement;
    const entry = card.querySelector('.reading-entry') as HTMLElement;
    const slot = entry.dataset.reading!;
    // The band shows before anything is typed, with the meter mode and both probes on the drawing.
    expect(within(card).getByText(/^Expect/).textContent).toMatch(/Expect .+ – .+/);
    expect(within(card).getByText('Meter').nextElementSibling?.textContent).not.toBe('');
    expect(card.querySelector('svg [data-probe=red]')).not.toBeNull();
    expect(card.querySelector('svg [data-probe=black]')).not.toBeNull();

    const low = Number(entry.dataset.bandLow);
    const input = within(card).getAllByRole('textbox')[0]!;
    fireEvent.input(input, { target: { value: String(low * 0.5).replace('.', ',') } });
    fireEvent.keyDown(input, { key: 'Enter' });
    await screen.findByRole('heading', { name: /Likely faults/ });
    const [stored] = await readingsForJob(db, jobId);
    expect(`${stored?.kind}${stored?.target ? `:${stored.target}` : ''}`).toBe(slot);
    expect(stored?.verdict).toBe('low');
    expect(stored?.expectedLow).toBe(low);
    expect(screen.getByText(/saved$/, { selector: '.last-entered' })).toBeTruthy();
  });

  it('asks for a discharge check, refusing a charged capacitor, before a power-off test', async () => {
    const jobId = await jobWithSupply();
    await db.put('drafts', { key: `${jobId}:progress`, savedAt: '', fields: { safetyCheckedAt: '2026-03-02T09:00:00.000Z', chosen: 'diodeForward|D1' } });
    renderApp(`#/job/${jobId}/test`);
    await screen.findByRole('heading', { name: 'Power off, discharge and verify' });
    const volts = screen.getByLabelText('Voltage left across the capacitor');
    fireEvent.input(volts, { target: { value: '5,2' } });
    fireEvent.keyDown(volts, { key: 'Enter' });
    expect((await screen.findByText(/Still charged/)).textContent).toContain('below 1 V');
    fireEvent.input(volts, { target: { value: '0,3' } });
    fireEvent.keyDown(volts, { key: 'Enter' });
    await screen.findByRole('heading', { name: 'D1 forward' });
    expect(screen.getByText(/discharge it through a suitable resistor/)).toBeTruthy();
  });

  it('shows a failed write plainly, keeps the value, and saves it on “Try again”', async () => {
    const jobId = await jobWithSupply();
    await db.put('drafts', { key: `${jobId}:progress`, savedAt: '', fields: { safetyCheckedAt: '2026-03-02T09:00:00.000Z' } });
    vi.mocked(addReading).mockRejectedValueOnce(new DOMException('quota', 'QuotaExceededError'));
    renderApp(`#/job/${jobId}/test`);
    const card = (await screen.findByText(/Next reading/)).closest('.step-card') as HTMLElement;
    const input = within(card).getAllByRole('textbox')[0]!;
    fireEvent.input(input, { target: { value: '12' } });
    fireEvent.keyDown(input, { key: 'Enter' });
    const banner = (await screen.findByText(/^Not saved:/)).closest('.save-failures') as HTMLElement;
    expect(banner.textContent).toContain('storage for this app is full');
    await within(card).findByText('⚠ Not saved yet');
    expect((input as HTMLInputElement).value).toBe('12');
    expect(await readingsForJob(db, jobId)).toEqual([]);
    fireEvent.click(within(banner).getByRole('button', { name: 'Try again' }));
    await waitFor(async () => expect(await readingsForJob(db, jobId)).toHaveLength(1));
    await waitFor(() => expect(document.querySelector('.save-failures')).toBeNull());
  });
});

describe('the other job screens', () => {
  it('draws the expected waveform with the DC band and the measured DC over it', async () => {
    const jobId = await jobWithSupply();
    await addReading(db, { id: crypto.randomUUID(), jobId, kind: 'dcOut', value: 14.1, text: '14,1', takenAt: '2026-03-02T09:05:00.000Z', phase: 'before' });
    charts.length = 0;
    renderApp(`#/job/${jobId}/waveform`);
    await screen.findByRole('table', { name: 'Expected and measured' });
    await waitFor(() => expect(charts.length).toBeGreaterThan(0));
    const labels = charts[charts.length - 1]!.data.datasets.map((d) => d.label);
    expect(labels).toEqual(expect.arrayContaining(['Expected output', 'DC band, low', 'DC band, high', 'Measured DC']));
  });

  it('records the finish as typed and closes the job onto its summary', async () => {
    const jobId = await jobWithSupply();
    renderApp(`#/job/${jobId}/finish`);
    fireEvent.input(await screen.findByLabelText('Action taken'), { target: { value: 'Replaced C1' } });
    fireEvent.input(screen.getByLabelText('Parts used'), { target: { value: '2200 µF 25 V\nfuse T1A' } });
    fireEvent.click(screen.getByRole('radio', { name: 'Fixed' }));
    await waitFor(async () => expect((await getJob(db, jobId))?.finish?.outcome).toBe('fixed'));
    expect((await getJob(db, jobId))?.finish?.partsUsed).toEqual(['2200 µF 25 V', 'fuse T1A']);
    fireEvent.click(screen.getByRole('button', { name: 'Close the job' }));
    await waitFor(() => expect(location.hash).toBe(`#/job/${jobId}/summary`));
    expect((await getJob(db, jobId))?.status).toBe('finished');
  });

  it('applies and stores a theme chosen in the settings', async () => {
    renderApp('#/settings');
    fireEvent.click(await screen.findByRole('radio', { name: 'Sunlight: highest contrast' }));
    await waitFor(() => expect(document.documentElement.dataset.theme).toBe('sunlight'));
    expect((await getSettings(db)).theme).toBe('sunlight');
  });
});

