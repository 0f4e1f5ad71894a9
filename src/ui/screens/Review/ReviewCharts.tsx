import {
  BarController,
  BarElement,
  CategoryScale,
  Chart,
  Legend,
  LinearScale,
  LineController,
  LineElement,
  PointElement,
  Tooltip,
  type ChartConfiguration,
} from 'chart.js';
import { useEffect, useRef, useState } from 'preact/hooks';
import { assetReadingSeries } from '../../../exchange/review';
import type { Reading } from '../../../model/job';
import { jobsForAsset } from '../../../store/jobs';
import { readingsForAsset } from '../../../store/readings';
import type { ReviewAnswer } from '../../../worker/review';
import { useApp } from '../../app-context';
import { formatWhen } from '../../format';
import { readingName } from '../../readings';
import { faultWords } from './words';

Chart.register(BarController, BarElement, CategoryScale, LinearScale, LineController, LineElement, PointElement, Legend, Tooltip);

export interface ChartsProps {
  answer: ReviewAnswer;
  technicianName: (id: string) => string;
  /** One unit picked in the filter: its readings across visits are drawn too. */
  assetId: string | undefined;
}

/** Colours from the theme, so the charts follow light, dark and high contrast. */
function themeColours() {
  const style = getComputedStyle(document.documentElement);
  const colour = (name: string, fallback: string) => style.getPropertyValue(name).trim() || fallback;
  return {
    ink: colour('--ink', '#10201a'),
    line: colour('--line', '#7e958b'),
    series: [colour('--accent', '#0b5d45'), colour('--bad', '#a3141c'), colour('--warn-line', '#8a5a00'), colour('--muted', '#3d4f47'), '#3a6fd8', '#b04fc0', '#2a9d8f', '#d26b1f'],
  };
}

function shorten(text: string, chars: number): string {
  return text.length > chars ? `${text.slice(0, chars - 1)}…` : text;
}

type AnyConfig = ChartConfiguration<'bar' | 'line', number[], string>;

/** One chart on a canvas, with its figures in words for screen readers. */
function ChartCanvas({ title, summary, config }: { title: string; summary: string; config: (colours: ReturnType<typeof themeColours>) => AnyConfig }) {
  const canvas = useRef<HTMLCanvasElement>(null);
  const made = config(themeColours());
  const key = JSON.stringify(made.data);
  useEffect(() => {
    if (canvas.current === null) return;
    const colours = themeColours();
    const built = config(colours);
    const axis = { ticks: { color: colours.ink }, grid: { color: colours.line + '55' } };
    const chart = new Chart(canvas.current, {
      ...built,
      options: {
        animation: false,
        responsive: true,
        maintainAspectRatio: false,
        color: colours.ink,
        ...built.options,
        scales: { x: { ...axis, ...(built.options?.scales?.x ?? {}) }, y: { ...axis, ...(built.options?.scales?.y ?? {}) } },
        plugins: { legend: { labels: { color: colours.ink, boxWidth: 14 } }, ...(built.options?.plugins ?? {}) },
      },
    } as AnyConfig);
    return () => chart.destroy();
  }, [key]);
  const id = `chart-${title.toLowerCase().replace(/[^a-z]+/g, '-')}`;
  return (
    <figure class="review-chart" aria-labelledby={id}>
      <figcaption id={id}>{title}</figcaption>
      <div class="chart-box">
        <canvas ref={canvas} role="img" aria-label={`${title}: ${summary}`} />
      </div>
    </figure>
  );
}

/** The review's charts over the matched jobs. */
export function ReviewCharts({ answer, technicianName, assetId }: ChartsProps) {
  const faults = [...new Set(answer.faultsByMonth.flatMap((month) => Object.keys(month.counts)))].sort();
  const months = answer.faultsByMonth.map((month) => month.month);
  const faultTotals = faults.map((fault) => [fault, answer.faultsByMonth.reduce((sum, month) => sum + (month.counts[fault] ?? 0), 0)] as const);
  const fixed = answer.fixRate.reduce((sum, month) => sum + month.firstVisitFixes, 0);
  const judged = answer.fixRate.reduce((sum, month) => sum + month.jobs, 0);
  return (
    <section class="review-charts" aria-labelledby="review-charts-title">
      <h2 id="review-charts-title">What the matching jobs show</h2>
      {assetId !== undefined ? <AssetChart assetId={assetId} /> : null}
      {months.length === 0 ? (
        <p>No finished job with a fault found among these.</p>
      ) : (
        <ChartCanvas
          title="Faults found by month"
          summary={faultTotals.map(([fault, n]) => `${faultWords(fault)} ${n}`).join(', ')}
          config={(c) => ({
            type: 'bar',
            data: {
              labels: months,
              datasets: faults.map((fault, i) => ({
                label: faultWords(fault),
                data: answer.faultsByMonth.map((month) => month.counts[fault] ?? 0),
                backgroundColor: c.series[i % c.series.length]!,
              })),
            },
            options: { scales: { x: { stacked: true }, y: { stacked: true, title: { display: true, text: 'jobs', color: c.ink } } } },
          })}
        />
      )}
      {answer.fixRate.length === 0 ? null : (
        <ChartCanvas
          title="Fixed on the first visit"
          summary={`${judged === 0 ? 0 : Math.round((100 * fixed) / judged)} % of ${judged} jobs fixed or not fixed were fixed with no return within 30 days`}
          config={(c) => ({
            type: 'bar',
            data: {
              labels: answer.fixRate.map((month) => month.month),
              datasets: [
                {
                  label: '% fixed first time',
                  data: answer.fixRate.map((month) => (month.jobs === 0 ? 0 : Math.round((1000 * month.firstVisitFixes) / month.jobs) / 10)),
                  backgroundColor: c.series[0]!,
                },
              ],
            },
            options: { scales: { y: { min: 0, max: 100, title: { display: true, text: '%', color: c.ink } } } },
          })}
        />
      )}
      {answer.timeOnJob.length === 0 ? null : (
        <ChartCanvas
          title="Time on the job by technician (median)"
          summary={answer.timeOnJob.map((entry) => `${technicianName(entry.technicianId)} ${Math.round(entry.medianMinutes)} min over ${entry.jobs} jobs`).join(', ')}
          config={(c) => ({
            type: 'bar',
            data: {
              labels: answer.timeOnJob.map((entry) => technicianName(entry.technicianId)),
              datasets: [{ label: 'minutes (median)', data: answer.timeOnJob.map((entry) => Math.round(entry.medianMinutes)), backgroundColor: c.series[0]! }],
            },
          })}
        />
      )}
      {answer.parts.length === 0 ? null : (
        <ChartCanvas
          title="Parts used"
          summary={answer.parts.map(([part, n]) => `${part} ${n}`).join(', ')}
          config={(c) => ({
            type: 'bar',
            data: { labels: answer.parts.map(([part]) => part), datasets: [{ label: 'times used', data: answer.parts.map(([, n]) => n), backgroundColor: c.series[2]! }] },
            options: {
              indexAxis: 'y',
              // Long part names would push the bars off a phone; the full names are in the label.
              scales: { y: { ticks: { callback: (_value, i) => shorten(answer.parts[i]?.[0] ?? '', 22) } } },
            },
          })}
        />
      )}
    </section>
  );
}

const SERIES_KINDS: Reading['kind'][] = ['dcOut', 'rippleAc', 'acSecondary', 'capacitance', 'esr', 'regulatorOut'];

/** One unit's readings of one kind across its visits, with the bands they were judged against. */
function AssetChart({ assetId }: { assetId: string }) {
  const { db } = useApp();
  const [records, setRecords] = useState<Parameters<typeof assetReadingSeries>[0] | null>(null);
  const [kind, setKind] = useState<Reading['kind']>('dcOut');
  useEffect(() => {
    let live = true;
    void Promise.all([jobsForAsset(db, assetId), readingsForAsset(db, assetId)]).then(([jobs, readings]) => live && setRecords({ jobs, readings }));
    return () => {
      live = false;
    };
  }, [db, assetId]);
  if (records === null) return <p class="loading" role="status">Reading the unit’s history…</p>;
  const kinds = SERIES_KINDS.filter((k) => records.readings.some((r) => r.kind === k));
  const series = assetReadingSeries(records, assetId, kind).filter((point) => typeof point.value === 'number');
  return (
    <div class="asset-series">
      {kinds.length > 1 ? (
        <div class="field">
          <label for="review-series-kind">Reading to follow</label>
          <select id="review-series-kind" value={kind} onChange={(event) => setKind(event.currentTarget.value as Reading['kind'])}>
            {kinds.map((k) => (
              <option key={k} value={k}>
                {readingName(k)}
              </option>
            ))}
          </select>
        </div>
      ) : null}
      {series.length === 0 ? (
        <p>This unit has no {readingName(kind).toLowerCase()} reading.</p>
      ) : (
        <ChartCanvas
          title={`This unit’s ${readingName(kind).toLowerCase()} across visits`}
          summary={series.map((point) => `${formatWhen(point.takenAt)}: ${point.value}`).join('; ')}
          config={(c) => ({
            type: 'line',
            data: {
              labels: series.map((point) => point.takenAt.slice(0, 10)),
              datasets: [
                { label: 'measured', data: series.map((point) => point.value as number), borderColor: c.series[1]!, backgroundColor: c.series[1]!, borderWidth: 2.5 },
                { label: 'band, low', data: series.map((point) => point.expectedLow ?? Number.NaN), borderColor: c.ink, borderDash: [6, 4], pointRadius: 0, borderWidth: 1.5 },
                { label: 'band, high', data: series.map((point) => point.expectedHigh ?? Number.NaN), borderColor: c.ink, borderDash: [6, 4], pointRadius: 0, borderWidth: 1.5 },
              ],
            },
          })}
        />
      )}
    </div>
  );
}
