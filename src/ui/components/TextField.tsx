export interface TextFieldProps {
  id: string;
  label: string;
  value: string;
  onInput: (value: string) => void;
  /** Called when the field is left or Enter is pressed (a value is complete). */
  onCommit?: (value: string) => void;
  /** Extra words under the label, e.g. "per half of the winding". */
  hint?: string | undefined;
  /** What is wrong with this field's value, shown under it. */
  error?: string | undefined;
  placeholder?: string | undefined;
  /** "number" (the default) brings up the numeric keypad; "text" and "long" are for words. */
  kind?: 'number' | 'text' | 'long';
  /** Shown after the input, e.g. "V" or "µF": units are always on screen. */
  unit?: string | undefined;
  autoComplete?: string;
  required?: boolean;
}

/** Id of the error text under a field, for aria-describedby. */
export function fieldErrorId(id: string): string {
  return `${id}-error`;
}

/** The error text under a field; role=alert so it is announced when it appears. */
export function FieldError({ id, message }: { id: string; message: string | undefined }) {
  if (message === undefined) return null;
  return (
    <p id={fieldErrorId(id)} class="field-error" role="alert">
      {message}
    </p>
  );
}

/**
 * A labelled text input. Numbers use text with inputmode=decimal, not type=number, so "4,25",
 * "OL" and half-typed values survive.
 */
export function TextField({ id, label, value, onInput, onCommit, hint, error, placeholder, kind = 'number', unit, autoComplete = 'off', required }: TextFieldProps) {
  const hintId = hint === undefined ? undefined : `${id}-hint`;
  const errorId = error === undefined ? undefined : fieldErrorId(id);
  const unitId = unit === undefined ? undefined : `${id}-unit`;
  const describedBy = [hintId, unitId, errorId].filter((part) => part !== undefined).join(' ') || undefined;
  const common = {
    id,
    name: id,
    value,
    placeholder,
    required,
    'aria-invalid': error === undefined ? undefined : ('true' as const),
    'aria-describedby': describedBy,
  };
  return (
    <div class="field">
      <label for={id}>{label}</label>
      {hint === undefined ? null : <span id={hintId} class="hint">{hint}</span>}
      {kind === 'long' ? (
        <textarea {...common} rows={3} onInput={(event) => onInput(event.currentTarget.value)} onBlur={(event) => onCommit?.(event.currentTarget.value)} />
      ) : (
        <span class="input-with-unit">
          <input
            {...common}
            type="text"
            inputMode={kind === 'number' ? 'decimal' : 'text'}
            autoComplete={autoComplete}
            spellcheck={kind === 'number' ? false : undefined}
            onInput={(event) => onInput(event.currentTarget.value)}
            onBlur={(event) => onCommit?.(event.currentTarget.value)}
            onKeyDown={(event) => {
              if (event.key === 'Enter' && onCommit !== undefined) {
                event.preventDefault();
                onCommit(event.currentTarget.value);
              }
            }}
          />
          {unit === undefined ? null : <span id={unitId} class="unit">{unit}</span>}
        </span>
      )}
      <FieldError id={id} message={error} />
    </div>
  );
}
