import { SelectField } from "~/components/ui/field";

/**
 * One part of the kit the drop log names. With one allowed part it is taken and shown (and sent, so the
 * hand-in says which); with more the student chooses, and nothing is chosen for them.
 */
export function PartChoice({
  label,
  name,
  value,
  onChange,
  options,
  error,
  prompt,
}: {
  label: string;
  name: string;
  value: string;
  onChange: (id: string) => void;
  options: { id: string; label: string; record: string }[];
  error: string[];
  prompt: string;
}) {
  if (options.length === 0) return null;
  const chosen = options.find((option) => option.id === value);
  if (options.length === 1) {
    return (
      <p className="mt-2 text-sm">
        <input type="hidden" name={name} value={options[0].id} />
        <span className="text-ink-700">{label}:</span> {options[0].label} <span className="text-ink-600">({options[0].record})</span>
        {error.length ? <span className="block font-medium text-outlier">{error.join(" ")}</span> : null}
      </p>
    );
  }
  return (
    <div className="mt-2">
      <SelectField
        label={label}
        name={name}
        value={value}
        required
        onChange={(event) => onChange(event.target.value)}
        error={error}
        hint={chosen ? `Kit record: ${chosen.record}.` : `Your kit holds ${options.length} this lab allows.`}
      >
        <option value="" disabled>
          {prompt}
        </option>
        {options.map((option) => (
          <option key={option.id} value={option.id}>
            {option.label}
          </option>
        ))}
      </SelectField>
    </div>
  );
}
