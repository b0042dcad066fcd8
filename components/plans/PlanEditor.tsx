/**
 * The plan editor: lines on the left, the chamber in 3D taking the rest of a
 * wide screen with the numbers and the layouts under it (or, on demand, in a
 * column beside it); tabs on a phone. This file lays the
 * panes out; what they show and do comes from usePlanEditor (the draft, the
 * packing session, the layout shown, the actions on the server), whose pure
 * rules are in editorModel.ts.
 */
import { router } from 'expo-router';
import { ScrollView, StyleSheet, useWindowDimensions, View } from 'react-native';
import type { PlanView } from '../../shared/schemas/plans';
import { useLab } from '../lab/useCurrentLab';
import { PlanPowderPanel } from '../powder/PlanPowderPanel';
import { usePlanQuery } from '../queries/plans';
import { PlanFlags } from '../review/PlanFlags';
import { setEditorTab, setHelpOpen, setNumbersBeside, useEditorTab, useNumbersBeside, type EditorTab } from '../stores/planEditor';
import { colors, radius, spacing } from '../theme';
import { Badge, Button, ErrorState, LoadingState, Notice, Text, TextInput } from '../ui';
import { ReturnToDraft } from '../review/ReturnToDraft';
import { BuildPane } from './BuildPane';
import { ConflictDialog } from './ConflictDialog';
import { STATUS_LABELS, STATUS_TONES } from './format';
import { LayoutsTable } from './LayoutsTable';
import { LinesPane } from './LinesPane';
import { NumbersPane } from './NumbersPane';
import { PlanHistory } from './PlanHistory';
import { ShortcutHelp } from './ShortcutHelp';
import { usePlanEditor } from './usePlanEditor';

/** Wide enough for three panes side by side. */
const THREE_PANES_PX = 1280;

const TABS: { key: EditorTab; label: string }[] = [
  { key: 'lines', label: 'Lines' },
  { key: 'build', label: '3D' },
  { key: 'numbers', label: 'Numbers' },
  { key: 'layouts', label: 'Layouts' },
];

export function PlanEditor({ planId }: { planId: string }) {
  const lab = useLab();
  const plan = usePlanQuery(lab.id, planId);
  if (plan.isPending) return <LoadingState label="Loading the plan…" />;
  if (plan.isError) return <ErrorState error={plan.error} onRetry={() => plan.refetch()} />;
  return <Editor plan={plan.data} refetch={() => plan.refetch().then((r) => r.data)} />;
}

function Editor({ plan, refetch }: { plan: PlanView; refetch: () => Promise<PlanView | undefined> }) {
  const e = usePlanEditor(plan, refetch);
  const { machine, editable, actions } = e;
  const planId = plan.id;
  const { width, height } = useWindowDimensions();
  const wide = width >= THREE_PANES_PX;
  const tab = useEditorTab();
  const beside = useNumbersBeside();

  const linesPane = <LinesPane {...e.linesPane} />;
  // Under the 3D view (and its caption and note), the numbers start just above the bottom of a wide screen, so they
  // are seen to be there.
  const viewHeight = wide ? (beside ? undefined : Math.max(360, height - 300)) : Math.max(300, Math.round(height * 0.5));
  const buildPane = <BuildPane ref={e.chamberRef} {...e.buildPane} viewHeightPx={viewHeight} />;
  const numbersPane = <NumbersPane {...e.numbersPane} />;
  const powderPane = <PlanPowderPanel planId={planId} freshKg={e.shownNumbers?.freshKg} reusedKg={e.shownNumbers?.reusedKg} layoutLabel={e.shownLabel} />;
  const layoutsPane = (
    <View style={styles.box} testID="plan-layouts">
      <View style={styles.boxHead}>
        <Text variant="heading">Layouts</Text>
        {editable ? <Button label="Keep layout (K)" size="sm" onPress={actions.onKeep} disabled={!actions.canKeep} loading={actions.keeping} testID="layout-keep" /> : null}
      </View>
      <LayoutsTable {...e.layoutsPane} />
    </View>
  );
  const historyPane = (
    <View style={styles.box}>
      <Text variant="heading">History</Text>
      <PlanHistory events={plan.events} />
    </View>
  );

  const titleBox = (
    <View style={[styles.titleBox, !wide && styles.titleBoxPhone]}>
      {editable ? (
        <TextInput value={e.name} onChangeText={e.onName} accessibilityLabel="Plan name" style={styles.nameInput} testID="plan-name" />
      ) : (
        <Text variant="title" numberOfLines={wide ? 1 : 2} testID="plan-name-readonly">{plan.name}</Text>
      )}
      <Text variant="caption" color="inkMuted" numberOfLines={wide ? 1 : 2}>
        {plan.machine.name} ({machine.chamberMm.join(' × ')} mm) · {plan.material.name} · version {plan.version}
      </Text>
    </View>
  );
  const header = (
    <View style={styles.header}>
      <Button label="‹ Plans" variant="ghost" size="sm" onPress={() => router.navigate('/plans')} testID="plan-back" />
      {wide ? titleBox : null}
      <Badge label={STATUS_LABELS[plan.status]} tone={STATUS_TONES[plan.status]} testID="plan-status" />
      {e.dirty ? <Badge label="Unsaved changes" tone="amber" testID="plan-dirty" /> : null}
      {wide ? null : titleBox}
      <View style={styles.headerActions}>
        {wide ? (
          <Button
            label={beside ? 'Numbers under the 3D view' : 'Numbers beside the 3D view'}
            variant="ghost"
            size="sm"
            onPress={() => setNumbersBeside(!beside)}
            testID="plan-numbers-place"
          />
        ) : null}
        {e.hasKeys && wide ? <Button label="Shortcuts (?)" variant="ghost" size="sm" onPress={() => setHelpOpen(true)} testID="plan-shortcuts" /> : null}
        {editable ? (
          <>
            <Button label="Save (S)" variant="secondary" size="sm" onPress={actions.onSave} disabled={!e.hasDraft} loading={actions.saving} testID="plan-save" />
            <Button label="Send for review" size="sm" onPress={actions.onSubmit} loading={actions.submitting} testID="plan-submit" />
          </>
        ) : null}
      </View>
    </View>
  );

  const banner = (
    <>
      {!plan.editable ? (
        <Notice tone="info" title={`${STATUS_LABELS[plan.status]}: read-only`} testID="plan-readonly" folded={!wide}>
          <Text>{plan.status === 'in_review' ? 'A lead reviews the chosen layout; it can be changed again if they send it back.' : 'This plan can no longer be changed here.'}</Text>
          <ReturnToDraft plan={plan} />
        </Notice>
      ) : null}
      {plan.editable && !e.canPlan ? <Notice tone="info">Only planners and leads change plans.</Notice> : null}
      {plan.chosenLayoutId ? <PlanFlags planId={plan.id} compact folded={!wide} /> : null}
      {plan.status === 'changes_requested' ? (
        <Notice tone="caution" title="Sent back" testID="plan-sent-back">{[...plan.events].reverse().find((ev) => ev.to === 'changes_requested')?.comment ?? ''}</Notice>
      ) : null}
      {e.packingError ? (
        <Notice tone="danger" title="Packing failed" testID="pack-error">
          <Text>{e.packingError} The plan is unchanged.</Text>
          {e.retry ? <Button label="Try again" variant="secondary" size="sm" onPress={e.retry} testID="pack-retry" /> : null}
        </Notice>
      ) : null}
      {e.packingNotes.length > 0 ? (
        <Notice tone="caution" title="About this packing" testID="pack-notes">
          {e.packingNotes.map((n) => (
            <Text key={n}>{n}.</Text>
          ))}
        </Notice>
      ) : null}
      {e.message ? (
        <Notice tone={e.message.tone === 'success' ? 'success' : e.message.tone === 'danger' ? 'danger' : 'info'} testID="plan-message">
          {e.message.text}
        </Notice>
      ) : null}
    </>
  );

  const sheets = (
    <>
      <ShortcutHelp open={e.helpOpen} onClose={() => setHelpOpen(false)} />
      <ConflictDialog
        open={!!actions.conflict}
        currentVersion={actions.conflict?.currentVersion ?? null}
        onReload={actions.onReload}
        onKeepMine={actions.onKeepMine}
        onClose={actions.closeConflict}
        busy={actions.saving}
      />
    </>
  );

  if (wide) {
    return (
      <View style={styles.screen} testID="screen-plan-editor">
        {header}
        {banner}
        <View style={styles.panes} testID="plan-panes-wide">
          <ScrollView style={styles.left} contentContainerStyle={styles.paneContent}>
            {linesPane}
          </ScrollView>
          {beside ? (
            <>
              <View style={styles.centre}>{buildPane}</View>
              <ScrollView style={styles.right} contentContainerStyle={styles.paneContent} testID="plan-numbers-beside">
                {numbersPane}
                {powderPane}
                {layoutsPane}
                {historyPane}
              </ScrollView>
            </>
          ) : (
            <ScrollView style={styles.centre} contentContainerStyle={styles.paneContent} testID="plan-numbers-under">
              {buildPane}
              <View style={styles.under}>
                <View style={styles.underColumn}>
                  {numbersPane}
                  {powderPane}
                </View>
                <View style={styles.underColumn}>
                  {layoutsPane}
                  {historyPane}
                </View>
              </View>
            </ScrollView>
          )}
        </View>
        {sheets}
        {e.chamberLoaders}
      </View>
    );
  }

  return (
    <View style={styles.screen} testID="screen-plan-editor">
      <ScrollView contentContainerStyle={styles.phoneContent} keyboardShouldPersistTaps="handled">
        {header}
        {banner}
        <View style={styles.tabs} accessibilityRole="tablist" testID="plan-tabs">
          {TABS.map((t) => (
            <Button key={t.key} label={t.label} size="sm" variant={tab === t.key ? 'primary' : 'ghost'} onPress={() => setEditorTab(t.key)} testID={`plan-tab-${t.key}`} aria-selected={tab === t.key} />
          ))}
        </View>
        {tab === 'lines' ? linesPane : null}
        {tab === 'build' ? buildPane : null}
        {tab === 'numbers' ? numbersPane : null}
        {tab === 'numbers' ? powderPane : null}
        {tab === 'layouts' ? (
          <>
            {layoutsPane}
            {historyPane}
          </>
        ) : null}
      </ScrollView>
      {sheets}
      {e.chamberLoaders}
    </View>
  );
}

const styles = StyleSheet.create({
  screen: { flex: 1, backgroundColor: colors.powder, padding: spacing.lg, gap: spacing.md },
  header: { flexDirection: 'row', alignItems: 'center', gap: spacing.md, flexWrap: 'wrap' },
  titleBox: { flexGrow: 1, flexShrink: 1, flexBasis: 260, gap: 2 },
  titleBoxPhone: { flexBasis: '100%' },
  nameInput: { fontSize: 20, fontWeight: '600', paddingVertical: 4 },
  headerActions: { flexDirection: 'row', gap: spacing.sm, flexWrap: 'wrap', marginLeft: 'auto' },
  panes: { flex: 1, flexDirection: 'row', gap: spacing.md, minHeight: 0 },
  left: { width: 330, flexGrow: 0 },
  centre: { flex: 1, minWidth: 0 },
  right: { width: 420, flexGrow: 0 },
  under: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.md, alignItems: 'flex-start' },
  underColumn: { flexGrow: 1, flexShrink: 1, flexBasis: 360, gap: spacing.md },
  paneContent: { gap: spacing.md, paddingBottom: spacing.xl },
  phoneContent: { gap: spacing.md, paddingBottom: spacing.xxxl },
  tabs: { flexDirection: 'row', gap: spacing.xs, flexWrap: 'wrap' },
  box: { gap: spacing.md, padding: spacing.lg, backgroundColor: colors.surface, borderRadius: radius.lg, borderWidth: 1, borderColor: colors.line },
  boxHead: { flexDirection: 'row', alignItems: 'center', justifyContent: 'space-between', gap: spacing.sm },
});
