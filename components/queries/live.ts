/**
 * Live updates of a lab's screens. The web build (live.web.ts) listens to
 * the server's change stream; a build without EventSource keeps polling,
 * which every live screen does whenever its lab is not live.
 */
export function useLabLiveUpdates(_labId: string | undefined): void {}
