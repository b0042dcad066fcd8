import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import type { AuditEntryView, AuditKind } from '../../shared/schemas/audit';
import { useLab } from '../lab/useCurrentLab';
import { useAuditQuery, type AuditFilters } from '../queries/account';
import { useMembersQuery } from '../queries/members';
import { colors, radius, spacing, useIsWide } from '../theme';
import { Badge, Button, Choice, EmptyState, ErrorState, Field, LoadingState, Notice, Text, type BadgeTone } from '../ui';
import { formatDateTime } from '../ui/format';
import { SettingsScreen } from './SettingsScreen';

const kindLabels: Record<AuditKind, string> = {
  lab: 'Lab',
  member: 'Member',
  invite: 'Invite',
  machine: 'Machine',
  material: 'Material',
  part: 'Part',
  request: 'Request',
  plan: 'Plan',
  queue: 'Queue order',
  run: 'Run',
  sign_in: 'Sign-in',
  account: 'Account',
};
const kindTones: Partial<Record<AuditKind, BadgeTone>> = { member: 'ember', sign_in: 'teal', account: 'teal', plan: 'amber', run: 'amber' };

const actionLabels: Record<string, string> = {
  created: 'added',
  changed: 'changed',
  deleted: 'removed',
  signed_in: 'signed in',
  failed: 'failed to sign in (wrong password)',
  password_changed: 'changed their password',
  password_reset: 'set a new password from a reset link',
  reset_requested: 'asked for a password reset link',
  session_revoked: 'signed out one of their sessions',
  signed_out_everywhere: 'signed out everywhere',
  returned_to_draft: 'returned to draft',
  approval_undone: 'undid the approval of',
  undone: 'undid',
};

const DAY = /^\d{4}-\d{2}-\d{2}$/;

/** A field name as people say it: `queue_position` → "queue position". */
const fieldName = (key: string) => key.replace(/_id$/, '').replace(/_/g, ' ');

function show(v: unknown): string {
  if (v === null || v === undefined) return '—';
  if (Array.isArray(v)) return v.map(show).join(', ') || '—';
  if (typeof v === 'object') return JSON.stringify(v).slice(0, 120);
  return String(v).slice(0, 120);
}

/** One sentence for an entry: who did what to which record. */
export function describeEntry(e: AuditEntryView): string {
  const who = e.actor ? (e.actor.name ?? 'A former member') : 'The system';
  const kind = kindLabels[e.kind as AuditKind] ?? e.kind;
  const action = actionLabels[e.action] ?? e.action;
  if (e.kind === 'sign_in' || e.kind === 'account') return `${who} ${action}`;
  const what = e.target.label ? `${kind.toLowerCase()} “${e.target.label}”` : kind.toLowerCase();
  return `${who} ${action} ${what}`;
}

/** The fields a change touched, before → after (for a change), or what was added or removed. */
function changedFields(e: AuditEntryView): Array<{ key: string; before?: string; after?: string }> {
  if (e.action === 'changed' && e.before && e.after) {
    return Object.keys(e.after).map((k) => ({ key: k, before: show(e.before![k]), after: show(e.after![k]) }));
  }
  if ((e.action === 'returned_to_draft' || e.action === 'approval_undone') && e.after) {
    return Object.keys(e.after).map((k) => ({ key: k, after: show(e.after![k]) }));
  }
  return [];
}

export function AuditSection() {
  const lab = useLab();
  const wide = useIsWide();
  const members = useMembersQuery(lab.isLead ? lab.id : undefined);
  const [kind, setKind] = useState<AuditKind | 'all'>('all');
  const [actor, setActor] = useState<string>('all');
  const [from, setFrom] = useState('');
  const [to, setTo] = useState('');
  const dateError = (v: string) => (v && !DAY.test(v) ? 'A date as YYYY-MM-DD.' : undefined);
  const filters: AuditFilters = {
    kind: kind === 'all' ? undefined : kind,
    actor: actor === 'all' ? undefined : actor,
    from: DAY.test(from) ? from : undefined,
    to: DAY.test(to) ? to : undefined,
  };
  const audit = useAuditQuery(lab.id, filters);
  const entries = audit.data?.pages.flatMap((p) => p.entries) ?? [];

  if (!lab.isLead) {
    return (
      <SettingsScreen title="Audit log" testID="screen-audit">
        <Notice tone="info">The lab's audit log is for its leads.</Notice>
      </SettingsScreen>
    );
  }

  return (
    <SettingsScreen title="Audit log" subtitle="Every change to the lab's members, records and plans, and every sign-in, newest first. Entries cannot be edited or deleted." testID="screen-audit">
      <View style={[styles.filters, wide && styles.filtersWide]} testID="audit-filters">
        <Choice<AuditKind | 'all'>
          label="What"
          value={kind}
          compact
          testID="audit-kind"
          onChange={setKind}
          options={[{ value: 'all', label: 'All', testID: 'audit-kind-all' }, ...(Object.keys(kindLabels) as AuditKind[]).map((k) => ({ value: k, label: kindLabels[k], testID: `audit-kind-${k}` }))]}
        />
        <Choice<string>
          label="Who"
          value={actor}
          compact
          testID="audit-actor"
          onChange={setActor}
          options={[{ value: 'all', label: 'Anyone', testID: 'audit-actor-all' }, ...(members.data ?? []).map((m) => ({ value: m.userId, label: m.name, testID: `audit-actor-${m.userId}` }))]}
        />
        <View style={styles.dates}>
          <View style={styles.date}>
            <Field label="From" hint="YYYY-MM-DD" value={from} onChangeText={setFrom} error={dateError(from)} testID="audit-from" autoCapitalize="none" inputMode="numeric" />
          </View>
          <View style={styles.date}>
            <Field label="To" hint="YYYY-MM-DD, that whole day" value={to} onChangeText={setTo} error={dateError(to)} testID="audit-to" autoCapitalize="none" inputMode="numeric" />
          </View>
        </View>
      </View>

      {audit.isPending ? <LoadingState label="Loading the audit log" /> : null}
      {audit.isError ? <ErrorState error={audit.error} onRetry={() => audit.refetch()} /> : null}
      {audit.data && entries.length === 0 ? <EmptyState title="Nothing recorded" body="No entry matches these filters." /> : null}
      {entries.length > 0 ? (
        <View style={styles.list} testID="audit-list" role="list">
          {entries.map((e) => (
            <AuditRow key={e.id} entry={e} wide={wide} />
          ))}
        </View>
      ) : null}
      {audit.hasNextPage ? (
        <Button label="Show older entries" variant="secondary" testID="audit-more" loading={audit.isFetchingNextPage} onPress={() => audit.fetchNextPage()} />
      ) : null}
    </SettingsScreen>
  );
}

function AuditRow({ entry, wide }: { entry: AuditEntryView; wide: boolean }) {
  const fields = changedFields(entry);
  return (
    <View style={[styles.row, wide && styles.rowWide]} testID={`audit-entry-${entry.id}`} role="listitem">
      <View style={[styles.when, wide && styles.whenWide]}>
        <Text variant="caption" color="inkMuted">
          {formatDateTime(entry.at)}
        </Text>
        <Badge label={kindLabels[entry.kind as AuditKind] ?? entry.kind} tone={kindTones[entry.kind as AuditKind] ?? 'neutral'} />
      </View>
      <View style={styles.what}>
        <Text variant="body">{describeEntry(entry)}</Text>
        {fields.map((f) => (
          <Text key={f.key} variant="caption" color="inkMuted">
            {f.before === undefined ? `${fieldName(f.key)}: ${f.after}` : `${fieldName(f.key)}: ${f.before} → ${f.after}`}
          </Text>
        ))}
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  filters: { gap: spacing.md },
  filtersWide: { gap: spacing.lg },
  dates: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.md },
  date: { minWidth: 150, flexGrow: 1, flexBasis: 150 },
  list: { gap: spacing.sm },
  row: {
    gap: spacing.xs,
    padding: spacing.md,
    borderRadius: radius.md,
    borderWidth: 1,
    borderColor: colors.line,
    backgroundColor: colors.surface,
  },
  rowWide: { flexDirection: 'row', alignItems: 'flex-start', gap: spacing.lg },
  when: { flexDirection: 'row', alignItems: 'center', gap: spacing.sm, flexWrap: 'wrap' },
  whenWide: { width: 230, flexShrink: 0 },
  what: { flex: 1, gap: spacing.xxs },
});
