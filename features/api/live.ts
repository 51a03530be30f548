/** Live refresh while the server works on something (a fit, a batch). */

/** A job's state that is still changing. */
export const isActive = (state: string) => state === 'queued' || state === 'running';

/** Refresh every second while a fit or batch runs (a fit takes seconds to a minute, a batch of 1000 chains seconds). */
export const LIVE_MS = 1000;

/** The swr refresh interval: LIVE_MS while `running`, else none. */
export const liveWhile = (running: boolean | undefined): number => (running ? LIVE_MS : 0);
