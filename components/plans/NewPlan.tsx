/**
 * A new plan from open request lines: the planner picks a material, a
 * machine, the lines and how many of each. When the parts cannot fit one
 * chamber, the screen offers to spread them over several plans.
 */
import { router } from 'expo-router';
import { useEffect, useMemo, useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { buildCountLowerBound, parseInstance, splitIntoBuilds, type PlannedBuild, type Vec3 } from '../../shared/packing';
import type { OpenLineView, PlanOrientationRule } from '../../shared/schemas/plans';
import { isApiError } from '../api/client';
import type { MachineView as Machine, MaterialView as Material } from '../../shared/schemas/profiles';
import { useLab } from '../lab/useCurrentLab';
import { useMachinesQuery } from '../queries/machines';
import { useMaterialsQuery } from '../queries/materials';
import { useCreatePlanMutation, useOpenLinesQuery, type PlanCreateInput } from '../queries/plans';
import { colors, radius, spacing } from '../theme';
import { Badge, Button, Card, Choice, EmptyState, ErrorState, Field, LoadingState, Notice, Screen, Text, TextInput, ToggleChip } from '../ui';
import { formatDate } from '../ui/format';
import { buildInstance, defaultOptions } from './instance';
import { priorityLabel, priorityTone } from '../requests/labels';

const PRIORITY_RANK: Record<string, number> = { urgent: 1, high: 2, normal: 3, low: 4 };

type Pick = { on: boolean; quantity: string };

export function NewPlan() {
  const lab = useLab();
  const machines = useMachinesQuery(lab.id);
  const materials = useMaterialsQuery(lab.id);
  const [materialId, setMaterialId] = useState<string | undefined>();
  const [machineId, setMachineId] = useState<string | undefined>();
  const [name, setName] = useState('');
  const [picks, setPicks] = useState<Record<string, Pick>>({});
  const [split, setSplit] = useState<PlannedBuild[] | null>(null);
  const [splitting, setSplitting] = useState(false);
  const [error, setError] = useState<string | null>(null);
  const [creating, setCreating] = useState(false);
  const create = useCreatePlanMutation(lab.id);
  // Every material's open lines at once: the chips show where the work is, and the most urgent line picks the first material.
  const openLines = useOpenLinesQuery(lab.id, undefined);
  const linesPerMaterial = useMemo(() => {
    const m = new Map<string, number>();
    for (const l of openLines.data ?? []) if (l.request.materialId) m.set(l.request.materialId, (m.get(l.request.materialId) ?? 0) + 1);
    return m;
  }, [openLines.data]);

  useEffect(() => {
    if (materialId || !materials.data?.length || openLines.isPending) return;
    const urgent = openLines.data?.find((l) => l.request.materialId && materials.data.some((m) => m.id === l.request.materialId));
    setMaterialId(urgent?.request.materialId ?? materials.data[0].id);
  }, [materials.data, materialId, openLines.data, openLines.isPending]);
  useEffect(() => {
    if (!machineId && machines.data?.length) setMachineId(machines.data[0].id);
  }, [machines.data, machineId]);
  // A new material has other lines: start their picks afresh, all on, each at what it still needs.
  const lines = useMemo(() => (openLines.data ?? []).filter((l) => l.request.materialId === materialId), [openLines.data, materialId]);
  useEffect(() => {
    setPicks(Object.fromEntries(lines.map((l) => [l.requestLineId, { on: true, quantity: String(l.remaining) }])));
    setSplit(null);
  }, [lines]);

  const machine = machines.data?.find((m) => m.id === machineId);
  const material = materials.data?.find((m) => m.id === materialId);

  const chosen = useMemo(
    () =>
      lines
        .filter((l) => picks[l.requestLineId]?.on)
        .map((l) => ({ line: l, quantity: Number(picks[l.requestLineId]?.quantity) })),
    [lines, picks],
  );
  const quantityErrors = useMemo(() => {
    const out: Record<string, string> = {};
    for (const { line, quantity } of chosen) {
      if (!Number.isInteger(quantity) || quantity < 1) out[line.requestLineId] = 'a whole number, at least 1';
      else if (quantity > line.remaining) out[line.requestLineId] = `at most ${line.remaining} (still needed)`;
    }
    return out;
  }, [chosen]);
  const valid = chosen.length > 0 && Object.keys(quantityErrors).length === 0 && !!machine && !!material;

  const buildsNeeded = useMemo(() => {
    if (!valid || !machine || !material) return 0;
    const input = buildInstance(
      chosen.map(({ line, quantity }) => ({ requestLineId: line.requestLineId, quantity, orientation: line.part.orientation, sizeMm: line.part.sizeMm as Vec3 })),
      machine,
      material,
      defaultOptions(machine, material),
    );
    const parsed = parseInstance(input);
    return parsed.ok ? buildCountLowerBound(parsed.instance) : 0;
  }, [valid, chosen, machine, material]);

  useEffect(() => setSplit(null), [chosen, machineId]);

  const defaultName = machine && material ? `${material.name} on ${machine.name}, ${formatDate(new Date().toISOString())}` : 'New plan';

  const setPick = (id: string, patch: Partial<Pick>) => setPicks((p) => ({ ...p, [id]: { ...(p[id] ?? { on: false, quantity: '1' }), ...patch } }));

  async function createOne(input: PlanCreateInput) {
    const res = await create.mutateAsync(input);
    return res.id;
  }

  async function onCreate() {
    if (!valid || !machine || !material) return;
    setError(null);
    setCreating(true);
    try {
      const id = await createOne({
        name: name.trim() || defaultName,
        machineId: machine.id,
        materialId: material.id,
        lines: chosen.map(({ line, quantity }) => ({ requestLineId: line.requestLineId, quantity })),
      });
      router.replace(`/plans/${id}`);
    } catch (e) {
      setError(isApiError(e) ? e.message : String(e));
    } finally {
      setCreating(false);
    }
  }

  function onSplit() {
    if (!machine || !material) return;
    setSplitting(true);
    // Let the busy state paint before the split packs (a short budget per build keeps it to a moment).
    setTimeout(() => {
      const options = defaultOptions(machine, material);
      const outcome = splitIntoBuilds(
        chosen.map(({ line, quantity }) => ({
          id: line.requestLineId,
          size: line.part.sizeMm as Vec3,
          quantity,
          orientations: buildInstance([{ requestLineId: line.requestLineId, quantity, orientation: line.part.orientation, sizeMm: line.part.sizeMm as Vec3 }], machine, material, options).parts[0]?.orientations,
          priority: PRIORITY_RANK[line.request.priority] ?? 3,
          dueDate: line.request.dueDate,
        })),
        {
          chamber: machine.chamberMm as Vec3,
          margin: { xy: material.marginXyMm, bottom: material.marginBottomMm, top: material.marginTopMm },
          spacing: material.spacingMm,
          layerHeight: options.layerHeightMm,
          timeLimitMs: 250,
          seed: 1,
        },
      );
      setSplitting(false);
      if (!outcome.ok) {
        setError(outcome.problems.map((p) => `${p.field} ${p.message}`).join('; '));
        return;
      }
      setSplit(outcome.builds);
    }, 30);
  }

  async function onCreateSplit() {
    if (!split || !machine || !material) return;
    setError(null);
    setCreating(true);
    const base = name.trim() || defaultName;
    try {
      let first: string | null = null;
      for (const [i, b] of split.entries()) {
        const id = await createOne({
          name: `${base} (${i + 1} of ${split.length})`,
          machineId: machine.id,
          materialId: material.id,
          lines: b.instance.parts.filter((p) => p.quantity > 0).map((p) => ({ requestLineId: p.id, quantity: p.quantity })),
        });
        first ??= id;
      }
      router.replace(first ? `/plans/${first}` : '/plans');
    } catch (e) {
      setError(`${isApiError(e) ? e.message : String(e)} The plans made before this one are kept in the list.`);
    } finally {
      setCreating(false);
    }
  }

  if (machines.isPending || materials.isPending) return <LoadingState label="Loading machines and materials…" />;
  if (machines.isError) return <ErrorState error={machines.error} onRetry={() => machines.refetch()} />;
  if (materials.isError) return <ErrorState error={materials.error} onRetry={() => materials.refetch()} />;

  const total = chosen.reduce((s, c) => s + (Number.isFinite(c.quantity) ? c.quantity : 0), 0);

  return (
    <Screen
      title="New plan"
      subtitle="Pick the machine, the material and the open request lines this build takes; what you leave stays open for later plans."
      testID="screen-plan-new"
      above={<Button label="‹ Plans" variant="ghost" size="sm" onPress={() => router.navigate('/plans')} />}
    >
      {machines.data.length === 0 || materials.data.length === 0 ? (
        <EmptyState title="No machines or materials yet" body="A plan needs a machine and a material of the lab; a lead adds them in the lab settings." />
      ) : null}
      <Card title="Machine and material">
        <View style={styles.group}>
          <Text variant="label" color="inkMuted">Material</Text>
          <Choice
            value={materialId || null}
            onChange={setMaterialId}
            options={materials.data.map((m: Material) => ({ value: m.id, label: `${m.name} (${linesPerMaterial.get(m.id) ?? 0} open lines)`, testID: `new-plan-material-${m.id}` }))}
          />
          {material ? (
            <Text variant="caption" color="inkFaint">
              Spacing {material.spacingMm} mm, wall margin {material.marginXyMm} mm, floor {material.marginBottomMm} mm, top {material.marginTopMm} mm, layers {material.defaultLayerHeightMm} mm.
            </Text>
          ) : null}
        </View>
        <View style={styles.group}>
          <Text variant="label" color="inkMuted">Machine</Text>
          <Choice
            value={machineId || null}
            onChange={setMachineId}
            options={machines.data.map((m: Machine) => ({ value: m.id, label: `${m.name} (${m.chamberMm.join(' × ')} mm)`, testID: `new-plan-machine-${m.id}` }))}
          />
        </View>
        <Field label="Name" value={name} onChangeText={setName} placeholder={defaultName} testID="new-plan-name" />
      </Card>

      <Card title="Open request lines" subtitle="Most urgent first. Quantities start at what each line still needs.">
        {openLines.isPending ? (
          <LoadingState label="Loading open lines…" />
        ) : openLines.isError ? (
          <ErrorState error={openLines.error} onRetry={() => openLines.refetch()} />
        ) : lines.length === 0 ? (
          <EmptyState testID="new-plan-no-lines" title="Nothing open in this material" body="Every line of the open requests in this material is planned already." who="Requests come from designers." />
        ) : (
          <View style={styles.lines} testID="new-plan-lines">
            {lines.map((l: OpenLineView) => {
              const pick = picks[l.requestLineId] ?? { on: false, quantity: String(l.remaining) };
              const err = pick.on ? quantityErrors[l.requestLineId] : undefined;
              return (
                <View key={l.requestLineId} style={[styles.line, pick.on && styles.lineOn]} testID={`new-plan-line-${l.requestLineId}`}>
                  <ToggleChip label={l.part.name} value={pick.on} onChange={(on) => setPick(l.requestLineId, { on })} testID={`new-plan-pick-${l.requestLineId}`} />
                  <View style={styles.lineInfo}>
                    <Text variant="caption" color="inkMuted" numberOfLines={1}>
                      {l.request.title} · due {l.request.dueDate} · {ruleText(l.part.orientation)}
                    </Text>
                    <Text variant="caption" color="inkFaint">
                      {l.part.sizeMm.map((v) => v.toFixed(0)).join(' × ')} mm · {l.remaining} of {l.quantity} still needed
                    </Text>
                  </View>
                  <Badge label={priorityLabel(l.request.priority)} tone={priorityTone(l.request.priority)} />
                  <View style={styles.qty}>
                    <TextInput
                      value={pick.quantity}
                      onChangeText={(t) => setPick(l.requestLineId, { quantity: t.replace(/[^0-9]/g, '') })}
                      inputMode="numeric"
                      accessibilityLabel={`Quantity of ${l.part.name}`}
                      editable={pick.on}
                      invalid={!!err}
                      mono
                      testID={`new-plan-qty-${l.requestLineId}`}
                    />
                    {err ? <Text variant="caption" color="danger">{err}</Text> : null}
                  </View>
                </View>
              );
            })}
          </View>
        )}
      </Card>

      {buildsNeeded > 1 ? (
        <Notice tone="caution" title={`These ${total} parts need at least ${buildsNeeded} builds on ${machine?.name}`} testID="new-plan-too-big">
          <Text>Their volume with the material's spacing is more than one chamber holds. Spread them over several plans, most urgent lines first, or take fewer parts.</Text>
          <View style={styles.chips}>
            <Button label={splitting ? 'Splitting…' : 'Split into several plans'} variant="secondary" onPress={onSplit} loading={splitting} testID="new-plan-split" />
          </View>
        </Notice>
      ) : null}

      {split ? (
        <Card title={`${split.length} plans`} subtitle="Each plan is packed here once to share the parts out; pack each again in its editor." testID="new-plan-split-preview">
          {split.map((b, i) => (
            <Text key={i} variant="body">
              {i + 1}. {b.result.placements.length} parts on {b.instance.parts.length} lines, {b.result.height.toFixed(0)} mm high
            </Text>
          ))}
          <Button label={`Create ${split.length} plans`} onPress={onCreateSplit} loading={creating} testID="new-plan-create-split" />
        </Card>
      ) : null}

      {error ? <Notice tone="danger" title="The plan was not created" testID="new-plan-error">{error}</Notice> : null}

      <View style={styles.footer}>
        <Text variant="body" color="inkMuted">
          {chosen.length} line{chosen.length === 1 ? '' : 's'}, {total} part{total === 1 ? '' : 's'}
        </Text>
        <Button label="Create plan" onPress={onCreate} disabled={!valid || creating} loading={creating && !split} testID="new-plan-create" />
      </View>
    </Screen>
  );
}

function ruleText(rule: PlanOrientationRule): string {
  return rule === 'any' ? 'turns any way' : rule === 'keep_up' ? 'keeps its top up' : 'as stored';
}

const styles = StyleSheet.create({
  group: { gap: spacing.xs, marginBottom: spacing.md },
  chips: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.sm },
  lines: { gap: spacing.xs },
  line: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    alignItems: 'center',
    gap: spacing.sm,
    padding: spacing.sm,
    borderRadius: radius.md,
    borderWidth: 1,
    borderColor: colors.line,
  },
  lineOn: { borderColor: colors.teal, backgroundColor: colors.surface },
  lineInfo: { flexGrow: 1, flexShrink: 1, flexBasis: 200, gap: 2 },
  qty: { width: 90 },
  footer: { flexDirection: 'row', alignItems: 'center', justifyContent: 'flex-end', gap: spacing.md, flexWrap: 'wrap' },
});
