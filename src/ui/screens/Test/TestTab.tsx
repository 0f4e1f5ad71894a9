import { useState } from 'preact/hooks';
import type { NextReading, ReadingKind, Verdict } from '../../../engine/diagnosis/types';
import type { MeterValue } from '../../../engine/diagnosis/types';
import { nowIso } from '../../../store/ids';
import { useApp } from '../../app-context';
import { FaultRanking } from '../../components/FaultRanking';
import { SafetyCheck } from '../../components/SafetyCheck';
import type { EnteredReading } from '../../components/ReadingEntry';
import type { RegulatorShape } from '../../components/Schematic';
import { VerdictBadge } from '../../components/VerdictBadge';
import { formatBand, formatMeterValue, formatWhen } from '../../format';
import { bandFor, latestBySlot, readingName, slotKey, UNITS, verdictFor } from '../../readings';
import { routeHash } from '../../router';
import { useDraft } from '../../use-draft';
import type { TabProps } from '../Job/JobScreen';
import { DischargeStep } from './DischargeStep';
import { choiceKey, currentStep } from './guide';
import { StepCard } from './StepCard';

type Progress = Record<string, string> & { safetyCheckedAt: string; dischargedAt: string; dischargeText: string; chosen: string; correcting: string };

const PROGRESS: Progress = { safetyCheckedAt: '', dischargedAt: '', dischargeText: '', chosen: '', correcting: '' };

/** The guided test: safety check, then one reading at a time, the fault ranking live below. */
export function TestTab({ data, actions, diagnosis }: TabProps) {
  const { db, saver, settings } = useApp();
  const { job } = data;
  const progress = useDraft<Progress>(db, saver, `${job.id}:progress`, () => ({ ...PROGRESS }), 'the test progress', true);
  const [lastEntered, setLastEntered] = useState<{ name: string; value: MeterValue; kind: ReadingKind; verdict?: Verdict } | null>(null);
  const p = progress.values;
  if (p === null) return <p class="loading" role="status">Opening the test…</p>;

  const answer = diagnosis.answer;
  const guides = answer?.guides ?? [];
  const bands = answer?.diagnosis.bands ?? [];
  const chosen = p.chosen === '' ? null : (guides.find((g) => choiceKey(g) === p.chosen) ?? null);
  const step = currentStep({
    safetyDone: p.safetyCheckedAt !== '',
    hasSupply: job.supply !== undefined,
    ready: answer !== null,
    discharged: p.dischargedAt !== '',
    chosen,
    suggested: answer?.diagnosis.next ?? null,
  });
  const latest = latestBySlot(data.readings, 'before');
  const spec = job.supply;
  const topology = spec?.topology ?? 'bridge';
  const regulator: RegulatorShape = spec?.regulator === undefined ? 'none' : 'zenerVolts' in spec.regulator ? 'zener' : 'linear';
  const filtered = spec?.capacitor !== undefined;
  const historyFor = (kind: ReadingKind, target: string | undefined) =>
    data.history.filter((r) => r.kind === kind && r.target === target && r.phase === 'before').reverse();

  const save = async (guide: NextReading, entry: EnteredReading): Promise<boolean> => {
    const previous = latest.get(slotKey(guide.kind, guide.target));
    const stored = await actions.addReading(
      {
        kind: guide.kind,
        ...(guide.target === undefined ? {} : { target: guide.target }),
        value: entry.value,
        text: entry.text,
        phase: 'before',
        ...(entry.band === undefined ? {} : { expectedLow: entry.band.low, expectedHigh: entry.band.high }),
        ...(entry.verdict === undefined ? {} : { verdict: entry.verdict }),
        // "Correct" on a reading replaces it (a typo); any other new reading of a slot stands beside the old.
        ...(previous !== undefined && p.correcting === slotKey(guide.kind, guide.target) ? { supersedes: previous.id } : {}),
      },
      `the ${readingName(guide.kind, guide.target)} reading`,
    );
    if (stored === null) return false;
    setLastEntered({ name: readingName(guide.kind, guide.target), value: entry.value, kind: guide.kind, ...(entry.verdict ? { verdict: entry.verdict } : {}) });
    progress.change({
      [`entry:${slotKey(guide.kind, guide.target)}`]: '',
      chosen: p.chosen === choiceKey(guide) ? '' : p.chosen,
      correcting: '',
      // A live reading means the unit is powered again: the next power-off test needs a new discharge.
      ...(guide.powerOff ? {} : { dischargedAt: '', dischargeText: '' }),
    });
    return true;
  };

  const choose = (guide: NextReading, correcting = false) => {
    progress.change({ chosen: choiceKey(guide), correcting: correcting ? slotKey(guide.kind, guide.target) : '' });
    document.getElementById('step-title')?.scrollIntoView?.({ block: 'start' });
  };

  return (
    <div class="tab test-tab">
      {lastEntered === null ? null : (
        <p class="last-entered" role="status">
          {lastEntered.name}: <strong>{formatMeterValue(lastEntered.value, UNITS[lastEntered.kind], settings.units.decimal)}</strong>{' '}
          {lastEntered.verdict ? <VerdictBadge verdict={lastEntered.verdict} /> : null} · saved
        </p>
      )}
      {step.kind === 'safety' ? <SafetyCheck onDone={() => progress.change({ safetyCheckedAt: nowIso() })} /> : null}
      {step.kind === 'no-supply' ? (
        <p class="notice">
          Describe the supply first, so the app knows what each reading should be. <a href={routeHash({ screen: 'job', jobId: job.id, tab: 'supply' })}>Go to the supply</a>
        </p>
      ) : null}
      {step.kind === 'waiting' ? (
        diagnosis.error !== null ? (
          <p class="notice problem" role="alert">
            The expected readings could not be worked out: {diagnosis.error.message}{' '}
            <a href={routeHash({ screen: 'job', jobId: job.id, tab: 'supply' })}>Check the supply</a>
          </p>
        ) : (
          <p class="loading" role="status">Working out what this supply should read…</p>
        )
      ) : null}
      {step.kind === 'discharge' ? (
        <DischargeStep
          next={step.next}
          topology={topology}
          regulator={regulator}
          filtered={filtered}
          draftText={p.dischargeText}
          onDraft={(text) => progress.change({ dischargeText: text })}
          onVerified={(text) => progress.change({ dischargedAt: nowIso(), dischargeText: text })}
        />
      ) : null}
      {step.kind === 'reading' ? (
        <StepCard
          guide={step.guide}
          band={bandFor(bands, step.guide.kind, step.guide.target)}
          topology={topology}
          regulator={regulator}
          filtered={filtered}
          units={settings.units}
          chosen={step.chosen}
          powerBackOn={step.powerBackOn}
          latest={latest.get(slotKey(step.guide.kind, step.guide.target))}
          history={historyFor(step.guide.kind, step.guide.target)}
          draftText={p[`entry:${slotKey(step.guide.kind, step.guide.target)}`] ?? ''}
          onDraft={(text) => progress.change({ [`entry:${slotKey(step.guide.kind, step.guide.target)}`]: text })}
          onSave={(entry) => save(step.guide, entry)}
          onBackToSuggestion={() => progress.change({ chosen: '', correcting: '' })}
        />
      ) : null}
      {step.kind === 'done' ? (
        <section class="step-card" aria-labelledby="done-title">
          <h2 id="done-title">Enough readings to decide</h2>
          <p>
            No further reading would change the picture much. Check the likely fault below with the power-off tests if you have not, then record the repair.
          </p>
          <a class="button primary" href={routeHash({ screen: 'job', jobId: job.id, tab: 'finish' })}>
            Go to Finish
          </a>
        </section>
      ) : null}

      {answer !== null && step.kind !== 'safety' && latest.size > 0 ? <FaultRanking diagnosis={answer.diagnosis} working={diagnosis.working} /> : null}

      {answer !== null && step.kind !== 'safety' ? (
        <details class="other-readings">
          <summary>Take another reading instead</summary>
          <p class="hint">Any reading, in any order. Power-off tests come after the discharge check.</p>
          {(['on', 'off'] as const).map((power) => (
            <div key={power}>
              <h3>{power === 'on' ? 'Power on' : 'Power off'}</h3>
              <ul class="choice-list">
                {guides
                  .filter((g) => g.powerOff === (power === 'off'))
                  .map((g) => {
                    const taken = latest.get(slotKey(g.kind, g.target));
                    return (
                      <li key={choiceKey(g)}>
                        <button type="button" class="secondary wide" onClick={() => choose(g)}>
                          {readingName(g.kind, g.target)} <span class="meter-mode">{g.meterMode}{taken ? ' · taken' : ''}</span>
                        </button>
                      </li>
                    );
                  })}
              </ul>
            </div>
          ))}
        </details>
      ) : null}

      {latest.size === 0 ? null : (
        <table class="readings taken">
          <caption>Readings so far</caption>
          <thead>
            <tr>
              <th scope="col">Reading</th>
              <th scope="col">Value</th>
              <th scope="col">Expected</th>
            </tr>
          </thead>
          <tbody>
            {[...latest.values()].map((reading) => {
              const band = bandFor(bands, reading.kind, reading.target);
              const verdict = band ? verdictFor(reading.value, band) : reading.verdict;
              const guide = guides.find((g) => g.kind === reading.kind && g.target === reading.target);
              const earlier = historyFor(reading.kind, reading.target)[0];
              return (
                <tr key={reading.id}>
                  <th scope="row">
                    {readingName(reading.kind, reading.target)}
                    <span class="meter-mode">{formatWhen(reading.takenAt)}</span>
                    {guide ? (
                      <button type="button" class="link-button small" onClick={() => choose(guide, true)}>
                        Correct<span class="visually-hidden"> {readingName(reading.kind, reading.target)}</span>
                      </button>
                    ) : null}
                  </th>
                  <td>
                    {formatMeterValue(reading.value, UNITS[reading.kind], settings.units.decimal)}
                    {verdict ? <span class="meter-mode"><VerdictBadge verdict={verdict} /></span> : null}
                  </td>
                  <td>
                    {band ? formatBand(band, settings.units.decimal) : '—'}
                    {earlier ? (
                      <span class="meter-mode">
                        last visit {formatMeterValue(earlier.value, UNITS[earlier.kind], settings.units.decimal)}
                      </span>
                    ) : null}
                  </td>
                </tr>
              );
            })}
          </tbody>
        </table>
      )}
    </div>
  );
}
