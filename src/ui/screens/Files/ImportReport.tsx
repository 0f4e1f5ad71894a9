import { useEffect, useRef } from 'preact/hooks';
import { formatProblem } from '../../../exchange/parse';
import type { FileImportReport } from '../../../exchange/import';
import { formatWhen } from '../../format';

type Taken = Extract<FileImportReport, { ok: true }>;

function plural(n: number, word: string): string {
  return `${n} ${word}${n === 1 ? '' : 's'}`;
}

function valueWords(value: unknown): string {
  if (value === undefined || value === null || value === '') return '(empty)';
  if (typeof value === 'string') return value;
  return JSON.stringify(value);
}

function cameIn(report: Taken): string {
  const { jobs, readings, assets, technicians } = report.counts;
  const parts = [
    jobs.added > 0 ? `${plural(jobs.added, 'new job')}` : '',
    jobs.updated > 0 ? `${plural(jobs.updated, 'job')} brought up to date` : '',
    readings.added > 0 ? `${plural(readings.added, 'new reading')}` : '',
    assets.added > 0 ? `${plural(assets.added, 'new unit')}` : '',
    assets.updated > 0 ? `${plural(assets.updated, 'unit')} changed` : '',
    technicians.added > 0 ? `${plural(technicians.added, 'new technician')}` : '',
  ].filter(Boolean);
  return parts.length === 0 ? 'Nothing new: everything in it was already here.' : `${parts.join(', ')}.`;
}

/** What each chosen file brought in, why a refused one brought nothing, and the merge conflicts. */
export function ImportReport({ reports }: { reports: readonly FileImportReport[] }) {
  const taken = reports.filter((report): report is Taken => report.ok);
  const refused = reports.length - taken.length;
  const heading = useRef<HTMLHeadingElement>(null);
  // Keyboard and screen-reader users land on the outcome, not back on the file button.
  useEffect(() => heading.current?.focus(), [reports]);
  return (
    <section class="import-report" aria-labelledby="import-report-title">
      <h3 id="import-report-title" tabIndex={-1} ref={heading}>
        {plural(taken.length, 'file')} taken in{refused > 0 ? `, ${plural(refused, 'file')} left out` : ''}
      </h3>
      <ul class="report-list">
        {reports.map((report, index) => (
          <li key={`${index}:${report.name}`} class={report.ok ? 'report-ok' : 'report-refused'}>
            <p class="report-file">
              <span class="verdict">{report.ok ? '✓ Taken in' : '✗ Left out'}</span> {report.name}
            </p>
            {report.ok ? <FileTaken report={report} /> : <FileRefused report={report} />}
          </li>
        ))}
      </ul>
    </section>
  );
}

function FileTaken({ report }: { report: Taken }) {
  const conflicts = report.newConflicts.length + report.newRecordConflicts.length;
  return (
    <>
      <p>
        {plural(report.jobs, 'job')} and {plural(report.readings, 'reading')} in the file, sent {formatWhen(report.exportedAt)}
        {report.exportedBy.name ? ` by ${report.exportedBy.name}` : ''}. {cameIn(report)}
      </p>
      {report.readingClashes.length > 0 ? (
        <p>{plural(report.readingClashes.length, 'reading')} had the same id as a different reading here; both are kept.</p>
      ) : null}
      {conflicts > 0 ? (
        <table class="conflicts">
          <caption>Fields changed in two places: the newer edit was kept, the other is recorded here</caption>
          <thead>
            <tr>
              <th scope="col">Record and field</th>
              <th scope="col">Kept</th>
              <th scope="col">Dropped</th>
              <th scope="col">Dropped value from</th>
            </tr>
          </thead>
          <tbody>
            {report.newConflicts.map((conflict, i) => (
              <tr key={`j${i}`}>
                <th scope="row">job {conflict.jobId.slice(0, 8)}: {conflict.field}</th>
                <td>{valueWords(conflict.kept)}</td>
                <td>{valueWords(conflict.dropped)}</td>
                <td>{conflict.droppedFrom ?? '—'}</td>
              </tr>
            ))}
            {report.newRecordConflicts.map((conflict, i) => (
              <tr key={`r${i}`}>
                <th scope="row">{conflict.record === 'asset' ? 'unit' : 'technician'} {conflict.id.slice(0, 8)}: {conflict.field}</th>
                <td>{valueWords(conflict.kept)}</td>
                <td>{valueWords(conflict.dropped)}</td>
                <td>{conflict.droppedFrom ?? '—'}</td>
              </tr>
            ))}
          </tbody>
        </table>
      ) : null}
    </>
  );
}

function FileRefused({ report }: { report: Extract<FileImportReport, { ok: false }> }) {
  const unlisted = report.problemCount - report.problems.length;
  return (
    <>
      <p>Nothing from this file was stored{report.stage === 'store' ? ' (it was fine, but saving it failed)' : ''}.</p>
      <ul class="problems">
        {report.problems.map((problem, i) => (
          <li key={i}>{formatProblem(problem)}</li>
        ))}
        {unlisted > 0 ? <li>and {plural(unlisted, 'more problem')}</li> : null}
      </ul>
    </>
  );
}
