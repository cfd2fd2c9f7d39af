import { useMemo } from 'react';
import { StyleSheet, View } from 'react-native';
import { useWatch, useFormContext } from 'react-hook-form';
import {
  analyzeStudy,
  formatQuantity,
  imrMethodLabel,
  indexLabel,
  nhprKindLabel,
  vasoreactivityLabel,
  type Flag,
  type PhysiologyResult,
  type QuantityKind,
  type Thresholds,
  type VesselResult,
} from '../../shared/physiology';
import type { StudySections } from '../../shared/study/schema';
import { toPhysiologyInput } from '../../shared/study/to-physiology';
import { useThresholds } from '../data/thresholds-query';
import { Text } from '../ui/text';
import { CautionNote } from '../caution-note';
import { color, radius, space } from '../theme';
import { reportKindOf } from '../../shared/report/kind';
import { FlagBadge } from './flag-badge';

export interface LiveAnalysis {
  result: PhysiologyResult | null;
  problem: string | null;
  thresholds: Thresholds;
}

/**
 * Runs the physiology core on what is in the form right now, with the lab's thresholds in force.
 * Values the core could not accept are left out by the mapping, so one bad box does not blank the rest.
 */
export function useLiveAnalysis(): LiveAnalysis {
  const { control } = useFormContext<StudySections>();
  const vessels = useWatch({ control, name: 'vessels' });
  const vasoreactivity = useWatch({ control, name: 'vasoreactivity' });
  const setup = useWatch({ control, name: 'setup' });
  const anginaPresent = useWatch({ control, name: 'details.anginaPresent' });
  const { overrides, values } = useThresholds();
  return useMemo(() => {
    try {
      const input = toPhysiologyInput({
        vessels: vessels ?? [],
        vasoreactivity: vasoreactivity ?? { doses: [], nitrateReversal: null, reversalNitroglycerinMicrograms: null, reversalNitroglycerinAt: null },
        setup,
        details: { anginaPresent: anginaPresent ?? null },
      });
      return { result: analyzeStudy({ ...input, thresholds: overrides }), problem: null, thresholds: values };
    } catch (error) {
      const issues = (error as { issues?: { message: string }[] }).issues;
      return { result: null, problem: issues?.[0]?.message ?? 'Some values cannot be used yet.', thresholds: values };
    }
  }, [vessels, vasoreactivity, setup, anginaPresent, overrides, values]);
}

/** One index: its value at the display precision, its flag, and a note. No flag means no verdict. */
function Index({ label, value, kind, unit, flag, note, testID }: { label: string; value?: number; kind: QuantityKind; unit?: string; flag?: Flag; note?: string; testID: string }) {
  if (value === undefined) return null;
  const shown = formatQuantity(value, kind);
  return (
    <View style={styles.index} testID={testID} accessibilityLabel={`${label} ${shown}${unit ? ` ${unit}` : ''}${flag ? `, ${flag}` : ', not judged'}${note ? `, ${note}` : ''}`}>
      <Text variant="caption" tone="muted">
        {label}
      </Text>
      <Text variant="title" weight="bold" testID={`${testID}-value`}>
        {shown}
        {unit ? <Text variant="caption" tone="muted">{` ${unit}`}</Text> : null}
      </Text>
      {flag ? (
        <FlagBadge flag={flag} testID={`${testID}-flag`} />
      ) : (
        <Text variant="caption" tone="muted" testID={`${testID}-unjudged`}>
          Not judged
        </Text>
      )}
      {note ? (
        <Text variant="caption" tone="faint">
          {note}
        </Text>
      ) : null}
    </View>
  );
}

/** A vessel's computed and entered indices, flags and quality warnings. */
export function VesselResults({ result, testID }: { result: VesselResult | undefined; testID: string }) {
  if (!result) return null;
  const any = [result.ffr, result.restingPdPa, result.nhpr, result.cfr, result.imr, result.rrr, result.mrr].some((v) => v !== undefined);
  const ffrNotes = [result.ffrSource === 'entered' ? 'from the console' : '', result.ffrGreyZone ? 'grey zone' : ''].filter(Boolean).join('; ');
  return (
    <View style={styles.results} testID={testID} aria-live="polite">
      {any ? (
        <View style={styles.indices}>
          <Index label={indexLabel.ffr} value={result.ffr} kind="ratio" flag={result.ffrFlag} testID={`${testID}-ffr`} note={ffrNotes || undefined} />
          <Index label={indexLabel.restingPdPa} value={result.restingPdPa} kind="ratio" flag={result.restingPdPaFlag} testID={`${testID}-resting`} />
          <Index
            label={result.nhprKind ? nhprKindLabel[result.nhprKind] : indexLabel.nhpr}
            value={result.nhpr}
            kind="ratio"
            flag={result.nhprFlag}
            testID={`${testID}-nhpr`}
            note="from the console"
          />
          <Index label={indexLabel.cfr} value={result.cfr} kind="ratio" flag={result.cfrFlag} testID={`${testID}-cfr`} />
          <Index label={indexLabel.imr} value={result.imr} kind="imr" unit="U" flag={result.imrFlag} testID={`${testID}-imr`} note={result.imrMethod ? imrMethodLabel[result.imrMethod] : undefined} />
          <Index label={indexLabel.rrr} value={result.rrr} kind="ratio" flag={result.rrrFlag} testID={`${testID}-rrr`} />
          <Index
            label={indexLabel.mrr}
            value={result.mrr}
            kind="ratio"
            flag={result.mrrFlag}
            testID={`${testID}-mrr`}
            note={result.mrrMethod === 'bolus-thermodilution' ? 'bolus thermodilution' : undefined}
          />
        </View>
      ) : (
        <Text variant="caption" tone="muted">
          Indices appear here as pressures and transit times are entered.
        </Text>
      )}
      {result.warnings.map((w) => (
        <View key={w.code + w.message} style={styles.warning} testID={`${testID}-warning-${w.code}`} role="alert">
          <Text variant="caption" weight="medium" style={{ color: color.borderline }}>
            ⚠ {w.message}
          </Text>
        </View>
      ))}
    </View>
  );
}

/**
 * The study's result: the headline (every coexisting finding, with any quality caveat), the
 * acetylcholine result once, the rules that produced it, and the standing caution right beside it.
 */
export function StudyResults({ testID = 'study-results' }: { testID?: string }) {
  const { result, problem } = useLiveAnalysis();
  const { control } = useFormContext<StudySections>();
  // The same rule as the report's: a lesion study speaks of the lesions and the decision, not of an endotype.
  const [clinicalQuestion, vessels, doses] = useWatch({ control, name: ['details.clinicalQuestion', 'vessels', 'vasoreactivity.doses'] });
  const lesion = reportKindOf({ details: { clinicalQuestion: clinicalQuestion ?? null }, vessels: vessels ?? [], vasoreactivity: { doses: doses ?? [] } }) === 'lesion';
  const reasons = result ? (lesion ? result.reasons.filter((r) => !r.startsWith('Endotype:')) : result.reasons) : [];
  return (
    <View style={styles.panel} testID={testID}>
      <Text variant="caption" weight="semibold" tone="muted">
        {lesion ? 'LIVE RESULT · LESION ASSESSMENT' : 'LIVE RESULT'}
      </Text>
      {problem ? (
        <Text tone="abnormal" testID={`${testID}-problem`}>
          ▲ {problem}
        </Text>
      ) : result ? (
        <>
          <Text variant="title" weight="bold" testID={`${testID}-headline`}>
            {result.headline}
          </Text>
          <CautionNote testID={`${testID}-caution`} />
          {result.vasoreactivity ? (
            <Text variant="caption" weight="medium" testID={`${testID}-acetylcholine`}>
              Acetylcholine test: {vasoreactivityLabel[result.vasoreactivity.result].toLowerCase()}
            </Text>
          ) : null}
          {reasons.length ? (
            <View style={styles.reasons} role="list">
              {reasons.map((r) => (
                <Text key={r} variant="caption" tone="muted" role="listitem">
                  • {r}
                </Text>
              ))}
            </View>
          ) : null}
        </>
      ) : (
        <CautionNote testID={`${testID}-caution`} />
      )}
    </View>
  );
}

const styles = StyleSheet.create({
  results: { gap: space.sm, backgroundColor: color.surfaceSunken, borderRadius: radius.md, padding: space.md },
  indices: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md },
  index: { minWidth: 96, gap: 2 },
  warning: { backgroundColor: color.borderlineSoft, borderRadius: radius.sm, padding: space.sm },
  panel: { gap: space.md, backgroundColor: color.surface, borderRadius: radius.lg, borderWidth: 1, borderColor: color.line, padding: space.lg },
  reasons: { gap: space.xs },
});
