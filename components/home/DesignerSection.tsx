import { router } from 'expo-router';
import { StyleSheet, View } from 'react-native';
import type { LabRequest } from '../queries/requests';
import { fonts, spacing } from '../theme';
import { Badge, Button, EmptyState, ErrorState, Figure, LoadingState, Text } from '../ui';
import { PRIORITY_LABELS, PRIORITY_TONES, daysUntil, dueText } from '../requests/labels';
import { HomeSection, Legend, ProgressBar, RowLink, homeStyles } from './HomeParts';

/** Lines shown per request on home; the request's page has them all. */
const LINES_SHOWN = 5;

type Q = { data?: LabRequest[]; isPending: boolean; error: Error | null; refetch: () => unknown };

/** The designer's own open requests, soonest due first, with each line's progress. */
export function DesignerSection({ requests }: { requests: Q }) {
  const rows = requests.data ?? [];
  return (
    <HomeSection
      id="designer"
      title="My open requests"
      role="designer"
      count={requests.data ? rows.length : undefined}
      action={<Button label="New" size="sm" variant="secondary" testID="home-request-new" onPress={() => router.push('/requests/new')} />}
    >
      {requests.isPending ? (
        <LoadingState label="Loading your requests…" />
      ) : requests.error ? (
        <ErrorState error={requests.error} onRetry={() => requests.refetch()} />
      ) : rows.length === 0 ? (
        <EmptyState
          testID="home-designer-empty"
          title="No requests of yours are open"
          body="Requests you file show here with their due dates, priorities and how many of each part are planned and printed."
          who="You file them as a designer, from Requests."
        />
      ) : (
        <View style={homeStyles.list}>
          <Legend />
          {rows.map((r) => (
            <RequestCard key={r.id} request={r} />
          ))}
        </View>
      )}
    </HomeSection>
  );
}

function RequestCard({ request: r }: { request: LabRequest }) {
  const days = daysUntil(r.dueDate);
  const pastDue = days < 0 && r.totals.printed < r.totals.quantity;
  return (
    <RowLink
      href={`/requests/${r.id}`}
      testID={`home-request-${r.id}`}
      label={`Request ${r.title}`}
      tone={pastDue ? 'danger' : undefined}
    >
      <View style={homeStyles.titleLine}>
        <Text variant="bodyStrong" style={{ flexShrink: 1 }}>
          {r.title}
        </Text>
        <Badge label={PRIORITY_LABELS[r.priority]} tone={PRIORITY_TONES[r.priority]} />
      </View>
      <View style={homeStyles.meta}>
        <Figure variant="caption" color={pastDue ? 'danger' : days <= 2 ? 'amber' : 'inkMuted'} testID={`home-request-${r.id}-due`}>
          Due {dueText(r.dueDate, r.status)}
        </Figure>
        <Text variant="caption" color="inkFaint">
          {r.materialName ?? 'no material'}
        </Text>
        <Figure variant="caption" color="inkMuted">
          {r.totals.printed}/{r.totals.quantity} printed · {r.totals.planned} planned
        </Figure>
      </View>
      <View style={styles.lines}>
        {r.lines.slice(0, LINES_SHOWN).map((l) => (
          <View key={l.id} style={styles.line} testID={`home-request-line-${l.id}`}>
            <Text variant="caption" numberOfLines={1} style={styles.lineName}>
              {l.partName}
            </Text>
            <ProgressBar quantity={l.quantity} planned={l.plannedCount} printed={l.printedCount} />
            <Figure variant="caption" color="inkMuted" style={styles.lineFigures}>
              {l.printedCount}/{l.plannedCount}/{l.quantity}
            </Figure>
          </View>
        ))}
        {r.lines.length > LINES_SHOWN ? (
          <Text variant="caption" color="inkFaint">
            and {r.lines.length - LINES_SHOWN} more line{r.lines.length - LINES_SHOWN === 1 ? '' : 's'}
          </Text>
        ) : null}
      </View>
    </RowLink>
  );
}

const styles = StyleSheet.create({
  lines: { gap: spacing.xs, marginTop: spacing.xxs },
  line: { flexDirection: 'row', alignItems: 'center', gap: spacing.sm },
  lineName: { width: 118, flexShrink: 0 },
  lineFigures: { minWidth: 72, textAlign: 'right', fontFamily: fonts.mono },
});
