import { Center, Content } from '../../components/ui/layout';
import { EmptyState, ErrorState, LoadingState } from '../../components/ui/async-states';
import { PageHeader } from '../../components/page-header';
import { StudyList } from '../../components/study-list';
import { CautionNote } from '../../components/caution-note';
import { useCodingQueueQuery } from '../../components/data/coding-query';

/** The coder's queue: signed studies, oldest first. */
export default function CodingQueuePage() {
  const queue = useCodingQueueQuery();
  return (
    <Content>
      <Center style={{ gap: 24 }}>
        <PageHeader title="Coding queue" subtitle="Signed studies waiting for code review, oldest first." />
        {queue.isPending ? (
          <LoadingState label="Loading the queue…" />
        ) : queue.isError ? (
          <ErrorState title="The coding queue could not be loaded" detail={queue.error.message} onRetry={() => queue.refetch()} />
        ) : queue.data.items.length === 0 ? (
          <EmptyState title="Nothing to code" detail="Signed studies appear here for review." />
        ) : (
          <StudyList studies={queue.data.items} testID="coding-queue" />
        )}
        <CautionNote />
      </Center>
    </Content>
  );
}
