import { useEffect, useState } from 'react';
import { Pressable, ScrollView, StyleSheet, View, useWindowDimensions } from 'react-native';
import { Link } from 'expo-router';
import { useQueryClient } from '@tanstack/react-query';
import { reportKeys, useReportPreview } from '../data/report-query';
import { useStudy } from '../data/study-query';
import { ReportDocumentView } from '../report/report-document';
import { ErrorState, LoadingState } from '../ui/async-states';
import { Text } from '../ui/text';
import { breakpoint, color, radius, space, touchTarget } from '../theme';
import { useStudyContext } from './study-context';
import { missingSummary } from '../../shared/report/completeness';

const hiddenKey = 'isobar.report-pane.hidden';

/** True on screens with room for the form and the report preview side by side. */
export function useHasRoomForReportPane(): boolean {
  return useWindowDimensions().width >= breakpoint.preview;
}

/** Whether the person has hidden the report preview pane (remembered on this device). */
export function useReportPaneHidden(): [boolean, (hidden: boolean) => void] {
  const [hidden, setHidden] = useState(() => {
    try {
      return typeof localStorage !== 'undefined' && localStorage.getItem(hiddenKey) === '1';
    } catch {
      return false;
    }
  });
  const set = (value: boolean) => {
    setHidden(value);
    try {
      if (value) localStorage.setItem(hiddenKey, '1');
      else localStorage.removeItem(hiddenKey);
    } catch {
      /* private mode: remembered for this page only */
    }
  };
  return [hidden, set];
}

/**
 * The live report preview beside the form (wide screens): the report as it would be signed now,
 * built by the server from the saved record. Each autosave gives the study a new version, and the
 * preview is fetched again for it.
 */
export function ReportPane({ studyId, onHide }: { studyId: string; onHide: () => void }) {
  const client = useQueryClient();
  const preview = useReportPreview(studyId);
  const savedVersion = useStudy(studyId).data?.version;
  const { save } = useStudyContext();
  const shownVersion = preview.data?.studyVersion;

  // A save moved the study past the version the preview was built from: build it again.
  useEffect(() => {
    if (savedVersion !== undefined && shownVersion !== undefined && shownVersion < savedVersion) {
      void client.invalidateQueries({ queryKey: reportKeys.preview(studyId) });
    }
  }, [client, savedVersion, shownVersion, studyId]);

  const unsaved = save.state.kind === 'pending' || save.state.kind === 'saving' || save.state.kind === 'invalid' || save.state.kind === 'offline';
  const p = preview.data;
  return (
    <View style={styles.pane} testID="report-pane" role="complementary" aria-label="Report preview">
      <View style={styles.head}>
        <View style={styles.headText}>
          <Text variant="body" weight="semibold" role="heading" aria-level={2}>
            Report preview
          </Text>
          <Text variant="caption" tone="muted" testID="report-pane-status" aria-live="polite">
            {preview.isFetching && p ? 'Updating…' : p ? `From the saved record, version ${p.studyVersion}` : ' '}
            {unsaved ? ' · your latest edits appear once saved' : ''}
          </Text>
        </View>
        <Pressable testID="report-pane-hide" role="button" accessibilityLabel="Hide the report preview" onPress={onHide} style={styles.hide}>
          <Text variant="caption" weight="semibold" tone="brand">
            Hide
          </Text>
        </Pressable>
      </View>
      {preview.isPending ? (
        <LoadingState label="Building the report preview…" testID="report-pane-loading" />
      ) : preview.isError ? (
        <ErrorState title="The report preview could not be built" detail={preview.error.message} onRetry={() => void preview.refetch()} testID="report-pane-error" />
      ) : (
        <ScrollView style={styles.scroll} contentContainerStyle={styles.scrollContent}>
          {p && !p.completeness.complete ? (
            <Link href={`/studies/${studyId}/report` as '/'} asChild>
              <Pressable role="link" testID="report-pane-missing" style={styles.missing}>
                <Text variant="caption" weight="semibold" tone="abnormal">
                  ▲ {missingSummary(p.completeness)} See Report & signature.
                </Text>
              </Pressable>
            </Link>
          ) : null}
          {p ? <ReportDocumentView doc={p.document} compact testID="report-pane-document" /> : null}
        </ScrollView>
      )}
    </View>
  );
}

const styles = StyleSheet.create({
  pane: { flex: 1, backgroundColor: color.surface, borderRadius: radius.lg, borderWidth: 1, borderColor: color.line, overflow: 'hidden' },
  head: { flexDirection: 'row', alignItems: 'center', gap: space.sm, paddingHorizontal: space.lg, paddingVertical: space.sm, borderBottomWidth: 1, borderBottomColor: color.line },
  headText: { flex: 1, minWidth: 0 },
  hide: { minHeight: touchTarget, minWidth: touchTarget, justifyContent: 'center', alignItems: 'center', paddingHorizontal: space.sm },
  scroll: { flex: 1 },
  scrollContent: { padding: space.lg, gap: space.md, paddingBottom: space.xxxl },
  missing: { backgroundColor: color.abnormalSoft, borderRadius: radius.md, padding: space.sm },
});
