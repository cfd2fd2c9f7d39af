import { useState } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';
import { Center, Content } from '../ui/layout';
import { EmptyState, ErrorState, LoadingState } from '../ui/async-states';
import { PageHeader } from '../page-header';
import { Text } from '../ui/text';
import { formatDateTime } from '../format';
import { color, font, radius, space, touchTarget } from '../theme';
import { ApiError } from '../data/api';
import { useCaughtMail } from '../data/caught-mail-query';
import { useMeQuery } from '../data/me-query';
import { can } from '../../shared/auth/permissions';
import type { CaughtMessage } from '../../shared/mail/caught';

/**
 * Development page for administrators: the mail the local mail stand-in caught (the referrer's
 * notices), newest first, so anyone can check what would have been sent. Only where the stand-in
 * is in use; a production server has no such list.
 */
export default function CaughtMailPage() {
  const me = useMeQuery();
  const allowed = can(me.data?.role, 'admin:manage');
  const mail = useCaughtMail(allowed);
  const notInUse = mail.error instanceof ApiError && mail.error.status === 404;
  return (
    <Content>
      <Center style={styles.center}>
        <PageHeader title="Caught mail" subtitle="Development aid: what the local mail stand-in received, newest first. Nothing here was delivered to anyone." />
        {me.data && !allowed ? (
          <EmptyState title="Your role does not include this page" detail="Administrators see the caught mail." testID="caught-mail-not-allowed" />
        ) : mail.isPending ? (
          <LoadingState label="Loading caught mail…" />
        ) : notInUse ? (
          <EmptyState title="No mail stand-in here" detail={(mail.error as ApiError).message} testID="caught-mail-not-in-use" />
        ) : mail.isError ? (
          <ErrorState title="Caught mail could not be loaded" detail={mail.error.message} onRetry={() => void mail.refetch()} />
        ) : mail.data.items.length === 0 ? (
          <EmptyState title="No mail caught yet" detail="Signing a report with a referring clinician's address sends a notice." testID="caught-mail-empty" />
        ) : (
          <View style={styles.list} role="list" testID="caught-mail-list">
            {mail.data.items.map((m, i) => (
              <Message key={m.id} message={m} divided={i > 0} />
            ))}
          </View>
        )}
      </Center>
    </Content>
  );
}

function Message({ message: m, divided }: { message: CaughtMessage; divided: boolean }) {
  const [open, setOpen] = useState(false);
  return (
    <View role="listitem" style={[styles.row, divided && styles.divider]} testID={`caught-mail-${m.id}`}>
      <Pressable role="button" aria-expanded={open} accessibilityLabel={`${m.subject}, to ${m.to.join(', ')}: ${open ? 'hide' : 'show'} the message`} onPress={() => setOpen((o) => !o)} style={styles.summary} testID={`caught-mail-${m.id}-toggle`}>
        <View style={styles.grow}>
          <Text weight="semibold" testID={`caught-mail-${m.id}-subject`}>
            {m.subject || '(no subject)'}
          </Text>
          <Text variant="caption" tone="muted">
            To {m.to.join(', ')} · from {m.from} · {formatDateTime(m.receivedAt)}
          </Text>
        </View>
        <Text variant="caption" weight="semibold" tone="brand">
          {open ? 'Hide' : 'Show'}
        </Text>
      </Pressable>
      {open ? (
        <View style={styles.body}>
          <Text style={styles.plain} selectable testID={`caught-mail-${m.id}-text`}>
            {m.text}
          </Text>
          <View style={styles.headers}>
            {m.headers.map((h, k) => (
              <Text key={k} variant="caption" tone="muted" style={styles.plain} selectable>
                {h.name}: {h.value}
              </Text>
            ))}
          </View>
        </View>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  center: { gap: space.xl },
  list: { backgroundColor: color.surface, borderRadius: radius.lg, borderWidth: 1, borderColor: color.line, overflow: 'hidden' },
  row: { padding: space.lg, gap: space.sm },
  divider: { borderTopWidth: 1, borderTopColor: color.line },
  summary: { flexDirection: 'row', alignItems: 'center', gap: space.md, minHeight: touchTarget },
  grow: { flex: 1, minWidth: 0, gap: space.xxs },
  body: { gap: space.md, backgroundColor: color.paper, borderRadius: radius.md, padding: space.md },
  headers: { gap: 1, borderTopWidth: 1, borderTopColor: color.line, paddingTop: space.sm },
  plain: { fontFamily: font.regular },
});
