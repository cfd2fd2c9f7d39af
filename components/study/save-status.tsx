import { StyleSheet, View } from 'react-native';
import { Button } from '../ui/button';
import { Text } from '../ui/text';
import { color, radius, space } from '../theme';
import type { SaveState } from './use-autosave';

const describe = (s: SaveState): { text: string; tone: 'muted' | 'abnormal' | 'ink' } => {
  switch (s.kind) {
    case 'saved':
      return { text: s.at ? `✓ Saved ${s.at.toLocaleTimeString('en-GB', { hour: '2-digit', minute: '2-digit' })}` : '✓ All changes saved', tone: 'muted' };
    case 'pending':
      return { text: '● Unsaved changes — saving shortly', tone: 'ink' };
    case 'saving':
      return { text: '↻ Saving…', tone: 'ink' };
    case 'offline':
      return { text: '⚠ Not reaching the server — changes kept on this device, sent when the connection returns', tone: 'abnormal' };
    case 'invalid':
      return { text: '▲ Not saved yet — correct the highlighted fields', tone: 'abnormal' };
    case 'conflict':
      return { text: '▲ Someone else saved this study meanwhile', tone: 'abnormal' };
    case 'stopped':
      return { text: `▲ Not saved: ${s.message}`, tone: 'abnormal' };
  }
};

export function SaveStatus({ state }: { state: SaveState }) {
  const d = describe(state);
  return (
    <View testID="save-status" accessibilityLiveRegion="polite" aria-live="polite">
      <Text variant="caption" weight="semibold" tone={d.tone} testID={`save-status-${state.kind}`}>
        {d.text}
      </Text>
    </View>
  );
}

/** Shown when the server holds a newer version: the user decides, nothing is overwritten silently. */
export function ConflictBanner({ state, onLoadSaved, onKeepMine }: { state: SaveState; onLoadSaved: () => void; onKeepMine: () => void }) {
  if (state.kind !== 'conflict') return null;
  return (
    <View style={styles.banner} role="alert" testID="conflict-banner">
      <Text weight="semibold">
        This study was saved elsewhere (version {state.current.version}) while you were editing.
      </Text>
      <Text variant="caption" tone="muted">
        Load the saved version to see their changes (your unsaved edits are dropped), or keep your edits: sections you changed are written on
        top of theirs, the sections you did not touch keep their changes.
      </Text>
      <View style={styles.actions}>
        <Button testID="conflict-load-saved" kind="secondary" label="Load the saved version" onPress={onLoadSaved} />
        <Button testID="conflict-keep-mine" label="Keep my edits on top" onPress={onKeepMine} />
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  banner: { gap: space.sm, backgroundColor: color.abnormalSoft, borderColor: color.abnormal, borderWidth: 1, borderRadius: radius.md, padding: space.md },
  actions: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
});
