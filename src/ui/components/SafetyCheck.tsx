import { useState } from 'preact/hooks';

/** The checks before any reading (DOMAIN.md §8); every one is ticked before the test starts. */
export const SAFETY_ITEMS: readonly string[] = [
  'My meter and leads are rated for this place: CAT II for plug-in appliances, CAT III at a distribution board or fixed wiring.',
  'I have checked the meter on a known live source, and will check it again after (live-dead-live).',
  'I work de-energised where I can: isolated, locked out and tagged, proven dead. Live readings with one hand, the other clear of the unit and of bare metal.',
  'Filter capacitors can hold a dangerous charge after unplugging: I discharge through a rated resistor and measure before touching or using ohms, diode or capacitance modes.',
  'Local codes, my employer’s rules and licensed practice come first; these figures only help the diagnosis.',
];

/** The safety check at the start of the test. */
export function SafetyCheck({ onDone }: { onDone: () => void }) {
  const [ticked, setTicked] = useState<boolean[]>(() => SAFETY_ITEMS.map(() => false));
  const all = ticked.every(Boolean);
  return (
    <section class="safety-check" aria-labelledby="safety-check-title">
      <h2 id="safety-check-title">
        <span aria-hidden="true">⚠</span> Safety first
      </h2>
      <p>Mains wiring and charged capacitors can kill. Tick each check to start the readings.</p>
      <fieldset>
        <legend class="visually-hidden">Safety checks</legend>
        {SAFETY_ITEMS.map((item, index) => (
          <label class="check" key={item}>
            <input
              type="checkbox"
              checked={ticked[index]}
              onChange={(event) => {
                const next = [...ticked];
                next[index] = event.currentTarget.checked;
                setTicked(next);
              }}
            />
            <span>{item}</span>
          </label>
        ))}
      </fieldset>
      <button type="button" class="primary" disabled={!all} onClick={onDone}>
        {all ? 'Start the readings' : `Tick all ${SAFETY_ITEMS.length} checks to start`}
      </button>
    </section>
  );
}
