import { useState } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';
import { Button } from '../ui/button';
import { Text } from '../ui/text';
import { color, radius, space, touchTarget } from '../theme';
import type { MergeChoice } from '../../shared/study/merge';
import type { SaveState } from './use-autosave';
import { fieldLabel, valueText } from '../../shared/study/field-labels';

const describe = (s: SaveState): { text: string; tone: 'muted' | 'abnormal' | 'ink' } => {
  switch (s.kind) {
    case 'saved':
      if (s.mergedWith) return { text: `✓ Saved, merged with changes saved elsewhere (version ${s.mergedWith})`, tone: 'muted' };
      return { text: s.at ? `✓ Saved ${s.at.toLocaleTimeString('en-GB', { hour: '2-digit', minute: '2-digit' })}` : '✓ All changes saved', tone: 'muted' };
    case 'pending':
      return { text: '● Saving shortly…', tone: 'ink' };
    case 'saving':
      return { text: '↻ Saving…', tone: 'ink' };
    case 'offline':
      if (s.gaveUp) return { text: '⚠ Not reaching the server — changes kept on this device; they go with your next edit, when the connection returns, or now', tone: 'abnormal' };
      return { text: '⚠ Not reaching the server — changes kept on this device, trying again', tone: 'abnormal' };
    case 'invalid':
      return { text: `▲ ${s.fields.length === 1 ? 'One field is' : `${s.fields.length} fields are`} not saved yet — correct the outlined ${s.fields.length === 1 ? 'box' : 'boxes'}; everything else is saved`, tone: 'abnormal' };
    case 'conflict':
      return { text: '▲ Someone else changed the same fields: choose below', tone: 'abnormal' };
    case 'stopped':
      return { text: `▲ Not saved: ${s.message}`, tone: 'abnormal' };
  }
};

export function SaveStatus({ state, onRetry }: { state: SaveState; onRetry?: () => void }) {
  const d = describe(state);
  const canRetry = state.kind === 'offline' && state.gaveUp && onRetry;
  return (
    <View testID="save-status" accessibilityLiveRegion="polite" aria-live="polite" style={canRetry ? styles.statusRow : undefined}>
      <Text variant="caption" weight="semibold" tone={d.tone} testID={`save-status-${state.kind}`} style={canRetry ? styles.statusText : undefined}>
        {d.text}
      </Text>
      {canRetry ? <Button label="Try now" kind="secondary" onPress={onRetry} testID="save-retry" accessibilityLabel="Try saving now" /> : null}
    </View>
  );
}

/**
 * Shown when another writer saved the same fields meanwhile. Fields only one side changed are merged
 * already; here each field both changed shows both values and the person picks one. Nothing is
 * overwritten without being shown.
 */
export function ConflictChooser({ state, onLoadSaved, onResolve }: { state: SaveState; onLoadSaved: () => void; onResolve: (choices: Record<string, MergeChoice>) => void }) {
  const [choices, setChoices] = useState<Record<string, MergeChoice>>({});
  if (state.kind !== 'conflict') return null;
  const undecided = state.conflicts.filter((c) => !choices[c.key]).length;
  return (
    <View style={styles.banner} role="alert" testID="conflict-banner">
      <Text weight="semibold">
        Someone else saved this study (version {state.current.version}) while you were editing, and changed {state.conflicts.length === 1 ? 'a field' : `${state.conflicts.length} fields`} you changed too.
      </Text>
      <Text variant="caption" tone="muted">
        Their other changes and yours are kept. For each field below, choose the value to keep.
      </Text>
      {state.conflicts.map((c, i) => {
        const label = fieldLabel(c.path, c.row);
        return (
          <View key={c.key} style={styles.conflict} role="radiogroup" aria-label={label} testID={`conflict-${i}`}>
            <Text weight="semibold" variant="caption">
              {label}
            </Text>
            <View style={styles.options}>
              {(['theirs', 'mine'] as const).map((side) => {
                const selected = choices[c.key] === side;
                return (
                  <Pressable
                    key={side}
                    role="radio"
                    aria-checked={selected}
                    testID={`conflict-${i}-${side}`}
                    accessibilityLabel={`${side === 'theirs' ? 'Saved by the other person' : 'Yours'}: ${valueText(c[side])}`}
                    onPress={() => setChoices({ ...choices, [c.key]: side })}
                    style={[styles.option, selected && styles.optionSelected]}
                  >
                    <Text variant="caption" tone={selected ? 'onBrand' : 'muted'}>
                      {selected ? '✓ ' : ''}
                      {side === 'theirs' ? 'Saved by the other person' : 'Yours'}
                    </Text>
                    <Text weight="semibold" tone={selected ? 'onBrand' : 'ink'} testID={`conflict-${i}-${side}-value`}>
                      {valueText(c[side])}
                    </Text>
                  </Pressable>
                );
              })}
            </View>
          </View>
        );
      })}
      <View style={styles.actions}>
        <Button
          testID="conflict-apply"
          label={undecided ? `Choose ${undecided === 1 ? 'the value' : `${undecided} values`} above` : 'Save with these choices'}
          disabled={undecided > 0}
          onPress={() => onResolve(choices)}
        />
        <Button testID="conflict-load-saved" kind="secondary" label="Load the saved version (drop all my edits)" onPress={onLoadSaved} />
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  statusRow: { flexDirection: 'row', alignItems: 'center', gap: space.sm, flexWrap: 'wrap' },
  statusText: { flexShrink: 1 },
  banner: { gap: space.sm, backgroundColor: color.abnormalSoft, borderColor: color.abnormal, borderWidth: 1, borderRadius: radius.md, padding: space.md },
  actions: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
  conflict: { gap: space.xs, paddingTop: space.sm, borderTopWidth: 1, borderTopColor: color.line },
  options: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
  option: { flexGrow: 1, flexBasis: 140, minHeight: touchTarget, padding: space.sm, borderRadius: radius.md, borderWidth: 1, borderColor: color.line, backgroundColor: color.surface },
  optionSelected: { backgroundColor: color.brand, borderColor: color.brand },
});
