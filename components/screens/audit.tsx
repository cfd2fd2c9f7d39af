import { useState, type CSSProperties } from 'react';
import { StyleSheet, TextInput, View } from 'react-native';
import { Link, useLocalSearchParams, useRouter } from 'expo-router';
import { Center, Content, useIsWide } from '../ui/layout';
import { EmptyState, ErrorState, LoadingState } from '../ui/async-states';
import { PageHeader } from '../page-header';
import { Button } from '../ui/button';
import { Text } from '../ui/text';
import { formatDateTime } from '../format';
import { color, font, radius, space, touchTarget, type } from '../theme';
import { auditExportUrl, useAuditTrail } from '../data/audit-query';
import { auditActionLabel, auditActions, auditOutcomes, type AuditActionCode, type AuditFilters, type AuditOutcomeCode, type AuditTrailItem } from '../../shared/audit/trail';
import { roleLabel, isRole } from '../../shared/auth/permissions';

const isDay = (v: string) => /^\d{4}-\d{2}-\d{2}$/.test(v) && !Number.isNaN(Date.parse(`${v}T00:00:00Z`));
/** The start of a local day as an instant: the person means their day, not the server's. */
const dayStart = (day: string, plusDays = 0) => {
  const [y, m, d] = day.split('-').map(Number);
  return new Date(y, m - 1, d + plusDays).toISOString();
};

type Form = { user: string; patient: string; study: string; action: AuditActionCode | ''; outcome: AuditOutcomeCode | ''; from: string; to: string };
const emptyForm: Form = { user: '', patient: '', study: '', action: '', outcome: '', from: '', to: '' };
const outcomeLabel: Record<AuditOutcomeCode, string> = { success: 'Succeeded', failure: 'Failed', denied: 'Refused' };

function problemsOf(form: Form): Partial<Record<'from' | 'to', string>> {
  const problems: Partial<Record<'from' | 'to', string>> = {};
  if (form.from && !isDay(form.from)) problems.from = 'Type the day as year-month-day, e.g. 2026-03-11.';
  if (form.to && !isDay(form.to)) problems.to = 'Type the day as year-month-day, e.g. 2026-03-11.';
  if (!problems.from && !problems.to && form.from && form.to && form.from > form.to) problems.to = 'The last day is before the first day.';
  return problems;
}

/** What the server is asked: text trimmed, days as the instants that bound them locally (to: the next midnight, excluded). */
function filtersOf(form: Form): AuditFilters {
  return {
    user: form.user.trim() || undefined,
    patient: form.patient.trim() || undefined,
    study: form.study.trim() || undefined,
    action: form.action || undefined,
    outcome: form.outcome || undefined,
    from: form.from ? dayStart(form.from) : undefined,
    to: form.to ? dayStart(form.to, 1) : undefined,
  };
}

/**
 * The audit trail, newest first: who did what to which patient's study, when, from where, and
 * whether it worked. Searching and exporting are recorded in the trail too. The applied filters live
 * in the address, so a search can be shared and survives a reload.
 */
export default function AuditPage() {
  const params = useLocalSearchParams<Partial<Record<keyof Form, string>>>();
  const router = useRouter();
  const initial: Form = {
    ...emptyForm,
    ...Object.fromEntries(Object.entries(params).filter(([k, v]) => k in emptyForm && typeof v === 'string')),
  } as Form;
  const [form, setForm] = useState<Form>(initial);
  const [applied, setApplied] = useState<Form>(initial);
  const [showProblems, setShowProblems] = useState(false);
  const problems = problemsOf(form);
  const filters = filtersOf(applied);
  const audit = useAuditTrail(filters);
  const events = audit.data?.pages.flatMap((p) => p.items) ?? [];
  const filtered = Object.values(filters).some(Boolean);
  const wide = useIsWide();

  const apply = (next: Form) => {
    if (Object.keys(problemsOf(next)).length) {
      setShowProblems(true);
      return;
    }
    setShowProblems(false);
    setApplied(next);
    router.setParams(Object.fromEntries(Object.keys(emptyForm).map((k) => [k, next[k as keyof Form] || undefined])));
  };
  const set = (key: keyof Form) => (value: string) => setForm({ ...form, [key]: value });

  const field = (key: 'user' | 'patient' | 'study' | 'from' | 'to', label: string, hint: string) => {
    const problem = showProblems ? problems[key as 'from' | 'to'] : undefined;
    return (
      <View style={styles.filter}>
        <Text variant="caption" weight="semibold" tone="muted" nativeID={`audit-filter-${key}-label`}>
          {label}
        </Text>
        <TextInput
          testID={`audit-filter-${key}`}
          aria-labelledby={`audit-filter-${key}-label`}
          aria-describedby={problem ? `audit-filter-${key}-problem` : undefined}
          aria-invalid={!!problem}
          placeholder={hint}
          placeholderTextColor={color.inkFaint}
          value={form[key]}
          onChangeText={set(key)}
          onSubmitEditing={() => apply(form)}
          inputMode={key === 'from' || key === 'to' ? 'numeric' : 'text'}
          style={[styles.input, problem ? styles.inputBad : null]}
          autoCapitalize="none"
          autoCorrect={false}
        />
        {problem ? (
          <Text variant="caption" tone="abnormal" nativeID={`audit-filter-${key}-problem`} role="alert">
            ▲ {problem}
          </Text>
        ) : null}
      </View>
    );
  };
  const select = (key: 'action' | 'outcome', label: string, options: { value: string; label: string }[]) => (
    <View style={styles.filter}>
      <Text variant="caption" weight="semibold" tone="muted" nativeID={`audit-filter-${key}-label`}>
        {label}
      </Text>
      <select
        data-testid={`audit-filter-${key}`}
        aria-labelledby={`audit-filter-${key}-label`}
        value={form[key]}
        onChange={(e) => set(key)(e.target.value)}
        style={selectStyle}
      >
        <option value="">Any</option>
        {options.map((o) => (
          <option key={o.value} value={o.value}>
            {o.label}
          </option>
        ))}
      </select>
    </View>
  );

  return (
    <Content>
      <Center style={{ gap: space.xl }}>
        <PageHeader title="Audit trail" subtitle="Sign-ins, reads, changes and exports, newest first. The trail cannot be edited or deleted; searching and exporting it are recorded in it too." />
        <View role="group" aria-label="Filter the audit trail" style={styles.form}>
          <View style={styles.filters}>
            {field('user', 'User', 'Name, e-mail or user id')}
            {field('patient', 'Patient', 'MRN or family name')}
            {field('study', 'Study', 'Accession number')}
            {select(
              'action',
              'Action',
              auditActions.map((a) => ({ value: a, label: auditActionLabel[a] })),
            )}
            {select(
              'outcome',
              'Outcome',
              auditOutcomes.map((o) => ({ value: o, label: outcomeLabel[o] })),
            )}
            {field('from', 'From (day)', 'YYYY-MM-DD')}
            {field('to', 'To (day, included)', 'YYYY-MM-DD')}
          </View>
          <View style={styles.buttons}>
            <Button testID="audit-search" label="Search" onPress={() => apply(form)} />
            <Button
              testID="audit-clear"
              kind="secondary"
              label="Clear filters"
              disabled={!filtered && Object.values(form).every((v) => !v)}
              onPress={() => {
                setForm(emptyForm);
                apply(emptyForm);
              }}
            />
          </View>
        </View>

        <View style={styles.toolbar}>
          <Text tone="muted" aria-live="polite" testID="audit-summary" style={styles.grow}>
            {audit.isPending ? 'Searching…' : audit.isError && events.length === 0 ? '' : `${events.length} event${events.length === 1 ? '' : 's'} shown${audit.hasNextPage ? ', more older ones' : ''}${filtered ? ' (filtered)' : ''}.`}
          </Text>
          <View style={styles.buttons} role="group" aria-label="Export the events matching these filters">
            <ExportLink testID="audit-export-csv" href={auditExportUrl(filters, 'csv')} label="Export CSV" description="Download every event matching the filters as a CSV file" />
            <ExportLink testID="audit-export-fhir" href={auditExportUrl(filters, 'fhir')} label="Export FHIR JSON" description="Download the events matching the filters as FHIR AuditEvent resources (JSON)" />
          </View>
        </View>

        {audit.isPending ? (
          <LoadingState label="Loading the audit trail…" />
        ) : events.length === 0 && audit.isError ? (
          <ErrorState title="The audit trail could not be loaded" detail={audit.error.message} onRetry={() => audit.refetch()} />
        ) : events.length === 0 ? (
          <EmptyState title={filtered ? 'No event matches these filters' : 'No events recorded yet'} detail={filtered ? 'Widen the date range, or change or clear a filter.' : undefined} />
        ) : (
          <>
            {wide ? <EventTable events={events} /> : <EventList events={events} />}
            {audit.hasNextPage ? (
              <Button testID="audit-more" kind="secondary" label={audit.isFetchingNextPage ? 'Loading…' : 'Load more'} accessibilityLabel="Load older events" disabled={audit.isFetchingNextPage} onPress={() => void audit.fetchNextPage()} />
            ) : (
              <Text tone="muted" variant="caption" testID="audit-end">
                End of the trail for these filters.
              </Text>
            )}
            {audit.isFetchNextPageError ? (
              <Text tone="abnormal" role="alert">
                ▲ Older events could not be loaded: {audit.error?.message ?? 'try again'}.
              </Text>
            ) : null}
          </>
        )}
      </Center>
    </Content>
  );
}

/** A download link styled as a secondary button: the browser saves the file, with the session cookie. */
function ExportLink({ href, label, description, testID }: { href: string; label: string; description: string; testID: string }) {
  return (
    <a href={href} download data-testid={testID} aria-label={description} style={exportStyle}>
      {label}
    </a>
  );
}

function who(e: AuditTrailItem): string {
  const role = e.actorRole ? ` (${isRole(e.actorRole) ? roleLabel[e.actorRole] : e.actorRole})` : '';
  return `${e.actor ?? 'Not signed in'}${role}`;
}

function What({ e }: { e: AuditTrailItem }) {
  const failed = e.outcome !== 'success';
  return (
    <Text variant="caption" weight="semibold" tone={failed ? 'abnormal' : 'ink'}>
      {failed ? '▲ ' : ''}
      {e.actionLabel}
      {e.outcome === 'failure' ? ' (failed)' : e.outcome === 'denied' ? ' (refused)' : ''}
    </Text>
  );
}

function Target({ e }: { e: AuditTrailItem }) {
  if (e.studyId && e.target)
    return (
      <Link href={`/studies/${e.studyId}`} style={styles.link}>
        <Text variant="caption" tone="brand" weight="medium">
          {e.target}
        </Text>
      </Link>
    );
  return (
    <Text variant="caption" tone="muted">
      {e.target ?? '—'}
    </Text>
  );
}

/** Phone: one card per event, the time and act first. */
function EventList({ events }: { events: AuditTrailItem[] }) {
  return (
    <View style={styles.list} role="list" testID="audit-list" aria-label="Audit events">
      {events.map((e, i) => (
        <View key={e.id} role="listitem" style={[styles.card, i > 0 && styles.divider]} testID={`audit-row-${e.id}`}>
          <View style={styles.cardTop}>
            <What e={e} />
            <Text variant="caption" tone="muted">
              {formatDateTime(e.recordedAt)}
            </Text>
          </View>
          <Text variant="caption">{who(e)}</Text>
          <Target e={e} />
          {e.clientAddress ? (
            <Text variant="caption" tone="faint">
              from {e.clientAddress}
            </Text>
          ) : null}
        </View>
      ))}
    </View>
  );
}

/** Wide screens: a table with column headers, so a screen reader names each cell's column. */
function EventTable({ events }: { events: AuditTrailItem[] }) {
  const columns = [
    ['When', 1.1],
    ['Action', 1.1],
    ['User', 1.4],
    ['Record', 2.4],
    ['From', 0.9],
  ] as const;
  return (
    <View style={styles.list} role="table" aria-label="Audit events" testID="audit-list">
      <View role="row" style={[styles.tr, styles.thead]}>
        {columns.map(([label, flex]) => (
          <View key={label} role="columnheader" style={{ flex }}>
            <Text variant="caption" weight="semibold" tone="muted">
              {label}
            </Text>
          </View>
        ))}
      </View>
      {events.map((e) => (
        <View key={e.id} role="row" style={[styles.tr, styles.divider]} testID={`audit-row-${e.id}`}>
          <View role="cell" style={{ flex: columns[0][1] }}>
            <Text variant="caption">{formatDateTime(e.recordedAt)}</Text>
          </View>
          <View role="cell" style={{ flex: columns[1][1] }}>
            <What e={e} />
          </View>
          <View role="cell" style={{ flex: columns[2][1] }}>
            <Text variant="caption">{who(e)}</Text>
          </View>
          <View role="cell" style={{ flex: columns[3][1] }}>
            <Target e={e} />
          </View>
          <View role="cell" style={{ flex: columns[4][1] }}>
            <Text variant="caption" tone="faint">
              {e.clientAddress ?? ''}
            </Text>
          </View>
        </View>
      ))}
    </View>
  );
}

const selectStyle: CSSProperties = {
  minHeight: touchTarget,
  border: `1px solid ${color.inkFaint}`,
  borderRadius: radius.md,
  backgroundColor: color.surface,
  paddingLeft: space.md,
  paddingRight: space.md,
  fontFamily: font.regular,
  fontSize: type.body.fontSize,
  color: color.ink,
  width: '100%',
};

const exportStyle: CSSProperties = {
  minHeight: touchTarget,
  boxSizing: 'border-box',
  display: 'inline-flex',
  alignItems: 'center',
  justifyContent: 'center',
  paddingLeft: space.xl,
  paddingRight: space.xl,
  border: `1px solid ${color.brand}`,
  borderRadius: radius.md,
  backgroundColor: color.surface,
  color: color.brand,
  fontFamily: font.semibold,
  fontSize: type.body.fontSize,
  textDecoration: 'none',
};

const styles = StyleSheet.create({
  form: { gap: space.md },
  filters: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
  filter: { gap: space.xxs, flexGrow: 1, flexBasis: 150, maxWidth: 360 },
  input: { minHeight: touchTarget, borderWidth: 1, borderColor: color.inkFaint, borderRadius: radius.md, backgroundColor: color.surface, paddingHorizontal: space.md, fontFamily: font.regular, fontSize: type.body.fontSize, color: color.ink },
  inputBad: { borderColor: color.abnormal, borderWidth: 2 },
  buttons: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
  toolbar: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', gap: space.md },
  grow: { flexGrow: 1, flexBasis: 200 },
  list: { backgroundColor: color.surface, borderRadius: radius.lg, borderWidth: 1, borderColor: color.line },
  card: { gap: space.xxs, paddingHorizontal: space.lg, paddingVertical: space.md },
  cardTop: { flexDirection: 'row', flexWrap: 'wrap', justifyContent: 'space-between', columnGap: space.md },
  tr: { flexDirection: 'row', gap: space.lg, paddingHorizontal: space.lg, paddingVertical: space.md, alignItems: 'flex-start' },
  thead: { backgroundColor: color.surfaceSunken, borderTopLeftRadius: radius.lg, borderTopRightRadius: radius.lg },
  divider: { borderTopWidth: 1, borderTopColor: color.line },
  link: { minHeight: 24 },
});
