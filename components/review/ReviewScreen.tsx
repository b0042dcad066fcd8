import { useMemo, useState } from 'react';
import { priorityLabel } from '../requests/labels';
import { StyleSheet, View } from 'react-native';
import { isApiError } from '../api/client';
import { useLab } from '../lab/useCurrentLab';
import { NumbersPane } from '../plans/NumbersPane';
import { PlanPowderPanel } from '../powder/PlanPowderPanel';
import { PlanHistory } from '../plans/PlanHistory';
import { numbersFromEstimate } from '../plans/estimate';
import { STATUS_TONES } from '../plans/format';
import { buildStackOf, densityVolumeOf, isByShape, lineInfoOf, stackNote } from '../plans/editorModel';
import { floorNote, layoutFloor } from '../plans/floor';
import { EMPTY_PLACEMENTS, toChamberPlacements } from '../plans/instance';
import { useChamberMeshes } from '../plans/useChamberMeshes';
import { useLayoutQuery, usePlanQuery } from '../queries/plans';
import { useReviewMutation, useUndoApprovalMutation, type ReviewDecision } from '../queries/review';
import { colors, radius, spacing, useContentWidth, useIsWide } from '../theme';
import { Badge, Button, Card, ErrorState, Field, LinkPressable, LoadingState, Notice, Screen, Text } from '../ui';
import { formatDate } from '../ui/format';
import { ChamberView, LayerSlider, lineColour, type Vec3 } from '../viewer';
import { STATUS_LABELS } from '../../shared/plans/status';
import type { PlanView } from '../../shared/schemas/plans';
import { BuildFileLinks } from './BuildFileLinks';
import { calibrationNote } from './calibration';
import { PlanFlags } from './PlanFlags';
import { ReturnToDraft } from './ReturnToDraft';
import { UndoNotice } from './UndoNotice';

/** The lead's review of one plan: its chosen layout in 3D, its numbers, its lines and history, and the decision. */
export function ReviewScreen({ planId }: { planId: string }) {
  const lab = useLab();
  const plan = usePlanQuery(lab.id, planId);
  const back = (
    <LinkPressable href="/review" testID="review-back" style={{ minHeight: 32, justifyContent: 'center' }}>
      <Text variant="label" color="emberPressed">
        ‹ Plans to review
      </Text>
    </LinkPressable>
  );
  if (plan.isPending) {
    return (
      <Screen title="Review" above={back} testID="screen-review">
        <LoadingState label="Loading the plan…" />
      </Screen>
    );
  }
  if (plan.isError) {
    return (
      <Screen title="Review" above={back} testID="screen-review">
        <ErrorState error={plan.error} onRetry={() => plan.refetch()} />
      </Screen>
    );
  }
  return <ReviewBody plan={plan.data as PlanView} back={back} />;
}

function ReviewBody({ plan, back }: { plan: PlanView; back: React.ReactNode }) {
  const lab = useLab();
  const wide = useIsWide();
  // Side by side only where the 3D view keeps a useful width beside the 360 px column (a 1,024 px window leaves the
  // page 680 px: the view would be 300 px with its toolbar over half of it).
  const twoColumns = useContentWidth() >= 900;
  const layout = useLayoutQuery(lab.id, plan.id, plan.chosenLayoutId);
  const chamberMm = plan.machine.chamberMm as Vec3;
  const lineIds = useMemo(() => plan.lines.map((l) => l.requestLineId), [plan.lines]);
  const partNames = useMemo(() => new Map(plan.lines.map((l) => [l.requestLineId, l.part.name] as const)), [plan.lines]);
  const placements = useMemo(() => (layout.data ? toChamberPlacements(layout.data.result, lineIds) : EMPTY_PLACEMENTS), [layout.data, lineIds]);
  // The parts drawn by their own meshes, as in the plan editor (each a box until its mesh is read).
  const partIdsInOrder = useMemo(() => plan.lines.map((l) => l.part.id), [plan.lines]);
  const chamberMeshes = useChamberMeshes(lab.id, partIdsInOrder, placements.partIndex);
  const numbers = useMemo(() => (layout.data ? numbersFromEstimate(layout.data.estimate, layout.data.result) : null), [layout.data]);
  // The height no layout of the same parts can stand under, as the editor shows it (by shape: the parts' own volumes).
  const floor = useMemo(() => {
    if (!layout.data) return null;
    const byShape = isByShape(layout.data.result);
    return floorNote(layoutFloor(layout.data.instance, byShape, densityVolumeOf(lineInfoOf(plan.lines, []))), layout.data.result, (id) => partNames.get(id), byShape);
  }, [layout.data, plan.lines, partNames]);
  const [cutMm, setCutMm] = useState<number | null>(null);
  const calibration = (layout.data?.estimate as { calibration?: { runs: number; calibrated: boolean } } | undefined)?.calibration;
  const margin = layout.data?.instance.margin ?? { xy: 0, bottom: 0, top: 0 };
  const heightMm = layout.data?.result.height ?? 0;
  const layerHeightMm = numbers?.layerHeightMm ?? (plan.material.defaultLayerHeightMm as number) ?? 0.1;
  // Layers as printed, from the chamber floor to over the top margin, as the editor and the numbers count them.
  const stack = buildStackOf(heightMm, { bottom: margin.bottom ?? 0, top: margin.top ?? 0 }, layerHeightMm);
  const top = Math.max(stack.topMm, layerHeightMm);
  const chosen = plan.layouts.find((l) => l.chosen);

  const view3d = (
    <View style={[styles.build, { height: wide ? 440 : 320 }]} testID="review-build">
      {plan.chosenLayoutId == null ? (
        <Notice tone="caution" title="No chosen layout">
          The planner has not chosen a layout; send the plan back.
        </Notice>
      ) : layout.isPending ? (
        <LoadingState label="Loading the chosen layout…" />
      ) : layout.isError ? (
        <ErrorState error={layout.error} onRetry={() => layout.refetch()} />
      ) : (
        <View style={styles.buildBody}>
          <View style={styles.canvasBox}>
            <ChamberView
              chamberMm={chamberMm}
              margin={{ xy: margin.xy ?? 0, bottom: margin.bottom ?? 0, top: margin.top ?? 0 }}
              placements={placements}
              meshesByPart={chamberMeshes.meshes}
              lineColours={lineIds.map((_, i) => lineColour(i))}
              cutHeightMm={cutMm}
              describePlacement={(i) => {
                const line = plan.lines[placements.lineIndex[i]];
                return line ? `${line.part.name} · ${line.request.title}` : 'Part';
              }}
              style={{ flex: 1 }}
            />
          </View>
          <View style={{ width: 64 }}>
            <LayerSlider maxHeightMm={top} layerHeightMm={layerHeightMm} valueMm={cutMm ?? top} onChange={(h) => setCutMm(h >= top ? null : h)} testID="review-layer-slider" />
          </View>
        </View>
      )}
    </View>
  );

  const lines = (
    <Card title="Lines" subtitle={partsFor(plan)} testID="review-lines">
      {plan.lines.map((l, i) => (
        <View key={l.id} style={styles.line}>
          <View style={[styles.swatch, { backgroundColor: lineColour(i) }]} />
          <View style={{ flex: 1 }}>
            <Text variant="label">
              {l.quantity} × {l.part.name}
            </Text>
            <Text variant="caption" color="inkMuted">
              {l.request.title} · due {formatDate(l.request.dueDate)} · {priorityLabel(l.request.priority)}
            </Text>
          </View>
        </View>
      ))}
    </Card>
  );

  const side = (
    <View style={{ gap: spacing.lg }}>
      <PlanFlags planId={plan.id} status={plan.status} testID="review-flags" />
      <Decision plan={plan} />
      <NumbersPane
        numbers={numbers}
        title={chosen ? `Chosen layout: ${chosen.label}` : 'No chosen layout'}
        bedAreaMm2={chamberMm[0] * chamberMm[1]}
        cutLayer={cutMm == null ? null : Math.round(cutMm / layerHeightMm)}
        stackNote={layout.data ? stackNote(stack) : undefined}
        floorNote={floor ?? undefined}
        note={calibrationNote(calibration)}
        partNames={partNames}
      />
      <PlanPowderPanel planId={plan.id} freshKg={numbers?.freshKg} reusedKg={numbers?.reusedKg} layoutLabel={chosen ? `Chosen layout: ${chosen.label}` : 'No chosen layout'} />
      <Card title="History" testID="review-history">
        <PlanHistory events={plan.events} />
      </Card>
    </View>
  );

  return (
    <Screen
      title={plan.name}
      subtitle={`${plan.machine.name} · ${plan.material.name}${plan.createdBy ? ` · planned by ${plan.createdBy.name}` : ''}`}
      above={back}
      actions={<Badge label={STATUS_LABELS[plan.status]} tone={STATUS_TONES[plan.status]} testID="review-status" />}
      testID="screen-review"
      maxWidth={1320}
    >
      {twoColumns ? (
        <View style={styles.columns}>
          <View style={{ flex: 3, gap: spacing.lg, minWidth: 0 }}>
            {view3d}
            {lines}
          </View>
          <View style={{ flex: 2, minWidth: 360 }}>{side}</View>
        </View>
      ) : (
        <View style={{ gap: spacing.lg }}>
          {view3d}
          {side}
          {lines}
        </View>
      )}
      {chamberMeshes.loaders}
    </Screen>
  );
}

function partsFor(plan: PlanView): string {
  const parts = plan.lines.reduce((s, l) => s + l.quantity, 0);
  const requests = new Set(plan.lines.map((l) => l.request.id)).size;
  return `${parts} part${parts === 1 ? '' : 's'} for ${requests} request${requests === 1 ? '' : 's'}`;
}

/** Approve into the machine's queue, or send back with the comment the planner will read. */
function Decision({ plan }: { plan: PlanView }) {
  const lab = useLab();
  const review = useReviewMutation(lab.id, plan.id, plan.machine.id);
  const undo = useUndoApprovalMutation(lab.id, plan.id, plan.machine.id);
  const [comment, setComment] = useState('');
  const [commentError, setCommentError] = useState<string | null>(null);
  const [done, setDone] = useState<{ decision: ReviewDecision; position?: number | null; notified: number; undoUntil?: string | null } | null>(null);

  const decide = (decision: ReviewDecision) => {
    setCommentError(null);
    if (decision === 'changes_requested' && comment.trim() === '') {
      setCommentError('Say what the planner should change: a comment is required to send a plan back.');
      return;
    }
    review.mutate(
      { decision, ...(comment.trim() ? { comment: comment.trim() } : {}) },
      {
        onSuccess: (res) => {
          setDone({ decision, position: res.queuePosition, notified: res.notified?.length ?? 0, undoUntil: res.undoUntil });
          undo.reset();
          setComment('');
        },
        onError: (e) => {
          if (isApiError(e) && e.field === 'comment') setCommentError(e.message);
        },
      },
    );
  };

  const err = review.error && !(isApiError(review.error) && review.error.field === 'comment') ? review.error : null;
  const told = (n: number) => (n > 0 ? ` The planner was e-mailed.` : '');

  const errorNotice = err ? (
    <Notice tone="danger" title={isApiError(err) && err.status === 409 ? 'The plan has moved on' : 'Not saved'} testID="review-error">
      {err.message}
    </Notice>
  ) : null;

  const undone = undo.isSuccess ? (
    <Notice tone="info" title="Approval undone" testID="review-undone">
      {`The plan is out of the queue and waits for a decision again.${told(undo.data?.notified?.length ?? 0)}`}
    </Notice>
  ) : null;

  if (plan.status !== 'in_review') {
    return (
      <Card title="Decision" testID="review-decided">
        {errorNotice}
        {done && done.decision === 'approve' && (plan.status === 'queued' || plan.status === 'approved') ? (
          <UndoNotice
            title="Approved and queued"
            until={done.undoUntil}
            undoLabel="Undo approval"
            onUndo={() => undo.mutate(undefined, { onSuccess: () => setDone(null) })}
            pending={undo.isPending}
            error={undo.error?.message}
            testID="review-result"
          >
            {`The plan is number ${done.position ?? '–'} in the queue of ${plan.machine.name}.${told(done.notified)}`}
          </UndoNotice>
        ) : done && done.decision === 'changes_requested' ? (
          <Notice tone="success" title="Sent back" testID="review-result">
            {`The plan is editable again for the planner.${told(done.notified)}`}
          </Notice>
        ) : (
          <Text color="inkMuted">This plan is {STATUS_LABELS[plan.status].toLowerCase()}: there is nothing to decide.</Text>
        )}
        {plan.status === 'queued' || plan.status === 'approved' ? (
          <View style={{ gap: spacing.sm }}>
            <LinkPressable href={`/queue?machine=${plan.machine.id}`} testID="review-to-queue" style={styles.queueLink}>
              <Text variant="bodyStrong" color="emberPressed">
                See the queue of {plan.machine.name} ›
              </Text>
            </LinkPressable>
            <BuildFileLinks labId={lab.id} planId={plan.id} testID="review-files" />
            <ReturnToDraft plan={plan} />
          </View>
        ) : null}
      </Card>
    );
  }

  return (
    <Card title="Decision" subtitle="Approving puts the plan at the end of its machine's queue." testID="review-decision">
      {undone}
      <Field
        label="Comment for the planner"
        hint="Required when sending back; kept in the plan's history."
        value={comment}
        onChangeText={(t) => {
          setComment(t);
          if (commentError) setCommentError(null);
        }}
        error={commentError}
        multiline
        style={{ minHeight: 88, paddingTop: spacing.sm, textAlignVertical: 'top' }}
        testID="review-comment"
      />
      {errorNotice}
      <View style={styles.buttons}>
        <Button label="Approve and queue" onPress={() => decide('approve')} loading={review.isPending && review.variables?.decision === 'approve'} disabled={review.isPending} testID="review-approve" />
        <Button
          label="Send back"
          variant="secondary"
          onPress={() => decide('changes_requested')}
          loading={review.isPending && review.variables?.decision === 'changes_requested'}
          disabled={review.isPending}
          testID="review-send-back"
        />
      </View>
    </Card>
  );
}

const styles = StyleSheet.create({
  columns: { flexDirection: 'row', gap: spacing.xl, alignItems: 'flex-start' },
  build: { minHeight: 280 },
  buildBody: { flex: 1, flexDirection: 'row', gap: spacing.sm },
  canvasBox: { flex: 1, borderRadius: radius.lg, overflow: 'hidden', backgroundColor: colors.graphite },
  line: { flexDirection: 'row', alignItems: 'center', gap: spacing.sm },
  swatch: { width: 12, height: 12, borderRadius: 3 },
  buttons: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.sm },
  queueLink: { minHeight: 48, justifyContent: 'center' },
});
