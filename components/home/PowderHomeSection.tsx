import { View } from 'react-native';
import { useLab } from '../lab/useCurrentLab';
import { usePowderQuery } from '../queries/powder';
import { kgText } from '../powder/format';
import { Badge, ErrorState, Text } from '../ui';
import { formatDate } from '../ui/format';
import { HomeSection, RowLink, homeStyles } from './HomeParts';

/**
 * Powders the queue will run short of within their lead time, reused powder blocked by a melt-flow check, and
 * powders the queue needs whose stock the lab does not keep yet (their builds start without a stock check).
 */
export function PowderHomeSection() {
  const lab = useLab();
  const q = usePowderQuery(lab.id);
  const untracked = (m: { tracked: boolean; forecast: { neededKg: number } }) => !m.tracked && m.forecast.neededKg > 0;
  const list = (q.data?.materials ?? []).filter((m) => m.forecast.shortage || m.reuseBlocked || untracked(m));
  if (q.isPending || (q.data && list.length === 0)) return null;
  const urgent = list.some((m) => m.forecast.shortage || m.reuseBlocked);
  return (
    <HomeSection id="powder" title="Powder to reorder, release or track" role="lead" countTone={urgent ? 'danger' : 'amber'} count={list.length}>
      {q.isError ? (
        <ErrorState error={q.error} onRetry={() => q.refetch()} />
      ) : (
        <View style={homeStyles.list} testID="home-powder-list">
          {list.map((m) => (
            <RowLink key={m.material.id} href={`/powder/${m.material.id}`} testID={`home-powder-${m.material.id}`} label={`Powder stock of ${m.material.name}`}>
              <View style={homeStyles.titleLine}>
                <Text variant="bodyStrong" style={{ flexShrink: 1 }}>
                  {m.material.name}
                </Text>
                {m.forecast.shortage ? <Badge tone="danger" label="Reorder" /> : null}
                {m.reuseBlocked ? <Badge tone="danger" label="Reuse blocked" /> : null}
                {untracked(m) ? <Badge tone="amber" label="Not tracked" /> : null}
              </View>
              <Text variant="caption" color="inkMuted">
                {m.forecast.shortage
                  ? `${m.freshKg.toFixed(1)} kg fresh on hand; the queue takes it below ${m.policy.reorderLevelKg} kg on ${formatDate(m.forecast.belowReorderAt)} (lead time ${m.policy.leadTimeDays} days).`
                  : m.reuseBlocked
                    ? 'The last melt-flow check failed: reused powder waits for your release.'
                    : `The queue needs ${kgText(m.forecast.neededKg)} fresh, and no stock of it is kept yet: its builds start without a stock check. Record a lot received or a count to keep it.`}
              </Text>
            </RowLink>
          ))}
        </View>
      )}
    </HomeSection>
  );
}
