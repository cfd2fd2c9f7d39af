import { useState, type ReactNode } from 'react';
import { Pressable, ScrollView, StyleSheet, View } from 'react-native';
import { Link, Slot, useLocalSearchParams, usePathname } from 'expo-router';
import { FormProvider, useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { studySectionsSchema, type StudyRecord, type StudySections } from '../../../shared/study/schema';
import { ApiError } from '../../data/api';
import { useStudy } from '../../data/study-query';
import { ErrorState, LoadingState } from '../../ui/async-states';
import { Center, useIsWide } from '../../ui/layout';
import { Text } from '../../ui/text';
import { StudyStateChip } from '../../study-state-chip';
import { patientName } from '../../format';
import { SectionNav } from '../../study/section-nav';
import { ConflictChooser, SaveStatus } from '../../study/save-status';
import { StudyResults } from '../../study/live-results';
import { DriftAlert } from '../../study/quality-alert';
import { StudyContext } from '../../study/study-context';
import { ReportPane, useHasRoomForReportPane, useReportPaneHidden } from '../../study/report-pane';
import { clearDraft, takeDraft, toStableJson } from '../../study/draft-store';
import { useMeQuery, useSignOut } from '../../data/me-query';
import { studyStateLabel } from '../../../shared/study/vocabulary';
import { isEditable } from '../../../shared/study/state-machine';
import { sectionsOf, useAutosave } from '../../study/use-autosave';
import { color, radius, space, touchTarget } from '../../theme';

/** One study: loads it once, owns its form and autosave; sections are child routes. */
export default function StudyLayout() {
  const { id } = useLocalSearchParams<{ id: string }>();
  const study = useStudy(id);
  const me = useMeQuery();
  if (study.isPending || !me.data) {
    return (
      <Center style={styles.pad}>
        <LoadingState label="Opening the study…" testID="study-loading" />
      </Center>
    );
  }
  if (study.isError) {
    const status = study.error instanceof ApiError ? study.error.status : undefined;
    const missing = status === 404 || status === 400;
    const forbidden = status === 403;
    return (
      <Center style={styles.pad}>
        <ErrorState
          title={missing ? 'No such study' : forbidden ? 'Your role may not open this study' : 'The study could not be opened'}
          detail={
            missing ? 'The link may be wrong, or the study was removed.' : forbidden ? 'Ask the lab or an administrator if you need to see it.' : study.error.message
          }
          onRetry={missing || forbidden ? undefined : () => study.refetch()}
        />
      </Center>
    );
  }
  return <StudyEditor key={study.data.id} study={study.data} userId={me.data!.id} canWrite={me.data!.permissions.includes('study:write')} home={me.data!.home ?? '/'} />;
}

function StudyEditor({ study, userId, canWrite, home }: { study: StudyRecord; userId: string; canWrite: boolean; home: string }) {
  const wide = useIsWide();
  const roomForPane = useHasRoomForReportPane();
  const [paneHidden, setPaneHidden] = useReportPaneHidden();
  // The Report section shows the preview itself; elsewhere on a wide screen it stands beside the form.
  const onReportSection = usePathname().endsWith('/report');
  const paneAvailable = wide && roomForPane && !onReportSection;
  const showPane = paneAvailable && !paneHidden;
  const signOut = useSignOut();
  // Signed (first or amended) and not being amended: read only.
  const signed = !isEditable(study.state);
  const locked = signed || !canWrite;
  const readOnlyReason = signed ? 'Signed — read only; changes are made as an addendum' : !canWrite ? 'Read only — your role may view this study but not change it' : null;
  // Unsent edits kept on this device win over the server copy at load. Sections the draft did not
  // change since its base are taken from the server, which may be newer; the base version then
  // decides whether the edits go as they are or need the user's choice (conflict).
  const [initial] = useState(() => {
    const server = sectionsOf(study);
    const draft = locked ? null : takeDraft(study.id, userId);
    if (!draft) return { values: server, base: server, baseVersion: study.version };
    const values = { ...draft.sections } as Record<keyof StudySections, unknown>;
    const base = { ...draft.base } as Record<keyof StudySections, unknown>;
    for (const n of Object.keys(server) as (keyof StudySections)[]) {
      // Untouched by the draft: show the server's copy, and count it as the base too, so a later
      // merge never mistakes it for an edit of this tab.
      if (toStableJson(draft.sections[n]) === toStableJson(draft.base[n])) values[n] = base[n] = server[n];
    }
    return { values: values as StudySections, base: base as StudySections, baseVersion: draft.baseVersion };
  });
  // Edits kept on this device for a study that has been signed since: say so, and let them go.
  const [leftover, setLeftover] = useState(() => (signed ? takeDraft(study.id, userId) : null));
  // Edits this role may not make are dropped at once (they could never be saved), with a word why.
  const [dropped] = useState(() => {
    if (signed || canWrite || !takeDraft(study.id, userId)) return false;
    clearDraft(study.id);
    return true;
  });
  const form = useForm<StudySections>({ defaultValues: initial.values, resolver: zodResolver(studySectionsSchema), mode: 'onChange' });
  const save = useAutosave(study, form, { baseVersion: initial.baseVersion, base: initial.base, userId }, locked);
  const current = save.state.kind === 'conflict' ? save.state.current : null;
  const stoppedByRole = save.state.kind === 'stopped' && save.state.reason === 'forbidden';

  const status = locked ? (
    <Text variant="caption" weight="semibold" tone="muted" testID="read-only-note">
      {readOnlyReason}
    </Text>
  ) : (
    <SaveStatus state={save.state} onRetry={() => void save.flush()} />
  );
  const header = wide ? (
    <View style={[styles.header, styles.headerWide]}>
      <View style={styles.headerText}>
        <Text variant="headline" weight="bold" role="heading" aria-level={1} testID="study-patient-name" numberOfLines={1}>
          {patientName(form.watch('patient'))}
        </Text>
        <Text variant="caption" tone="muted">
          MRN {form.watch('patient.mrn')} · {study.accession}
        </Text>
      </View>
      <DriftAlert studyId={study.id} />
      <View style={styles.headerState}>
        <StudyStateChip state={study.state} />
        {status}
      </View>
      {paneAvailable && paneHidden ? (
        <Pressable testID="report-pane-show" role="button" accessibilityLabel="Show the report preview beside the form" onPress={() => setPaneHidden(false)} style={styles.showPane}>
          <Text variant="caption" weight="semibold" tone="brand">
            Show report preview
          </Text>
        </Pressable>
      ) : null}
    </View>
  ) : (
    // A phone keeps the form in view: one compact bar (the app's own bar steps aside on a study).
    <View style={[styles.header, styles.headerPhone]} testID="study-header">
      <View style={styles.phoneRow}>
        <Link href={home as '/'} asChild>
          <Pressable testID="study-back" role="link" accessibilityLabel="Back to the list" style={styles.back}>
            <Text variant="title" weight="bold" tone="brand">
              ‹
            </Text>
          </Pressable>
        </Link>
        <Text variant="body" weight="bold" role="heading" aria-level={1} testID="study-patient-name" numberOfLines={1} style={styles.phoneName}>
          {patientName(form.watch('patient'))}
        </Text>
        <Pressable testID="sign-out-button" role="button" accessibilityLabel="Sign out" onPress={() => signOut.mutate()} disabled={signOut.isPending} style={styles.phoneSignOut}>
          <Text variant="caption" weight="semibold" tone="brand">
            {signOut.isPending ? 'Signing out…' : 'Sign out'}
          </Text>
        </Pressable>
      </View>
      <View style={styles.phoneMeta}>
        <Text variant="caption" tone="muted" numberOfLines={1} style={styles.phoneIds}>
          MRN {form.watch('patient.mrn')} · {study.accession} · {studyStateLabel[study.state]}
        </Text>
        <View style={styles.phoneStatus}>{status}</View>
      </View>
    </View>
  );

  const banners = (
    <>
          {leftover ? (
        <View style={[styles.bannerWrap]} role="alert" testID="leftover-draft">
          <Text weight="semibold" tone="abnormal">
            ▲ Edits made on this device were never saved, and the study has been signed since.
          </Text>
          <Text variant="caption" tone="muted">
            They cannot be added to a signed study; record what matters as an addendum.
          </Text>
          <Pressable
            role="button"
            testID="leftover-discard"
            accessibilityLabel="Discard the unsaved edits from this device"
            onPress={() => {
              clearDraft(study.id);
              setLeftover(null);
            }}
            style={styles.discard}
          >
            <Text variant="caption" weight="semibold" tone="brand">
              Discard them
            </Text>
          </Pressable>
        </View>
      ) : null}
      {dropped || stoppedByRole ? (
        <View style={styles.bannerWrap} role="alert" testID="edits-dropped">
          <Text weight="semibold" tone="abnormal">
            ▲ Edits made on this device were not saved: your role may view this study but not change it.
          </Text>
          <Text variant="caption" tone="muted">
            They have been removed from this device. The study shows what is saved.
          </Text>
        </View>
      ) : null}
      {current ? (
        <View style={styles.bannerWrap}>
          <ConflictChooser key={current.version} state={save.state} onLoadSaved={() => save.loadSaved(current)} onResolve={(choices) => save.resolve(current, choices)} />
        </View>
      ) : null}
    </>
  );

  return (
    <StudyContext.Provider value={{ study, locked, save, readOnlyReason }}>
      <FormProvider {...form}>
        <View style={styles.root} testID="study-editor">
          {header}
          {wide ? banners : null}
          {showPane ? (
            // Form and report preview side by side: the section tabs wrap above the form, and the live
            // results follow the section, as on a phone.
            <View style={styles.panes}>
              <View style={styles.formColumn}>
                <SectionNav studyId={study.id} vertical={false} wrap />
                <ScrollView style={styles.formPane} contentContainerStyle={styles.formContentBesidePreview} keyboardShouldPersistTaps="handled">
                  <Locked locked={locked}>
                    <Slot />
                  </Locked>
                  <StudyResults />
                </ScrollView>
              </View>
              <View style={styles.previewColumn}>
                <ReportPane studyId={study.id} onHide={() => setPaneHidden(true)} />
              </View>
            </View>
          ) : wide ? (
            <View style={styles.panes}>
              <SectionNav studyId={study.id} vertical />
              <ScrollView style={styles.formPane} contentContainerStyle={styles.formContent} keyboardShouldPersistTaps="handled">
                <Locked locked={locked}>
                  <Slot />
                </Locked>
              </ScrollView>
              <ScrollView style={styles.resultsPane} contentContainerStyle={styles.resultsContent}>
                <StudyResults />
              </ScrollView>
            </View>
          ) : (
            <>
              <SectionNav studyId={study.id} vertical={false} />
              <ScrollView style={styles.formPane} contentContainerStyle={styles.formContentPhone} keyboardShouldPersistTaps="handled">
                {banners}
                <DriftAlert studyId={study.id} />
                <Locked locked={locked}>
                  <Slot />
                </Locked>
                <StudyResults />
              </ScrollView>
            </>
          )}
        </View>
      </FormProvider>
    </StudyContext.Provider>
  );
}

/**
 * A signed study is read only: a native fieldset disables its inputs at once (web), and pointer
 * events are off for the choice chips. Autosave is off too, and the server refuses edits.
 */
function Locked({ locked, children }: { locked: boolean; children: ReactNode }) {
  if (!locked) return <>{children}</>;
  return (
    <View pointerEvents="none" aria-disabled>
      <fieldset disabled style={fieldsetReset}>
        {children}
      </fieldset>
    </View>
  );
}
const fieldsetReset = { border: 0, margin: 0, padding: 0, minWidth: 0, display: 'flex', flexDirection: 'column', gap: space.xl } as const;

const styles = StyleSheet.create({
  pad: { padding: space.xl },
  root: { flex: 1 },
  header: { flexDirection: 'row', flexWrap: 'wrap', justifyContent: 'space-between', alignItems: 'center', gap: space.sm, paddingHorizontal: space.lg, paddingVertical: space.md, backgroundColor: color.surface, borderBottomWidth: 1, borderBottomColor: color.line },
  headerWide: { paddingHorizontal: space.xxl, paddingVertical: space.lg },
  headerText: { flexShrink: 1, flexGrow: 1, minWidth: 0, gap: 2 },
  headerState: { alignItems: 'flex-end', gap: space.xs, flexShrink: 1 },
  headerPhone: { flexDirection: 'column', flexWrap: 'nowrap', alignItems: 'stretch', paddingHorizontal: space.xs, paddingTop: 0, paddingBottom: space.xs, gap: 0 },
  phoneRow: { flexDirection: 'row', alignItems: 'center', gap: space.xs },
  phoneName: { flex: 1, minWidth: 0 },
  phoneSignOut: { minHeight: touchTarget, justifyContent: 'center', paddingHorizontal: space.sm },
  // One line: the identifiers give way (ellipsis) before the save state does.
  phoneMeta: { flexDirection: 'row', flexWrap: 'nowrap', alignItems: 'flex-start', justifyContent: 'space-between', columnGap: space.sm, paddingHorizontal: space.sm },
  phoneIds: { flexShrink: 1, minWidth: 0 },
  phoneStatus: { flexShrink: 0, maxWidth: '55%', alignItems: 'flex-end' },
  back: { minWidth: touchTarget, minHeight: touchTarget, alignItems: 'center', justifyContent: 'center' },
  bannerWrap: { padding: space.md, gap: space.xs },
  discard: { minHeight: 44, justifyContent: 'center', alignSelf: 'flex-start' },
  panes: { flex: 1, flexDirection: 'row', gap: space.xl, paddingLeft: space.xl, paddingTop: space.xl },
  formPane: { flex: 1 },
  formContent: { paddingBottom: space.xxxl, paddingRight: space.xs, gap: space.xl, maxWidth: 760 },
  formContentPhone: { padding: space.lg, gap: space.xl, paddingBottom: space.xxxl },
  resultsPane: { width: 380, flexGrow: 0, paddingRight: space.xl },
  formColumn: { flex: 1, minWidth: 360, maxWidth: 760 },
  formContentBesidePreview: { paddingTop: space.lg, paddingBottom: space.xxxl, paddingRight: space.xs, gap: space.xl },
  previewColumn: { flex: 1, minWidth: 340, maxWidth: 640, paddingRight: space.xl, paddingBottom: space.xl },
  showPane: { minHeight: touchTarget, justifyContent: 'center', paddingHorizontal: space.sm, borderRadius: radius.md, borderWidth: 1, borderColor: color.line },
  resultsContent: { paddingBottom: space.xxxl },
});
