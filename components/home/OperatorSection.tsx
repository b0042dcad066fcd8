import { View } from 'react-native';
import type { MachineView as Machine } from '../../shared/schemas/profiles';
import type { PlanListItem } from '../../shared/schemas/plans';
import type { QueueItemView } from '../../shared/schemas/runs';
import { STATUS_LABELS } from '../../shared/plans/status';
import type { MachineQueueState } from '../queries/home';
import { Badge, EmptyState, ErrorState, Figure, LoadingState, Text, type BadgeTone } from '../ui';
import { formatDateTime } from '../ui/format';
import { HomeSection, RowLink, homeStyles } from './HomeParts';
import { relativeTime } from './time';

type MachinesQ = { data?: Machine[]; isPending: boolean; error: Error | null; refetch: () => unknown };

const STAGE_TONES: Partial<Record<string, BadgeTone>> = { printing: 'ember', cooling: 'teal', breakout: 'amber', finishing: 'amber', queued: 'neutral' };

/** What the stage waits for next, from the queue's predicted times. */
function stageTime(item: QueueItemView, nowMs: number): string {
  if (item.status === 'printing') return `print ends ${formatDateTime(item.printEndAt)} (${relativeTime(item.printEndAt, nowMs)})`;
  if (item.status === 'cooling') return `cool to handle ${formatDateTime(item.cooledAt)} (${relativeTime(item.cooledAt, nowMs)})`;
  if (item.status === 'breakout') return `breakout done ${formatDateTime(item.breakoutDoneAt)} (${relativeTime(item.breakoutDoneAt, nowMs)})`;
  return '';
}

/**
 * Per machine: every build under way (printing, cooling, breakout, finishing)
 * and the next queued build with its predicted start; each opens the
 * machine's floor card.
 */
export function OperatorSection({
  machines,
  queues,
  finishing,
  nowMs,
}: {
  machines: MachinesQ;
  queues: MachineQueueState[];
  finishing: PlanListItem[];
  nowMs: number;
}) {
  const list = machines.data ?? [];
  const busy = queues.filter((q) => q.data && (q.data.active.length > 0 || q.data.plans.length > 0)).length + finishing.length;
  return (
    <HomeSection id="operator" title="Next runs on the machines" role="operator" countTone="teal" count={machines.data && queues.every((q) => q.data) ? busy : undefined}>
      {machines.isPending ? (
        <LoadingState label="Loading machines…" />
      ) : machines.error ? (
        <ErrorState error={machines.error} onRetry={() => machines.refetch()} />
      ) : list.length === 0 ? (
        <EmptyState
          testID="home-operator-empty"
          title="The lab has no machines yet"
          body="Each machine shows here with the build it is running and the next one in its queue."
          who="A lead adds machines in Lab settings."
        />
      ) : (
        <View style={homeStyles.list}>
          {list.map((m) => (
            <MachineRow
              key={m.id}
              machine={m}
              queue={queues.find((q) => q.machineId === m.id)}
              finishing={finishing.filter((p) => p.machine.id === m.id)}
              nowMs={nowMs}
            />
          ))}
        </View>
      )}
    </HomeSection>
  );
}

function MachineRow({ machine, queue, finishing, nowMs }: { machine: Machine; queue: MachineQueueState | undefined; finishing: PlanListItem[]; nowMs: number }) {
  const q = queue?.data;
  const active = q ? [...q.active].sort((a, b) => a.startAt.localeCompare(b.startAt)) : [];
  const next = q?.plans[0];
  const more = q ? q.plans.length - 1 : 0;
  const idle = q && active.length === 0 && !next && finishing.length === 0;
  return (
    <RowLink
      href={`/floor/${machine.id}`}
      testID={`home-machine-${machine.id}`}
      label={`Machine ${machine.name}`}
      tone={next?.late || active.some((a) => a.late) ? 'danger' : undefined}
    >
      <View style={homeStyles.titleLine}>
        <Text variant="bodyStrong">{machine.name}</Text>
        <Text variant="caption" color="inkFaint">
          {machine.chamberCount} chamber{machine.chamberCount === 1 ? '' : 's'}
        </Text>
      </View>
      {!queue || queue.isPending ? (
        <Text variant="caption" color="inkMuted">
          Reading the queue…
        </Text>
      ) : queue.error ? (
        <Text variant="caption" color="danger" testID={`home-machine-${machine.id}-error`}>
          The queue could not be read: {queue.error.message}
        </Text>
      ) : null}
      {active.map((a) => (
        <View key={a.planId} style={homeStyles.meta} testID={`home-run-${a.planId}`}>
          <Badge label={STATUS_LABELS[a.status] ?? a.status} tone={STAGE_TONES[a.status] ?? 'neutral'} />
          <Text variant="caption" style={{ flexShrink: 1 }}>
            {a.name}
          </Text>
          <Figure variant="caption" color="inkMuted">
            {stageTime(a, nowMs)}
          </Figure>
        </View>
      ))}
      {finishing.map((p) => (
        <View key={p.id} style={homeStyles.meta} testID={`home-run-${p.id}`}>
          <Badge label={STATUS_LABELS.finishing} tone="amber" />
          <Text variant="caption">{p.name}</Text>
          <Text variant="caption" color="inkMuted">
            finishing checklist, then done
          </Text>
        </View>
      ))}
      {next ? (
        <View style={homeStyles.meta} testID={`home-next-${next.planId}`}>
          <Badge label="Next" tone="neutral" />
          <Text variant="caption" style={{ flexShrink: 1 }}>
            {next.name}
          </Text>
          <Figure variant="caption" color="inkMuted">
            starts {formatDateTime(next.startAt)} ({relativeTime(next.startAt, nowMs)})
          </Figure>
          {next.late ? <Badge label="Will be late" tone="danger" /> : null}
          {more > 0 ? (
            <Text variant="caption" color="inkFaint">
              +{more} more queued
            </Text>
          ) : null}
        </View>
      ) : null}
      {idle ? (
        <Text variant="caption" color="inkFaint" testID={`home-machine-${machine.id}-idle`}>
          Nothing under way and nothing queued. Leads approve plans into this queue.
        </Text>
      ) : null}
    </RowLink>
  );
}
