import { router } from 'expo-router';
import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { partPatchSchema, type OrientationRule } from '../../shared/schemas/parts';
import { fieldErrorsOf } from '../api/client';
import { useLab } from '../lab/useCurrentLab';
import { useMaterialsQuery } from '../queries/materials';
import { useMeQuery } from '../queries/me';
import { useDeletePartMutation, usePartQuery, useUpdatePartMutation, type Part } from '../queries/parts';
import { spacing, useIsWide } from '../theme';
import { Button, Card, ConfirmAction, ErrorState, Field, LinkPressable, LoadingState, Notice, Screen, Text } from '../ui';
import { formatDateTime } from '../ui/format';
import { Choice } from '../ui/Choice';
import { formatArea, formatBytes, formatCount, formatSize, formatVolume } from './format';
import { canUploadParts } from './PartLibrary';
import { canFileRequests } from '../lab/roles';
import { PartMeshPreview } from './PartMeshPreview';
import { PartRevisions } from './PartRevisions';
import { addQuarterTurn, rotatedSize, type Rotation } from './rotation';
import { WARNING_EXPLANATIONS, warningLabel } from './warnings';

const ORIENTATION_LABELS: Record<OrientationRule, { label: string; hint: string }> = {
  any: { label: 'Any', hint: 'The packer may turn the part every way to fit more into a build.' },
  keep_up: { label: 'Keep this side up', hint: 'Only turned about the vertical: the top stays on top (surface finish, layer direction).' },
  fixed: { label: 'Fixed as uploaded', hint: 'Placed exactly as shown (after the quarter turns below), never turned.' },
};

export function PartPage({ partId }: { partId: string }) {
  const lab = useLab();
  const part = usePartQuery(lab.id, partId);
  const back = (
    <LinkPressable href="/parts" testID="part-back" style={styles.back}>
      <Text variant="label" color="ember">
        ← All parts
      </Text>
    </LinkPressable>
  );
  if (part.isPending) {
    return (
      <Screen title="Part" above={back} testID="screen-part">
        <LoadingState label="Loading the part…" />
      </Screen>
    );
  }
  if (part.isError) {
    return (
      <Screen title="Part" above={back} testID="screen-part">
        <ErrorState error={part.error} onRetry={() => part.refetch()} />
      </Screen>
    );
  }
  // A fresh detail per part, so an unsaved turn of one part never carries over to the next.
  return <PartDetail key={part.data.id} part={part.data} back={back} />;
}

function PartDetail({ part, back }: { part: Part; back: React.ReactNode }) {
  const lab = useLab();
  const wide = useIsWide();
  const { data: me } = useMeQuery();
  const canEdit = canUploadParts(lab.has);
  const canDelete = lab.isLead || (!!me && part.uploadedBy?.id === me.user.id);
  // The rotation is held here so the preview turns with the form before it is saved.
  const [rotationDeg, setRotationDeg] = useState<Rotation>([...part.rotationDeg] as Rotation);
  const size = rotatedSize(part.uploadedSizeMm, rotationDeg);

  return (
    <Screen
      title={part.name}
      subtitle={`${part.file.name} · ${part.file.format.toUpperCase()} · ${formatBytes(part.file.sizeBytes)} · uploaded by ${part.uploadedBy?.name ?? 'a former member'} ${formatDateTime(part.createdAt)}`}
      above={back}
      actions={
        canFileRequests(lab.has) ? (
          <Button label="Request this part" testID="part-request" onPress={() => router.push({ pathname: '/requests/new', params: { partId: part.id } })} />
        ) : undefined
      }
      testID="screen-part"
    >
      <View style={[styles.top, wide && styles.topWide]}>
        <View style={[styles.previewCol, wide && styles.previewColWide]}>
          <PartMeshPreview labId={lab.id} part={part} rotationDeg={rotationDeg} sizeMm={size} />
          <Text variant="caption" color="inkMuted">
            Drag to orbit, scroll or pinch to zoom. The arrow is the build direction (+z); the box shows the size the packer uses.
          </Text>
          {canEdit ? <RotateControls part={part} rotationDeg={rotationDeg} setRotationDeg={setRotationDeg} size={size} /> : null}
        </View>
        <View style={[styles.side, wide && styles.sideWide]}>
          <Metrics part={part} />
          <Warnings part={part} />
        </View>
      </View>
      <PartRevisions part={part} />
      {canEdit ? (
        <EditPart part={part} rotationDeg={rotationDeg} />
      ) : (
        <Notice tone="info">Read only: designers, planners and leads edit parts.</Notice>
      )}
      {canDelete ? <DeletePart part={part} /> : null}
    </Screen>
  );
}

function Metric({ label, value, testID, tone }: { label: string; value: string; testID?: string; tone?: 'danger' | 'teal' }) {
  return (
    <View style={styles.metric}>
      <Text variant="overline" color="inkFaint">
        {label}
      </Text>
      <Text variant="figure" color={tone ?? 'ink'} testID={testID}>
        {value}
      </Text>
    </View>
  );
}

function Metrics({ part }: { part: Part }) {
  return (
    <Card title="Measured" subtitle="By the server from the file; the size follows the stored rotation." testID="part-metrics">
      <View style={styles.metrics}>
        <Metric label="Size x × y × z" value={`${formatSize(part.sizeMm)} mm`} testID="part-metric-size" />
        <Metric label="Volume" value={formatVolume(part.volumeMm3)} testID="part-metric-volume" />
        <Metric label="Surface area" value={formatArea(part.areaMm2)} testID="part-metric-area" />
        <Metric label="Triangles" value={formatCount(part.triangles)} testID="part-metric-triangles" />
        <Metric label="Shells" value={formatCount(part.shells)} />
        <Metric label="Watertight" value={part.watertight ? 'yes' : 'no'} tone={part.watertight ? 'teal' : 'danger'} testID="part-metric-watertight" />
        <Metric label="Open edges" value={formatCount(part.openEdges)} tone={part.openEdges > 0 ? 'danger' : undefined} />
        <Metric label="Non-manifold edges" value={formatCount(part.nonManifoldEdges)} tone={part.nonManifoldEdges > 0 ? 'danger' : undefined} />
        <Metric label="Triangle facing" value={part.oriented ? 'consistent' : 'mixed'} tone={part.oriented ? undefined : 'danger'} />
        <Metric label="Unit read as" value={part.file.format === '3mf' ? 'the 3MF’s own' : part.file.unit} />
        <Metric label="Used in builds" value={formatCount(part.timesUsed)} />
      </View>
    </Card>
  );
}

function Warnings({ part }: { part: Part }) {
  if (part.warnings.length === 0) {
    return (
      <Notice tone="success" title="No warnings" testID="part-no-warnings">
        The mesh is closed, its triangles face outward, and it fits the lab’s machines.
      </Notice>
    );
  }
  return (
    <View style={styles.warnings} testID="part-warnings">
      {part.warnings.map((w) => (
        <Notice key={w.code} tone="caution" title={warningLabel(w.code)} testID={`part-warning-${w.code}`}>
          <Text variant="body">{w.message}</Text>
          {WARNING_EXPLANATIONS[w.code] ? (
            <Text variant="caption" color="inkMuted">
              {WARNING_EXPLANATIONS[w.code]}
            </Text>
          ) : null}
        </Notice>
      ))}
    </View>
  );
}

const FIELDS = ['name', 'tags', 'defaultMaterialId', 'orientation', 'rotationDeg'] as const;

function EditPart({ part, rotationDeg }: { part: Part; rotationDeg: Rotation }) {
  const lab = useLab();
  const materials = useMaterialsQuery(lab.id);
  const update = useUpdatePartMutation(lab.id, part.id);
  const [name, setName] = useState(part.name);
  const [tagsText, setTagsText] = useState(part.tags.join(', '));
  const [materialId, setMaterialId] = useState<string>(part.materialId ?? 'none');
  const [orientation, setOrientation] = useState<OrientationRule>(part.orientation);
  const [localErrors, setLocalErrors] = useState<Record<string, string>>({});

  const server = fieldErrorsOf(update.error, FIELDS);
  const errors = { ...server.fields, ...localErrors };
  const turned = rotationDeg.some((d, i) => d !== part.rotationDeg[i]);
  // "Saved" stays only while the form still shows what was saved.
  const dirty =
    turned ||
    name.trim() !== part.name ||
    tagsText.split(',').map((t) => t.trim()).filter(Boolean).join('\n') !== part.tags.join('\n') ||
    materialId !== (part.materialId ?? 'none') || orientation !== part.orientation;

  const save = () => {
    const tags = tagsText
      .split(',')
      .map((t) => t.trim())
      .filter(Boolean);
    const body = {
      name,
      tags,
      defaultMaterialId: materialId === 'none' ? null : materialId,
      orientation,
      rotationDeg: rotationDeg as [0 | 90 | 180 | 270, 0 | 90 | 180 | 270, 0 | 90 | 180 | 270],
    };
    const parsed = partPatchSchema.safeParse(body);
    if (!parsed.success) {
      const out: Record<string, string> = {};
      for (const issue of parsed.error.issues) {
        const key = String(issue.path[0] ?? '');
        if (!(key in out)) out[key] = `${issue.path.length > 1 ? `Tag ${Number(issue.path[1]) + 1} ` : ''}${issue.message}`.replace(/^./, (c) => c.toUpperCase());
      }
      setLocalErrors(out);
      return;
    }
    setLocalErrors({});
    update.mutate(parsed.data);
  };

  return (
    <Card title="Edit part" subtitle="Name, tags, default material and how the packer may turn it." testID="part-edit">
      <View style={styles.form}>
        <Field label="Name" testID="part-edit-name" value={name} onChangeText={setName} error={errors.name} />
        <Field
          label="Tags"
          testID="part-edit-tags"
          value={tagsText}
          onChangeText={setTagsText}
          error={errors.tags}
          hint="Separated by commas, up to 20; the library's search finds them."
          autoCapitalize="none"
        />
        <Choice
          label="Default material"
          testID="part-edit-material"
          value={materialId}
          onChange={setMaterialId}
          options={[{ value: 'none', label: 'None' }, ...(materials.data ?? []).map((m) => ({ value: m.id, label: m.name }))]}
          hint={errors.defaultMaterialId ?? 'Suggested when the part is added to a request.'}
        />
        <Choice
          label="Orientation in a build"
          testID="part-edit-orientation"
          value={orientation}
          onChange={setOrientation}
          options={(Object.keys(ORIENTATION_LABELS) as OrientationRule[]).map((o) => ({ value: o, label: ORIENTATION_LABELS[o].label }))}
          hint={ORIENTATION_LABELS[orientation].hint}
        />
        {errors.rotationDeg ? (
          <Text variant="caption" color="danger">
            Turn: {errors.rotationDeg}
          </Text>
        ) : null}
        {turned ? (
          <Text variant="caption" color="amber" testID="part-edit-turn-pending">
            The turn shown in the preview is saved with these changes.
          </Text>
        ) : null}
        {server.form ? <Notice tone="danger">{server.form}</Notice> : null}
        {update.isSuccess && !update.isPending && !dirty ? (
          <Notice tone="success" testID="part-edit-saved">
            Saved.
          </Notice>
        ) : null}
        <Button label="Save changes" testID="part-edit-save" loading={update.isPending} onPress={save} />
      </View>
    </Card>
  );
}

/** Quarter turns tried on the preview; they are stored with the edit form's save. */
function RotateControls({
  part,
  rotationDeg,
  setRotationDeg,
  size,
}: {
  part: Part;
  rotationDeg: Rotation;
  setRotationDeg: (r: Rotation) => void;
  size: [number, number, number];
}) {
  const turned = rotationDeg.some((d, i) => d !== part.rotationDeg[i]);
  return (
    <View style={styles.rotate} testID="part-rotate">
      <Text variant="label" color="inkMuted">
        Turn the part (quarter turns about x, then y, then z)
      </Text>
      <View style={styles.rotateRow}>
        {(['x', 'y', 'z'] as const).map((axis, i) => (
          <Button
            key={axis}
            label={`↻ ${axis}  ${rotationDeg[i]}°`}
            variant="secondary"
            size="sm"
            testID={`part-rotate-${axis}`}
            onPress={() => setRotationDeg(addQuarterTurn(rotationDeg, i as 0 | 1 | 2))}
          />
        ))}
        <Button label="As uploaded" variant="ghost" size="sm" testID="part-rotate-reset" onPress={() => setRotationDeg([0, 0, 0])} />
      </View>
      <Text variant="figure" testID="part-rotated-size">
        {formatSize(size)} mm
      </Text>
      <Text variant="caption" color={turned ? 'amber' : 'inkFaint'}>
        {turned ? 'Not saved yet: save changes below to keep this turn. ' : ''}As uploaded: {formatSize(part.uploadedSizeMm)} mm. Volume and area do not change with a turn.
      </Text>
    </View>
  );
}

function DeletePart({ part }: { part: Part }) {
  const lab = useLab();
  const remove = useDeletePartMutation(lab.id, part.id);
  return (
    <Card title="Delete part" subtitle="Removes the part and, when no other part shares them, its stored file bytes." testID="part-delete-card">
      {remove.error ? (
        <Notice tone="danger" title="Not deleted" testID="part-delete-error">
          {remove.error.message}
        </Notice>
      ) : null}
      <ConfirmAction
        label="Delete part"
        question={`Delete “${part.name}” from the library? This cannot be undone.`}
        testID="part-delete"
        loading={remove.isPending}
        onConfirm={() => remove.mutate(undefined, { onSuccess: () => router.replace('/parts') })}
      />
    </Card>
  );
}

const styles = StyleSheet.create({
  back: { alignSelf: 'flex-start', paddingVertical: spacing.xs },
  top: { gap: spacing.lg },
  topWide: { flexDirection: 'row', alignItems: 'flex-start' },
  previewCol: { gap: spacing.xs },
  previewColWide: { flex: 1.35 },
  side: { gap: spacing.md },
  sideWide: { flex: 1 },
  metrics: { flexDirection: 'row', flexWrap: 'wrap', rowGap: spacing.md, columnGap: spacing.xl },
  metric: { gap: spacing.xxs, minWidth: 130 },
  warnings: { gap: spacing.sm },
  form: { gap: spacing.lg, maxWidth: 720 },
  rotate: { gap: spacing.xs, paddingTop: spacing.sm },
  rotateRow: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.sm },
  tags: { flexDirection: 'row', gap: spacing.xs, flexWrap: 'wrap' },
});
