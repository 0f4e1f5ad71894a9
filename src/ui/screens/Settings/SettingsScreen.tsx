import { useEffect, useState } from 'preact/hooks';
import { MAINS_REGIONS } from '../../../engine/diagnosis';
import type { MeterKind, MeterSettings } from '../../../engine/diagnosis/types';
import { putTechnician } from '../../../store/assets';
import { newId } from '../../../store/ids';
import { DEFAULT_SETTINGS, type AppSettings, type ThemeChoice } from '../../../store/settings';
import { useApp } from '../../app-context';
import { ScreenTitle } from '../../components/ScreenTitle';
import { TextField } from '../../components/TextField';
import { parseNumberText, type RegionId } from '../Supply/nameplate';

const METER_KINDS: { kind: MeterKind; words: string }[] = [
  { kind: 'true-rms-ac', words: 'True RMS, AC-coupled (most modern meters)' },
  { kind: 'average-responding', words: 'Average-responding (cheaper meters, no “True RMS” marking)' },
  { kind: 'true-rms-ac-dc', words: 'True RMS, AC+DC (reads the DC too on AC)' },
];

const THEMES: { theme: ThemeChoice; words: string }[] = [
  { theme: 'system', words: 'As the phone is set' },
  { theme: 'light', words: 'Light' },
  { theme: 'dark', words: 'Dark' },
  { theme: 'sunlight', words: 'Sunlight: highest contrast' },
];

/** Technician, meter (kind and accuracy), mains region, units and theme; each saved when changed. */
export function SettingsScreen() {
  const { db, settings, changeSettings, technicians, reloadTechnicians, saver } = useApp();
  const [newName, setNewName] = useState('');
  const [storage, setStorage] = useState<string | null>(null);
  // Accuracy fields as typed; saved once they read as numbers.
  const [accuracy, setAccuracy] = useState(() => accuracyText(settings.meter));

  useEffect(() => {
    let live = true;
    void (async () => {
      const manager = navigator.storage;
      if (!manager?.estimate) return;
      const [estimate, persisted] = await Promise.all([manager.estimate(), manager.persisted?.() ?? Promise.resolve(false)]);
      if (!live) return;
      const usedKb = Math.round((estimate.usage ?? 0) / 1024);
      setStorage(`${usedKb} kB used. ${persisted ? 'Kept even when space runs low.' : 'The browser may clear it if space runs very low; installing the app helps.'}`);
    })().catch(() => undefined);
    return () => {
      live = false;
    };
  }, []);

  const setMeter = (patch: Partial<MeterSettings>) => void changeSettings({ meter: { ...settings.meter, ...patch } });

  const accuracyField = (key: keyof ReturnType<typeof accuracyText>, label: string, unit: string) => (
    <TextField
      id={`settings-${key}`}
      label={label}
      unit={unit}
      value={accuracy[key]}
      onInput={(value) => {
        const next = { ...accuracy, [key]: value };
        setAccuracy(next);
        const meter = meterFromText(next, settings.meter);
        if (meter !== null) setMeter(meter);
      }}
      error={Number.isNaN(parseNumberText(accuracy[key]) ?? 0) ? 'Not a number' : undefined}
    />
  );

  const addTechnician = async () => {
    const name = newName.trim();
    if (name === '') return;
    const id = newId();
    const result = await saver.save('the new technician', () => putTechnician(db, { id, name }));
    if (!result.ok) return;
    setNewName('');
    await reloadTechnicians();
    await changeSettings({ technicianId: id });
  };

  return (
    <section class="screen settings-screen" aria-labelledby="settings-title">
      <div id="settings-title">
        <ScreenTitle>Settings</ScreenTitle>
      </div>
      <p class="hint">Each change is saved as you make it. New jobs take the meter and region set here.</p>
      <fieldset>
        <legend>Technician</legend>
        {technicians.length === 0 ? <p class="hint">No technicians yet.</p> : (
          <div class="field">
            <label for="settings-technician">Who uses this phone</label>
            <select id="settings-technician" value={settings.technicianId ?? ''} onChange={(event) => void changeSettings({ technicianId: event.currentTarget.value })}>
              <option value="" disabled>Choose…</option>
              {technicians.map((t) => (
                <option key={t.id} value={t.id}>{t.name}</option>
              ))}
            </select>
          </div>
        )}
        <TextField id="settings-new-technician" kind="text" label="Add a technician" value={newName} onInput={setNewName} autoComplete="name" />
        <button type="button" class="secondary" disabled={newName.trim() === ''} onClick={() => void addTechnician()}>
          Add
        </button>
      </fieldset>

      <fieldset>
        <legend>Meter</legend>
        <div class="field">
          <label for="settings-meter-kind">How its AC range responds</label>
          <span class="hint" id="settings-meter-kind-hint">Printed on the meter or in its manual. It changes what the ripple reads.</span>
          <select id="settings-meter-kind" aria-describedby="settings-meter-kind-hint" value={settings.meter.kind ?? 'true-rms-ac'} onChange={(event) => setMeter({ kind: event.currentTarget.value as MeterKind })}>
            {METER_KINDS.map((m) => (
              <option key={m.kind} value={m.kind}>{m.words}</option>
            ))}
          </select>
        </div>
        <p class="hint">Accuracy from the meter’s manual: ± (percent of reading + counts of the last digit).</p>
        <div class="pair">
          {accuracyField('dcPercent', 'DC volts, % of reading', '%')}
          {accuracyField('dcCounts', 'DC volts, counts', 'counts')}
        </div>
        <div class="pair">
          {accuracyField('acPercent', 'AC volts, % of reading', '%')}
          {accuracyField('acCounts', 'AC volts, counts', 'counts')}
        </div>
        {accuracyField('displayCounts', 'Display counts', 'counts')}
      </fieldset>

      <fieldset>
        <legend>Mains region</legend>
        <div class="field">
          <label for="settings-region">Mains for new jobs</label>
          <select id="settings-region" value={settings.region} onChange={(event) => void changeSettings({ region: event.currentTarget.value as RegionId })}>
            {(Object.keys(MAINS_REGIONS) as RegionId[]).map((id) => (
              <option key={id} value={id}>
                {MAINS_REGIONS[id].nominalVolts} V, {MAINS_REGIONS[id].hz} Hz — {MAINS_REGIONS[id].source}
              </option>
            ))}
          </select>
        </div>
      </fieldset>

      <fieldset>
        <legend>Units</legend>
        <div class="field">
          <label for="settings-capacitance">A capacitance typed without a unit is in</label>
          <select id="settings-capacitance" value={settings.units.capacitance} onChange={(event) => void changeSettings({ units: { ...settings.units, capacitance: event.currentTarget.value as AppSettings['units']['capacitance'] } })}>
            <option value="µF">µF (microfarads)</option>
            <option value="nF">nF (nanofarads)</option>
          </select>
        </div>
        <div class="field">
          <label for="settings-decimal">Show numbers with a decimal</label>
          <span class="hint" id="settings-decimal-hint">Typing accepts both, always.</span>
          <select id="settings-decimal" aria-describedby="settings-decimal-hint" value={settings.units.decimal} onChange={(event) => void changeSettings({ units: { ...settings.units, decimal: event.currentTarget.value as AppSettings['units']['decimal'] } })}>
            <option value="point">point: 4.25 V</option>
            <option value="comma">comma: 4,25 V</option>
          </select>
        </div>
      </fieldset>

      <fieldset>
        <legend>Theme</legend>
        {THEMES.map((t) => (
          <label class="choice" key={t.theme}>
            <input type="radio" name="theme" value={t.theme} checked={settings.theme === t.theme} onChange={() => void changeSettings({ theme: t.theme })} />
            {t.words}
          </label>
        ))}
      </fieldset>

      <section aria-labelledby="settings-storage">
        <h2 id="settings-storage">Storage</h2>
        <p>{storage ?? 'Jobs are kept on this phone only.'}</p>
        <p class="hint">Defaults: meter {DEFAULT_SETTINGS.meter.displayCounts} counts, DC ±({DEFAULT_SETTINGS.meter.dc?.percent} % + {DEFAULT_SETTINGS.meter.dc?.counts}), AC ±({DEFAULT_SETTINGS.meter.ac?.percent} % + {DEFAULT_SETTINGS.meter.ac?.counts}).</p>
      </section>
    </section>
  );
}

function accuracyText(meter: MeterSettings) {
  return {
    dcPercent: String(meter.dc?.percent ?? ''),
    dcCounts: String(meter.dc?.counts ?? ''),
    acPercent: String(meter.ac?.percent ?? ''),
    acCounts: String(meter.ac?.counts ?? ''),
    displayCounts: String(meter.displayCounts ?? ''),
  };
}

/** The meter settings from the accuracy text, or null while any field is not a number. */
function meterFromText(text: ReturnType<typeof accuracyText>, meter: MeterSettings): MeterSettings | null {
  const read = (value: string) => {
    const n = parseNumberText(value);
    return n === undefined || Number.isNaN(n) || n < 0 ? null : n;
  };
  const [dcP, dcC, acP, acC, counts] = [text.dcPercent, text.dcCounts, text.acPercent, text.acCounts, text.displayCounts].map(read);
  if (dcP == null || dcC == null || acP == null || acC == null || counts == null || counts < 100) return null;
  return { ...meter, dc: { percent: dcP, counts: dcC }, ac: { percent: acP, counts: acC }, displayCounts: counts };
}
