import { useState } from 'preact/hooks';
import { parseMeterText } from '../../engine/diagnosis';
import type { MeterValue, ReadingBand, ReadingKind, Verdict } from '../../engine/diagnosis/types';
import type { Reading } from '../../model/job';
import type { UnitSettings } from '../../store/settings';
import { formatBand, formatMeterValue, formatWhen } from '../format';
import { assumedPrefix, inputUnit, readingName, UNITS, verdictFor } from '../readings';
import { FieldError } from './TextField';
import { VerdictBadge } from './VerdictBadge';

export interface EnteredReading {
  text: string;
  value: MeterValue;
  verdict?: Verdict;
  band?: ReadingBand;
}

export interface ReadingEntryProps {
  /** Base of the element ids. */
  id: string;
  kind: ReadingKind;
  target?: string | undefined;
  band?: ReadingBand | undefined;
  units: UnitSettings;
  /** The standing reading of this slot, if one was taken. */
  latest?: Reading | undefined;
  /** The same reading on this asset's earlier jobs, newest first. */
  history?: Reading[];
  /** Text typed and not yet entered (kept in the drafts store by the caller). */
  draftText: string;
  onDraft: (text: string) => void;
  /** Stores the reading; resolves to false when the write failed. */
  onSave: (entry: EnteredReading) => Promise<boolean>;
  disabled?: boolean;
  /** Words beside the label, e.g. "after the repair". */
  labelSuffix?: string;
}

type Status = { state: 'idle' } | { state: 'saving' | 'saved' | 'failed'; entry: EnteredReading };

/**
 * One reading: the expected band first, then the value as typed ("4,25", "425mV", "OL"),
 * entered with Enter, the button or by leaving the field. Its verdict shows at once; "Saved"
 * only once the write has finished.
 */
export function ReadingEntry({ id, kind, target, band, units, latest, history = [], draftText, onDraft, onSave, disabled = false, labelSuffix }: ReadingEntryProps) {
  const [status, setStatus] = useState<Status>({ state: 'idle' });
  const [problem, setProblem] = useState<string | undefined>(undefined);
  const unit = UNITS[kind];
  const inputId = `${id}-value`;
  const bandId = `${id}-band`;

  const commit = async () => {
    const text = draftText.trim();
    if (text === '' || disabled) return;
    if (status.state !== 'idle' && status.entry.text === text && status.state !== 'failed') return;
    if (status.state === 'idle' && latest?.text === text) return;
    const parsed = parseMeterText(text, unit, assumedPrefix(kind, units));
    if (!parsed.ok) {
      setProblem(`${parsed.message}. Type the number the meter shows, e.g. ${example(kind)}, or OL.`);
      return;
    }
    setProblem(undefined);
    const entry: EnteredReading = { text, value: parsed.value };
    if (band !== undefined) {
      entry.band = band;
      entry.verdict = verdictFor(parsed.value, band);
    }
    setStatus({ state: 'saving', entry });
    const ok = await onSave(entry);
    setStatus({ state: ok ? 'saved' : 'failed', entry });
  };

  const shown: { value: MeterValue; verdict?: Verdict; saved: Status['state'] } | null =
    status.state !== 'idle'
      ? { value: status.entry.value, saved: status.state, ...(status.entry.verdict ? { verdict: status.entry.verdict } : {}) }
      : latest !== undefined
        ? { value: latest.value, saved: 'saved', ...(band ? { verdict: verdictFor(latest.value, band) } : {}) }
        : null;

  return (
    <div
      class="reading-entry"
      data-reading={target === undefined ? kind : `${kind}:${target}`}
      data-band-low={band?.low}
      data-band-high={band?.high}
      data-band-overload={band?.expectOverload ? 'yes' : undefined}
    >
      <label for={inputId} class="reading-label">
        {readingName(kind, target)}
        {labelSuffix ? <span class="hint"> {labelSuffix}</span> : null}
      </label>
      {band === undefined ? null : (
        <p class="expect" id={bandId}>
          Expect <strong>{formatBand(band, units.decimal)}</strong>
        </p>
      )}
      <div class="entry-row">
        <span class="input-with-unit">
          <input
            id={inputId}
            type="text"
            inputMode="decimal"
            enterKeyHint="done"
            autoComplete="off"
            spellcheck={false}
            disabled={disabled}
            value={draftText}
            aria-describedby={[band ? bandId : '', `${id}-unit`, problem ? `${inputId}-error` : ''].filter(Boolean).join(' ')}
            aria-invalid={problem ? 'true' : undefined}
            onInput={(event) => {
              onDraft(event.currentTarget.value);
              if (problem) setProblem(undefined);
            }}
            onKeyDown={(event) => {
              if (event.key === 'Enter') {
                event.preventDefault();
                void commit();
              }
            }}
            onBlur={() => void commit()}
          />
          <span class="unit" id={`${id}-unit`}>{inputUnit(kind, units)}</span>
        </span>
        <button type="button" class="secondary enter-button" disabled={disabled} onClick={() => void commit()}>
          Enter
        </button>
      </div>
      <FieldError id={inputId} message={problem} />
      <p class="entry-result" role="status" aria-live="polite">
        {shown === null ? null : (
          <>
            <span class="value">{formatMeterValue(shown.value, unit, units.decimal)}</span>{' '}
            {shown.verdict ? <VerdictBadge verdict={shown.verdict} /> : null}{' '}
            <span class={`saved-state ${shown.saved}`}>
              {shown.saved === 'saving' ? 'Saving…' : shown.saved === 'failed' ? '⚠ Not saved yet' : '✓ Saved'}
            </span>
          </>
        )}
      </p>
      {history.length === 0 ? null : (
        <p class="history">
          Earlier on this unit:{' '}
          {history.slice(0, 3).map((reading, index) => (
            <span key={reading.id}>
              {index > 0 ? '; ' : ''}
              {formatWhen(reading.takenAt)} {formatMeterValue(reading.value, unit, units.decimal)}
              {reading.verdict ? ` (${reading.verdict === 'in' ? 'in range' : reading.verdict})` : ''}
            </span>
          ))}
        </p>
      )}
    </div>
  );
}

function example(kind: ReadingKind): string {
  switch (UNITS[kind]) {
    case 'V':
      return kind === 'rippleAc' ? '0,45 or 450mV' : '14,8';
    case 'Hz':
      return '100';
    case 'F':
      return '2200 (µF) or 2.2mF';
    case 'Ω':
      return '0,08 or 80mΩ';
  }
}
