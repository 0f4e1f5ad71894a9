import { useState } from 'preact/hooks';
import type { NextReading, ReadingBand } from '../../../engine/diagnosis/types';
import type { Topology } from '../../../engine/types';
import type { Reading } from '../../../model/job';
import type { UnitSettings } from '../../../store/settings';
import { Caution } from '../../components/Caution';
import { ReadingEntry, type EnteredReading } from '../../components/ReadingEntry';
import { Schematic, type RegulatorShape } from '../../components/Schematic';
import { pointWords } from '../../points';
import { readingName } from '../../readings';

export interface StepCardProps {
  guide: NextReading;
  band: ReadingBand | undefined;
  topology: Topology;
  regulator: RegulatorShape;
  filtered: boolean;
  units: UnitSettings;
  chosen: boolean;
  powerBackOn: boolean;
  latest: Reading | undefined;
  history: Reading[];
  draftText: string;
  onDraft: (text: string) => void;
  onSave: (entry: EnteredReading) => Promise<boolean>;
  onBackToSuggestion: () => void;
}

/** One reading to take: the band before measuring, meter mode, probe points on the drawing, caution. */
export function StepCard(props: StepCardProps) {
  const { guide, band, topology, units } = props;
  const slot = `${guide.kind}:${guide.target ?? ''}`;
  const needsAck = guide.caution !== undefined && !guide.powerOff;
  const [acked, setAcked] = useState<string | null>(null);
  const ready = !needsAck || acked === slot;
  return (
    <section class="step-card" aria-labelledby="step-title">
      <p class="step-kind">{props.chosen ? 'Your choice' : 'Next reading'}{guide.powerOff ? ' · power off' : ' · power on'}</p>
      <h2 id="step-title">{readingName(guide.kind, guide.target)}</h2>
      {props.powerBackOn ? (
        <p class="notice warning">
          <span aria-hidden="true">⚠</span> This reading needs the power on. Finish any power-off work, close the unit up as needed, then power it again.
        </p>
      ) : null}
      {guide.caution !== undefined ? (
        <Caution title={guide.powerOff ? 'Power off and discharge first' : 'Mains voltage'}>
          <p>{guide.caution}</p>
          {needsAck ? (
            <label class="check">
              <input type="checkbox" checked={acked === slot} onChange={(event) => setAcked(event.currentTarget.checked ? slot : null)} />
              <span>I have read this and I am ready to measure</span>
            </label>
          ) : null}
        </Caution>
      ) : null}
      <dl class="how-to">
        <dt>Meter</dt>
        <dd class="meter-setting">{guide.meterMode}</dd>
        <dt>Red probe</dt>
        <dd>
          <span class="probe-dot red" aria-hidden="true">R</span> {pointWords(topology, guide.probes.red)}
        </dd>
        <dt>Black probe</dt>
        <dd>
          <span class="probe-dot black" aria-hidden="true">B</span> {pointWords(topology, guide.probes.black)}
        </dd>
      </dl>
      <p class="instruction">{guide.instruction}</p>
      <Schematic topology={topology} regulator={props.regulator} filtered={props.filtered} probes={guide.probes} />
      <ReadingEntry
        key={slot}
        id={`step-${guide.kind}${guide.target ? `-${guide.target}` : ''}`}
        kind={guide.kind}
        target={guide.target}
        band={band}
        units={units}
        latest={props.latest}
        history={props.history}
        draftText={props.draftText}
        onDraft={props.onDraft}
        onSave={props.onSave}
        disabled={!ready}
      />
      {props.chosen ? (
        <button type="button" class="link-button" onClick={props.onBackToSuggestion}>
          Back to the suggested reading
        </button>
      ) : null}
    </section>
  );
}
