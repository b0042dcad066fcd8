import { router } from 'expo-router';
import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { canFileRequests } from '../lab/roles';
import { useLab } from '../lab/useCurrentLab';
import { useMeQuery } from '../queries/me';
import { useRequestsQuery, type LabRequest, type RequestListParams } from '../queries/requests';
import { spacing } from '../theme';
import { Badge, Button, EmptyState, ErrorState, LoadingState, Screen, Table, Text, type Column } from '../ui';
import { Choice } from '../ui/Choice';
import { PRIORITY_LABELS, PRIORITY_TONES, STATUS_LABELS, STATUS_TONES, dueText } from './labels';

type View_ = 'mine' | 'open' | 'all';

/** Designers and leads file requests (the API's rule). */
export function RequestList() {
  const lab = useLab();
  const { data: me } = useMeQuery();
  const views: { value: View_; label: string }[] = [
    ...(lab.has('designer') ? [{ value: 'mine' as const, label: 'Mine' }] : []),
    ...(lab.has('planner') || lab.isLead ? [{ value: 'open' as const, label: 'Open, by due date' }] : []),
    { value: 'all', label: 'All' },
  ];
  const [view, setView] = useState<View_>(views[0].value);
  // "Mine" has no server filter: the lab's requests are read in one large page and narrowed here.
  const params: RequestListParams =
    view === 'open' ? { status: 'open', sort: 'dueDate', pageSize: 100 } : view === 'mine' ? { status: 'all', sort: 'dueDate', pageSize: 200 } : { status: 'all', sort: '-createdAt', pageSize: 100 };
  const requests = useRequestsQuery(lab.id, params);
  const rows = (requests.data?.items ?? []).filter((r) => view !== 'mine' || r.createdBy?.id === me?.user.id);

  const columns: Column<LabRequest>[] = [
    {
      key: 'title',
      title: 'Request',
      flex: 2.2,
      render: (r) => (
        <View style={styles.titleCell}>
          <Text variant="bodyStrong" numberOfLines={2}>
            {r.title}
          </Text>
          <Text variant="caption" color="inkMuted" numberOfLines={1}>
            {r.lines.length === 1 ? r.lines[0].partName : `${r.lines.length} parts`} · by {r.createdBy?.name ?? 'a former member'}
          </Text>
        </View>
      ),
    },
    { key: 'due', title: 'Due', width: 200, mono: true, value: (r) => dueText(r.dueDate, r.status) },
    { key: 'priority', title: 'Priority', width: 96, render: (r) => <Badge label={PRIORITY_LABELS[r.priority]} tone={PRIORITY_TONES[r.priority]} /> },
    { key: 'material', title: 'Material', flex: 1.2, value: (r) => r.materialName ?? '–' },
    { key: 'qty', title: 'Qty', width: 80, align: 'right', mono: true, value: (r) => r.totals.quantity.toLocaleString('en-US') },
    { key: 'planned', title: 'Planned', width: 90, align: 'right', mono: true, value: (r) => r.totals.planned.toLocaleString('en-US') },
    { key: 'printed', title: 'Printed', width: 90, align: 'right', mono: true, value: (r) => r.totals.printed.toLocaleString('en-US') },
    { key: 'failed', title: 'Failed', width: 80, align: 'right', mono: true, value: (r) => r.totals.failed.toLocaleString('en-US') },
    { key: 'still', title: 'To make', width: 90, align: 'right', mono: true, value: (r) => r.totals.stillToMake.toLocaleString('en-US') },
    { key: 'status', title: 'Status', width: 100, render: (r) => <Badge label={STATUS_LABELS[r.status]} tone={STATUS_TONES[r.status]} /> },
  ];

  return (
    <Screen
      title="Requests"
      subtitle={`What ${lab.name} has been asked to print, and how far each line has got.`}
      testID="screen-requests"
      actions={canFileRequests(lab.has) ? <Button label="New request" testID="request-new" onPress={() => router.push('/requests/new')} /> : null}
    >
      {views.length > 1 ? <Choice testID="requests-view" value={view} onChange={setView} options={views} /> : null}
      {requests.isPending ? (
        <LoadingState label="Loading requests…" />
      ) : requests.isError ? (
        <ErrorState error={requests.error} onRetry={() => requests.refetch()} />
      ) : (
        <View style={styles.results}>
          {rows.length > 0 ? (
            <Text variant="label" color="inkMuted" testID="requests-total">
              {view === 'mine'
                ? `${rows.length} of yours`
                : `${rows.length === requests.data.total ? rows.length : `${rows.length} of ${requests.data.total}`} ${view === 'open' ? 'open' : 'in all'}`}
              {view === 'open' ? ' · soonest due first, the most urgent first on the same day' : ''}
            </Text>
          ) : null}
          <Table
            testID="requests-table"
            columns={columns}
            rows={rows}
            rowKey={(r) => r.id}
            rowTestID={(r) => `request-row-${r.id}`}
            onRowPress={(r) => router.push(`/requests/${r.id}`)}
            empty={
              <EmptyState
                testID="requests-empty"
                title={view === 'mine' ? 'You have filed no requests' : view === 'open' ? 'No open requests' : 'No requests yet'}
                body="A request lists parts with their quantities, a material, a due date and a priority. Each line shows how many are planned into builds and how many were printed good."
                who="Filed by designers; planners turn open requests into builds."
              />
            }
          />
        </View>
      )}
    </Screen>
  );
}

const styles = StyleSheet.create({
  titleCell: { gap: 2 },
  results: { gap: spacing.sm },
});
