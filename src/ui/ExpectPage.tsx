import { useEffect, useRef, useState } from 'preact/hooks';
import type { SupplyResult } from '../engine/types';
import { SupplyForm } from './components/SupplyForm';
import { ReadingsTable } from './components/ReadingsTable';
import { SafetyNote } from './components/SafetyNote';
import { loadEngine } from './engine-bridge';
import {
  buildSpecInput,
  DEFAULT_FORM,
  FIELD_LABELS,
  fieldForSpecPath,
  type FieldProblem,
  type SupplyFormValues,
} from './supply-form';

type Outcome =
  | { kind: 'none' }
  | { kind: 'working' }
  | { kind: 'problem'; problem: FieldProblem }
  | { kind: 'readings'; result: SupplyResult; stale: boolean };

/** The one screen for now: describe a supply, see the readings it should give. */
export function ExpectPage() {
  const [values, setValues] = useState<SupplyFormValues>(DEFAULT_FORM);
  const [outcome, setOutcome] = useState<Outcome>({ kind: 'none' });
  const problemRef = useRef<HTMLParagraphElement>(null);
  const resultsRef = useRef<HTMLElement>(null);

  // On a phone the table starts below the fold: bring each new set of readings into view.
  useEffect(() => {
    if (outcome.kind === 'readings' && !outcome.stale) resultsRef.current?.scrollIntoView?.({ block: 'start' });
  }, [outcome]);

  const change = (patch: Partial<SupplyFormValues>) => {
    setValues((previous) => ({ ...previous, ...patch }));
    setOutcome((previous) => (previous.kind === 'readings' ? { ...previous, stale: true } : previous));
  };

  const showProblem = (problem: FieldProblem) => {
    setOutcome({ kind: 'problem', problem });
    // Focus after render so a screen reader reads the message and the cursor lands in the field.
    queueMicrotask(() => {
      const target = problem.field === null ? null : document.getElementById(problem.field);
      (target ?? problemRef.current)?.focus();
    });
  };

  const submit = async () => {
    const built = buildSpecInput(values);
    if ('problem' in built) {
      showProblem(built.problem);
      return;
    }
    setOutcome({ kind: 'working' });
    let engine: Awaited<ReturnType<typeof loadEngine>>;
    try {
      engine = await loadEngine();
    } catch {
      showProblem({ field: null, message: 'The calculator could not be loaded. Reload the page while online once, then it works offline.' });
      return;
    }
    try {
      setOutcome({ kind: 'readings', result: engine.expectReadings(built.input), stale: false });
    } catch (error) {
      if (error instanceof engine.SpecError) {
        const field = fieldForSpecPath(error.field, values.regulatorKind);
        // Under a field its label already says what the path says; elsewhere keep the path.
        showProblem({ field, message: field === null ? error.message : error.problem });
      } else {
        showProblem({ field: null, message: `The calculation failed: ${error instanceof Error ? error.message : String(error)}` });
      }
    }
  };

  const problem = outcome.kind === 'problem' ? outcome.problem : null;
  return (
    <main>
      <header>
        <h1>Ripplewright</h1>
        <p class="lede">What a healthy supply should read: transformer, rectifier, capacitor, regulator.</p>
      </header>
      <SafetyNote />
      <SupplyForm
        values={values}
        onChange={change}
        onSubmit={() => void submit()}
        problem={problem}
        busy={outcome.kind === 'working'}
      />
      <section class="results" ref={resultsRef} aria-live="polite" aria-busy={outcome.kind === 'working'}>
        {problem === null ? null : (
          <p class="problem" role={problem.field === null ? 'alert' : undefined} tabIndex={-1} ref={problemRef}>
            {problem.field === null ? problem.message : `Check “${FIELD_LABELS[problem.field]}”: ${problem.message}`}
          </p>
        )}
        {outcome.kind === 'readings' ? (
          <>
            {outcome.stale ? <p class="stale">The form has changed since these figures: press “Show expected readings” again.</p> : null}
            <ReadingsTable result={outcome.result} />
          </>
        ) : null}
      </section>
    </main>
  );
}
