import { useEffect, useState } from 'preact/hooks';
import type { FileImportReport, ImportProgress } from '../../../exchange/import';
import type { ExportSelection } from '../../../exchange/write';
import type { Job } from '../../../model/job';
import { nowIso } from '../../../store/ids';
import { getJob } from '../../../store/jobs';
import { useApp } from '../../app-context';
import { ScreenTitle } from '../../components/ScreenTitle';
import { defaultExchangeClient } from '../../bridges/exchange-bridge';
import { shareOrDownload, type OutgoingFile } from '../../share';
import { ImportReport } from './ImportReport';

type Scope = 'all' | 'dates' | 'job';

/** Sending jobs to another device or the office, and taking in files from them. */
export function FilesScreen({ jobId }: { jobId?: string }) {
  return (
    <section class="screen files-screen" aria-labelledby="files-title">
      <ScreenTitle id="files-title">Job files</ScreenTitle>
      <ExportPanel jobId={jobId} />
      <ImportPanel />
    </section>
  );
}

/** Local calendar day "2026-03-02" → the ISO time that day starts; `nextDay` gives the day after. */
function dayStart(day: string, nextDay = false): string {
  const [y, m, d] = day.split('-').map(Number) as [number, number, number];
  return new Date(y, m - 1, d + (nextDay ? 1 : 0)).toISOString();
}

function slug(text: string): string {
  return text.normalize('NFD').replace(/\p{M}/gu, '').toLowerCase().replace(/[^a-z0-9]+/g, '-').replace(/^-|-$/g, '').slice(0, 40);
}

function ExportPanel({ jobId }: { jobId: string | undefined }) {
  const { db, settings, technicians } = useApp();
  const [job, setJob] = useState<Job | undefined>(undefined);
  const [scope, setScope] = useState<Scope>(jobId === undefined ? 'all' : 'job');
  const [from, setFrom] = useState('');
  const [to, setTo] = useState('');
  const [json, setJson] = useState(true);
  const [csv, setCsv] = useState(false);
  const [state, setState] = useState<{ kind: 'idle' } | { kind: 'working' } | { kind: 'done'; text: string } | { kind: 'failed'; text: string }>({ kind: 'idle' });
  const [pending, setPending] = useState<{ files: OutgoingFile[]; what: string; digest: string } | null>(null);

  const hand = async (files: OutgoingFile[], what: string, digest: string) => {
    const outcome = await shareOrDownload(files, 'Ripplewright jobs');
    const names = files.map((file) => file.name).join(' and ');
    setPending(outcome === 'needs-tap' ? { files, what, digest } : null);
    setState({
      kind: 'done',
      text:
        outcome === 'cancelled'
          ? 'Not sent: the share was closed.'
          : outcome === 'needs-tap'
            ? `${names} ready (${what}). Tap “Share the files” to send them.`
            : `${outcome === 'shared' ? 'Shared' : 'Downloaded'} ${names} (${what}).${digest ? ` Check code (SHA-256): ${digest.slice(0, 16)}…` : ''}`,
    });
  };

  useEffect(() => {
    if (jobId === undefined) return;
    void getJob(db, jobId).then(setJob);
  }, [db, jobId]);

  const run = async () => {
    setState({ kind: 'working' });
    setPending(null);
    try {
      const selection: ExportSelection =
        scope === 'job' && jobId !== undefined
          ? { kind: 'jobs', jobIds: [jobId] }
          : scope === 'dates'
            ? { kind: 'dates', ...(from ? { from: dayStart(from) } : {}), ...(to ? { to: dayStart(to, true) } : {}) }
            : { kind: 'all' };
      const at = nowIso();
      const stem =
        scope === 'job' && job !== undefined
          ? `ripplewright-job-${slug(job.customer) || 'job'}-${at.slice(0, 10)}`
          : scope === 'dates'
            ? `ripplewright-jobs-${from || 'start'}-to-${to || 'now'}`
            : `ripplewright-jobs-${at.slice(0, 10)}`;
      const me = technicians.find((t) => t.id === settings.technicianId);
      const exported = await defaultExchangeClient(db).exportFiles({
        selection,
        json,
        csv,
        stem,
        exportedAt: at,
        exportedBy: { ...(me ? { technicianId: me.id, name: me.name } : {}), device: 'Ripplewright app' },
      });
      if (exported.jobs === 0) {
        setState({ kind: 'failed', text: 'No jobs to send: no job is dated in those days (the day work started, or the job was made).' });
        return;
      }
      const files = exported.files.map((file) => ({ name: file.name, type: file.type, parts: [file.blob] }));
      const what = `${exported.jobs} job${exported.jobs === 1 ? '' : 's'}, ${exported.readings} reading${exported.readings === 1 ? '' : 's'}`;
      await hand(files, what, exported.sha256);
    } catch (error) {
      setState({ kind: 'failed', text: `The export did not work: ${error instanceof Error ? error.message : String(error)}` });
    }
  };

  return (
    <section aria-labelledby="export-title" class="panel">
      <h2 id="export-title">Send jobs</h2>
      <fieldset>
        <legend>Which jobs</legend>
        {jobId !== undefined ? (
          <label class="check">
            <input type="radio" name="export-scope" checked={scope === 'job'} onChange={() => setScope('job')} />
            This job{job ? ` (${job.customer || 'no customer'})` : ''}
          </label>
        ) : null}
        <label class="check">
          <input type="radio" name="export-scope" checked={scope === 'all'} onChange={() => setScope('all')} />
          Every job on this device
        </label>
        <label class="check">
          <input type="radio" name="export-scope" checked={scope === 'dates'} onChange={() => setScope('dates')} />
          Jobs worked on between two dates
        </label>
        {scope === 'dates' ? (
          <div class="pair">
            <div class="field">
              <label for="export-from">From (first day)</label>
              <input id="export-from" type="date" value={from} onInput={(event) => setFrom(event.currentTarget.value)} />
            </div>
            <div class="field">
              <label for="export-to">To (last day)</label>
              <input id="export-to" type="date" value={to} onInput={(event) => setTo(event.currentTarget.value)} />
            </div>
          </div>
        ) : null}
      </fieldset>
      <fieldset>
        <legend>As</legend>
        <label class="check">
          <input type="checkbox" checked={json} onChange={(event) => setJson(event.currentTarget.checked)} />
          Job file (JSON, for another device or the office)
        </label>
        <label class="check">
          <input type="checkbox" checked={csv} onChange={(event) => setCsv(event.currentTarget.checked)} />
          Spreadsheet of the readings (CSV)
        </label>
      </fieldset>
      <button type="button" class="primary" disabled={state.kind === 'working' || (!json && !csv)} onClick={() => void run()}>
        {state.kind === 'working' ? 'Preparing…' : 'Send or save'}
      </button>
      {pending !== null ? (
        <button type="button" class="secondary" onClick={() =>
            void hand(pending.files, pending.what, pending.digest).catch((error: unknown) =>
              setState({ kind: 'failed', text: `The share did not work: ${error instanceof Error ? error.message : String(error)}` }),
            )
          }
        >
          Share the files
        </button>
      ) : null}
      <p role="status" class={state.kind === 'failed' ? 'problem' : 'hint'}>
        {state.kind === 'done' || state.kind === 'failed' ? state.text : ''}
      </p>
    </section>
  );
}

/** Where an import has got to, in words, with the fraction done for the progress bar. */
export function importProgressWords(progress: ImportProgress): { text: string; fraction: number | undefined } {
  const which = `file ${progress.file + 1} of ${progress.files}, ${progress.name}`;
  const fraction = progress.total > 0 ? Math.min(1, progress.done / progress.total) : undefined;
  if (progress.stage === 'reading') {
    return { text: `Checking ${which}${fraction === undefined ? '' : `: ${Math.floor(fraction * 100)} %`}`, fraction };
  }
  return { text: `Saving ${which}: ${progress.done.toLocaleString('en-GB')} of ${progress.total.toLocaleString('en-GB')} records`, fraction };
}

function ImportPanel() {
  const { db, reloadTechnicians } = useApp();
  const [busy, setBusy] = useState(false);
  const [progress, setProgress] = useState<ImportProgress | null>(null);
  const [reports, setReports] = useState<FileImportReport[] | null>(null);

  const [failure, setFailure] = useState<string | null>(null);

  const take = async (list: FileList | null) => {
    if (list === null || list.length === 0) return;
    const chosen = [...list];
    setReports(null);
    setFailure(null);
    setBusy(true);
    setProgress(null);
    try {
      // The files go to the exchange worker as they are (a File is passed by reference) and are
      // read there as they stream from the disk, so a large file is never copied whole.
      const files = chosen.map((file) => ({ name: file.name, blob: file }));
      const done = await defaultExchangeClient(db).importFiles(files, nowIso(), setProgress);
      setReports(done);
      await reloadTechnicians();
    } catch (error) {
      setFailure(`The files could not be read: ${error instanceof Error ? error.message : String(error)}`);
    } finally {
      setBusy(false);
      setProgress(null);
    }
  };
  const words = progress === null ? null : importProgressWords(progress);

  return (
    <section aria-labelledby="import-title" class="panel">
      <h2 id="import-title">Take in job files</h2>
      <p class="hint">Choose one or more job files. A file with anything wrong is left out whole; the others still come in. Taking in the same file again changes nothing.</p>
      <label class="button secondary file-pick">
        Choose job files
        <input
          type="file"
          multiple
          accept=".json,.jsonl,application/json"
          disabled={busy}
          onChange={(event) => {
            const input = event.currentTarget;
            void take(input.files).finally(() => (input.value = ''));
          }}
        />
      </label>
      {busy ? (
        <div class="import-progress">
          <p role="status">{words?.text ?? 'Opening the files…'}</p>
          <progress max={1} value={words?.fraction} aria-label="Taking in the files" />
        </div>
      ) : null}
      {failure !== null ? <p class="notice problem" role="alert">{failure}</p> : null}
      {reports !== null ? <ImportReport reports={reports} /> : null}
    </section>
  );
}
