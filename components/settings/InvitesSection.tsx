import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { fieldErrorsOf } from '../api/client';
import type { InviteView as Invite, Role } from '../../shared/schemas/auth';
import { roleHints, roleLabels, roles, roleTones, sortRoles } from '../lab/roles';
import { useLab } from '../lab/useCurrentLab';
import { useMembersQuery } from '../queries/members';
import { inviteInputSchema, useCreateInviteMutation, useInvitesQuery, useRevokeInviteMutation } from '../queries/invites';
import { spacing } from '../theme';
import { Badge, Button, Card, ConfirmAction, EmptyState, ErrorState, Field, Figure, LoadingState, Notice, Table, Text, ToggleChip, zodFieldErrors, type BadgeTone, type Column } from '../ui';
import { formatDate } from '../ui/format';
import { SettingsScreen } from './SettingsScreen';

export function InvitesSection() {
  const lab = useLab();
  return (
    <SettingsScreen
      title="Invites"
      subtitle="Invite people by e-mail with the roles they will hold. The link in the e-mail signs them up or adds the lab to their account."
      testID="settings-invites"
    >
      {lab.isLead ? (
        <>
          <InviteForm />
          <InviteList />
        </>
      ) : (
        <Notice tone="info" title="Leads send invites" testID="invites-read-only">
          Ask a lead of this lab to invite someone; the invite list is visible to leads only.
        </Notice>
      )}
    </SettingsScreen>
  );
}

function InviteForm() {
  const lab = useLab();
  const create = useCreateInviteMutation(lab.id);
  const [email, setEmail] = useState('');
  // No role is ticked at first: the lead picks each one on purpose.
  const [chosen, setChosen] = useState<Role[]>([]);
  const [localErrors, setLocalErrors] = useState<Record<string, string>>({});
  const [sentTo, setSentTo] = useState<string | null>(null);
  const server = fieldErrorsOf(create.error, ['email', 'roles']);
  const errors = { ...server.fields, ...localErrors };

  const submit = () => {
    const parsed = inviteInputSchema.safeParse({ email, roles: chosen });
    if (!parsed.success) {
      setLocalErrors(zodFieldErrors(parsed.error));
      return;
    }
    setLocalErrors({});
    setSentTo(null);
    create.mutate(parsed.data, {
      onSuccess: (invite) => {
        setSentTo(invite.email);
        setEmail('');
      },
    });
  };

  return (
    <Card title="Invite a member" testID="invite-form">
      {server.form ? (
        <Notice tone="danger" testID="invite-error">
          {server.form}
        </Notice>
      ) : null}
      {sentTo ? (
        <Notice tone="success" testID="invite-sent">
          {`Invite sent to ${sentTo}. The link works once and expires on the date shown below.`}
        </Notice>
      ) : null}
      <Field
        label="E-mail"
        testID="invite-email"
        value={email}
        onChangeText={setEmail}
        error={errors.email}
        autoCapitalize="none"
        autoComplete="email"
        keyboardType="email-address"
        inputMode="email"
        onSubmitEditing={submit}
      />
      <View style={styles.roles}>
        <Text variant="label" color="inkMuted">
          Roles
        </Text>
        <View style={styles.chips} testID="invite-roles">
          {roles.map((r) => (
            <View key={r} style={styles.roleOption}>
              <ToggleChip
                label={roleLabels[r]}
                value={chosen.includes(r)}
                onChange={(on) => setChosen((c) => (on ? sortRoles([...c, r]) : c.filter((x) => x !== r)))}
                testID={`invite-role-${r}`}
              />
              <Text variant="caption" color="inkFaint" style={styles.roleHint}>
                {roleHints[r]}
              </Text>
            </View>
          ))}
        </View>
        {errors.roles ? (
          <Text variant="caption" color="danger" testID="invite-roles-error" accessibilityRole="alert">
            {errors.roles}
          </Text>
        ) : null}
      </View>
      <Button label="Send invite" testID="invite-submit" onPress={submit} loading={create.isPending} />
    </Card>
  );
}

function inviteStatus(invite: Invite, now: number): { label: string; tone: BadgeTone } {
  if (invite.acceptedAt) return { label: 'Accepted', tone: 'teal' };
  if (new Date(invite.expiresAt).getTime() < now) return { label: 'Expired', tone: 'neutral' };
  return { label: 'Pending', tone: 'amber' };
}

function InviteList() {
  const lab = useLab();
  const invites = useInvitesQuery(lab.id, lab.isLead);
  const revoke = useRevokeInviteMutation(lab.id);
  const members = useMembersQuery(lab.id);
  const now = Date.now();
  // The server names the inviter by user id; members give the name.
  const inviterName = (i: Invite) => {
    const byId = typeof i.invitedBy === 'string' || typeof i.invitedBy === 'number' ? String(i.invitedBy) : undefined;
    return members.data?.find((m) => m.userId === byId)?.name ?? '–';
  };

  if (invites.isPending) return <LoadingState label="Loading invites…" />;
  if (invites.isError) return <ErrorState error={invites.error} onRetry={() => invites.refetch()} />;

  const columns: Column<Invite>[] = [
    { key: 'email', title: 'E-mail', flex: 2, value: (i) => i.email },
    {
      key: 'roles',
      title: 'Roles',
      flex: 2,
      render: (i) => (
        <View style={styles.chips}>
          {sortRoles(i.roles).map((r) => (
            <Badge key={r} label={roleLabels[r]} tone={roleTones[r]} />
          ))}
        </View>
      ),
    },
    { key: 'by', title: 'Invited by', flex: 1, value: inviterName },
    { key: 'sent', title: 'Sent', width: 110, render: (i) => <Figure>{formatDate(i.createdAt)}</Figure> },
    { key: 'expires', title: 'Expires', width: 110, render: (i) => <Figure>{formatDate(i.expiresAt)}</Figure> },
    {
      key: 'status',
      title: 'Status',
      width: 100,
      render: (i) => {
        const s = inviteStatus(i, now);
        return <Badge label={s.label} tone={s.tone} testID={`invite-status-${i.id}`} />;
      },
    },
    {
      key: 'actions',
      title: '',
      width: 190,
      align: 'right',
      render: (i) =>
        inviteStatus(i, now).label === 'Pending' ? (
          <ConfirmAction
            label="Revoke"
            question={`Revoke the invite to ${i.email}?`}
            onConfirm={() => revoke.mutate(i.id)}
            loading={revoke.isPending && revoke.variables === i.id}
            testID={`invite-revoke-${i.id}`}
          />
        ) : null,
    },
  ];

  return (
    <View style={styles.list}>
      <Text variant="heading" accessibilityRole="header">
        Sent invites
      </Text>
      {revoke.isError ? <Notice tone="danger">{revoke.error.message}</Notice> : null}
      <Table
        testID="invites-table"
        columns={columns}
        rows={invites.data}
        rowKey={(i) => i.id}
        rowTestID={(i) => `invite-row-${i.id}`}
        empty={<EmptyState title="No invites sent" body="Invites you send appear here until they are accepted, revoked or expire." />}
      />
    </View>
  );
}

const styles = StyleSheet.create({
  roles: { gap: spacing.sm },
  chips: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.sm },
  roleOption: { gap: spacing.xxs, flexBasis: 150, flexGrow: 1, maxWidth: 220 },
  roleHint: { paddingHorizontal: spacing.xs },
  list: { gap: spacing.md },
});
