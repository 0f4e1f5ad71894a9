/** The mains and stored-charge caution (DOMAIN.md §8), shown before any figures. */
export function SafetyNote() {
  return (
    <aside class="safety" aria-labelledby="safety-title">
      <h2 id="safety-title">Mains and charged capacitors can kill</h2>
      <ul>
        <li>Work de-energised where you can: isolate, lock out and tag, then prove dead with a meter you have checked on a known live source before and after.</li>
        <li>Use a meter and leads rated for the place: CAT II for plug-in appliances, CAT III for panels and fixed wiring.</li>
        <li>Bulk capacitors keep their charge after unplugging. Discharge through a rated resistor and measure before touching, and before using ohms or diode test.</li>
        <li>These figures help diagnosis only. Local codes, your employer’s rules and licensed practice come first.</li>
      </ul>
    </aside>
  );
}
