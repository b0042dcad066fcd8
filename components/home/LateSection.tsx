import { View } from 'react-native';
import type { MachineQueueState } from '../queries/home';
import { EmptyState, ErrorState, Figure, LoadingState, Notice, Text } from '../ui';
import { formatDateTime } from '../ui/format';
import { HomeSection, RowLink, homeStyles } from './HomeParts';
import type { LateRequest } from './late';
import { formatLateBy } from './time';

type Q = { isPending: boolean; error: Error | null; refetch: () => unknown };

/**
 * Requests that will miss or have missed their due date: builds whose
 * predicted finish (end of breakout) falls after it, and open requests past
 * it with parts not yet printed.
 */
export function LateSection({
  late,
  requests,
  machines,
  queues,
  machineNames,
}: {
  late: LateRequest[];
  requests: Q;
  machines: Q;
  queues: MachineQueueState[];
  machineNames: Map<string, string>;
}) {
  const failed = queues.filter((q) => q.error);
  const loading = requests.isPending || machines.isPending || queues.some((q) => q.isPending);
  return (
    <HomeSection id="late" title="Late requests" countTone="danger" count={loading ? undefined : late.length}>
      {machines.error ? (
        <Notice tone="caution" title="Predictions are missing" testID="home-late-no-machines">
          <Text variant="body">The lab’s machines could not be read, so no build is checked against its due date; only requests already past due show.</Text>
        </Notice>
      ) : null}
      {failed.length > 0 ? (
        <Notice tone="caution" title="Some predictions are missing" testID="home-late-partial">
          <Text variant="body">
            The queue of {failed.map((q) => machineNames.get(q.machineId) ?? 'a machine').join(', ')} could not be read, so builds on it are not checked against their due dates.
          </Text>
        </Notice>
      ) : null}
      {requests.error ? (
        <ErrorState error={requests.error} onRetry={() => requests.refetch()} />
      ) : loading ? (
        <LoadingState label="Checking due dates against the queues…" />
      ) : late.length === 0 ? (
        <EmptyState
          testID="home-late-empty"
          title="Nothing is late"
          body="Requests whose builds are predicted to finish after their due date, and open requests past it with parts unprinted, show here so the lab can re-plan or tell the designer early."
          who="Checked against every machine’s queue and predicted times."
        />
      ) : (
        <View style={homeStyles.list} testID="home-late-list">
          {late.map((l) => (
            <RowLink key={l.requestId} href={`/requests/${l.requestId}`} testID={`home-late-${l.requestId}`} label={`Late request ${l.title}`} tone="danger">
              <Text variant="bodyStrong">{l.title}</Text>
              <Figure variant="caption" color="danger">
                Due {l.dueDate}
              </Figure>
              {l.reasons.map((r, i) =>
                r.kind === 'predicted' ? (
                  <Text key={i} variant="caption" color="inkMuted">
                    {r.planName} on {r.machineName} is predicted out of the cake {formatDateTime(r.finishAt)}, {formatLateBy(r.lateByHours)} late
                  </Text>
                ) : (
                  <Text key={i} variant="caption" color="inkMuted">
                    Past its due date with {r.printed} of {r.quantity} printed
                  </Text>
                ),
              )}
            </RowLink>
          ))}
          <View style={homeStyles.meta}>
            <Text variant="caption" color="inkFaint">
              Reorder a machine’s builds in the Queue, or re-plan from a request.
            </Text>
          </View>
        </View>
      )}
    </HomeSection>
  );
}
