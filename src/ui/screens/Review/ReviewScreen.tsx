import { useEffect, useMemo, useRef, useState } from 'preact/hooks';
import type { Topology } from '../../../engine/types';
import type { ReviewFilter } from '../../../exchange/review';
import type { Database } from '../../../store/schema';
import type { ReviewAnswer } from '../../../worker/review';
import { useApp } from '../../app-context';
import { defaultReviewClient, type ReviewClient } from '../../bridges/review-bridge';
import { Lazy } from '../../components/Lazy';
import { ScreenTitle } from '../../components/ScreenTitle';
import { formatWhen } from '../../format';
import { navigate, routeHash } from '../../router';
import type { ChartsProps } from './ReviewCharts';
import { faultWords, OUTCOME_WORDS, TOPOLOGY_WORDS } from './words';

// chart.js comes with the charts, after the table: its own chunk.
const loadCharts = () => import('./ReviewCharts').then((m) => m.ReviewCharts);

interface FilterText {
  technicianId: string;
  from: string;
  to: string;
  fault: string;
  topology: string;
  customer: string;
  asset: string;
  assetId: string;
}

const NO_FILTER: FilterText = { technicianId: '', from: '', to: '', fault: '', topology: '', customer: '', asset: '', assetId: '' };

function dayStart(day: string, nextDay = false): string {
  const [y, m, d] = day.split('-').map(Number) as [number, number, number];
  return new Date(y, m - 1, d + (nextDay ? 1 : 0)).toISOString();
}

function toFilter(text: FilterText): ReviewFilter {
  const filter: ReviewFilter = {};
  if (text.technicianId) filter.technicianIds = [text.technicianId];
  if (text.from) filter.from = dayStart(text.from);
  if (text.to) filter.to = dayStart(text.to, true);
  if (text.fault) filter.faults = [text.fault === '-' ? '' : text.fault];
  if (text.topology) filter.topologies = [text.topology as Topology];
  if (text.customer.trim()) filter.customer = text.customer;
  if (text.asset.trim()) filter.asset = text.asset;
  if (text.assetId) filter.assetId = text.assetId;
  return filter;
}

export interface ReviewScreenProps {
  makeClient?: (db: Database) => ReviewClient;
}

/**
 * The shop's jobs at a glance: narrow them by technician, dates, fault, supply kind, customer
 * or unit; a table of the matching jobs and charts of what they show. The index is built off
 * the main thread (the review worker).
 * @param makeClient  how to reach the review work (tests pass the in-process one)
 */
export function ReviewScreen({ makeClient = defaultReviewClient }: ReviewScreenProps) {
  const { db, technicians } = useApp();
  const client = useMemo(() => makeClient(db), [db, makeClient]);
  const [loaded, setLoaded] = useState<'loading' | 'ready' | string>('loading');
  const [text, setText] = useState<FilterText>(NO_FILTER);
  const [answer, setAnswer] = useState<ReviewAnswer | null>(null);
  const [busy, setBusy] = useState(false);
  const asked = useRef(0);

  useEffect(() => {
    let live = true;
    client.load().then(
      () => live && setLoaded('ready'),
      (error: unknown) => live && setLoaded(`The jobs could not be read: ${error instanceof Error ? error.message : String(error)}`),
    );
    return () => {
      live = false;
      client.close();
    };
  }, [client]);

  useEffect(() => {
    if (loaded !== 'ready') return;
    const mine = ++asked.current;
    setBusy(true);
    client.query(toFilter(text)).then(
      (found) => {
        // Only the latest filter's answer is shown; a slower earlier one is dropped.
        if (mine !== asked.current) return;
        setAnswer(found);
        setBusy(false);
      },
      (error: unknown) => mine === asked.current && setLoaded(`The review failed: ${error instanceof Error ? error.message : String(error)}`),
    );
  }, [client, loaded, JSON.stringify(text)]);

  const set = (patch: Partial<FilterText>) => setText((previous) => ({ ...previous, ...patch }));
  const technicianName = (id: string) => technicians.find((t) => t.id === id)?.name ?? id.slice(0, 8);

  return (
    <section class="screen review-screen" aria-labelledby="review-title" aria-busy={busy || loaded === 'loading'}>
      <ScreenTitle id="review-title">Shop review</ScreenTitle>
      {loaded !== 'loading' && loaded !== 'ready' ? <p class="notice problem" role="alert">{loaded}</p> : null}
      <form class="review-filter" aria-label="Narrow the jobs" onSubmit={(event) => event.preventDefault()}>
        <div class="field">
          <label for="review-technician">Technician</label>
          <select id="review-technician" value={text.technicianId} onChange={(event) => set({ technicianId: event.currentTarget.value })}>
            <option value="">Everyone</option>
            {(answer?.technicianIds ?? []).map((id) => (
              <option key={id} value={id}>
                {technicianName(id)}
              </option>
            ))}
          </select>
        </div>
        <div class="pair">
          <div class="field">
            <label for="review-from">From (first day)</label>
            <input id="review-from" type="date" value={text.from} onInput={(event) => set({ from: event.currentTarget.value })} />
          </div>
          <div class="field">
            <label for="review-to">To (last day)</label>
            <input id="review-to" type="date" value={text.to} onInput={(event) => set({ to: event.currentTarget.value })} />
          </div>
        </div>
        <div class="pair">
          <div class="field">
            <label for="review-fault">Fault found</label>
            <select id="review-fault" value={text.fault} onChange={(event) => set({ fault: event.currentTarget.value })}>
              <option value="">Any</option>
              {(answer?.faults ?? []).map((fault) => (
                <option key={fault} value={fault}>
                  {faultWords(fault)}
                </option>
              ))}
              <option value="-">None recorded</option>
            </select>
          </div>
          <div class="field">
            <label for="review-topology">Supply kind</label>
            <select id="review-topology" value={text.topology} onChange={(event) => set({ topology: event.currentTarget.value })}>
              <option value="">Any</option>
              {(Object.keys(TOPOLOGY_WORDS) as Topology[]).map((topology) => (
                <option key={topology} value={topology}>
                  {TOPOLOGY_WORDS[topology]}
                </option>
              ))}
            </select>
          </div>
        </div>
        <div class="pair">
          <div class="field">
            <label for="review-customer">Customer or site</label>
            <input id="review-customer" type="search" autoComplete="off" value={text.customer} onInput={(event) => set({ customer: event.currentTarget.value })} />
          </div>
          <div class="field">
            <label for="review-asset">Unit (kind, make, model, serial)</label>
            <input id="review-asset" type="search" autoComplete="off" value={text.asset} onInput={(event) => set({ asset: event.currentTarget.value, assetId: '' })} />
          </div>
        </div>
        {answer?.assets && answer.assets.length > 0 ? (
          <div class="field">
            <label for="review-asset-id">One unit’s history</label>
            <select id="review-asset-id" value={text.assetId} onChange={(event) => set({ assetId: event.currentTarget.value })}>
              <option value="">All matching units ({answer.assets.length})</option>
              {answer.assets.map((asset) => (
                <option key={asset.id} value={asset.id}>
                  {asset.words} — {asset.jobs} job{asset.jobs === 1 ? '' : 's'}
                </option>
              ))}
            </select>
          </div>
        ) : answer?.assets === null ? (
          <p class="hint">To follow one unit’s readings across its visits, narrow the jobs to a few units first (by unit or customer).</p>
        ) : null}
        <button type="button" class="secondary" onClick={() => setText(NO_FILTER)}>
          Clear the filter
        </button>
      </form>
      <p role="status" class="review-count">
        {loaded === 'loading' || answer === null ? (
          <>
            <span class="spinner" aria-hidden="true" /> Reading the jobs…
          </>
        ) : (
          `${answer.matched.toLocaleString()} of ${answer.total.toLocaleString()} jobs${busy ? ' (updating…)' : ''}`
        )}
      </p>
      {answer !== null ? (
        <>
          <JobTable answer={answer} technicianName={technicianName} />
          <Lazy load={loadCharts} props={{ answer, technicianName, assetId: text.assetId || undefined } satisfies ChartsProps} what="charts" />
        </>
      ) : null}
    </section>
  );
}

function JobTable({ answer, technicianName }: { answer: ReviewAnswer; technicianName: (id: string) => string }) {
  if (answer.rows.length === 0) return <p>No job matches.</p>;
  return (
    <div class="table-scroll" role="region" aria-labelledby="review-table-caption" tabIndex={0}>
      <table class="review-table">
        <caption id="review-table-caption">
          {answer.matched > answer.rows.length ? `The ${answer.rows.length} most recent matching jobs` : 'Matching jobs'}, newest first
        </caption>
        <thead>
          <tr>
            <th scope="col">Date</th>
            <th scope="col">Customer and unit</th>
            <th scope="col">Technician</th>
            <th scope="col">Fault and outcome</th>
            <th scope="col">Minutes</th>
          </tr>
        </thead>
        <tbody>
          {answer.rows.map((row) => {
            const href = routeHash({ screen: 'job', jobId: row.id, tab: 'summary' });
            return (
              <tr key={row.id} class="clickable" onClick={(event) => (event.target as HTMLElement).closest('a') === null && navigate({ screen: 'job', jobId: row.id, tab: 'summary' })}>
                <td>
                  <a href={href}>{formatWhen(row.date)}</a>
                </td>
                <td>
                  <span class="review-customer">{row.customer || '—'}</span>
                  {row.asset ? <span class="review-unit">{row.asset}</span> : null}
                </td>
                <td>{technicianName(row.technicianId)}</td>
                <td>
                  {row.fault ? faultWords(row.fault) : 'No fault recorded'}
                  <span class="review-unit">{row.outcome ? (OUTCOME_WORDS[row.outcome] ?? row.outcome) : 'Open'}</span>
                </td>
                <td class="number">{row.minutes ?? '—'}</td>
              </tr>
            );
          })}
        </tbody>
      </table>
    </div>
  );
}
