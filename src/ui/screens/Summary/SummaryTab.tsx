import { DISCHARGE_CAUTION, FAULTS, MAINS_CAUTION } from '../../../engine/diagnosis';
import type { FaultId, ReadingBand } from '../../../engine/diagnosis/types';
import type { Reading } from '../../../model/job';
import { useApp } from '../../app-context';
import { Caution } from '../../components/Caution';
import { VerdictBadge } from '../../components/VerdictBadge';
import { formatBand, formatMeterValue, formatWhen } from '../../format';
import { bandFor, latestBySlot, readingName, UNITS } from '../../readings';
import { routeHash } from '../../router';
import type { TabProps } from '../Job/JobScreen';

const OUTCOME_WORDS = { fixed: 'Fixed', 'not-fixed': 'Not fixed', referred: 'Referred', 'no-fault-found': 'No fault found' } as const;

/**
 * The job on one screen: who, what, the readings before and after with their bands and
 * verdicts, the fault and the repair, and the safety cautions. It is also the printed job
 * report (styles.css "@media print" leaves only this), via the browser's Print or Print → PDF.
 */
export function SummaryTab({ data, diagnosis }: TabProps) {
  const { technicians, settings } = useApp();
  const { job, asset } = data;
  const before = [...latestBySlot(data.readings, 'before').values()];
  const after = [...latestBySlot(data.readings, 'after').values()];
  const finish = job.finish;
  const minutes = job.finishedAt && job.startedAt ? Math.round((Date.parse(job.finishedAt) - Date.parse(job.startedAt)) / 60_000) : null;
  const leading = diagnosis.answer?.diagnosis.ranked.slice(0, 3) ?? [];
  const decimal = settings.units.decimal;
  const earlierJobs = [...data.historyJobs.values()];
  const bands = diagnosis.answer?.diagnosis.bands ?? [];
  return (
    <div class="tab summary-tab">
      <div class="button-row no-print">
        <button type="button" class="secondary" onClick={() => print()}>
          Print the report
        </button>
        <a class="button secondary" href={routeHash({ screen: 'files', jobId: job.id })}>
          Send this job
        </a>
      </div>
      <p class="print-only">Ripplewright job report, printed {new Date().toLocaleString('en-GB')}. Job {job.id}.</p>
      <dl class="summary">
        <dt>Status</dt>
        <dd>{job.status === 'finished' ? `Finished ${job.finishedAt ? formatWhen(job.finishedAt) : ''}${finish?.outcome ? ` — ${OUTCOME_WORDS[finish.outcome]}` : ''}` : 'Open'}</dd>
        <dt>Customer</dt>
        <dd>{job.customer}{job.site ? `, ${job.site}` : ''}</dd>
        <dt>Unit</dt>
        <dd>{asset ? [asset.kind, asset.make, asset.model, asset.serial ? `serial ${asset.serial}` : '', asset.tag ? `tag ${asset.tag}` : ''].filter(Boolean).join(', ') : '—'}</dd>
        <dt>Technician</dt>
        <dd>{technicians.find((t) => t.id === job.technicianId)?.name ?? '—'}</dd>
        <dt>Complaint</dt>
        <dd>{job.complaint || '—'}</dd>
        <dt>Supply</dt>
        <dd>{supplyWords(job.nameplate, job.supply?.topology)}</dd>
        {minutes === null ? null : (
          <>
            <dt>Time on the job</dt>
            <dd>{minutes} min</dd>
          </>
        )}
        <dt>Fault found</dt>
        <dd>{finish?.faultFound ? (FAULTS[finish.faultFound as FaultId]?.name ?? finish.faultFound) : '—'}{finish?.suspectedPart ? ` (${finish.suspectedPart})` : ''}</dd>
        <dt>Action</dt>
        <dd>{finish?.actionTaken ?? '—'}</dd>
        <dt>Parts used</dt>
        <dd>{finish && finish.partsUsed.length > 0 ? finish.partsUsed.join('; ') : 'none'}</dd>
        {finish?.notes ? (
          <>
            <dt>Notes</dt>
            <dd>{finish.notes}</dd>
          </>
        ) : null}
      </dl>
      <ReadingTable caption="Readings before the repair" readings={before} decimal={decimal} bands={bands} />
      <ReadingTable caption="Re-test after the repair" readings={after} decimal={decimal} bands={bands} />
      {leading.length > 0 && before.length > 0 ? (
        <section aria-labelledby="summary-ranking">
          <h2 id="summary-ranking">What the readings pointed to</h2>
          <ol>
            {leading.map((fault) => (
              <li key={`${fault.fault}:${fault.part ?? ''}`}>
                {FAULTS[fault.fault].name}
                {fault.part ? ` (${fault.part})` : ''}: {Math.round(fault.probability * 100)} %
              </li>
            ))}
          </ol>
        </section>
      ) : null}
      {earlierJobs.length === 0 ? null : (
        <section aria-labelledby="summary-history">
          <h2 id="summary-history">Earlier jobs on this unit</h2>
          <ul>
            {earlierJobs.map((other) => (
              <li key={other.id}>
                <a href={routeHash({ screen: 'job', jobId: other.id, tab: 'summary' })}>
                  {formatWhen(other.createdAt)}: {other.complaint || 'no complaint recorded'}
                  {other.finish?.outcome ? ` — ${OUTCOME_WORDS[other.finish.outcome]}` : ''}
                </a>
              </li>
            ))}
          </ul>
        </section>
      )}
      <section aria-labelledby="summary-safety">
        <h2 id="summary-safety">Safety</h2>
        <Caution title="Live readings">{MAINS_CAUTION}</Caution>
        <Caution title="Power-off tests">{DISCHARGE_CAUTION}</Caution>
      </section>
      {job.status === 'open' ? (
        <a class="button primary" href={routeHash({ screen: 'job', jobId: job.id, tab: 'finish' })}>
          Finish the job
        </a>
      ) : null}
    </div>
  );
}

/**
 * The band a reading was judged against, as stored with it; a part that should read overload
 * (a diode's reverse test) says so, as the diagnosis's band for it does.
 */
function expectedWords(reading: Reading, bands: readonly ReadingBand[], decimal: 'point' | 'comma'): string {
  const band = bandFor(bands, reading.kind, reading.target);
  if (band?.expectOverload) return formatBand(band, decimal);
  // The diagnosis stores an overload band with both ends at the meter's diode-test volts (rank.ts),
  // so equal ends mean "reads OL" even before the diagnosis has answered.
  if (reading.expectedLow !== undefined && reading.expectedLow === reading.expectedHigh) return 'OL (overload)';
  if (reading.expectedLow !== undefined && reading.expectedHigh !== undefined) {
    return `${formatMeterValue(reading.expectedLow, UNITS[reading.kind], decimal)} – ${formatMeterValue(reading.expectedHigh, UNITS[reading.kind], decimal)}`;
  }
  return band === undefined ? '—' : formatBand(band, decimal);
}

function ReadingTable({ caption, readings, decimal, bands }: { caption: string; readings: Reading[]; decimal: 'point' | 'comma'; bands: readonly ReadingBand[] }) {
  if (readings.length === 0) return null;
  return (
    <table class="readings">
      <caption>{caption}</caption>
      <thead>
        <tr>
          <th scope="col">Reading</th>
          <th scope="col">Value</th>
          <th scope="col">Expected</th>
          <th scope="col">Verdict</th>
        </tr>
      </thead>
      <tbody>
        {readings.map((reading) => (
          <tr key={reading.id}>
            <th scope="row">{readingName(reading.kind, reading.target)}</th>
            <td>{formatMeterValue(reading.value, UNITS[reading.kind], decimal)}</td>
            <td>{expectedWords(reading, bands, decimal)}</td>
            <td>{reading.verdict ? <VerdictBadge verdict={reading.verdict} /> : '—'}</td>
          </tr>
        ))}
      </tbody>
    </table>
  );
}

function supplyWords(nameplate: TabProps['data']['job']['nameplate'], topology: string | undefined): string {
  if (nameplate === undefined || topology === undefined) return 'not described';
  const parts = [
    { 'half-wave': 'half-wave', 'center-tap': 'centre-tapped full-wave', bridge: 'bridge', doubler: 'voltage doubler' }[topology] ?? topology,
    nameplate.secondaryVolts !== undefined ? `${nameplate.secondaryVolts} V${nameplate.transformerVa !== undefined ? ` ${nameplate.transformerVa} VA` : ''} transformer` : 'no transformer',
    nameplate.capacitorMicrofarads !== undefined ? `${nameplate.capacitorMicrofarads} µF${nameplate.capacitorVoltRating ? ` ${nameplate.capacitorVoltRating} V` : ''}` : 'no capacitor',
    nameplate.regulator && nameplate.regulator !== 'none' ? `${nameplate.regulator} regulator` : '',
    nameplate.loadText ? `load ${nameplate.loadText}` : '',
  ];
  return parts.filter(Boolean).join(', ');
}
