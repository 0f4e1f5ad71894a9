import { useEffect, useState } from 'preact/hooks';
import type { Asset, Job } from '../../../model/job';
import { assetsById } from '../../../store/assets';
import { listJobs, matchJobs } from '../../../store/jobs';
import { useApp } from '../../app-context';
import { ScreenTitle } from '../../components/ScreenTitle';
import { formatWhen } from '../../format';
import { FIRST_SCREEN_MARK } from '../../marks';
import { routeHash } from '../../router';


const loadDemo = () => import('../../../app-demo/seed');

/** Today's and recent jobs, open ones first; search by customer, site or asset. */
export function JobsScreen() {
  const { db, technicians, engine, saver, reloadTechnicians, changeSettings } = useApp();
  const [jobs, setJobs] = useState<Job[] | null>(null);
  const [assets, setAssets] = useState<Map<string, Asset>>(new Map());
  const [query, setQuery] = useState('');
  const [seeding, setSeeding] = useState<'idle' | 'working' | string>('idle');
  const [reloads, setReloads] = useState(0);

  useEffect(() => {
    let live = true;
    void Promise.all([listJobs(db), assetsById(db)]).then(([found, byId]) => {
      if (!live) return;
      setJobs(found);
      setAssets(byId);
    });
    return () => {
      live = false;
    };
  }, [db, reloads]);

  useEffect(() => {
    if (jobs !== null && performance.getEntriesByName(FIRST_SCREEN_MARK).length === 0) performance.mark(FIRST_SCREEN_MARK);
  }, [jobs !== null]);

  const tryDemo = async () => {
    setSeeding('working');
    try {
      const demo = await loadDemo();
      const result = await saver.save('the demo jobs', () => demo.seedDemo(db, engine));
      if (!result.ok) {
        setSeeding('idle');
        return;
      }
      await reloadTechnicians();
      if (result.value.technicianId !== undefined) await changeSettings({ technicianId: result.value.technicianId });
      setSeeding('idle');
      setReloads((n) => n + 1);
    } catch (error) {
      setSeeding(`The demo could not be made: ${error instanceof Error ? error.message : String(error)}`);
    }
  };

  const technicianName = (id: string) => technicians.find((t) => t.id === id)?.name;
  const shown = jobs === null ? [] : matchJobs(jobs, assets, query);
  const open = shown.filter((job) => job.status === 'open');
  const today = new Date().toDateString();
  const finishedToday = shown.filter((job) => job.status === 'finished' && new Date(job.updatedAt).toDateString() === today);
  const earlier = shown.filter((job) => job.status === 'finished' && new Date(job.updatedAt).toDateString() !== today);

  return (
    <section class="screen jobs-screen" aria-labelledby="jobs-title">
      <div class="title-row">
        <ScreenTitle focus={false} id="jobs-title">Jobs</ScreenTitle>
        <a class="button primary small" href="#/new">New job</a>
      </div>
      <div class="field search">
        <label for="job-search">Search customer, site or appliance</label>
        <input id="job-search" type="search" value={query} autoComplete="off" onInput={(event) => setQuery(event.currentTarget.value)} />
      </div>
      {jobs === null ? <p class="loading" role="status">Reading your jobs…</p> : null}
      {jobs !== null && jobs.length === 0 ? (
        <div class="empty">
          <p>No jobs yet. Start one with “New job”, or look around a made-up repair shop first.</p>
          <button type="button" class="secondary" disabled={seeding === 'working'} onClick={() => void tryDemo()}>
            {seeding === 'working' ? 'Making the demo jobs…' : 'Try with demo data'}
          </button>
          {seeding !== 'idle' && seeding !== 'working' ? <p class="problem" role="alert">{seeding}</p> : null}
        </div>
      ) : null}
      {jobs !== null && jobs.length > 0 && shown.length === 0 ? <p>No job matches “{query.trim()}”.</p> : null}
      <JobList title="Open" jobs={open} assets={assets} technicianName={technicianName} />
      <JobList title="Finished today" jobs={finishedToday} assets={assets} technicianName={technicianName} />
      <JobList title="Earlier" jobs={earlier.slice(0, 50)} assets={assets} technicianName={technicianName} />
    </section>
  );
}

function JobList({ title, jobs, assets, technicianName }: { title: string; jobs: Job[]; assets: Map<string, Asset>; technicianName: (id: string) => string | undefined }) {
  if (jobs.length === 0) return null;
  const id = `jobs-${title.toLowerCase().replace(/\s+/g, '-')}`;
  return (
    <section aria-labelledby={id}>
      <h2 id={id}>{title}</h2>
      <ul class="job-list">
        {jobs.map((job) => {
          const asset = job.assetId === undefined ? undefined : assets.get(job.assetId);
          const tab = job.status === 'finished' ? 'summary' : job.supply === undefined ? 'supply' : 'test';
          const who = technicianName(job.technicianId);
          return (
            <li key={job.id}>
              <a class="job-card" href={routeHash({ screen: 'job', jobId: job.id, tab })}>
                <span class="job-customer">{job.customer || 'No customer yet'}</span>
                <span class="job-asset">{assetWords(asset)}</span>
                <span class="job-meta">
                  {job.site}
                  {job.site && who ? ' · ' : ''}
                  {who}
                </span>
                <span class="job-meta">
                  {job.status === 'open' ? 'Open — resume' : outcomeWords(job)} · {formatWhen(job.updatedAt)}
                </span>
              </a>
            </li>
          );
        })}
      </ul>
    </section>
  );
}

function assetWords(asset: Asset | undefined): string {
  if (asset === undefined) return 'No appliance recorded';
  return [asset.kind, asset.make, asset.model].filter((part) => part !== undefined && part !== '').join(' · ');
}

function outcomeWords(job: Job): string {
  switch (job.finish?.outcome) {
    case 'fixed':
      return 'Fixed';
    case 'not-fixed':
      return 'Not fixed';
    case 'referred':
      return 'Referred';
    case 'no-fault-found':
      return 'No fault found';
    default:
      return 'Finished';
  }
}
