import { useState } from 'react';
import { Platform, Pressable, ScrollView, StyleSheet, TextInput, View, useWindowDimensions, type ViewStyle } from 'react-native';
import { Link, useLocalSearchParams } from 'expo-router';
import { Center, Content, useIsWide } from '../ui/layout';
import { ErrorState, LoadingState } from '../ui/async-states';
import { Button } from '../ui/button';
import { Text } from '../ui/text';
import { formatDateTime, patientName } from '../format';
import { ApiError } from '../data/api';
import { applyFieldErrors } from '../form/apply-field-errors';
import { useMeQuery } from '../data/me-query';
import { useAddCode, useCodingReview, useCompleteReview, useDecideCode } from '../data/coding-query';
import { can } from '../../shared/auth/permissions';
import { checkCodeLine, codeSystems, type CodeSystem } from '../../shared/coding';
import { reviewStatusLabel, type CodeChange, type ReviewLine, type ReviewView } from '../../shared/coding/review';
import { color, font, radius, space, touchTarget, type } from '../theme';

const lineLabel = (c: { code: string; modifiers: string[]; units: number }) => `${c.code}${c.modifiers.length ? `-${c.modifiers.join('-')}` : ''}${c.units > 1 ? ` × ${c.units}` : ''}`;
const parseModifiers = (text: string) =>
  text
    .split(/[\s,;-]+/)
    .map((m) => m.trim().toUpperCase())
    .filter(Boolean);
/** Field problems from an API answer (or a local check), by field name. */
type Problems = Partial<Record<'code' | 'units' | 'modifiers' | 'reason' | 'form', string>>;
const problemsOf = (error: unknown): Problems => {
  if (!(error instanceof ApiError)) return { form: error instanceof Error ? error.message : 'The change could not be saved.' };
  const out: Problems = {};
  const rest = applyFieldErrors(error, (name, e) => (out[name as keyof Problems] = out[name as keyof Problems] ?? e.message), { fields: ['code', 'units', 'modifiers', 'reason'] });
  if (!Object.keys(out).length) out.form = rest.join(' ') || error.message;
  return out;
};

/**
 * One study's code review: every suggested code with the rule and reason behind it, the caution,
 * the warnings, and what changed since the previous report version; the signed report beside the
 * codes on a wide screen, below them on a phone. Coders decide; the chief reads.
 */
export default function CodingReviewPage() {
  const { id } = useLocalSearchParams<{ id: string }>();
  const review = useCodingReview(id);
  const me = useMeQuery();
  const wide = useIsWide();
  // On a large screen the report gets half the width, enough for its fixed-width tables.
  const roomy = useWindowDimensions().width >= 1280;
  if (review.isPending || !me.data) {
    return (
      <Content>
        <Center>
          <LoadingState label="Opening the code review…" testID="review-loading" />
        </Center>
      </Content>
    );
  }
  if (review.isError) {
    return (
      <Content>
        <Center>
          <ErrorState title="The code review could not be opened" detail={review.error.message} onRetry={() => review.refetch()} />
        </Center>
      </Content>
    );
  }
  const r = review.data;
  const mayReview = can(me.data.role, 'coding:review') && r.status !== 'coded';
  const codes = <Codes review={r} mayReview={mayReview} />;
  const report = <Report review={r} beside={wide} fixedWidth={wide && roomy} />;
  return (
    <Content>
      <Center style={{ gap: space.xl }}>
        <Header review={r} />
        {wide ? (
          <View style={styles.panes}>
            <View style={[styles.codesPane, roomy && styles.half]}>{codes}</View>
            <View style={[styles.reportPane, roomy && styles.half, stickyOnWeb]}>{report}</View>
          </View>
        ) : (
          <>
            {codes}
            {report}
          </>
        )}
      </Center>
    </Content>
  );
}

function Header({ review: r }: { review: ReviewView }) {
  return (
    <View style={styles.header}>
      <Link href="/coding" asChild>
        <Pressable role="link" testID="review-back" accessibilityLabel="Back to the coding queue" style={styles.back}>
          <Text variant="caption" tone="brand" weight="semibold">
            ‹ Coding queue
          </Text>
        </Pressable>
      </Link>
      <Text variant="title" weight="bold" role="heading" aria-level={1} testID="review-patient">
        {patientName(r.study.patient)}
      </Text>
      <Text variant="caption" tone="muted">
        MRN {r.study.patient.mrn} · {r.study.accession} · {r.study.operatorName ?? 'no physician recorded'} · procedure {formatDateTime(r.study.procedureStartedAt)}
      </Text>
      <View style={styles.statusRow} aria-live="polite">
        <View style={[styles.badge, r.status === 'coded' ? styles.badgeDone : styles.badgeOpen]} testID="review-status">
          <Text variant="caption" weight="semibold">
            {reviewStatusLabel[r.status]}
          </Text>
        </View>
        <Text variant="caption" tone="muted">
          Report version {r.report.versionNo}
          {r.report.status === 'amended' ? ' (addendum)' : ''} signed by {r.report.signerName}, {formatDateTime(r.report.signedAt)}
          {r.completedAt ? ` · coded by ${r.completedBy}, ${formatDateTime(r.completedAt)}` : ''}
        </Text>
      </View>
    </View>
  );
}

function Codes({ review: r, mayReview }: { review: ReviewView; mayReview: boolean }) {
  const complete = useCompleteReview(r.study.id);
  const [completeError, setCompleteError] = useState<string | null>(null);
  const blocking = r.set.warnings.filter((w) => w.blocking);
  const other = r.set.warnings.filter((w) => !w.blocking);
  return (
    <View style={styles.stack}>
      <View style={styles.caution} testID="review-caution" accessibilityRole="summary">
        <Text variant="caption">
          <Text variant="caption" weight="semibold">
            Decision support for a certified coder.{' '}
          </Text>
          {r.set.caution}
        </Text>
        {r.set.codeSets && typeof r.set.codeSets === 'object' && 'CPT' in r.set.codeSets ? (
          <Text variant="caption" tone="muted">
            Checked against {codeSystems.map((s) => (r.set.codeSets as Record<string, { label?: string }>)[s]?.label).filter(Boolean).join(', ')}.
          </Text>
        ) : null}
      </View>

      {r.changes ? <Changes changes={r.changes} /> : null}

      {blocking.length ? (
        <View style={[styles.box, styles.boxAbnormal]} testID="review-blocking" role="alert">
          <Text weight="semibold" tone="abnormal">
            ▲ To resolve in the study before the review can be completed
          </Text>
          {blocking.map((w) => (
            <Text key={w.code} variant="caption">
              • {w.message}
            </Text>
          ))}
        </View>
      ) : null}
      {other.length ? (
        <View style={styles.box} testID="review-warnings">
          <Text weight="semibold" role="heading" aria-level={2}>
            Warnings
          </Text>
          {other.map((w, i) => (
            <Text key={`${w.code}-${i}`} variant="caption" testID={`warning-${w.code}`}>
              • {w.message}
            </Text>
          ))}
        </View>
      ) : null}

      <Text variant="lead" weight="bold" role="heading" aria-level={2}>
        Codes
      </Text>
      {r.lines.length === 0 ? (
        <Text tone="muted" testID="review-no-codes">
          No code was suggested{r.set.failure ? ': the signed record could not be read for coding.' : '.'} {mayReview ? 'Add the codes this session needs below.' : ''}
        </Text>
      ) : null}
      <View role="list" style={styles.stack} testID="review-lines">
        {r.lines.map((l) => (
          <CodeCard key={l.id} line={l} review={r} mayReview={mayReview} />
        ))}
      </View>

      {mayReview ? <AddCode review={r} /> : null}

      {mayReview ? (
        <View style={styles.box}>
          {r.blockers.length ? (
            <View testID="review-blockers">
              {r.blockers.map((b) => (
                <Text key={b} variant="caption" tone="muted">
                  • {b}
                </Text>
              ))}
            </View>
          ) : (
            <Text variant="caption" tone="muted">
              Every code has a decision. Completing records your name and the time and takes the study off the queue.
            </Text>
          )}
          {completeError ? (
            <Text variant="caption" tone="abnormal" role="alert">
              ▲ {completeError}
            </Text>
          ) : null}
          <Button
            label="Complete review"
            testID="review-complete"
            disabled={r.blockers.length > 0 || complete.isPending}
            onPress={() =>
              complete.mutate({ setId: r.set.id }, { onSuccess: () => setCompleteError(null), onError: (e) => setCompleteError(e.message) })
            }
          />
        </View>
      ) : null}
    </View>
  );
}

function Changes({ changes }: { changes: NonNullable<ReviewView['changes']> }) {
  const label: Record<CodeChange['kind'], string> = { new: 'New', changed: 'Changed', dropped: 'No longer suggested', unchanged: 'Unchanged' };
  const shown = changes.codes.filter((c) => c.kind !== 'unchanged');
  return (
    <View style={[styles.box, styles.boxAccent]} testID="review-changes">
      <Text weight="semibold" role="heading" aria-level={2}>
        Changed since version {changes.previousVersionNo}
      </Text>
      <Text variant="caption">
        {changes.inputChanges.length ? `The addendum changed: ${changes.inputChanges.join(', ')}.` : 'The addendum changed nothing the codes depend on.'} Compared with the codes decided for version{' '}
        {changes.previousVersionNo}:
      </Text>
      {shown.length === 0 ? (
        <Text variant="caption" tone="muted">
          The same codes are suggested.
        </Text>
      ) : (
        shown.map((c) => (
          <Text key={`${c.kind}-${c.system}-${c.code}`} variant="caption" testID={`change-${c.kind}-${c.code}`}>
            • {label[c.kind]}: {c.system} {c.after ? lineLabel(c.after) : lineLabel(c.before!)}
            {c.kind === 'changed' ? ` (was ${lineLabel(c.before!)})` : ''}
          </Text>
        ))
      )}
    </View>
  );
}

type Mode = 'view' | 'edit' | 'reject';

function CodeCard({ line: l, review: r, mayReview }: { line: ReviewLine; review: ReviewView; mayReview: boolean }) {
  const decide = useDecideCode(r.study.id);
  const [mode, setMode] = useState<Mode>('view');
  const [code, setCode] = useState(l.final?.code ?? l.code);
  const [units, setUnits] = useState(String(l.final?.units ?? l.units));
  const [modifiers, setModifiers] = useState((l.final?.modifiers ?? l.modifiers).join(', '));
  const [reason, setReason] = useState('');
  const [problems, setProblems] = useState<Problems>({});
  const name = `${l.system} ${lineLabel(l)}`;
  const tid = `code-${[l.code, ...l.modifiers].join('-')}`;
  const decision = l.decision?.decision;

  const send = (body: Parameters<typeof decide.mutate>[0]) =>
    decide.mutate(body, {
      onSuccess: () => {
        setMode('view');
        setProblems({});
        setReason('');
      },
      onError: (e) => setProblems(problemsOf(e)),
    });

  const saveEdit = () => {
    const n = Number(units);
    const line = { system: l.system, code: code.trim().toUpperCase(), units: n, modifiers: parseModifiers(modifiers) };
    const local: Problems = {};
    for (const p of checkCodeLine(line)) local[p.field] = local[p.field] ?? p.message;
    if (reason.trim().length < 3) local.reason = 'Say why the code is edited.';
    setProblems(local);
    if (Object.keys(local).length) return;
    send({ decision: 'edit', setId: r.set.id, lineId: l.id, ...line, reason: reason.trim() });
  };
  const saveReject = () => {
    if (reason.trim().length < 3) return setProblems({ reason: 'Say why the code is rejected.' });
    send({ decision: 'reject', setId: r.set.id, lineId: l.id, reason: reason.trim() });
  };

  return (
    <View role="listitem" aria-label={name} style={[styles.card, decision === 'reject' && styles.cardRejected]} testID={tid}>
      <View style={styles.cardHead}>
        <View style={styles.codeTitle}>
          <Text variant="lead" weight="bold" style={decision === 'reject' || decision === 'edit' ? styles.struck : undefined} aria-label={decision === 'edit' ? `Suggested ${name}, edited` : undefined}>
            {l.system} {lineLabel(l)}
          </Text>
          {l.addOn ? (
            <View style={styles.tag}>
              <Text variant="caption" weight="medium">
                Add-on
              </Text>
            </View>
          ) : null}
          {l.origin === 'added' ? (
            <View style={styles.tag}>
              <Text variant="caption" weight="medium">
                Added by the coder
              </Text>
            </View>
          ) : null}
        </View>
        <DecisionBadge line={l} testID={`${tid}-decision`} />
      </View>
      {l.description ? <Text variant="caption">{l.description}</Text> : null}
      {l.rationale ? (
        <Text variant="caption" testID={`${tid}-rationale`}>
          <Text variant="caption" weight="semibold">
            Why:{' '}
          </Text>
          {l.rationale}
        </Text>
      ) : null}
      {l.ruleId ? (
        <Text variant="caption" tone="faint">
          Rule {l.ruleId} · {l.codeSet} · {l.source}
        </Text>
      ) : null}
      {decision === 'edit' && l.final ? (
        <View style={styles.finalBox} testID={`${tid}-final`}>
          <Text weight="bold">
            Reported as {l.system} {lineLabel(l.final)}
          </Text>
          <Text variant="caption" tone="muted">
            Edited: {l.decision!.reason}
          </Text>
        </View>
      ) : null}
      {(decision === 'reject' || decision === 'add') && l.decision?.reason ? (
        <Text variant="caption" tone="muted">
          {decision === 'reject' ? 'Rejected' : 'Added'}: {l.decision.reason}
        </Text>
      ) : null}

      {mayReview && mode === 'view' ? (
        <View style={styles.actions}>
          {l.origin === 'suggested' ? (
            <Button
              label={decision === 'accept' ? 'Accepted' : 'Accept'}
              accessibilityLabel={`Accept ${name}`}
              testID={`${tid}-accept`}
              disabled={decide.isPending || decision === 'accept'}
              onPress={() => send({ decision: 'accept', setId: r.set.id, lineId: l.id })}
            />
          ) : null}
          <Button label="Edit" kind="secondary" accessibilityLabel={`Edit ${name}`} testID={`${tid}-edit`} onPress={() => setMode('edit')} />
          <Button label="Reject" kind="secondary" accessibilityLabel={`Reject ${name}`} testID={`${tid}-reject`} disabled={decision === 'reject'} onPress={() => setMode('reject')} />
        </View>
      ) : null}

      {mayReview && mode === 'edit' ? (
        <View style={styles.form} role="group" aria-label={`Edit ${name}`}>
          <View style={styles.fieldRow}>
            <Field label={`${l.system} code`} value={code} onChange={setCode} error={problems.code} testID={`${tid}-edit-code`} inRow autoFocus />
            <Field label="Units" value={units} onChange={setUnits} error={problems.units} testID={`${tid}-edit-units`} inRow numeric />
            <Field label="Modifiers" hint="Separated by commas, e.g. 26, XU" value={modifiers} onChange={setModifiers} error={problems.modifiers} testID={`${tid}-edit-modifiers`} inRow />
          </View>
          <Field label="Reason for the edit" value={reason} onChange={setReason} error={problems.reason} testID={`${tid}-edit-reason`} multiline />
          <FormError message={problems.form} />
          <View style={styles.actions}>
            <Button label="Save the edit" testID={`${tid}-edit-save`} disabled={decide.isPending} onPress={saveEdit} />
            <Button label="Cancel" kind="secondary" testID={`${tid}-edit-cancel`} onPress={() => (setMode('view'), setProblems({}))} />
          </View>
        </View>
      ) : null}

      {mayReview && mode === 'reject' ? (
        <View style={styles.form} role="group" aria-label={`Reject ${name}`}>
          <Field label="Reason for rejecting" value={reason} onChange={setReason} error={problems.reason} testID={`${tid}-reject-reason`} multiline autoFocus />
          <FormError message={problems.form} />
          <View style={styles.actions}>
            <Button label="Reject the code" testID={`${tid}-reject-save`} disabled={decide.isPending} onPress={saveReject} />
            <Button label="Cancel" kind="secondary" testID={`${tid}-reject-cancel`} onPress={() => (setMode('view'), setProblems({}))} />
          </View>
        </View>
      ) : null}
    </View>
  );
}

function DecisionBadge({ line: l, testID }: { line: ReviewLine; testID: string }) {
  const d = l.decision?.decision;
  const text = !d ? 'Awaiting decision' : d === 'accept' ? '✓ Accepted' : d === 'edit' ? '✎ Edited' : d === 'reject' ? '✕ Rejected' : '+ Added';
  return (
    <View style={[styles.badge, !d ? styles.badgeOpen : d === 'reject' ? styles.badgeRejected : styles.badgeDone]} testID={testID}>
      <Text variant="caption" weight="semibold">
        {text}
      </Text>
    </View>
  );
}

function AddCode({ review: r }: { review: ReviewView }) {
  const add = useAddCode(r.study.id);
  const [open, setOpen] = useState(false);
  const [system, setSystem] = useState<CodeSystem>('CPT');
  const [code, setCode] = useState('');
  const [units, setUnits] = useState('1');
  const [modifiers, setModifiers] = useState('');
  const [reason, setReason] = useState('');
  const [problems, setProblems] = useState<Problems>({});
  if (!open) return <Button label="Add a code" kind="secondary" testID="add-code-open" onPress={() => setOpen(true)} />;
  const save = () => {
    const line = { system, code: code.trim().toUpperCase(), units: Number(units), modifiers: parseModifiers(modifiers) };
    const local: Problems = {};
    for (const p of checkCodeLine(line)) local[p.field] = local[p.field] ?? p.message;
    if (reason.trim().length < 3) local.reason = 'Say why the code is added.';
    setProblems(local);
    if (Object.keys(local).length) return;
    add.mutate(
      { setId: r.set.id, ...line, reason: reason.trim() },
      {
        onSuccess: () => {
          setOpen(false);
          setCode('');
          setUnits('1');
          setModifiers('');
          setReason('');
          setProblems({});
        },
        onError: (e) => setProblems(problemsOf(e)),
      },
    );
  };
  return (
    <View style={[styles.card, styles.form]} role="group" aria-label="Add a code" testID="add-code">
      <Text weight="semibold" role="heading" aria-level={3}>
        Add a code the suggestions missed
      </Text>
      <View style={styles.actions} role="radiogroup" aria-label="Code system">
        {codeSystems.map((s) => (
          <Pressable key={s} role="radio" aria-checked={system === s} accessibilityLabel={s} testID={`add-code-system-${s}`} onPress={() => setSystem(s)} style={[styles.chip, system === s && styles.chipSelected]}>
            <Text variant="caption" weight={system === s ? 'semibold' : 'regular'} tone={system === s ? 'onBrand' : 'ink'}>
              {s}
            </Text>
          </Pressable>
        ))}
      </View>
      <View style={styles.fieldRow}>
        <Field label={`${system} code`} value={code} onChange={setCode} error={problems.code} testID="add-code-code" inRow autoFocus />
        <Field label="Units" value={units} onChange={setUnits} error={problems.units} testID="add-code-units" inRow numeric />
        <Field label="Modifiers" hint="Separated by commas" value={modifiers} onChange={setModifiers} error={problems.modifiers} testID="add-code-modifiers" inRow />
      </View>
      <Field label="Reason for adding it" value={reason} onChange={setReason} error={problems.reason} testID="add-code-reason" multiline />
      <FormError message={problems.form} />
      <View style={styles.actions}>
        <Button label="Add the code" testID="add-code-save" disabled={add.isPending} onPress={save} />
        <Button label="Cancel" kind="secondary" testID="add-code-cancel" onPress={() => (setOpen(false), setProblems({}))} />
      </View>
    </View>
  );
}

function Field({
  label,
  value,
  onChange,
  error,
  hint,
  testID,
  numeric = false,
  multiline = false,
  autoFocus = false,
  inRow = false,
}: {
  label: string;
  value: string;
  onChange: (v: string) => void;
  error?: string;
  hint?: string;
  testID: string;
  numeric?: boolean;
  multiline?: boolean;
  autoFocus?: boolean;
  /** Sits in a wrapping row of fields (shares the width); otherwise it takes the form's width. */
  inRow?: boolean;
}) {
  return (
    <View style={[styles.field, inRow && styles.fieldInRow]}>
      <Text variant="caption" weight="medium" nativeID={`${testID}-label`}>
        {label}
      </Text>
      <TextInput
        testID={testID}
        accessibilityLabel={label}
        aria-invalid={!!error}
        aria-describedby={error || hint ? `${testID}-help` : undefined}
        value={value}
        onChangeText={onChange}
        autoFocus={autoFocus}
        autoCapitalize={numeric || multiline ? 'none' : 'characters'}
        inputMode={numeric ? 'numeric' : 'text'}
        keyboardType={numeric ? 'number-pad' : 'default'}
        multiline={multiline}
        numberOfLines={multiline ? 3 : 1}
        style={[styles.input, multiline && styles.multiline, error ? styles.inputBad : null]}
      />
      {error ? (
        <Text variant="caption" tone="abnormal" role="alert" nativeID={`${testID}-help`} testID={`${testID}-error`}>
          ▲ {error}
        </Text>
      ) : hint ? (
        <Text variant="caption" tone="faint" nativeID={`${testID}-help`}>
          {hint}
        </Text>
      ) : null}
    </View>
  );
}

function FormError({ message }: { message?: string }) {
  if (!message) return null;
  return (
    <Text variant="caption" tone="abnormal" role="alert">
      ▲ {message}
    </Text>
  );
}

/**
 * The signed report: beside the codes (its own scrolling box, kept in view) on a wide screen; in the
 * page's flow, whole, below the codes on a phone. Its plain text is laid out in fixed-width columns,
 * shown in a fixed-width font where the pane is wide enough for them.
 */
function Report({ review: r, beside, fixedWidth }: { review: ReviewView; beside: boolean; fixedWidth: boolean }) {
  const text = (
    <Text variant="caption" selectable style={fixedWidth ? styles.narrative : undefined} testID="review-report-text">
      {r.report.narrativeText}
    </Text>
  );
  return (
    <View style={[styles.box, styles.report]} testID="review-report">
      <Text weight="semibold" role="heading" aria-level={2}>
        Signed report, version {r.report.versionNo}
      </Text>
      {r.report.reason ? (
        <Text variant="caption" tone="muted">
          Addendum: {r.report.reason}
        </Text>
      ) : null}
      {beside ? (
        <ScrollView style={styles.reportScroll} nestedScrollEnabled>
          {text}
        </ScrollView>
      ) : (
        text
      )}
    </View>
  );
}

const styles = StyleSheet.create({
  header: { gap: space.xs },
  back: { minHeight: touchTarget, justifyContent: 'center', alignSelf: 'flex-start' },
  statusRow: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', gap: space.sm },
  panes: { flexDirection: 'row', gap: space.xl, alignItems: 'flex-start' },
  codesPane: { flex: 3, minWidth: 0 },
  reportPane: { flex: 2, minWidth: 0 },
  half: { flex: 1 },
  stack: { gap: space.md },
  caution: { borderLeftWidth: 3, borderLeftColor: color.accent, backgroundColor: color.accentSoft, borderRadius: radius.sm, padding: space.md, gap: space.xs },
  box: { backgroundColor: color.surface, borderRadius: radius.lg, borderWidth: 1, borderColor: color.line, padding: space.lg, gap: space.sm },
  boxAbnormal: { borderColor: color.abnormal, backgroundColor: color.abnormalSoft },
  boxAccent: { borderColor: color.accent },
  card: { backgroundColor: color.surface, borderRadius: radius.lg, borderWidth: 1, borderColor: color.line, padding: space.lg, gap: space.sm },
  cardRejected: { backgroundColor: color.surfaceSunken },
  cardHead: { flexDirection: 'row', flexWrap: 'wrap', justifyContent: 'space-between', alignItems: 'center', gap: space.sm },
  codeTitle: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', gap: space.sm },
  struck: { textDecorationLine: 'line-through' },
  tag: { borderRadius: radius.pill, paddingHorizontal: space.sm, paddingVertical: space.xxs, backgroundColor: color.brandSoft },
  badge: { borderRadius: radius.pill, paddingHorizontal: space.md, paddingVertical: space.xs },
  badgeOpen: { backgroundColor: color.borderlineSoft },
  badgeDone: { backgroundColor: color.normalSoft },
  badgeRejected: { backgroundColor: color.abnormalSoft },
  actions: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
  form: { gap: space.md, paddingTop: space.sm },
  fieldRow: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md },
  field: { gap: space.xs },
  // Only inside a row: a flex basis in the form's column would be a height, and the card would not hold its buttons.
  fieldInRow: { flexGrow: 1, flexBasis: 140 },
  input: { minHeight: touchTarget, borderWidth: 1, borderColor: color.inkFaint, borderRadius: radius.md, backgroundColor: color.surface, paddingHorizontal: space.md, fontFamily: font.regular, fontSize: type.body.fontSize, color: color.ink },
  multiline: { minHeight: 80, paddingVertical: space.sm, textAlignVertical: 'top' },
  inputBad: { borderColor: color.abnormal, borderWidth: 2 },
  chip: { minHeight: touchTarget, justifyContent: 'center', paddingHorizontal: space.md, borderRadius: radius.md, borderWidth: 1, borderColor: color.line, backgroundColor: color.surface },
  chipSelected: { backgroundColor: color.brand, borderColor: color.brand },
  finalBox: { borderLeftWidth: 3, borderLeftColor: color.brand, paddingLeft: space.sm, gap: space.xxs },
  report: {},
  narrative: { fontFamily: Platform.select({ web: 'ui-monospace, Menlo, Consolas, "Liberation Mono", monospace', ios: 'Menlo', default: 'monospace' }), fontSize: 12, lineHeight: 17 },
  reportScroll: { maxHeight: Platform.OS === 'web' ? ('calc(100vh - 160px)' as unknown as number) : 640 },
});

/** On the web the report stays in view beside the codes while the coder scrolls through them. */
const stickyOnWeb = (Platform.OS === 'web' ? { position: 'sticky', top: space.lg } : {}) as unknown as ViewStyle;
