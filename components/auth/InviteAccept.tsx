import { router } from 'expo-router';
import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { z } from 'zod';
import { PASSWORD_MIN } from '../../shared/schemas/auth';
import { fieldErrorsOf, isApiError } from '../api/client';
import type { InvitePreviewView as InvitePreview } from '../../shared/schemas/auth';
import { roleHints, roleLabels, roleTones, sortRoles } from '../lab/roles';
import { chooseLab } from '../lab/useCurrentLab';
import { useAcceptInviteMutation, useInvitePreviewQuery } from '../queries/invites';
import { useMeQuery, useSignOutMutation } from '../queries/me';
import { colors, radius, spacing } from '../theme';
import { Badge, Button, ErrorState, Field, Figure, LoadingState, Notice, Text, zodFieldErrors } from '../ui';
import { AuthFrame } from './AuthFrame';
import { formatDateTime } from '../ui/format';

const newUserSchema = z.object({
  name: z.string().trim().min(1, 'Enter your name.').max(120),
  password: z.string().min(PASSWORD_MIN, `At least ${PASSWORD_MIN} characters.`).max(200, 'At most 200 characters.'),
});
const existingUserSchema = z.object({ password: z.string().min(1, 'Enter your password.') });

export function InviteAccept({ token }: { token: string }) {
  const preview = useInvitePreviewQuery(token);

  if (preview.isPending) {
    return (
      <AuthFrame title="Invite" testID="invite-screen">
        <LoadingState label="Opening the invite…" />
      </AuthFrame>
    );
  }
  if (preview.isError) {
    const gone = isApiError(preview.error) && preview.error.status === 404;
    return (
      <AuthFrame title="This invite cannot be used" testID="invite-screen">
        {gone ? (
          <Notice tone="caution" testID="invite-invalid">
            The link is unknown, already used, revoked or expired. Ask a lead of the lab to send a new invite.
          </Notice>
        ) : (
          <ErrorState error={preview.error} onRetry={() => preview.refetch()} />
        )}
        <Button label="Go to sign in" variant="secondary" onPress={() => router.replace('/sign-in')} />
      </AuthFrame>
    );
  }
  return (
    <AuthFrame title={`Join ${preview.data.labName}`} subtitle="A lead of this lab invited you." testID="invite-screen">
      <InviteSummary invite={preview.data} />
      <AcceptForm token={token} invite={preview.data} />
    </AuthFrame>
  );
}

function InviteSummary({ invite }: { invite: InvitePreview }) {
  return (
    <View style={styles.summary} testID="invite-accept-lab">
      <View style={styles.summaryRow}>
        <Text variant="overline" color="inkFaint">
          Lab
        </Text>
        <Text variant="bodyStrong">{invite.labName}</Text>
      </View>
      <View style={styles.summaryRow}>
        <Text variant="overline" color="inkFaint">
          For
        </Text>
        <Text variant="body">{invite.email}</Text>
      </View>
      <View style={styles.summaryRow}>
        <Text variant="overline" color="inkFaint">
          Roles
        </Text>
        <View style={styles.roles} testID="invite-accept-roles">
          {sortRoles(invite.roles).map((r) => (
            <View key={r} style={styles.role}>
              <Badge label={roleLabels[r]} tone={roleTones[r]} />
              <Text variant="caption" color="inkMuted">
                {roleHints[r]}
              </Text>
            </View>
          ))}
        </View>
      </View>
      <View style={styles.summaryRow}>
        <Text variant="overline" color="inkFaint">
          Valid until
        </Text>
        <Figure variant="figure">{formatDateTime(invite.expiresAt)}</Figure>
      </View>
    </View>
  );
}

function AcceptForm({ token, invite }: { token: string; invite: InvitePreview }) {
  const { data: me } = useMeQuery();
  const signOut = useSignOutMutation();
  const accept = useAcceptInviteMutation(token);
  const [name, setName] = useState('');
  const [password, setPassword] = useState('');
  const [localErrors, setLocalErrors] = useState<Record<string, string>>({});
  const server = fieldErrorsOf(accept.error, ['name', 'password']);
  const errors = { ...server.fields, ...localErrors };
  const signedInAsInvitee = !!me && me.user.email.toLowerCase() === invite.email.toLowerCase();
  const signedInAsOther = !!me && !signedInAsInvitee;

  const done = (labs: { id: string; name: string }[]) => {
    const joined = labs.filter((l) => l.name === invite.labName);
    const lab = joined[joined.length - 1] ?? labs[labs.length - 1];
    if (lab) chooseLab(lab.id);
    router.replace('/');
  };

  const submit = () => {
    if (signedInAsInvitee) {
      accept.mutate({}, { onSuccess: (r) => done(r.labs) });
      return;
    }
    const parsed = invite.existingUser ? existingUserSchema.safeParse({ password }) : newUserSchema.safeParse({ name, password });
    if (!parsed.success) {
      setLocalErrors(zodFieldErrors(parsed.error));
      return;
    }
    setLocalErrors({});
    accept.mutate(parsed.data, { onSuccess: (r) => done(r.labs) });
  };

  if (signedInAsOther) {
    return (
      <Notice tone="caution" title={`You are signed in as ${me.user.email}`} testID="invite-wrong-user">
        <Text variant="body">{`This invite is for ${invite.email}. Sign out, then open the link again to accept it.`}</Text>
        <Button label="Sign out" variant="secondary" size="sm" onPress={() => signOut.mutate()} loading={signOut.isPending} testID="invite-sign-out" />
      </Notice>
    );
  }

  return (
    <View style={styles.form} role="form" accessibilityLabel="Accept the invite" testID="invite-accept-form">
      {server.form ? (
        <Notice tone="danger" testID="invite-accept-error">
          {server.form}
        </Notice>
      ) : null}
      {signedInAsInvitee ? (
        <Text variant="body" color="inkMuted">{`Signed in as ${me.user.name}. Accept to add this lab to your labs.`}</Text>
      ) : invite.existingUser ? (
        <>
          <Text variant="body" color="inkMuted">
            {`${invite.email} already has a Sinterstack account. Enter its password to join.`}
          </Text>
          <Field
            label="Password"
            testID="invite-accept-password"
            value={password}
            onChangeText={setPassword}
            error={errors.password}
            secureTextEntry
            autoComplete="current-password"
            onSubmitEditing={submit}
          />
        </>
      ) : (
        <>
          <Field label="E-mail" value={invite.email} editable={false} testID="invite-accept-email" />
          <Field label="Your name" testID="invite-accept-name" value={name} onChangeText={setName} error={errors.name} autoComplete="name" />
          <Field
            label="Password"
            hint="At least 10 characters."
            testID="invite-accept-password"
            value={password}
            onChangeText={setPassword}
            error={errors.password}
            secureTextEntry
            autoComplete="new-password"
            onSubmitEditing={submit}
          />
        </>
      )}
      <Button
        label={signedInAsInvitee ? 'Accept and open the lab' : invite.existingUser ? 'Sign in and join' : 'Create account and join'}
        testID="invite-accept-submit"
        onPress={submit}
        loading={accept.isPending}
        fullWidth
      />
    </View>
  );
}

const styles = StyleSheet.create({
  summary: {
    backgroundColor: colors.surface,
    borderWidth: 1,
    borderColor: colors.line,
    borderRadius: radius.lg,
    padding: spacing.lg,
    gap: spacing.md,
  },
  summaryRow: { gap: spacing.xxs },
  roles: { gap: spacing.sm, paddingTop: spacing.xxs },
  role: { flexDirection: 'row', alignItems: 'center', gap: spacing.sm, flexWrap: 'wrap' },
  form: { gap: spacing.lg },
});
