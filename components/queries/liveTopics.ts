import type { QueryClient } from '@tanstack/react-query';

/**
 * Which cached reads a change of each kind makes stale: a plan's review
 * moves the queue and home, a run's step moves the floor, the queue, the
 * requests' counts and the powder stock.
 */
export const TOPIC_KEYS: Record<string, readonly string[]> = {
  parts: ['parts', 'requests', 'home'],
  requests: ['requests', 'plans', 'home'],
  plans: ['plans', 'queue', 'runs', 'requests', 'home'],
  runs: ['runs', 'queue', 'plans', 'requests', 'powder', 'home'],
  queue: ['queue', 'runs', 'plans', 'home'],
  machines: ['machines', 'queue', 'runs', 'home'],
  materials: ['materials', 'powder', 'home'],
  members: ['members', 'home'],
  invites: ['invites'],
  powder: ['powder', 'home'],
  jobs: ['jobs'],
  audit: ['audit'],
};

/**
 * Marks the lab's reads of that kind ('*': of every kind) stale; the ones on screen are read
 * again at once. A stored layout never changes in place (a new one is kept
 * instead), so its heavy placements are not fetched again.
 */
export function invalidateForTopic(qc: QueryClient, labId: string, topic: string): Promise<void> {
  const prefixes = TOPIC_KEYS[topic] ?? Object.values(TOPIC_KEYS).flat();
  return qc.invalidateQueries({
    predicate: (q) => {
      const k = q.queryKey;
      return k[0] === 'labs' && k[1] === labId && prefixes.includes(String(k[2])) && !k.includes('layout');
    },
  });
}
