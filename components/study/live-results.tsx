import { useMemo } from 'react';
import { StyleSheet, View } from 'react-native';
import { useWatch, useFormContext } from 'react-hook-form';
import { analyzeStudy, type PhysiologyResult, type VesselResult } from '../../shared/physiology';
import type { StudySections } from '../../shared/study/schema';
import { toPhysiologyInput } from '../../shared/study/to-physiology';
import { Text } from '../ui/text';
import { CautionNote } from '../caution-note';
import { color, radius, space } from '../theme';
import { FlagBadge } from './flag-badge';

const imrMethodLabel = { 'pd-tmn': 'Pd × Tmn', wedge: 'wedge-corrected', yong: 'corrected without wedge' } as const;

const endotypeLabel: Record<PhysiologyResult['endotype'], string> = {
  obstructive: 'Obstructive coronary disease',
  'microvascular-angina': 'Microvascular angina',
  'vasospastic-angina': 'Vasospastic angina',
  mixed: 'Microvascular and vasospastic angina',
  'no-abnormality': 'No coronary abnormality found',
  inconclusive: 'Not enough data for an endotype',
};

/** Runs the physiology core on what is in the form right now; invalid entries pause the results. */
export function useLiveAnalysis(): { result: PhysiologyResult | null; problem: string | null } {
  const { control } = useFormContext<StudySections>();
  const vessels = useWatch({ control, name: 'vessels' });
  const vasoreactivity = useWatch({ control, name: 'vasoreactivity' });
  return useMemo(() => {
    try {
      return { result: analyzeStudy(toPhysiologyInput({ vessels: vessels ?? [], vasoreactivity: vasoreactivity ?? { doses: [], nitrateReversal: null } })), problem: null };
    } catch (error) {
      const issues = (error as { issues?: { message: string }[] }).issues;
      return { result: null, problem: issues?.[0]?.message ?? 'Some values cannot be used yet.' };
    }
  }, [vessels, vasoreactivity]);
}

const fmt = (v: number | undefined, digits: number) => (v === undefined ? '—' : v.toFixed(digits));

function Index({ label, value, digits, unit, flag, note, testID }: { label: string; value?: number; digits: number; unit?: string; flag?: VesselResult['ffrFlag']; note?: string; testID: string }) {
  if (value === undefined) return null;
  return (
    <View style={styles.index} testID={testID} accessibilityLabel={`${label} ${fmt(value, digits)}${unit ? ` ${unit}` : ''}${flag ? `, ${flag}` : ''}${note ? `, ${note}` : ''}`}>
      <Text variant="caption" tone="muted">
        {label}
      </Text>
      <Text variant="title" weight="bold" testID={`${testID}-value`}>
        {fmt(value, digits)}
        {unit ? <Text variant="caption" tone="muted">{` ${unit}`}</Text> : null}
      </Text>
      {flag ? <FlagBadge flag={flag} testID={`${testID}-flag`} /> : null}
      {note ? (
        <Text variant="caption" tone="faint">
          {note}
        </Text>
      ) : null}
    </View>
  );
}

/** A vessel's computed indices, flags and quality warnings. */
export function VesselResults({ result, testID }: { result: VesselResult | undefined; testID: string }) {
  if (!result) return null;
  const any = [result.ffr, result.restingPdPa, result.cfr, result.imr, result.rrr, result.mrr].some((v) => v !== undefined);
  return (
    <View style={styles.results} testID={testID} aria-live="polite">
      {any ? (
        <View style={styles.indices}>
          <Index label="FFR" value={result.ffr} digits={2} flag={result.ffrFlag} testID={`${testID}-ffr`} note={result.ffrSource === 'entered' ? 'from the console' : undefined} />
          <Index label="Resting Pd/Pa" value={result.restingPdPa} digits={2} flag={result.restingPdPaFlag} testID={`${testID}-resting`} />
          <Index label="CFR" value={result.cfr} digits={2} flag={result.cfrFlag} testID={`${testID}-cfr`} />
          <Index label="IMR" value={result.imr} digits={1} unit="U" flag={result.imrFlag} testID={`${testID}-imr`} note={result.imrMethod ? imrMethodLabel[result.imrMethod] : undefined} />
          <Index label="RRR" value={result.rrr} digits={2} flag={result.rrrFlag} testID={`${testID}-rrr`} />
          <Index label="MRR" value={result.mrr} digits={2} flag={result.mrrFlag} testID={`${testID}-mrr`} />
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

/** The study's endotype and the rules that produced it, with the standing caution. */
export function StudyResults({ testID = 'study-results' }: { testID?: string }) {
  const { result, problem } = useLiveAnalysis();
  return (
    <View style={styles.panel} testID={testID}>
      <Text variant="caption" weight="semibold" tone="muted">
        LIVE RESULT
      </Text>
      {problem ? (
        <Text tone="abnormal" testID={`${testID}-problem`}>
          ▲ {problem}
        </Text>
      ) : result ? (
        <>
          <Text variant="title" weight="bold" testID={`${testID}-endotype`}>
            {endotypeLabel[result.endotype]}
          </Text>
          {result.vasoreactivity ? (
            <Text variant="caption" weight="medium">
              Acetylcholine: {result.vasoreactivity.result.replace('-', ' ')}
            </Text>
          ) : null}
          <View style={styles.reasons} role="list">
            {result.reasons.map((r) => (
              <Text key={r} variant="caption" tone="muted" role="listitem">
                • {r}
              </Text>
            ))}
          </View>
        </>
      ) : null}
      <CautionNote testID={`${testID}-caution`} />
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
