import { router } from 'expo-router';
import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import type { PlanStatus } from '../../shared/plans/status';
import type { PlanListItem } from '../../shared/schemas/plans';
import { useLab } from '../lab/useCurrentLab';
import { usePlansQuery } from '../queries/plans';
import { spacing } from '../theme';
import { Badge, Button, Choice, EmptyState, ErrorState, LoadingState, Screen, Table, Text, type Column } from '../ui';
import { formatDate } from '../ui/format';
import { STATUS_LABELS, STATUS_TONES } from './format';

const FILTERS: { key: string; label: string; statuses?: PlanStatus[] }[] = [
  { key: 'all', label: 'All' },
  { key: 'draft', label: 'Drafts', statuses: ['draft', 'changes_requested'] },
  { key: 'review', label: 'In review', statuses: ['in_review'] },
  { key: 'approved', label: 'Approved and queued', statuses: ['approved', 'queued'] },
  { key: 'running', label: 'At the machine', statuses: ['printing', 'cooling', 'breakout', 'finishing'] },
  { key: 'closed', label: 'Done or cancelled', statuses: ['done', 'cancelled', 'aborted'] },
];

/** Plans by status, latest change first; planners start new ones from here. */
export function PlanList() {
  const lab = useLab();
  const [filter, setFilter] = useState('all');
  const statuses = FILTERS.find((f) => f.key === filter)?.statuses;
  const plans = usePlansQuery(lab.id, statuses);
  const canPlan = lab.has('planner') || lab.has('lead');

  const columns: Column<PlanListItem>[] = [
    { key: 'name', title: 'Plan', flex: 3, render: (p) => <Text variant="bodyStrong" numberOfLines={2}>{p.name}</Text> },
    { key: 'status', title: 'Status', flex: 1.4, render: (p) => <Badge label={STATUS_LABELS[p.status]} tone={STATUS_TONES[p.status]} testID={`plan-status-${p.id}`} /> },
    { key: 'machine', title: 'Machine', flex: 1.4, value: (p) => p.machine.name },
    { key: 'material', title: 'Material', flex: 1.6, value: (p) => p.material.name },
    { key: 'parts', title: 'Parts', flex: 0.8, align: 'right', mono: true, value: (p) => String(p.partCount) },
    { key: 'layouts', title: 'Layouts', flex: 0.8, align: 'right', mono: true, value: (p) => String(p.layoutCount) },
    { key: 'due', title: 'Earliest due', flex: 1.2, mono: true, value: (p) => formatDate(p.earliestDueDate) },
    { key: 'updated', title: 'Changed', flex: 1.2, mono: true, value: (p) => formatDate(p.updatedAt) },
  ];

  return (
    <Screen
      title="Plans"
      subtitle={`Builds of ${lab.name} by status, from draft to done.`}
      testID="screen-plans"
      actions={canPlan ? <Button label="New plan" onPress={() => router.navigate('/plans/new')} testID="plans-new" /> : undefined}
    >
      <View style={styles.filters}>
        <Choice compact value={filter} onChange={setFilter} options={FILTERS.map((f) => ({ value: f.key, label: f.label, testID: `plans-filter-${f.key}` }))} />
      </View>
      {plans.isPending ? (
        <LoadingState label="Loading plans…" />
      ) : plans.isError ? (
        <ErrorState error={plans.error} onRetry={() => plans.refetch()} />
      ) : (
        <Table
          testID="plans-table"
          columns={columns}
          rows={plans.data}
          rowKey={(p) => p.id}
          rowTestID={(p) => `plan-row-${p.id}`}
          onRowPress={(p) => router.navigate(`/plans/${p.id}`)}
          empty={
            <EmptyState
              testID="plans-empty"
              title={filter === 'all' ? 'No plans yet' : 'No plans with this status'}
              body="A plan is one machine, one material and a set of request lines, packed into one or more layouts with their layers, print hours, cooling, powder and cost per part. Drafts go to review, approved plans go to a machine's queue."
              who="Made by planners; reviewed and approved by leads."
              action={canPlan ? <Button label="Plan open requests" variant="secondary" onPress={() => router.navigate('/plans/new')} /> : undefined}
            />
          }
        />
      )}
    </Screen>
  );
}

const styles = StyleSheet.create({
  filters: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.sm },
});
