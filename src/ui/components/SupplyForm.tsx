import type { DiodePresetName, Topology } from '../../engine/types';
import { FIELD_LABELS, type FieldProblem, type SupplyFieldName, type SupplyFormValues } from '../supply-form';
import { FieldError, fieldErrorId, TextField } from './TextField';

const TOPOLOGY_CHOICES: ReadonlyArray<[Topology, string]> = [
  ['half-wave', 'Half-wave'],
  ['center-tap', 'Full-wave, centre-tapped'],
  ['bridge', 'Full-wave bridge'],
  ['doubler', 'Voltage doubler'],
];

const DIODE_CHOICES: ReadonlyArray<[DiodePresetName, string]> = [
  ['silicon', 'Silicon rectifier (1N400x type)'],
  ['schottky', 'Schottky'],
  ['germanium', 'Germanium'],
  ['ideal', 'Ideal (no drop)'],
];

export interface SupplyFormProps {
  values: SupplyFormValues;
  onChange: (patch: Partial<SupplyFormValues>) => void;
  onSubmit: () => void;
  problem: FieldProblem | null;
  busy: boolean;
}

/** The supply in front of the technician: rectifier, transformer, diodes, capacitor, load, regulator. */
export function SupplyForm({ values, onChange, onSubmit, problem, busy }: SupplyFormProps) {
  const errorFor = (field: SupplyFieldName) => (problem?.field === field ? problem.message : undefined);
  const describedByError = (field: SupplyFieldName) => (problem?.field === field ? fieldErrorId(field) : undefined);
  const text = (field: SupplyFieldName, extra: { hint?: string; placeholder?: string; label?: string } = {}) => (
    <TextField
      id={field}
      label={extra.label ?? FIELD_LABELS[field]}
      value={values[field]}
      onInput={(value) => onChange({ [field]: value })}
      hint={extra.hint}
      placeholder={extra.placeholder}
      error={errorFor(field)}
    />
  );
  return (
    <form
      class="supply-form"
      noValidate
      onSubmit={(event) => {
        event.preventDefault();
        onSubmit();
      }}
    >
      <fieldset id="topology" tabIndex={-1} aria-describedby={describedByError('topology')}>
        <legend>{FIELD_LABELS.topology}</legend>
        {TOPOLOGY_CHOICES.map(([topology, label]) => (
          <label class="choice" key={topology}>
            <input
              type="radio"
              name="topology"
              value={topology}
              checked={values.topology === topology}
              onChange={() => onChange({ topology })}
            />
            {label}
          </label>
        ))}
        <FieldError id="topology" message={errorFor('topology')} />
      </fieldset>

      <fieldset>
        <legend>Transformer</legend>
        {text('vrms', { hint: values.topology === 'center-tap' ? 'Each half of the winding, off load.' : 'Off load.' })}
        {text('hz')}
        {text('windingOhms', { hint: 'Referred to the secondary. Blank: 0.', placeholder: '0' })}
      </fieldset>

      <fieldset>
        <legend>Rectifier and filter</legend>
        <div class="field">
          <label for="diodePreset">{FIELD_LABELS.diodePreset}</label>
          <select
            id="diodePreset"
            value={values.diodePreset}
            aria-describedby={describedByError('diodePreset')}
            onChange={(event) => onChange({ diodePreset: event.currentTarget.value as DiodePresetName })}
          >
            {DIODE_CHOICES.map(([preset, label]) => (
              <option key={preset} value={preset}>{label}</option>
            ))}
          </select>
          <FieldError id="diodePreset" message={errorFor('diodePreset')} />
        </div>
        {text('capacitorMicrofarads', {
          hint: values.topology === 'doubler' ? 'Each of the two capacitors. Blank: no capacitor.' : 'Blank: no capacitor.',
        })}
        {text('esrOhms', { hint: 'Blank: 0.', placeholder: '0' })}
      </fieldset>

      <fieldset>
        <legend>Load</legend>
        <div class="choice-row">
          <label class="choice">
            <input type="radio" name="loadKind" value="ohms" checked={values.loadKind === 'ohms'} onChange={() => onChange({ loadKind: 'ohms' })} />
            Resistance (Ω)
          </label>
          <label class="choice">
            <input type="radio" name="loadKind" value="amps" checked={values.loadKind === 'amps'} onChange={() => onChange({ loadKind: 'amps' })} />
            Current (A)
          </label>
        </div>
        {text('loadValue', { label: values.loadKind === 'ohms' ? 'Load resistance (Ω)' : 'Load current (A)' })}
      </fieldset>

      <fieldset>
        <legend>Regulator</legend>
        <div class="field">
          <label for="regulatorKind">Type</label>
          <select
            id="regulatorKind"
            value={values.regulatorKind}
            onChange={(event) => onChange({ regulatorKind: event.currentTarget.value as SupplyFormValues['regulatorKind'] })}
          >
            <option value="none">None</option>
            <option value="linear">Three-terminal linear (78xx, LDO)</option>
            <option value="zener">Zener shunt</option>
          </select>
        </div>
        {values.regulatorKind === 'linear' ? (
          <>
            {text('regulatorVolts')}
            {text('dropoutVolts', { hint: 'Blank: the engine’s default.' })}
          </>
        ) : null}
        {values.regulatorKind === 'zener' ? (
          <>
            {text('zenerVolts')}
            {text('seriesOhms')}
          </>
        ) : null}
      </fieldset>

      <button type="submit" class="primary" disabled={busy}>
        {busy ? 'Working…' : 'Show expected readings'}
      </button>
    </form>
  );
}
