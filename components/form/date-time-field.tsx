import { useEffect, useState } from 'react';
import { StyleSheet, TextInput } from 'react-native';
import { useController, useFormContext } from 'react-hook-form';
import { FieldShell, fieldIds } from './fields';
import { color, font, radius, space, touchTarget, type } from '../theme';

const pad = (n: number) => String(n).padStart(2, '0');
const isInstant = (v: string) => /^\d{4}-\d{2}-\d{2}T/.test(v) && !Number.isNaN(new Date(v).getTime());
const toLocalText = (iso: string | null) => {
  if (!iso) return '';
  if (!isInstant(iso)) return iso; // text the user has not corrected yet
  const d = new Date(iso);
  return `${d.getFullYear()}-${pad(d.getMonth() + 1)}-${pad(d.getDate())} ${pad(d.getHours())}:${pad(d.getMinutes())}`;
};

/** "YYYY-MM-DD HH:MM" in the lab's local time, stored as an ISO instant. */
function parseLocalDateTime(text: string): { ok: true; value: string | null } | { ok: false } {
  const t = text.trim();
  if (!t) return { ok: true, value: null };
  const m = t.match(/^(\d{4})-(\d{2})-(\d{2})[ T](\d{1,2}):(\d{2})$/);
  if (!m) return { ok: false };
  const d = new Date(Number(m[1]), Number(m[2]) - 1, Number(m[3]), Number(m[4]), Number(m[5]));
  if (Number.isNaN(d.getTime()) || d.getMonth() !== Number(m[2]) - 1 || Number(m[4]) > 23) return { ok: false };
  return { ok: true, value: d.toISOString() };
}

export function DateTimeField({ name, label, testID }: { name: string; label: string; testID: string }) {
  const { control, setError, clearErrors } = useFormContext();
  const { field, fieldState } = useController({ name, control });
  const [text, setText] = useState(toLocalText(field.value));
  useEffect(() => {
    const p = parseLocalDateTime(text);
    if (!p.ok || p.value !== field.value) setText(toLocalText(field.value));
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [field.value]);
  return (
    <FieldShell label={label} error={fieldState.error?.message} hint={text.trim() ? 'YYYY-MM-DD HH:MM, local time' : 'Not recorded yet · write it as YYYY-MM-DD HH:MM, local time'} testID={testID}>
      <TextInput
        testID={testID}
        accessibilityLabel={`${label}, as year-month-day hours:minutes`}
        aria-invalid={!!fieldState.error}
        aria-describedby={fieldIds(testID).help}
        value={text}
        // The format itself, drawn faint: an empty box must never look like a recorded time.
        placeholder="YYYY-MM-DD HH:MM"
        placeholderTextColor={color.inkFaint}
        // Plain text keyboard: phone number pads lack "-", ":" and the space the format needs.
        inputMode="text"
        autoCapitalize="none"
        onChangeText={(t) => {
          setText(t);
          const p = parseLocalDateTime(t);
          if (!p.ok) {
            // The typed text itself fails the schema, so autosave holds the section instead of keeping
            // the last good time as if it were still meant.
            field.onChange(t);
            return setError(name, { type: 'format', message: `${label}: write it as YYYY-MM-DD HH:MM.` });
          }
          clearErrors(name);
          field.onChange(p.value);
        }}
        style={[styles.input, !text.trim() && styles.empty, fieldState.error ? styles.error : null]}
      />
    </FieldShell>
  );
}

const styles = StyleSheet.create({
  input: { minHeight: touchTarget, borderWidth: 1, borderColor: color.inkFaint, borderRadius: radius.md, backgroundColor: color.surface, paddingHorizontal: space.md, fontFamily: font.regular, fontSize: type.body.fontSize, color: color.ink },
  error: { borderColor: color.abnormal, borderWidth: 2 },
  empty: { borderStyle: 'dashed', backgroundColor: color.surfaceSunken },
});
