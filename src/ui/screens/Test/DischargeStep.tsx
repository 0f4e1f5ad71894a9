import { useState } from 'preact/hooks';
import { DISCHARGE_CAUTION, parseMeterText } from '../../../engine/diagnosis';
import type { NextReading } from '../../../engine/diagnosis/types';
import type { Topology } from '../../../engine/types';
import { Caution } from '../../components/Caution';
import { Schematic, type RegulatorShape } from '../../components/Schematic';
import { FieldError } from '../../components/TextField';
import { formatMeterValue } from '../../format';
import { pointWords } from '../../points';
import { readingName } from '../../readings';
import { SAFE_RESIDUAL_VOLTS } from './guide';

export interface DischargeStepProps {
  next: NextReading;
  topology: Topology;
  regulator: RegulatorShape;
  filtered: boolean;
  draftText: string;
  onDraft: (text: string) => void;
  /** Called with the residual volts once they are below SAFE_RESIDUAL_VOLTS. */
  onVerified: (text: string) => void;
}

/** Power off, discharge the filter capacitor, and prove it with the meter before power-off tests. */
export function DischargeStep({ next, topology, regulator, filtered, draftText, onDraft, onVerified }: DischargeStepProps) {
  const [message, setMessage] = useState<{ text: string; kind: 'problem' | 'charged' } | null>(null);
  const check = () => {
    const parsed = parseMeterText(draftText, 'V');
    if (!parsed.ok) return setMessage({ kind: 'problem', text: `${parsed.message}. Type what the meter shows on V DC, e.g. 0,3.` });
    if (parsed.value === 'OL' || Math.abs(parsed.value) >= SAFE_RESIDUAL_VOLTS) {
      return setMessage({
        kind: 'charged',
        text: `Still charged (${parsed.value === 'OL' ? 'OL' : formatMeterValue(parsed.value, 'V')}). Discharge it again through the resistor and measure again: it must read below ${SAFE_RESIDUAL_VOLTS} V.`,
      });
    }
    setMessage(null);
    onVerified(draftText.trim());
  };
  const probes = { red: 'out+', black: 'out-' };
  return (
    <section class="step-card" aria-labelledby="discharge-title">
      <p class="step-kind">Before {readingName(next.kind, next.target)}</p>
      <h2 id="discharge-title">Power off, discharge and verify</h2>
      <Caution title="Stored charge">
        <p>{DISCHARGE_CAUTION}</p>
      </Caution>
      <ol class="steps">
        <li>Switch off and unplug (at a panel: isolate, lock out and tag).</li>
        <li>Discharge the filter capacitor{topology === 'doubler' ? 's' : ''} through a suitably rated resistor, holding it with insulated tools.</li>
        <li>
          Set the meter to <strong>V DC</strong>: red on {pointWords(topology, probes.red)}, black on {pointWords(topology, probes.black)}. Enter what it reads.
        </li>
      </ol>
      <Schematic topology={topology} regulator={regulator} filtered={filtered} probes={probes} />
      <div class="reading-entry" data-reading="discharge">
        <label for="discharge-volts" class="reading-label">Voltage left across the capacitor</label>
        <p class="expect" id="discharge-expect">
          Must be below <strong>{SAFE_RESIDUAL_VOLTS} V</strong>
        </p>
        <div class="entry-row">
          <span class="input-with-unit">
            <input
              id="discharge-volts"
              type="text"
              inputMode="decimal"
              enterKeyHint="done"
              autoComplete="off"
              value={draftText}
              aria-describedby="discharge-expect discharge-unit"
              aria-invalid={message?.kind === 'problem' ? 'true' : undefined}
              onInput={(event) => onDraft(event.currentTarget.value)}
              onKeyDown={(event) => {
                if (event.key === 'Enter') {
                  event.preventDefault();
                  check();
                }
              }}
            />
            <span class="unit" id="discharge-unit">V DC</span>
          </span>
          <button type="button" class="secondary enter-button" onClick={check}>
            Enter
          </button>
        </div>
        {message?.kind === 'problem' ? <FieldError id="discharge-volts" message={message.text} /> : null}
        {message?.kind === 'charged' ? (
          <p class="notice warning" role="alert">
            <span aria-hidden="true">⚠</span> {message.text}
          </p>
        ) : null}
      </div>
    </section>
  );
}
