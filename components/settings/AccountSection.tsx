import { StyleSheet, View } from 'react-native';
import { roleLabels, roleTones, sortRoles } from '../lab/roles';
import { chooseLab, useLab } from '../lab/useCurrentLab';
import { useMeQuery, useSignOutMutation } from '../queries/me';
import { SessionsCard } from './SessionsCard';
import { spacing } from '../theme';
import { Badge, Button, Card, Notice, Text, ToggleChip } from '../ui';
import { SettingsScreen } from './SettingsScreen';

export function AccountSection() {
  const { data: me } = useMeQuery();
  const lab = useLab();
  const signOut = useSignOutMutation();
  return (
    <SettingsScreen title="Your account" subtitle="Who you are signed in as, and the labs you belong to." testID="settings-account">
      <Card title={me?.user.name ?? ''} subtitle={me?.user.email}>
        <Button label="Sign out" variant="secondary" testID="settings-sign-out" onPress={() => signOut.mutate()} loading={signOut.isPending} />
        {signOut.isError ? <Notice tone="danger">{signOut.error.message}</Notice> : null}
      </Card>
      <Card title="Your labs" subtitle={(me?.labs.length ?? 0) > 1 ? 'Pick the lab to work in.' : undefined} testID="account-labs">
        {me?.labs.map((l) => (
          <View key={l.id} style={styles.lab}>
            <ToggleChip label={l.name} value={l.id === lab.id} onChange={() => chooseLab(l.id)} testID={`account-lab-${l.id}`} />
            <View style={styles.roles}>
              {sortRoles(l.roles).map((r) => (
                <Badge key={r} label={roleLabels[r]} tone={roleTones[r]} />
              ))}
            </View>
          </View>
        ))}
        <Text variant="caption" color="inkFaint">
          To join another lab, open the invite link its lead sends you.
        </Text>
      </Card>
      <SessionsCard />
    </SettingsScreen>
  );
}

const styles = StyleSheet.create({
  lab: { flexDirection: 'row', alignItems: 'center', flexWrap: 'wrap', gap: spacing.md },
  roles: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.xs },
});
