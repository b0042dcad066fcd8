import { useQueryClient } from '@tanstack/react-query';
import { useEffect } from 'react';
import { baseUrl } from '../api/client';
import { setLive } from '../stores/live';
import { invalidateForTopic } from './liveTopics';

/**
 * Listens to the lab's server-sent change events and reads again what each
 * change makes stale, so the floor, queue, review and home follow a change
 * made on another screen within a second. While the stream is down the
 * screens poll; the browser reconnects by itself, and on reconnecting every
 * read of the lab is refreshed (changes may have been missed meanwhile).
 */
export function useLabLiveUpdates(labId: string | undefined): void {
  const qc = useQueryClient();
  useEffect(() => {
    if (!labId || typeof EventSource === 'undefined') return;
    const source = new EventSource(`${baseUrl}/api/labs/${labId}/events`);
    let everLive = false;
    let live = false;
    const onReady = () => {
      setLive(labId, true);
      live = true;
      if (everLive) void invalidateForTopic(qc, labId, '*');
      everLive = true;
    };
    const onChange = (e: MessageEvent<string>) => {
      try {
        const { topic } = JSON.parse(e.data) as { topic: string };
        void invalidateForTopic(qc, labId, topic);
      } catch {
        // A malformed event: nothing to refresh.
      }
    };
    const onError = () => {
      if (!live) return;
      live = false;
      setLive(labId, false);
      // Polling restarts when the screens' reads next run: make them run now.
      void invalidateForTopic(qc, labId, '*');
    };
    source.addEventListener('ready', onReady);
    source.addEventListener('change', onChange as EventListener);
    source.addEventListener('error', onError);
    return () => {
      source.close();
      setLive(labId, false);
    };
  }, [labId, qc]);
}
