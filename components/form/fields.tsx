import { useEffect, useState, type ReactNode } from 'react';
import { Pressable, StyleSheet, TextInput, View } from 'react-native';
import { useController, useFormContext } from 'react-hook-form';
import { Text } from '../ui/text';
import { color, font, radius, space, touchTarget, type } from '../theme';
import { parseNumberText } from './parse-number';
import { RadioChips } from '../ui/radio-chips';

interface FieldProps {
  name: string;
  label: string;
  testID: string;
  hint?: string;
}

/** Marks a box holding an input and its unit: the focus ring is drawn around the whole box (web). */
const focusRingWithin = { dataSet: { focusRing: 'within' } } as object;

/** Ids tying a control to its label and to its hint or error (aria-labelledby / aria-describedby). */
export const fieldIds = (testID: string) => ({ label: `${testID}-label`, help: `${testID}-help` });

/** Label above, the control, then a hint or the error — the error is announced and tied to the field. */
export function FieldShell({ label, error, hint, children, testID }: { label: string; error?: string; hint?: string; children: ReactNode; testID: string }) {
  const ids = fieldIds(testID);
  return (
    <View style={styles.field}>
      <Text weight="medium" variant="caption" nativeID={ids.label}>
        {label}
      </Text>
      {children}
      {error ? (
        <Text variant="caption" tone="abnormal" role="alert" weight="medium" nativeID={ids.help} testID={`${testID}-error`}>
          ▲ {error}
        </Text>
      ) : hint ? (
        <Text variant="caption" tone="faint" nativeID={ids.help}>
          {hint}
        </Text>
      ) : null}
    </View>
  );
}

/**
 * A number as text at `decimals` places at least (what was typed as "0.60" comes back as "0.60", not
 * "0.6"); more decimals than that are kept as they are.
 */
function numberText(value: number | null | undefined, decimals?: number): string {
  if (value == null || Number.isNaN(value)) return '';
  if (decimals === undefined) return String(value);
  const fixed = value.toFixed(decimals);
  return Number(fixed) === value ? fixed : String(value);
}

/**
 * A number with its unit beside it and the numeric keyboard; empty means "not recorded".
 * `accessibleLabel` names the box for screen readers when the visible label is shared with another
 * box (e.g. "Pa" at rest and at hyperaemia); `decimals` is the display precision of the quantity.
 */
export function NumberField({
  name,
  label,
  unit,
  testID,
  hint,
  integer = false,
  accessibleLabel,
  decimals,
}: FieldProps & { unit?: string; integer?: boolean; accessibleLabel?: string; decimals?: number }) {
  const { control, setError, clearErrors } = useFormContext();
  const { field, fieldState } = useController({ name, control });
  const isBad = (v: unknown) => typeof v === 'number' && Number.isNaN(v);
  // NaN comes back from a draft when the text typed was not a number: shown empty, with its error.
  const [text, setText] = useState(numberText(field.value, decimals));
  const [badText, setBadText] = useState(isBad(field.value));

  // Follow the value when it changes from outside (a reload or a merge), not while typing.
  useEffect(() => {
    if (typeof field.value === 'number' && Number.isNaN(field.value)) return; // our own placeholder for bad text
    const parsed = parseNumberText(text);
    if (!parsed.ok || parsed.value !== field.value) {
      setText(numberText(field.value, decimals));
      setBadText(false);
    }
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [field.value]);

  const error = badText ? `${label}: enter a number${unit ? ` in ${unit}` : ''}.` : fieldState.error?.message;
  return (
    <FieldShell label={label} error={error} hint={hint} testID={testID}>
      <View style={[styles.inputRow, error ? styles.inputError : null]} {...focusRingWithin}>
        <TextInput
          testID={testID}
          accessibilityLabel={`${accessibleLabel ?? label}${unit ? ` in ${unit}` : ''}`}
          aria-invalid={!!error}
          aria-describedby={error || hint ? fieldIds(testID).help : undefined}
          value={text}
          inputMode={integer ? 'numeric' : 'decimal'}
          keyboardType={integer ? 'number-pad' : 'decimal-pad'}
          onChangeText={(t) => {
            setText(t);
            const parsed = parseNumberText(t);
            if (!parsed.ok) {
              setBadText(true);
              // NaN fails the schema, so autosave holds this section and the live result ignores it,
              // rather than keeping the last good number as if it were still meant.
              field.onChange(Number.NaN);
              setError(name, { type: 'format', message: `${label}: enter a number.` });
              return;
            }
            setBadText(false);
            clearErrors(name);
            field.onChange(parsed.value);
          }}
          onBlur={field.onBlur}
          style={styles.input}
        />
        {unit ? (
          <Text tone="muted" style={styles.unit} aria-hidden>
            {unit}
          </Text>
        ) : null}
      </View>
    </FieldShell>
  );
}

export function TextField({ name, label, testID, hint, multiline = false, keyboard }: FieldProps & { multiline?: boolean; keyboard?: 'email' | 'text' }) {
  const { control } = useFormContext();
  const { field, fieldState } = useController({ name, control });
  return (
    <FieldShell label={label} error={fieldState.error?.message} hint={hint} testID={testID}>
      <TextInput
        testID={testID}
        accessibilityLabel={label}
        aria-invalid={!!fieldState.error}
        aria-describedby={fieldState.error || hint ? fieldIds(testID).help : undefined}
        value={field.value ?? ''}
        onChangeText={(t) => field.onChange(t === '' ? null : t)}
        onBlur={field.onBlur}
        multiline={multiline}
        numberOfLines={multiline ? 4 : 1}
        inputMode={keyboard === 'email' ? 'email' : 'text'}
        autoCapitalize={keyboard === 'email' ? 'none' : 'sentences'}
        style={[styles.input, styles.textInput, multiline && styles.multiline, fieldState.error ? styles.inputError : null]}
      />
    </FieldShell>
  );
}

export interface Option<T> {
  value: T;
  label: string;
}

/** One choice from a short list, as large radio chips; "Not recorded" clears it when allowed. */
export function ChoiceField<T extends string | number | boolean>({ name, label, testID, hint, options, allowClear = true }: FieldProps & { options: Option<T>[]; allowClear?: boolean }) {
  const { control } = useFormContext();
  const { field, fieldState } = useController({ name, control });
  const all: Option<T | null>[] = allowClear ? [...options, { value: null, label: 'Not recorded' }] : options;
  return (
    <FieldShell label={label} error={fieldState.error?.message} hint={hint} testID={testID}>
      <RadioChips
        testID={testID + '-group'}
        optionTestID={testID}
        labelledBy={fieldIds(testID).label}
        describedBy={fieldState.error || hint ? fieldIds(testID).help : undefined}
        options={all.map((o) => ({ ...o, quiet: o.value === null }))}
        value={(field.value ?? null) as T | null}
        onChange={(v) => field.onChange(v)}
      />
    </FieldShell>
  );
}

/**
 * Several choices from a short list, as checkbox chips (Space toggles the focused one). An exclusive
 * option ("None") clears the others when chosen and is cleared when another is chosen.
 */
export function MultiChoiceField<T extends string>({ name, label, testID, hint, options, exclusive }: FieldProps & { options: Option<T>[]; exclusive?: T }) {
  const { control } = useFormContext();
  const { field, fieldState } = useController({ name, control });
  const chosen: T[] = Array.isArray(field.value) ? field.value : [];
  const toggle = (value: T) => {
    if (chosen.includes(value)) return field.onChange(chosen.filter((v) => v !== value));
    if (value === exclusive) return field.onChange([value]);
    field.onChange([...chosen.filter((v) => v !== exclusive), value]);
  };
  return (
    <FieldShell label={label} error={fieldState.error?.message} hint={hint} testID={testID}>
      <View style={styles.chips} role="group" aria-labelledby={fieldIds(testID).label} aria-describedby={fieldState.error || hint ? fieldIds(testID).help : undefined}>
        {options.map((o) => {
          const selected = chosen.includes(o.value);
          return (
            <Pressable
              key={o.value}
              testID={`${testID}-${o.value}`}
              role="checkbox"
              aria-checked={selected}
              accessibilityLabel={o.label}
              onPress={() => toggle(o.value)}
              style={[styles.chip, selected && styles.chipSelected]}
            >
              <Text variant="caption" weight={selected ? 'semibold' : 'regular'} tone={selected ? 'onBrand' : 'ink'}>
                {selected ? '☑ ' : '☐ '}
                {o.label}
              </Text>
            </Pressable>
          );
        })}
      </View>
    </FieldShell>
  );
}

export function YesNoField(props: FieldProps) {
  return (
    <ChoiceField
      {...props}
      options={[
        { value: true, label: 'Yes' },
        { value: false, label: 'No' },
      ]}
    />
  );
}

/** A set of thermodilution injections: one box per injection; the value is the list of entered times. */
export function TransitTimesField({ name, label, testID, slots = 3 }: FieldProps & { slots?: number }) {
  const { control } = useFormContext();
  const { field, fieldState } = useController({ name, control });
  const values: number[] = field.value ?? [];
  const shown = (list: number[]) => list.map((v) => (Number.isNaN(v) ? '' : String(v)));
  const [texts, setTexts] = useState<string[]>(() => padTo(shown(values), Math.max(slots, values.length)));
  const [bad, setBad] = useState<number[]>(() => values.flatMap((v, i) => (Number.isNaN(v) ? [i] : [])));

  useEffect(() => {
    const entered = texts.map((t) => parseNumberText(t)).flatMap((p) => (!p.ok ? [Number.NaN] : p.value !== null ? [p.value] : []));
    if (entered.length !== values.length || entered.some((v, i) => !Object.is(v, values[i]))) {
      setTexts(padTo(shown(values), Math.max(slots, values.length)));
      setBad(values.flatMap((v, i) => (Number.isNaN(v) ? [i] : [])));
    }
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [JSON.stringify(values)]);

  const update = (i: number, t: string) => {
    const next = [...texts];
    next[i] = t;
    setTexts(next);
    const parsed = next.map((x) => parseNumberText(x));
    setBad(parsed.flatMap((p, j) => (p.ok ? [] : [j])));
    // A box with text that is not a number holds the section back (NaN fails the schema).
    field.onChange(parsed.flatMap((p) => (!p.ok ? [Number.NaN] : p.value !== null ? [p.value] : [])));
  };
  const error = bad.length ? `Injection ${bad.map((b) => b + 1).join(', ')}: enter a number in s.` : fieldState.error?.message ?? firstItemError(fieldState.error);
  return (
    <FieldShell label={label} error={error} hint="One box per saline injection, in seconds; three is usual." testID={testID}>
      <View style={styles.injections}>
        {texts.map((t, i) => (
          <View key={i} style={[styles.inputRow, styles.injection, bad.includes(i) && styles.inputError]} {...focusRingWithin}>
            <TextInput
              testID={`${testID}-${i}`}
              accessibilityLabel={`${label}, injection ${i + 1}, in seconds`}
              aria-invalid={bad.includes(i)}
              aria-describedby={fieldIds(testID).help}
              value={t}
              inputMode="decimal"
              keyboardType="decimal-pad"
              onChangeText={(x) => update(i, x)}
              style={styles.input}
            />
            <Text tone="muted" style={styles.unit} aria-hidden>
              s
            </Text>
          </View>
        ))}
        {texts.length < 6 ? (
          <Pressable testID={`${testID}-add`} role="button" accessibilityLabel={`Add an injection to ${label}`} onPress={() => setTexts([...texts, ''])} style={styles.addInjection}>
            <Text variant="caption" weight="semibold" tone="brand">
              + injection
            </Text>
          </Pressable>
        ) : null}
      </View>
    </FieldShell>
  );
}

function padTo(list: string[], n: number): string[] {
  return [...list, ...Array(Math.max(0, n - list.length)).fill('')];
}

function firstItemError(error: unknown): string | undefined {
  if (!error || typeof error !== 'object') return undefined;
  for (const v of Object.values(error as Record<string, unknown>)) {
    if (v && typeof v === 'object' && 'message' in v) return String((v as { message: unknown }).message);
  }
  return undefined;
}

const styles = StyleSheet.create({
  field: { gap: space.xs },
  inputRow: {
    flexDirection: 'row',
    alignItems: 'center',
    minHeight: touchTarget,
    borderWidth: 1,
    borderColor: color.inkFaint,
    borderRadius: radius.md,
    backgroundColor: color.surface,
    paddingHorizontal: space.md,
  },
  inputError: { borderColor: color.abnormal, borderWidth: 2 },
  input: { flex: 1, minWidth: 0, minHeight: touchTarget - 2, fontFamily: font.regular, fontSize: type.body.fontSize, color: color.ink },
  textInput: { borderWidth: 1, borderColor: color.inkFaint, borderRadius: radius.md, backgroundColor: color.surface, paddingHorizontal: space.md },
  multiline: { minHeight: 96, paddingVertical: space.sm, textAlignVertical: 'top' },
  unit: { marginLeft: space.xs },

  injections: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm, alignItems: 'center' },
  injection: { width: 96 },
  addInjection: { minHeight: touchTarget, justifyContent: 'center', paddingHorizontal: space.sm },
  chips: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm, minWidth: 0 },
  chip: {
    minHeight: touchTarget,
    justifyContent: 'center',
    paddingHorizontal: space.md,
    borderRadius: radius.md,
    borderWidth: 1,
    borderColor: color.line,
    backgroundColor: color.surface,
    flexShrink: 1,
  },
  chipSelected: { backgroundColor: color.brand, borderColor: color.brand },
});
