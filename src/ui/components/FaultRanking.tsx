import { FAULTS } from '../../engine/diagnosis';
import type { Diagnosis } from '../../engine/diagnosis/types';

/** The faults that fit the readings, most likely first, with why; updated on every reading. */
export function FaultRanking({ diagnosis, working, limit = 4 }: { diagnosis: Diagnosis; working: boolean; limit?: number }) {
  const shown = diagnosis.ranked.filter((fault) => fault.probability >= 0.01).slice(0, limit);
  return (
    <section class="ranking" aria-labelledby="ranking-title" aria-live="polite" aria-busy={working}>
      <h2 id="ranking-title">Likely faults{working ? <span class="hint"> (updating…)</span> : null}</h2>
      {diagnosis.unexplained ? (
        <p class="notice warning">
          <span aria-hidden="true">⚠</span> These readings fit nothing known well. Check the supply details, the meter mode and the probe points, then take the readings again.
        </p>
      ) : null}
      <ol class="fault-list">
        {shown.map((fault) => {
          const percent = Math.round(fault.probability * 100);
          return (
            <li key={`${fault.fault}:${fault.part ?? ''}`} class="fault">
              <div class="fault-head">
                <span class="fault-name">
                  {FAULTS[fault.fault].name}
                  {fault.part ? ` — ${fault.part}` : ''}
                </span>
                <span class="fault-probability">{percent} %</span>
              </div>
              <div class="bar" aria-hidden="true">
                <span style={{ width: `${Math.max(percent, 1)}%` }} />
              </div>
              <p class="fault-why">{fault.why}</p>
            </li>
          );
        })}
      </ol>
      {diagnosis.problems.length === 0 ? null : (
        <ul class="problems">
          {diagnosis.problems.map((p) => (
            <li key={p.field} class="problem">
              {p.field}: {p.message}
            </li>
          ))}
        </ul>
      )}
    </section>
  );
}
