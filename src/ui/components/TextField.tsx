export interface TextFieldProps {
  id: string;
  label: string;
  value: string;
  onInput: (value: string) => void;
  /** Extra words under the label, e.g. "per half of the winding". */
  hint?: string | undefined;
  /** What is wrong with this field's value, shown under it. */
  error?: string | undefined;
  placeholder?: string | undefined;
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

/** A labelled text input for numbers; text, not type=number, so "4,25" and blanks survive. */
export function TextField({ id, label, value, onInput, hint, error, placeholder }: TextFieldProps) {
  const hintId = hint === undefined ? undefined : `${id}-hint`;
  const errorId = error === undefined ? undefined : fieldErrorId(id);
  const describedBy = [hintId, errorId].filter((part) => part !== undefined).join(' ') || undefined;
  return (
    <div class="field">
      <label for={id}>{label}</label>
      {hint === undefined ? null : <span id={hintId} class="hint">{hint}</span>}
      <input
        id={id}
        name={id}
        type="text"
        inputMode="decimal"
        autoComplete="off"
        spellcheck={false}
        value={value}
        placeholder={placeholder}
        aria-invalid={error === undefined ? undefined : 'true'}
        aria-describedby={describedBy}
        onInput={(event) => onInput(event.currentTarget.value)}
      />
      <FieldError id={id} message={error} />
    </div>
  );
}
