import { useRef } from 'react';
import { Pressable, StyleSheet, View, type StyleProp, type ViewStyle } from 'react-native';
import { Text } from './text';
import { color, radius, space, touchTarget } from '../theme';

export interface RadioOption<T> {
  value: T;
  label: string;
  /** Shown quietly (dashed) when not chosen, e.g. "Not recorded" or "Any". */
  quiet?: boolean;
}

type KeyEvent = { key: string; preventDefault: () => void };
const focusable = (el: unknown) => el as { focus?: () => void } | null;

/**
 * One choice from a short list as large chips, with the radio group's standard keys (WAI-ARIA APG,
 * radio group pattern): Tab reaches the chosen chip, arrow keys move the choice, Space chooses.
 */
export function RadioChips<T>({
  options,
  value,
  onChange,
  testID,
  optionTestID = testID,
  label,
  labelledBy,
  describedBy,
  pill = false,
  style,
}: {
  options: RadioOption<T>[];
  value: T;
  onChange: (v: T) => void;
  testID: string;
  /** Prefix of each chip's test id (`<prefix>-<value>`); the group's test id by default. */
  optionTestID?: string;
  label?: string;
  labelledBy?: string;
  describedBy?: string;
  pill?: boolean;
  style?: StyleProp<ViewStyle>;
}) {
  const refs = useRef<(View | null)[]>([]);
  const selectedIndex = options.findIndex((o) => Object.is(o.value, value));
  const tabbable = selectedIndex >= 0 ? selectedIndex : 0;
  const move = (from: number, step: number) => {
    const next = (from + step + options.length) % options.length;
    onChange(options[next].value);
    focusable(refs.current[next])?.focus?.();
  };
  return (
    <View style={[styles.chips, style]} role="radiogroup" aria-label={label} aria-labelledby={labelledBy} aria-describedby={describedBy} testID={testID}>
      {options.map((o, i) => {
        const selected = i === selectedIndex;
        const quietSelected = selected && o.quiet;
        return (
          <Pressable
            key={String(o.value)}
            ref={(el) => {
              refs.current[i] = el;
            }}
            testID={`${optionTestID}-${String(o.value)}`}
            role="radio"
            aria-checked={selected}
            accessibilityLabel={o.label}
            tabIndex={i === tabbable ? 0 : -1}
            onPress={() => onChange(o.value)}
            {...({
              onKeyDown: (e: KeyEvent) => {
                if (e.key === 'ArrowRight' || e.key === 'ArrowDown') {
                  e.preventDefault();
                  move(i, 1);
                } else if (e.key === 'ArrowLeft' || e.key === 'ArrowUp') {
                  e.preventDefault();
                  move(i, -1);
                } else if (e.key === ' ') {
                  e.preventDefault();
                  onChange(o.value);
                }
              },
            } as object)}
            style={[styles.chip, pill && styles.pill, selected && (quietSelected ? styles.chipQuietSelected : styles.chipSelected), o.quiet && !selected && styles.chipQuiet]}
          >
            <Text variant="caption" weight={selected ? 'semibold' : 'regular'} tone={selected && !quietSelected ? 'onBrand' : quietSelected ? 'muted' : 'ink'} style={styles.label}>
              {selected ? '✓ ' : ''}
              {o.label}
            </Text>
          </Pressable>
        );
      })}
    </View>
  );
}

const styles = StyleSheet.create({
  chips: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm, minWidth: 0 },
  chip: {
    minHeight: touchTarget,
    maxWidth: '100%',
    flexShrink: 1,
    justifyContent: 'center',
    paddingHorizontal: space.md,
    paddingVertical: space.xs,
    borderRadius: radius.md,
    borderWidth: 1,
    borderColor: color.line,
    backgroundColor: color.surface,
  },
  pill: { borderRadius: radius.pill },
  label: { flexShrink: 1 },
  chipSelected: { backgroundColor: color.brand, borderColor: color.brand },
  chipQuiet: { borderStyle: 'dashed' },
  chipQuietSelected: { backgroundColor: color.surfaceSunken, borderColor: color.inkFaint, borderStyle: 'dashed' },
});
