import { FAULTS, FAULT_IDS } from '../../../engine/diagnosis';
import type { FaultId, ReadingKind } from '../../../engine/diagnosis/types';
import type { JobFinish, JobOutcome } from '../../../model/job';
import { useApp } from '../../app-context';
import { ReadingEntry } from '../../components/ReadingEntry';
import { TextField } from '../../components/TextField';
import { bandFor, latestBySlot, readingName, slotKey } from '../../readings';
import { navigate } from '../../router';
import { useDraft } from '../../use-draft';
import type { TabProps } from '../Job/JobScreen';

const OUTCOMES: { outcome: JobOutcome; words: string }[] = [
  { outcome: 'fixed', words: 'Fixed' },
  { outcome: 'not-fixed', words: 'Not fixed' },
  { outcome: 'referred', words: 'Referred to someone else' },
  { outcome: 'no-fault-found', words: 'No fault found' },
];

/** Readings worth repeating after a repair, when the supply has them. */
const RETEST: readonly ReadingKind[] = ['acSecondary', 'dcOut', 'rippleAc', 'rippleHz', 'regulatorOut'];

type FinishForm = Record<string, string> & { suspectedPart: string; faultFound: string; actionTaken: string; partsUsed: string; outcome: string; notes: string };

/** The form from the job's finish, or the diagnosis's leading fault for a job not finished yet. */
function initialForm(finish: JobFinish | undefined, leading: { fault: FaultId; part?: string } | undefined): FinishForm {
  return {
    suspectedPart: finish?.suspectedPart ?? leading?.part ?? '',
    faultFound: finish?.faultFound ?? (leading && leading.fault !== 'healthy' ? leading.fault : ''),
    actionTaken: finish?.actionTaken ?? '',
    partsUsed: (finish?.partsUsed ?? []).join('\n'),
    outcome: finish?.outcome ?? '',
    notes: finish?.notes ?? '',
  };
}

function toFinish(form: FinishForm): JobFinish {
  const finish: JobFinish = { partsUsed: form.partsUsed.split(/\n/).map((part) => part.trim()).filter((part) => part !== '') };
  if (form.suspectedPart.trim() !== '') finish.suspectedPart = form.suspectedPart.trim();
  if (form.faultFound !== '') finish.faultFound = form.faultFound;
  if (form.actionTaken.trim() !== '') finish.actionTaken = form.actionTaken.trim();
  if (form.outcome !== '') finish.outcome = form.outcome as JobOutcome;
  if (form.notes.trim() !== '') finish.notes = form.notes.trim();
  return finish;
}

/** Suspected part, action, parts, the re-test after the repair, notes and outcome; then close the job. */
export function FinishTab({ data, actions, diagnosis }: TabProps) {
  const { db, saver, settings } = useApp();
  const { job } = data;
  const leading = diagnosis.answer?.diagnosis.ranked[0];
  const draft = useDraft<FinishForm>(db, saver, `${job.id}:finish`, () => initialForm(job.finish, leading), 'the finish notes', true);
  const form = draft.values;
  if (form === null) return <p class="loading" role="status">Opening the finish…</p>;
  const bands = diagnosis.answer?.diagnosis.bands ?? [];
  const after = latestBySlot(data.readings, 'after');
  const finished = job.status === 'finished';

  const change = (patch: Partial<FinishForm>) => {
    const next = draft.change(patch);
    void actions.setFields({ finish: toFinish(next) }, 'the finish notes');
  };
  const text = (field: keyof FinishForm & string, label: string, extra: { hint?: string; long?: boolean } = {}) => (
    <TextField id={`finish-${field}`} kind={extra.long ? 'long' : 'text'} label={label} hint={extra.hint} value={form[field] ?? ''} onInput={(value) => change({ [field]: value })} />
  );

  const close = async () => {
    const ok = await actions.setFields({ finish: toFinish(form), status: 'finished' }, 'the finished job');
    if (ok) navigate({ screen: 'job', jobId: job.id, tab: 'summary' });
  };

  return (
    <div class="tab finish-tab">
      {leading && leading.fault !== 'healthy' ? (
        <p class="notice">
          The readings point most to: <strong>{FAULTS[leading.fault].name}{leading.part ? ` (${leading.part})` : ''}</strong>, {Math.round(leading.probability * 100)} %.{' '}
          {form.faultFound === leading.fault && (leading.part === undefined || form.suspectedPart === leading.part) ? null : (
            <button type="button" class="link-button" onClick={() => change({ faultFound: leading.fault, ...(leading.part ? { suspectedPart: leading.part } : {}) })}>
              Use this
            </button>
          )}
        </p>
      ) : null}
      <fieldset>
        <legend>The repair</legend>
        {text('suspectedPart', 'Suspected part', { hint: 'e.g. C1, D3, the fuse, the transformer.' })}
        <div class="field">
          <label for="finish-faultFound">Fault found</label>
          <select id="finish-faultFound" value={form.faultFound} onChange={(event) => change({ faultFound: event.currentTarget.value })}>
            <option value="">Not decided</option>
            {FAULT_IDS.map((id) => (
              <option key={id} value={id}>{FAULTS[id].name}</option>
            ))}
          </select>
        </div>
        {text('actionTaken', 'Action taken', { long: true })}
        {text('partsUsed', 'Parts used', { long: true, hint: 'One per line, e.g. “1000 µF 25 V electrolytic”.' })}
      </fieldset>

      <fieldset>
        <legend>Re-test after the repair</legend>
        <p class="hint">Power on again and take the main readings once more.</p>
        {RETEST.filter((kind) => bandFor(bands, kind) !== undefined).map((kind) => {
          const key = `entry-after:${slotKey(kind)}`;
          return (
            <ReadingEntry
              key={kind}
              id={`after-${kind}`}
              kind={kind}
              band={bandFor(bands, kind)}
              units={settings.units}
              latest={after.get(slotKey(kind))}
              labelSuffix="after the repair"
              draftText={form[key] ?? ''}
              onDraft={(value) => draft.change({ [key]: value })}
              onSave={async (entry) => {
                const stored = await actions.addReading(
                  {
                    kind,
                    value: entry.value,
                    text: entry.text,
                    phase: 'after',
                    ...(entry.band === undefined ? {} : { expectedLow: entry.band.low, expectedHigh: entry.band.high }),
                    ...(entry.verdict === undefined ? {} : { verdict: entry.verdict }),
                  },
                  `the ${readingName(kind)} re-test`,
                );
                if (stored !== null) draft.change({ [key]: '' });
                return stored !== null;
              }}
            />
          );
        })}
        {bands.length === 0 ? <p class="hint">Describe the supply to get the expected readings.</p> : null}
      </fieldset>

      <fieldset>
        <legend>Outcome</legend>
        {OUTCOMES.map((o) => (
          <label class="choice" key={o.outcome}>
            <input type="radio" name="outcome" value={o.outcome} checked={form.outcome === o.outcome} onChange={() => change({ outcome: o.outcome })} />
            {o.words}
          </label>
        ))}
        {text('notes', 'Notes', { long: true })}
      </fieldset>
      {finished ? (
        <button type="button" class="secondary" onClick={() => void actions.setFields({ status: 'open' }, 'the reopened job')}>
          Reopen the job
        </button>
      ) : (
        <button type="button" class="primary" onClick={() => void close()}>
          Close the job
        </button>
      )}
    </div>
  );
}
