import { StyleSheet, View } from 'react-native';
import type { SessionView } from '../../shared/schemas/auth';
import { useRevokeSessionMutation, useSessionsQuery, useSignOutEverywhereMutation } from '../queries/account';
import { spacing } from '../theme';
import { Badge, Button, Card, ConfirmAction, ErrorState, LoadingState, Notice, Table, Text, type Column } from '../ui';
import { formatDateTime } from '../ui/format';

/** A readable name for a browser from its user-agent string: the family and the system, or the raw text. */
export function describeBrowser(userAgent: string | null): string {
  if (!userAgent) return 'Unknown browser';
  const family = /Edg\//.test(userAgent)
    ? 'Edge'
    : /Firefox\//.test(userAgent)
      ? 'Firefox'
      : /Chrom(e|ium)\//.test(userAgent)
        ? 'Chromium-based browser'
        : /Safari\//.test(userAgent)
          ? 'Safari'
          : null;
  const system = /Android/.test(userAgent)
    ? 'Android'
    : /iPhone|iPad/.test(userAgent)
      ? 'iOS'
      : /Windows/.test(userAgent)
        ? 'Windows'
        : /Mac OS X|Macintosh/.test(userAgent)
          ? 'macOS'
          : /Linux/.test(userAgent)
            ? 'Linux'
            : null;
  if (!family) return userAgent.slice(0, 60);
  return system ? `${family} on ${system}` : family;
}

/** The signed-in person's sessions: where they are signed in, ending one, or all. */
export function SessionsCard() {
  const sessions = useSessionsQuery();
  const revoke = useRevokeSessionMutation();
  const everywhere = useSignOutEverywhereMutation();

  const columns: Column<SessionView>[] = [
    {
      key: 'browser',
      title: 'Browser',
      flex: 3,
      render: (s) => (
        <View style={styles.who}>
          <View style={styles.row}>
            <Text variant="bodyStrong">{describeBrowser(s.userAgent)}</Text>
            {s.current ? <Badge label="This browser" tone="ember" /> : null}
          </View>
          <Text variant="caption" color="inkMuted">
            {s.ipAddress ? `From ${s.ipAddress}` : 'Address not known'}
          </Text>
        </View>
      ),
    },
    { key: 'since', title: 'Signed in', flex: 2, value: (s) => formatDateTime(s.createdAt) },
    { key: 'seen', title: 'Last used', flex: 2, value: (s) => formatDateTime(s.lastSeenAt) },
    {
      key: 'end',
      title: '',
      flex: 2,
      render: (s) =>
        s.current ? null : (
          <Button
            label="Sign out"
            size="sm"
            variant="secondary"
            testID={`session-revoke-${s.id}`}
            loading={revoke.isPending && revoke.variables === s.id}
            onPress={() => revoke.mutate(s.id)}
          />
        ),
    },
  ];

  return (
    <Card title="Where you are signed in" subtitle="Each browser or phone signed in to your account. Sign out one you do not recognise, or every one at once." testID="account-sessions">
      {sessions.isPending ? <LoadingState label="Loading your sessions" /> : null}
      {sessions.isError ? <ErrorState error={sessions.error} onRetry={() => sessions.refetch()} /> : null}
      {sessions.data ? (
        <Table columns={columns} rows={sessions.data} rowKey={(s) => s.id} rowTestID={(s) => `session-row-${s.id}`} testID="sessions-list" />
      ) : null}
      {revoke.isError ? <Notice tone="danger">{revoke.error.message}</Notice> : null}
      <ConfirmAction
        label="Sign out everywhere"
        confirmLabel="Sign out on every device"
        question="End every session of your account, this one too? You sign in again here."
        testID="sessions-sign-out-everywhere"
        loading={everywhere.isPending}
        onConfirm={() => everywhere.mutate()}
      />
      {everywhere.isError ? <Notice tone="danger">{everywhere.error.message}</Notice> : null}
      <Text variant="caption" color="inkFaint">
        A session ends by itself after a week without use, and a month after signing in however much it is used.
      </Text>
    </Card>
  );
}

const styles = StyleSheet.create({
  who: { gap: spacing.xxs },
  row: { flexDirection: 'row', alignItems: 'center', flexWrap: 'wrap', gap: spacing.sm },
});
