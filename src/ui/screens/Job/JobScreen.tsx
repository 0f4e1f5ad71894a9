import { useMemo } from 'preact/hooks';
import { useApp } from '../../app-context';
import { Lazy } from '../../components/Lazy';
import { ScreenTitle } from '../../components/ScreenTitle';
import { toReadingsInput } from '../../readings';
import { routeHash, type JobTab } from '../../router';
import { FinishTab } from '../Finish/FinishTab';
import { SummaryTab } from '../Summary/SummaryTab';
import { SupplyTab } from '../Supply/SupplyTab';
import { TestTab } from '../Test/TestTab';
import { setupOf, useDiagnosis } from './use-diagnosis';
import { useJob, type JobActions, type JobData } from './use-job';
import type { DiagnosisState } from './use-diagnosis';

// The chart library is large and only the waveform needs it.
const loadWaveform = () => import('../Waveform/WaveformTab').then((m) => m.WaveformTab);

export interface TabProps {
  data: JobData;
  actions: JobActions;
  diagnosis: DiagnosisState;
}

const TABS: { tab: JobTab; label: string }[] = [
  { tab: 'supply', label: 'Supply' },
  { tab: 'test', label: 'Test' },
  { tab: 'waveform', label: 'Waveform' },
  { tab: 'finish', label: 'Finish' },
  { tab: 'summary', label: 'Summary' },
];

/** One job: its supply, the guided test, the waveform, the finish and its summary. */
export function JobScreen({ jobId, tab }: { jobId: string; tab: JobTab }) {
  const { db, saver, engine } = useApp();
  const [state, actions] = useJob(db, saver, jobId);
  const job = state.state === 'ready' ? state.data.job : null;
  const setup = useMemo(() => (job === null ? null : setupOf(job)), [job?.supply, job?.meter, job?.nameplate?.region]);
  const readings = state.state === 'ready' ? state.data.readings : null;
  const readingsInput = useMemo(() => toReadingsInput(readings ?? [], 'before'), [readings]);
  const diagnosis = useDiagnosis(engine, setup, readingsInput);

  if (state.state === 'loading') return <p class="loading" role="status">Opening the job…</p>;
  if (state.state === 'missing') {
    return (
      <section class="screen">
        <ScreenTitle>Job not found</ScreenTitle>
        <p>There is no such job on this device. <a href="#/jobs">Back to the jobs</a></p>
      </section>
    );
  }
  const { data } = state;
  const asset = data.asset;
  const props: TabProps = { data, actions, diagnosis };
  const tabLabel = TABS.find((entry) => entry.tab === tab)?.label ?? '';
  return (
    <section class="screen job-screen" aria-labelledby="job-title">
      <div class="job-head" id="job-title">
        <ScreenTitle>
          {tabLabel}
          <span class="visually-hidden">: </span>
          <span class="job-title-sub">
            {data.job.customer}
            {asset ? ` · ${asset.kind}${asset.model ? ` ${asset.model}` : ''}` : ''}
          </span>
        </ScreenTitle>
        {data.job.complaint ? <p class="complaint">“{data.job.complaint}”</p> : null}
      </div>
      <nav class="job-tabs" aria-label="Job">
        {TABS.map((entry) => (
          <a key={entry.tab} href={routeHash({ screen: 'job', jobId, tab: entry.tab })} aria-current={entry.tab === tab ? 'page' : undefined}>
            {entry.label}
          </a>
        ))}
      </nav>
      {tab === 'supply' ? <SupplyTab {...props} /> : null}
      {tab === 'test' ? <TestTab {...props} /> : null}
      {tab === 'waveform' ? <Lazy load={loadWaveform} props={props} what="waveform" /> : null}
      {tab === 'finish' ? <FinishTab {...props} /> : null}
      {tab === 'summary' ? <SummaryTab {...props} /> : null}
    </section>
  );
}
