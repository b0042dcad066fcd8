import { router } from 'expo-router';
import { StyleSheet, View } from 'react-native';
import { useLab } from '../lab/useCurrentLab';
import { useAddRevisionMutation, usePartRevisionsQuery, type Part } from '../queries/parts';
import { STATUS_LABELS, type PlanStatus } from '../../shared/plans/status';
import { colors, radius, spacing } from '../theme';
import { Badge, Card, ErrorState, LinkPressable, LoadingState, Notice, Text } from '../ui';
import { formatDateTime } from '../ui/format';
import { FileDrop } from '../upload/FileDrop';
import { formatSize } from './format';
import { canUploadParts } from './PartLibrary';

/**
 * The part's file revisions, newest first. A designer adds a new file to the
 * newest; plans made before keep the revision they were packed with, and the
 * library, new requests and new plans use the newest.
 */
export function PartRevisions({ part }: { part: Part }) {
  const lab = useLab();
  const revs = usePartRevisionsQuery(lab.id, part.id);
  const add = useAddRevisionMutation(lab.id, part.id);
  const canAdd = canUploadParts(lab.has);
  const mine = revs.data?.revisions.find((r) => r.partId === part.id);
  const newest = revs.data?.revisions.find((r) => r.current);
  return (
    <Card
      title="File revisions"
      subtitle="A new file becomes the next revision. Builds already planned keep the file they were packed with; new requests and plans use the newest."
      testID="part-revisions"
    >
      {revs.isPending ? (
        <LoadingState label="Loading the revisions…" />
      ) : revs.isError ? (
        <ErrorState error={revs.error} onRetry={() => revs.refetch()} />
      ) : (
        <>
          {mine && !mine.current && newest ? (
            <Notice tone="caution" title={`This is revision ${mine.revision}`} testID="part-revision-older">
              <Text>{`Revision ${newest.revision} is the newest file of this part.`}</Text>
              <LinkPressable href={`/parts/${newest.partId}`} testID="part-revision-newest">
                <Text variant="bodyStrong" color="emberPressed">
                  Open revision {newest.revision} ›
                </Text>
              </LinkPressable>
            </Notice>
          ) : null}
          {revs.data.revisions.map((r) => (
            <View key={r.partId} style={[styles.row, r.partId === part.id && styles.here]} testID={`part-revision-${r.revision}`}>
              <View style={styles.head}>
                <Text variant="bodyStrong">Revision {r.revision}</Text>
                {r.current ? <Badge label="Newest" tone="teal" /> : <Badge label="Replaced" />}
                {r.partId !== part.id ? (
                  <LinkPressable href={`/parts/${r.partId}`} testID={`part-revision-${r.revision}-open`}>
                    <Text variant="label" color="emberPressed">
                      Open ›
                    </Text>
                  </LinkPressable>
                ) : null}
              </View>
              <Text variant="caption" color="inkMuted">
                {`${r.fileName} · ${formatSize(r.sizeMm)} mm${r.watertight ? '' : ' · not watertight'} · ${r.uploadedBy?.name ?? 'a former member'} ${formatDateTime(r.uploadedAt)}`}
              </Text>
              <Text variant="caption" color="inkMuted" testID={`part-revision-${r.revision}-plans`}>
                {r.plans.length === 0
                  ? 'No plan uses this file.'
                  : `Used by ${r.plans.map((p) => `${p.name} (${STATUS_LABELS[p.status as PlanStatus]?.toLowerCase() ?? p.status})`).join(', ')}`}
              </Text>
            </View>
          ))}
          {canAdd && mine?.current ? (
            <View style={{ gap: spacing.sm }}>
              <FileDrop
                onFiles={(files) => {
                  if (files.length !== 1) return;
                  add.mutate(files[0], { onSuccess: (created) => router.replace(`/parts/${created.id}`) });
                }}
                disabled={add.isPending}
                accept={['.stl', '.obj', '.3mf']}
                hint="One STL, OBJ or 3MF file, in millimetres: the part's next revision."
                testID="part-revision-drop"
              />
              {add.isPending ? <LoadingState label="Measuring the new file…" /> : null}
              {add.isError ? (
                <Notice tone="danger" title="The new file was not taken" testID="part-revision-error">
                  {add.error.message}
                </Notice>
              ) : null}
            </View>
          ) : null}
        </>
      )}
    </Card>
  );
}

const styles = StyleSheet.create({
  row: { gap: spacing.xxs, padding: spacing.sm, borderRadius: radius.md, borderWidth: 1, borderColor: colors.line },
  here: { borderColor: colors.ember },
  head: { flexDirection: 'row', alignItems: 'center', gap: spacing.sm, flexWrap: 'wrap' },
});
