import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import * as DocumentPicker from 'expo-document-picker';
import { useQueryClient } from '@tanstack/react-query';
import { SectionCard } from '../../study/section-card';
import { useStudyContext } from '../../study/study-context';
import { Button } from '../../ui/button';
import { ConfirmRemove } from '../../ui/confirm-remove';
import { EmptyState } from '../../ui/async-states';
import { Text } from '../../ui/text';
import { color, radius, space, touchTarget } from '../../theme';
import { formatDateTime } from '../../format';
import { ApiError } from '../../data/api';
import { deleteAttachmentRequest, studyKeys, uploadAttachment } from '../../data/study-query';
import type { AttachmentSummary, StudyRecord } from '../../../shared/study/schema';

const accepted = ['application/pdf', 'image/png', 'image/jpeg', 'text/csv'];
const sizeText = (n: number) => (n < 1024 ? `${n} B` : n < 1048576 ? `${(n / 1024).toFixed(0)} KB` : `${(n / 1048576).toFixed(1)} MB`);

/** Console printouts and exported traces. The server checks each file's type from its content. */
export default function AttachmentsSection() {
  const { study, locked } = useStudyContext();
  const queryClient = useQueryClient();
  const [items, setItems] = useState<AttachmentSummary[]>(study.attachments);
  const [progress, setProgress] = useState<{ name: string; fraction: number } | null>(null);
  const [message, setMessage] = useState<{ tone: 'ok' | 'error'; text: string } | null>(null);

  const remember = (next: AttachmentSummary[]) => {
    setItems(next);
    queryClient.setQueryData<StudyRecord>(studyKeys.detail(study.id), (s) => (s ? { ...s, attachments: next } : s));
  };

  const pick = async () => {
    setMessage(null);
    const picked = await DocumentPicker.getDocumentAsync({ type: accepted, multiple: false, copyToCacheDirectory: false });
    if (picked.canceled) return;
    const asset = picked.assets[0];
    const file: Blob | undefined = asset.file ?? (await fetch(asset.uri).then((r) => r.blob()).catch(() => undefined));
    if (!file) return setMessage({ tone: 'error', text: 'The file could not be read.' });
    setProgress({ name: asset.name, fraction: 0 });
    try {
      const saved = await uploadAttachment(study.id, file, asset.name, (fraction) => setProgress({ name: asset.name, fraction }));
      remember([...items, saved]);
      setMessage({ tone: 'ok', text: `Attached ${saved.fileName}.` });
    } catch (error) {
      setMessage({ tone: 'error', text: error instanceof ApiError ? (error.problem.detail ?? error.problem.title) : 'The upload failed.' });
    } finally {
      setProgress(null);
    }
  };

  const remove = async (a: AttachmentSummary) => {
    try {
      await deleteAttachmentRequest(a.id);
      remember(items.filter((x) => x.id !== a.id));
      setMessage({ tone: 'ok', text: `Removed ${a.fileName}.` });
    } catch (error) {
      setMessage({ tone: 'error', text: error instanceof ApiError ? (error.problem.detail ?? error.problem.title) : 'The file could not be removed.' });
    }
  };

  return (
    <SectionCard title="Attachments" testID="card-attachments">
      <Text variant="caption" tone="muted">
        Console printouts (PDF, PNG, JPEG) and exported traces (CSV). The file's content decides its type, not its name.
      </Text>
      {items.length === 0 ? <EmptyState title="Nothing attached" testID="attachments-empty" /> : null}
      <View role="list" style={styles.list}>
        {items.map((a) => (
          <View key={a.id} role="listitem" style={styles.item} testID={`attachment-${a.fileName}`}>
            <View style={styles.itemText}>
              <Text weight="semibold">{a.fileName}</Text>
              <Text variant="caption" tone="muted">
                {a.mediaType} · {sizeText(a.sizeBytes)} · {formatDateTime(a.uploadedAt)}
                {a.uploadedBy ? ` · ${a.uploadedBy}` : ''}
              </Text>
              <Text variant="caption" tone="faint" selectable>
                SHA-256 {a.sha256.slice(0, 16)}…
              </Text>
            </View>
            <View style={styles.itemActions}>
              <a href={`/api/attachments/${a.id}/content`} download={a.fileName} style={linkStyle} data-testid={`attachment-${a.fileName}-download`}>
                Download
              </a>
              {!locked ? <ConfirmRemove what={a.fileName} onConfirm={() => void remove(a)} testID={`attachment-${a.fileName}-remove`} /> : null}
            </View>
          </View>
        ))}
      </View>
      {progress ? (
        <View testID="upload-progress" accessibilityRole="progressbar" aria-valuenow={Math.round(progress.fraction * 100)} aria-valuemin={0} aria-valuemax={100}>
          <Text variant="caption">
            Uploading {progress.name}… {Math.round(progress.fraction * 100)}%
          </Text>
          <View style={styles.bar}>
            <View style={[styles.barFill, { width: `${Math.round(progress.fraction * 100)}%` }]} />
          </View>
        </View>
      ) : null}
      {message ? (
        <Text testID="attachment-message" role={message.tone === 'error' ? 'alert' : 'status'} tone={message.tone === 'error' ? 'abnormal' : 'ink'} weight="medium">
          {message.tone === 'error' ? '▲ ' : '✓ '}
          {message.text}
        </Text>
      ) : null}
      {!locked ? <Button testID="attach-file" label="Attach a file" onPress={() => void pick()} disabled={!!progress} /> : null}
    </SectionCard>
  );
}

const linkStyle = { color: color.brand, fontFamily: 'PublicSans_600SemiBold', fontSize: 13, minHeight: touchTarget, display: 'flex', alignItems: 'center', padding: '0 12px' } as const;

const styles = StyleSheet.create({
  list: { gap: space.sm },
  item: { flexDirection: 'row', flexWrap: 'wrap', justifyContent: 'space-between', gap: space.sm, padding: space.md, borderRadius: radius.md, backgroundColor: color.surfaceSunken },
  itemText: { flexShrink: 1, gap: 2 },
  itemActions: { flexDirection: 'row', alignItems: 'center' },
  bar: { height: 6, borderRadius: 3, backgroundColor: color.surfaceSunken, overflow: 'hidden', marginTop: space.xs },
  barFill: { height: 6, backgroundColor: color.brand },
});
