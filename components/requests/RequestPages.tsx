import { router } from 'expo-router';
import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { useLab } from '../lab/useCurrentLab';
import { useMeQuery } from '../queries/me';
import { usePartQuery } from '../queries/parts';
import { useCreateRequestMutation, useRequestQuery, useUpdateRequestMutation, type LabRequest, type LabRequestLine } from '../queries/requests';
import { colors, radius, spacing } from '../theme';
import { Badge, Button, Card, ConfirmAction, ErrorState, LinkPressable, LoadingState, Notice, Screen, Table, Text, type Column } from '../ui';
import { formatDateTime } from '../ui/format';
import { STATUS_LABELS as PLAN_STATUS_LABELS } from '../../shared/plans/status';
import { RequestForm, emptyRequestValues, type RequestFormValues } from './RequestForm';
import { canFileRequests } from '../lab/roles';
import { PRIORITY_LABELS, PRIORITY_TONES, STATUS_LABELS, STATUS_TONES, dueText } from './labels';

function Back() {
  return (
    <LinkPressable href="/requests" testID="request-back" style={styles.back}>
      <Text variant="label" color="ember">
        ← All requests
      </Text>
    </LinkPressable>
  );
}

export function NewRequest({ partId }: { partId?: string }) {
  const lab = useLab();
  const create = useCreateRequestMutation(lab.id);
  // Asked for from a part's page: the form starts with that part and its default material, once the part is known.
  const part = usePartQuery(lab.id, partId);
  const waiting = !!partId && part.isPending;
  const initial: RequestFormValues =
    partId && part.data
      ? { ...emptyRequestValues(), materialId: part.data.materialId ?? '', lines: [{ partId: part.data.id, partName: part.data.name, quantity: '1' }] }
      : emptyRequestValues();
  return (
    <Screen title="New request" subtitle="Which parts, how many, in what material and by when." above={<Back />} testID="screen-request-new">
      {!canFileRequests(lab.has) ? (
        <Notice tone="info">Designers and leads file requests; your roles in this lab let you read them.</Notice>
      ) : waiting ? (
        <LoadingState label="Loading the part…" />
      ) : (
        <>
          {partId && part.isError ? (
            <Notice tone="caution" testID="request-new-part-missing">
              The part this request was started from could not be loaded; add the parts below.
            </Notice>
          ) : null}
          <RequestForm
            key={part.data?.id ?? 'empty'}
            initial={initial}
            submitLabel="File request"
            submitting={create.isPending}
            error={create.error}
            onSubmit={(input) => create.mutate(input, { onSuccess: (r) => router.replace(`/requests/${r.id}`) })}
          />
        </>
      )}
    </Screen>
  );
}

export function RequestDetail({ requestId }: { requestId: string }) {
  const lab = useLab();
  const request = useRequestQuery(lab.id, requestId);
  if (request.isPending) {
    return (
      <Screen title="Request" above={<Back />} testID="screen-request">
        <LoadingState label="Loading the request…" />
      </Screen>
    );
  }
  if (request.isError) {
    return (
      <Screen title="Request" above={<Back />} testID="screen-request">
        <ErrorState error={request.error} onRetry={() => request.refetch()} />
      </Screen>
    );
  }
  return <RequestView key={request.data.id} request={request.data} />;
}

function valuesOf(r: LabRequest): RequestFormValues {
  return {
    title: r.title,
    materialId: r.materialId ?? '',
    dueDate: r.dueDate,
    priority: r.priority,
    notes: r.notes,
    lines: r.lines.map((l) => ({ partId: l.partId, partName: l.partName, quantity: String(l.quantity) })),
  };
}

function RequestView({ request: r }: { request: LabRequest }) {
  const lab = useLab();
  const { data: me } = useMeQuery();
  const update = useUpdateRequestMutation(lab.id, r.id);
  const [editing, setEditing] = useState(false);
  const mayChange = canFileRequests(lab.has) && (lab.isLead || r.createdBy?.id === me?.user.id);
  const editable = mayChange && !r.planned && r.status === 'open';

  const columns: Column<LabRequestLine>[] = [
    {
      key: 'part',
      title: 'Part',
      flex: 2,
      render: (l) => (
        <LinkPressable href={`/parts/${l.partId}`} testID={`request-line-part-${l.partId}`}>
          <Text variant="bodyStrong" color="ember" numberOfLines={2}>
            {l.partName}
          </Text>
        </LinkPressable>
      ),
    },
    { key: 'qty', title: 'Quantity', width: 110, align: 'right', mono: true, value: (l) => l.quantity.toLocaleString('en-US') },
    { key: 'planned', title: 'Planned', width: 110, align: 'right', mono: true, value: (l) => l.plannedCount.toLocaleString('en-US') },
    { key: 'printed', title: 'Printed good', width: 130, align: 'right', mono: true, value: (l) => l.printedCount.toLocaleString('en-US') },
    { key: 'failed', title: 'Failed', width: 90, align: 'right', mono: true, value: (l) => l.failedCount.toLocaleString('en-US') },
    { key: 'still', title: 'Still to make', width: 130, align: 'right', mono: true, value: (l) => l.stillToMakeCount.toLocaleString('en-US') },
    { key: 'progress', title: 'Progress', flex: 1.2, render: (l) => <LineProgress line={l} /> },
  ];

  if (editing) {
    return (
      <Screen title={`Edit: ${r.title}`} above={<Back />} testID="screen-request-edit">
        <RequestForm
          initial={valuesOf(r)}
          submitLabel="Save changes"
          submitting={update.isPending}
          error={update.error}
          onCancel={() => {
            update.reset();
            setEditing(false);
          }}
          onSubmit={(input) => update.mutate(input, { onSuccess: () => setEditing(false) })}
        />
      </Screen>
    );
  }

  return (
    <Screen
      title={r.title}
      subtitle={`Filed by ${r.createdBy?.name ?? 'a former member'} ${formatDateTime(r.createdAt)}`}
      above={<Back />}
      testID="screen-request"
      actions={editable ? <Button label="Edit" variant="secondary" testID="request-edit" onPress={() => setEditing(true)} /> : null}
    >
      <Card testID="request-summary">
        <View style={styles.facts}>
          <Fact label="Status">
            <Badge label={STATUS_LABELS[r.status]} tone={STATUS_TONES[r.status]} testID="request-status" />
          </Fact>
          <Fact label="Due">
            <Text variant="figure" testID="request-due-date">
              {dueText(r.dueDate, r.status)}
            </Text>
          </Fact>
          <Fact label="Priority">
            <Badge label={PRIORITY_LABELS[r.priority]} tone={PRIORITY_TONES[r.priority]} />
          </Fact>
          <Fact label="Material">
            <Text variant="body">{r.materialName ?? '–'}</Text>
          </Fact>
          <Fact label="Parts ordered">
            <Text variant="figure" testID="request-total-quantity">
              {r.totals.quantity.toLocaleString('en-US')}
            </Text>
          </Fact>
          <Fact label="Planned">
            <Text variant="figure">{r.totals.planned.toLocaleString('en-US')}</Text>
          </Fact>
          <Fact label="Printed good">
            <Text variant="figure" testID="request-total-printed">
              {r.totals.printed.toLocaleString('en-US')}
            </Text>
          </Fact>
          <Fact label="Failed">
            <Text variant="figure" color={r.totals.failed > 0 ? 'danger' : 'ink'} testID="request-total-failed">
              {r.totals.failed.toLocaleString('en-US')}
            </Text>
          </Fact>
          <Fact label="Still to make">
            <Text variant="figure" testID="request-total-still">
              {r.totals.stillToMake.toLocaleString('en-US')}
            </Text>
          </Fact>
          <Fact label="Expected ready">
            <Text variant="figure" testID="request-ready">
              {readyText(r)}
            </Text>
          </Fact>
        </View>
        {r.notes ? (
          <View style={styles.notes}>
            <Text variant="overline" color="inkFaint">
              Notes
            </Text>
            <Text variant="body">{r.notes}</Text>
          </View>
        ) : null}
      </Card>
      {r.planned ? (
        <Notice tone="info" testID="request-locked">
          Part of this request is planned into a build, so it can no longer be changed. Ask the planner to take it out of the plan first.
        </Notice>
      ) : null}
      <Table testID="request-lines-table" columns={columns} rows={r.lines} rowKey={(l) => l.id} rowTestID={(l) => `request-line-row-${l.partId}`} />
      <Builds request={r} />
      {update.error && !editing ? (
        <Notice tone="danger" title="Not changed">
          {update.error.message}
        </Notice>
      ) : null}
      {mayChange && !r.planned ? (
        r.status === 'open' ? (
          <ConfirmAction
            label="Cancel request"
            question="Cancel this request? Planners stop seeing it; you can reopen it."
            confirmLabel="Cancel request"
            testID="request-cancel"
            loading={update.isPending}
            onConfirm={() => update.mutate({ status: 'cancelled' })}
          />
        ) : r.status === 'cancelled' ? (
          <Button label="Reopen request" variant="secondary" testID="request-reopen" loading={update.isPending} onPress={() => update.mutate({ status: 'open' })} />
        ) : null
      ) : null}
    </Screen>
  );
}

/**
 * When the request should be ready: the latest predicted breakout of the builds still holding its parts (the
 * queue's prediction), or why there is none yet.
 */
export function readyText(r: LabRequest): string {
  if (r.totals.stillToMake === 0) return r.status === 'done' ? 'Done' : 'All printed';
  const open = r.totals.quantity - r.totals.planned;
  if (open > 0) return `${open.toLocaleString('en-US')} not in a build yet`;
  const pending = (r.builds ?? []).filter((b) => b.status !== 'done' && b.status !== 'aborted' && b.status !== 'cancelled');
  const dates = pending.map((b) => (b.readyAt ? Date.parse(b.readyAt) : Number.NaN));
  if (dates.length === 0 || dates.some((d) => !Number.isFinite(d))) return 'Not predicted yet';
  return formatDateTime(new Date(Math.max(...dates)).toISOString());
}

/** The builds holding the request's parts, with what came out of each and when the rest should be ready. */
function Builds({ request: r }: { request: LabRequest }) {
  const builds = r.builds ?? [];
  if (builds.length === 0) return null;
  const partOf = new Map(r.lines.map((l) => [l.id, l.partName]));
  return (
    <Card testID="request-builds">
      <Text variant="heading">In builds</Text>
      <View style={{ gap: spacing.md }}>
        {builds.map((b) => (
          <View key={b.planId} style={styles.build} testID={`request-build-${b.planId}`}>
            <View style={styles.buildHead}>
              <LinkPressable href={`/plans/${b.planId}`} accessibilityLabel={`Open build ${b.planName}`}>
                <Text variant="bodyStrong" color="ember">
                  {b.planName}
                </Text>
              </LinkPressable>
              <Badge label={PLAN_STATUS_LABELS[b.status]} tone={b.status === 'done' ? 'teal' : b.status === 'aborted' ? 'danger' : 'neutral'} />
            </View>
            <Text variant="caption" color="inkMuted">
              {b.machine.name}
              {b.materialName ? ` · ${b.materialName}` : ''}
              {b.readyAt ? ` · ${b.status === 'done' ? 'done' : 'parts out about'} ${formatDateTime(b.readyAt)}` : ' · not in a machine queue yet'}
            </Text>
            {b.lines.map((l) => (
              <Text key={l.requestLineId} variant="label" testID={`request-build-${b.planId}-line-${l.requestLineId}`}>
                {`${partOf.get(l.requestLineId) ?? 'Part'}: ${l.quantity} in the build` +
                  (l.goodCount != null ? `, ${l.goodCount} good, ${l.failedCount ?? 0} failed` : '')}
              </Text>
            ))}
          </View>
        ))}
      </View>
    </Card>
  );
}

function Fact({ label, children }: { label: string; children: React.ReactNode }) {
  return (
    <View style={styles.fact}>
      <Text variant="overline" color="inkFaint">
        {label}
      </Text>
      {children}
    </View>
  );
}

/** Two bars on one track: planned (light) under printed (solid), each as a share of the quantity. */
function LineProgress({ line }: { line: LabRequestLine }) {
  const share = (n: number) => `${Math.min(100, Math.round((n / Math.max(1, line.quantity)) * 100))}%` as const;
  return (
    <View style={styles.progress} accessibilityLabel={`${line.plannedCount} planned and ${line.printedCount} printed of ${line.quantity}`}>
      <View style={styles.track}>
        <View style={[styles.planned, { width: share(line.plannedCount) }]} />
        <View style={[styles.printed, { width: share(line.printedCount) }]} />
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  back: { alignSelf: 'flex-start', paddingVertical: spacing.xs },
  facts: { flexDirection: 'row', flexWrap: 'wrap', rowGap: spacing.md, columnGap: spacing.xl },
  fact: { gap: spacing.xxs, minWidth: 110 },
  build: { gap: spacing.xxs, paddingBottom: spacing.sm, borderBottomWidth: 1, borderBottomColor: colors.line },
  buildHead: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', gap: spacing.sm },
  notes: { gap: spacing.xxs },
  progress: { width: '100%', minWidth: 100, paddingVertical: spacing.xs },
  track: { height: 8, borderRadius: radius.pill, backgroundColor: colors.powderDeep, overflow: 'hidden' },
  planned: { position: 'absolute', left: 0, top: 0, bottom: 0, backgroundColor: colors.tealSoft, borderRightWidth: 1, borderRightColor: colors.teal },
  printed: { position: 'absolute', left: 0, top: 0, bottom: 0, backgroundColor: colors.teal },
});
