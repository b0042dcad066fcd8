import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import type { MemberView as Member, Role } from '../../shared/schemas/auth';
import { roleLabels, roles, roleTones, sortRoles } from '../lab/roles';
import { useLab } from '../lab/useCurrentLab';
import { useMeQuery } from '../queries/me';
import { useMembersQuery, useRemoveMemberMutation, useUpdateMemberRolesMutation } from '../queries/members';
import { spacing, useIsWide } from '../theme';
import { Badge, Button, ConfirmAction, ErrorState, Figure, LoadingState, Notice, Table, Text, ToggleChip, type Column } from '../ui';
import { formatDate } from '../ui/format';
import { SettingsScreen } from './SettingsScreen';

export function MembersSection() {
  const lab = useLab();
  const members = useMembersQuery(lab.id);
  const { data: me } = useMeQuery();
  const wide = useIsWide();

  const columns: Column<Member>[] = [
    {
      key: 'member',
      title: 'Member',
      flex: 2,
      render: (m) => (
        <View style={styles.who}>
          <View style={styles.nameRow}>
            <Text variant="bodyStrong">{m.name}</Text>
            {m.userId === me?.user.id ? <Badge label="You" tone="ember" /> : null}
          </View>
          <Text variant="caption" color="inkMuted">
            {m.email}
          </Text>
        </View>
      ),
    },
    {
      key: 'roles',
      title: 'Roles',
      flex: 3,
      render: (m) => (lab.isLead ? <RoleEditor member={m} compact={wide} /> : <RoleBadges roles={m.roles} />),
    },
    { key: 'joined', title: 'Joined', width: 120, render: (m) => <Figure>{formatDate(m.joinedAt)}</Figure> },
  ];
  if (lab.isLead) {
    columns.push({ key: 'actions', title: '', width: 200, align: 'right', render: (m) => <RemoveMember member={m} isSelf={m.userId === me?.user.id} /> });
  }

  return (
    <SettingsScreen
      title="Members and roles"
      subtitle={lab.isLead ? 'Turn roles on and off per member. Every lab keeps at least one lead.' : 'Who works in this lab and what they do. Leads change roles.'}
      testID="settings-members"
    >
      {members.isPending ? (
        <LoadingState label="Loading members…" />
      ) : members.isError ? (
        <ErrorState error={members.error} onRetry={() => members.refetch()} />
      ) : (
        <Table
          testID="members-table"
          columns={columns}
          rows={members.data}
          rowKey={(m) => m.userId}
          rowTestID={(m) => `member-row-${m.userId}`}
        />
      )}
    </SettingsScreen>
  );
}

function RoleBadges({ roles: list }: { roles: Role[] }) {
  return (
    <View style={styles.chips}>
      {sortRoles(list).map((r) => (
        <Badge key={r} label={roleLabels[r]} tone={roleTones[r]} />
      ))}
    </View>
  );
}

/** "lead" or "designer and lead": role names joined as a sentence. */
function roleList(list: Role[]): string {
  const names = sortRoles(list).map((r) => roleLabels[r].toLowerCase());
  return names.length <= 1 ? names.join('') : `${names.slice(0, -1).join(', ')} and ${names[names.length - 1]}`;
}

/**
 * Role chips that stage a change and ask before saving it: one stray click
 * must not grant (or take away) a lead's powers. After the save the result is
 * reported in words.
 */
function RoleEditor({ member, compact }: { member: Member; compact: boolean }) {
  const lab = useLab();
  const update = useUpdateMemberRolesMutation(lab.id);
  const [localError, setLocalError] = useState<string | null>(null);
  const [staged, setStaged] = useState<{ role: Role; on: boolean; next: Role[] } | null>(null);
  const [saved, setSaved] = useState<string | null>(null);
  const shown = staged ? staged.next : update.isPending && update.variables ? update.variables.roles : member.roles;

  const toggle = (role: Role, on: boolean) => {
    const next = on ? sortRoles([...member.roles, role]) : member.roles.filter((r) => r !== role);
    setSaved(null);
    if (next.length === 0) {
      setLocalError('A member holds at least one role. Remove the member instead.');
      return;
    }
    setLocalError(null);
    setStaged({ role, on, next });
  };

  const apply = () => {
    if (!staged) return;
    const { next } = staged;
    update.mutate(
      { userId: member.userId, roles: next },
      {
        onSuccess: () => setSaved(`Saved: ${member.name} is now ${roleList(next)}.`),
        onSettled: () => setStaged(null),
      },
    );
  };

  const error = localError ?? (update.isError ? update.error.message : null);
  const question = staged
    ? staged.on
      ? `Give ${member.name} the ${roleLabels[staged.role].toLowerCase()} role?`
      : `Take the ${roleLabels[staged.role].toLowerCase()} role from ${member.name}?`
    : null;
  return (
    <View style={styles.editor}>
      <View style={styles.chips}>
        {roles.map((r) => (
          <ToggleChip
            key={r}
            compact={compact}
            label={roleLabels[r]}
            value={shown.includes(r)}
            onChange={(on) => toggle(r, on)}
            disabled={update.isPending || staged !== null}
            testID={`member-role-${member.userId}-${r}`}
            accessibilityLabel={`${roleLabels[r]} role for ${member.name}`}
          />
        ))}
      </View>
      {question ? (
        <View style={styles.confirm} testID={`member-confirm-${member.userId}`}>
          <Text variant="label" color={staged?.role === 'lead' ? 'danger' : 'ink'}>
            {question}
          </Text>
          <View style={styles.chips}>
            <Button
              label={staged?.on ? 'Give role' : 'Take role'}
              size="sm"
              variant={staged?.role === 'lead' ? 'danger' : 'primary'}
              loading={update.isPending}
              onPress={apply}
              testID={`member-confirm-${member.userId}-apply`}
            />
            <Button label="Keep as it was" size="sm" variant="ghost" onPress={() => setStaged(null)} testID={`member-confirm-${member.userId}-cancel`} />
          </View>
        </View>
      ) : null}
      {saved ? (
        <Text variant="caption" color="teal" testID={`member-saved-${member.userId}`} accessibilityRole="alert">
          {saved}
        </Text>
      ) : null}
      {error ? (
        <Text variant="caption" color="danger" testID={`member-error-${member.userId}`} accessibilityRole="alert">
          {error}
        </Text>
      ) : null}
    </View>
  );
}

function RemoveMember({ member, isSelf }: { member: Member; isSelf: boolean }) {
  const lab = useLab();
  const remove = useRemoveMemberMutation(lab.id);
  return (
    <View style={styles.remove}>
      <ConfirmAction
        label={isSelf ? 'Leave lab' : 'Remove'}
        question={isSelf ? `Leave ${lab.name}?` : `Remove ${member.name}?`}
        confirmLabel={isSelf ? 'Leave' : 'Remove'}
        onConfirm={() => remove.mutate(member.userId)}
        loading={remove.isPending}
        testID={`member-remove-${member.userId}`}
      />
      {remove.isError ? <Notice tone="danger">{remove.error.message}</Notice> : null}
    </View>
  );
}

const styles = StyleSheet.create({
  who: { gap: 2, flexShrink: 1 },
  nameRow: { flexDirection: 'row', alignItems: 'center', gap: spacing.sm, flexWrap: 'wrap' },
  chips: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.xs },
  editor: { gap: spacing.xs },
  confirm: { gap: spacing.xs },
  remove: { gap: spacing.xs, alignItems: 'flex-end' },
});
