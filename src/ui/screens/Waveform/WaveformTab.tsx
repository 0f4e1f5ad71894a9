import { Chart, Legend, LinearScale, LineController, LineElement, PointElement, Tooltip, type ChartDataset } from 'chart.js';
import { useEffect, useRef } from 'preact/hooks';
import type { SupplyResult } from '../../../engine/types';
import { useApp } from '../../app-context';
import { formatMeterValue } from '../../format';
import { bandFor, latestBySlot } from '../../readings';
import { routeHash } from '../../router';
import type { TabProps } from '../Job/JobScreen';
import { useExpect } from '../Supply/use-expect';

Chart.register(LineController, LineElement, PointElement, LinearScale, Legend, Tooltip);

const WAVE_POINTS = 240;
/** Peak-to-peak over RMS of a sawtooth ripple, 2√3 (DOMAIN.md §2). */
const SAWTOOTH_PP_PER_RMS = 2 * Math.sqrt(3);

export interface WaveformLines {
  /** Expected output over one period: time in ms, volts. */
  expected: { x: number; y: number }[];
  regulated: { x: number; y: number }[] | null;
  bandLow: number | null;
  bandHigh: number | null;
  measuredDc: number | null;
  /** Measured ripple drawn as a sawtooth's extremes around the measured DC. */
  measuredRipplePp: number | null;
  periodMs: number;
}

/** The lines to draw: the engine's waveform, the DC band, and what was measured. */
export function waveformLines(result: SupplyResult, band: { low: number; high: number } | undefined, dc: number | null, rippleRms: number | null): WaveformLines | null {
  const wave = result.waveform;
  if (wave === undefined || wave.t.length === 0) return null;
  const expected = wave.t.map((t, i) => ({ x: t * 1e3, y: wave.vOut[i] ?? 0 }));
  const regulated = wave.vRegulated ? wave.t.map((t, i) => ({ x: t * 1e3, y: wave.vRegulated![i] ?? 0 })) : null;
  const periodMs = (wave.t[wave.t.length - 1] ?? 0) * 1e3;
  return {
    expected,
    regulated,
    bandLow: band?.low ?? null,
    bandHigh: band?.high ?? null,
    measuredDc: dc,
    measuredRipplePp: rippleRms === null ? null : rippleRms * SAWTOOTH_PP_PER_RMS,
    periodMs,
  };
}

function flat(y: number, periodMs: number) {
  return [
    { x: 0, y },
    { x: periodMs, y },
  ];
}

/** The expected output waveform with the band and the measured DC and ripple over it (chart.js). */
export function WaveformTab({ data, diagnosis }: TabProps) {
  const { engine, settings } = useApp();
  const { job } = data;
  const { result, error } = useExpect(engine, job.supply, WAVE_POINTS);
  const canvas = useRef<HTMLCanvasElement>(null);
  const latest = latestBySlot(data.readings, 'before');
  const dcReading = latest.get('dcOut')?.value;
  const rippleReading = latest.get('rippleAc')?.value;
  const dc = typeof dcReading === 'number' ? dcReading : null;
  const ripple = typeof rippleReading === 'number' ? rippleReading : null;
  const band = bandFor(diagnosis.answer?.diagnosis.bands ?? [], 'dcOut');
  const lines = result === null ? null : waveformLines(result, band, dc, ripple);

  useEffect(() => {
    if (lines === null || canvas.current === null) return;
    const style = getComputedStyle(document.documentElement);
    const colour = (name: string, fallback: string) => style.getPropertyValue(name).trim() || fallback;
    const ink = colour('--ink', '#10201a');
    const datasets: ChartDataset<'line', { x: number; y: number }[]>[] = [
      { label: 'Expected output', data: lines.expected, borderColor: colour('--accent', '#0b5d45'), borderWidth: 3, pointRadius: 0 },
    ];
    if (lines.regulated) datasets.push({ label: 'Regulated output', data: lines.regulated, borderColor: colour('--muted', '#3d4f47'), borderWidth: 2, pointRadius: 0 });
    if (lines.bandLow !== null && lines.bandHigh !== null) {
      datasets.push(
        { label: 'DC band, low', data: flat(lines.bandLow, lines.periodMs), borderColor: ink, borderDash: [6, 4], borderWidth: 1.5, pointRadius: 0 },
        { label: 'DC band, high', data: flat(lines.bandHigh, lines.periodMs), borderColor: ink, borderDash: [6, 4], borderWidth: 1.5, pointRadius: 0 },
      );
    }
    if (lines.measuredDc !== null) {
      datasets.push({ label: 'Measured DC', data: flat(lines.measuredDc, lines.periodMs), borderColor: colour('--bad', '#a3141c'), borderWidth: 2.5, pointRadius: 0 });
      if (lines.measuredRipplePp !== null) {
        const half = lines.measuredRipplePp / 2;
        datasets.push(
          { label: 'Measured ripple, top', data: flat(lines.measuredDc + half, lines.periodMs), borderColor: colour('--bad', '#a3141c'), borderDash: [2, 3], borderWidth: 2, pointRadius: 0 },
          { label: 'Measured ripple, bottom', data: flat(lines.measuredDc - half, lines.periodMs), borderColor: colour('--bad', '#a3141c'), borderDash: [2, 3], borderWidth: 2, pointRadius: 0 },
        );
      }
    }
    const chart = new Chart(canvas.current, {
      type: 'line',
      data: { datasets },
      options: {
        animation: false,
        responsive: true,
        maintainAspectRatio: false,
        parsing: false,
        color: ink,
        scales: {
          x: { type: 'linear', title: { display: true, text: 'time, ms', color: ink }, ticks: { color: ink }, min: 0, max: lines.periodMs },
          y: { type: 'linear', title: { display: true, text: 'volts', color: ink }, ticks: { color: ink } },
        },
        plugins: { legend: { labels: { color: ink, boxWidth: 18 } } },
      },
    });
    return () => chart.destroy();
  }, [lines === null ? '' : JSON.stringify([lines.bandLow, lines.bandHigh, lines.measuredDc, lines.measuredRipplePp, lines.expected.length, result?.dc])]);

  if (job.supply === undefined) {
    return (
      <p class="notice">
        Describe the supply first. <a href={routeHash({ screen: 'job', jobId: job.id, tab: 'supply' })}>Go to the supply</a>
      </p>
    );
  }
  if (error !== null) return <p class="notice problem" role="alert">The waveform could not be worked out: {error}</p>;
  if (result === null || lines === null) return <p class="loading" role="status">Working out the waveform…</p>;
  const decimal = settings.units.decimal;
  return (
    <div class="tab waveform-tab">
      <div class="chart-box">
        <canvas
          ref={canvas}
          role="img"
          aria-label={`Expected output over one cycle: ${formatMeterValue(result.dc, 'V', decimal)} DC with ${formatMeterValue(result.ripplePp, 'V', decimal)} of ripple peak to peak`}
        />
      </div>
      <table class="readings">
        <caption>Expected and measured</caption>
        <thead>
          <tr>
            <th scope="col">Figure</th>
            <th scope="col">Expected</th>
            <th scope="col">Measured</th>
          </tr>
        </thead>
        <tbody>
          <tr>
            <th scope="row">DC</th>
            <td>{band ? `${formatMeterValue(band.low, 'V', decimal)} – ${formatMeterValue(band.high, 'V', decimal)}` : formatMeterValue(result.dc, 'V', decimal)}</td>
            <td>{dc === null ? '—' : formatMeterValue(dc, 'V', decimal)}</td>
          </tr>
          <tr>
            <th scope="row">Ripple, peak to peak</th>
            <td>{formatMeterValue(result.ripplePp, 'V', decimal)}</td>
            <td>{lines.measuredRipplePp === null ? '—' : `about ${formatMeterValue(lines.measuredRipplePp, 'V', decimal)}`}</td>
          </tr>
          <tr>
            <th scope="row">Ripple frequency</th>
            <td>{formatMeterValue(result.rippleHz, 'Hz', decimal)}</td>
            <td>{typeof latest.get('rippleHz')?.value === 'number' ? formatMeterValue(latest.get('rippleHz')!.value, 'Hz', decimal) : '—'}</td>
          </tr>
        </tbody>
      </table>
      <p class="hint">
        The measured ripple is drawn from the AC reading as a sawtooth (peak to peak ≈ 3.46 × the AC volts); a scope shows its real shape.
      </p>
    </div>
  );
}
