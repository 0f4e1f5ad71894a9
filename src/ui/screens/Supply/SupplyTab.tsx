import { MAINS_REGIONS } from '../../../engine/diagnosis';
import type { DiodePresetName, Topology } from '../../../engine/types';
import { useApp } from '../../app-context';
import { BandList } from '../../components/BandList';
import { ReadingsTable } from '../../components/ReadingsTable';
import { Schematic } from '../../components/Schematic';
import { FieldError, TextField } from '../../components/TextField';
import { formatQuantity } from '../../format';
import { routeHash } from '../../router';
import { useDraft } from '../../use-draft';
import type { TabProps } from '../Job/JobScreen';
import {
  buildSupply,
  explainDerivation,
  formFromJob,
  OFFLINE_SERIES_OHMS,
  type NameplateField,
  type NameplateForm,
  type RegionId,
  type RegulatorKind,
} from './nameplate';
import { useExpect } from './use-expect';

const TOPOLOGIES: { topology: Topology; name: string; words: string }[] = [
  { topology: 'half-wave', name: 'Half-wave', words: 'One diode; ripple at the line frequency.' },
  { topology: 'center-tap', name: 'Full-wave, centre-tapped', words: 'Two diodes and a tapped winding (e.g. 12-0-12 V).' },
  { topology: 'bridge', name: 'Full-wave bridge', words: 'Four diodes or a bridge block; the most common.' },
  { topology: 'doubler', name: 'Voltage doubler', words: 'Two diodes, two capacitors; about twice the peak.' },
];

const DIODES: { kind: DiodePresetName; name: string }[] = [
  { kind: 'silicon', name: 'Silicon rectifier (1N400x type, bridge blocks)' },
  { kind: 'schottky', name: 'Schottky (low drop)' },
  { kind: 'germanium', name: 'Germanium (old equipment)' },
  { kind: 'ideal', name: 'Ideal, no drop (for comparison only)' },
];

const REGULATORS: { kind: RegulatorKind; name: string }[] = [
  { kind: 'none', name: 'None: the capacitor feeds the load' },
  { kind: 'linear', name: 'Three-terminal linear (78xx type, 2 V dropout)' },
  { kind: 'ldo', name: 'Low-dropout linear (LDO, 0.3 V dropout)' },
  { kind: 'zener', name: 'Zener with series resistor' },
];

/** Spec paths the engine may reject, to the form field that sets them. */
function fieldForSpecPath(path: string | undefined, form: NameplateForm): NameplateField | null {
  if (path === undefined) return null;
  if (path.startsWith('source.vrms')) return form.transformer === 'yes' && form.openCircuitVolts.trim() === '' ? 'secondaryVolts' : 'openCircuitVolts';
  if (path.startsWith('source.ohms')) return 'windingOhms';
  if (path.startsWith('capacitor')) return 'capacitorMicrofarads';
  if (path.startsWith('load')) return 'loadText';
  if (path.startsWith('regulator.seriesOhms')) return 'seriesOhms';
  if (path.startsWith('regulator')) return 'regulatorVolts';
  return null;
}

/** The supply: topology from small schematics, then the nameplate figures. Saved as typed. */
export function SupplyTab({ data, actions, diagnosis }: TabProps) {
  const { db, saver, settings, engine } = useApp();
  const { job } = data;
  const draft = useDraft<NameplateForm & Record<string, string>>(
    db,
    saver,
    `${job.id}:supply`,
    () => formFromJob(job.nameplate, job.supply, settings.region) as NameplateForm & Record<string, string>,
    'the supply details',
  );
  const expected = useExpect(engine, job.supply);
  const form = draft.values;
  if (form === null) return <p class="loading" role="status">Opening the supply…</p>;

  const built = buildSupply(form);
  const problems = 'problems' in built ? built.problems : {};
  const engineError = diagnosis.error?.kind === 'spec' ? diagnosis.error : null;
  const engineField = fieldForSpecPath(engineError?.field, form);
  const errorFor = (field: NameplateField) => problems[field] ?? (engineField === field ? engineError?.problem : undefined);

  const change = (patch: Partial<NameplateForm>) => {
    const next = draft.change(patch as Partial<NameplateForm & Record<string, string>>);
    const result = buildSupply(next);
    if ('problems' in result) return;
    if (JSON.stringify(result.spec) === JSON.stringify(job.supply) && JSON.stringify(result.nameplate) === JSON.stringify(job.nameplate)) return;
    void actions.setFields({ supply: result.spec, nameplate: result.nameplate }, 'the supply');
  };

  const text = (field: NameplateField, label: string, extra: { hint?: string; unit?: string; placeholder?: string } = {}) => (
    <TextField
      id={`supply-${field}`}
      label={label}
      value={form[field]}
      unit={extra.unit}
      hint={extra.hint}
      placeholder={extra.placeholder}
      onInput={(value) => change({ [field]: value } as Partial<NameplateForm>)}
      error={errorFor(field)}
    />
  );

  const region = MAINS_REGIONS[form.region];
  const centreTap = form.topology === 'center-tap';
  const derivation = 'problems' in built ? null : built.derivation;
  const regulatorShape = form.regulatorKind === 'none' ? 'none' : form.regulatorKind === 'zener' ? 'zener' : 'linear';
  const capacitorWarning = capacitorRatingWarning(form, expected.result, region.highVolts / region.nominalVolts);

  return (
    <div class="tab supply-tab">
      <p class="hint">Describe the supply from its parts. Everything is kept as you type; the expected readings follow.</p>
      <fieldset class="topology-picker">
        <legend>Rectifier</legend>
        {TOPOLOGIES.map((choice) => (
          <label key={choice.topology} class={`topology-choice${form.topology === choice.topology ? ' chosen' : ''}`}>
            <input type="radio" name="topology" value={choice.topology} checked={form.topology === choice.topology} onChange={() => change({ topology: choice.topology })} />
            <Schematic topology={choice.topology} compact decorative />
            <span class="choice-name">{choice.name}</span>
            <span class="hint">{choice.words}</span>
          </label>
        ))}
      </fieldset>

      <fieldset>
        <legend>Mains</legend>
        <div class="field">
          <label for="supply-region">Mains supply</label>
          <span class="hint" id="supply-region-hint">Sets the nominal voltage, the frequency and the band healthy mains stays in.</span>
          <select id="supply-region" aria-describedby="supply-region-hint" value={form.region} onChange={(event) => change({ region: event.currentTarget.value as RegionId })}>
            {(Object.keys(MAINS_REGIONS) as RegionId[]).map((id) => {
              const band = MAINS_REGIONS[id];
              return (
                <option key={id} value={id}>
                  {band.nominalVolts} V, {band.hz} Hz — {band.source} ({band.lowVolts}–{band.highVolts} V)
                </option>
              );
            })}
          </select>
        </div>
      </fieldset>

      <fieldset>
        <legend>Transformer</legend>
        <div class="choice-row">
          <label class="choice">
            <input type="radio" name="transformer" checked={form.transformer === 'yes'} onChange={() => change({ transformer: 'yes' })} />
            Mains transformer
          </label>
          <label class="choice">
            <input type="radio" name="transformer" checked={form.transformer === 'none'} onChange={() => change({ transformer: 'none' })} />
            None: straight off the mains
          </label>
        </div>
        {form.transformer === 'yes' ? (
          <>
            {text('secondaryVolts', centreTap ? 'Secondary rating, each half' : 'Secondary rating', {
              unit: 'V AC',
              hint: centreTap ? 'As printed, at rated load. For 12-0-12 V enter 12.' : 'As printed: the voltage at rated load.',
            })}
            {text('transformerVa', 'Power rating', { unit: 'VA', hint: 'As printed (VA, or volts × amps of the secondary).' })}
            {derivation !== null && form.openCircuitVolts.trim() === '' && form.windingOhms.trim() === '' ? (
              <p class="derivation" id="supply-derivation">
                {explainDerivation(form.topology, Number(form.secondaryVolts.replace(',', '.')), Number(form.transformerVa.replace(',', '.')), derivation)}
              </p>
            ) : null}
            {text('openCircuitVolts', 'Open-circuit voltage (optional)', {
              unit: 'V AC',
              placeholder: derivation ? formatQuantity(derivation.openCircuitVolts, 'V').replace(' V', '') : '',
              hint: 'Blank: worked out from the rating. Or the secondary measured with the load disconnected.',
            })}
            {text('windingOhms', 'Winding resistance (optional)', {
              unit: 'Ω',
              placeholder: derivation ? derivation.windingOhms.toPrecision(2) : '',
              hint: 'Blank: worked out from the rating. Measured power off: secondary ohms plus primary ohms × (secondary V ÷ primary V)².',
            })}
          </>
        ) : (
          <>
            <p class="hint">The rectifier sees the mains itself: {region.nominalVolts} V. This is the front end of most switch-mode supplies.</p>
            {text('windingOhms', 'Series resistance (optional)', {
              unit: 'Ω',
              placeholder: String(OFFLINE_SERIES_OHMS),
              hint: `Inrush thermistor, fusible resistor and wiring, warm. Blank: ${OFFLINE_SERIES_OHMS} Ω (a typical few ohms).`,
            })}
          </>
        )}
      </fieldset>

      <fieldset>
        <legend>Rectifier and filter</legend>
        <div class="field">
          <label for="supply-diodeKind">Diodes</label>
          <span class="hint" id="supply-diodeKind-hint">Sets the drop across each diode: about 0.7–1 V silicon, less for Schottky.</span>
          <select id="supply-diodeKind" aria-describedby="supply-diodeKind-hint" value={form.diodeKind} onChange={(event) => change({ diodeKind: event.currentTarget.value as DiodePresetName })}>
            {DIODES.map((d) => (
              <option key={d.kind} value={d.kind}>{d.name}</option>
            ))}
          </select>
        </div>
        {text('capacitorMicrofarads', form.topology === 'doubler' ? 'Filter capacitors, each' : 'Filter capacitor', {
          unit: 'µF',
          hint: 'As printed on the can. Blank: no capacitor (unfiltered).',
        })}
        {text('capacitorVoltRating', 'Capacitor voltage rating (optional)', { unit: 'V', hint: 'As printed; checked against the highest voltage it will see.' })}
        {capacitorWarning === null ? null : <p class="notice warning" role="status">{capacitorWarning}</p>}
      </fieldset>

      <fieldset>
        <legend>Regulator and load</legend>
        <div class="field">
          <label for="supply-regulatorKind">Regulator</label>
          <span class="hint" id="supply-regulatorKind-hint">What comes after the capacitor: a three-pin regulator (78xx, LM317, LDO), a zener, or nothing.</span>
          <select id="supply-regulatorKind" aria-describedby="supply-regulatorKind-hint" value={form.regulatorKind} onChange={(event) => change({ regulatorKind: event.currentTarget.value as RegulatorKind })}>
            {REGULATORS.map((r) => (
              <option key={r.kind} value={r.kind}>{r.name}</option>
            ))}
          </select>
        </div>
        {form.regulatorKind === 'none' ? null : text('regulatorVolts', form.regulatorKind === 'zener' ? 'Zener voltage' : 'Regulator output', { unit: 'V DC', hint: form.regulatorKind === 'zener' ? 'As marked on the zener (e.g. 5V1 = 5.1 V).' : 'From its part number: 7805 = 5 V, 7812 = 12 V.' })}
        {form.regulatorKind === 'zener' ? text('seriesOhms', 'Series resistor', { unit: 'Ω', hint: 'The resistor from the capacitor to the zener.' }) : null}
        {text('loadText', 'Expected load', { hint: 'What the board draws: a current (0.5 A, 500 mA) or a resistance (33 Ω). A number alone is amps.' })}
      </fieldset>

      <figure class="schematic-figure">
        <Schematic topology={form.topology} regulator={regulatorShape} filtered={form.capacitorMicrofarads.trim() !== ''} />
        <figcaption>The supply as described. Probe points light up here during the test.</figcaption>
      </figure>

      <section aria-labelledby="supply-expected" aria-live="polite" aria-busy={diagnosis.working}>
        <h2 id="supply-expected">Expected readings</h2>
        {'problems' in built ? <p class="hint">Fill in the fields marked above to see the expected readings.</p> : null}
        {engineError !== null && engineField === null ? <FieldError id="supply-engine" message={`The calculator cannot use this supply: ${engineError.message}`} /> : null}
        {diagnosis.error !== null && diagnosis.error.kind === 'failed' ? <p class="problem" role="alert">{diagnosis.error.message}</p> : null}
        {diagnosis.answer !== null && !('problems' in built) ? (
          <BandList bands={diagnosis.answer.diagnosis.bands} guides={diagnosis.answer.guides} units={settings.units} caption={`On your meter${diagnosis.working ? ' (updating…)' : ''}`} />
        ) : diagnosis.working ? (
          <p class="loading" role="status">Working out the expected readings…</p>
        ) : null}
        {expected.result !== null ? (
          <details class="engine-figures">
            <summary>Engine figures and textbook estimates</summary>
            <ReadingsTable result={expected.result} />
          </details>
        ) : null}
      </section>
      <a class="button primary" href={routeHash({ screen: 'job', jobId: job.id, tab: 'test' })}>
        Start the readings
      </a>
    </div>
  );
}

/**
 * The capacitor's rating against the highest voltage across it: the engine's peak (mean plus
 * half the ripple) at nominal mains, scaled to the top of the mains band (DOMAIN.md §4); each
 * doubler capacitor holds about half the output.
 */
function capacitorRatingWarning(form: NameplateForm, result: { dc: number; ripplePp: number } | null, mainsHighFactor: number): string | null {
  const rating = Number(form.capacitorVoltRating.replace(',', '.'));
  if (result === null || !(rating > 0) || form.capacitorMicrofarads.trim() === '') return null;
  const share = form.topology === 'doubler' ? 0.5 : 1;
  const peak = (result.dc + result.ripplePp / 2) * share * mainsHighFactor;
  if (peak <= rating) return null;
  return `The capacitor sees about ${formatQuantity(peak, 'V')} at high mains, above its ${rating} V rating: check the figures, or the part is under-rated.`;
}
