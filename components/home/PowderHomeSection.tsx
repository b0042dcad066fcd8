import { View } from 'react-native';
import { useLab } from '../lab/useCurrentLab';
import { usePowderQuery } from '../queries/powder';
import { Badge, ErrorState, Text } from '../ui';
import { formatDate } from '../ui/format';
import { HomeSection, RowLink, homeStyles } from './HomeParts';

/** Powders the queue will run short of within their lead time, and reused powder blocked by a melt-flow check. */
export function PowderHomeSection() {
  const lab = useLab();
  const q = usePowderQuery(lab.id);
  const list = (q.data?.materials ?? []).filter((m) => m.forecast.shortage || m.reuseBlocked);
  if (q.isPending || (q.data && list.length === 0)) return null;
  return (
    <HomeSection id="powder" title="Powder to reorder or release" role="lead" countTone="danger" count={list.length}>
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
              </View>
              <Text variant="caption" color="inkMuted">
                {m.forecast.shortage
                  ? `${m.freshKg.toFixed(1)} kg fresh on hand; the queue takes it below ${m.policy.reorderLevelKg} kg on ${formatDate(m.forecast.belowReorderAt)} (lead time ${m.policy.leadTimeDays} days).`
                  : 'The last melt-flow check failed: reused powder waits for your release.'}
              </Text>
            </RowLink>
          ))}
        </View>
      )}
    </HomeSection>
  );
}
