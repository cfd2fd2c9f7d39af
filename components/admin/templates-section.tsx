import { useState } from 'react';
import { ScrollView, StyleSheet, View } from 'react-native';
import { ApiError } from '../data/api';
import { useActivateTemplate, useTemplateVersionQuery, useTemplateVersionsQuery } from '../data/admin-query';
import { SectionCard } from '../study/section-card';
import { EmptyState, ErrorState, LoadingState } from '../ui/async-states';
import { Button } from '../ui/button';
import { Text } from '../ui/text';
import { color, radius, space } from '../theme';

/** The report template versions shipped: view one, activate it for new signatures. */
export function TemplatesSection() {
  const list = useTemplateVersionsQuery();
  const activate = useActivateTemplate();
  const [viewing, setViewing] = useState<string | null>(null);
  return (
    <SectionCard title="Report templates" testID="admin-templates">
      <Text tone="muted">Previews and new signatures use the active version. A signed report keeps the version it was signed with.</Text>
      {list.isPending ? (
        <LoadingState label="Loading template versions…" testID="templates-loading" />
      ) : list.isError ? (
        <ErrorState title="Template versions could not be loaded" detail={list.error.message} onRetry={() => void list.refetch()} testID="templates-error" />
      ) : list.data.versions.length === 0 ? (
        <EmptyState title="No template versions are shipped" testID="templates-empty" />
      ) : (
        <View role="list" style={styles.list}>
          {list.data.versions.map((v, i) => {
            const active = v.version === list.data.active;
            return (
              <View key={v.version} role="listitem" style={[styles.row, i > 0 && styles.divider]} testID={`template-${v.version}`}>
                <View style={styles.grow}>
                  <Text weight="semibold">
                    {v.version}
                    {active ? ' · active' : ''}
                  </Text>
                  <Text variant="caption" tone="muted">
                    {v.description ?? 'No description.'} {v.files} files.
                  </Text>
                </View>
                <View style={styles.actions}>
                  <Button testID={`template-view-${v.version}`} kind="secondary" label={viewing === v.version ? 'Hide' : 'View'} onPress={() => setViewing(viewing === v.version ? null : v.version)} />
                  {active ? null : (
                    <Button testID={`template-activate-${v.version}`} label={`Activate ${v.version}`} disabled={activate.isPending} onPress={() => activate.mutate(v.version)} />
                  )}
                </View>
              </View>
            );
          })}
        </View>
      )}
      {activate.error ? (
        <Text tone="abnormal" role="alert" testID="template-activate-error">
          ▲ {activate.error instanceof ApiError ? activate.error.message : String(activate.error)}
        </Text>
      ) : null}
      {viewing ? <TemplateSources version={viewing} /> : null}
    </SectionCard>
  );
}

function TemplateSources({ version }: { version: string }) {
  const detail = useTemplateVersionQuery(version);
  const [medium, setMedium] = useState<'text' | 'html'>('text');
  if (detail.isPending) return <LoadingState label={`Loading ${version}…`} testID="template-loading" />;
  if (detail.isError) return <ErrorState title={`${version} could not be loaded`} detail={detail.error.message} testID="template-load-error" />;
  const files = detail.data.sources.filter((f) => f.medium === medium);
  return (
    <View style={styles.sources} testID={`template-sources-${version}`}>
      <View style={styles.actions}>
        <Button testID="template-medium-text" kind={medium === 'text' ? 'primary' : 'secondary'} label="Plain text" onPress={() => setMedium('text')} />
        <Button testID="template-medium-html" kind={medium === 'html' ? 'primary' : 'secondary'} label="HTML" onPress={() => setMedium('html')} />
      </View>
      {files.map((f) => (
        <View key={`${f.medium}/${f.name}`} style={styles.file}>
          <Text variant="caption" weight="semibold">
            {version}/{f.medium}/{f.name}
          </Text>
          <ScrollView horizontal>
            <Text style={styles.code} selectable>
              {f.text}
            </Text>
          </ScrollView>
        </View>
      ))}
    </View>
  );
}

const styles = StyleSheet.create({
  list: { borderRadius: radius.md, borderWidth: 1, borderColor: color.line },
  row: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md, padding: space.md, alignItems: 'center' },
  divider: { borderTopWidth: 1, borderTopColor: color.line },
  grow: { flexGrow: 1, flexBasis: 240, gap: space.xxs, minWidth: 0 },
  actions: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
  sources: { gap: space.md },
  file: { gap: space.xs, backgroundColor: color.surfaceSunken, borderRadius: radius.md, padding: space.md },
  code: { fontFamily: 'monospace', fontSize: 12, lineHeight: 18 },
});
