import { Redirect } from 'expo-router';
import { can } from '../../shared/auth/permissions';
import { Center, Content } from '../../components/ui/layout';
import { EmptyState, ErrorState, LoadingState } from '../../components/ui/async-states';
import { PageHeader } from '../../components/page-header';
import { StudyList } from '../../components/study-list';
import { CautionNote } from '../../components/caution-note';
import { useMeQuery } from '../../components/data/me-query';
import { useWorklistQuery } from '../../components/data/records-query';

/** The worklist: recent studies, newest procedure first. */
export default function WorklistPage() {
  const me = useMeQuery();
  const allowed = can(me.data?.role, 'study:read');
  const worklist = useWorklistQuery();
  if (!allowed && me.data?.home) return <Redirect href={me.data.home as '/admin'} />;
  return (
    <Content>
      <Center style={{ gap: 24 }}>
        <PageHeader title="Worklist" subtitle="Recent physiology studies, newest procedure first." />
        {worklist.isPending ? (
          <LoadingState label="Loading studies…" />
        ) : worklist.isError ? (
          <ErrorState title="The worklist could not be loaded" detail={worklist.error.message} onRetry={() => worklist.refetch()} />
        ) : worklist.data.items.length === 0 ? (
          <EmptyState title="No studies yet" detail="Studies appear here as soon as the lab team opens one." />
        ) : (
          <StudyList studies={worklist.data.items} testID="worklist" />
        )}
        <CautionNote />
      </Center>
    </Content>
  );
}
